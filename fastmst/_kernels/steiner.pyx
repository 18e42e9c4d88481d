"""Kernels of the Steiner tree heuristic: Voronoi regions, path expansion, leaf pruning.

The graph arrives as a CSR adjacency of arcs (each undirected edge twice) with float64 lengths.
"""
import numpy as np
from libc.math cimport INFINITY
from libc.stdint cimport int64_t, uint8_t


cdef inline bint _heap_less(const double* key, const int64_t* node, Py_ssize_t i,
                            Py_ssize_t j) noexcept nogil:
    return key[i] < key[j] or (key[i] == key[j] and node[i] < node[j])


cdef inline void _heap_swap(double* key, int64_t* node, Py_ssize_t i, Py_ssize_t j) noexcept nogil:
    cdef double tk = key[i]
    cdef int64_t tn = node[i]
    key[i] = key[j]
    node[i] = node[j]
    key[j] = tk
    node[j] = tn


cdef inline Py_ssize_t _heap_push(double* key, int64_t* node, Py_ssize_t size, double k,
                                  int64_t v) noexcept nogil:
    cdef Py_ssize_t i = size, parent
    key[i] = k
    node[i] = v
    while i > 0:
        parent = (i - 1) >> 1
        if not _heap_less(key, node, i, parent):
            break
        _heap_swap(key, node, i, parent)
        i = parent
    return size + 1


cdef inline Py_ssize_t _heap_pop(double* key, int64_t* node, Py_ssize_t size) noexcept nogil:
    """Remove the top (read it before calling); return the new size."""
    cdef Py_ssize_t i = 0, c, last = size - 1
    key[0] = key[last]
    node[0] = node[last]
    while True:
        c = 2 * i + 1
        if c >= last:
            break
        if c + 1 < last and _heap_less(key, node, c + 1, c):
            c += 1
        if not _heap_less(key, node, c, i):
            break
        _heap_swap(key, node, i, c)
        i = c
    return last


cdef void _voronoi(const int64_t[::1] indptr, const int64_t[::1] nbr, const double[::1] length,
                   const int64_t[::1] arc_edge, const int64_t[::1] sources,
                   double[::1] dist, int64_t[::1] region, int64_t[::1] pred_edge,
                   int64_t[::1] pred_node, uint8_t[::1] done,
                   double[::1] hkey, int64_t[::1] hnode) noexcept nogil:
    """Multi-source Dijkstra with a lazy binary heap ordered by (distance, node).

    OUT: dist, region (index into sources of the nearest source), pred_edge/pred_node (the edge
    and node a shortest path arrives by; -1 at sources and unreached nodes).
    """
    cdef Py_ssize_t size = 0, i, a
    cdef int64_t u, v, s
    cdef double du, nd
    for i in range(sources.shape[0]):
        s = sources[i]
        if dist[s] > 0.0 or region[s] < 0:
            dist[s] = 0.0
            region[s] = i
            size = _heap_push(&hkey[0], &hnode[0], size, 0.0, s)
    while size > 0:
        du = hkey[0]
        u = hnode[0]
        size = _heap_pop(&hkey[0], &hnode[0], size)
        if done[u] or du > dist[u]:
            continue
        done[u] = 1
        for a in range(indptr[u], indptr[u + 1]):
            v = nbr[a]
            if done[v]:
                continue
            nd = du + length[a]
            if nd < dist[v]:
                dist[v] = nd
                region[v] = region[u]
                pred_edge[v] = arc_edge[a]
                pred_node[v] = u
                size = _heap_push(&hkey[0], &hnode[0], size, nd, v)


