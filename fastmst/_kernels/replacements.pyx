"""First covering links of a rooted forest's links: for single-link failures
(``fastmst.design.failures``), the replacement of every forest link.

``first_covers``
    For every forest link, the first of a list of links whose tree path holds it (Tarjan
    1982), by a disjoint set that jumps over the links already covered.
"""
import numpy as np
from libc.stdint cimport int32_t, int64_t

from fastmst._kernels._atomics cimport prefetch
from fastmst._kernels._typedefs cimport index_t


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
            prefetch(&tail[ranked[j + 32]])
            prefetch(&head[ranked[j + 32]])
        if j + 16 < q:
            prefetch(&nd[tail[ranked[j + 16]]])
            prefetch(&nd[head[ranked[j + 16]]])
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
