"""Walks over a rooted spanning forest and CSR adjacency, for the network-design tools
(``fastmst.design``).

``sides_beyond``
    For every tree edge (parent, child): the number of nodes on the side away from a chosen
    root (the child's subtree, or the rest of the tree when the root lies inside that
    subtree).  O(V): nodes bucketed by depth, subtree sizes summed deepest first.
``light_shallow_walk``
    The depth-first walk of Khuller, Raghavachari and Young, "Balancing minimum spanning trees
    and shortest-path trees", Algorithmica 14 (1995): walk round the minimum spanning tree
    relaxing its edges; where a node's current distance exceeds alpha times its shortest-path
    distance, graft its shortest path from the root.  O(V) after the two input trees.
``tree_distances``, ``adjacency``, ``parent_links``
    Distances from the root along the tree, links listed under both ends, the link to each
    node's shortest-path parent.

The covering kernels of backup links are in ``halves``, the first covering links of
single-link failures in ``replacements``.  Inputs are int64 (node ids, parents, CSR offsets)
and float64 (lengths, distances).
"""
import numpy as np
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


def sides_beyond(const int64_t[::1] pnode, const int64_t[::1] depth, Py_ssize_t root):
    """Nodes beyond every tree edge, seen from ``root``.

    Parameters
    ----------
    pnode, depth : ndarray of shape (n,), dtype=int64
        Parent (-1 at tree tops) and depth of every node (``paths.root_forest``).
    root : int
        A node, or -1: every edge is then seen from the top of its tree.

    Returns
    -------
    beyond : ndarray of shape (n,), dtype=int64
        For node ``v`` with a parent: the number of nodes on the far side of the edge
        (pnode[v], v) from ``root`` (from the tree's top in trees without ``root``); 0 at tops.
    top : ndarray of shape (n,), dtype=int64
        The top of every node's tree (a tree label).
    size : ndarray of shape (n,), dtype=int64
        Number of nodes in every node's subtree (its tree's size at tops).
    """
    cdef int64_t n = pnode.shape[0]
    if depth.shape[0] != n:
        raise ValueError(f"sides_beyond: pnode and depth must have one length, received {n} "
                         f"and {depth.shape[0]}.")
    if root < -1 or root >= n:
        raise ValueError(f"sides_beyond: root must be -1 or a node in [0, {n}), received {root}.")
    dmax = int(np.max(depth)) if n else 0
    if n and int(np.min(depth)) < 0:
        raise ValueError("sides_beyond: depths must be >= 0.")
    start = np.empty(dmax + 2, dtype=np.int64)
    order = np.empty(max(n, 1), dtype=np.int64)
    size = np.empty(max(n, 1), dtype=np.int64)
    top = np.empty(max(n, 1), dtype=np.int64)
    beyond = np.empty(max(n, 1), dtype=np.int64)
    cdef int64_t[::1] st = start, od = order, sz = size, tp = top, bd = beyond
    with nogil:
        _sides_beyond(pnode, depth, root, st, od, sz, tp, bd)
    return beyond[:n], top[:n], size[:n]


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
                       const double[::1] adjw, const int64_t[::1] adjpos, Py_ssize_t root,
                       const double[::1] dist, const int64_t[::1] spt_parent,
                       const int64_t[::1] spt_pos, double alpha):
    """The light approximate shortest-path tree walk (Khuller, Raghavachari and Young 1995).

    Parameters
    ----------
    indptr, adj, adjw, adjpos : ndarray
        The spanning tree of the root's component as CSR adjacency (both directions): node
        ``u``'s neighbours are ``adj[indptr[u]:indptr[u + 1]]``, with lengths ``adjw`` and the
        input positions ``adjpos`` of the edges.
    root : int
    dist : ndarray of shape (n,), dtype=float64
        Shortest-path distances from ``root`` (inf outside its component).
    spt_parent, spt_pos : ndarray of shape (n,), dtype=int64
        Parent node and edge position of every node in a shortest-path tree (-1 at the root).
    alpha : float
        Allowed stretch, > 1.

    Returns
    -------
    parent, ppos : ndarray of shape (n,), dtype=int64
        Parent node and parent edge position in the result tree (-1 at the root and outside
        its component).
    d : ndarray of shape (n,), dtype=float64
        The walk's distance bound of every node (>= its distance in the result tree).
    """
    cdef int64_t n = dist.shape[0]
    if indptr.shape[0] != n + 1:
        raise ValueError(f"light_shallow_walk: indptr must have n + 1 = {n + 1} entries, "
                         f"received {indptr.shape[0]}.")
    if adj.shape[0] != adjw.shape[0] or adj.shape[0] != adjpos.shape[0] or \
            adj.shape[0] < indptr[n]:
        raise ValueError("light_shallow_walk: adj, adjw and adjpos must have one length, at "
                         "least indptr[-1].")
    if spt_parent.shape[0] != n or spt_pos.shape[0] != n:
        raise ValueError("light_shallow_walk: spt_parent and spt_pos need one entry per node.")
    if root < 0 or root >= n:
        raise ValueError(f"light_shallow_walk: root must be a node in [0, {n}), received {root}.")
    if not alpha > 1.0:
        raise ValueError(f"light_shallow_walk: alpha must be > 1, received {alpha}.")
    d = np.empty(n, dtype=np.float64)
    parent = np.empty(n, dtype=np.int64)
    ppos = np.empty(n, dtype=np.int64)
    tparent = np.empty(n, dtype=np.int64)
    stack = np.empty(n, dtype=np.int64)
    cursor = np.empty(n, dtype=np.int64)
    cdef double[::1] dv = d
    cdef int64_t[::1] pv = parent, qv = ppos, tv = tparent, sv = stack, cv = cursor
    with nogil:
        _light_shallow_walk(indptr, adj, adjw, adjpos, root, dist, spt_parent, spt_pos, alpha,
                            dv, pv, qv, tv, sv, cv)
    return parent, ppos, d


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


