"""check_forest and sensitivity against brute force with networkx."""
import math

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

import fastmst
from toolkit_reference import (multigraph, nx_components, nx_forest, small_graphs,
                               tree_path_positions)

PROFILE = dict(deadline=None, derandomize=True, max_examples=120)


def _random_spanning_forest(tail, head, n, seed):
    """A random spanning forest: networkx's minimum spanning forest under random weights."""
    rng = np.random.default_rng(seed)
    _, pos = nx_forest(tail, head, rng.random(len(tail)), n)
    return sorted(pos)


def _reference_check(tail, head, weight, n, edges, maximize=False):
    """check_forest recomputed from networkx: is_forest / components / MST weight / tree paths."""
    sub = nx.MultiGraph()
    sub.add_nodes_from(range(n))
    for p in edges:
        sub.add_edge(int(tail[p]), int(head[p]), key=p)
    is_forest = nx.is_forest(sub) if n else True
    if not is_forest:
        return dict(is_forest=False, is_spanning=False, is_minimum=False, violations=[])
    is_spanning = nx.number_connected_components(sub) == nx_components(tail, head, n)
    best, _ = nx_forest(tail, head, weight, n, maximize)
    given_w = sum(weight[p] for p in edges)
    violations = []
    for p in range(len(tail)):
        if p in set(edges):
            continue
        path = tree_path_positions(tail, head, edges, n, int(tail[p]), int(head[p]))
        if not path:
            continue
        worst = (min if maximize else max)(weight[q] for q in path)
        if (weight[p] > worst) if maximize else (weight[p] < worst):
            violations.append(p)
    excess = (best - given_w if maximize else given_w - best) if is_spanning else math.nan
    return dict(is_forest=True, is_spanning=is_spanning, violations=violations, excess=excess,
                is_minimum=is_spanning and not violations, path_of=None)


@settings(**PROFILE)
@given(small_graphs(), st.integers(0, 3), st.booleans())
def test_check_forest_matches_networkx(graph, kind, maximize):
    """check_forest agrees with a networkx re-derivation (networkx is_forest, connected
    components, minimum_spanning_edges, shortest_path on the tree) on random small multigraphs
    with ties, self-loops and parallel edges; the cycle condition is Komlós (1985) / King
    (1997)."""
    tail, head, weight, n = graph
    m = len(tail)
    rng = np.random.default_rng(m * 31 + n + kind)
    if kind == 0:
        edges = fastmst.minimum_spanning_forest(tail, head, weight, n, maximize=maximize).edges
    elif kind == 1:
        edges = _random_spanning_forest(tail, head, n, m + n)
    elif kind == 2:
        edges = sorted(rng.choice(m, size=rng.integers(0, m + 1), replace=False)) if m else []
    else:
        edges = _random_spanning_forest(tail, head, n, m)[:-1] if m else []
    edges = [int(p) for p in edges]
    got = fastmst.check_forest(tail, head, weight, edges, n, maximize=maximize)
    ref = _reference_check(tail, head, weight, n, edges, maximize)
    assert got.is_forest == ref["is_forest"]
    assert got.is_spanning == ref["is_spanning"]
    assert got.is_minimum == ref["is_minimum"]
    if not ref["is_forest"]:
        assert got.cycle in edges
        return
    assert got.violations.tolist() == ref["violations"]
    if ref["is_spanning"]:
        assert got.excess == pytest.approx(ref["excess"])
    else:
        assert math.isnan(got.excess)
    given_w = sum(weight[p] for p in edges)
    for v, r in zip(got.violations.tolist(), got.replaces.tolist()):
        # The reported pair is a profitable swap (networkx is_forest on the swapped set), and r
        # is the heaviest edge on v's tree path, latest position among equal weights.
        path = tree_path_positions(tail, head, edges, n, int(tail[v]), int(head[v]))
        if maximize:
            assert r == max(path, key=lambda q: (-weight[q], q))
        else:
            assert r == max(path, key=lambda q: (weight[q], q))
        swapped = [p for p in edges if p != r] + [v]
        assert nx.is_forest(multigraph(tail[swapped], head[swapped], weight[swapped], n))
        new_w = given_w - weight[r] + weight[v]
        assert (new_w > given_w) if maximize else (new_w < given_w)


