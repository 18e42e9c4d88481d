"""Covering a rooted forest's links by the halves of candidate links: the kernels of backup
links (``fastmst.design.redundancy``).

``common_ancestors``
    Lowest common ancestors of node pairs, offline (Tarjan 1979): where each candidate link is
    cut into its two halves (each end up to the common ancestor).
``cover_by_halves``
    The cheapest cover of the forest's links by those upward halves, by a dynamic programme
    over a segment tree (the arborescence step of Frederickson and JaJa's 2-approximation).

This module checks the inputs with NumPy, allocates every work and output array and assembles
the results; the compiled ``_halves`` holds the kernels, behind thin ``def``s that take those
arrays.  Inputs are int64 (node ids, parents, depths) and float64 (costs); int32 inside.
"""
import numpy as np

from fastmst._kernels import _halves

# int64 words in one leaf's tie record of the segment tree (_halves.pyx's tie_t: tie, half)
_TIE_WORDS = 2


def _postorder_scratch(n):
    """The int32 work arrays of the depth-first postorder over n nodes: (child offsets, kids,
    cursor, stack, order, rank, first)."""
    return (np.empty(n + 1, dtype=np.int32),) + tuple([np.empty(n, dtype=np.int32)
                                                       for _ in range(6)])


def int64_vector(func, name, x):
    """x as a one-dimensional int64 array (no copy), refused with a ValueError otherwise, so
    that the NumPy checks below index with it only when the kernel would accept it too."""
    arr = np.asarray(x)
    if arr.ndim != 1 or arr.dtype != np.int64:
        raise ValueError(f"{func}: {name} must be a one-dimensional int64 array, received "
                         f"{arr.ndim} dimension(s) of {arr.dtype}; convert it with "
                         f"np.ascontiguousarray({name}, dtype=np.int64).")
    return arr


def common_ancestors(pnode, a, b):
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
    pnode = int64_vector("common_ancestors", "pnode", pnode)
    a = int64_vector("common_ancestors", "a", a)
    b = int64_vector("common_ancestors", "b", b)
    n = pnode.shape[0]
    q = a.shape[0]
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
    out = np.empty(q, dtype=np.int64)
    if n == 0:
        return out
    cptr, kids, cursor, stack, order, rank, first = _postorder_scratch(n)
    qptr = np.empty(n + 1, dtype=np.int32)
    qlist = np.empty(2 * q, dtype=np.int32)
    dsu = np.empty(n, dtype=np.int32)
    done = np.empty(n, dtype=np.uint8)
    bad = _halves.common_ancestors(pnode, a, b, cptr, kids, cursor, stack, order, rank, first,
                                   qptr, qlist, dsu, done, out)
    if bad == -2:
        raise ValueError("common_ancestors: pnode is not a forest: parent links form a cycle.")
    if bad >= 0:
        raise ValueError(f"common_ancestors: the pair {bad} ({a[bad]}, {b[bad]}) joins two "
                         f"trees.")
    return out


def cover_by_halves(pnode, depth, starts, top_depth, cost, tie):
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
    pn = int64_vector("cover_by_halves", "pnode", pnode)
    dp = int64_vector("cover_by_halves", "depth", depth)
    st = int64_vector("cover_by_halves", "starts", starts)
    td = int64_vector("cover_by_halves", "top_depth", top_depth)
    n = pn.shape[0]
    H = np.shape(cost)[0] if np.ndim(cost) else 0
    if dp.shape[0] != n:
        raise ValueError("cover_by_halves: pnode and depth must have one length.")
    if st.shape[0] != H or td.shape[0] != H or np.shape(tie)[:1] != (H,):
        raise ValueError("cover_by_halves: starts, top_depth, cost and tie must have one "
                         "length.")
    if n >= 2**31 - 1 or H >= 2**30:
        raise ValueError(f"cover_by_halves: at most 2**31 - 2 nodes and 2**30 - 1 halves, "
                         f"received {n} nodes and {H} halves.")
    if n and (int(np.min(pn)) < -1 or int(np.max(pn)) >= n):
        raise ValueError("cover_by_halves: parents must be -1 or nodes.")
    has = pn >= 0
    if n and (bool((dp[~has] != 0).any()) or bool((dp[has] != dp[pn[has]] + 1).any())):
        raise ValueError("cover_by_halves: depth must be 0 at tree tops and its parent's + 1 "
                         "elsewhere (as root_forest returns).")
    if H and (int(st.min()) < 0 or int(st.max()) >= n):
        raise ValueError("cover_by_halves: starts must be nodes.")
    if H and bool((td >= dp[st]).any() or (td < 0).any()):
        raise ValueError("cover_by_halves: every half must end above its start.")
    size = 1                                    # segment tree leaves: a power of two >= H
    while size < H:
        size *= 2
    m = max(n, 1)
    hptr, kids, cursor, stack, order, rank, first = _postorder_scratch(n)
    prank = np.empty(m, dtype=np.int32)
    drank = np.empty(m, dtype=np.int32)
    hstart = np.empty(H, dtype=np.int32)
    horig = np.empty(H, dtype=np.int32)
    htop = np.empty(H, dtype=np.int32)
    val = np.empty(2 * size, dtype=np.float64)
    tag = np.empty(size, dtype=np.float64)
    arg = np.empty(2 * size, dtype=np.int32)
    ties = np.empty((max(H, 1), _TIE_WORDS), dtype=np.int64)
    best_r = np.empty(m, dtype=np.int32)
    total_r = np.empty(m, dtype=np.float64)
    alive = np.empty(n, dtype=np.int32)
    claimed = np.empty(H, dtype=np.uint8)
    chosen_r = np.empty(H, dtype=np.uint8)
    best = np.empty(n, dtype=np.int64)
    total = np.empty(n, dtype=np.float64)
    chosen = np.empty(H, dtype=np.uint8)
    reached = _halves.cover_by_halves(pn, dp, st, td, cost, tie, order, rank, prank, kids,
                                      cursor, stack, drank, hptr, hstart, horig, htop, val,
                                      tag, arg, ties, best_r, total_r, alive, claimed,
                                      chosen_r, best, total, chosen, first)
    if reached != n:
        raise ValueError(f"cover_by_halves: pnode is not a forest: {n - reached} nodes lie on "
                         f"cycles of parent links.")
    return best, total, chosen.view(bool)
