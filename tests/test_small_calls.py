"""The one-pass route for small edge lists (``fastmst._kernels.small``) returns exactly what the
general route returns -- edges, labels, n_components, n_nodes and the dtypes of every field --
makes every check the API promises, and leaves the input untouched.

References: the general route of fastmst itself (methods "filter-kruskal" and "boruvka", which
share no code with the one-pass kernel beyond the tie rule's key map and the union-find), and
``scipy.sparse.csgraph.minimum_spanning_tree`` on a rank transform of the weights that encodes
the tie rule (rank of (weight, position), parallel edges reduced to their best rank,
self-loops dropped), whose optimal forest is then unique, and
``scipy.sparse.csgraph.connected_components`` for the labels.
"""
import numpy as np
import pytest
from hypothesis import given, strategies as st
from scipy.sparse import coo_array
from scipy.sparse.csgraph import connected_components, minimum_spanning_tree

import fastmst
from fastmst._kernels import small

MSF = fastmst.minimum_spanning_forest
ID_DTYPES = [np.int32, np.int64, np.uint32, np.uint64, np.int16, np.uint8]
WEIGHT_DTYPES = [np.float32, np.float64, np.int32, np.int64, np.uint32, np.uint64, np.int8,
                 np.float16]
FAST_IDS = {np.dtype(np.int32), np.dtype(np.int64)}
FAST_WEIGHTS = {np.dtype(t) for t in (np.float32, np.float64, np.int32, np.int64, np.uint32,
                                      np.uint64)}


def _weights(rng, m, dtype):
    dtype = np.dtype(dtype)
    if dtype.kind == "f":
        pool = np.array([-np.inf, -2.5, -1.0, -0.0, 0.0, 0.5, 1.0, 3.0, np.inf])
        w = np.where(rng.random(m) < 0.5, rng.choice(pool, m), rng.normal(size=m) * 10)
        return w.astype(dtype)
    info = np.iinfo(dtype)
    pool = np.array([info.min, info.min + 1, 0, 1, 2, info.max - 1, info.max], dtype=dtype)
    out = rng.integers(max(info.min, -3), min(info.max, 6), m, endpoint=True).astype(dtype)
    extreme = rng.random(m) < 0.3
    out[extreme] = rng.choice(pool, m)[extreme]          # stays in the dtype: no float detour
    return out


def _graph(seed, m, n, id_dtype, weight_dtype):
    rng = np.random.default_rng(seed)
    n = max(1, min(n, np.iinfo(id_dtype).max))
    tail = rng.integers(0, n, m).astype(id_dtype)
    head = rng.integers(0, n, m).astype(id_dtype)
    return tail, head, _weights(rng, m, weight_dtype)


def assert_same_forest(a, b):
    assert np.array_equal(a.edges, b.edges) and a.edges.dtype == b.edges.dtype == np.int64
    assert np.array_equal(a.labels, b.labels) and a.labels.dtype == b.labels.dtype == np.int64
    assert (a.n_components, a.n_nodes, a.n_edges) == (b.n_components, b.n_nodes, b.n_edges)
    for x, y in ((a.tail, b.tail), (a.head, b.head), (a.weights, b.weights)):
        assert x.dtype == y.dtype
        assert x.tobytes() == y.tobytes()          # bit for bit: -0.0 keeps its sign
    assert a.maximize == b.maximize


def scipy_forest(tail, head, weight, n, maximize):
    """Edge positions of the unique forest under the tie rule, via SciPy on ranks."""
    m = len(weight)
    w = np.asarray(weight)
    key = -w.astype(np.float64) if maximize else w.astype(np.float64)
    if w.dtype.kind in "iu":                     # exact integer order (float64 would round)
        order = sorted(range(m), key=lambda i: ((-1 if maximize else 1) * int(w[i]), i))
    else:
        order = np.lexsort((np.arange(m), key + 0.0)).tolist()
    rank = np.empty(m, dtype=np.int64)
    rank[order] = np.arange(1, m + 1)
    best = {}
    for p in range(m):
        u, v = int(tail[p]), int(head[p])
        if u == v:
            continue
        k = (min(u, v), max(u, v))
        if k not in best or rank[p] < rank[best[k]]:
            best[k] = p
    ps = np.array(sorted(best.values()), dtype=np.int64)
    if n == 0 or ps.size == 0:
        return set()
    a = coo_array((rank[ps].astype(np.float64),
                   (np.minimum(tail[ps], head[ps]).astype(np.int64),
                    np.maximum(tail[ps], head[ps]).astype(np.int64))), shape=(n, n))
    t = minimum_spanning_tree(a).tocoo()
    by_rank = {int(rank[p]): int(p) for p in ps}
    return {by_rank[int(r)] for r in t.data}


