# The row passes of the label kernel (fastmst/_kernels/labels.pyx): the hash of a label and
# the passes over one block of piece positions that hash the rows (counting them per partition)
# and scatter them into their partitions.  Cimported by labels.pyx only.
from libc.stdint cimport int32_t, int64_t, uint8_t, uint32_t, uint64_t
from libc.string cimport memcpy


cdef extern from *:
    """
    #if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__
    #define FASTMST_LITTLE_ENDIAN 1
    #else
    #define FASTMST_LITTLE_ENDIAN 0
    #endif
    #if defined(__GNUC__) || defined(__clang__)
    #define FASTMST_POPCOUNT64(x) __builtin_popcountll(x)
    #else
    static inline int FASTMST_POPCOUNT64(uint64_t x) {
        int n = 0; while (x) { x &= x - 1; n++; } return n;
    }
    #endif
    """
    const bint LITTLE_ENDIAN "FASTMST_LITTLE_ENDIAN"
    int popcount64 "FASTMST_POPCOUNT64"(uint64_t x) noexcept nogil


ctypedef fused offset_t:
    int32_t
    int64_t

ctypedef struct Entry:
    uint64_t h
    const uint8_t* ptr
    uint32_t length
    uint32_t row        # position within the piece



cdef inline uint64_t _mix(uint64_t x) noexcept nogil:
    """A bijection of 64-bit words (xor-shift / odd-multiply rounds)."""
    x ^= x >> 32
    x *= <uint64_t>0xd6e8feb86659fd93ULL
    x ^= x >> 32
    x *= <uint64_t>0xd6e8feb86659fd93ULL
    x ^= x >> 32
    return x


cdef inline uint64_t _hash(const uint8_t *p, Py_ssize_t n, bint room) noexcept nogil:
    """64-bit hash of ``n`` bytes; for n <= 8 a bijection of the zero-padded bytes.  ``room``:
    8 bytes may be read from ``p`` (then, on little-endian machines, short labels are one load
    and a mask)."""
    cdef uint64_t w = 0, h
    cdef Py_ssize_t i = 0
    if n <= 8:
        if room and LITTLE_ENDIAN:
            memcpy(&w, p, 8)
            if n < 8:
                w &= ((<uint64_t>1) << (8 * n)) - 1
        elif n:
            memcpy(&w, p, n)
        return _mix(w)
    h = <uint64_t>n * <uint64_t>0x9e3779b97f4a7c15ULL
    while i + 8 <= n:
        memcpy(&w, p + i, 8)
        h = (h ^ _mix(w)) * <uint64_t>0xff51afd7ed558ccdULL
        i += 8
    if i < n:
        w = 0
        memcpy(&w, p + i, n - i)
        h = (h ^ _mix(w)) * <uint64_t>0xff51afd7ed558ccdULL
    return _mix(h ^ (h >> 29))


# ---------------------------------------------------------------------------------------------
# row passes over a piece: position blocks taken by the threads, each over its segments (row
# ranges of one chunk)

ctypedef struct Seg:
    const void* offs        # the chunk's offsets from the segment's first row (int32 or int64)
    const uint8_t* data     # the chunk's bytes
    Py_ssize_t size         # bytes readable from data
    Py_ssize_t at           # piece position of the segment's first row
    Py_ssize_t n            # rows
    Py_ssize_t wide         # 1: int64 offsets, 0: int32 (every field pointer-sized: a row of an
                            # intp array is one Seg)


cdef inline void _hash_span(const offset_t* offs, const uint8_t* data, Py_ssize_t size,
                            Py_ssize_t i0, Py_ssize_t i1, uint64_t* hrow,
                            Py_ssize_t* hb) noexcept nogil:
    cdef Py_ssize_t i, a
    cdef uint64_t h
    for i in range(i0, i1):
        a = offs[i]
        h = _hash(data + a, offs[i + 1] - a, a + 8 <= size)
        hrow[i] = h
        hb[h >> 56] += 1


cdef inline void _scatter_span(const offset_t* offs, const uint8_t* data, Py_ssize_t i0,
                               Py_ssize_t i1, Py_ssize_t at, const uint64_t* hrow,
                               Py_ssize_t* ob, Entry* ent, uint8_t* part) noexcept nogil:
    cdef Py_ssize_t i, a, j
    cdef uint64_t h
    for i in range(i0, i1):
        a = offs[i]
        h = hrow[i]
        j = ob[h >> 56]
        ob[h >> 56] = j + 1
        ent[j].h = h
        ent[j].ptr = data + a
        ent[j].length = <uint32_t>(offs[i + 1] - a)
        ent[j].row = <uint32_t>(at + i)
        part[i] = <uint8_t>(h >> 56)


cdef inline void _row_block(const Seg* segs, Py_ssize_t nseg, Py_ssize_t k0, Py_ssize_t k1,
                            uint64_t* hrow, Py_ssize_t* cnt, Entry* ent, uint8_t* part,
                            bint scatter) noexcept nogil:
    """Hash (``scatter`` False: count per partition in ``cnt``) or scatter (``cnt``: the next
    entry of each partition) the piece positions ``k0..k1-1``."""
    cdef Py_ssize_t s, i0, i1
    cdef const Seg* g
    for s in range(nseg):
        g = &segs[s]
        if g.at + g.n <= k0 or g.at >= k1:
            continue
        i0 = k0 - g.at if k0 > g.at else 0
        i1 = k1 - g.at if k1 < g.at + g.n else g.n
        if scatter:
            if g.wide:
                _scatter_span(<const int64_t*>g.offs, g.data, i0, i1, g.at, hrow + g.at, cnt,
                              ent, part + g.at)
            else:
                _scatter_span(<const int32_t*>g.offs, g.data, i0, i1, g.at, hrow + g.at, cnt,
                              ent, part + g.at)
        elif g.wide:
            _hash_span(<const int64_t*>g.offs, g.data, g.size, i0, i1, hrow + g.at, cnt)
        else:
            _hash_span(<const int32_t*>g.offs, g.data, g.size, i0, i1, hrow + g.at, cnt)
