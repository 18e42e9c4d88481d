"""link_failures against brute force: every forest link removed in turn, the graph re-solved
with networkx (networkx.minimum_spanning_tree on a MultiGraph, networkx.connected_components),
over hypothesis multigraphs with ties, parallel links, self-loops, several components and
negative weights."""
import networkx as nx
import numpy as np
import pytest
from hypothesis import given, strategies as st

import fastmst
from fastmst.design import link_failures
from toolkit_reference import multigraph


@st.composite
def graphs(draw, max_nodes=9, max_edges=18):
    n = draw(st.integers(1, max_nodes))
    m = draw(st.integers(0, max_edges))
    tail = draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    head = draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    weight = draw(st.lists(st.integers(-3, 3), min_size=m, max_size=m))
    excluded = draw(st.lists(st.integers(0, max(m - 1, 0)), max_size=m // 3, unique=True)) \
        if m else []
    root = draw(st.one_of(st.none(), st.integers(0, n - 1)))
    return (np.array(tail, dtype=np.int64), np.array(head, dtype=np.int64),
            np.array(weight, dtype=np.int64), n, excluded, root)


def _nx_weight(tail, head, weight, n, keep):
    """Total weight and component count of a networkx minimum spanning forest."""
    g = multigraph(tail, head, weight, n, keep)
    t = nx.minimum_spanning_tree(g)
    return sum(d["weight"] for _, _, d in t.edges(data=True)), nx.number_connected_components(g)


def _check_against_brute_force(tail, head, weight, n, excluded, root, fpos, optimal):
    usable = np.ones(len(tail), dtype=bool)
    usable[list(excluded)] = False
    r = link_failures(tail, head, weight, fpos, n_nodes=n, root=root, excluded=excluded)
    assert r.position.tolist() == list(fpos)
    base, base_comp = _nx_weight(tail, head, weight, n, usable)
    in_forest = np.zeros(len(tail), dtype=bool)
    in_forest[list(fpos)] = True
    for i, p in enumerate(fpos):
        # the two sides of the forest without p (networkx components of the forest minus p)
        rest = multigraph(tail, head, weight, n, in_forest & (np.arange(len(tail)) != p))
        side = {}
        for k, comp in enumerate(nx.connected_components(rest)):
            for v in comp:
                side[v] = k
        crossing = [q for q in range(len(tail)) if usable[q] and not in_forest[q]
                    and side[int(tail[q])] != side[int(head[q])]]
        # brute-force tie rule: the lightest crossing link, the earliest among equal weights
        best = min(crossing, key=lambda q: (weight[q], q)) if crossing else -1
        assert r.replacement[i] == best
        assert r.bridge[i] == (best == -1)
        a, b = int(tail[p]), int(head[p])
        ref = root if root is not None and side.get(root) in (side[a], side[b]) else None
        if ref is None:     # no root in this tree: seen from the tree's smallest node
            ref = min(v for v in range(n) if side[v] in (side[a], side[b]))
        far = side[b] if side[ref] == side[a] else side[a]
        beyond = sum(1 for v in range(n) if side[v] == far)
        assert r.sites_beyond[i] == beyond
        assert r.sites_cut_off[i] == (beyond if best == -1 else 0)
        if optimal:
            # re-solve without p (networkx): the optimum rises by cost_increase, or the
            # component count rises for a bridge
            keep = usable & (np.arange(len(tail)) != p)
            w2, c2 = _nx_weight(tail, head, weight, n, keep)
            if best == -1:
                assert c2 == base_comp + 1 and np.isinf(r.cost_increase[i])
            else:
                assert c2 == base_comp
                assert r.cost_increase[i] == w2 - base
                assert r.cost_increase[i] >= 0
                # and fastmst's own re-solve under the tie rule swaps p for the replacement
                f2 = fastmst.minimum_spanning_forest(tail, head, weight, n,
                                                     excluded=list(excluded) + [int(p)])
                assert set(f2.edges.tolist()) == (set(fpos) - {p}) | {best}
        elif best != -1:
            assert r.cost_increase[i] == weight[best] - weight[p]


@given(graphs())
def test_optimal_forest_matches_brute_force(case):
    """Minimum spanning forest: replacement (tie rule), cost increase (= rise of the networkx
    optimum without the link), bridges (= networkx component count rises), sites cut off."""
    tail, head, weight, n, excluded, root = case
    fpos = fastmst.minimum_spanning_forest(tail, head, weight, n, excluded=excluded).edges
    _check_against_brute_force(tail, head, weight, n, excluded, root, fpos.tolist(), True)


@given(graphs(), st.randoms(use_true_random=False))
def test_any_spanning_forest_matches_brute_force(case, rnd):
    """Any spanning forest (random link order through networkx's Kruskal on shuffled weights):
    the cheapest repair is the lightest crossing usable link (brute force)."""
    tail, head, weight, n, excluded, root = case
    usable = np.ones(len(tail), dtype=bool)
    usable[list(excluded)] = False
    shuffled = np.array([rnd.random() for _ in range(len(tail))])
    g = multigraph(tail, head, shuffled, n, usable)
    fpos = sorted(k for _, _, k in nx.minimum_spanning_edges(g, keys=True, data=False))
    _check_against_brute_force(tail, head, weight, n, excluded, root, fpos, False)


@given(st.integers(2, 40), st.integers(0, 2**31), st.sampled_from(
    [np.float32, np.float64, np.int32, np.uint64]))
def test_dtypes_and_scales(n, seed, dtype):
    """Every weight dtype and scale: the increase is the exact difference rounded once (uint64
    weights near 2**64 included)."""
    rng = np.random.default_rng(seed)
    m = 3 * n
    tail = rng.integers(0, n, m)
    head = rng.integers(0, n, m)
    if dtype == np.uint64:
        weight = (np.uint64(2**64 - 2**20) + rng.integers(0, 2**19, m).astype(np.uint64))
    else:
        weight = (rng.integers(0, 1000, m) * (1e6 if dtype == np.float64 else 1)).astype(dtype)
    r = link_failures(tail, head, weight)
    f = fastmst.minimum_spanning_forest(tail, head, weight)
    ok = ~r.bridge
    exact = [int(weight[a]) - int(weight[b]) if dtype in (np.int32, np.uint64)
             else float(weight[a]) - float(weight[b])
             for a, b in zip(r.replacement[ok], r.position[ok])]
    assert r.cost_increase[ok].tolist() == [float(x) for x in exact]
    assert (r.cost_increase[ok] >= 0).all()
    assert r.position.tolist() == f.edges.tolist()


def test_path_graph_every_link_is_a_bridge():
    """A path 0-1-...-9 rooted at 0: link k cuts off the 9-k sites beyond it (hand count)."""
    n = 10
    r = link_failures(np.arange(n - 1), np.arange(1, n), np.ones(n - 1), root=0)
    assert r.bridge.all() and r.n_bridges == n - 1
    assert sorted(r.sites_cut_off.tolist()) == list(range(1, n))


def test_rejects_bad_designs():
    t, h, w = [0, 1, 2, 0], [1, 2, 0, 3], [1.0, 1.0, 1.0, 5.0]
    with pytest.raises(ValueError, match="closes a cycle"):
        link_failures(t, h, w, [0, 1, 2, 3])
    with pytest.raises(ValueError, match="does not span"):
        link_failures(t, h, w, [0, 1])
    with pytest.raises(ValueError, match="excluded link at position 3"):
        link_failures(t, h, w, [0, 1, 3], excluded=[3])
    with pytest.raises(ValueError, match="maximum spanning forest"):
        link_failures(t, h, w, fastmst.minimum_spanning_forest(t, h, w, maximize=True))
    with pytest.raises(TypeError, match="root must be a node id"):
        link_failures(t, h, w, root="a")
    with pytest.raises(ValueError, match="root = 9 is not a node"):
        link_failures(t, h, w, root=9)


@given(st.lists(st.tuples(st.sampled_from([0.0, -0.0, 1.5, -2.0, float("inf"), float("-inf"),
                                            1e308, -1e308, 5e-324]),
                          st.sampled_from([0.0, -0.0, 1.5, -2.0, float("inf"), float("-inf"),
                                           1e308, 5e-324])), max_size=20))
def test_difference_of_special_values(pairs):
    """The cost increase of equal weights is +0.0 (infinities and zeros of either sign
    included); otherwise the float64 difference of Python floats (IEEE 754)."""
    import math
    from fastmst.design.failures import difference
    high = np.array([p[0] for p in pairs], dtype=np.float64)
    low = np.array([p[1] for p in pairs], dtype=np.float64)
    got = difference(high, low)
    for (x, y), d in zip(pairs, got.tolist()):
        if x == y:
            assert d == 0.0 and math.copysign(1.0, d) == 1.0
        else:
            assert d == x - y