def _nx_has(tail, head, weight, n, p, maximize=False):
    return p in nx_forest(tail, head, weight, n, maximize)[1]


@settings(**PROFILE)
@given(small_graphs(), st.booleans())
def test_sensitivity_matches_networkx_resolve(graph, maximize):
    """For every edge, move its weight just short of and just past the margin, re-solve with
    networkx and see whether the edge's membership (and the optimum weight) changes as the margin
    says (Tarjan, "Sensitivity analysis of minimum spanning trees and shortest path trees",
    1982).  Integer weights with many ties, so moves of 0.5 are unambiguous."""
    tail, head, weight, n = graph
    f = fastmst.minimum_spanning_forest(tail, head, weight, n, maximize=maximize)
    s = fastmst.sensitivity(tail, head, weight, f)
    assert s.dtype == np.float64 and s.shape == (len(tail),)
    assert (s >= 0).all()
    sign = -1.0 if maximize else 1.0          # the direction that makes an edge worse
    base, _ = nx_forest(tail, head, weight, n, maximize)
    in_forest = set(f.edges.tolist())
    for p in range(len(tail)):
        if tail[p] == head[p]:
            assert s[p] == np.inf
            continue
        w = weight.copy()
        if p in in_forest:
            if np.isinf(s[p]):
                w[p] = weight[p] + sign * 1000.0
                assert _nx_has(tail, head, w, n, p, maximize)       # a bridge never leaves
                continue
            w[p] = weight[p] + sign * (s[p] - 0.5)
            if s[p] >= 0.5:
                assert _nx_has(tail, head, w, n, p, maximize)
                assert nx_forest(tail, head, w, n, maximize)[0] == pytest.approx(
                    base + sign * (s[p] - 0.5))
            w[p] = weight[p] + sign * (s[p] + 0.5)
            assert not _nx_has(tail, head, w, n, p, maximize)
            assert nx_forest(tail, head, w, n, maximize)[0] == pytest.approx(base + sign * s[p])
        else:
            w[p] = weight[p] - sign * (s[p] - 0.5)
            if s[p] >= 0.5:
                assert not _nx_has(tail, head, w, n, p, maximize)
                assert nx_forest(tail, head, w, n, maximize)[0] == pytest.approx(base)
            w[p] = weight[p] - sign * (s[p] + 0.5)
            assert nx_forest(tail, head, w, n, maximize)[0] == pytest.approx(base - sign * 0.5)


def test_sensitivity_tie_rule_boundary():
    """Hand-solved triangle (worked by hand for this test): at exactly the margin the tie rule of
    minimum_spanning_forest (earlier position wins) decides, as the sensitivity docstring says."""
    tail, head = np.array([0, 0, 1]), np.array([2, 1, 2])
    weight = np.array([3.0, 1.0, 2.0])        # tree {1, 2}; edge 0 closes the cycle
    f = fastmst.minimum_spanning_forest(tail, head, weight)
    assert sorted(f.edges.tolist()) == [1, 2]
    s = fastmst.sensitivity(tail, head, weight, f)
    assert s.tolist() == [1.0, 2.0, 1.0]
    # Edge 2 raised by exactly 1 ties with edge 0, which is earlier: edge 0 replaces it.
    w = weight.copy(); w[2] += s[2]
    assert sorted(fastmst.minimum_spanning_forest(tail, head, w).edges.tolist()) == [0, 1]
    # Edge 1 raised by exactly 2 ties with edge 0, which is earlier: edge 0 replaces it.
    w = weight.copy(); w[1] += s[1]
    assert sorted(fastmst.minimum_spanning_forest(tail, head, w).edges.tolist()) == [0, 2]
    # Edge 0 lowered by exactly 1 ties with edge 2 (the heaviest on its path); 0 is earlier: enters.
    w = weight.copy(); w[0] -= s[0]
    assert sorted(fastmst.minimum_spanning_forest(tail, head, w).edges.tolist()) == [0, 1]
    # Same graph with edge 0 moved last: now the forest edges are earlier and stay at the margin.
    t2, h2, w2 = tail[[1, 2, 0]], head[[1, 2, 0]], weight[[1, 2, 0]]
    s2 = fastmst.sensitivity(t2, h2, w2, fastmst.minimum_spanning_forest(t2, h2, w2))
    w = w2.copy(); w[1] += s2[1]
    assert sorted(fastmst.minimum_spanning_forest(t2, h2, w).edges.tolist()) == [0, 1]


