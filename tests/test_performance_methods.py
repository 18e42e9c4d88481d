"""The performance methods (radix-sorted Kruskal, Filter-Kruskal, parallel Borůvka) return the
one forest of the (weight, position) rule, checked against outside references."""
from types import SimpleNamespace

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

import fastmst
from fastmst import validation
from fastmst._kernels.boruvka import boruvka
from fastmst._kernels.filter_kruskal import filter_kruskal
from fastmst._kernels.radix_kruskal import kruskal_radix
from fastmst._kernels.rule_order import edge_order
from fastmst._kernels.scan import forest_bound, forest_size, kruskal
from fastmst.solve.methods import RUNNERS, choose_method

nx = pytest.importorskip("networkx")
sparse = pytest.importorskip("scipy.sparse")
csgraph = pytest.importorskip("scipy.sparse.csgraph")

METHODS = ["kruskal", "filter-kruskal", "boruvka"]
THREADS = [1, 2, 3, 4]


@pytest.fixture(autouse=True)
def parallel_on_small_graphs(monkeypatch):
    """Run the parallel code paths even on the small graphs of these tests (the kernels
    normally keep one thread below a few million edges)."""
    import fastmst._kernels.boruvka
    import fastmst._kernels.filter_kruskal
    import fastmst._kernels.radix
    import fastmst._kernels.radix_kruskal
    monkeypatch.setattr(fastmst._kernels.radix, "MIN_EDGES_PER_THREAD", 1)
    monkeypatch.setattr(fastmst._kernels.radix_kruskal, "MIN_EDGES_PIPELINE", 1)
    monkeypatch.setattr(fastmst._kernels.filter_kruskal, "FILTER_WINDOW", 64)
    monkeypatch.setattr(fastmst._kernels.boruvka, "MIN_EDGES_PER_THREAD", 1)


def rule_rank(weight):
    """Rank of every edge in the (weight, position) order, by NumPy's stable sort.

    -0.0 is made +0.0 first: they compare equal, so they tie (IEEE 754).
    """
    w = np.asarray(weight)
    if w.dtype.kind == "f":
        w = w + 0  # -0.0 + 0 == +0.0
    order = np.argsort(w, kind="stable")
    rank = np.empty(len(w), dtype=np.int64)
    rank[order] = np.arange(len(w))
    return rank


def networkx_forest(tail, head, weight, n, maximize=False):
    """Reference forest from networkx's Kruskal on a MultiGraph, with each edge weighted by its
    rank in the (weight, position) order, which makes the forest unique (networkx,
    ``minimum_spanning_edges`` / ``maximum_spanning_edges``)."""
    w = np.asarray(weight)
    # every test weight converts to float64 exactly enough to keep its order
    rank = rule_rank(-w.astype(np.float64) if maximize else w)
    g = nx.MultiGraph()
    g.add_nodes_from(range(n))
    for p, (u, v) in enumerate(zip(np.asarray(tail).tolist(), np.asarray(head).tolist())):
        g.add_edge(u, v, key=p, r=int(rank[p]))
    found = nx.minimum_spanning_edges(g, algorithm="kruskal", weight="r", keys=True, data=False)
    return sorted(k for _, _, k in found)


def all_forests(tail, head, weight, n=None, **kw):
    """Every method at every thread count."""
    out = {}
    for method in METHODS:
        for threads in THREADS:
            out[method, threads] = fastmst.minimum_spanning_forest(
                tail, head, weight, n, method=method, threads=threads, **kw)
    return out


def assert_identical(forests):
    ref = forests["kruskal", 1]
    for key, f in forests.items():
        np.testing.assert_array_equal(f.edges, ref.edges, err_msg=str(key))
        np.testing.assert_array_equal(f.labels, ref.labels, err_msg=str(key))
        assert f.n_components == ref.n_components, key
    return ref


def first_appearance(labels):
    _, first, inv = np.unique(labels, return_index=True, return_inverse=True)
    order = np.argsort(first)
    remap = np.empty_like(order)
    remap[order] = np.arange(len(order))
    return remap[inv]


def random_multigraph(rng, n, m, weights):
    tail = rng.integers(0, n, m)
    head = rng.integers(0, n, m)
    return tail, head, weights(m)