def tree_distances(const int64_t[::1] parent, const double[::1] pw, Py_ssize_t root):
    """Distances from ``root`` down a tree given by parent pointers.

    Parameters
    ----------
    parent : ndarray of shape (n,), dtype=int64
        Parent of every node (-1 at the root and at nodes outside the tree); must form a tree
        rooted at ``root`` (nodes whose parent chain does not reach ``root`` stay at inf).
    pw : ndarray of shape (n,), dtype=float64
        Length of the link to the parent.
    root : int

    Returns
    -------
    dist : ndarray of shape (n,), dtype=float64
        Sum of link lengths from ``root`` (inf where not reached), added from the root down.
    """
    cdef int64_t n = parent.shape[0]
    if pw.shape[0] != n:
        raise ValueError("tree_distances: parent and pw must have one length.")
    if root < 0 or root >= n:
        raise ValueError(f"tree_distances: root must be a node in [0, {n}), received {root}.")
    if n and (int(np.min(parent)) < -1 or int(np.max(parent)) >= n):
        raise ValueError("tree_distances: parents must be -1 or nodes.")
    if parent[root] != -1:
        raise ValueError("tree_distances: the root's parent must be -1.")
    start = np.empty(n + 1, dtype=np.int64)
    child = np.empty(max(n, 1), dtype=np.int64)
    queue = np.empty(max(n, 1), dtype=np.int64)
    dist = np.empty(n, dtype=np.float64)
    cdef int64_t[::1] st = start, ch = child, qu = queue
    cdef double[::1] dv = dist
    with nogil:
        _tree_distances(parent, pw, root, st, ch, qu, dv)
    return dist


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


def adjacency(const int64_t[::1] a, const int64_t[::1] b, Py_ssize_t n_nodes):
    """Both directions of every link as CSR adjacency, by counting (O(V + E)).

    Parameters
    ----------
    a, b : ndarray of shape (m,), dtype=int64
        Link ends, node ids in [0, n_nodes).
    n_nodes : int

    Returns
    -------
    indptr : ndarray of shape (n_nodes + 1,), dtype=int64
    nbr, link : ndarray of shape (2 m,), dtype=int64
        Node ``u``'s neighbours ``nbr[indptr[u]:indptr[u + 1]]`` and the index (into ``a``)
        of the link to each, in link order.
    """
    cdef int64_t m = a.shape[0]
    if b.shape[0] != m:
        raise ValueError("adjacency: a and b must have one length.")
    if n_nodes < 0:
        raise ValueError(f"adjacency: n_nodes must be >= 0, received {n_nodes}.")
    if m and (min(int(np.min(a)), int(np.min(b))) < 0 or
              max(int(np.max(a)), int(np.max(b))) >= n_nodes):
        raise ValueError(f"adjacency: node ids must lie in [0, {n_nodes}).")
    indptr = np.empty(n_nodes + 1, dtype=np.int64)
    nbr = np.empty(2 * m, dtype=np.int64)
    link = np.empty(2 * m, dtype=np.int64)
    cdef int64_t[::1] ip = indptr, nb = nbr, lk = link
    with nogil:
        _adjacency(a, b, ip, nb, lk)
    return indptr, nbr, link


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
                 const double[::1] w, const int64_t[::1] pred):
    """For every node with a parent ``pred[v]`` (>= 0), the lightest link (the smallest index
    among equal lengths) joining it to that parent; -1 elsewhere.

    ``indptr``, ``nbr``, ``link`` as returned by :func:`adjacency`; ``w`` the links' lengths.
    """
    cdef int64_t n = pred.shape[0]
    if indptr.shape[0] != n + 1 or nbr.shape[0] != link.shape[0] or \
            nbr.shape[0] < indptr[n] or w.shape[0] * 2 != nbr.shape[0]:
        raise ValueError("parent_links: the adjacency does not match pred and w.")
    if n and (int(np.max(pred)) >= n or int(np.min(pred)) < -1):
        raise ValueError("parent_links: parents must be -1 or nodes.")
    out = np.empty(n, dtype=np.int64)
    cdef int64_t[::1] ov = out
    with nogil:
        _parent_links(indptr, nbr, link, w, pred, ov)
    return out
