"""Kruskal's algorithm over a given edge order."""
import numpy as np
cimport numpy as cnp
from libc.stdint cimport int32_t, int64_t, uint8_t

from fastmst._typedefs cimport index_t
from fastmst._dsu cimport dsu_find, dsu_link, dsu_union

cnp.import_array()


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
