"""Compiled kernels of the walks over a rooted spanning forest and CSR adjacency, for the
network-design tools.  The method notes (sides beyond each tree edge; the light shallow walk
of Khuller, Raghavachari and Young, 1995) are in ``treewalk.py``, which holds the public
functions: it checks the inputs, including every value range, allocates the arrays and
assembles the results.

Every ``def`` here is thin: it takes the arrays already allocated, checks that their lengths
protect memory, releases the GIL and runs a private ``noexcept nogil`` kernel.  The defs take
positional arguments only (no keyword parsing to compile).  Value ranges (node ids, parents,
depths) are the caller's to check, as ``treewalk.py`` does.  The defs: ``sides_beyond``,
``light_shallow_walk``, ``tree_distances``, ``adjacency``, ``parent_links``.

The covering kernels of backup links are in ``halves``, the first covering links of
single-link failures in ``replacements``.  Inputs are int64 (node ids, parents, CSR offsets)
and float64 (lengths, distances).
"""
from libc.math cimport INFINITY
from libc.stdint cimport int64_t

from fastmst._kernels.csr cimport pair_offsets, shift_back


cdef void _sides_beyond(const int64_t[::1] pnode, const int64_t[::1] depth, int64_t root,
                        int64_t[::1] start, int64_t[::1] order, int64_t[::1] size,
                        int64_t[::1] top, int64_t[::1] beyond) noexcept nogil:
    cdef int64_t n = pnode.shape[0]
    cdef int64_t i, v, dmax = 0, p, whole
    for i in range(n):
        if depth[i] > dmax:
            dmax = depth[i]
    for i in range(dmax + 2):
        start[i] = 0
    for i in range(n):
        start[depth[i] + 1] += 1
    for i in range(dmax + 1):
        start[i + 1] += start[i]
    for i in range(n):
        order[start[depth[i]]] = i
        start[depth[i]] += 1
    for i in range(n):
        size[i] = 1
    for i in range(n - 1, -1, -1):          # deepest first
        v = order[i]
        if pnode[v] >= 0:
            size[pnode[v]] += size[v]
    for i in range(n):                      # shallowest first: tree tops known before children
        v = order[i]
        top[v] = v if pnode[v] < 0 else top[pnode[v]]
    for i in range(n):
        beyond[i] = size[i] if pnode[i] >= 0 else 0
    if root >= 0:
        whole = size[top[root]]
        v = root
        while pnode[v] >= 0:                # the edges on the root's path to its tree's top
            beyond[v] = whole - size[v]
            v = pnode[v]


def sides_beyond(const int64_t[::1] pnode, const int64_t[::1] depth, int64_t root,
                 int64_t[::1] start, int64_t[::1] order, int64_t[::1] size, int64_t[::1] top,
                 int64_t[::1] beyond, /):
    """Fill ``beyond``, ``top`` and ``size`` (>= n entries each, n = len(pnode)); depths must
    lie in [0, len(start) - 2], ``order`` is a work array of >= n entries."""
    cdef Py_ssize_t n = pnode.shape[0]
    if depth.shape[0] != n or root < -1 or root >= n:
        raise ValueError("sides_beyond: pnode and depth must have one length, root in [-1, n).")
    if start.shape[0] < 2 or order.shape[0] < n or size.shape[0] < n or top.shape[0] < n or \
            beyond.shape[0] < n:
        raise ValueError("sides_beyond: start, order, size, top or beyond is too short.")
    with nogil:
        _sides_beyond(pnode, depth, root, start, order, size, top, beyond)


