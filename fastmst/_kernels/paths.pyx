"""Tree path queries on spanning forests.

Three near-linear kernels, each behind a thin ``def`` that allocates and checks shapes:

``kruskal_tree``
    The merge tree of a forest: its edges, taken in the tie-rule order, are joined one by one
    with a disjoint set; edge ``i`` becomes internal node ``n_nodes + i`` whose children are the
    two subtrees it joins.  The heaviest edge on the tree path between two nodes is their lowest
    common ancestor in this tree, and the tree is the single-linkage dendrogram.
``PathMaxIndex``
    Range maxima over the merge tree's leaf order: the heaviest edge on the tree path of any
    node pair in a few memory lookups, after an O(V) build.
``root_forest`` / ``cover_paths``
    For sensitivity: the forest rooted by breadth-first search, then non-tree edges taken
    lightest first each mark the still-unmarked tree edges of their tree path (Tarjan,
    "Sensitivity analysis of minimum spanning trees and shortest path trees", 1982).  A disjoint
    set whose sets are the connected regions of marked edges jumps over marked edges, so each
    tree edge is marked once: O((V + E) alpha(V)).

The disjoint-set primitives come from ``dsu.pxd``.  Internal arrays are int64, except the
lookup tables of ``PathMaxIndex``, which are int32 while node and edge counts fit.
"""
import numpy as np
from libc.stdint cimport int32_t, int64_t, uint8_t

from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.csr cimport pair_offsets, shift_back
from fastmst._kernels.dsu cimport dsu_find, dsu_link
from cython.parallel cimport prange


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


cdef void _root_forest(const index_t[::1] ftail, const index_t[::1] fhead, int64_t n,
                       int64_t[::1] start, int64_t[::1] adj, int64_t[::1] nbr,
                       int64_t[::1] pnode, int64_t[::1] pedge, int64_t[::1] depth,
                       int64_t[::1] queue) noexcept nogil:
    # adjacency lists hold both the edge and the node at its other end, so the search reads
    # them in sequence instead of looking the edge's ends up at random
    cdef int64_t f = ftail.shape[0]
    cdef int64_t i, s, x, y, k, head_q, tail_q
    pair_offsets(ftail, fhead, start)
    for i in range(f):
        x = ftail[i]
        y = fhead[i]
        adj[start[x]] = i
        nbr[start[x]] = y
        start[x] += 1
        adj[start[y]] = i
        nbr[start[y]] = x
        start[y] += 1
    shift_back(start)
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
                y = nbr[k]
                if depth[y] < 0:
                    depth[y] = depth[x] + 1
                    pnode[y] = x
                    pedge[y] = adj[k]
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
    nbr = np.empty(max(2 * f, 1), dtype=np.int64)
    pnode = np.empty(max(n, 1), dtype=np.int64)
    pedge = np.empty(max(n, 1), dtype=np.int64)
    depth = np.empty(max(n, 1), dtype=np.int64)
    queue = np.empty(max(n, 1), dtype=np.int64)
    cdef int64_t[::1] st = start, ad = adj, nb = nbr, pn = pnode, pe = pedge, dp = depth
    cdef int64_t[::1] qu = queue
    with nogil:
        _root_forest(ftail, fhead, n, st, ad, nb, pn, pe, dp, qu)
    return pnode[:n], pedge[:n], depth[:n]


cdef int64_t _cover_paths(const int64_t[::1] pnode, const int64_t[::1] pedge,
                          const int64_t[::1] depth, const index_t[::1] qa,
                          const index_t[::1] qb, int64_t[::1] dsu, uint8_t[::1] rank,
                          int64_t[::1] top, int64_t[::1] cover) noexcept nogil:
    cdef int64_t n = pnode.shape[0]
    cdef int64_t i, j, x, y, rx, rp, t, r, left_to_cover = cover.shape[0]
    for i in range(n):
        dsu[i] = i
        top[i] = i
    for i in range(cover.shape[0]):
        cover[i] = -1
    for j in range(qa.shape[0]):
        if left_to_cover == 0:
            break                   # every tree edge has its lightest covering edge
        x = top[dsu_find(&dsu[0], <int64_t>qa[j])]
        y = top[dsu_find(&dsu[0], <int64_t>qb[j])]
        while x != y:
            if depth[x] < depth[y]:
                x, y = y, x
            if pnode[x] < 0:
                return j            # the pair is in two different trees
            cover[pedge[x]] = j
            left_to_cover -= 1
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


