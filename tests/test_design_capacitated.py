"""capacitated_tree (Esau and Williams 1966): every result checked feasible with networkx (a
tree on the served sites, every subtree hanging from the root within capacity) and compared with
the exact optimum of the single-commodity flow formulation solved by scipy.optimize.milp
(tests/design_reference.py); the formulation itself is checked against networkx's minimum
spanning tree (capacity >= total demand) and the star (capacity 1, unit demands)."""
import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from design_reference import capacitated_optimum, complete_instance
from fastmst.design import capacitated_tree


def _check_feasible(r, tail, head, weight, n, root, capacity, demand):
    """The result is a tree on root + served sites; each subtree carries <= capacity."""
    tree = nx.MultiGraph()
    served = [v for v in range(n) if r.subtree[v] >= 0]
    tree.add_nodes_from([root] + served)
    for p, why in zip(r.position.tolist(), r.reason.tolist()):
        u, v = int(tail[p]), int(head[p])
        tree.add_edge(u, v)
        assert (root in (u, v)) == (why == "feeder")
    assert nx.is_tree(tree)
    assert r.weight == pytest.approx(sum(float(weight[p]) for p in r.position))
    cut = tree.copy()
    cut.remove_node(root)
    comps = list(nx.connected_components(cut))
    assert len(comps) == r.load.size == int(np.count_nonzero(r.reason == "feeder"))
    for comp in comps:
        ids = {int(r.subtree[v]) for v in comp}
        assert len(ids) == 1
        load = sum(demand[v] for v in comp)
        assert load == pytest.approx(r.load[ids.pop()])
        assert load <= capacity + 1e-9
    assert set(r.unserved.tolist()) | set(served) | {root} == set(range(n))


@settings(max_examples=40)
@given(st.integers(3, 8), st.integers(0, 2**31), st.integers(1, 6))
def test_feasible_and_never_below_the_milp_optimum(n, seed, cap_units):
    """Complete graphs of random points, demands 1..3: feasible, and cost >= the exact optimum
    (scipy.optimize.milp); the gap is reported by bench/bench_design.py."""
    tail, head, weight, _ = complete_instance(n, seed)
    rng = np.random.default_rng(seed + 1)
    demand = rng.integers(1, 4, n).astype(float)
    capacity = max(3.0, float(cap_units))
    root = int(rng.integers(0, n))
    r = capacitated_tree(tail, head, weight, root, capacity, demand=demand)
    _check_feasible(r, tail, head, weight, n, root, capacity, demand)
    assert r.unserved.size == 0
    opt = capacitated_optimum(tail, head, weight, n, root, capacity, demand)
    assert opt is not None and r.weight >= opt - 1e-9


@pytest.mark.parametrize("seed", range(4))
def test_reference_formulation_against_mst_and_star(seed):
    """The MILP reference: capacity >= total demand gives the minimum spanning tree weight
    (networkx), capacity 1 with unit demands the star of root links; Esau-Williams finds the
    star too (no merge fits)."""
    n = 7
    tail, head, weight, _ = complete_instance(n, seed)
    g = nx.Graph()
    g.add_weighted_edges_from(zip(tail.tolist(), head.tolist(), weight.tolist()))
    mst = sum(d["weight"] for *_, d in nx.minimum_spanning_tree(g).edges(data=True))
    ones = np.ones(n)
    assert capacitated_optimum(tail, head, weight, n, 0, n, ones) == pytest.approx(mst)
    star = sum(w for a, b, w in zip(tail, head, weight) if a == 0)
    assert capacitated_optimum(tail, head, weight, n, 0, 1, ones) == pytest.approx(star)
    r = capacitated_tree(tail, head, weight, 0, 1)
    assert r.weight == pytest.approx(star) and (r.reason == "feeder").all()


@given(st.integers(2, 30), st.integers(0, 2**31), st.floats(1.0, 10.0), st.booleans())
def test_sparse_candidates_report_unserved_sites(n, seed, capacity, ample):
    """Sparse random candidates, some sites without any route to the root: the served part is
    feasible; a site with its own link to the root is always served; with capacity for the
    whole demand, exactly the sites outside the root's component (networkx) are unserved."""
    rng = np.random.default_rng(seed)
    m = 2 * n
    tail = rng.integers(0, n, m)
    head = rng.integers(0, n, m)
    weight = rng.integers(0, 5, m).astype(float)
    demand = np.minimum(rng.integers(0, 3, n).astype(float), capacity)
    if ample:
        capacity = float(demand.sum()) + 1.0
    r = capacitated_tree(tail, head, weight, 0, capacity, demand=demand, n_nodes=n)
    _check_feasible(r, tail, head, weight, n, 0, capacity, demand)
    g = nx.MultiGraph()
    g.add_nodes_from(range(n))
    g.add_edges_from(zip(tail.tolist(), head.tolist()))
    for v in g.neighbors(0):
        assert v == 0 or r.subtree[v] >= 0
    if ample:
        outside = set(range(n)) - nx.node_connected_component(g, 0)
        assert set(r.unserved.tolist()) == outside


def test_unreachable_sites_are_unserved():
    """Sites 3-4 have no link towards the root: unserved, the rest served."""
    r = capacitated_tree([0, 1, 3], [1, 2, 4], [1.0, 1.0, 1.0], 0, 5)
    assert r.unserved.tolist() == [3, 4] and r.position.tolist() == [0, 1]


def test_rejects_bad_arguments():
    t, h, w = [0, 1], [1, 2], [1.0, 2.0]
    with pytest.raises(ValueError, match="capacity = 0"):
        capacitated_tree(t, h, w, 0, 0)
    with pytest.raises(TypeError, match="capacity must be a real number"):
        capacitated_tree(t, h, w, 0, "3")
    with pytest.raises(ValueError, match="demand 5.0 > capacity 2"):
        capacitated_tree(t, h, w, 0, 2, demand=[0, 5, 1])
    with pytest.raises(ValueError, match=r"demand\[1\] = -1"):
        capacitated_tree(t, h, w, 0, 2, demand=[0, -1, 1])
    with pytest.raises(ValueError, match=r"shape \(3,\)"):
        capacitated_tree(t, h, w, 0, 2, demand=[1, 1])
    with pytest.raises(TypeError, match="demand must hold numbers"):
        capacitated_tree(t, h, w, 0, 2, demand=["a", "b", "c"])
