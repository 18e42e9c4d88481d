"""Small edge lists in one pass: checks, tie-rule sort, Kruskal scan and labels in one call.

For graphs of up to ``MAX_EDGES`` edges and ``MAX_NODES`` nodes the per-call overhead of the
general route (several validation passes, thread start-up, the streaming filter's buffers)
dominates the work.  ``small_forest`` does the same work in one C call: one pass reads the ids
and weights, checks every id and weight and builds the rule keys (``tie_rule.rank_key``, the
one key map); a stable merge sort orders the (key, position) records by the tie rule; a
Kruskal scan over the union-find of ``dsu.pxd`` accepts edges; ``label_first_appearance``
numbers the components.  The result is identical to every other method's.

It accepts only what it can read in place: exact ``numpy.ndarray`` objects, 1-D, C-contiguous,
native byte order, ids int32 or int64 (both arrays the same dtype), weights of a kernel dtype
(float32, float64, int32, int64, uint32, uint64), ``n_nodes`` None or a Python int.  For
anything else, and for any input it would have to reject (an id out of range, a NaN weight),
it returns None and the caller takes the general route, which validates again and words the
error.  So the checks the API promises are all made, and their messages live in one place
(``fastmst.validation``).

The nogil kernels take pointers from ``PyArray_DATA`` rather than typed memoryviews: here the
arrays are tiny and the call is the cost, and acquiring the eight memoryviews of a call
measured 1.3 us against 0.1 us for the pointers (on the project's machine), more than half of
the whole one-pass solve of a 120-edge graph.  The ``def`` checks dtype, layout and length
before any pointer is taken.
"""
import numpy as np
cimport numpy as cnp
from libc.stdint cimport int32_t, int64_t, uint8_t, uint32_t, uint64_t
from libc.stdlib cimport free, malloc

from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.dsu cimport dsu_find, dsu_link, label_first_appearance
from fastmst._kernels.tie_rule cimport KIND_FLOAT, KIND_SIGNED, KIND_UNSIGNED, rank_key, ukey_t

cnp.import_array()

#: Largest edge list the one-pass route takes: its two record buffers (16 bytes an edge each)
#: stay in cache; beyond about 5,000 edges the general route is as fast (bench/bench_calls.py).
MAX_EDGES = 1 << 12
#: Largest node count it takes (17 bytes of scratch per node).
MAX_NODES = 1 << 16

cdef struct Rec:
    uint64_t key
    int64_t pos


cdef inline bint _is_nan(ukey_t bits) noexcept nogil:
    if sizeof(ukey_t) == 4:
        return (bits & <ukey_t>0x7FFFFFFF) > <ukey_t>0x7F800000
    return (bits & <ukey_t>0x7FFFFFFFFFFFFFFF) > <ukey_t>0x7FF0000000000000


cdef Py_ssize_t _read(const index_t* tail, const index_t* head, const ukey_t* bits,
                      Py_ssize_t m, int kind, bint maximize, Py_ssize_t limit,
                      Rec* rec) noexcept nogil:
    """One pass over the edges.  OUT: ``rec[i]`` = (rule key, i).

    Returns the largest id, or -1 when there are no edges, or -2 when an id is negative, is
    ``>= limit`` (``limit >= 0``), or a weight is NaN: the caller then takes the general route.
    """
    cdef Py_ssize_t i, hi = -1
    cdef index_t u, v
    for i in range(m):
        u = tail[i]
        v = head[i]
        if u < 0 or v < 0:
            return -2
        if u > hi:
            hi = u
        if v > hi:
            hi = v
        if kind == KIND_FLOAT and _is_nan(bits[i]):
            return -2
        rec[i].key = rank_key(bits[i], kind, maximize)
        rec[i].pos = i
    if limit >= 0 and hi >= limit:
        return -2
    return hi


cdef Rec* _sort(Rec* a, Rec* b, Py_ssize_t m) noexcept nogil:
    """Stable sort of ``a[:m]`` by key (equal keys keep position order): insertion sort of runs
    of 16, then bottom-up merges between ``a`` and ``b``.  Returns the buffer that holds the
    result."""
    cdef Py_ssize_t i, j, lo, mid, hi, width, k
    cdef bint take
    cdef Rec x
    cdef Rec* src = a
    cdef Rec* dst = b
    cdef Rec* t
    lo = 0
    while lo < m:
        hi = lo + 16 if lo + 16 < m else m
        for i in range(lo + 1, hi):
            x = a[i]
            j = i - 1
            while j >= lo and a[j].key > x.key:
                a[j + 1] = a[j]
                j -= 1
            a[j + 1] = x
        lo += 16
    width = 16
    while width < m:
        lo = 0
        while lo < m:
            mid = lo + width if lo + width < m else m
            hi = lo + 2 * width if lo + 2 * width < m else m
            i = lo
            j = mid
            k = lo
            while i < mid and j < hi:
                if src[j].key < src[i].key:
                    dst[k] = src[j]
                    j += 1
                else:
                    dst[k] = src[i]
                    i += 1
                k += 1
            while i < mid:
                dst[k] = src[i]
                i += 1
                k += 1
            while j < hi:
                dst[k] = src[j]
                j += 1
                k += 1
            lo += 2 * width
        t = src
        src = dst
        dst = t
        width *= 2
    return src


