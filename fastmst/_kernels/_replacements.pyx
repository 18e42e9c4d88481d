"""The compiled kernel of single-link failures (``fastmst.design.failures``): the first
covering link of every forest link.  The method notes are in ``replacements.py``, which checks
the inputs with NumPy, allocates the node records and assembles the cover of every link; the
``def`` here (``first_covers``) takes those arrays, checks that their lengths agree, releases
the GIL and runs the ``noexcept nogil`` kernel.
"""
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


def first_covers(const int64_t[::1] pnode, const int64_t[::1] depth, const index_t[::1] tail,
                 const index_t[::1] head, const int64_t[::1] ranked, int32_t[:, ::1] records, /):
    """The first covering link of every node's link to its parent, into ``records`` (one
    8-word walk_t per node, at least one row; the cover is word 4), as an index into
    ``ranked`` (``replacements.py``'s ``first_covers`` checks the values and allocates).
    Returns -1 when done, else the index into ``ranked`` of the first link that joins two
    trees."""
    cdef Py_ssize_t n = pnode.shape[0]
    cdef int64_t bad
    if (depth.shape[0] != n or head.shape[0] != tail.shape[0] or records.shape[0] < n
            or records.shape[0] < 1 or records.shape[1] * sizeof(int32_t) != sizeof(walk_t)):
        raise ValueError("_replacements.first_covers: arrays of the wrong lengths; expected "
                         "pnode and depth of one length n, tail and head of one length, records "
                         "(max(n, 1), 8).  Call fastmst._kernels.replacements.first_covers, "
                         "which allocates them.")
    with nogil:
        bad = _first_covers(pnode, depth, tail, head, ranked, <walk_t*>&records[0, 0])
    return bad
