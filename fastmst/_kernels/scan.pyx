"""Plain Kruskal scans and forest sizes.

``kruskal`` scans a given edge order (the rule order; used beyond 2**32 - 1 edges, where the
radix records cannot hold positions); ``forest_size`` counts the forest edges by one union pass;
``forest_bound`` bounds them by one streaming pass, which lets the Kruskal kernels stop early.
"""
import numpy as np
from cython.parallel cimport prange, threadid
from libc.stdint cimport int32_t, int64_t, uint8_t, uint64_t

from fastmst._kernels._typedefs cimport check_edge_arrays, index_t
from fastmst._kernels.dsu cimport dsu_find, dsu_link, dsu_union
from fastmst._kernels import radix


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


def forest_size(const index_t[::1] tail, const index_t[::1] head, Py_ssize_t n_nodes):
    """Number of edges of a spanning forest (n_nodes - n_components), by one union pass.

    Returns
    -------
    n_forest_edges : int
    parent : ndarray of shape (n_nodes,)
        The union-find parents after the pass (the components of the graph).
    """
    check_edge_arrays(tail.shape[0], head.shape[0], -1, n_nodes, "forest_size")
    dtype = np.int32 if index_t is int32_t else np.int64
    parent = np.arange(n_nodes, dtype=dtype)
    rank = np.zeros(n_nodes, dtype=np.uint8)
    cdef index_t[::1] p = parent
    cdef uint8_t[::1] r = rank
    cdef Py_ssize_t merges = 0
    if n_nodes > 0:
        with nogil:
            merges = _count_merges(tail, head, p, r)
    return merges, parent


def kruskal(const int64_t[::1] order, const index_t[::1] tail, const index_t[::1] head,
            Py_ssize_t n_nodes, Py_ssize_t target):
    """Scan ``order`` and keep every edge that joins two trees; stop after ``target`` edges.

    Parameters
    ----------
    order : ndarray of shape (K,), dtype=int64
        Edge positions in the order of the tie rule (validated by the caller).
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Validated endpoint ids in [0, n_nodes).
    n_nodes : int
    target : int
        Number of forest edges (n_nodes - n_components) after which the scan stops.

    Returns
    -------
    edges : ndarray of shape (F,), dtype=int64
        Accepted positions, in acceptance order.
    parent : ndarray of shape (n_nodes,)
        Union-find parents of the final forest.
    """
    check_edge_arrays(tail.shape[0], head.shape[0], -1, n_nodes, "kruskal")
    dtype = np.int32 if index_t is int32_t else np.int64
    parent = np.arange(n_nodes, dtype=dtype)
    rank = np.zeros(n_nodes, dtype=np.uint8)
    cdef Py_ssize_t cap = max(0, min(target, order.shape[0]))
    out = np.empty(cap, dtype=np.int64)
    cdef index_t[::1] p = parent
    cdef uint8_t[::1] r = rank
    cdef int64_t[::1] o = out
    cdef Py_ssize_t count = 0
    if cap > 0:
        with nogil:
            count = _kruskal_scan(order, tail, head, p, r, cap, o)
    return out[:count], parent


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


def forest_bound(const index_t[::1] tail, const index_t[::1] head, Py_ssize_t n_nodes,
                 int threads=1):
    """An upper bound on the forest size that is exact when the non-isolated nodes are connected.

    ``(nodes with an edge) - 1``: lets Kruskal stop early on graphs with isolated nodes at the
    cost of one streaming pass (much cheaper than the union pass of ``forest_size``).
    ``threads`` split the pass (one more ``n_nodes / 8`` bytes of scratch per extra thread,
    and one thread per ``radix.MIN_EDGES_PER_THREAD`` edges at most); the result does not
    depend on it.
    """
    check_edge_arrays(tail.shape[0], head.shape[0], -1, n_nodes, "forest_bound")
    cdef Py_ssize_t m = tail.shape[0], k = 0
    if m == 0 or n_nodes == 0:
        return 0
    cdef int nt = max(1, min(threads, m // radix.MIN_EDGES_PER_THREAD + 1))
    cdef Py_ssize_t nw = (n_nodes + 63) // 64
    seen_a = np.zeros(nt * nw, dtype=np.uint64)
    cdef uint64_t[::1] seen = seen_a
    with nogil:
        k = _count_touched(&tail[0], &head[0], m, &seen[0], nw, nt)
    return max(0, k - 1)