def test_sensitivity_medium_graph_against_networkx():
    """A 200-node random graph with tied weights: every margin checked by networkx re-solve
    (minimum_spanning_edges) just past it, on a sample of 40 edges."""
    rng = np.random.default_rng(7)
    n, m = 200, 700
    tail, head = rng.integers(0, n, m), rng.integers(0, n, m)
    weight = rng.integers(0, 20, m).astype(np.float64)
    f = fastmst.minimum_spanning_forest(tail, head, weight, n)
    s = fastmst.sensitivity(tail, head, weight, f)
    base, _ = nx_forest(tail, head, weight, n)
    in_forest = set(f.edges.tolist())
    for p in rng.choice(m, 40, replace=False).tolist():
        if tail[p] == head[p] or np.isinf(s[p]):
            continue
        w = weight.copy()
        if p in in_forest:
            w[p] += s[p] + 0.5
            assert nx_forest(tail, head, w, n)[0] == pytest.approx(base + s[p])
        else:
            w[p] -= s[p] + 0.5
            assert nx_forest(tail, head, w, n)[0] == pytest.approx(base - 0.5)


def test_check_forest_worked_example_and_types():
    """Hand-solved triangle (worked by hand): forest {0, 1} misses the cheaper edge 2; the
    result works for int32 ids, float32 and uint32 weights, read-only inputs, and inputs are not
    mutated."""
    tail = np.array([0, 1, 0], dtype=np.int32)
    head = np.array([1, 2, 2], dtype=np.int32)
    for wdtype in (np.float32, np.uint32, np.int64):
        weight = np.array([1, 4, 2], dtype=wdtype)
        for a in (tail, head, weight):
            a.setflags(write=False)
        c = fastmst.check_forest(tail, head, weight, [0, 1])
        assert (c.is_forest, c.is_spanning, c.is_minimum) == (True, True, False)
        assert c.violations.tolist() == [2] and c.replaces.tolist() == [1]
        assert c.excess == 2.0 and not c
        ok = fastmst.check_forest(tail, head, weight, np.array([True, False, True]))
        assert ok.is_minimum and ok.excess == 0.0 and ok
        assert weight.tolist() == [1, 4, 2]


def test_check_forest_reports_cycles_and_missing_edges():
    """A cycle and a non-spanning set are reported, not raised (hand-solved)."""
    tail, head, weight = [0, 1, 2, 2], [1, 2, 0, 3], [1.0, 1.0, 1.0, 5.0]
    c = fastmst.check_forest(tail, head, weight, [0, 1, 2])
    assert not c.is_forest and not c.is_minimum and c.cycle == 2 and math.isnan(c.excess)
    c = fastmst.check_forest(tail, head, weight, [0, 1])
    assert c.is_forest and not c.is_spanning and c.crossing.tolist() == [3]
    c = fastmst.check_forest([0], [0], [1.0], [0])          # a self-loop is a cycle
    assert not c.is_forest
    c = fastmst.check_forest([], [], [], [], n_nodes=3)
    assert c.is_minimum and c.excess == 0.0


