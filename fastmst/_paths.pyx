"""Tree path queries on spanning forests.

Three near-linear kernels, each behind a thin ``def`` that allocates and checks shapes:

``kruskal_tree``
    The merge tree of a forest: its edges, taken in the tie-rule order, are joined one by one
    with a disjoint set; edge ``i`` becomes internal node ``n_nodes + i`` whose children are the
    two subtrees it joins.  The heaviest edge on the tree path between two nodes is their lowest
    common ancestor in this tree, and the tree is the single-linkage dendrogram.
``tree_lca``
    Offline lowest common ancestors in the merge tree for a batch of node pairs (Tarjan, "Applications
    of path compression on balanced trees", 1979): one depth-first pass, O((V + Q) alpha(V)).
``root_forest`` / ``cover_paths``
    For sensitivity: the forest rooted by breadth-first search, then non-tree edges taken in
    tie-rule order each mark the still-unmarked tree edges of their tree path (Tarjan,
    "Sensitivity analysis of minimum spanning trees and shortest path trees", 1982).  A disjoint
    set whose sets are the connected regions of marked edges jumps over marked edges, so each
    tree edge is marked once: O((V + E) alpha(V)).

The disjoint-set primitives come from ``_dsu.pxd``.  Internal arrays are int64.
"""
import numpy as np
cimport numpy as cnp
from libc.stdint cimport int64_t, uint8_t

from fastmst._typedefs cimport index_t
from fastmst._dsu cimport dsu_find, dsu_link

cnp.import_array()


cdef int64_t _kruskal_tree(const index_t[::1] ftail, const index_t[::1] fhead, int64_t n,
                           int64_t[::1] dsu, uint8_t[::1] rank, int64_t[::1] top,
                           int64_t[::1] kparent, int64_t[::1] left, int64_t[::1] right,
                           int64_t[::1] size) noexcept nogil:
    """Build the merge tree (OUT: kparent, left, right, size); return the first forest edge that
    closes a cycle, or -1."""
    cdef int64_t i, ru, rv, a, b, r, node, sa, sb
    cdef int64_t f = ftail.shape[0]
    for i in range(n + f):
        kparent[i] = -1
    for i in range(n):
        dsu[i] = i
        top[i] = i
    for i in range(f):
        ru = dsu_find(&dsu[0], <int64_t>ftail[i])
        rv = dsu_find(&dsu[0], <int64_t>fhead[i])
        if ru == rv:
            return i
        node = n + i
        a = top[ru]
        b = top[rv]
        if a > b:
            a, b = b, a
        left[i] = a
        right[i] = b
        kparent[a] = node
        kparent[b] = node
        sa = 1 if a < n else size[a - n]
        sb = 1 if b < n else size[b - n]
        size[i] = sa + sb
        r = dsu_link(&dsu[0], &rank[0], ru, rv)
        top[r] = node
    return -1


def kruskal_tree(const index_t[::1] ftail, const index_t[::1] fhead, Py_ssize_t n_nodes):
    """Merge tree of a forest whose edges are given in tie-rule order.

    Parameters
    ----------
    ftail, head : ndarray of shape (F,), dtype=int32 or int64
        Endpoints of the forest edges, ids in [0, n_nodes), ordered by the tie rule.
    n_nodes : int

    Returns
    -------
    kparent : ndarray of shape (n_nodes + F,), dtype=int64
        Parent of every merge-tree node (-1 for the root of each tree).
    left, right : ndarray of shape (F,), dtype=int64
        Children of internal node ``n_nodes + i`` (left < right).
    size : ndarray of shape (F,), dtype=int64
        Number of leaves under internal node ``n_nodes + i``.
    cycle : int
        Index (into the given order) of the first edge that closes a cycle, or -1.  When it is
        not -1 the other outputs are incomplete.
    """
    if ftail.shape[0] != fhead.shape[0]:
        raise ValueError("kruskal_tree: ftail and fhead must have one length.")
    cdef int64_t n = n_nodes
    cdef int64_t f = ftail.shape[0]
    kparent = np.empty(n + f, dtype=np.int64)
    left = np.empty(f, dtype=np.int64)
    right = np.empty(f, dtype=np.int64)
    size = np.empty(f, dtype=np.int64)
    dsu = np.empty(max(n, 1), dtype=np.int64)
    top = np.empty(max(n, 1), dtype=np.int64)
    rank = np.zeros(max(n, 1), dtype=np.uint8)
    cdef int64_t[::1] kp = kparent, l = left, r = right, s = size, d = dsu, t = top
    cdef uint8_t[::1] rk = rank
    cdef int64_t cycle
    with nogil:
        cycle = _kruskal_tree(ftail, fhead, n, d, rk, t, kp, l, r, s)
    return kparent, left, right, size, int(cycle)