def test_ties_and_parallel_edges_match_networkx():
    """Heavy ties and parallel edges: every method and thread count returns the forest that
    networkx's Kruskal finds under the (weight, position) order."""
    rng = np.random.default_rng(0)
    for trial in range(12):
        n = int(rng.integers(2, 60))
        tail, head, w = random_multigraph(rng, n, int(rng.integers(1, 300)),
                                          lambda m: rng.integers(0, 3, m).astype(float))
        f = assert_identical(all_forests(tail, head, w, n))
        assert sorted(f.edges.tolist()) == networkx_forest(tail, head, w, n)


def test_total_weight_matches_scipy_on_simple_graphs():
    """Simple graphs with distinct positive weights: the forest weight equals SciPy's
    (scipy.sparse.csgraph.minimum_spanning_tree, which needs no duplicates and no zeros)."""
    rng = np.random.default_rng(1)
    for n in (5, 50, 400):
        g = nx.gnm_random_graph(n, 3 * n, seed=int(rng.integers(1 << 30)))
        tail, head = np.array(list(g.edges())).T
        w = rng.permutation(len(tail)).astype(float) + 1.0
        ref = csgraph.minimum_spanning_tree(
            sparse.coo_array((w, (tail, head)), shape=(n, n)).tocsr())
        for f in all_forests(tail, head, w, n).values():
            assert f.weight == pytest.approx(float(ref.sum()), rel=1e-12)
            assert len(f) == ref.nnz


def test_components_match_scipy_connected_components():
    """Many components: labels equal scipy.sparse.csgraph.connected_components up to the
    first-appearance numbering, for every method."""
    rng = np.random.default_rng(2)
    n, parts = 3000, 300
    block = rng.integers(0, parts, 4000)
    tail = block * 10 + rng.integers(0, 10, 4000)
    head = block * 10 + rng.integers(0, 10, 4000)
    w = rng.random(4000)
    k, lab = csgraph.connected_components(
        sparse.coo_array((np.ones(4000), (tail, head)), shape=(n, n)), directed=False)
    f = assert_identical(all_forests(tail, head, w, n))
    assert f.n_components == k
    np.testing.assert_array_equal(f.labels, first_appearance(lab))
    assert len(f) == n - k


@pytest.mark.parametrize("dtype", [np.float32, np.float64, np.int32, np.int64, np.uint32,
                                   np.uint64, np.int16, np.uint8, np.float16])
@pytest.mark.parametrize("maximize", [False, True])
def test_every_weight_dtype(dtype, maximize):
    """All weight dtypes, signed values (and -0.0/+0.0 ties, +-inf for floats), both
    directions: identical edges everywhere and equal to the networkx reference."""
    rng = np.random.default_rng(3)
    n, m = 40, 400
    tail, head = rng.integers(0, n, m), rng.integers(0, n, m)
    kind = np.dtype(dtype).kind
    if kind == "f":
        w = rng.integers(-3, 4, m).astype(dtype)
        w[rng.random(m) < 0.2] = -0.0
        w[0], w[1] = np.inf, -np.inf
    elif kind == "u":
        w = rng.integers(0, 5, m).astype(dtype)
        w[:3] = np.iinfo(dtype).max
    else:
        w = rng.integers(-3, 4, m).astype(dtype)
        w[:2] = np.iinfo(dtype).min, np.iinfo(dtype).max
    f = assert_identical(all_forests(tail, head, w, n, maximize=maximize))
    assert sorted(f.edges.tolist()) == networkx_forest(tail, head, w, n, maximize)


def test_negative_zero_ties_with_positive_zero():
    """-0.0 and +0.0 are equal weights (IEEE 754), so the earlier position wins either way."""
    for w in ([0.0, -0.0], [-0.0, 0.0]):
        for method in METHODS:
            f = fastmst.minimum_spanning_forest([0, 0], [1, 1], np.array(w), method=method)
            assert f.edges.tolist() == [0]


def test_presorted_input_all_methods():
    """presorted=True gives the same forest as sorting (ascending, and descending with
    maximize)."""
    rng = np.random.default_rng(4)
    tail, head = rng.integers(0, 300, 3000), rng.integers(0, 300, 3000)
    w = np.sort(rng.integers(0, 50, 3000)).astype(np.float64)
    for maximize, ww in ((False, w), (True, w[::-1].copy())):
        ref = fastmst.minimum_spanning_forest(tail, head, ww, maximize=maximize)
        pre = all_forests(tail, head, ww, presorted=True, maximize=maximize)
        for f in pre.values():
            np.testing.assert_array_equal(f.edges, ref.edges)