def test_check_forest_and_sensitivity_bad_input():
    """Positions out of range, repeated positions, cycles, non-spanning and non-optimal forests
    each give a clear error."""
    tail, head, weight = [0, 1, 2], [1, 2, 0], [1.0, 2.0, 3.0]
    with pytest.raises(ValueError, match=r"edges\[0\] = 5 is not an edge position"):
        fastmst.check_forest(tail, head, weight, [5])
    with pytest.raises(ValueError, match=r"edges\[1\] = 0 repeats edges\[0\]"):
        fastmst.check_forest(tail, head, weight, [0, 0])
    with pytest.raises(TypeError, match="integer edge positions"):
        fastmst.check_forest(tail, head, weight, [0.5])
    with pytest.raises(ValueError, match="closes a cycle"):
        fastmst.sensitivity(tail, head, weight, [0, 1, 2])
    with pytest.raises(ValueError, match="does not span the graph"):
        fastmst.sensitivity(tail, head, weight, [0])
    with pytest.raises(ValueError, match="is not minimum.*position 0"):
        fastmst.sensitivity(tail, head, weight, [1, 2])
    f = fastmst.minimum_spanning_forest(tail, head, weight)
    with pytest.raises(ValueError, match="graph of 3 edges, received 2"):
        fastmst.sensitivity(tail[:2], head[:2], weight[:2], f)
    with pytest.raises(ValueError, match="contradicts the forest"):
        fastmst.sensitivity(tail, head, weight, f, maximize=True)


@settings(deadline=None, derandomize=True, max_examples=80)
@given(small_graphs(), st.lists(st.integers(-3, 20), max_size=10),
       st.sampled_from(["check", "sens", "bottleneck", "clusters"]), st.integers(-2, 12))
def test_wild_input_never_crashes(graph, edges, which, k):
    """Arbitrary edge sets, node pairs and cluster counts give a result or a TypeError /
    ValueError, never a crash or another exception (common practice, no source)."""
    tail, head, weight, n = graph
    try:
        if which == "check":
            c = fastmst.check_forest(tail, head, weight, edges, n)
            assert c.is_minimum <= c.is_spanning <= c.is_forest
        elif which == "sens":
            s = fastmst.sensitivity(tail, head, weight, edges)
            assert (s >= 0).all()
        elif which == "bottleneck":
            f = fastmst.minimum_spanning_forest(tail, head, weight, n)
            f.bottleneck(edges, edges[::-1])
        else:
            f = fastmst.minimum_spanning_forest(tail, head, weight, n)
            assert f.clusters(k=k).max() == k - 1
    except (TypeError, ValueError) as exc:
        assert str(exc)


def test_infinite_weights():
    """Hand-solved triangle with -inf/inf weights (worked by hand): margins between equal
    infinities are 0, not NaN; the bottleneck of an inf-weight path is inf with a real position
    (unlike pairs in different components, which get position -1)."""
    tail, head = [0, 1, 0], [1, 2, 2]
    weight = [-np.inf, np.inf, np.inf]
    f = fastmst.minimum_spanning_forest(tail, head, weight)
    assert sorted(f.edges.tolist()) == [0, 1]
    assert fastmst.sensitivity(tail, head, weight, f).tolist() == [np.inf, 0.0, 0.0]
    c = fastmst.check_forest(tail, head, weight, f)
    assert c.is_minimum and c.excess == 0.0
    w, p = f.bottleneck([0], [2])
    assert w.tolist() == [np.inf] and p.tolist() == [1]


@settings(**PROFILE)
@given(small_graphs(), st.booleans())
def test_sensitivity_partner_is_the_swap(graph, maximize):
    """The partner of each edge is the swap that the tie rule makes just past the margin:
    moving the edge's weight by margin + 0.5 and re-solving with minimum_spanning_forest gives
    the old forest with exactly that pair exchanged; the forest and margins are confirmed by
    networkx (minimum_spanning_edges) in test_sensitivity_matches_networkx_resolve."""
    tail, head, weight, n = graph
    f = fastmst.minimum_spanning_forest(tail, head, weight, n, maximize=maximize)
    s, partner = fastmst.sensitivity(tail, head, weight, f, return_partner=True)
    assert np.array_equal(s, fastmst.sensitivity(tail, head, weight, f))
    sign = -1.0 if maximize else 1.0
    old = set(f.edges.tolist())
    for p in range(len(tail)):
        if np.isinf(s[p]):
            assert partner[p] == -1
            continue
        q = int(partner[p])
        w = weight.copy()
        w[p] += (sign if p in old else -sign) * (s[p] + 0.5)
        new = set(fastmst.minimum_spanning_forest(tail, head, w, n, maximize=maximize)
                  .edges.tolist())
        assert new == old ^ {p, q}
