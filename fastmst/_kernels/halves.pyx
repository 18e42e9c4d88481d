"""Covering a rooted forest's links by the halves of candidate links: the kernels of backup
links (``fastmst.design.redundancy``).

``common_ancestors``
    Lowest common ancestors of node pairs, offline (Tarjan 1979): where each candidate link is
    cut into its two halves (each end up to the common ancestor).
``cover_by_halves``
    The cheapest cover of the forest's links by those upward halves, by a dynamic programme
    over a segment tree (the arborescence step of Frederickson and JaJa's 2-approximation).

Both take the nodes in a depth-first postorder (``_postorder``), children in node-id order.
Inputs are int64 (node ids, parents, depths) and float64 (costs); int32 inside.
"""
import numpy as np
from libc.math cimport INFINITY
from libc.stdint cimport int32_t, int64_t, uint8_t

from fastmst._kernels.csr cimport pair_offsets, shift_back
from fastmst._kernels.dsu cimport dsu_find


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
                r = dsu_find(&dsu[0], <int32_t>o)
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
    node finishes, by the set of the first (``dsu.pxd``'s find, path compression, no ranks:
    a finished node's set hangs under its parent's).  O((V + Q) log V) at worst, close to
    linear in practice.  Fewer than 2**31 nodes and pairs.

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


# cover_by_halves works in "rank space": nodes renumbered in the order they are taken (children
# before parents: a depth-first postorder, children by node id) and halves renumbered by the
# rank of their start, so every subtree is a range of ranks and the halves starting in it one
# range of leaves of a segment tree.  The dynamic programme then needs only three operations on
# that range: the least key (ties by the caller's tie value, then half index), adding a number
# to every key, and removing one half.  The tree is the iterative one with add tags kept at
# the nodes (a node's value is the least of its children's plus its own tag), so an operation
# touches O(log H) nodes near the two ends of the range, and the ranges of consecutive nodes
# lie side by side: the nodes touched stay in cache.  Ids are int32 inside (the def refuses
# 2**31 or more nodes or halves).
cdef struct tie_t:
    int64_t tie         # the caller's tie value (the earlier candidate first)
    int64_t half        # the caller's index of the half (the last tie-breaker)


cdef struct seg_t:
    double* val         # val[x]: least key below x, counting the tags of x and below
    double* tag         # tag[x] (x < size): added to every key below x
    int32_t* arg        # arg[x]: the half (leaf) holding that least key
    tie_t* tb           # each leaf's tie values (written once, at the start)
    int64_t size        # leaves: the power of two >= H
    int32_t levels      # log2(size)


cdef inline bint _before(double va, int32_t a, double vb, int32_t b,
                         const tie_t* tb) noexcept nogil:
    """Key va of half a before key vb of half b: keys, then ties, then half index; a missing
    half (-1, key +inf) never before a present one."""
    if va != vb:
        return va < vb
    if a < 0 or b < 0:
        return a >= 0 and b < 0
    if tb[a].tie != tb[b].tie:
        return tb[a].tie < tb[b].tie
    return tb[a].half < tb[b].half


cdef inline void _pull(seg_t* s, int64_t x) noexcept nogil:
    cdef int64_t l = 2 * x
    cdef int64_t r = l + 1
    if _before(s.val[r], s.arg[r], s.val[l], s.arg[l], s.tb):
        l = r
    s.val[x] = s.val[l] + s.tag[x]
    s.arg[x] = s.arg[l]


cdef inline void _apply(seg_t* s, int64_t x, double z) noexcept nogil:
    s.val[x] += z
    if x < s.size:
        s.tag[x] += z


cdef inline void _push_path(seg_t* s, int64_t p) noexcept nogil:
    """Move the tags above leaf p down to the nodes beside its path (top first)."""
    cdef int32_t k
    cdef int64_t x
    cdef double z
    for k in range(s.levels, 0, -1):
        x = p >> k
        z = s.tag[x]
        if z != 0.0:
            _apply(s, 2 * x, z)
            _apply(s, 2 * x + 1, z)
            s.tag[x] = 0.0


cdef inline void _pull_path(seg_t* s, int64_t p) noexcept nogil:
    p >>= 1
    while p >= 1:
        _pull(s, p)
        p >>= 1


