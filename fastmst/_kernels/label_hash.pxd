# Label rows of Arrow string chunks, for the label kernel (_labels.pyx): the segment table
# (row ranges of one chunk, 6 pointer-sized words each), a row's bytes, and the 64-bit hash of a
# label (a bijection of the zero-padded bytes for labels of up to 8 bytes).
from libc.stdint cimport int32_t, int64_t, uint8_t, uint64_t
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
    #define FASTMST_CTZ64(x) __builtin_ctzll(x)
    #else
    static inline int FASTMST_POPCOUNT64(uint64_t x) {
        int n = 0; while (x) { x &= x - 1; n++; } return n;
    }
    static inline int FASTMST_CTZ64(uint64_t x) {
        int n = 0; while (!(x & 1)) { x >>= 1; n++; } return n;
    }
    #endif
    /* The low n bytes of a word, n = 0..8. */
    static const uint64_t fastmst_low_bytes[9] = {
        0x0ULL, 0xffULL, 0xffffULL, 0xffffffULL, 0xffffffffULL, 0xffffffffffULL,
        0xffffffffffffULL, 0xffffffffffffffULL, 0xffffffffffffffffULL};
    /* A bijection of 64-bit words (xor-shift / odd-multiply rounds). */
    static inline uint64_t fastmst_mix64(uint64_t x) {
        x ^= x >> 32;
        x *= 0xd6e8feb86659fd93ULL;
        x ^= x >> 32;
        x *= 0xd6e8feb86659fd93ULL;
        x ^= x >> 32;
        return x;
    }
    /* The hash of n bytes without reading past them (for n <= 8 the mix of the zero-padded
       bytes), out of line: in C so that the compiler is told not to inline it. */
    #if defined(__GNUC__) || defined(__clang__)
    __attribute__((noinline))
    #endif
    static uint64_t fastmst_hash_bytes(const uint8_t* p, Py_ssize_t n) {
        uint64_t w = 0, h;
        Py_ssize_t i = 0;
        if (n <= 8) {
            if (n) memcpy(&w, p, (size_t)n);
            return fastmst_mix64(w);
        }
        h = (uint64_t)n * 0x9e3779b97f4a7c15ULL;
        for (; i + 8 <= n; i += 8) {
            memcpy(&w, p + i, 8);
            h = (h ^ fastmst_mix64(w)) * 0xff51afd7ed558ccdULL;
        }
        if (i < n) {
            w = 0;
            memcpy(&w, p + i, (size_t)(n - i));
            h = (h ^ fastmst_mix64(w)) * 0xff51afd7ed558ccdULL;
        }
        return fastmst_mix64(h ^ (h >> 29));
    }
    """
    const bint LITTLE_ENDIAN "FASTMST_LITTLE_ENDIAN"
    const uint64_t* LOW_BYTES "fastmst_low_bytes"
    uint64_t mix64 "fastmst_mix64"(uint64_t x) noexcept nogil
    uint64_t hash_bytes "fastmst_hash_bytes"(const uint8_t* p, Py_ssize_t n) noexcept nogil
    int popcount64 "FASTMST_POPCOUNT64"(uint64_t x) noexcept nogil
    int ctz64 "FASTMST_CTZ64"(uint64_t x) noexcept nogil


ctypedef fused offset_t:
    int32_t
    int64_t


cdef inline uint64_t label_hash(const uint8_t *p, Py_ssize_t n, bint room) noexcept nogil:
    """64-bit hash of ``n`` bytes; for n <= 8 a bijection of the zero-padded bytes.  ``room``:
    8 bytes may be read from ``p`` (then, on little-endian machines, short labels are one load
    and a mask from a table, inlined and without a branch on the length; other labels go
    through hash_bytes, which stays out of line so that this stays small enough to inline into
    the row passes)."""
    cdef uint64_t w
    if n <= 8 and room and LITTLE_ENDIAN:
        memcpy(&w, p, 8)
        return mix64(w & LOW_BYTES[n])
    return hash_bytes(p, n)


ctypedef struct Seg:
    const void* offs        # the chunk's offsets from the segment's first row (int32 or int64)
    const uint8_t* data     # the chunk's bytes
    Py_ssize_t size         # bytes readable from data
    Py_ssize_t at           # piece position of the segment's first row
    Py_ssize_t n            # rows
    Py_ssize_t wide         # 1: int64 offsets, 0: int32 (every field pointer-sized: a row of an
                            # intp array is one Seg)


cdef enum:
    SEG_SHIFT = 10          # row_bytes: the segment of each 1024-row block of a piece is listed


cdef inline const uint8_t* row_bytes(const Seg* segs, const Py_ssize_t* segblk,
                                     Py_ssize_t k) noexcept nogil:
    """The bytes of piece position ``k``: its segment from the block list, then its offset."""
    cdef Py_ssize_t s = segblk[k >> SEG_SHIFT]
    while segs[s].at + segs[s].n <= k:
        s += 1
    if segs[s].wide:
        return segs[s].data + (<const int64_t*>segs[s].offs)[k - segs[s].at]
    return segs[s].data + (<const int32_t*>segs[s].offs)[k - segs[s].at]


cdef inline Py_ssize_t seg_rows(const Py_ssize_t* seg, Py_ssize_t nseg) noexcept nogil:
    """The rows the segment words cover, or -1 when they do not follow on from position 0."""
    cdef Py_ssize_t s, at = 0
    for s in range(nseg):
        if seg[6 * s + 3] != at or seg[6 * s + 4] < 1:
            return -1
        at += seg[6 * s + 4]
    return at
