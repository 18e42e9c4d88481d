"""Compiled kernels of the plain Kruskal scans and forest sizes (the functions and their notes
are in ``scan.py``, which checks, allocates and assembles the results).  Each kernel sits
behind a thin ``def`` (``kruskal_scan``, ``count_merges``, ``count_touched``) that checks the
sizes that protect memory and releases the GIL.
"""
from cython.parallel cimport prange, threadid
from libc.stdint cimport int64_t, uint8_t, uint64_t

from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.dsu cimport dsu_find, dsu_link, dsu_union


cdef extern from *:
    """
    #if defined(__GNUC__) || defined(__clang__)
    #define FASTMST_POPCOUNT64(x) __builtin_popcountll(x)
    #else
    static inline int FASTMST_POPCOUNT64(unsigned long long x) {
        int c = 0; while (x) { x &= x - 1; c++; } return c;
    }
    #endif
    """
    int popcount64 "FASTMST_POPCOUNT64"(uint64_t x) noexcept nogil


cdef Py_ssize_t _kruskal_scan(const int64_t[::1] order, const index_t[::1] tail,
                              const index_t[::1] head, index_t[::1] parent, uint8_t[::1] rank,
                              Py_ssize_t target, int64_t[::1] out) noexcept nogil:
    """Accept edges in ``order`` that join two trees, until ``target`` are accepted (OUT: out)."""
    cdef Py_ssize_t i, count = 0
    cdef int64_t e
    cdef index_t ru, rv
    if target <= 0:
        return 0
    for i in range(order.shape[0]):
        e = order[i]
        ru = dsu_find(&parent[0], tail[e])
        rv = dsu_find(&parent[0], head[e])
        if ru != rv:
            dsu_link(&parent[0], &rank[0], ru, rv)
            out[count] = e
            count += 1
            if count == target:
                break
    return count


cdef Py_ssize_t _count_merges(const index_t[::1] tail, const index_t[::1] head,
                              index_t[::1] parent, uint8_t[::1] rank) noexcept nogil:
    cdef Py_ssize_t i, merges = 0
    for i in range(tail.shape[0]):
        merges += dsu_union(&parent[0], &rank[0], tail[i], head[i])
    return merges


cdef Py_ssize_t _count_touched(const index_t* tail, const index_t* head, Py_ssize_t m,
                               uint64_t* seen, Py_ssize_t nw, int threads) noexcept nogil:
    """Number of nodes that are an endpoint of some edge.

    The edges are cut into blocks that the threads take dynamically; each thread sets the bits
    of the endpoints of its blocks in its own row of ``seen`` (``threads`` zeroed rows of
    ``nw`` 64-bit words: one bit per node, small enough for the cache where a byte per node is
    not), so no word is written by two threads; the rows are then OR-ed and counted.  The count
    does not depend on the thread count or on who took which block.
    """
    cdef Py_ssize_t i, t, lo, hi, k = 0
    cdef Py_ssize_t nblk = 1 if threads <= 1 else 8 * threads
    cdef uint64_t* row
    cdef uint64_t v
    cdef index_t x
    for t in prange(nblk, num_threads=threads, schedule="dynamic"):
        lo = m * t // nblk
        hi = m * (t + 1) // nblk
        row = seen + threadid() * nw
        for i in range(lo, hi):
            x = tail[i]
            row[x >> 6] |= (<uint64_t>1) << (x & 63)
            x = head[i]
            row[x >> 6] |= (<uint64_t>1) << (x & 63)
    for i in range(nw):
        v = seen[i]
        for t in range(1, threads):
            v = v | seen[t * nw + i]
        k += popcount64(v)
    return k


# ------------------------------------------------------------------ the thin defs (callers: .py)

cdef int _check_union(Py_ssize_t n_tail, Py_ssize_t n_head, Py_ssize_t n_parent,
                      Py_ssize_t n_rank) except -1:
    if n_head != n_tail or n_rank != n_parent:
        raise ValueError(f"scan: tail and head, parent and rank must have one length each, "
                         f"received {n_tail}, {n_head}, {n_parent} and {n_rank}.")
    return 0


def kruskal_scan(const int64_t[::1] order, const index_t[::1] tail, const index_t[::1] head,
                 index_t[::1] parent, uint8_t[::1] rank, Py_ssize_t target, int64_t[::1] out):
    """Accept the edges of ``order`` that join two trees of the union-find (``parent``,
    ``rank``) until ``target`` are accepted (OUT: ``out``; at most its length).  Returns the
    number accepted.  Positions and ids in range are the caller's to ensure."""
    _check_union(tail.shape[0], head.shape[0], parent.shape[0], rank.shape[0])
    target = min(target, out.shape[0])
    if target <= 0 or parent.shape[0] == 0:
        return 0
    with nogil:
        target = _kruskal_scan(order, tail, head, parent, rank, target, out)
    return target


def count_merges(const index_t[::1] tail, const index_t[::1] head, index_t[::1] parent,
                 uint8_t[::1] rank):
    """Union every edge into the union-find (``parent``, ``rank``); returns the number of
    unions that joined two sets.  Ids in range are the caller's to ensure."""
    cdef Py_ssize_t merges = 0
    _check_union(tail.shape[0], head.shape[0], parent.shape[0], rank.shape[0])
    if parent.shape[0] > 0:
        with nogil:
            merges = _count_merges(tail, head, parent, rank)
    return merges


def count_touched(const index_t[::1] tail, const index_t[::1] head, uint64_t[::1] seen,
                  Py_ssize_t nw, int threads):
    """Number of nodes that are an endpoint of some edge (``_count_touched``).  SCRATCH:
    ``seen``, ``threads`` zeroed rows of ``nw`` words (ids below ``64 * nw``, the caller's
    to ensure)."""
    cdef Py_ssize_t m = tail.shape[0], k = 0
    if head.shape[0] != m or threads < 1 or nw < 0 or seen.shape[0] < threads * nw:
        raise ValueError(f"count_touched: {m} tails need {m} heads and {threads} >= 1 rows of "
                         f"{nw} words, received {head.shape[0]} and {seen.shape[0]} words.")
    if m > 0 and nw > 0:
        with nogil:
            k = _count_touched(&tail[0], &head[0], m, &seen[0], nw, threads)
    return k
