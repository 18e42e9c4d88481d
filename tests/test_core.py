"""Minimum spanning forests against outside references, across every method.

References: scipy.sparse.csgraph.minimum_spanning_tree (SciPy), networkx's Kruskal
(networkx.minimum_spanning_edges / maximum_spanning_edges on nx.MultiGraph), and
scipy.sparse.csgraph.connected_components for the component invariant.
"""
import threading

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, strategies as st
from scipy.sparse import coo_array
from scipy.sparse.csgraph import minimum_spanning_tree

import fastmst
from conftest import assert_is_spanning_forest, reference_kruskal

METHODS = [m for m in fastmst.METHODS]


def solve_all(tail, head, weight, n_nodes=None, **kw):
    """Solve with every method; assert identical edges; return the forests."""
    forests = [fastmst.minimum_spanning_forest(tail, head, weight, n_nodes, method=m, **kw)
               for m in METHODS]
    for f in forests[1:]:
        np.testing.assert_array_equal(f.edges, forests[0].edges,
                                      err_msg=f"method {f.method} differs from {forests[0].method}")
    return forests


@st.composite
def simple_graphs(draw):
    """Simple undirected graphs (no self-loops, no parallel edges) with non-zero weights."""
    n = draw(st.integers(1, 25))
    pairs = [(u, v) for u in range(n) for v in range(u + 1, n)]
    chosen = draw(st.lists(st.sampled_from(pairs), unique=True, max_size=60)) if pairs else []
    w = draw(st.lists(st.integers(1, 9), min_size=len(chosen), max_size=len(chosen)))
    tail = np.array([p[0] for p in chosen], dtype=np.int64)
    head = np.array([p[1] for p in chosen], dtype=np.int64)
    return tail, head, np.array(w, dtype=np.float64), n


@st.composite
def multigraphs(draw):
    """Multigraphs: self-loops, parallel edges, ties, zero and negative weights."""
    n = draw(st.integers(1, 20))
    m = draw(st.integers(0, 70))
    tail = draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    head = draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    w = draw(st.lists(st.integers(-3, 3), min_size=m, max_size=m))
    return (np.array(tail, dtype=np.int64), np.array(head, dtype=np.int64),
            np.array(w, dtype=np.float64), n)


def scipy_total(tail, head, weight, n):
    """Total weight of SciPy's minimum spanning tree (reference: scipy.sparse.csgraph)."""
    g = coo_array((weight, (tail, head)), shape=(n, n)).tocsr()
    return float(minimum_spanning_tree(g).sum())


@given(simple_graphs())
def test_total_matches_scipy_on_simple_graphs(g):
    """Every method's total equals scipy.sparse.csgraph.minimum_spanning_tree's.

    Only simple graphs with non-zero weights are compared with SciPy: its sparse-matrix input
    drops zero-weight entries and sums parallel edges, so it solves a different graph otherwise.
    """
    tail, head, weight, n = g
    for f in solve_all(tail, head, weight, n):
        assert f.weight == pytest.approx(scipy_total(tail, head, weight, n), abs=1e-9)
        assert_is_spanning_forest(f, tail, head, n)


@given(multigraphs())
def test_total_matches_networkx_on_multigraphs(g):
    """Totals equal networkx's Kruskal on nx.MultiGraph, with ties, zero and negative weights,
    self-loops and parallel edges (reference: networkx.minimum_spanning_edges)."""
    tail, head, weight, n = g
    mg = nx.MultiGraph()
    mg.add_nodes_from(range(n))
    for i, (u, v, w) in enumerate(zip(tail.tolist(), head.tolist(), weight.tolist())):
        mg.add_edge(u, v, key=i, weight=w)
    ref_min = sum(d["weight"] for *_, d in
                  nx.minimum_spanning_edges(mg, algorithm="kruskal", keys=True, data=True))
    ref_max = sum(d["weight"] for *_, d in
                  nx.maximum_spanning_edges(mg, algorithm="kruskal", keys=True, data=True))
    for f in solve_all(tail, head, weight, n):
        assert f.weight == ref_min
        assert_is_spanning_forest(f, tail, head, n)
    for f in solve_all(tail, head, weight, n, maximize=True):
        assert f.weight == ref_max
        assert_is_spanning_forest(f, tail, head, n)


