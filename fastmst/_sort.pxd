# Sort records shared by the radix sort and the Kruskal kernels (cimport them).
#
# A record holds an order-preserving unsigned key of an edge weight (already shifted so the
# smallest key is 0, and complemented for a maximum forest) and the edge's input position.  The
# records are ordered by the 96-bit composite (key, pos): every edge has a distinct composite, so
# the order is total and any correct sort, stable or not, gives the one order of the tie rule.
from libc.stdint cimport uint32_t, uint64_t


cdef packed struct Rec:
    uint64_t key
    uint32_t pos


cdef inline bint rec_less(const Rec* x, const Rec* y) noexcept nogil:
    return x.key < y.key or (x.key == y.key and x.pos < y.pos)


cdef extern from *:
    """
    #if defined(__GNUC__) || defined(__clang__)
    #define FASTMST_PREFETCH(p) __builtin_prefetch((const void*)(p))
    #else
    #define FASTMST_PREFETCH(p) ((void)0)
    #endif
    """
    void prefetch "FASTMST_PREFETCH"(const void* p) noexcept nogil


cdef void sort_records(Rec* a, Py_ssize_t n, int top_bits) noexcept nogil
cdef Py_ssize_t split_top(Rec* a, Py_ssize_t n, int top_bits, Py_ssize_t* bounds,
                          int* next_shift) noexcept nogil
cdef void sort_bucket(Rec* a, Py_ssize_t n, int shift) noexcept nogil