cdef Py_ssize_t _solve(const index_t* tail, const index_t* head, Rec* rec, Rec* tmp,
                       Py_ssize_t m, Py_ssize_t n, int32_t* parent, uint8_t* rank,
                       int64_t* table, int64_t* accepted, int64_t* labels,
                       int64_t* n_components) noexcept nogil:
    """Sort, scan and label.  OUT: ``accepted[:F]`` (forest positions in rule order),
    ``labels[:n]`` (first-appearance component ids), ``n_components``.  Returns F.

    SCRATCH: ``parent`` and ``rank`` (n each), ``table`` (n), ``tmp`` (m records).
    """
    cdef Py_ssize_t i, count = 0
    cdef int32_t ru, rv
    cdef int64_t e
    cdef Rec* order = _sort(rec, tmp, m)
    for i in range(n):
        parent[i] = <int32_t>i
        rank[i] = 0
        table[i] = -1
    for i in range(m):
        if count == n - 1:
            break
        e = order[i].pos
        ru = dsu_find(parent, <int32_t>tail[e])
        rv = dsu_find(parent, <int32_t>head[e])
        if ru != rv:
            dsu_link(parent, rank, ru, rv)
            accepted[count] = e
            count += 1
    for i in range(n):
        parent[i] = dsu_find(parent, <int32_t>i)
    n_components[0] = label_first_appearance(<const int32_t*>parent, n, table, labels)
    return count


cdef void _gather(const index_t* tail, const index_t* head, const char* weight,
                  Py_ssize_t wsize, const int64_t* accepted, Py_ssize_t f, int64_t* edges,
                  index_t* ftail, index_t* fhead, char* fweight) noexcept nogil:
    """OUT: the forest's positions, endpoints and weights (weights copied byte for byte, so
    -0.0 keeps its sign)."""
    cdef Py_ssize_t i, b
    cdef int64_t e
    for i in range(f):
        e = accepted[i]
        edges[i] = e
        ftail[i] = tail[e]
        fhead[i] = head[e]
        for b in range(wsize):
            fweight[i * wsize + b] = weight[e * wsize + b]


cdef inline bint _readable(object x):
    """An exact ndarray, 1-D, C-contiguous, native byte order."""
    if type(x) is not np.ndarray:
        return False
    cdef cnp.ndarray a = <cnp.ndarray>x
    return (cnp.PyArray_NDIM(a) == 1 and cnp.PyArray_IS_C_CONTIGUOUS(a)
            and cnp.PyArray_ISNOTSWAPPED(a))


