"""Compiled kernels of the tree path queries on spanning forests.  The method notes (merge
tree, range maxima, Tarjan's covering of tree paths) are in ``paths.py``, which holds the public
functions and ``PathMaxIndex``: it checks the inputs, allocates every array and assembles the
results.

Every ``def`` here is thin: it takes the arrays already allocated, checks that their lengths
protect memory, releases the GIL and runs a private ``noexcept nogil`` kernel.  The defs take
positional arguments only (no keyword parsing to compile).  Node ids in [0, n_nodes) are the
caller's to check (``fastmst.validation``).  The defs: ``kruskal_tree`` (the merge tree),
``leaf_tables`` and ``path_max32``/``path_max64`` (the path-maxima index and its queries),
``root_forest`` and ``cover_paths`` (for sensitivity), ``union_parent`` (union-find parents
after joining every given pair).

The disjoint-set primitives come from ``dsu.pxd``.  Internal arrays are int64, except the
lookup tables of the path-maxima index, which are int32 while node and edge counts fit.
"""
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


def kruskal_tree(const index_t[::1] ftail, const index_t[::1] fhead, int64_t[::1] dsu,
                 uint8_t[::1] rank, int64_t[::1] top, int64_t[::1] kparent, int64_t[::1] left,
                 int64_t[::1] right, int64_t[::1] size, /):
    """Fill the merge tree (kparent of n_nodes + F entries; left, right, size of F) of the F
    forest edges (ftail, fhead); dsu, rank (zeros) and top are work arrays of >= n_nodes
    entries.  Return the first edge that closes a cycle, or -1."""
    cdef Py_ssize_t f = ftail.shape[0]
    cdef Py_ssize_t n = kparent.shape[0] - f
    if fhead.shape[0] != f or left.shape[0] != f or right.shape[0] != f or \
            size.shape[0] != f or n < 0:
        raise ValueError("kruskal_tree: ftail, fhead, left, right and size must have one "
                         "length F, kparent n_nodes + F.")
    if dsu.shape[0] < n or rank.shape[0] < n or top.shape[0] < n:
        raise ValueError("kruskal_tree: dsu, rank and top need n_nodes entries.")
    cdef int64_t cycle
    with nogil:
        cycle = _kruskal_tree(ftail, fhead, n, dsu, rank, top, kparent, left, right, size)
    return cycle


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


def root_forest(const index_t[::1] ftail, const index_t[::1] fhead, int64_t[::1] start,
                int64_t[::1] adj, int64_t[::1] nbr, int64_t[::1] pnode, int64_t[::1] pedge,
                int64_t[::1] depth, int64_t[::1] queue, /):
    """Root the forest (ftail, fhead) over n_nodes = len(start) - 1 nodes (OUT: pnode, pedge,
    depth, >= n_nodes entries each); adj and nbr are work arrays of >= 2 F entries, queue of
    >= n_nodes."""
    cdef Py_ssize_t f = ftail.shape[0]
    cdef Py_ssize_t n = start.shape[0] - 1
    if fhead.shape[0] != f or adj.shape[0] < 2 * f or nbr.shape[0] < 2 * f:
        raise ValueError("root_forest: ftail and fhead must have one length F, adj and nbr "
                         ">= 2 F.")
    if n < 0 or pnode.shape[0] < n or pedge.shape[0] < n or depth.shape[0] < n or \
            queue.shape[0] < n:
        raise ValueError("root_forest: pnode, pedge, depth and queue need n_nodes = "
                         "len(start) - 1 entries.")
    with nogil:
        _root_forest(ftail, fhead, n, start, adj, nbr, pnode, pedge, depth, queue)


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
                const index_t[::1] qa, const index_t[::1] qb, int64_t[::1] dsu,
                uint8_t[::1] rank, int64_t[::1] top, int64_t[::1] cover, /):
    """Fill ``cover`` (one entry per forest edge) with the first pair covering each edge; dsu,
    rank (zeros) and top are work arrays of >= n_nodes entries.  Return the index of a pair in
    two trees, or -1."""
    cdef Py_ssize_t n = pnode.shape[0]
    if qa.shape[0] != qb.shape[0]:
        raise ValueError("cover_paths: qa and qb must have one length.")
    if pedge.shape[0] != n or depth.shape[0] != n:
        raise ValueError("cover_paths: pnode, pedge and depth must have one length.")
    if dsu.shape[0] < n or rank.shape[0] < n or top.shape[0] < n:
        raise ValueError("cover_paths: dsu, rank and top need n_nodes entries.")
    cdef int64_t bad
    with nogil:
        bad = _cover_paths(pnode, pedge, depth, qa, qb, dsu, rank, top, cover)
    return bad


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


def union_parent(const index_t[::1] ftail, const index_t[::1] fhead, int64_t[::1] parent,
                 uint8_t[::1] rank, /):
    """Fill ``parent`` (one entry per node) with union-find parents after joining every pair;
    ``rank`` is a work array of zeros, >= len(parent) entries."""
    if ftail.shape[0] != fhead.shape[0]:
        raise ValueError("union_parent: ftail and fhead must have one length.")
    if rank.shape[0] < parent.shape[0]:
        raise ValueError("union_parent: rank needs one entry per node.")
    if parent.shape[0] > 0:
        with nogil:
            _union_pass(ftail, fhead, parent, rank)