cdef void _query_csr(const index_t[::1] qa, const index_t[::1] qb, int64_t n,
                     int64_t[::1] start, int64_t[::1] qlist) noexcept nogil:
    """Queries grouped by endpoint (pairs of equal nodes are left out)."""
    cdef int64_t i, q, a, b
    cdef int64_t m = qa.shape[0]
    for i in range(n + 1):
        start[i] = 0
    for q in range(m):
        a = qa[q]
        b = qb[q]
        if a != b:
            start[a + 1] += 1
            start[b + 1] += 1
    for i in range(n):
        start[i + 1] += start[i]
    for q in range(m):
        a = qa[q]
        b = qb[q]
        if a != b:
            qlist[start[a]] = q
            start[a] += 1
            qlist[start[b]] = q
            start[b] += 1
    # start[i] now holds the end of node i's block; shift back.
    for i in range(n, 0, -1):
        start[i] = start[i - 1]
    start[0] = 0


cdef inline void _finish(int64_t x, const int64_t[::1] kparent, int64_t* dsu, uint8_t* rank,
                         int64_t[::1] anc) noexcept nogil:
    """A finished node joins the set of its parent, whose ancestor is that parent."""
    cdef int64_t p = kparent[x]
    cdef int64_t rx, rp, r
    if p < 0:
        return
    rx = dsu_find(dsu, x)
    rp = dsu_find(dsu, p)
    r = dsu_link(dsu, rank, rx, rp)
    anc[r] = p


cdef void _tree_lca(int64_t n, const int64_t[::1] kparent, const int64_t[::1] left,
                    const int64_t[::1] right, const index_t[::1] qa, const index_t[::1] qb,
                    const int64_t[::1] start, const int64_t[::1] qlist, int64_t[::1] dsu,
                    uint8_t[::1] rank, int64_t[::1] anc, int64_t[::1] seen,
                    uint8_t[::1] expanded, int64_t[::1] stack, int64_t[::1] out) noexcept nogil:
    cdef int64_t total = kparent.shape[0]
    cdef int64_t i, r, x, y, k, q, tree = 0, depth
    for i in range(total):
        dsu[i] = i
        anc[i] = i
    for i in range(qa.shape[0]):
        out[i] = -2 if qa[i] == qb[i] else -1
    for r in range(total):
        if kparent[r] != -1:
            continue
        tree += 1
        stack[0] = r
        depth = 1
        while depth > 0:
            x = stack[depth - 1]
            if x < n:
                seen[x] = tree
                for k in range(start[x], start[x + 1]):
                    q = qlist[k]
                    y = qb[q] if qa[q] == x else qa[q]
                    if seen[y] == tree:
                        out[q] = anc[dsu_find(&dsu[0], y)] - n
                    # seen[y] == 0: answered when y is reached; another tree: stays -1.
                depth -= 1
                _finish(x, kparent, &dsu[0], &rank[0], anc)
            elif not expanded[x - n]:
                expanded[x - n] = 1
                stack[depth] = right[x - n]
                stack[depth + 1] = left[x - n]
                depth += 2
            else:
                depth -= 1
                _finish(x, kparent, &dsu[0], &rank[0], anc)


