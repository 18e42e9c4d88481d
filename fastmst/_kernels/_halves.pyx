"""Compiled kernels of backup links (``fastmst.design.redundancy``): offline lowest common
ancestors and the cover of a rooted forest's links by upward halves of candidate links.  The
method notes are in ``halves.py``, which checks the inputs with NumPy, allocates every work and
output array and assembles the results; the ``def``s here (``common_ancestors``,
``cover_by_halves``) take those arrays, check that their lengths agree, release the GIL and
run the ``noexcept nogil`` kernels.

Both take the nodes in a depth-first postorder (``_postorder``), children in node-id order.
Inputs are int64 (node ids, parents, depths) and float64 (costs); int32 inside.
"""
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


# cover_by_halves works in "rank space": nodes renumbered in the order they are taken (children
# before parents: a depth-first postorder, children by node id) and halves renumbered by the
# rank of their start, so every subtree is a range of ranks and the halves starting in it one
# range of leaves of a segment tree.  The dynamic programme then needs only three operations on
# that range: the least key (ties by the caller's tie value, then half index), adding a number
# to every key, and removing one half.  The tree is the iterative one with add tags kept at
# the nodes (a node's value is the least of its children's plus its own tag), so an operation
# touches O(log H) nodes near the two ends of the range, and the ranges of consecutive nodes
# lie side by side: the nodes touched stay in cache.  Ids are int32 inside (halves.py refuses
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


# ---------------------------------------------------------------------------- the thin defs
# halves.py has checked the values (parents, pair ends and starts are nodes, sizes below
# 2**31) and allocated every array; these check only that the lengths agree, so that the
# kernels stay inside the arrays.

def common_ancestors(const int64_t[::1] pnode, const int64_t[::1] a, const int64_t[::1] b,
                     int32_t[::1] cptr, int32_t[::1] kids, int32_t[::1] cursor,
                     int32_t[::1] stack, int32_t[::1] order, int32_t[::1] rank,
                     int32_t[::1] first, int32_t[::1] qptr, int32_t[::1] qlist,
                     int32_t[::1] dsu, uint8_t[::1] done, int64_t[::1] out, /):
    """Lowest common ancestors of the pairs (a[k], b[k]) into ``out`` (``halves.py``'s
    ``common_ancestors`` checks and allocates).  Work arrays: cptr and qptr n + 1 entries,
    qlist 2q, the others n; out q.  Returns -1 when done, -2 when the parent links form a
    cycle, else the first pair k that joins two trees."""
    cdef Py_ssize_t n = pnode.shape[0]
    cdef Py_ssize_t q = a.shape[0]
    cdef int64_t bad
    if (b.shape[0] != q or out.shape[0] != q or qlist.shape[0] != 2 * q
            or cptr.shape[0] != n + 1 or qptr.shape[0] != n + 1 or kids.shape[0] != n
            or cursor.shape[0] != n or stack.shape[0] != n or order.shape[0] != n
            or rank.shape[0] != n or first.shape[0] != n or dsu.shape[0] != n
            or done.shape[0] != n):
        raise ValueError("_halves.common_ancestors: arrays of the wrong lengths; expected a, b "
                         "and out of q entries, qlist 2q, cptr and qptr n + 1, the other work "
                         "arrays n (n = len(pnode)).  Call fastmst._kernels.halves."
                         "common_ancestors, which allocates them.")
    if n == 0:
        return -1
    with nogil:
        bad = _common_ancestors(pnode, a, b, cptr, kids, cursor, stack, order, rank, first,
                                qptr, qlist, dsu, done, out)
    return bad


def cover_by_halves(const int64_t[::1] pnode, const int64_t[::1] depth,
                    const int64_t[::1] starts, const int64_t[::1] top_depth,
                    const double[::1] cost, const int64_t[::1] tie, int32_t[::1] order,
                    int32_t[::1] rank, int32_t[::1] prank, int32_t[::1] kids,
                    int32_t[::1] cursor, int32_t[::1] stack, int32_t[::1] drank,
                    int32_t[::1] hptr, int32_t[::1] hstart, int32_t[::1] horig,
                    int32_t[::1] htop, double[::1] val, double[::1] tag, int32_t[::1] arg,
                    int64_t[:, ::1] ties, int32_t[::1] best_r, double[::1] total_r,
                    int32_t[::1] alive, uint8_t[::1] claimed, uint8_t[::1] chosen_r,
                    int64_t[::1] best, double[::1] total, uint8_t[::1] chosen,
                    int32_t[::1] first, /):
    """The cheapest cover by halves into ``best``, ``total`` and ``chosen`` (``halves.py``'s
    ``cover_by_halves`` checks and allocates).  Work arrays: hptr n + 1 entries, the other
    node arrays n (prank, drank, best_r and total_r at least 1), the half arrays H; the segment
    tree over ``size`` leaves (a power of two >= H): tag size, val and arg 2 size, ties
    max(H, 1) rows of 2 (tie, half).  Returns the number of nodes the postorder reached (n
    unless parent links form a cycle)."""
    cdef Py_ssize_t n = pnode.shape[0]
    cdef Py_ssize_t H = cost.shape[0]
    cdef Py_ssize_t m = n if n > 1 else 1
    cdef seg_t seg
    cdef int64_t reached
    seg.size = tag.shape[0]
    seg.levels = 0
    while (<int64_t>1 << seg.levels) < seg.size:
        seg.levels += 1
    if (depth.shape[0] != n or best.shape[0] != n or total.shape[0] != n
            or order.shape[0] != n or rank.shape[0] != n or kids.shape[0] != n
            or cursor.shape[0] != n or stack.shape[0] != n or alive.shape[0] != n
            or first.shape[0] != n or hptr.shape[0] != n + 1 or prank.shape[0] < m
            or drank.shape[0] < m or best_r.shape[0] < m or total_r.shape[0] < m
            or starts.shape[0] != H or top_depth.shape[0] != H or tie.shape[0] != H
            or hstart.shape[0] != H or horig.shape[0] != H or htop.shape[0] != H
            or claimed.shape[0] != H or chosen_r.shape[0] != H or chosen.shape[0] != H
            or seg.size < 1 or seg.size < H or (<int64_t>1 << seg.levels) != seg.size
            or val.shape[0] != 2 * seg.size or arg.shape[0] != 2 * seg.size
            or ties.shape[0] < H or ties.shape[0] < 1
            or ties.shape[1] * sizeof(int64_t) != sizeof(tie_t)):
        raise ValueError("_halves.cover_by_halves: arrays of the wrong lengths; expected the "
                         "node arrays of n entries (hptr n + 1), the half arrays of H, tag a "
                         "power of two >= H, val and arg twice that, ties (max(H, 1), 2).  "
                         "Call fastmst._kernels.halves.cover_by_halves, which allocates them.")
    seg.val = &val[0]
    seg.tag = &tag[0]
    seg.arg = &arg[0]
    seg.tb = <tie_t*>&ties[0, 0]
    with nogil:
        reached = _cover_by_halves(pnode, depth, starts, top_depth, cost, tie, order, rank,
                                   prank, kids, cursor, stack, drank, hptr, hstart, horig,
                                   htop, &seg, best_r, total_r, alive, claimed, chosen_r,
                                   best, total, chosen, first)
    return reached