@pytest.mark.parametrize("ids", [np.int32, np.int64])
def test_filter_kruskal_streamed_chunks(ids):
    """Chunks of 1, 7 and 300 slots force every streaming path (copy, filtered collect, range
    cut when the survivors overflow the slots, the largest-tree bitmap) on 1 to 3 threads; the
    forest, its endpoints, its weights (bit for bit, -0.0 included) and the components stay
    those of the reference (networkx Kruskal; scipy.sparse.csgraph.connected_components)."""
    rng = np.random.default_rng(11)
    n, m = 300, 4000
    tail = rng.integers(0, n, m).astype(ids)
    head = rng.integers(0, n, m).astype(ids)
    signed_zero = np.where(rng.random(m) < 0.5, -0.0, 0.0)
    weights = (rng.random(m), rng.random(m).astype(np.float32) - 0.5, signed_zero,
               rng.integers(-3, 3, m).astype(np.int32), rng.integers(0, 2**62, m).astype(np.uint64))
    adj = sparse.coo_matrix((np.ones(m), (tail, head)), shape=(n, n))
    n_comp, comp = csgraph.connected_components(adj, directed=False)
    for w in weights:
        want = networkx_forest(tail, head, w, n)
        for maximize in (False, True):
            ref, _ = kruskal_radix(tail, head, w, n, maximize)
            for chunk in (1, 7, 300):
                for threads in (1, 2, 3):
                    edges, parent, ft, fh, fw = filter_kruskal(tail, head, w, n, maximize, -1,
                                                               threads, 0, chunk)
                    np.testing.assert_array_equal(edges, ref)
                    np.testing.assert_array_equal(ft, tail[edges])
                    np.testing.assert_array_equal(fh, head[edges])
                    assert fw.dtype == w.dtype
                    np.testing.assert_array_equal(fw.view(np.uint8), w[edges].view(np.uint8))
                    root = parent.copy()
                    for _ in range(20):
                        root = root[root]
                    assert len(set(zip(comp.tolist(), root.tolist()))) == n_comp
            if not maximize:
                assert sorted(ref.tolist()) == want


def test_filter_kruskal_empty_buckets_between_chunks():
    """Light weights in [1, 2), a block of equal weights at 1e300 and one heavier edge that
    alone reaches the last node: the streamed passes meet long runs of empty buckets and a
    bucket far larger than a chunk; the forest is still networkx's."""
    rng = np.random.default_rng(3)
    n = 60
    w = np.concatenate([rng.random(400) + 1.0, np.full(3000, 1e300), [2.5e300]])
    m = w.shape[0]
    tail = rng.integers(0, n, m).astype(np.int32)
    head = rng.integers(0, n, m).astype(np.int32)
    head[-1] = n + 5
    want = networkx_forest(tail, head, w, n + 6)
    assert m - 1 in want
    for chunk in (1, 3, 50):
        for threads in (1, 2):
            got = filter_kruskal(tail, head, w, n + 6, False, -1, threads, 0, chunk)[0]
            assert sorted(got.tolist()) == want


def test_filter_kruskal_pivot_recursion_and_bucket_paths():
    """With a tiny base-case threshold the pivot recursion and the filter run on every bucket;
    the forest stays plain Kruskal's (and networkx's)."""
    rng = np.random.default_rng(5)
    n, m = 500, 20000
    tail = rng.integers(0, n, m).astype(np.int32)
    head = rng.integers(0, n, m).astype(np.int32)
    for w in (rng.random(m), rng.integers(0, 4, m).astype(np.int64), np.zeros(m)):
        ref, _ = kruskal_radix(tail, head, w, n)
        for threshold in (9, 64, 1000):
            got = filter_kruskal(tail, head, w, n, False, -1, 1, threshold)[0]
            np.testing.assert_array_equal(got, ref)
    w = rng.integers(0, 4, m).astype(float)
    want = networkx_forest(tail, head, w, n)
    assert len(want) == n - 1          # 20000 random edges on 500 nodes: connected
    assert sorted(kruskal_radix(tail, head, w, n)[0].tolist()) == want
    for threshold in (9, 1000):
        got = filter_kruskal(tail, head, w, n, False, -1, 1, threshold)[0]
        assert sorted(got.tolist()) == want