cdef void _light_shallow_walk(const int64_t[::1] indptr, const int64_t[::1] adj,
                              const double[::1] adjw, const int64_t[::1] adjpos, int64_t root,
                              const double[::1] dist, const int64_t[::1] spt_parent,
                              const int64_t[::1] spt_pos, double alpha,
                              double[::1] d, int64_t[::1] parent, int64_t[::1] ppos,
                              int64_t[::1] tparent, int64_t[::1] stack,
                              int64_t[::1] cursor) noexcept nogil:
    cdef int64_t n = d.shape[0]
    cdef int64_t i, u, v, k, x, top = 0
    cdef double w
    for i in range(n):
        d[i] = INFINITY
        parent[i] = -1
        ppos[i] = -1
        tparent[i] = -1
    d[root] = 0.0
    stack[0] = root
    cursor[root] = indptr[root]
    tparent[root] = root
    top = 1
    while top > 0:
        u = stack[top - 1]
        if cursor[u] == indptr[u] and d[u] > alpha * dist[u]:
            # first visit, too far: graft the shortest path (every node on it gets its
            # shortest-path distance; stop at the first that has it already)
            x = u
            while d[x] > dist[x]:
                d[x] = dist[x]
                parent[x] = spt_parent[x]
                ppos[x] = spt_pos[x]
                x = spt_parent[x]
        k = cursor[u]
        if k < indptr[u + 1]:
            cursor[u] = k + 1
            v = adj[k]
            if v == tparent[u]:
                continue
            w = adjw[k]
            if d[u] + w < d[v]:
                d[v] = d[u] + w
                parent[v] = u
                ppos[v] = adjpos[k]
            tparent[v] = u
            cursor[v] = indptr[v]
            stack[top] = v
            top += 1
        else:
            top -= 1
            v = tparent[u]
            if top > 0:
                k = cursor[v] - 1           # the tree edge (v, u) just walked down
                w = adjw[k]
                if d[u] + w < d[v]:
                    d[v] = d[u] + w
                    parent[v] = u
                    ppos[v] = adjpos[k]


def light_shallow_walk(const int64_t[::1] indptr, const int64_t[::1] adj,
                       const double[::1] adjw, const int64_t[::1] adjpos, int64_t root,
                       const double[::1] dist, const int64_t[::1] spt_parent,
                       const int64_t[::1] spt_pos, double alpha, double[::1] d,
                       int64_t[::1] parent, int64_t[::1] ppos, int64_t[::1] tparent,
                       int64_t[::1] stack, int64_t[::1] cursor, /):
    """Fill ``d``, ``parent`` and ``ppos`` (n = len(d) entries, n = len(dist)); ``tparent``,
    ``stack`` and ``cursor`` are work arrays of >= n entries."""
    cdef Py_ssize_t n = dist.shape[0]
    if indptr.shape[0] != n + 1 or spt_parent.shape[0] != n or spt_pos.shape[0] != n or \
            root < 0 or root >= n:
        raise ValueError("light_shallow_walk: indptr needs n + 1 entries, spt_parent and "
                         "spt_pos n, root in [0, n).")
    if adj.shape[0] != adjw.shape[0] or adj.shape[0] != adjpos.shape[0] or \
            adj.shape[0] < indptr[n]:
        raise ValueError("light_shallow_walk: adj, adjw and adjpos must have one length, at "
                         "least indptr[-1].")
    if d.shape[0] != n or parent.shape[0] < n or ppos.shape[0] < n or tparent.shape[0] < n or \
            stack.shape[0] < n or cursor.shape[0] < n:
        raise ValueError("light_shallow_walk: d needs n entries, parent, ppos, tparent, stack "
                         "and cursor at least n.")
    with nogil:
        _light_shallow_walk(indptr, adj, adjw, adjpos, root, dist, spt_parent, spt_pos, alpha,
                            d, parent, ppos, tparent, stack, cursor)


cdef void _tree_distances(const int64_t[::1] parent, const double[::1] pw, int64_t root,
                          int64_t[::1] start, int64_t[::1] child, int64_t[::1] queue,
                          double[::1] dist) noexcept nogil:
    cdef int64_t n = parent.shape[0]
    cdef int64_t i, v, k, head_q = 0, tail_q = 1
    for i in range(n + 1):
        start[i] = 0
    for i in range(n):
        dist[i] = INFINITY
        if parent[i] >= 0:
            start[parent[i] + 1] += 1
    for i in range(n):
        start[i + 1] += start[i]
    for i in range(n):
        if parent[i] >= 0:
            child[start[parent[i]]] = i
            start[parent[i]] += 1
    for i in range(n, 0, -1):
        start[i] = start[i - 1]
    start[0] = 0
    dist[root] = 0.0
    queue[0] = root
    while head_q < tail_q:
        v = queue[head_q]
        head_q += 1
        for k in range(start[v], start[v + 1]):
            i = child[k]
            dist[i] = dist[v] + pw[i]
            queue[tail_q] = i
            tail_q += 1


