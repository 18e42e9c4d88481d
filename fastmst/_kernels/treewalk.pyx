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
``cover_by_halves``
    The cheapest cover of a rooted forest's links by upward paths, by a dynamic programme with
    mergeable heaps (the arborescence step of backup links).
``common_ancestors``
    Lowest common ancestors of node pairs, offline (Tarjan 1979).
``first_covers``
    For every forest link, the first of a list of links whose tree path holds it (Tarjan
    1982; single-link failures).

Inputs are int64 (node ids, parents, CSR offsets) and float64 (lengths, distances).
"""
import numpy as np
from libc.math cimport INFINITY
from cython.parallel cimport prange
from libc.stdint cimport int32_t, int64_t, uint8_t

from fastmst._kernels._typedefs cimport index_t
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


cdef int64_t _postorder(const int64_t[::1] pnode, int32_t[::1] cptr, int32_t[::1] kids,
                        int32_t[::1] cursor, int32_t[::1] stack, int32_t[::1] order,
                        int32_t[::1] rank, int32_t[::1] first, bint with_first) noexcept nogil:
    """Depth-first postorder of a forest given by parents, children in node-id order, trees by
    their tops' ids: ``order[k]`` is the k-th node finished, ``rank`` its inverse, and
    with ``with_first``, ``first[v]`` the rank of the first node finished in v's subtree (the
    subtree holds ranks first[v] .. rank[v]).  Returns the
    number of nodes reached (n unless parent links form a cycle)."""
    cdef int64_t n = pnode.shape[0]
    cdef int64_t i, k = 0, top
    cdef int32_t x
    for i in range(n + 1):
        cptr[i] = 0
    for i in range(n):
        if pnode[i] >= 0:
            cptr[pnode[i] + 1] += 1
    for i in range(n):
        cptr[i + 1] += cptr[i]
    for i in range(n):
        cursor[i] = cptr[i]
    for i in range(n):
        if pnode[i] >= 0:
            kids[cursor[pnode[i]]] = <int32_t>i
            cursor[pnode[i]] += 1
    for i in range(n):
        cursor[i] = cptr[i]
    for i in range(n):
        if pnode[i] >= 0:
            continue
        top = 1
        stack[0] = <int32_t>i
        while top > 0:
            x = stack[top - 1]
            if cursor[x] < cptr[x + 1]:
                stack[top] = kids[cursor[x]]
                cursor[x] += 1
                top += 1
            else:
                top -= 1
                order[k] = x
                rank[x] = <int32_t>k
                k += 1
    if with_first and k == n:
        for i in range(n):
            first[i] = rank[i]
        for i in range(n):
            x = order[i]
            if pnode[x] >= 0 and first[x] < first[pnode[x]]:
                first[pnode[x]] = first[x]
    return k


# cover_by_halves works in "rank space": nodes renumbered in the order they are taken (children
# before parents: a depth-first postorder, children by node id) and halves renumbered by the
# rank of their start, so every subtree is a range of ranks and its halves a range of records,
# and the per-node arrays are read in sequence.  A half's heap fields share one 32-byte record
# (one cache line holds two), and the tie-breaking values, needed only between equal keys, sit
# apart.  Siblings are merged into their parent's heap in node-id order, as when nodes were
# taken deepest first (by node id within a depth): the heaps, the order of the merges into each
# and the floating-point operations are those of that plain version, so every result is the
# same bit for bit (tests/test_design_kernels.py checks one thread against two).  Ids are int32
# inside (the def refuses 2**31 or more nodes or halves).
cdef struct half_t:
    double key          # r(v, h) minus the lazy offsets still above it in its heap
    double lazy         # offset to add to the keys of its two subheaps
    int32_t left
    int32_t right
    int32_t npl         # null-path length (leftist heaps)
    int32_t top_depth   # the half covers links below this depth


cdef struct tie_t:
    int64_t tie         # the caller's tie value (the earlier candidate first)
    int64_t half        # the caller's index of the half (the last tie-breaker)


# The heap primitives take raw pointers: memoryview slices passed to a recursive function are
# copied (and their acquisition counts updated) at every call.
cdef inline bint _before(int32_t x, int32_t y, const half_t* rec,
                         const tie_t* tb) noexcept nogil:
    if rec[x].key != rec[y].key:
        return rec[x].key < rec[y].key
    if tb[x].tie != tb[y].tie:
        return tb[x].tie < tb[y].tie
    return tb[x].half < tb[y].half


cdef inline void _push_down(int32_t x, half_t* rec) noexcept nogil:
    cdef double z = rec[x].lazy
    cdef int32_t c
    if z != 0.0:
        c = rec[x].left
        if c >= 0:
            rec[c].key += z
            rec[c].lazy += z
        c = rec[x].right
        if c >= 0:
            rec[c].key += z
            rec[c].lazy += z
        rec[x].lazy = 0.0


cdef int32_t _merge(int32_t a, int32_t b, half_t* rec, const tie_t* tb) noexcept nogil:
    """Merge two leftist heaps: down the right paths (O(log H) records each), pushing the lazy
    offsets down on the way, then the null-path lengths fixed on the way back (the steps of
    the textbook recursion, in its order, with an explicit stack)."""
    cdef int32_t stack[160]             # right paths of leftist heaps below 2**31 records
    cdef int32_t t, nl, nr, x, top = 0
    while a >= 0 and b >= 0:
        if _before(b, a, rec, tb):
            t = a
            a = b
            b = t
        _push_down(a, rec)
        stack[top] = a
        top += 1
        t = rec[a].right
        a = t
    x = a if a >= 0 else b
    while top > 0:
        top -= 1
        a = stack[top]
        rec[a].right = x
        nl = rec[rec[a].left].npl if rec[a].left >= 0 else 0
        nr = rec[x].npl if x >= 0 else 0
        if nl < nr:
            rec[a].right = rec[a].left
            rec[a].left = x
            nr = nl
        rec[a].npl = nr + 1
        x = a
    return x


cdef void _dp_range(int64_t lo, int64_t hi, int64_t defer, const int32_t* hptr,
                    const int32_t* drank, const int32_t* prank, half_t* rec, const tie_t* tb,
                    int32_t* root, int32_t* best, double* total) noexcept nogil:
    """The dynamic programme over the ranks lo .. hi - 1; at rank ``defer`` the heap is left in
    root[defer] instead of merged into the parent's."""
    cdef int64_t i
    cdef int32_t r, p, j
    cdef double m
    for i in range(lo, hi):
        r = root[i]
        for j in range(hptr[i], hptr[i + 1]):
            r = _merge(r, j, rec, tb)
        while r >= 0 and rec[r].top_depth >= drank[i]:
            _push_down(r, rec)                      # ends at v: covers nothing above
            r = _merge(rec[r].left, rec[r].right, rec, tb)
        p = prank[i]
        if p < 0:
            root[i] = -1
            continue
        if r >= 0:
            m = rec[r].key
            best[i] = r
            total[i] += m
            rec[r].key -= m
            rec[r].lazy -= m
        if i == defer:
            root[i] = r
            continue
        root[i] = -1
        total[p] += total[i]
        root[p] = _merge(root[p], r, rec, tb)


