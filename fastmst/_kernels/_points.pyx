"""Exact dense Prim over points: O(n^2) time, O(n) memory, distances computed on the fly.

Every candidate edge is ordered by (length, smaller index, larger index), a total order, so the
tree Prim grows is the unique minimum spanning tree under that order.  Each step scans the points
not yet in the tree in blocks (``prange`` over blocks when OpenMP is available): a block updates
each point's best link to the tree with the newest tree point and reports its own best point; the
blocks' winners are then compared serially, so the answer does not depend on the thread count.

This compiled module keeps the kernel and ``prim``, its thin typed def; ``points.py`` beside it
(``dense_prim``, ``METRIC_CODES``, ``DEF_BLOCK``) checks the input and allocates the arrays.
"""
from cython.parallel cimport prange
from libc.math cimport sqrt, fabs, pow, INFINITY
from libc.stdint cimport int64_t, uint8_t


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


def prim(double[:, ::1] Xs, int metric, double p, int n_threads, Py_ssize_t block,
         int64_t[::1] ids, double[::1] bd, double[::1] thr, int64_t[::1] bu, double[::1] xu,
         int64_t[::1] added, int64_t[::1] out_u, double[::1] out_d, int64_t[::1] blk_pos,
         uint8_t[::1] blk_nan, Py_ssize_t par_min):
    """Grow the tree from point 0 over the other points' slots (``points.dense_prim`` sets up
    and documents the arrays; IN/OUT: all of them).  Returns 1 when a distance was NaN."""
    cdef Py_ssize_t m = Xs.shape[0]
    cdef int bad
    if metric < 0 or metric > 4 or block < 1 or n_threads < 1 or m < 1 or Xs.shape[1] < 1:
        raise ValueError(f"prim: needs a metric code 0..4, block >= 1, n_threads >= 1 and at "
                         f"least one slot of one coordinate, received {metric}, {block}, "
                         f"{n_threads}, shape ({m}, {Xs.shape[1]}).")
    if (ids.shape[0] != m or bd.shape[0] != m or thr.shape[0] != m or bu.shape[0] != m
            or added.shape[0] != m or out_u.shape[0] != m or out_d.shape[0] != m
            or xu.shape[0] != Xs.shape[1] or blk_pos.shape[0] < (m + block - 1) // block
            or blk_nan.shape[0] != blk_pos.shape[0]):
        raise ValueError("prim: the work arrays need one entry per slot (ids, bd, thr, bu, "
                         "added, out_u, out_d), per coordinate (xu) and per block (blk_pos, "
                         "blk_nan); allocate them as points.dense_prim does.")
    with nogil:
        bad = _prim(Xs, metric, p, n_threads, block, ids, bd, thr, bu, xu, added, out_u, out_d,
                    blk_pos, blk_nan, par_min)
    return bad