cdef inline int32_t _least(seg_t* s, int64_t lo, int64_t hi, double* key) noexcept nogil:
    """The half with the least key among leaves lo .. hi - 1 (-1 if all removed)."""
    cdef int64_t l = lo + s.size
    cdef int64_t r = hi + s.size
    cdef double bv = INFINITY
    cdef int32_t ba = -1
    _push_path(s, l)
    _push_path(s, r - 1)
    while l < r:
        if l & 1:
            if _before(s.val[l], s.arg[l], bv, ba, s.tb):
                bv = s.val[l]
                ba = s.arg[l]
            l += 1
        if r & 1:
            r -= 1
            if _before(s.val[r], s.arg[r], bv, ba, s.tb):
                bv = s.val[r]
                ba = s.arg[r]
        l >>= 1
        r >>= 1
    key[0] = bv
    return ba


cdef inline void _add(seg_t* s, int64_t lo, int64_t hi, double z) noexcept nogil:
    """Add z to the keys of leaves lo .. hi - 1."""
    cdef int64_t l = lo + s.size
    cdef int64_t r = hi + s.size
    cdef int64_t l0 = l, r0 = r - 1
    while l < r:
        if l & 1:
            _apply(s, l, z)
            l += 1
        if r & 1:
            r -= 1
            _apply(s, r, z)
        l >>= 1
        r >>= 1
    _pull_path(s, l0)
    _pull_path(s, r0)


cdef inline void _remove(seg_t* s, int64_t j) noexcept nogil:
    s.val[j + s.size] = INFINITY
    s.arg[j + s.size] = -1
    _pull_path(s, j + s.size)


cdef int64_t _cover_by_halves(const int64_t[::1] pnode, const int64_t[::1] depth,
                              const int64_t[::1] starts, const int64_t[::1] top_depth,
                              const double[::1] cost, const int64_t[::1] tie,
                              int32_t[::1] order, int32_t[::1] rank, int32_t[::1] prank,
                              int32_t[::1] kids, int32_t[::1] cursor, int32_t[::1] stack,
                              int32_t[::1] drank, int32_t[::1] hptr, int32_t[::1] hstart,
                              int32_t[::1] horig, int32_t[::1] htop, seg_t* s,
                              int32_t[::1] best, double[::1] total, int32_t[::1] alive,
                              uint8_t[::1] claimed, uint8_t[::1] chosen_r,
                              int64_t[::1] best_out, double[::1] total_out,
                              uint8_t[::1] chosen_out, int32_t[::1] first) noexcept nogil:
    cdef int64_t n = pnode.shape[0]
    cdef int64_t H = cost.shape[0]
    cdef int64_t i, k, v, lo, hi
    cdef int32_t p, y, sr, h, j
    cdef double m
    # children before parents: depth-first postorder, children by node id, so that every
    # subtree is a range of ranks and the halves starting in it a range of leaves
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
        sr = rank[starts[h]]
        j = hptr[sr]
        hptr[sr] += 1
        horig[j] = h
        hstart[j] = sr
        htop[j] = <int32_t>top_depth[h]
        s.val[s.size + j] = cost[h]
        s.arg[s.size + j] = j
        s.tb[j].tie = tie[h]
        s.tb[j].half = h
        claimed[j] = 0
        chosen_r[j] = 0
    for i in range(n, 0, -1):
        hptr[i] = hptr[i - 1]
    hptr[0] = 0
    for k in range(s.size + H, 2 * s.size):
        s.val[k] = INFINITY
        s.arg[k] = -1
    for k in range(s.size - 1, 0, -1):
        s.tag[k] = 0.0
        _pull(s, k)
    for i in range(n):
        best[i] = -1
        total[i] = 0.0
        alive[i] = -1
    # the programme, children first: f(v) = S(v) + the least key of the halves from v's subtree
    # still running above v, where S(v) (in total[v] on arrival) sums the children's f and a
    # half's key is its cost minus the least keys taken at the nodes it passed
    for i in range(n):
        p = prank[i]
        if p < 0:
            continue                                 # a tree top: no link above it
        lo = hptr[stack[i]]
        hi = hptr[i + 1]
        if lo < hi:
            while True:
                j = _least(s, lo, hi, &m)
                if j < 0 or htop[j] < drank[i]:
                    break
                _remove(s, j)                        # ends at v: covers nothing above
            if j >= 0:
                best[i] = j
                total[i] += m
                if m != 0.0:
                    _add(s, lo, hi, -m)
        total[p] += total[i]
    for i in range(n - 1, -1, -1):                  # from the top down
        h = alive[i] if alive[i] >= 0 else best[i]
        if h < 0:
            continue
        alive[i] = h
        sr = hstart[h]
        if sr == i:
            chosen_r[h] = 1
        elif not claimed[h]:
            claimed[h] = 1
            y = sr
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
    return (np.empty(n + 1, dtype=np.int32),) + tuple([np.empty(n, dtype=np.int32)
                                                       for _ in range(6)])


