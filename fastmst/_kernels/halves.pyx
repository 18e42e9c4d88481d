"""Covering a rooted forest's links by the halves of candidate links: the kernels of backup
links (``fastmst.design.redundancy``).

``common_ancestors``
    Lowest common ancestors of node pairs, offline (Tarjan 1979): where each candidate link is
    cut into its two halves (each end up to the common ancestor).
``cover_by_halves``
    The cheapest cover of the forest's links by those upward halves, by a dynamic programme
    with mergeable heaps (the arborescence step of Frederickson and JaJa's 2-approximation).

Both take the nodes in a depth-first postorder (``_postorder``), children in node-id order.
Inputs are int64 (node ids, parents, depths) and float64 (costs); int32 inside.
"""
import numpy as np
from cython.parallel cimport prange
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