def voronoi(const int64_t[::1] indptr, const int64_t[::1] nbr, const double[::1] length,
            const int64_t[::1] arc_edge, const int64_t[::1] sources):
    """Voronoi regions of ``sources`` by one multi-source Dijkstra.

    Parameters
    ----------
    indptr : ndarray of shape (n + 1,), dtype=int64
    nbr, arc_edge : ndarray of shape (A,), dtype=int64
        Arc heads and the input edge position of each arc.
    length : ndarray of shape (A,), dtype=float64, non-negative
    sources : ndarray of shape (k,), dtype=int64, distinct node ids

    Returns
    -------
    dist : ndarray of shape (n,), dtype=float64 (inf where unreached)
    region, pred_edge, pred_node : ndarray of shape (n,), dtype=int64 (-1 where none)
    """
    cdef Py_ssize_t n = indptr.shape[0] - 1
    dist = np.full(n, INFINITY, dtype=np.float64)
    region = np.full(n, -1, dtype=np.int64)
    pred_edge = np.full(n, -1, dtype=np.int64)
    pred_node = np.full(n, -1, dtype=np.int64)
    done = np.zeros(n, dtype=np.uint8)
    cap = nbr.shape[0] + sources.shape[0] + 1
    hkey = np.empty(cap, dtype=np.float64)
    hnode = np.empty(cap, dtype=np.int64)
    cdef double[::1] dist_v = dist, hkey_v = hkey
    cdef int64_t[::1] region_v = region, pe_v = pred_edge, pn_v = pred_node, hnode_v = hnode
    cdef uint8_t[::1] done_v = done
    with nogil:
        _voronoi(indptr, nbr, length, arc_edge, sources, dist_v, region_v, pe_v, pn_v,
                 done_v, hkey_v, hnode_v)
    return dist, region, pred_edge, pred_node


cdef void _mark_paths(const int64_t[::1] starts, const int64_t[::1] pred_edge,
                      const int64_t[::1] pred_node, uint8_t[::1] node_seen,
                      uint8_t[::1] edge_mark) noexcept nogil:
    cdef Py_ssize_t i
    cdef int64_t v
    for i in range(starts.shape[0]):
        v = starts[i]
        while v >= 0 and not node_seen[v]:
            node_seen[v] = 1
            if pred_edge[v] >= 0:
                edge_mark[pred_edge[v]] = 1
            v = pred_node[v]


def mark_paths(const int64_t[::1] starts, const int64_t[::1] pred_edge,
               const int64_t[::1] pred_node, Py_ssize_t n_edges):
    """Mark the edges of the shortest paths from each start node back to its source.

    Returns
    -------
    edge_mark : ndarray of shape (n_edges,), dtype=bool
    """
    node_seen = np.zeros(pred_edge.shape[0], dtype=np.uint8)
    edge_mark = np.zeros(n_edges, dtype=np.uint8)
    cdef uint8_t[::1] seen_v = node_seen, mark_v = edge_mark
    with nogil:
        _mark_paths(starts, pred_edge, pred_node, seen_v, mark_v)
    return edge_mark.view(np.bool_)


cdef Py_ssize_t _prune(const int64_t[::1] indptr, const int64_t[::1] nbr,
                       const int64_t[::1] arc_edge, const uint8_t[::1] keep_node,
                       int64_t[::1] degree, uint8_t[::1] edge_alive,
                       int64_t[::1] stack) noexcept nogil:
    cdef Py_ssize_t n = degree.shape[0], top = 0, a, removed = 0
    cdef int64_t v, e, w
    for v in range(n):
        if degree[v] == 1 and not keep_node[v]:
            stack[top] = v
            top += 1
    while top > 0:
        top -= 1
        v = stack[top]
        if degree[v] != 1:
            continue
        for a in range(indptr[v], indptr[v + 1]):
            e = arc_edge[a]
            if edge_alive[e]:
                edge_alive[e] = 0
                removed += 1
                degree[v] -= 1
                w = nbr[a]
                degree[w] -= 1
                if degree[w] == 1 and not keep_node[w]:
                    stack[top] = w
                    top += 1
                break
    return removed


def prune_leaves(const int64_t[::1] indptr, const int64_t[::1] nbr, const int64_t[::1] arc_edge,
                 const uint8_t[::1] keep_node, Py_ssize_t n_edges):
    """Repeatedly remove leaves not in ``keep_node`` from a forest given as a CSR adjacency.

    Returns
    -------
    edge_alive : ndarray of shape (n_edges,), dtype=bool
        True for the edges that remain (indexed by ``arc_edge`` values).
    """
    cdef Py_ssize_t n = indptr.shape[0] - 1
    degree = np.diff(np.asarray(indptr)).astype(np.int64)
    edge_alive = np.ones(n_edges, dtype=np.uint8)
    stack = np.empty(max(n, 1), dtype=np.int64)
    cdef int64_t[::1] degree_v = degree, stack_v = stack
    cdef uint8_t[::1] alive_v = edge_alive
    with nogil:
        _prune(indptr, nbr, arc_edge, keep_node, degree_v, alive_v, stack_v)
    return edge_alive.view(np.bool_)
