# The one union-find family of the kernels (cimport these; they are inline and nogil).
#
# Two layouts of one structure, side by side.  Both find with true path compression (a first
# pass walks to the root, a second re-points every node on the path straight at it) and link
# by rank (a rank-r root has at least 2**r members, so ranks stay below 64).  They work on raw
# pointers into arrays that the calling kernel owns, so hot loops pay no memoryview reference
# counting.
#
#                    rank array (dsu_*)                 rank in the parent word (rp_*)
#   a root x         parent[x] == x                     parent[x] == -1 - rank(x)  (< 0)
#   rank             separate uint8 array               in the root's own word
#   used by          DisjointSet, Kruskal scans,        Filter-Kruskal (a find and the link
#                    merge trees and path covers,       after it read nothing but the parent
#                    Borůvka's hook forest (find only)  array: two scattered reads fewer per
#                                                       accepted edge)
#   convert          -                                  rp_standard_parents turns it into the
#                                                       parent[root] == root form
#
# label_first_appearance numbers the components 0..k-1 in order of first appearance; every
# labelling of components in the library goes through it.
from libc.stdint cimport int32_t, int64_t, uint8_t
from fastmst._kernels._typedefs cimport index_t


# ----------------------------------------------------------------- rank array: parent[root] == root

cdef inline index_t dsu_find(index_t* parent, index_t x) noexcept nogil:
    cdef index_t root = x
    cdef index_t nxt
    while parent[root] != root:
        root = parent[root]
    while parent[x] != root:
        nxt = parent[x]
        parent[x] = root
        x = nxt
    return root


cdef inline index_t dsu_link(index_t* parent, uint8_t* rank, index_t ra, index_t rb) noexcept nogil:
    """Link two distinct roots by rank; return the new root."""
    if rank[ra] < rank[rb]:
        parent[ra] = rb
        return rb
    if rank[ra] == rank[rb]:
        rank[ra] += 1
    parent[rb] = ra
    return ra


cdef inline bint dsu_union(index_t* parent, uint8_t* rank, index_t a, index_t b) noexcept nogil:
    """Merge the sets of a and b; True when they were different sets."""
    cdef index_t ra = dsu_find(parent, a)
    cdef index_t rb = dsu_find(parent, b)
    if ra == rb:
        return False
    dsu_link(parent, rank, ra, rb)
    return True


# ------------------------------------------------------ rank in the parent word: parent[root] < 0

cdef inline index_t rp_root(const index_t* parent, index_t x) noexcept nogil:
    """Root of x without path compression (read only: safe for several threads at once)."""
    while parent[x] >= 0:
        x = parent[x]
    return x


cdef inline index_t rp_find(index_t* parent, index_t x) noexcept nogil:
    """Root of x, with true path compression."""
    cdef index_t root = x, nxt
    while parent[root] >= 0:
        root = parent[root]
    while x != root:
        nxt = parent[x]
        parent[x] = root
        x = nxt
    return root


cdef inline void rp_link(index_t* parent, index_t ra, index_t rb) noexcept nogil:
    """Link two distinct roots by rank (stored as -1 - rank in the root's word)."""
    if parent[ra] > parent[rb]:
        parent[ra] = rb
    else:
        if parent[ra] == parent[rb]:
            parent[ra] -= 1
        parent[rb] = ra


cdef inline void rp_standard_parents(index_t* parent, Py_ssize_t n) noexcept nogil:
    """In place: every root word (-1 - rank) becomes the root's own id."""
    cdef Py_ssize_t x
    for x in range(n):
        if parent[x] < 0:
            parent[x] = <index_t>x


# -------------------------------------------------------------------- component labels

cdef inline int64_t label_first_appearance(const index_t* ids, Py_ssize_t n, int64_t* table,
                                           int64_t* out) noexcept nogil:
    """OUT: ``out[i]``, the number of the id ``ids[i]`` in order of first appearance (0, 1, ...).

    SCRATCH: ``table``, one entry per possible id, all -1 on entry.  Returns the number of
    distinct ids.
    """
    cdef Py_ssize_t i
    cdef int64_t k = 0
    for i in range(n):
        if table[ids[i]] < 0:
            table[ids[i]] = k
            k += 1
        out[i] = table[ids[i]]
    return k