@pytest.mark.parametrize("dtype", [np.float32, np.float64, np.int32, np.int64, np.uint32,
                                   np.uint64])
def test_radix_order_equals_stable_argsort(dtype):
    """The radix order is NumPy's stable argsort order (ascending), and for descending the
    (-weight, position) lexsort order (numpy.lexsort)."""
    rng = np.random.default_rng(6)
    m = 50000
    if np.dtype(dtype).kind == "f":
        w = (rng.standard_normal(m) * 1e3).astype(dtype)
        w[::5] = 0.0
        w[::7] = -0.0
        w[:4] = [np.inf, -np.inf, np.finfo(dtype).tiny, -np.finfo(dtype).max]
    else:
        info = np.iinfo(dtype)
        w = rng.integers(info.min, info.max, m, dtype=dtype, endpoint=True)
        w[::3] = w[1]
    np.testing.assert_array_equal(edge_order(w), rule_rank(w).argsort())
    _, inv = np.unique(w + 0 if w.dtype.kind == "f" else w, return_inverse=True)
    np.testing.assert_array_equal(edge_order(w, True), np.lexsort((np.arange(m), -inv)))
    np.testing.assert_array_equal(edge_order(w, False, 2), edge_order(w, False, 1))


def test_large_graph_thread_counts_identical():
    """A 200k-edge random graph: every method and thread count 1..4 returns the same edges and
    the forest weight of SciPy (distinct weights, duplicates removed first)."""
    rng = np.random.default_rng(7)
    n, m = 20000, 200000
    tail, head = rng.integers(0, n, m), rng.integers(0, n, m)
    key = np.unique(np.minimum(tail, head) * n + np.maximum(tail, head))
    tail, head = key // n, key % n
    keep = tail != head
    tail, head = tail[keep], head[keep]
    w = rng.permutation(len(tail)).astype(np.float64) + 1
    f = assert_identical(all_forests(tail, head, w, n))
    ref = csgraph.minimum_spanning_tree(
        sparse.coo_array((w, (tail, head)), shape=(n, n)).tocsr())
    assert f.weight == pytest.approx(float(ref.sum()), rel=1e-12)


def test_inputs_not_mutated_and_read_only_ok():
    """Read-only inputs are accepted and no input changes."""
    rng = np.random.default_rng(8)
    tail, head = rng.integers(0, 50, 500), rng.integers(0, 50, 500)
    w = rng.standard_normal(500)
    copies = [a.copy() for a in (tail, head, w)]
    for a in (tail, head, w):
        a.setflags(write=False)
    all_forests(tail, head, w)
    for a, c in zip((tail, head, w), copies):
        np.testing.assert_array_equal(a, c)


def test_edge_cases():
    """Empty graphs, one node, only self-loops, isolated nodes beyond the last id."""
    for method in METHODS:
        f = fastmst.minimum_spanning_forest([], [], [], 3, method=method)
        assert len(f) == 0 and f.n_components == 3
        f = fastmst.minimum_spanning_forest([0, 1], [0, 1], [1.0, 2.0], method=method)
        assert len(f) == 0 and f.n_components == 2
        f = fastmst.minimum_spanning_forest([0], [1], [5], 10, method=method)
        assert f.edges.tolist() == [0] and f.n_components == 9


def test_auto_rule():
    """The documented auto rule: presorted or small -> kruskal, otherwise filter-kruskal."""
    g = validation.validate_edges([0, 1], [1, 2], [1.0, 2.0])
    assert choose_method(g, True, 2) == "kruskal"
    assert choose_method(g, False, 1) == "kruskal"      # small: the one-pass kernel
    assert choose_method(SimpleNamespace(n_edges=5000, n_nodes=9), False, 1) == "filter-kruskal"
    assert fastmst.minimum_spanning_forest([0, 1], [1, 2], [1.0, 2.0]).method == "kruskal"
    # beyond 2**32 - 1 edges (32-bit record positions) the rule picks Borůvka, which needs no sort
    assert choose_method(SimpleNamespace(n_edges=2**32), False, 1) == "boruvka"
    assert choose_method(SimpleNamespace(n_edges=2**32 - 1), False, 1) == "filter-kruskal"
    # the registry holds exactly the documented methods, and every one of them runs
    assert fastmst.METHODS == ("auto", "kruskal", "filter-kruskal", "boruvka")
    assert tuple(RUNNERS) == fastmst.METHODS[1:]
    for method in fastmst.METHODS:
        f = fastmst.minimum_spanning_forest([0, 1], [1, 2], [1.0, 2.0], method=method)
        assert f.edges.tolist() == [0, 1]