@given(st.integers(0, 2000), st.integers(0, 2**32), st.sampled_from(ID_DTYPES),
       st.sampled_from(WEIGHT_DTYPES), st.booleans(), st.booleans(), st.floats(0.05, 3.0))
def test_small_route_equals_general_route_and_scipy(m, seed, id_dtype, weight_dtype, maximize,
                                                   give_n, density):
    """Sizes 0..2000 edges, every id and weight dtype: the default call (one-pass route where
    the dtypes allow it) equals the general route bit for bit, and SciPy's forest of the
    rank-transformed graph."""
    n = int(m * density) + 1
    tail, head, weight = _graph(seed, m, n, id_dtype, weight_dtype)
    n_nodes = (int(max(tail.max(), head.max())) + 3 if m else 4) if give_n else None
    fast = MSF(tail, head, weight, n_nodes, maximize=maximize)
    for method in ("filter-kruskal", "boruvka"):
        assert_same_forest(fast, MSF(tail, head, weight, n_nodes, maximize=maximize,
                                     method=method))
    took = small.small_forest(tail, head, weight, n_nodes, maximize)
    readable = tail.dtype in FAST_IDS and head.dtype == tail.dtype and \
        weight.dtype in FAST_WEIGHTS
    assert (took is not None) == readable
    if readable:
        assert fast.method == "kruskal"
    nn = fast.n_nodes
    assert set(fast.edges.tolist()) == scipy_forest(tail, head, weight, nn, maximize)
    if nn:
        k, ref = connected_components(coo_array((np.ones(m), (tail.astype(np.int64),
                                                               head.astype(np.int64))),
                                                shape=(nn, nn)), directed=False)
        assert fast.n_components == k
        assert len(set(zip(fast.labels.tolist(), ref.tolist()))) == k


def test_fifty_nodes_hand_checked_shapes():
    """The benchmark case (50 nodes, 120 edges): one tree or a forest, fields typed as
    documented, the total weight computed on demand."""
    tail, head, weight = _graph(7, 120, 50, np.int64, np.float64)
    f = MSF(tail, head, weight)
    assert f.method == "kruskal" and len(f) == 50 - f.n_components
    assert f.weight == pytest.approx(float(np.sum(weight[f.edges])), rel=1e-12)
    assert f.provenance == {"function": "minimum_spanning_forest"}
    assert f.required.tolist() == [] and f.required_excess == 0.0


@pytest.mark.parametrize("dtype", [np.int32, np.int64])
def test_small_route_checks_like_the_general_route(dtype):
    """Every check is still made on the one-pass route: NaN weights, negative ids, ids beyond
    n_nodes, lengths that differ, 2-D input, bad n_nodes/threads/method/maximize -- each with
    the general route's error and message."""
    t = np.array([0, 1, 2], dtype=dtype)
    h = np.array([1, 2, 3], dtype=dtype)
    w = np.array([1.0, 2.0, 3.0])
    cases = [
        ((t, h, np.array([1.0, np.nan, 3.0])), {}, ValueError, r"weight\[1\] is NaN"),
        ((t, h, np.array([1.0, 2.0, np.nan], np.float32)), {}, ValueError, r"weight\[2\] is NaN"),
        ((np.array([0, -1, 2], dtype), h, w), {}, ValueError, r"tail\[1\] = -1 is negative"),
        ((t, h, w, 3), {}, ValueError, r"head\[2\] = 3 is out of range"),
        ((t, h[:2], w), {}, ValueError, r"lengths 3, 2 and 3"),
        ((t.reshape(3, 1), h, w), {}, ValueError, r"tail must be 1-D"),
        ((t, h, w, -1), {}, ValueError, r"n_nodes must be >= 0"),
        ((t, h, w, 2.0), {}, TypeError, r"n_nodes must be an integer"),
        ((t, h, w), {"threads": 2**40}, ValueError, r"threads=1099511627776"),
        ((t, h, w), {"threads": 1.5}, TypeError, r"threads must be an integer"),
        ((t, h, w), {"method": "prim"}, ValueError, r"unknown method 'prim'"),
        ((t, h, w), {"maximize": 1}, TypeError, r"maximize must be True or False"),
        ((t, h, w), {"presorted": True, "maximize": True}, ValueError, r"presorted=True"),
        ((t, h, np.array([True, False, True])), {}, TypeError, r"weight has dtype bool"),
    ]
    for args, kwargs, exc, match in cases:
        with pytest.raises(exc, match=match):
            MSF(*args, **kwargs)