def tree_lca(const int64_t[::1] kparent, const int64_t[::1] left, const int64_t[::1] right,
             Py_ssize_t n_nodes, const index_t[::1] qa, const index_t[::1] qb):
    """Heaviest forest edge on the tree path of each node pair, by offline LCA in the merge tree.

    Parameters
    ----------
    kparent, left, right : outputs of ``kruskal_tree`` (without a cycle)
    n_nodes : int
    qa, qb : ndarray of shape (Q,), dtype=int32 or int64
        Validated node ids in [0, n_nodes).

    Returns
    -------
    out : ndarray of shape (Q,), dtype=int64
        Index (into the tie-rule order of the forest edges) of the heaviest edge on the path;
        -1 when the nodes are in different trees; -2 when they are the same node.
    """
    if qa.shape[0] != qb.shape[0]:
        raise ValueError("tree_lca: qa and qb must have one length.")
    if left.shape[0] != right.shape[0] or kparent.shape[0] != n_nodes + left.shape[0]:
        raise ValueError("tree_lca: kparent, left and right do not describe one merge tree.")
    cdef int64_t n = n_nodes
    cdef int64_t total = kparent.shape[0]
    cdef int64_t m = qa.shape[0]
    out = np.empty(m, dtype=np.int64)
    start = np.empty(n + 1, dtype=np.int64)
    qlist = np.empty(2 * m, dtype=np.int64)
    dsu = np.empty(max(total, 1), dtype=np.int64)
    anc = np.empty(max(total, 1), dtype=np.int64)
    rank = np.zeros(max(total, 1), dtype=np.uint8)
    seen = np.zeros(max(n, 1), dtype=np.int64)
    expanded = np.zeros(max(total - n, 1), dtype=np.uint8)
    stack = np.empty(total + 2, dtype=np.int64)
    cdef int64_t[::1] o = out, st = start, ql = qlist, d = dsu, an = anc, se = seen, sk = stack
    cdef uint8_t[::1] rk = rank, ex = expanded
    with nogil:
        _query_csr(qa, qb, n, st, ql)
        _tree_lca(n, kparent, left, right, qa, qb, st, ql, d, rk, an, se, ex, sk, o)
    return out


cdef void _root_forest(const index_t[::1] ftail, const index_t[::1] fhead, int64_t n,
                       int64_t[::1] start, int64_t[::1] adj, int64_t[::1] pnode,
                       int64_t[::1] pedge, int64_t[::1] depth, int64_t[::1] queue) noexcept nogil:
    cdef int64_t f = ftail.shape[0]
    cdef int64_t i, s, x, y, e, k, head_q, tail_q
    for i in range(n + 1):
        start[i] = 0
    for i in range(f):
        start[ftail[i] + 1] += 1
        start[fhead[i] + 1] += 1
    for i in range(n):
        start[i + 1] += start[i]
    for i in range(f):
        adj[start[ftail[i]]] = i
        start[ftail[i]] += 1
        adj[start[fhead[i]]] = i
        start[fhead[i]] += 1
    for i in range(n, 0, -1):
        start[i] = start[i - 1]
    start[0] = 0
    for i in range(n):
        depth[i] = -1
    for s in range(n):
        if depth[s] >= 0:
            continue
        depth[s] = 0
        pnode[s] = -1
        pedge[s] = -1
        head_q = 0
        tail_q = 1
        queue[0] = s
        while head_q < tail_q:
            x = queue[head_q]
            head_q += 1
            for k in range(start[x], start[x + 1]):
                e = adj[k]
                y = fhead[e] if ftail[e] == x else ftail[e]
                if depth[y] < 0:
                    depth[y] = depth[x] + 1
                    pnode[y] = x
                    pedge[y] = e
                    queue[tail_q] = y
                    tail_q += 1


def root_forest(const index_t[::1] ftail, const index_t[::1] fhead, Py_ssize_t n_nodes):
    """Root every tree of an (acyclic) forest at its smallest node, by breadth-first search.

    Returns
    -------
    pnode : ndarray of shape (n_nodes,), dtype=int64
        Parent node (-1 at roots).
    pedge : ndarray of shape (n_nodes,), dtype=int64
        Index of the forest edge to the parent (-1 at roots).
    depth : ndarray of shape (n_nodes,), dtype=int64
    """
    if ftail.shape[0] != fhead.shape[0]:
        raise ValueError("root_forest: ftail and fhead must have one length.")
    cdef int64_t n = n_nodes
    cdef int64_t f = ftail.shape[0]
    start = np.empty(n + 1, dtype=np.int64)
    adj = np.empty(max(2 * f, 1), dtype=np.int64)
    pnode = np.empty(max(n, 1), dtype=np.int64)
    pedge = np.empty(max(n, 1), dtype=np.int64)
    depth = np.empty(max(n, 1), dtype=np.int64)
    queue = np.empty(max(n, 1), dtype=np.int64)
    cdef int64_t[::1] st = start, ad = adj, pn = pnode, pe = pedge, dp = depth, qu = queue
    with nogil:
        _root_forest(ftail, fhead, n, st, ad, pn, pe, dp, qu)
    return pnode[:n], pedge[:n], depth[:n]


