"""light_shallow_tree: the two bounds of Khuller, Raghavachari and Young, "Balancing minimum
spanning trees and shortest-path trees", Algorithmica 14 (1995), Theorem 1 -- every route at
most alpha x the shortest path, weight at most (1 + 2/(alpha - 1)) x the minimum spanning tree
-- asserted against networkx (shortest paths by networkx.single_source_dijkstra_path_length,
the minimum spanning tree by networkx.minimum_spanning_tree) on random and grid graphs."""
import networkx as nx
import numpy as np
import pytest
from hypothesis import given, strategies as st

from fastmst.design import light_shallow_tree
from toolkit_reference import multigraph

RTOL = 1e-12      # the bounds hold for exact sums; float64 sums may round


def _check(tail, head, weight, n, root, alpha, excluded=()):
    usable = np.ones(len(tail), dtype=bool)
    usable[list(excluded)] = False
    t = light_shallow_tree(tail, head, weight, root, alpha=alpha, n_nodes=n,
                           excluded=list(excluded))
    g = multigraph(tail, head, weight, n, usable)
    ref = nx.single_source_dijkstra_path_length(g, root)
    reached = np.zeros(n, dtype=bool)
    reached[list(ref)] = True
    assert t.unreached == n - len(ref)
    for v in range(n):
        if v in ref:
            assert t.shortest[v] == pytest.approx(ref[v], rel=RTOL, abs=1e-12)
        else:
            assert np.isinf(t.shortest[v]) and t.parent[v] == -1
    # a tree on the root's component: one parent link per reached site but the root
    assert len(t) == len(ref) - 1 == len(set(t.position.tolist()))
    assert usable[t.position].all()
    tree = nx.Graph()
    tree.add_nodes_from(ref)
    for v in np.flatnonzero(t.parent >= 0):
        assert reached[v]
    for p in t.position:
        tree.add_edge(int(tail[p]), int(head[p]), weight=float(weight[p]))
    assert nx.is_tree(tree)
    along = nx.single_source_dijkstra_path_length(tree, root)
    for v, dv in along.items():
        assert t.distance[v] == pytest.approx(dv, rel=RTOL, abs=1e-12)
        # bound 1: the route along the tree is within alpha of the shortest path
        assert dv <= alpha * ref[v] * (1 + RTOL) + 1e-12
    # bound 2: the weight is within 1 + 2/(alpha - 1) of the minimum spanning tree
    mst = nx.minimum_spanning_tree(g.subgraph(ref))
    mst_w = sum(d["weight"] for _, _, d in mst.edges(data=True))
    assert t.mst_weight == pytest.approx(mst_w, rel=RTOL, abs=1e-12)
    assert t.weight == pytest.approx(sum(float(weight[p]) for p in t.position), rel=RTOL)
    assert t.weight <= (1 + 2 / (alpha - 1)) * mst_w * (1 + RTOL) + 1e-12
    # reasons: minimum spanning tree links are "tree", the grafted ones "shortcut"
    assert set(t.reason.tolist()) <= {"tree", "shortcut"}
    return t


@given(st.integers(1, 14), st.integers(0, 40), st.integers(0, 2**31),
       st.floats(1.01, 8.0), st.booleans())
def test_random_graphs_meet_both_bounds(n, m, seed, alpha, integer):
    """Random multigraphs (parallel links, self-loops, zero lengths, several components)."""
    rng = np.random.default_rng(seed)
    tail = rng.integers(0, n, m)
    head = rng.integers(0, n, m)
    weight = rng.integers(0, 6, m) if integer else rng.exponential(1.0, m)
    excluded = np.flatnonzero(rng.random(m) < 0.1)
    _check(tail, head, weight, n, int(rng.integers(0, n)), alpha, excluded)


def _grid(k, rng):
    """A k x k grid with jittered lengths (road-like), as edge arrays."""
    idx = np.arange(k * k).reshape(k, k)
    t = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel()])
    h = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel()])
    return t, h, rng.uniform(0.5, 1.5, t.size)


@pytest.mark.parametrize("alpha", [1.1, 1.5, 2.0, 4.0])
def test_grid_graphs_meet_both_bounds(alpha):
    rng = np.random.default_rng(7)
    t, h, w = _grid(20, rng)
    res = _check(t, h, w, 400, 0, alpha)
    assert np.nanmax(res.stretch) <= alpha * (1 + RTOL)
    if alpha <= 2:      # the walk had to graft shortest paths here (the bounds were tested)
        assert (res.reason == "shortcut").any()


def test_alpha_extremes_give_spt_and_mst():
    """alpha close to 1 gives shortest routes; a large alpha keeps the minimum spanning tree
    (on a grid, where the two differ)."""
    rng = np.random.default_rng(3)
    t, h, w = _grid(12, rng)
    near = light_shallow_tree(t, h, w, 0, alpha=1.000001)
    assert np.allclose(near.distance, near.shortest, rtol=1e-5)
    far = light_shallow_tree(t, h, w, 0, alpha=1e9)
    assert (far.reason == "tree").all() and far.weight == pytest.approx(far.mst_weight)


def test_rejects_bad_arguments():
    t, h, w = [0, 1], [1, 2], [1.0, 2.0]
    with pytest.raises(ValueError, match="alpha = 1"):
        light_shallow_tree(t, h, w, 0, alpha=1)
    with pytest.raises(TypeError, match="alpha must be a real number"):
        light_shallow_tree(t, h, w, 0, alpha="2")
    with pytest.raises(ValueError, match="weight -1"):
        light_shallow_tree(t, h, [1.0, -1.0], 0)
    with pytest.raises(ValueError, match="root = 5 is not a node"):
        light_shallow_tree(t, h, w, 5)
    with pytest.raises(TypeError, match="root must be a node id"):
        light_shallow_tree(t, h, w, None)