def test_input_untouched_and_awkward_layouts():
    """Inputs are never written (read-only arrays work); strided, byte-swapped and subclassed
    arrays take the general route and give the same forest; the result owns its arrays."""
    tail, head, weight = _graph(3, 300, 80, np.int64, np.float64)
    copies = [a.copy() for a in (tail, head, weight)]
    for a in (tail, head, weight):
        a.flags.writeable = False
    ref = MSF(tail, head, weight)
    for a, c in zip((tail, head, weight), copies):
        assert np.array_equal(a, c)
    assert_same_forest(ref, MSF(tail, head, weight, method="boruvka"))
    strided = [np.repeat(a, 2)[::2] for a in (tail, head, weight)]
    swapped = [a.astype(a.dtype.newbyteorder(">")) for a in (tail, head, weight)]
    assert small.small_forest(*strided, None, False) is None
    assert small.small_forest(*swapped, None, False) is None
    for args in (strided, swapped):
        f = MSF(*args)
        assert np.array_equal(f.edges, ref.edges) and np.array_equal(f.labels, ref.labels)
    f = MSF(tail.view(np.ndarray), head, weight)
    assert f.edges.base is None or f.edges.base is not tail
    assert all(x.flags.writeable for x in (ref.edges, ref.labels, ref.tail, ref.weights))


def test_limits_and_n_nodes_beyond_the_small_route():
    """Beyond MAX_EDGES edges or MAX_NODES nodes the general route runs (same answer); an
    n_nodes larger than the ids gives isolated nodes either way."""
    tail, head, weight = _graph(5, small.MAX_EDGES + 1, 500, np.int32, np.float32)
    assert small.small_forest(tail, head, weight, None, False) is None
    assert MSF(tail, head, weight).method == "filter-kruskal"
    t, h, w = tail[:100], head[:100], weight[:100]
    assert small.small_forest(t, h, w, small.MAX_NODES + 1, False) is None
    big = MSF(t, h, w, small.MAX_NODES + 1)
    fast = MSF(t, h, w, small.MAX_NODES)
    assert np.array_equal(big.edges, fast.edges)
    assert big.n_components == fast.n_components + 1
    assert fast.method == "kruskal"


def test_threads_do_not_change_the_small_route():
    """Every thread count gives the identical forest (the one-pass route is serial)."""
    tail, head, weight = _graph(11, 500, 120, np.int64, np.float64)
    ref = MSF(tail, head, weight, threads=1)
    for threads in (None, 0, -3, 2, 64):
        assert_same_forest(ref, MSF(tail, head, weight, threads=threads))


@pytest.mark.parametrize("m", [1, 2, 17, 120, 1000, 2000, small.MAX_EDGES])
@pytest.mark.parametrize("weight_dtype", WEIGHT_DTYPES[:6])
@pytest.mark.parametrize("id_dtype", [np.int32, np.int64])
def test_small_route_at_every_size_up_to_the_limit(m, weight_dtype, id_dtype):
    """Fixed sizes up to MAX_EDGES (hypothesis may draw few large ones): the one-pass route
    runs and equals the general route and SciPy, minimum and maximum forests."""
    tail, head, weight = _graph(m, m, max(2, m // 3), id_dtype, weight_dtype)
    assert small.small_forest(tail, head, weight, None, False) is not None
    for maximize in (False, True):
        fast = MSF(tail, head, weight, maximize=maximize)
        assert fast.method == "kruskal"
        assert_same_forest(fast, MSF(tail, head, weight, maximize=maximize,
                                     method="filter-kruskal"))
        assert set(fast.edges.tolist()) == scipy_forest(tail, head, weight, fast.n_nodes,
                                                        maximize)


def test_small_route_from_many_threads_at_once():
    """The one-pass kernel releases the GIL and keeps no state between calls: eight Python
    threads solving different graphs at once get the results of serial calls."""
    from concurrent.futures import ThreadPoolExecutor
    graphs = [_graph(s, 300 + 50 * s, 100, np.int64, np.float64) for s in range(8)]
    serial = [MSF(*g) for g in graphs]
    with ThreadPoolExecutor(8) as pool:
        for _ in range(5):
            for got, want in zip(pool.map(lambda g: MSF(*g), graphs), serial):
                assert_same_forest(got, want)
