"""Exact dense Prim over points: O(n^2) time, O(n) memory, distances computed on the fly.

Every candidate edge is ordered by (length, smaller index, larger index), a total order, so the
tree Prim grows is the unique minimum spanning tree under that order.  Each step scans the points
not yet in the tree in blocks (``prange`` over blocks when OpenMP is available): a block updates
each point's best link to the tree with the newest tree point and reports its own best point; the
blocks' winners are then compared serially, so the answer does not depend on the thread count.
"""
import numpy as np
cimport numpy as cnp
from cython.parallel cimport prange
from libc.math cimport sqrt, fabs, pow, INFINITY
from libc.stdint cimport int64_t, uint8_t

cnp.import_array()

# Metric codes of the native kernel (points.py maps names to these).
METRIC_CODES = {"euclidean": 0, "sqeuclidean": 1, "cityblock": 2, "chebyshev": 3,
                "minkowski": 4}

DEF_BLOCK = 1024


cdef inline double _dist(const double* x, const double* y, Py_ssize_t d, int metric,
                         double p) noexcept nogil:
    cdef Py_ssize_t j
    cdef double s = 0.0, t
    if metric <= 1:
        for j in range(d):
            t = x[j] - y[j]
            s += t * t
        return sqrt(s) if metric == 0 else s
    if metric == 2:
        for j in range(d):
            s += fabs(x[j] - y[j])
        return s
    if metric == 3:
        for j in range(d):
            t = fabs(x[j] - y[j])
            if t > s:
                s = t
        return s
    for j in range(d):
        s += pow(fabs(x[j] - y[j]), p)
    return pow(s, 1.0 / p)


cdef inline bint _less(double d1, int64_t a1, int64_t b1,
                       double d2, int64_t a2, int64_t b2) noexcept nogil:
    """(d1, a1, b1) < (d2, a2, b2) lexicographically; a <= b are the pair's sorted ends."""
    if d1 != d2:
        return d1 < d2
    if a1 != a2:
        return a1 < a2
    return b1 < b2


cdef inline bint _better_point(int64_t v, int64_t w, const double* best_d,
                               const int64_t* best_u) noexcept nogil:
    """Is v's best link to the tree smaller than w's under the tie rule?"""
    cdef int64_t bv = best_u[v], bw = best_u[w]
    if bv < 0:
        return False
    if bw < 0:
        return True
    return _less(best_d[v], min(bv, v), max(bv, v), best_d[w], min(bw, w), max(bw, w))


cdef void _scan_block(const double[:, ::1] X, int metric, double p, int64_t u,
                      const int64_t* rest, Py_ssize_t lo, Py_ssize_t hi,
                      double* best_d, int64_t* best_u, int64_t* blk_pos,
                      uint8_t* blk_nan, Py_ssize_t b) noexcept nogil:
    """Relax rest[lo:hi] with the new tree point u; OUT: blk_pos[b], the block's best."""
    cdef Py_ssize_t k, d = X.shape[1], pos = -1
    cdef int64_t v, bu, a, c
    cdef double dist
    cdef const double* xu = &X[u, 0]
    for k in range(lo, hi):
        v = rest[k]
        dist = _dist(xu, &X[v, 0], d, metric, p)
        if dist != dist:
            blk_nan[b] = 1
            continue
        a = min(u, v)
        c = max(u, v)
        bu = best_u[v]
        if bu < 0 or _less(dist, a, c, best_d[v], min(bu, v), max(bu, v)):
            best_d[v] = dist
            best_u[v] = u
        if pos < 0 or _better_point(v, rest[pos], best_d, best_u):
            pos = k
    blk_pos[b] = pos