def cover_by_halves(const int64_t[::1] pnode, const int64_t[::1] depth,
                    const int64_t[::1] starts, const int64_t[::1] top_depth,
                    const double[::1] cost, const int64_t[::1] tie):
    """The cheapest covering of a rooted forest's links by upward paths ("halves"), exactly.

    Half ``h`` runs from node ``starts[h]`` up to an ancestor at depth ``top_depth[h]`` (less
    than the start's) and covers the links on the way; it costs ``cost[h]`` (>= 0).  Nodes are
    taken children first (a depth-first postorder), so the halves starting in a subtree are one
    range of a segment tree's leaves: each node takes the least key among those still running
    above it (the cheapest cover of the subtree that uses the half, minus the children's
    covers; halves that end at the node are removed as they come up), and subtracts it from
    the range.  O((V + H) log H) after the postorder and a counting sort of the halves by
    start; ties by ``tie``, then half index.  Fewer than 2**31 nodes and halves.

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
    if n >= 2**31 - 1 or H >= 2**30:
        raise ValueError(f"cover_by_halves: at most 2**31 - 2 nodes and 2**30 - 1 halves, "
                         f"received {n} nodes and {H} halves.")
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
    cdef int64_t size = 1
    cdef int32_t levels = 0
    while size < H:
        size *= 2
        levels += 1
    hptr, kids, cursor, stack, order, rank, first = _postorder_scratch(n)
    prank = np.empty(max(n, 1), dtype=np.int32)
    drank = np.empty(max(n, 1), dtype=np.int32)
    hstart = np.empty(H, dtype=np.int32)
    horig = np.empty(H, dtype=np.int32)
    htop = np.empty(H, dtype=np.int32)
    val = np.empty(2 * size, dtype=np.float64)
    tag = np.empty(size, dtype=np.float64)
    arg = np.empty(2 * size, dtype=np.int32)
    ties = np.empty((max(H, 1), sizeof(tie_t) // 8), dtype=np.int64)
    best_r = np.empty(max(n, 1), dtype=np.int32)
    total_r = np.empty(max(n, 1), dtype=np.float64)
    alive = np.empty(n, dtype=np.int32)
    claimed = np.empty(H, dtype=np.uint8)
    chosen_r = np.empty(H, dtype=np.uint8)
    best = np.empty(n, dtype=np.int64)
    total = np.empty(n, dtype=np.float64)
    chosen = np.empty(H, dtype=np.uint8)
    cdef double[::1] vv = val, tv = tag
    cdef int32_t[::1] av = arg
    cdef int64_t[:, ::1] tiv = ties
    cdef seg_t seg
    seg.val = &vv[0]
    seg.tag = &tv[0]
    seg.arg = &av[0]
    seg.tb = <tie_t*>&tiv[0, 0]
    seg.size = size
    seg.levels = levels
    cdef int32_t[::1] od = order, rk = rank, pr = prank, dr = drank, hp = hptr, hs = hstart
    cdef int32_t[::1] ki = kids, cu = cursor, sk = stack, ht = htop
    cdef int32_t[::1] ho = horig, be = best_r, al = alive, fi = first
    cdef double[::1] to = total_r, to_out = total
    cdef int64_t[::1] be_out = best
    cdef uint8_t[::1] cl = claimed, ch = chosen_r, ch_out = chosen
    cdef int64_t reached
    with nogil:
        reached = _cover_by_halves(pnode, depth, starts, top_depth, cost, tie, od, rk, pr, ki,
                                   cu, sk, dr, hp, hs, ho, ht, &seg, be,
                                   to, al, cl, ch, be_out, to_out, ch_out, fi)
    if reached != n:
        raise ValueError(f"cover_by_halves: pnode is not a forest: {n - reached} nodes lie on "
                         f"cycles of parent links.")
    return best, total, chosen.view(bool)