# --- Path maxima by range maxima over the merge tree's leaf order ---------------------------
#
# Laying the merge tree's leaves out left to right makes every subtree a contiguous run, and the
# merge that joins two neighbouring leaves is their lowest common ancestor.  So the heaviest edge
# between nodes u and v is the largest merge index among the gaps between pos[u] and pos[v]
# (Gabow, Bentley and Tarjan, "Scaling and related techniques for geometry problems", 1984, for
# reducing LCA to range maxima; citation recalled from memory).  Gaps between two trees hold the sentinel F.  Range maxima use
# blocks of _BLOCK gaps with in-block prefix/suffix maxima and a sparse table over block maxima:
# O(V log V / _BLOCK) memory, and at most a _BLOCK-long scan per query.

cdef enum:
    _BLOCK = 32


cdef void _leaf_order(int64_t n, const int64_t[::1] kparent, const int64_t[::1] left,
                      const int64_t[::1] right, const int64_t[::1] size, int64_t[::1] offset,
                      int64_t[::1] gap) noexcept nogil:
    cdef int64_t f = left.shape[0]
    cdef int64_t total = n + f
    cdef int64_t r, i, x, a, b, sa, cur = 0
    for r in range(total):
        if kparent[r] == -1:
            if cur > 0:
                gap[cur - 1] = f            # boundary between two trees
            offset[r] = cur
            cur += 1 if r < n else size[r - n]
    for i in range(f - 1, -1, -1):
        x = n + i
        a = left[i]
        b = right[i]
        offset[a] = offset[x]
        sa = 1 if a < n else size[a - n]
        offset[b] = offset[x] + sa
        gap[offset[x] + sa - 1] = i


cdef void _block_tables(const int64_t[::1] gap, int64_t[::1] pre, int64_t[::1] suf,
                        int64_t[::1] table, int64_t nb, int64_t levels) noexcept nogil:
    cdef int64_t g = gap.shape[0]
    cdef int64_t j, i, lo, hi, k, half, a, b
    for j in range(nb):
        lo = j * _BLOCK
        hi = min(lo + _BLOCK, g)
        pre[lo] = gap[lo]
        for i in range(lo + 1, hi):
            pre[i] = pre[i - 1] if pre[i - 1] > gap[i] else gap[i]
        suf[hi - 1] = gap[hi - 1]
        for i in range(hi - 2, lo - 1, -1):
            suf[i] = suf[i + 1] if suf[i + 1] > gap[i] else gap[i]
        table[j] = pre[hi - 1]
    for k in range(1, levels):
        half = 1 << (k - 1)
        for j in range(nb - (1 << k) + 1):
            a = table[(k - 1) * nb + j]
            b = table[(k - 1) * nb + j + half]
            table[k * nb + j] = a if a > b else b


cdef inline int64_t _floor_log2(int64_t x) noexcept nogil:
    cdef int64_t k = 0
    while (x >> (k + 1)) > 0:
        k += 1
    return k


ctypedef fused rank_t:
    # Lookup tables of the path-maxima index: int32 while node and edge counts fit (half the
    # memory traffic of the random lookups that dominate the queries), int64 beyond.
    int32_t
    int64_t


cdef void _path_max(const rank_t[::1] pos, const rank_t[::1] gap, const rank_t[::1] pre,
                    const rank_t[::1] suf, const rank_t[::1] table, int64_t nb, int64_t f,
                    const index_t[::1] qa, const index_t[::1] qb, int64_t[::1] out,
                    int threads) noexcept nogil:
    """Every pair is independent: a static prange over the pairs (serial without OpenMP)."""
    cdef Py_ssize_t q
    cdef int64_t l, r, bl, br, best, i, k, a, b
    for q in prange(qa.shape[0], schedule="static", num_threads=threads):
        l = pos[qa[q]]
        r = pos[qb[q]]
        if l == r:
            best = -2
        else:
            if l > r:
                l, r = r, l
            r = r - 1                            # gaps l..r inclusive
            bl = l // _BLOCK
            br = r // _BLOCK
            if bl == br:
                best = gap[l]
                for i in range(l + 1, r + 1):
                    if gap[i] > best:
                        best = gap[i]
            else:
                best = suf[l] if suf[l] > pre[r] else pre[r]
                if br > bl + 1:
                    k = _floor_log2(br - bl - 1)
                    a = table[k * nb + bl + 1]
                    b = table[k * nb + br - (1 << k)]
                    if a > best:
                        best = a
                    if b > best:
                        best = b
            if best == f:
                best = -1
        out[q] = best


