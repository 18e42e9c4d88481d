# Pairs listed under both of their ends (compressed sparse rows): the counting and prefix sums
# that the kernels building adjacency lists from endpoint arrays share (forest links in
# paths.root_forest, candidate links in treewalk.adjacency, ancestor queries in
# halves.common_ancestors).  Usage: ``pair_offsets``, then fill every slot of each pair's two
# ends, advancing ``ptr[end]`` at each fill, then ``shift_back``.
from libc.stdint cimport int32_t, int64_t

from fastmst._kernels._typedefs cimport index_t

ctypedef fused slot_t:
    int32_t
    int64_t


cdef inline void pair_offsets(const index_t[::1] a, const index_t[::1] b,
                              slot_t[::1] ptr) noexcept nogil:
    """``ptr[v]``: the first slot of node v (``ptr`` has one entry per node plus one), every
    pair (a[k], b[k]) counted under both ends."""
    cdef Py_ssize_t n = ptr.shape[0] - 1
    cdef Py_ssize_t m = a.shape[0]
    cdef Py_ssize_t i
    for i in range(n + 1):
        ptr[i] = 0
    for i in range(m):
        ptr[a[i] + 1] += 1
        ptr[b[i] + 1] += 1
    for i in range(n):
        ptr[i + 1] += ptr[i]


cdef inline void shift_back(slot_t[::1] ptr) noexcept nogil:
    """After the fills (each advancing its node's entry to the next node's first slot):
    ``ptr`` back to every node's first slot."""
    cdef Py_ssize_t i
    for i in range(ptr.shape[0] - 1, 0, -1):
        ptr[i] = ptr[i - 1]
    ptr[0] = 0
