# Sort records shared by the radix sort and the Kruskal kernels (cimport them).
#
# A record holds an order-preserving unsigned key of an edge weight (already shifted so the
# smallest key is 0, and complemented for a maximum forest) and the edge's input position.  The
# records are ordered by the 96-bit composite (key, pos): every edge has a distinct composite, so
# the order is total and any correct sort, stable or not, gives the one order of the tie rule.
from cython.parallel cimport prange
from libc.stdint cimport uint32_t, uint64_t

from fastmst._kernels.tie_rule cimport ukey_t, rank_key


cdef packed struct Rec:
    uint64_t key
    uint32_t pos


cdef inline bint rec_less(const Rec* x, const Rec* y) noexcept nogil:
    return x.key < y.key or (x.key == y.key and x.pos < y.pos)


cdef void sort_records(Rec* a, Py_ssize_t n, int top_bits) noexcept nogil
cdef void split_top(Rec* a, Py_ssize_t n, int top_bits, Py_ssize_t* bounds,
                    int* next_shift) noexcept nogil
cdef void sort_bucket(Rec* a, Py_ssize_t n, int shift) noexcept nogil


cdef inline Py_ssize_t digit_kp(uint64_t key, uint32_t pos, int s, uint64_t mask) noexcept nogil:
    if s >= 32:
        return <Py_ssize_t>((key >> (s - 32)) & mask)
    return <Py_ssize_t>(((key << (32 - s)) | (<uint64_t>pos >> s)) & mask)


cdef inline void digit_hist(const ukey_t* bits, Py_ssize_t m, int kind, bint comp, uint64_t kmin,
                            int s, Py_ssize_t* hist, Py_ssize_t nblk, int threads) noexcept nogil:
    """OUT: ``hist[t * 2048 + d]``, the edges of position block t (positions
    ``m*t//nblk .. m*(t+1)//nblk - 1``) in bucket d; blocks are taken by the threads dynamically."""
    cdef Py_ssize_t t, i, lo, hi
    cdef Py_ssize_t* h
    for i in range(nblk * 2048):
        hist[i] = 0
    for t in prange(nblk, num_threads=threads, schedule="dynamic"):
        lo = m * t // nblk
        hi = m * (t + 1) // nblk
        h = hist + t * 2048
        for i in range(lo, hi):
            h[digit_kp(rank_key(bits[i], kind, comp) - kmin, <uint32_t>i, s, 0x7FF)] += 1