cdef int64_t _cover_paths(const int64_t[::1] pnode, const int64_t[::1] pedge,
                          const int64_t[::1] depth, const index_t[::1] qa,
                          const index_t[::1] qb, int64_t[::1] dsu, uint8_t[::1] rank,
                          int64_t[::1] top, int64_t[::1] cover) noexcept nogil:
    cdef int64_t n = pnode.shape[0]
    cdef int64_t i, j, x, y, rx, rp, t, r
    for i in range(n):
        dsu[i] = i
        top[i] = i
    for i in range(cover.shape[0]):
        cover[i] = -1
    for j in range(qa.shape[0]):
        x = top[dsu_find(&dsu[0], <int64_t>qa[j])]
        y = top[dsu_find(&dsu[0], <int64_t>qb[j])]
        while x != y:
            if depth[x] < depth[y]:
                x, y = y, x
            if pnode[x] < 0:
                return j            # the pair is in two different trees
            cover[pedge[x]] = j
            rx = dsu_find(&dsu[0], x)
            rp = dsu_find(&dsu[0], pnode[x])
            t = top[rp]
            r = dsu_link(&dsu[0], &rank[0], rx, rp)
            top[r] = t
            x = t
    return -1


def cover_paths(const int64_t[::1] pnode, const int64_t[::1] pedge, const int64_t[::1] depth,
                Py_ssize_t n_forest_edges, const index_t[::1] qa, const index_t[::1] qb):
    """For every forest edge, the first pair (in the given order) whose tree path contains it.

    Parameters
    ----------
    pnode, pedge, depth : outputs of ``root_forest``
    n_forest_edges : int
    qa, qb : ndarray of shape (Q,), dtype=int32 or int64
        Node pairs in the same tree, in the order of priority (the tie-rule order of the
        non-tree edges for sensitivity).

    Returns
    -------
    cover : ndarray of shape (n_forest_edges,), dtype=int64
        Index of the first covering pair, -1 when no pair covers the edge.
    bad : int
        Index of a pair whose nodes lie in two trees (then ``cover`` is incomplete), or -1.
    """
    if qa.shape[0] != qb.shape[0]:
        raise ValueError("cover_paths: qa and qb must have one length.")
    if pedge.shape[0] != pnode.shape[0] or depth.shape[0] != pnode.shape[0]:
        raise ValueError("cover_paths: pnode, pedge and depth must have one length.")
    cdef int64_t n = pnode.shape[0]
    cover = np.empty(n_forest_edges, dtype=np.int64)
    dsu = np.empty(max(n, 1), dtype=np.int64)
    top = np.empty(max(n, 1), dtype=np.int64)
    rank = np.zeros(max(n, 1), dtype=np.uint8)
    cdef int64_t[::1] c = cover, d = dsu, t = top
    cdef uint8_t[::1] rk = rank
    cdef int64_t bad
    with nogil:
        bad = _cover_paths(pnode, pedge, depth, qa, qb, d, rk, t, c)
    return cover, int(bad)


cdef void _union_pass(const index_t[::1] ftail, const index_t[::1] fhead, int64_t[::1] dsu,
                      uint8_t[::1] rank) noexcept nogil:
    cdef int64_t i, ru, rv
    for i in range(dsu.shape[0]):
        dsu[i] = i
    for i in range(ftail.shape[0]):
        ru = dsu_find(&dsu[0], <int64_t>ftail[i])
        rv = dsu_find(&dsu[0], <int64_t>fhead[i])
        if ru != rv:
            dsu_link(&dsu[0], &rank[0], ru, rv)


def union_parent(const index_t[::1] ftail, const index_t[::1] fhead, Py_ssize_t n_nodes):
    """Union-find parents after joining every given pair (feed to ``labels_from_parent``).

    Returns
    -------
    parent : ndarray of shape (n_nodes,), dtype=int64
    """
    if ftail.shape[0] != fhead.shape[0]:
        raise ValueError("union_parent: ftail and fhead must have one length.")
    parent = np.empty(n_nodes, dtype=np.int64)
    rank = np.zeros(max(n_nodes, 1), dtype=np.uint8)
    cdef int64_t[::1] d = parent
    cdef uint8_t[::1] rk = rank
    if n_nodes > 0:
        with nogil:
            _union_pass(ftail, fhead, d, rk)
    return parent
