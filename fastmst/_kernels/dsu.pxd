# Disjoint-set primitives shared by every kernel (cimport them; they are inline and nogil).
#
# find: true path compression -- a first pass walks to the root, a second pass re-points every
# node on the path directly at the root.  union: by rank (ranks fit in uint8: a rank-r root has at
# least 2**r members).  The primitives work on raw pointers into arrays that the calling kernel
# owns, so they add no memoryview reference counting inside hot loops.
from libc.stdint cimport int32_t, int64_t, uint8_t
from fastmst._kernels._typedefs cimport index_t


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


cdef class DisjointSet:
    cdef readonly object _parent
    cdef readonly object _rank
    cdef readonly object _size
    cdef readonly Py_ssize_t n
    cdef Py_ssize_t _n_sets
    cdef bint _wide