cdef int64_t _cover_by_halves(const int64_t[::1] pnode, const int64_t[::1] depth,
                           const int64_t[::1] starts, const int64_t[::1] top_depth,
                           const double[::1] cost, const int64_t[::1] tie,
                           int32_t[::1] order, int32_t[::1] rank, int32_t[::1] prank,
                           int32_t[::1] kids, int32_t[::1] cursor, int32_t[::1] stack,
                           int32_t[::1] drank, int32_t[::1] hptr, int32_t[::1] hstart,
                           int32_t[::1] horig, half_t* rec, tie_t* tb, int32_t[::1] root,
                           int32_t[::1] best, double[::1] total, int32_t[::1] alive,
                           uint8_t[::1] claimed, uint8_t[::1] chosen_r,
                           int64_t[::1] best_out, double[::1] total_out,
                           uint8_t[::1] chosen_out, int32_t[::1] first,
                           int64_t threads) noexcept nogil:
    cdef int64_t n = pnode.shape[0]
    cdef int64_t H = cost.shape[0]
    cdef int64_t i, k, v, top, best_split, t
    cdef int32_t p, x, y, s, h, j, c
    # children before parents: depth-first postorder, children by node id, so that siblings
    # are merged into their parent's heap in node-id order (the order of the merges is all
    # that shapes the heaps) and every subtree is a range of ranks (its halves' records too)
    k = _postorder(pnode, hptr, kids, cursor, stack, order, rank, first, True)
    if k != n:
        return k                                     # a cycle: not every node under a top
    for i in range(n):
        v = order[i]
        prank[i] = rank[pnode[v]] if pnode[v] >= 0 else -1
        drank[i] = <int32_t>depth[v]
        stack[i] = first[v]                          # in rank space
    # halves by the rank of their start, in index order within one start
    for i in range(n + 1):
        hptr[i] = 0
    for h in range(H):
        hptr[rank[starts[h]] + 1] += 1
    for i in range(n):
        hptr[i + 1] += hptr[i]
    for h in range(H):
        s = rank[starts[h]]
        j = hptr[s]
        hptr[s] += 1
        horig[j] = h
        hstart[j] = s
        rec[j].key = cost[h]
        rec[j].lazy = 0.0
        rec[j].left = -1
        rec[j].right = -1
        rec[j].npl = 1
        rec[j].top_depth = <int32_t>top_depth[h]
        tb[j].tie = tie[h]
        tb[j].half = h
        claimed[j] = 0
        chosen_r[j] = 0
    for i in range(n, 0, -1):
        hptr[i] = hptr[i - 1]
    hptr[0] = 0
    for i in range(n):
        root[i] = -1
        best[i] = -1
        total[i] = 0.0
        alive[i] = -1
    # the nodes in order, children first; with two threads, the subtree of a node c with about
    # half the work (nodes + halves) on one and the ranks before it on the other: they touch
    # disjoint records and nodes but for c's merge into its parent, done after both, where the
    # order of the one thread would have it (after every rank before c's subtree)
    cdef int32_t* hp = &hptr[0]
    cdef int32_t* dr = &drank[0]
    cdef int32_t* pr = &prank[0]
    cdef int32_t* ro = &root[0]
    cdef int32_t* be = &best[0]
    cdef double* to = &total[0]
    c = -1
    if threads >= 2 and H >= 65536:
        k = 0
        for i in range(n):
            k += 1 + hptr[i + 1] - hptr[i]
        best_split = 0
        for i in range(n):                          # stack[i]: first rank of i's subtree
            v = hptr[i + 1] - hptr[stack[i]] + i + 1 - stack[i]
            if v > k - v:
                v = k - v
            if v > best_split:
                best_split = v
                c = <int32_t>i
    if c < 0:
        _dp_range(0, n, -1, hp, dr, pr, rec, tb, ro, be, to)
    else:
        for t in prange(2, num_threads=2, schedule="static", chunksize=1):
            if t == 0:
                _dp_range(stack[c], c + 1, c, hp, dr, pr, rec, tb, ro, be, to)
            else:
                _dp_range(0, stack[c], -1, hp, dr, pr, rec, tb, ro, be, to)
        p = prank[c]
        if p >= 0:
            total[p] += total[c]
            root[p] = _merge(root[p], root[c], rec, tb)
        root[c] = -1
        _dp_range(c + 1, n, -1, hp, dr, pr, rec, tb, ro, be, to)
    for i in range(n - 1, -1, -1):                  # from the top down
        h = alive[i] if alive[i] >= 0 else best[i]
        if h < 0:
            continue
        alive[i] = h
        s = hstart[h]
        if s == i:
            chosen_r[h] = 1
        elif not claimed[h]:
            claimed[h] = 1
            y = s
            while y != i:
                alive[y] = h
                y = prank[y]
    for i in range(n):
        v = order[i]
        best_out[v] = horig[best[i]] if best[i] >= 0 else -1
        total_out[v] = total[i]
    for j in range(H):
        chosen_out[horig[j]] = chosen_r[j]
    return n