@settings(deadline=None, derandomize=True, max_examples=60)
@given(st.integers(1, 25).flatmap(lambda n: st.tuples(
    st.just(n),
    st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1),
                       st.sampled_from([-1.0, -0.0, 0.0, 0.5, 2.0, np.inf])),
             max_size=80))), st.booleans())
def test_hypothesis_methods_equal_networkx(graph, maximize):
    """Random small multigraphs with ties, zeros, negatives and inf: all methods and thread
    counts agree with each other and with networkx's Kruskal under the tie rule."""
    n, edges = graph
    tail = np.array([e[0] for e in edges], dtype=np.int64)
    head = np.array([e[1] for e in edges], dtype=np.int64)
    w = np.array([e[2] for e in edges], dtype=np.float64)
    f = assert_identical(all_forests(tail, head, w, n, maximize=maximize))
    assert sorted(f.edges.tolist()) == networkx_forest(tail, head, w, n, maximize)


@pytest.mark.parametrize("index_dtype", [np.int32, np.int64])
def test_forest_bound_same_for_every_thread_count(index_dtype):
    """forest_bound is (nodes with an edge) - 1 for every thread count; the reference count of
    touched nodes is numpy.unique over both endpoint arrays."""
    rng = np.random.default_rng(11)
    n = 3000
    for m in (1, 2, 7, 500, 4000):
        tail = rng.integers(0, n, m).astype(index_dtype)
        head = rng.integers(0, n // 3, m).astype(index_dtype)
        want = max(0, np.unique(np.concatenate([tail, head])).shape[0] - 1)
        for threads in THREADS:
            assert forest_bound(tail, head, n, threads) == want


@pytest.mark.parametrize("method", METHODS)
def test_result_arrays_keep_input_dtypes(method):
    """Narrow, unsigned and big-endian inputs: the forest's tail, head and weights are the
    input's own values in the input's dtypes, bit for bit (-0.0 in float16 included), and the
    edges are the same for every method (identity against the input arrays themselves)."""
    rng = np.random.default_rng(8)
    n, m = 500, 5000
    t = rng.integers(0, n, m)
    h = rng.integers(0, n, m)
    cases = [(np.uint16, rng.random(m).astype(np.float16)),
             (">i8", rng.integers(-9, 9, m).astype(np.int8)),
             (np.uint32, np.where(rng.random(m) < 0.5, -0.0, 0.0).astype(np.float16)),
             (np.int64, rng.random(m).astype(">f8"))]
    for ids, w in cases:
        tail, head = t.astype(ids), h.astype(ids)
        f = fastmst.minimum_spanning_forest(tail, head, w, n, method=method)
        ref = fastmst.minimum_spanning_forest(t, h, w.astype(w.dtype.newbyteorder("=")), n,
                                              method="kruskal")
        np.testing.assert_array_equal(f.edges, ref.edges)
        assert f.tail.dtype == tail.dtype and f.head.dtype == head.dtype
        assert f.weights.dtype == w.dtype
        np.testing.assert_array_equal(f.tail, tail[f.edges])
        np.testing.assert_array_equal(f.head, head[f.edges])
        np.testing.assert_array_equal(f.weights.view(np.uint8), w[f.edges].view(np.uint8))


KERNELS = {
    "kruskal_radix": lambda t, h, w, n: kruskal_radix(t, h, w, n),
    "filter_kruskal": lambda t, h, w, n: filter_kruskal(t, h, w, n),
    "boruvka": lambda t, h, w, n: boruvka(t, h, w, n),
}


@pytest.mark.parametrize("kernel", sorted(KERNELS))
def test_kernel_defs_refuse_weights_they_would_misread(kernel):
    """Each kernel def checks its own weight argument: a byte-swapped array (whose bits read
    natively are other numbers), a strided view, a wrong length or a non-kernel dtype raise
    ValueError/TypeError instead of giving another forest; a correct array gives networkx's."""
    rng = np.random.default_rng(12)
    n, m = 30, 200
    tail = rng.integers(0, n, m)
    head = rng.integers(0, n, m)
    w = rng.standard_normal(2 * m)
    run = KERNELS[kernel]
    got = run(tail, head, np.ascontiguousarray(w[:m]), n)[0]
    assert sorted(got.tolist()) == networkx_forest(tail, head, w[:m], n)
    with pytest.raises(ValueError):
        run(tail, head, w[:m].astype(">f8"), n)               # byte-swapped
    with pytest.raises(ValueError):
        run(tail, head, w[::2], n)                            # strided (not contiguous)
    with pytest.raises(ValueError):
        run(tail, head, w[:m - 1].copy(), n)                  # one weight short
    with pytest.raises(ValueError):
        run(tail, head[:-1].copy(), w[:m].copy(), n)          # one head short
    with pytest.raises((TypeError, ValueError)):
        run(tail, head, w[:m].astype(np.float16), n)          # not a kernel dtype
    with pytest.raises(TypeError):
        run(tail, head, list(w[:m]), n)                       # not an array


SCAN_KERNELS = {
    **KERNELS,
    "forest_size": lambda t, h, w, n: forest_size(t, h, n),
    "forest_bound": lambda t, h, w, n: (forest_bound(t, h, n),),
    "kruskal": lambda t, h, w, n: kruskal(np.arange(len(h), dtype=np.int64), t, h, n, n - 1),
}


@pytest.mark.parametrize("kernel", sorted(SCAN_KERNELS))
def test_kernel_functions_refuse_id_arrays_they_cannot_read(kernel):
    """Each kernel function checks its id arrays before it allocates (the compiled defs take
    contiguous int32 or int64 ids of one dtype): other dtypes, mixed dtypes, 2-D, lists and
    strided views raise TypeError/ValueError; lengths that disagree and a negative node count
    raise ValueError.  Correct arrays give a result."""
    rng = np.random.default_rng(13)
    n, m = 30, 200
    tail = rng.integers(0, n, 2 * m)
    head = rng.integers(0, n, m)
    w = rng.standard_normal(m)
    run = SCAN_KERNELS[kernel]
    run(tail[:m].copy(), head, w, n)
    for bad in (tail[:m].astype(np.float64), tail[:m].astype(np.int16), list(tail[:m]),
                tail[:m].astype(np.int32), tail[:m].astype(">i8"), tail[:m].reshape(10, 20)):
        with pytest.raises(TypeError):
            run(bad, head, w, n)
    with pytest.raises(ValueError):
        run(tail[::2], head, w, n)                            # strided (not contiguous)
    with pytest.raises(ValueError):
        run(tail[:m + 1].copy(), head, np.append(w, 0.5), n)  # one head short
    with pytest.raises(ValueError):
        run(tail[:m].copy(), head, w, -1)                     # negative node count


def test_compiled_passes_refuse_sizes_that_would_overrun():
    """The thin defs of the compiled passes check the sizes that protect memory (ValueError,
    never a write past an array): counters per block, slot space, output lengths."""
    from fastmst._kernels import _filter_kruskal, _radix_kruskal, _scan
    t = np.array([0, 1, 2], dtype=np.int32)
    h = np.array([1, 2, 0], dtype=np.int32)
    bits = np.arange(3, dtype=np.uint64).view(np.uint8)
    with pytest.raises(ValueError):   # 2 blocks need 4096 counters
        _filter_kruskal.digit_histogram(bits, 8, 3, 0, False, 0, 0, np.zeros(2048, np.intp), 2, 1)
    with pytest.raises(ValueError):   # 3 edges of 8-byte bits read as 4-byte
        _filter_kruskal.digit_histogram(bits, 4, 3, 0, False, 0, 0, np.zeros(2048, np.intp), 1, 1)
    with pytest.raises(ValueError):   # 2 slots of records, 1 of side entries
        _filter_kruskal.scatter(bits, 8, t, h, 0, False, 0, 0, 0, 2048, np.zeros(2048, np.intp),
                                np.zeros(24, np.uint8), np.zeros(3, np.int32), 1, 1)
    with pytest.raises(ValueError):   # target beyond the output
        _radix_kruskal.scan_positions(t, h, np.arange(3, dtype=np.int32), np.zeros(3, np.uint8),
                                      3, np.zeros(2, np.int64))
    with pytest.raises(ValueError):   # one row of 1 word for 2 threads
        _scan.count_touched(t, h, np.zeros(1, np.uint64), 1, 2)