@given(multigraphs(), st.booleans())
def test_edges_follow_the_position_tie_rule(g, maximize):
    """Edges equal the rule written out directly: Kruskal over (weight, position)."""
    tail, head, weight, n = g
    ref = reference_kruskal(tail, head, weight, n, maximize=maximize)
    for f in solve_all(tail, head, weight, n, maximize=maximize):
        assert f.edges.tolist() == ref


def _families():
    """Graph families beyond random ones: named, with fixed seeds."""
    rng = np.random.default_rng(12345)
    fam = {}
    n = 400
    t = rng.integers(0, n, 3000)
    h = rng.integers(0, n, 3000)
    fam["random-ties"] = (t, h, rng.integers(0, 4, 3000).astype(np.float64), n)
    fam["multigraph-dups"] = (np.repeat(t[:500], 3), np.repeat(h[:500], 3),
                              np.tile([1.0, 1.0, 0.0], 500), n)
    fam["zero-negative-inf"] = (t, h, rng.choice([-np.inf, -2.0, 0.0, -0.0, 1.5, np.inf], 3000), n)
    # 50 blocks of 20 nodes, edges inside blocks only
    bt = rng.integers(0, 20, 2000) + 20 * rng.integers(0, 50, 2000)
    bh = (bt // 20) * 20 + rng.integers(0, 20, 2000)
    fam["many-components"] = (bt, bh, rng.random(2000), 1200)  # nodes 1000..1199 isolated
    p = np.arange(999)
    fam["long-path"] = (p, p + 1, rng.random(999), 1000)
    fam["star"] = (np.zeros(999, np.int64), np.arange(1, 1000), rng.integers(0, 3, 999), 1000)
    iu = np.triu_indices(60, 1)
    fam["dense-complete"] = (iu[0], iu[1], rng.random(iu[0].size), 60)
    w = np.sort(rng.integers(0, 50, 3000)).astype(np.float64)
    fam["presorted"] = (t, h, w, n)
    fam["reverse-sorted"] = (t, h, w[::-1].copy(), n)
    return fam


@pytest.mark.parametrize("name", list(_families()))
@pytest.mark.parametrize("maximize", [False, True])
def test_families_identical_across_methods_and_reference(name, maximize):
    """All methods agree edge for edge with each other and the rule on named families; totals
    agree with networkx's Kruskal (reference: networkx.minimum/maximum_spanning_edges)."""
    tail, head, weight, n = _families()[name]
    forests = solve_all(tail, head, weight, n, maximize=maximize)
    assert forests[0].edges.tolist() == reference_kruskal(tail, head, weight, n, maximize)
    mg = nx.MultiGraph()
    mg.add_nodes_from(range(n))
    mg.add_weighted_edges_from((int(u), int(v), float(w)) for u, v, w in zip(tail, head, weight))
    span = nx.maximum_spanning_edges if maximize else nx.minimum_spanning_edges
    ref = sum(d["weight"] for *_, d in span(mg, algorithm="kruskal", data=True))
    assert_is_spanning_forest(forests[0], tail, head, n)
    if np.isfinite(ref):
        assert forests[0].weight == pytest.approx(ref, rel=1e-12, abs=1e-9)
    else:
        assert forests[0].weight == ref


def test_presorted_rejects_unsorted_weights():
    """presorted=True on weights out of the rule's order is an error naming the first offending
    position (the forests on sorted input are compared in test_performance_methods.py)."""
    with pytest.raises(ValueError, match=r"presorted=True but the weights are not "
                                         r"non-decreasing: weight\[1\]"):
        fastmst.minimum_spanning_forest([0, 1], [1, 2], [2.0, 1.0], presorted=True)
    with pytest.raises(ValueError, match="non-increasing"):
        fastmst.minimum_spanning_forest([0, 1], [1, 2], [1.0, 2.0], presorted=True, maximize=True)


ID_DTYPES = [np.int8, np.int16, np.int32, np.int64, np.uint8, np.uint16, np.uint32, np.uint64]
W_DTYPES = [np.int8, np.int16, np.int32, np.int64, np.uint8, np.uint16, np.uint32, np.uint64,
            np.float16, np.float32, np.float64]


@pytest.mark.parametrize("id_dtype", ID_DTYPES)
@pytest.mark.parametrize("w_dtype", W_DTYPES)
def test_dtype_matrix(id_dtype, w_dtype):
    """Every integer id dtype and integer/float weight dtype gives the float64 answer, and the
    result keeps the input dtypes (reference: networkx.minimum_spanning_edges total)."""
    rng = np.random.default_rng(7)
    n = 60
    t = rng.integers(0, n, 300).astype(id_dtype)
    h = rng.integers(0, n, 300).astype(id_dtype)
    w = rng.integers(0, 100, 300).astype(w_dtype)
    g = nx.MultiGraph()
    g.add_nodes_from(range(n))
    g.add_weighted_edges_from((int(a), int(b), float(c)) for a, b, c in zip(t, h, w))
    ref = sum(d["weight"] for *_, d in nx.minimum_spanning_edges(g, data=True))
    for f in solve_all(t, h, w, n):
        assert f.weight == ref
        assert f.tail.dtype == t.dtype and f.head.dtype == h.dtype and f.weights.dtype == w.dtype
    base = fastmst.minimum_spanning_forest(t.astype(np.int64), h.astype(np.int64),
                                           w.astype(np.float64), n)
    np.testing.assert_array_equal(solve_all(t, h, w, n)[0].edges, base.edges)


def test_empty_and_single_node_graphs():
    """No edges: every node is its own component; zero nodes: an empty forest."""
    for m in METHODS:
        f = fastmst.minimum_spanning_forest([], [], [], method=m)
        assert (f.n_nodes, f.n_components, len(f), f.weight) == (0, 0, 0, 0.0)
        f = fastmst.minimum_spanning_forest([], [], [], 1, method=m)
        assert (f.n_nodes, f.n_components, f.labels.tolist()) == (1, 1, [0])
        f = fastmst.minimum_spanning_forest([0], [0], [5.0], method=m)
        assert (f.n_nodes, f.n_components, len(f)) == (1, 1, 0)
        f = fastmst.minimum_spanning_forest([0, 2], [1, 1], [1, 1], 6, method=m)
        assert f.n_components == 4 and f.labels.tolist() == [0, 0, 0, 1, 2, 3]


def test_inputs_read_only_strided_memmap_and_byteswapped(tmp_path):
    """Read-only, non-contiguous, memory-mapped and big-endian arrays give the same forest and
    are never modified."""
    rng = np.random.default_rng(3)
    n, m = 200, 2000
    t = rng.integers(0, n, m)
    h = rng.integers(0, n, m)
    w = rng.random(m)
    ref = fastmst.minimum_spanning_forest(t, h, w, n).edges
    ro = [a.copy() for a in (t, h, w)]
    for a in ro:
        a.setflags(write=False)
    big = np.empty((3, 2 * m))
    big[2, ::2] = w
    st_t = np.zeros(2 * m, np.int64)
    st_t[::2] = t
    st_h = np.zeros(2 * m, np.int64)
    st_h[::2] = h
    strided = (st_t[::2], st_h[::2], big[2, ::2])
    paths = []
    for name, a in zip("thw", (t, h, w)):
        p = tmp_path / f"{name}.npy"
        np.save(p, a)
        paths.append(p)
    mm = [np.load(p, mmap_mode="r") for p in paths]
    swapped = (t.astype(">i8"), h.astype(">i4"), w.astype(">f8"))
    for arrays in (ro, strided, mm, swapped):
        before = [np.array(a, copy=True) for a in arrays]
        for meth in METHODS:
            np.testing.assert_array_equal(
                fastmst.minimum_spanning_forest(*arrays, n, method=meth).edges, ref)
        for a, b in zip(arrays, before):
            np.testing.assert_array_equal(a, b)


def test_inputs_not_mutated():
    """Writable inputs are left exactly as they were (values and flags)."""
    rng = np.random.default_rng(4)
    t = rng.integers(0, 50, 400).astype(np.int32)
    h = rng.integers(0, 50, 400).astype(np.int32)
    w = rng.random(400).astype(np.float32)
    copies = [a.copy() for a in (t, h, w)]
    for meth in METHODS:
        for mx in (False, True):
            fastmst.minimum_spanning_forest(t, h, w, method=meth, maximize=mx)
    for a, b in zip((t, h, w), copies):
        np.testing.assert_array_equal(a, b)
        assert a.flags.writeable


def test_python_lists_and_isolated_nodes():
    """Plain lists work; n_nodes beyond the largest id adds isolated components."""
    f = fastmst.minimum_spanning_forest([0, 1, 2, 0], [1, 2, 0, 3], [1.0, 2.0, 1.0, 5.0], 6)
    assert f.edges.tolist() == [0, 2, 3]
    assert f.n_components == 3 and f.weight == 7.0
    assert f.tail.tolist() == [0, 2, 0] and f.head.tolist() == [1, 0, 3]


def test_to_scipy_keeps_zero_weight_edges():
    """to_scipy() keeps zero-weight forest edges as explicit entries, symmetric, so SciPy's
    minimum_spanning_tree of it has the same total (reference: scipy.sparse.csgraph)."""
    f = fastmst.minimum_spanning_forest([0, 1, 2, 0], [1, 2, 3, 3], [0.0, 2.0, 0.0, 7.0])
    a = f.to_scipy()
    assert a.shape == (4, 4)
    assert a.nnz == 2 * len(f)
    assert (a != a.T).nnz == 0
    assert a[0, 1] == 0.0 and a[1, 2] == 2.0
    assert float(minimum_spanning_tree(a).sum()) == f.weight


def test_to_networkx_round_trip():
    """to_networkx() gives a tree whose networkx MST is itself (reference: networkx)."""
    rng = np.random.default_rng(5)
    t, h, w = rng.integers(0, 30, 120), rng.integers(0, 30, 120), rng.random(120)
    f = fastmst.minimum_spanning_forest(t, h, w, 35)
    g = f.to_networkx()
    assert g.number_of_nodes() == 35 and g.number_of_edges() == len(f)
    assert nx.is_forest(g)
    assert sorted(d["position"] for *_, d in g.edges(data=True)) == sorted(f.edges.tolist())
    assert sum(d["weight"] for *_, d in nx.minimum_spanning_edges(g, data=True)) == \
        pytest.approx(f.weight)


def test_scipy_drops_zero_weights_and_sums_parallel_edges_but_we_do_not():
    """The shortcomings of the sparse-matrix route, pinned: SciPy sums parallel entries when a
    matrix is built and treats zero entries as absent (scipy.sparse.coo -> csr conversion and
    csgraph's zero rule); fastmst keeps both as edges."""
    tail, head, w = [0, 0, 1], [1, 1, 2], [1.0, 3.0, 0.0]
    f = fastmst.minimum_spanning_forest(tail, head, w)
    assert f.edges.tolist() == [2, 0] and f.weight == 1.0 and f.n_components == 1
    g = coo_array((w, (tail, head)), shape=(3, 3)).tocsr()
    t = minimum_spanning_tree(g)
    assert float(t.sum()) == 4.0  # the parallel 1.0 and 3.0 were summed
    assert t.nnz == 1  # the zero-weight edge 1-2 is gone, the graph falls apart


def test_concurrent_calls_from_threads():
    """Kernels release the GIL and keep no shared state: calls from 4 threads at once return
    the same forests as serial calls."""
    rng = np.random.default_rng(6)
    graphs = [(rng.integers(0, 3000, 30000), rng.integers(0, 3000, 30000),
               rng.integers(0, 20, 30000)) for _ in range(4)]
    expect = [fastmst.minimum_spanning_forest(*g).edges for g in graphs]
    results = [None] * 8

    def run(i):
        results[i] = fastmst.minimum_spanning_forest(*graphs[i % 4],
                                                     method=METHODS[i % len(METHODS)]).edges

    threads = [threading.Thread(target=run, args=(i,)) for i in range(8)]
    for th in threads:
        th.start()
    for th in threads:
        th.join()
    for i, r in enumerate(results):
        np.testing.assert_array_equal(r, expect[i % 4])


def test_repr_and_len():
    """repr names the kind and the size; len is the number of forest edges."""
    f = fastmst.minimum_spanning_forest([0, 1], [1, 2], [1, 2], maximize=True)
    assert len(f) == 2
    assert repr(f).startswith("SpanningForest(maximum, n_nodes=3, n_forest_edges=2")
