"""Exact dense Prim over points: O(n^2) time, O(n) memory, distances computed on the fly.

Every candidate edge is ordered by (length, smaller index, larger index), a total order, so the
tree Prim grows is the unique minimum spanning tree under that order.  Each step scans the points
not yet in the tree in blocks (``prange`` over blocks when OpenMP is available): a block updates
each point's best link to the tree with the newest tree point and reports its own best point; the
blocks' winners are then compared serially, so the answer does not depend on the thread count.
"""
import numpy as np
from cython.parallel cimport prange
from libc.math cimport sqrt, fabs, pow, INFINITY
from libc.stdint cimport int64_t, uint8_t


# Metric codes of the native kernel (points.py maps names to these).
METRIC_CODES = {"euclidean": 0, "sqeuclidean": 1, "cityblock": 2, "chebyshev": 3,
                "minkowski": 4}

#: Default points per block of the scan (``dense_prim(block=...)``): a block's coordinates and
#: best links stay in cache while it is relaxed.
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


cdef inline bint _slot_better(Py_ssize_t k, Py_ssize_t j, const int64_t* ids, const double* bd,
                              const int64_t* bu) noexcept nogil:
    """Is slot k's best link to the tree smaller than slot j's under the tie rule?"""
    cdef int64_t vk = ids[k], vj = ids[j], uk = bu[k], uj = bu[j]
    if uk < 0:
        return False
    if uj < 0:
        return True
    return _less(bd[k], min(uk, vk), max(uk, vk), bd[j], min(uj, vj), max(uj, vj))


cdef void _scan_block(const double* xu, int64_t u, Py_ssize_t d, int metric, double p,
                      const double* Xs, const int64_t* ids, double* bd, double* thr,
                      int64_t* bu, Py_ssize_t lo, Py_ssize_t hi, int64_t* blk_pos,
                      uint8_t* blk_nan, Py_ssize_t b) noexcept nogil:
    """Relax slots lo..hi-1 with the new tree point u; OUT: blk_pos[b], the block's best slot.

    For euclidean, the square root is skipped when the squared distance already exceeds
    ``thr`` (the square of the slot's best length, widened by 1e-15): the rounded root would
    then be strictly longer, so the comparison result is the same.
    """
    cdef Py_ssize_t k, j, pos = -1
    cdef int64_t v, cur
    cdef double dist, s, t
    cdef const double* y
    for k in range(lo, hi):
        v = ids[k]
        cur = bu[k]
        y = Xs + k * d
        if metric == 0:
            s = 0.0
            for j in range(d):
                t = xu[j] - y[j]
                s += t * t
            if cur >= 0 and s > thr[k]:
                dist = -1.0
            else:
                dist = sqrt(s)
        else:
            dist = _dist(xu, y, d, metric, p)
        if dist != dist:
            blk_nan[b] = 1
            continue
        if dist >= 0.0 and (cur < 0 or _less(dist, min(u, v), max(u, v),
                                             bd[k], min(cur, v), max(cur, v))):
            bd[k] = dist
            bu[k] = u
            thr[k] = dist * dist * (1.0 + 1e-15)
        if pos < 0 or _slot_better(k, pos, ids, bd, bu):
            pos = k
    blk_pos[b] = pos