cdef class PathMaxIndex:
    """Heaviest forest edge on the tree path of any node pair, in O(1) memory lookups plus at
    most a 32-gap scan per pair, after an O(V) build from the merge tree.

    Parameters
    ----------
    kparent, left, right, size : outputs of ``kruskal_tree`` (without a cycle)
    n_nodes : int
    """
    cdef readonly object pos
    cdef readonly object gap
    cdef object _pre, _suf, _table, _args
    cdef int64_t _nb, _f, _n

    def __init__(self, const int64_t[::1] kparent, const int64_t[::1] left,
                 const int64_t[::1] right, const int64_t[::1] size, Py_ssize_t n_nodes):
        if left.shape[0] != right.shape[0] or size.shape[0] != left.shape[0] or \
                kparent.shape[0] != n_nodes + left.shape[0]:
            raise ValueError("PathMaxIndex: kparent, left, right and size do not describe one "
                             "merge tree.")
        cdef int64_t n = n_nodes
        cdef int64_t f = left.shape[0]
        cdef int64_t g = max(n - 1, 1)
        offset = np.empty(max(n + f, 1), dtype=np.int64)
        gap = np.full(g, f, dtype=np.int64)
        cdef int64_t nb = (g + _BLOCK - 1) // _BLOCK
        cdef int64_t levels = _floor_log2(nb) + 1
        pre = np.empty(g, dtype=np.int64)
        suf = np.empty(g, dtype=np.int64)
        table = np.empty(levels * nb, dtype=np.int64)
        cdef int64_t[::1] o = offset, gp = gap, pr = pre, sf = suf, tb = table
        with nogil:
            if n > 0:
                _leaf_order(n, kparent, left, right, size, o, gp)
            _block_tables(gp, pr, sf, tb, nb, levels)
        if n + f < 2**31 - 1:
            offset, gap, pre, suf, table = [a.astype(np.int32)
                                            for a in (offset, gap, pre, suf, table)]
        self.pos = offset[:n]
        self.gap = gap
        self._pre, self._suf, self._table = pre, suf, table
        self._nb, self._f, self._n = nb, f, n
        self._args = (np.asarray(kparent), np.asarray(left), np.asarray(right),
                      np.asarray(size), n_nodes)

    def __reduce__(self):
        """Pickle as the merge tree it was built from (rebuilt in O(V) on load)."""
        return (PathMaxIndex, self._args)

    def query(self, const index_t[::1] qa, const index_t[::1] qb, int threads=1):
        """Index (into the tie-rule order of the forest edges) of the heaviest edge on each
        pair's path; -1 for pairs in different trees, -2 for a node with itself.

        ``qa`` and ``qb`` must be validated ids in [0, n_nodes).  ``threads`` >= 1 worker
        threads share the pairs (the answer does not depend on it).
        """
        if threads < 1:
            raise ValueError(f"PathMaxIndex.query: threads must be >= 1, received {threads}.")
        # Below ~64k pairs thread start-up costs more than it saves.
        threads = min(threads, max(1, qa.shape[0] // 65536))
        if qa.shape[0] != qb.shape[0]:
            raise ValueError("PathMaxIndex.query: qa and qb must have one length.")
        if qa.shape[0] and self._n == 0:
            raise ValueError("PathMaxIndex.query: the forest has no nodes.")
        out = np.empty(qa.shape[0], dtype=np.int64)
        cdef int64_t[::1] o = out
        # the index tables are all int32 or all int64 (see __init__)
        cdef const int32_t[::1] p4, g4, pr4, sf4, tb4
        cdef const int64_t[::1] p8, g8, pr8, sf8, tb8
        if self.pos.dtype == np.int32:
            p4, g4, pr4, sf4, tb4 = self.pos, self.gap, self._pre, self._suf, self._table
            with nogil:
                _path_max(p4, g4, pr4, sf4, tb4, self._nb, self._f, qa, qb, o, threads)
        else:
            p8, g8, pr8, sf8, tb8 = self.pos, self.gap, self._pre, self._suf, self._table
            with nogil:
                _path_max(p8, g8, pr8, sf8, tb8, self._nb, self._f, qa, qb, o, threads)
        return out
