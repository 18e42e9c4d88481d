"""Kernels of the Steiner tree heuristic: Voronoi regions, path expansion, leaf pruning.

The graph arrives as a CSR adjacency of arcs (each undirected edge twice) with float64 lengths.
This compiled module keeps the kernels and their thin typed defs (``voronoi_regions``,
``mark_path_edges``, ``prune_forest``); ``steiner.py`` beside it (``voronoi``, ``mark_paths``,
``prune_leaves``) allocates the arrays and documents the results.
"""
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


def voronoi_regions(const int64_t[::1] indptr, const int64_t[::1] nbr, const double[::1] length,
                    const int64_t[::1] arc_edge, const int64_t[::1] sources, double[::1] dist,
                    int64_t[::1] region, int64_t[::1] pred_edge, int64_t[::1] pred_node,
                    uint8_t[::1] done, double[::1] hkey, int64_t[::1] hnode):
    """OUT: dist, region, pred_edge, pred_node (filled with inf, -1, -1, -1 on entry; ``done``
    zeros) of one multi-source Dijkstra from ``sources``.  SCRATCH: the heap hkey/hnode, of
    at least A + k + 1 entries (``steiner.voronoi`` allocates them and documents the rest)."""
    cdef Py_ssize_t n = indptr.shape[0] - 1, arcs = nbr.shape[0]
    if (n < 0 or length.shape[0] != arcs or arc_edge.shape[0] != arcs or dist.shape[0] != n
            or region.shape[0] != n or pred_edge.shape[0] != n or pred_node.shape[0] != n
            or done.shape[0] != n or hnode.shape[0] != hkey.shape[0]
            or hkey.shape[0] < arcs + sources.shape[0] + 1):
        raise ValueError("voronoi_regions: needs indptr of n + 1 entries, nbr, length and "
                         "arc_edge of one length A, dist, region, pred_edge, pred_node and done "
                         "of n, and a heap of at least A + len(sources) + 1; allocate them as "
                         "steiner.voronoi does.")
    with nogil:
        _voronoi(indptr, nbr, length, arc_edge, sources, dist, region, pred_edge, pred_node,
                 done, hkey, hnode)


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


def mark_path_edges(const int64_t[::1] starts, const int64_t[::1] pred_edge,
                    const int64_t[::1] pred_node, uint8_t[::1] node_seen,
                    uint8_t[::1] edge_mark):
    """OUT: ``edge_mark`` (zeros on entry), 1 on the edges of the paths from each start back to
    its source.  SCRATCH: ``node_seen``, zeros, one per node (``steiner.mark_paths``)."""
    if pred_node.shape[0] != pred_edge.shape[0] or node_seen.shape[0] != pred_edge.shape[0]:
        raise ValueError("mark_path_edges: pred_edge, pred_node and node_seen need one entry "
                         "per node; allocate them as steiner.mark_paths does.")
    with nogil:
        _mark_paths(starts, pred_edge, pred_node, node_seen, edge_mark)


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


def prune_forest(const int64_t[::1] indptr, const int64_t[::1] nbr, const int64_t[::1] arc_edge,
                 const uint8_t[::1] keep_node, int64_t[::1] degree, uint8_t[::1] edge_alive,
                 int64_t[::1] stack):
    """IN/OUT: ``degree`` (the node degrees), ``edge_alive`` (ones on entry; 0 for the pruned
    edges).  SCRATCH: ``stack``, at least one per node (``steiner.prune_leaves``).  Returns the
    number of edges removed."""
    cdef Py_ssize_t n = indptr.shape[0] - 1
    cdef Py_ssize_t removed
    if (n < 0 or keep_node.shape[0] != n or degree.shape[0] != n or stack.shape[0] < n
            or arc_edge.shape[0] != nbr.shape[0]):
        raise ValueError("prune_forest: needs indptr of n + 1 entries, keep_node, degree and "
                         "stack of n, and nbr and arc_edge of one length; allocate them as "
                         "steiner.prune_leaves does.")
    with nogil:
        removed = _prune(indptr, nbr, arc_edge, keep_node, degree, edge_alive, stack)
    return removed