# --- Path maxima by range maxima over the merge tree's leaf order ---------------------------
#
# Laying the merge tree's leaves out left to right makes every subtree a contiguous run, and the
# merge that joins two neighbouring leaves is their lowest common ancestor.  So the heaviest edge
# between nodes u and v is the largest merge index among the gaps between pos[u] and pos[v]
# (Gabow, Bentley and Tarjan, "Scaling and related techniques for geometry problems", 1984, for
# reducing LCA to range maxima; citation recalled from memory).  Gaps between two trees hold the
# sentinel F.  Range maxima use blocks of _BLOCK gaps with in-block prefix/suffix maxima and a
# sparse table over block maxima: O(V log V / _BLOCK) memory, and at most a _BLOCK-long scan per
# query.  ``paths.PathMaxIndex`` allocates the tables (``BLOCK`` is _BLOCK for it).


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


BLOCK = _BLOCK


def leaf_tables(const int64_t[::1] kparent, const int64_t[::1] left, const int64_t[::1] right,
                const int64_t[::1] size, int64_t[::1] offset, int64_t[::1] gap,
                int64_t[::1] pre, int64_t[::1] suf, int64_t[::1] table, /):
    """Fill the path-maxima tables of a merge tree (``kruskal_tree``'s outputs, n_nodes =
    len(kparent) - F): the leaf ``offset`` (>= n_nodes + F entries), and over the G >= n_nodes - 1
    ``gap`` entries (preset to F) the in-block prefix and suffix maxima ``pre``, ``suf`` (G each)
    and the sparse ``table`` over block maxima (>= levels x nb entries, nb = ceil(G / BLOCK),
    levels = floor(log2(nb)) + 1)."""
    cdef Py_ssize_t f = left.shape[0]
    cdef Py_ssize_t n = kparent.shape[0] - f
    cdef Py_ssize_t g = gap.shape[0]
    cdef int64_t nb = (g + _BLOCK - 1) // _BLOCK
    cdef int64_t levels = _floor_log2(nb) + 1
    if right.shape[0] != f or size.shape[0] != f or n < 0:
        raise ValueError("PathMaxIndex: kparent, left, right and size do not describe one "
                         "merge tree.")
    if offset.shape[0] < n + f or g < n - 1 or pre.shape[0] != g or suf.shape[0] != g or \
            table.shape[0] < levels * nb:
        raise ValueError("leaf_tables: offset, gap, pre, suf or table is too short.")
    with nogil:
        if n > 0:
            _leaf_order(n, kparent, left, right, size, offset, gap)
        _block_tables(gap, pre, suf, table, nb, levels)


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


cdef int _check_tables(Py_ssize_t n, Py_ssize_t g, Py_ssize_t n_pre, Py_ssize_t n_suf,
                       Py_ssize_t n_table, Py_ssize_t n_qa, Py_ssize_t n_qb, Py_ssize_t n_out,
                       int threads) except -1:
    """The length preconditions of ``path_max32`` / ``path_max64``."""
    cdef int64_t nb = (g + _BLOCK - 1) // _BLOCK
    if n_qb != n_qa or n_out != n_qa or threads < 1:
        raise ValueError("path_max: qa, qb and out must have one length; threads >= 1.")
    if n_pre != g or n_suf != g or n_table < (_floor_log2(nb) + 1) * nb or (n_qa and n == 0):
        raise ValueError("path_max: the tables do not fit together.")
    return 0


def path_max32(const int32_t[::1] pos, const int32_t[::1] gap, const int32_t[::1] pre,
               const int32_t[::1] suf, const int32_t[::1] table, int64_t n_forest_edges,
               const index_t[::1] qa, const index_t[::1] qb, int64_t[::1] out, int threads, /):
    """Fill ``out`` with the heaviest edge on each pair's path (int32 tables of
    ``leaf_tables``); ``qa`` and ``qb`` must be ids in [0, len(pos))."""
    _check_tables(pos.shape[0], gap.shape[0], pre.shape[0], suf.shape[0], table.shape[0],
                  qa.shape[0], qb.shape[0], out.shape[0], threads)
    with nogil:
        _path_max(pos, gap, pre, suf, table, (gap.shape[0] + _BLOCK - 1) // _BLOCK,
                  n_forest_edges, qa, qb, out, threads)


def path_max64(const int64_t[::1] pos, const int64_t[::1] gap, const int64_t[::1] pre,
               const int64_t[::1] suf, const int64_t[::1] table, int64_t n_forest_edges,
               const index_t[::1] qa, const index_t[::1] qb, int64_t[::1] out, int threads, /):
    """``path_max32`` over int64 tables."""
    _check_tables(pos.shape[0], gap.shape[0], pre.shape[0], suf.shape[0], table.shape[0],
                  qa.shape[0], qb.shape[0], out.shape[0], threads)
    with nogil:
        _path_max(pos, gap, pre, suf, table, (gap.shape[0] + _BLOCK - 1) // _BLOCK,
                  n_forest_edges, qa, qb, out, threads)