cdef tuple _run(cnp.ndarray tail, cnp.ndarray head, cnp.ndarray weight, Py_ssize_t limit,
                bint maximize, int kind, bint wide_ids):
    cdef Py_ssize_t m = cnp.PyArray_DIM(tail, 0)
    cdef Py_ssize_t wsize = cnp.PyArray_ITEMSIZE(weight)
    cdef Py_ssize_t hi, n, f = 0
    cdef int64_t k = 0
    cdef Rec* rec = <Rec*>malloc((2 * m + 1) * sizeof(Rec))
    if rec == NULL:
        raise MemoryError()
    cdef void* tp = cnp.PyArray_DATA(tail)
    cdef void* hp = cnp.PyArray_DATA(head)
    cdef void* wp = cnp.PyArray_DATA(weight)
    with nogil:
        if wide_ids:
            if wsize == 4:
                hi = _read(<const int64_t*>tp, <const int64_t*>hp, <const uint32_t*>wp, m, kind,
                           maximize, limit, rec)
            else:
                hi = _read(<const int64_t*>tp, <const int64_t*>hp, <const uint64_t*>wp, m, kind,
                           maximize, limit, rec)
        else:
            if wsize == 4:
                hi = _read(<const int32_t*>tp, <const int32_t*>hp, <const uint32_t*>wp, m, kind,
                           maximize, limit, rec)
            else:
                hi = _read(<const int32_t*>tp, <const int32_t*>hp, <const uint64_t*>wp, m, kind,
                           maximize, limit, rec)
    n = limit if limit >= 0 else hi + 1
    if hi == -2 or n > MAX_NODES:
        free(rec)
        return None
    cdef size_t node_bytes = n * (sizeof(int32_t) + sizeof(uint8_t) + sizeof(int64_t))
    cdef char* scratch = <char*>malloc(node_bytes + (m + 1) * sizeof(int64_t))
    if scratch == NULL:
        free(rec)
        raise MemoryError()
    cdef int64_t* table = <int64_t*>scratch
    cdef int64_t* accepted = table + n
    cdef int32_t* parent = <int32_t*>(accepted + m + 1)
    cdef uint8_t* rank = <uint8_t*>(parent + n)
    cdef cnp.npy_intp n_dim = n
    labels = cnp.PyArray_EMPTY(1, &n_dim, cnp.NPY_INT64, 0)
    cdef int64_t* lp = <int64_t*>cnp.PyArray_DATA(labels)
    with nogil:
        if wide_ids:
            f = _solve(<const int64_t*>tp, <const int64_t*>hp, rec, rec + m, m, n, parent, rank,
                       table, accepted, lp, &k)
        else:
            f = _solve(<const int32_t*>tp, <const int32_t*>hp, rec, rec + m, m, n, parent, rank,
                       table, accepted, lp, &k)
    free(rec)
    cdef cnp.npy_intp dims = f
    edges = cnp.PyArray_EMPTY(1, &dims, cnp.NPY_INT64, 0)
    ftail = cnp.PyArray_EMPTY(1, &dims, cnp.PyArray_TYPE(tail), 0)
    fhead = cnp.PyArray_EMPTY(1, &dims, cnp.PyArray_TYPE(head), 0)
    fweight = cnp.PyArray_EMPTY(1, &dims, cnp.PyArray_TYPE(weight), 0)
    cdef int64_t* ep = <int64_t*>cnp.PyArray_DATA(edges)
    cdef void* ftp = cnp.PyArray_DATA(ftail)
    cdef void* fhp = cnp.PyArray_DATA(fhead)
    cdef char* fwp = <char*>cnp.PyArray_DATA(fweight)
    with nogil:
        if wide_ids:
            _gather(<const int64_t*>tp, <const int64_t*>hp, <const char*>wp, wsize, accepted, f,
                    ep, <int64_t*>ftp, <int64_t*>fhp, fwp)
        else:
            _gather(<const int32_t*>tp, <const int32_t*>hp, <const char*>wp, wsize, accepted, f,
                    ep, <int32_t*>ftp, <int32_t*>fhp, fwp)
    free(scratch)
    return edges, labels, k, n, m, ftail, fhead, fweight


def small_forest(tail, head, weight, n_nodes, bint maximize):
    """The optimal forest of a small edge list in one call, or None (take the general route).

    Parameters
    ----------
    tail, head : object
        Endpoints; used when both are 1-D C-contiguous native int32 arrays or both int64 ones.
    weight : object
        Weights; used when a 1-D C-contiguous native array of a kernel dtype.
    n_nodes : None or int
        Number of nodes; None means the largest id + 1.
    maximize : bool

    Returns
    -------
    None, when the input is not one the route reads in place, is larger than ``MAX_EDGES``
    edges or ``MAX_NODES`` nodes, or would be rejected (lengths differ, an id negative or out
    of range, a NaN weight, a negative ``n_nodes``); otherwise a tuple
    ``(edges, labels, n_components, n_nodes, n_edges, ftail, fhead, fweights)``: forest
    positions in rule order (int64), first-appearance component labels (int64), their number,
    the node and edge counts, and the forest's endpoints and weights in the input dtypes.
    """
    if not (_readable(tail) and _readable(head) and _readable(weight)):
        return None
    cdef cnp.ndarray t = <cnp.ndarray>tail
    cdef cnp.ndarray h = <cnp.ndarray>head
    cdef cnp.ndarray w = <cnp.ndarray>weight
    cdef Py_ssize_t m = cnp.PyArray_DIM(t, 0)
    if cnp.PyArray_DIM(h, 0) != m or cnp.PyArray_DIM(w, 0) != m or m > MAX_EDGES:
        return None
    cdef int ttype = cnp.PyArray_TYPE(t)
    if cnp.PyArray_TYPE(h) != ttype or not cnp.PyArray_ISSIGNED(t):
        return None
    cdef Py_ssize_t isize = cnp.PyArray_ITEMSIZE(t)
    if isize != 4 and isize != 8:
        return None
    cdef Py_ssize_t wsize = cnp.PyArray_ITEMSIZE(w)
    cdef int kind
    if wsize != 4 and wsize != 8:
        return None
    if cnp.PyArray_ISFLOAT(w):
        kind = KIND_FLOAT
    elif cnp.PyArray_ISSIGNED(w):
        kind = KIND_SIGNED
    elif cnp.PyArray_ISUNSIGNED(w):
        kind = KIND_UNSIGNED
    else:
        return None
    cdef Py_ssize_t limit = -1
    if n_nodes is not None:
        if type(n_nodes) is not int or not 0 <= n_nodes <= MAX_NODES:
            return None
        limit = n_nodes
    return _run(t, h, w, limit, maximize, kind, isize == 8)