cdef int _prim(const double[:, ::1] X, int metric, double p, int n_threads, Py_ssize_t block,
               int64_t[::1] rest, double[::1] best_d, int64_t[::1] best_u,
               int64_t[::1] added, int64_t[::1] blk_pos, uint8_t[::1] blk_nan) noexcept nogil:
    """Grow the tree from point 0.

    SCRATCH: rest (points outside the tree, first n_rest valid), blk_pos, blk_nan.
    OUT: best_u[v]/best_d[v] (tree neighbour and length of v's tree edge), added (points in the
    order they joined).  Returns 1 when a distance was NaN, else 0.
    """
    cdef Py_ssize_t n = X.shape[0], n_rest = n - 1, step, nb, b, k, pos
    cdef int64_t u = 0, v
    for k in range(n_rest):
        rest[k] = k + 1
    for step in range(n - 1):
        nb = (n_rest + block - 1) // block
        if n_threads > 1 and nb > 1:
            for b in prange(nb, num_threads=n_threads, schedule="static"):
                _scan_block(X, metric, p, u, &rest[0], b * block, min((b + 1) * block, n_rest),
                            &best_d[0], &best_u[0], &blk_pos[0], &blk_nan[0], b)
        else:
            for b in range(nb):
                _scan_block(X, metric, p, u, &rest[0], b * block, min((b + 1) * block, n_rest),
                            &best_d[0], &best_u[0], &blk_pos[0], &blk_nan[0], b)
        pos = -1
        for b in range(nb):
            if blk_nan[b]:
                return 1
            k = blk_pos[b]
            if k >= 0 and (pos < 0 or _better_point(rest[k], rest[pos], &best_d[0], &best_u[0])):
                pos = k
        v = rest[pos]
        added[step] = v
        rest[pos] = rest[n_rest - 1]
        n_rest -= 1
        u = v
    return 0


def dense_prim(const double[:, ::1] X, int metric, double p=2.0, int n_threads=1,
               Py_ssize_t block=DEF_BLOCK):
    """Minimum spanning tree of the complete graph on the rows of X (native metrics).

    Parameters
    ----------
    X : ndarray of shape (n, d), dtype=float64, C-contiguous
    metric : int
        A code from ``METRIC_CODES``.
    p : float
        Exponent for minkowski.
    n_threads : int
    block : int
        Points per block of the parallel scan.

    Returns
    -------
    tail, head : ndarray of shape (n - 1,), dtype=int64
        Tree edges with tail < head, in the order Prim added them.
    length : ndarray of shape (n - 1,), dtype=float64
    """
    cdef Py_ssize_t n = X.shape[0]
    if metric < 0 or metric > 4:
        raise ValueError(f"dense_prim: unknown metric code {metric}.")
    if block < 1:
        raise ValueError(f"dense_prim: block must be >= 1, received {block}.")
    if n <= 1:
        e = np.empty(0, dtype=np.int64)
        return e, e.copy(), np.empty(0, dtype=np.float64)
    if X.shape[1] < 1:
        raise ValueError("dense_prim: points need at least one coordinate.")
    rest = np.empty(n, dtype=np.int64)
    best_d = np.full(n, INFINITY, dtype=np.float64)
    best_u = np.full(n, -1, dtype=np.int64)
    added = np.empty(n - 1, dtype=np.int64)
    nb = (n + block - 1) // block
    blk_pos = np.empty(nb, dtype=np.int64)
    blk_nan = np.zeros(nb, dtype=np.uint8)
    cdef int64_t[::1] rest_v = rest, best_u_v = best_u, added_v = added, blk_pos_v = blk_pos
    cdef double[::1] best_d_v = best_d
    cdef uint8_t[::1] blk_nan_v = blk_nan
    cdef int bad
    with nogil:
        bad = _prim(X, metric, p, max(1, n_threads), block, rest_v, best_d_v, best_u_v, added_v,
                    blk_pos_v, blk_nan_v)
    if bad:
        raise ValueError("dense_prim: a distance evaluated to NaN; every pair of points needs a "
                         "comparable distance.")
    other = best_u[added]
    tail = np.minimum(other, added)
    head = np.maximum(other, added)
    return tail, head, best_d[added]