def tree_distances(const int64_t[::1] parent, const double[::1] pw, int64_t root,
                   int64_t[::1] start, int64_t[::1] child, int64_t[::1] queue,
                   double[::1] dist, /):
    """Fill ``dist`` (>= n entries, n = len(parent)); parents must be -1 or nodes; ``start``
    (>= n + 1 entries), ``child`` and ``queue`` (>= n) are work arrays."""
    cdef Py_ssize_t n = parent.shape[0]
    if pw.shape[0] != n or root < 0 or root >= n:
        raise ValueError("tree_distances: parent and pw must have one length, root in [0, n).")
    if start.shape[0] < n + 1 or child.shape[0] < n or queue.shape[0] < n or dist.shape[0] < n:
        raise ValueError("tree_distances: start, child, queue or dist is too short.")
    with nogil:
        _tree_distances(parent, pw, root, start, child, queue, dist)


cdef void _adjacency(const int64_t[::1] a, const int64_t[::1] b, int64_t[::1] indptr,
                     int64_t[::1] nbr, int64_t[::1] link) noexcept nogil:
    cdef int64_t n = indptr.shape[0] - 1
    cdef int64_t m = a.shape[0]
    cdef int64_t i, k
    pair_offsets(a, b, indptr)
    for i in range(m):                      # slots in link order within every node
        k = indptr[a[i]]
        nbr[k] = b[i]
        link[k] = i
        indptr[a[i]] += 1
        k = indptr[b[i]]
        nbr[k] = a[i]
        link[k] = i
        indptr[b[i]] += 1
    shift_back(indptr)


def adjacency(const int64_t[::1] a, const int64_t[::1] b, int64_t[::1] indptr,
              int64_t[::1] nbr, int64_t[::1] link, /):
    """Fill ``indptr`` (n_nodes + 1 entries), ``nbr`` and ``link`` (>= 2 m entries) from the m
    links (a, b), ids in [0, n_nodes)."""
    cdef Py_ssize_t m = a.shape[0]
    if b.shape[0] != m or indptr.shape[0] < 1 or nbr.shape[0] < 2 * m or link.shape[0] < 2 * m:
        raise ValueError("adjacency: a and b must have one length m, nbr and link >= 2 m, "
                         "indptr >= 1.")
    with nogil:
        _adjacency(a, b, indptr, nbr, link)


cdef void _parent_links(const int64_t[::1] indptr, const int64_t[::1] nbr,
                        const int64_t[::1] link, const double[::1] w,
                        const int64_t[::1] pred, int64_t[::1] out) noexcept nogil:
    cdef int64_t n = pred.shape[0]
    cdef int64_t v, k, best, l
    for v in range(n):
        best = -1
        if pred[v] >= 0:
            for k in range(indptr[v], indptr[v + 1]):
                if nbr[k] == pred[v]:
                    l = link[k]
                    if best < 0 or w[l] < w[best] or (w[l] == w[best] and l < best):
                        best = l
        out[v] = best


def parent_links(const int64_t[::1] indptr, const int64_t[::1] nbr, const int64_t[::1] link,
                 const double[::1] w, const int64_t[::1] pred, int64_t[::1] out, /):
    """Fill ``out`` (>= n entries, n = len(pred)) with every node's lightest link to its parent;
    parents must be -1 or nodes, links in [0, len(w))."""
    cdef Py_ssize_t n = pred.shape[0]
    if indptr.shape[0] != n + 1 or nbr.shape[0] != link.shape[0] or \
            nbr.shape[0] < indptr[n] or w.shape[0] * 2 != nbr.shape[0] or out.shape[0] < n:
        raise ValueError("parent_links: the adjacency does not match pred and w.")
    with nogil:
        _parent_links(indptr, nbr, link, w, pred, out)