cdef int _prim(double[:, ::1] Xs, int metric, double p, int n_threads, Py_ssize_t block,
               int64_t[::1] ids, double[::1] bd, double[::1] thr, int64_t[::1] bu,
               double[::1] xu, int64_t[::1] added, int64_t[::1] out_u, double[::1] out_d,
               int64_t[::1] blk_pos, uint8_t[::1] blk_nan, Py_ssize_t par_min) noexcept nogil:
    """Grow the tree from point 0 (steps with fewer than par_min points left run serially).

    The points outside the tree live in "slots" 0..n_rest-1: their coordinates (Xs, a copy),
    ids, best length bd, its threshold thr and tree neighbour bu.  A point joining the tree
    frees its slot, which the last slot fills, so every scan streams through memory.
    OUT: added (points in the order they joined), out_u/out_d (their tree neighbour and edge
    length).  Returns 1 when a distance was NaN, else 0.
    """
    cdef Py_ssize_t n = Xs.shape[0] + 1, d = Xs.shape[1], n_rest = n - 1, step, nb, b, k
    cdef Py_ssize_t pos, last, j
    cdef int64_t u = 0
    cdef double* xs = &Xs[0, 0]
    for step in range(n - 1):
        nb = (n_rest + block - 1) // block
        if n_threads > 1 and nb > 1 and n_rest >= par_min:
            for b in prange(nb, num_threads=n_threads, schedule="static"):
                _scan_block(&xu[0], u, d, metric, p, xs, &ids[0], &bd[0], &thr[0], &bu[0],
                            b * block, min((b + 1) * block, n_rest), &blk_pos[0], &blk_nan[0],
                            b)
        else:
            for b in range(nb):
                _scan_block(&xu[0], u, d, metric, p, xs, &ids[0], &bd[0], &thr[0], &bu[0],
                            b * block, min((b + 1) * block, n_rest), &blk_pos[0], &blk_nan[0],
                            b)
        pos = -1
        for b in range(nb):
            if blk_nan[b]:
                return 1
            k = blk_pos[b]
            if k >= 0 and (pos < 0 or _slot_better(k, pos, &ids[0], &bd[0], &bu[0])):
                pos = k
        u = ids[pos]
        added[step] = u
        out_u[step] = bu[pos]
        out_d[step] = bd[pos]
        last = n_rest - 1
        for j in range(d):
            xu[j] = Xs[pos, j]
            Xs[pos, j] = Xs[last, j]
        ids[pos] = ids[last]
        bd[pos] = bd[last]
        thr[pos] = thr[last]
        bu[pos] = bu[last]
        n_rest -= 1
    return 0


def dense_prim(const double[:, ::1] X, int metric, double p=2.0, int n_threads=1,
               Py_ssize_t block=DEF_BLOCK, Py_ssize_t par_min=16384):
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
    par_min : int
        Steps with fewer points left than this scan serially (a parallel step costs one
        fork/join, worth it only for long scans).

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
    Xs_arr = np.array(X[1:], dtype=np.float64, order="C")      # slots: every point but 0
    ids = np.arange(1, n, dtype=np.int64)
    bd = np.full(n - 1, INFINITY, dtype=np.float64)
    thr = np.full(n - 1, INFINITY, dtype=np.float64)
    bu = np.full(n - 1, -1, dtype=np.int64)
    xu = np.array(X[0], dtype=np.float64)
    added = np.empty(n - 1, dtype=np.int64)
    out_u = np.empty(n - 1, dtype=np.int64)
    out_d = np.empty(n - 1, dtype=np.float64)
    nb = (n + block - 1) // block
    blk_pos = np.empty(nb, dtype=np.int64)
    blk_nan = np.zeros(nb, dtype=np.uint8)
    cdef double[:, ::1] Xs_v = Xs_arr
    cdef int64_t[::1] ids_v = ids, bu_v = bu, added_v = added, out_u_v = out_u
    cdef int64_t[::1] blk_pos_v = blk_pos
    cdef double[::1] bd_v = bd, thr_v = thr, xu_v = xu, out_d_v = out_d
    cdef uint8_t[::1] blk_nan_v = blk_nan
    cdef int bad
    with nogil:
        bad = _prim(Xs_v, metric, p, max(1, n_threads), block, ids_v, bd_v, thr_v, bu_v, xu_v,
                    added_v, out_u_v, out_d_v, blk_pos_v, blk_nan_v, par_min)
    if bad:
        raise ValueError("dense_prim: a distance evaluated to NaN; every pair of points needs a "
                         "comparable distance.")
    return np.minimum(out_u, added), np.maximum(out_u, added), out_d
