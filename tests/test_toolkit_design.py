"""required/excluded edges against networkx on the contracted graph; add_edges against a full
re-solve."""
import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

import fastmst
from toolkit_reference import nx_components, nx_forest, small_graphs

PROFILE = dict(deadline=None, derandomize=True, max_examples=120)


def _contracted_reference(tail, head, weight, n, req, exc, maximize):
    """Weight of the optimum containing ``req`` and avoiding ``exc``: the required edges' weight
    plus a networkx spanning forest of the graph with the required edges contracted
    (networkx.utils.UnionFind) and the excluded ones removed.  None when req has a cycle."""
    uf = nx.utils.UnionFind(range(n))
    for p in req:
        if uf[int(tail[p])] == uf[int(head[p])]:
            return None
        uf.union(int(tail[p]), int(head[p]))
    keep = np.ones(len(tail), dtype=bool)
    keep[list(exc)] = False
    keep[list(req)] = False
    ct = np.array([uf[int(u)] for u in tail], dtype=np.int64)
    ch = np.array([uf[int(v)] for v in head], dtype=np.int64)
    rest, _ = nx_forest(ct, ch, weight, n, maximize, keep)
    return rest + sum(weight[p] for p in req)


@settings(**PROFILE)
@given(small_graphs(), st.integers(0, 2**16), st.booleans())
def test_required_excluded_match_networkx(graph, seed, maximize):
    """The constrained forest weighs what networkx finds on the contracted graph, contains every
    required edge, avoids every excluded one, spans the components of the graph without the
    excluded edges, and reports required_excess against the networkx optimum of that graph."""
    tail, head, weight, n = graph
    m = len(tail)
    rng = np.random.default_rng(seed)
    perm = rng.permutation(m)
    nreq, nexc = (int(rng.integers(0, m + 1)) // 3, int(rng.integers(0, m + 1)) // 3) if m else (0, 0)
    req, exc = sorted(perm[:nreq].tolist()), sorted(perm[nreq:nreq + nexc].tolist())
    ref = _contracted_reference(tail, head, weight, n, req, exc, maximize)
    if ref is None:
        with pytest.raises(ValueError, match="(form a cycle|is a self-loop)"):
            fastmst.minimum_spanning_forest(tail, head, weight, n, required=req, excluded=exc,
                                            maximize=maximize)
        return
    f = fastmst.minimum_spanning_forest(tail, head, weight, n, required=req, excluded=exc,
                                        maximize=maximize)
    got = set(f.edges.tolist())
    assert set(req) <= got and not (set(exc) & got)
    assert f.weight == pytest.approx(ref)
    allowed = np.ones(m, dtype=bool)
    allowed[exc] = False
    assert f.n_components == nx_components(tail, head, n, allowed) == n - len(f)
    free, _ = nx_forest(tail, head, weight, n, maximize, allowed)
    assert f.required_excess == pytest.approx((free - ref) if maximize else (ref - free))
    assert f.required_excess >= -1e-9
    assert f.n_edges == m
    # The result is a forest of the original graph in tie-rule order.
    key = (-weight[f.edges], f.edges) if maximize else (weight[f.edges], f.edges)
    assert np.array_equal(np.lexsort(key[::-1]), np.arange(len(f)))
    assert np.array_equal(f.tail, tail[f.edges]) and np.array_equal(f.weights, weight[f.edges])


def test_required_excluded_worked_example():
    """Hand-solved square 0-1-2-3-0 with a diagonal: requiring the heavy diagonal costs its
    weight minus the edge it displaces; excluding a cheap edge forces the next one."""
    tail, head = [0, 1, 2, 3, 0], [1, 2, 3, 0, 2]
    weight = [1.0, 1.0, 1.0, 2.0, 10.0]
    free = fastmst.minimum_spanning_forest(tail, head, weight)
    assert sorted(free.edges.tolist()) == [0, 1, 2] and free.required_excess == 0.0
    f = fastmst.minimum_spanning_forest(tail, head, weight, required=[4])
    assert sorted(f.edges.tolist()) == [0, 2, 4] and f.required_excess == 9.0
    f = fastmst.minimum_spanning_forest(tail, head, weight, excluded=[1])
    assert sorted(f.edges.tolist()) == [0, 2, 3] and f.weight == 4.0
    mask = np.array([False, True, False, False, False])
    f = fastmst.minimum_spanning_forest(tail, head, weight, excluded=mask, method="boruvka")
    assert sorted(f.edges.tolist()) == [0, 2, 3]
    f = fastmst.minimum_spanning_forest(tail, head, weight, excluded=[0, 1, 2, 3, 4])
    assert len(f) == 0 and f.n_components == 4


def test_required_excluded_bad_input():
    """A cycle among required edges names its edges; overlaps, out-of-range positions and
    self-loops are clear errors."""
    tail, head, weight = [0, 1, 2, 2, 3], [1, 2, 0, 3, 3], [1.0, 1.0, 1.0, 1.0, 1.0]
    with pytest.raises(ValueError, match=r"required edges at positions \[0, 1, 2\] form a cycle"):
        fastmst.minimum_spanning_forest(tail, head, weight, required=[3, 0, 1, 2])
    with pytest.raises(ValueError, match=r"position 4 is a self-loop"):
        fastmst.minimum_spanning_forest(tail, head, weight, required=[4])
    with pytest.raises(ValueError, match=r"positions \[1\] are both required and excluded"):
        fastmst.minimum_spanning_forest(tail, head, weight, required=[1], excluded=[1, 2])
    with pytest.raises(ValueError, match=r"required\[0\] = 7 is not an edge position"):
        fastmst.minimum_spanning_forest(tail, head, weight, required=[7])
    with pytest.raises(ValueError, match=r"excluded\[0\] = -1 is not an edge position"):
        fastmst.minimum_spanning_forest(tail, head, weight, excluded=[-1])
    with pytest.raises(ValueError, match="unknown method"):
        fastmst.minimum_spanning_forest(tail, head, weight, required=[0], method="x")


@settings(**PROFILE)
@given(small_graphs(), small_graphs(max_nodes=10, max_edges=6), st.booleans())
def test_add_edges_equals_full_resolve(old, new, maximize):
    """add_edges gives exactly the forest (positions, order, labels) of a full re-solve of the
    combined graph with minimum_spanning_forest, whose weight networkx confirms."""
    t1, h1, w1, n1 = old
    t2, h2, w2, n2 = new
    f = fastmst.minimum_spanning_forest(t1, h1, w1, n1, maximize=maximize)
    g = f.add_edges(t2, h2, w2, n_nodes=n2)
    t, h, w = np.concatenate([t1, t2]), np.concatenate([h1, h2]), np.concatenate([w1, w2])
    n = max(n1, n2)
    full = fastmst.minimum_spanning_forest(t, h, w, n, maximize=maximize)
    assert g.edges.tolist() == full.edges.tolist()
    assert g.labels.tolist() == full.labels.tolist()
    assert (g.n_nodes, g.n_edges, g.n_components) == (full.n_nodes, len(t), full.n_components)
    assert np.array_equal(g.tail, full.tail) and np.array_equal(g.weights, full.weights)
    assert g.weight == pytest.approx(nx_forest(t, h, w, n, maximize)[0])


def test_add_edges_keeps_required_and_chains():
    """A constrained forest keeps its required edges through add_edges, and required_excess is
    recomputed against the free optimum of the grown graph (full re-solve as reference)."""
    rng = np.random.default_rng(11)
    tail, head = rng.integers(0, 30, 120), rng.integers(0, 30, 120)
    weight = rng.integers(1, 9, 120).astype(np.float64)
    base = fastmst.minimum_spanning_forest(tail, head, weight, 30)
    nontree = np.setdiff1d(np.flatnonzero(tail != head), base.edges)[:3]
    f = fastmst.minimum_spanning_forest(tail, head, weight, 30, required=nontree,
                                        excluded=[int(base.edges[0])])
    t2, h2 = rng.integers(0, 35, 20), rng.integers(0, 35, 20)
    w2 = rng.integers(0, 5, 20).astype(np.float64)
    g = f.add_edges(t2, h2, w2, n_nodes=35).add_edges([0], [34], [0.0])
    t, h = np.concatenate([tail, t2, [0]]), np.concatenate([head, h2, [34]])
    w = np.concatenate([weight, w2, [0.0]])
    full = fastmst.minimum_spanning_forest(t, h, w, 35, required=nontree,
                                           excluded=[int(base.edges[0])])
    assert g.edges.tolist() == full.edges.tolist()
    assert g.required_excess == pytest.approx(full.required_excess)
    assert g.n_edges == 141


def test_add_edges_bad_input():
    """New edges are validated like any edge list; inputs are not mutated."""
    f = fastmst.minimum_spanning_forest([0, 1], [1, 2], [1.0, 2.0])
    with pytest.raises(ValueError, match="one length"):
        f.add_edges([0, 1], [2], [1.0])
    with pytest.raises(ValueError, match=r"weight\[0\] is NaN"):
        f.add_edges([0], [2], [np.nan])
    with pytest.raises(ValueError, match=r"tail\[0\] = -3 is negative"):
        f.add_edges([-3], [2], [1.0])
    # Mixed id dtypes (uint64 forest, int8 new ids) still combine into integer ids.
    u = fastmst.minimum_spanning_forest(np.array([0, 1], np.uint64), np.array([1, 2], np.uint64),
                                        [1.0, 2.0])
    assert u.add_edges(np.array([0], np.int8), [2], [0.5]).edges.tolist() == [2, 0]
    t = np.array([0, 2]); t.setflags(write=False)
    g = f.add_edges(t, [2, 3], [0.5, 0.5])
    assert g.edges.tolist() == [2, 3, 0] and t.tolist() == [0, 2]
    assert f.edges.tolist() == [0, 1]


def test_toolkit_input_contract_and_threads():
    """Every toolkit function accepts int32/uint32 ids, float32/int64/uint64 weights, read-only
    and non-contiguous arrays without mutating them, and gives the same answers when called
    from four threads at once (the kernels release the GIL).  Reference: the float64/int64
    answers of the same call."""
    from concurrent.futures import ThreadPoolExecutor
    rng = np.random.default_rng(5)
    n, m = 60, 400
    tail0, head0 = rng.integers(0, n, 2 * m), rng.integers(0, n, 2 * m)
    weight0 = rng.integers(0, 30, 2 * m)
    t, h, w = tail0[::2], head0[::2], weight0[::2].astype(np.float64)
    f = fastmst.minimum_spanning_forest(t, h, w, n)
    ref_s = fastmst.sensitivity(t, h, w, f)
    ref_c = fastmst.check_forest(t, h, w, f.edges)
    ref_b = f.bottleneck(np.arange(n), np.arange(n)[::-1])
    for idt, wdt in ((np.int32, np.float32), (np.uint32, np.int64), (np.int64, np.uint64)):
        tt, hh = tail0.astype(idt)[::2], head0.astype(idt)[::2]
        ww = weight0.astype(wdt)[::2]
        for a in (tt, hh, ww):
            a.setflags(write=False)
        before = [a.copy() for a in (tt, hh, ww)]
        g = fastmst.minimum_spanning_forest(tt, hh, ww, n)
        assert g.edges.tolist() == f.edges.tolist()
        assert np.array_equal(fastmst.sensitivity(tt, hh, ww, g), ref_s)
        assert fastmst.check_forest(tt, hh, ww, g.edges).is_minimum == ref_c.is_minimum
        assert all(np.array_equal(x, y) for x, y in zip(g.bottleneck(np.arange(n),
                                                                     np.arange(n)[::-1]), ref_b))
        assert all(np.array_equal(a, b) for a, b in zip((tt, hh, ww), before))
    # Thread counts inside one call (OpenMP prange over the pairs) give the same answer.
    for th in (1, 2, 3):
        assert np.array_equal(fastmst.sensitivity(t, h, w, f, threads=th), ref_s)
        big_a, big_b = rng.integers(0, n, 200_000), rng.integers(0, n, 200_000)
        assert all(np.array_equal(x, y) for x, y in zip(f.bottleneck(big_a, big_b, threads=th),
                                                         f.bottleneck(big_a, big_b, threads=1)))
    with ThreadPoolExecutor(4) as ex:
        outs = list(ex.map(lambda _: fastmst.sensitivity(t, h, w, f), range(8)))
    assert all(np.array_equal(o, ref_s) for o in outs)


@pytest.mark.parametrize("maximize", [False, True])
@pytest.mark.parametrize("new_dtype", [np.float64, np.int64, np.float32])
def test_add_edges_ties_between_old_and_new_edges(maximize, new_dtype):
    """New edges whose weights tie with old forest edges lose the tie (their positions are
    later): add_edges equals the full re-solve of the concatenated graph, whose own tie rule is
    checked against networkx's total (reference: networkx.minimum/maximum_spanning_edges)."""
    rng = np.random.default_rng(99)
    n, m, k = 300, 1500, 400
    t, h = rng.integers(0, n, m), rng.integers(0, n, m)
    w = rng.integers(-3, 4, m).astype(np.float64)
    w[::7] = -0.0
    t2, h2 = rng.integers(0, n, k), rng.integers(0, n, k)
    w2 = rng.integers(-3, 4, k).astype(new_dtype)
    f = fastmst.minimum_spanning_forest(t, h, w, n, maximize=maximize)
    g = f.add_edges(t2, h2, w2)
    full = fastmst.minimum_spanning_forest(np.concatenate([t, t2]), np.concatenate([h, h2]),
                                           np.concatenate([w, w2.astype(np.float64)]), n,
                                           maximize=maximize)
    np.testing.assert_array_equal(g.edges, full.edges)
    np.testing.assert_array_equal(g.labels, full.labels)
    assert g.n_edges == m + k and g.weight == full.weight
    mg = nx.MultiGraph()
    mg.add_nodes_from(range(n))
    mg.add_weighted_edges_from(zip(np.concatenate([t, t2]).tolist(),
                                   np.concatenate([h, h2]).tolist(),
                                   np.concatenate([w, w2.astype(np.float64)]).tolist()))
    span = nx.maximum_spanning_edges if maximize else nx.minimum_spanning_edges
    assert g.weight == sum(d["weight"] for *_, d in span(mg, data=True))


def test_forest_fields_are_declared_and_provenance_says_who_made_it():
    """SpanningForest declares every field (no __dict__: nothing can be attached from outside),
    documents each public one, keeps `method` for the algorithm and records the producing call
    in `provenance`; a pickled forest comes back equal without its cache."""
    import pickle
    f = fastmst.minimum_spanning_forest([0, 1, 2, 0], [1, 2, 3, 3], [1.0, 4.0, 2.0, 3.0])
    assert not hasattr(f, "__dict__")
    with pytest.raises(AttributeError):
        f.extra = 1
    doc = fastmst.SpanningForest.__doc__
    for name in fastmst.SpanningForest.__slots__:
        if not name.startswith("_"):
            assert f"    {name} :" in doc or f", {name} :" in doc or f"    {name}, " in doc, name
    assert f.method == "kruskal"                  # a small graph: the one-pass kernel
    assert f.provenance == {"function": "minimum_spanning_forest"}
    assert f.metric is None and f.dask_plan is None and f.required.tolist() == []
    f.bottleneck([0], [2])                                  # fills the merge-tree cache
    g = pickle.loads(pickle.dumps(f))
    assert g.edges.tolist() == f.edges.tolist() and g.weight == f.weight
    assert g.bottleneck([0], [2])[1].tolist() == f.bottleneck([0], [2])[1].tolist()
    c = fastmst.minimum_spanning_forest([0, 1, 2, 0], [1, 2, 3, 3], [1.0, 4.0, 2.0, 3.0],
                                        required=[1], excluded=[3])
    assert c.provenance == {"function": "minimum_spanning_forest", "n_required": 1,
                            "n_excluded": 1}
    assert c.required.tolist() == [1]
    u = c.add_edges([1], [3], [0.5])
    assert u.provenance == {"function": "SpanningForest.add_edges", "n_new_edges": 1}
    assert u.method == "kruskal" and u.required.tolist() == [1]
    assert f.add_edges([1], [3], [0.5]).method == "kruskal"   # the presorted merge, scanned
    p = fastmst.point_spanning_tree([[0, 0], [3, 0], [3, 4]])
    assert p.method == "all-pairs" and p.metric == "euclidean"
    assert p.provenance["function"] == "point_spanning_tree"
    assert p.provenance["metric"] == "euclidean"