def _postorder_scratch(Py_ssize_t n):
    """The int32 work arrays of ``_postorder`` over n nodes: (child offsets, kids, cursor,
    stack, order, rank, first)."""
    return (np.empty(n + 1, dtype=np.int32),) + tuple(np.empty(n, dtype=np.int32)
                                                      for _ in range(6))


def cover_by_halves(const int64_t[::1] pnode, const int64_t[::1] depth,
                    const int64_t[::1] starts, const int64_t[::1] top_depth,
                    const double[::1] cost, const int64_t[::1] tie, Py_ssize_t threads=1):
    """The cheapest covering of a rooted forest's links by upward paths ("halves"), exactly.

    Half ``h`` runs from node ``starts[h]`` up to an ancestor at depth ``top_depth[h]`` (less
    than the start's) and covers the links on the way; it costs ``cost[h]`` (>= 0).  Nodes are
    taken children first (a depth-first postorder): each keeps a leftist heap of the halves
    from its subtree still running above it, keyed by the cheapest cover of the subtree that
    uses them, minus the children's covers (one lazy offset per heap); the cheapest of them
    covers the link to the parent.  O(H log H + V) after the postorder and a counting sort of
    the halves by start; ties by ``tie``, then half index.  Fewer than 2**31 nodes and halves.
    With ``threads`` >= 2 and at least 65,536 halves, a subtree with about half the work runs
    on a second thread beside the nodes taken before it; the results are the same bit for bit
    as with one thread.

    Returns
    -------
    best : ndarray of shape (n,), dtype=int64
        The half covering each node's link to its parent in the optimum seen from below (-1:
        no half covers it, or a tree top).
    total : ndarray of shape (n,), dtype=float64
        Cheapest cover of each node's subtree and link to its parent (at tops: of the tree).
    chosen : ndarray of shape (H,), dtype=bool
        The halves of one optimal cover.
    """
    cdef int64_t n = pnode.shape[0]
    cdef int64_t H = cost.shape[0]
    if depth.shape[0] != n:
        raise ValueError("cover_by_halves: pnode and depth must have one length.")
    if starts.shape[0] != H or top_depth.shape[0] != H or tie.shape[0] != H:
        raise ValueError("cover_by_halves: starts, top_depth, cost and tie must have one "
                         "length.")
    if n >= 2**31 - 1 or H >= 2**31 - 1:
        raise ValueError(f"cover_by_halves: at most 2**31 - 2 nodes and halves, received {n} "
                         f"nodes and {H} halves.")
    if threads < 1:
        raise ValueError(f"cover_by_halves: threads must be >= 1, received {threads}.")
    if n and (int(np.min(pnode)) < -1 or int(np.max(pnode)) >= n):
        raise ValueError("cover_by_halves: parents must be -1 or nodes.")
    pn = np.asarray(pnode)
    dp = np.asarray(depth)
    has = pn >= 0
    if n and (bool((dp[~has] != 0).any()) or bool((dp[has] != dp[pn[has]] + 1).any())):
        raise ValueError("cover_by_halves: depth must be 0 at tree tops and its parent's + 1 "
                         "elsewhere (as root_forest returns).")
    st = np.asarray(starts)
    td = np.asarray(top_depth)
    if H and (int(st.min()) < 0 or int(st.max()) >= n):
        raise ValueError("cover_by_halves: starts must be nodes.")
    if H and bool((td >= np.asarray(depth)[st]).any() or (td < 0).any()):
        raise ValueError("cover_by_halves: every half must end above its start.")
    hptr, kids, cursor, stack, order, rank, first = _postorder_scratch(n)
    prank = np.empty(max(n, 1), dtype=np.int32)
    drank = np.empty(max(n, 1), dtype=np.int32)
    hstart = np.empty(H, dtype=np.int32)
    horig = np.empty(H, dtype=np.int32)
    records = np.empty((max(H, 1), sizeof(half_t) // 8), dtype=np.float64)
    ties = np.empty((max(H, 1), sizeof(tie_t) // 8), dtype=np.int64)
    root = np.empty(max(n, 1), dtype=np.int32)
    best_r = np.empty(max(n, 1), dtype=np.int32)
    total_r = np.empty(max(n, 1), dtype=np.float64)
    alive = np.empty(n, dtype=np.int32)
    claimed = np.empty(H, dtype=np.uint8)
    chosen_r = np.empty(H, dtype=np.uint8)
    best = np.empty(n, dtype=np.int64)
    total = np.empty(n, dtype=np.float64)
    chosen = np.empty(H, dtype=np.uint8)
    cdef double[:, ::1] rv = records
    cdef int64_t[:, ::1] tv = ties
    cdef half_t* rec = <half_t*>&rv[0, 0]
    cdef tie_t* tb = <tie_t*>&tv[0, 0]
    cdef int32_t[::1] od = order, rk = rank, pr = prank, dr = drank, hp = hptr, hs = hstart
    cdef int32_t[::1] ki = kids, cu = cursor, sk = stack
    cdef int32_t[::1] ho = horig, ro = root, be = best_r, al = alive, fi = first
    cdef double[::1] to = total_r, to_out = total
    cdef int64_t[::1] be_out = best
    cdef uint8_t[::1] cl = claimed, ch = chosen_r, ch_out = chosen
    cdef int64_t reached
    with nogil:
        reached = _cover_by_halves(pnode, depth, starts, top_depth, cost, tie, od, rk, pr, ki,
                                   cu, sk, dr, hp, hs, ho, rec, tb, ro, be, to, al, cl, ch,
                                   be_out, to_out, ch_out, fi, threads)
    if reached != n:
        raise ValueError(f"cover_by_halves: pnode is not a forest: {n - reached} nodes lie on "
                         f"cycles of parent links.")
    return best, total, chosen.view(bool)


cdef inline int32_t _find(int32_t* dsu, int32_t x) noexcept nogil:
    while dsu[x] != x:                  # path halving
        dsu[x] = dsu[dsu[x]]
        x = dsu[x]
    return x


cdef int64_t _common_ancestors(const int64_t[::1] pnode, const int64_t[::1] a,
                               const int64_t[::1] b, int32_t[::1] cptr, int32_t[::1] kids,
                               int32_t[::1] cursor, int32_t[::1] stack, int32_t[::1] order,
                               int32_t[::1] rank, int32_t[::1] first, int32_t[::1] qptr,
                               int32_t[::1] qlist, int32_t[::1] dsu, uint8_t[::1] done,
                               int64_t[::1] out) noexcept nogil:
    cdef int64_t n = pnode.shape[0]
    cdef int64_t q = a.shape[0]
    cdef int64_t i, k, e, v, o
    cdef int32_t r
    if _postorder(pnode, cptr, kids, cursor, stack, order, rank, first, True) != n:
        return -2
    pair_offsets(a, b, qptr)
    for k in range(q):
        qlist[qptr[a[k]]] = <int32_t>k
        qptr[a[k]] += 1
        qlist[qptr[b[k]]] = <int32_t>k
        qptr[b[k]] += 1
    shift_back(qptr)
    for i in range(n):
        dsu[i] = <int32_t>i
        done[i] = 0
    for i in range(n):                  # Tarjan's offline algorithm, children first
        v = order[i]
        done[v] = 1
        for e in range(qptr[v], qptr[v + 1]):
            k = qlist[e]
            o = b[k] if a[k] == v else a[k]
            if done[o]:
                r = _find(&dsu[0], <int32_t>o)
                if not (first[r] <= i <= rank[r]):
                    return k            # r is not an ancestor of v: two trees
                out[k] = r
        if pnode[v] >= 0:
            dsu[v] = <int32_t>pnode[v]
    return -1


def common_ancestors(const int64_t[::1] pnode, const int64_t[::1] a, const int64_t[::1] b):
    """Lowest common ancestors of node pairs in a rooted forest, offline (Tarjan, "Applications
    of path compression on balanced trees", J. ACM 26(4), 1979): a depth-first postorder in
    which every finished node joins its parent's set, so a pair is answered when its second
    node finishes, by the set of the first.  O((V + Q) log V) at worst with path halving alone,
    close to linear in practice.  Fewer than 2**31 nodes and pairs.

    Parameters
    ----------
    pnode : ndarray of shape (n,), dtype=int64
        Parent of every node, -1 at tree tops (``paths.root_forest``).
    a, b : ndarray of shape (q,), dtype=int64
        The pairs, both nodes of a pair in one tree.

    Returns
    -------
    lca : ndarray of shape (q,), dtype=int64
    """
    cdef int64_t n = pnode.shape[0]
    cdef int64_t q = a.shape[0]
    if b.shape[0] != q:
        raise ValueError(f"common_ancestors: a and b must have one length, received {q} and "
                         f"{b.shape[0]}.")
    if n >= 2**31 - 1 or 2 * q >= 2**31 - 1:
        raise ValueError(f"common_ancestors: at most 2**31 - 2 nodes and 2**30 - 1 pairs, "
                         f"received {n} nodes and {q} pairs.")
    if n and (int(np.min(pnode)) < -1 or int(np.max(pnode)) >= n):
        raise ValueError("common_ancestors: parents must be -1 or nodes.")
    if q and (min(int(np.min(a)), int(np.min(b))) < 0 or
              max(int(np.max(a)), int(np.max(b))) >= n):
        raise ValueError(f"common_ancestors: pair nodes must lie in [0, {n}).")
    cptr, kids, cursor, stack, order, rank, first = _postorder_scratch(n)
    qptr = np.empty(n + 1, dtype=np.int32)
    qlist = np.empty(2 * q, dtype=np.int32)
    dsu = np.empty(n, dtype=np.int32)
    done = np.empty(n, dtype=np.uint8)
    out = np.empty(q, dtype=np.int64)
    cdef int32_t[::1] cp = cptr, ki = kids, cu = cursor, sk = stack, od = order, rk = rank
    cdef int32_t[::1] fi = first, qp = qptr, ql = qlist, ds = dsu
    cdef uint8_t[::1] dn = done
    cdef int64_t[::1] ov = out
    cdef int64_t bad
    if n == 0:
        return out
    with nogil:
        bad = _common_ancestors(pnode, a, b, cp, ki, cu, sk, od, rk, fi, qp, ql, ds, dn, ov)
    if bad == -2:
        raise ValueError("common_ancestors: pnode is not a forest: parent links form a cycle.")
    if bad >= 0:
        raise ValueError(f"common_ancestors: the pair {bad} ({a[bad]}, {b[bad]}) joins two "
                         f"trees.")
    return out


# first_covers keeps everything it reads about a node in one 32-byte record instead of six
# arrays of int64 (two records to a cache line), and writes the cover per node (for its link to
# the parent), so that a step up the tree touches one record.
cdef struct walk_t:
    int32_t up          # disjoint-set parent; at a set's representative, itself
    int32_t top         # at a representative: the highest node of its set
    int32_t pnode
    int32_t depth
    int32_t cover       # index (into ranked) of the first covering link, -1 for none yet
    int32_t rank
    int32_t pad[2]


cdef extern from *:
    """
    #if defined(__GNUC__) || defined(__clang__)
    #define FASTMST_PREFETCH(p) __builtin_prefetch((const void *)(p))
    #else
    #define FASTMST_PREFETCH(p) ((void)0)
    #endif
    """
    void FASTMST_PREFETCH(const void* p) noexcept nogil


cdef inline int32_t _find_set(walk_t* nd, int32_t x) noexcept nogil:
    while nd[x].up != x:                # path halving
        nd[x].up = nd[nd[x].up].up
        x = nd[x].up
    return x


cdef int64_t _first_covers(const int64_t[::1] pnode, const int64_t[::1] depth,
                           const index_t[::1] tail, const index_t[::1] head,
                           const int64_t[::1] ranked, walk_t* nd) noexcept nogil:
    cdef int64_t n = pnode.shape[0]
    cdef int64_t q = ranked.shape[0]
    cdef int64_t i, j, left = 0
    cdef int32_t x, y, t, rx, rp
    for i in range(n):
        nd[i].up = <int32_t>i
        nd[i].top = <int32_t>i
        nd[i].rank = 0
        nd[i].pnode = <int32_t>pnode[i]
        nd[i].depth = <int32_t>depth[i]
        nd[i].cover = -1
        if pnode[i] >= 0:
            left += 1
    for j in range(q):
        if left == 0:
            break                       # every tree link has its first covering link
        # the links come in a random order: ask for the ends of a link 32 ahead, and for the
        # records of the ends of a link 16 ahead (its ends asked for 16 links ago)
        if j + 32 < q:
            FASTMST_PREFETCH(&tail[ranked[j + 32]])
            FASTMST_PREFETCH(&head[ranked[j + 32]])
        if j + 16 < q:
            FASTMST_PREFETCH(&nd[tail[ranked[j + 16]]])
            FASTMST_PREFETCH(&nd[head[ranked[j + 16]]])
        x = nd[_find_set(nd, <int32_t>tail[ranked[j]])].top
        y = nd[_find_set(nd, <int32_t>head[ranked[j]])].top
        while x != y:
            if nd[x].depth < nd[y].depth:
                t = x
                x = y
                y = t
            if nd[x].pnode < 0:
                return j                # the link joins two trees
            nd[x].cover = <int32_t>j
            left -= 1
            rx = _find_set(nd, x)
            rp = _find_set(nd, nd[x].pnode)
            t = nd[rp].top
            if nd[rx].rank < nd[rp].rank:           # union by rank
                nd[rx].up = rp
                rx = rp
            else:
                if nd[rx].rank == nd[rp].rank:
                    nd[rx].rank += 1
                nd[rp].up = rx
            nd[rx].top = t
            x = t
    return -1


def first_covers(const int64_t[::1] pnode, const int64_t[::1] pedge, const int64_t[::1] depth,
                 Py_ssize_t n_links, const index_t[::1] tail, const index_t[::1] head,
                 const int64_t[::1] ranked):
    """For every link of a rooted forest, the first of the ``ranked`` links whose tree path
    holds it (Tarjan, "Sensitivity analysis of minimum spanning trees and shortest path trees",
    Inf. Proc. Letters 14(1), 1982): each ranked link marks the not yet marked forest links on
    its path, a disjoint set (union by rank, path halving) jumping over marked ones, so every
    forest link is marked once: union by rank and path halving, O((V + Q) alpha(V)).  The
    ranked links come at random places in the tree, so the ends of the links 32 places ahead
    and their nodes' records 16 places ahead are prefetched.  Fewer than 2**31 nodes and
    ranked links.

    Parameters
    ----------
    pnode, pedge, depth : ndarray of shape (n,), dtype=int64
        The rooted forest (``paths.root_forest``): parent node, index of the link to it (into
        the forest's ``n_links`` links) and depth of every node.
    n_links : int
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Ends of every link of the graph.
    ranked : ndarray of shape (Q,), dtype=int64
        Positions (into tail/head) of links outside the forest, in priority order.

    Returns
    -------
    cover : ndarray of shape (n_links,), dtype=int64
        Position of the first covering link, -1 where none covers it.
    """
    cdef int64_t n = pnode.shape[0]
    cdef int64_t e = tail.shape[0]
    if pedge.shape[0] != n or depth.shape[0] != n:
        raise ValueError("first_covers: pnode, pedge and depth must have one length.")
    if head.shape[0] != e:
        raise ValueError("first_covers: tail and head must have one length.")
    if n >= 2**31 - 1 or ranked.shape[0] >= 2**31 - 1:
        raise ValueError(f"first_covers: at most 2**31 - 2 nodes and ranked links, received "
                         f"{n} and {ranked.shape[0]}.")
    if n_links < 0:
        raise ValueError(f"first_covers: n_links must be >= 0, received {n_links}.")
    pe = np.asarray(pedge)
    if n and (int(np.min(pnode)) < -1 or int(np.max(pnode)) >= n or int(pe.max()) >= n_links
              or int(np.min(depth)) < 0):
        raise ValueError("first_covers: parents must be -1 or nodes, links below n_links, "
                         "depths >= 0.")
    rk = np.asarray(ranked)
    if rk.size and (int(rk.min()) < 0 or int(rk.max()) >= e):
        raise ValueError(f"first_covers: ranked positions must lie in [0, {e}).")
    if e and (min(int(np.min(tail)), int(np.min(head))) < 0 or
              max(int(np.max(tail)), int(np.max(head))) >= n):
        raise ValueError(f"first_covers: link ends must be nodes in [0, {n}).")
    records = np.empty((max(n, 1), sizeof(walk_t) // 4), dtype=np.int32)
    cdef int32_t[:, ::1] rv = records
    cdef walk_t* nd = <walk_t*>&rv[0, 0]
    cdef int64_t bad
    with nogil:
        bad = _first_covers(pnode, depth, tail, head, ranked, nd)
    if bad >= 0:
        p = int(ranked[bad])
        raise ValueError(f"first_covers: the link at position {p} ({tail[p]}-{head[p]}) joins "
                         f"two trees of the forest.")
    cover = np.full(n_links, -1, dtype=np.int64)
    node_cover = records[:n, 4]
    has = pe >= 0
    j = node_cover[has]
    cover[pe[has]] = np.where(j >= 0, rk[np.maximum(j, 0)], -1) if rk.size else -1
    return cover

