# The new labels of one piece of the label kernel (_labels.pyx) ranked by their first row: a
# bitmap over the piece's rows, one range of words per thread, gives each new label its id
# (the labels so far plus its rank) and, walked in row order, the address and length of its
# first occurrence.
from cython.parallel cimport prange
from libc.stdint cimport int32_t, int64_t, uint64_t
from libc.string cimport memset

from fastmst._kernels.label_hash cimport Seg, SEG_SHIFT, ctz64, popcount64
from fastmst._kernels.label_passes cimport PARTS
from fastmst._kernels.label_tables cimport Part


cdef enum:
    RANK_RANGES = 64        # ranges of the bitmap, at most one per thread


cdef inline void rank_new(Part* parts, uint64_t* bits, Py_ssize_t* below, Py_ssize_t rows,
                          Py_ssize_t base, const Seg* segs, const Py_ssize_t* segblk,
                          uint64_t* gptr, int64_t* glen, int threads) noexcept nogil:
    """Ids of the labels new in this piece: ``base`` plus the rank of their first row among
    all new labels' first rows (a bitmap of the piece's rows).  ``gptr``/``glen`` of those
    ids: the bytes of their first occurrence, read in row order (so the offsets stream).

    The bitmap is cut into one range of words per thread: each thread sets the bits of its
    range (reading every new label's first row, so no two threads write one word), counts
    them, and after a running sum over the ranges walks its range."""
    cdef Py_ssize_t nw = (rows + 63) // 64, nc, size, c, q, lid
    cdef Py_ssize_t cnt[RANK_RANGES + 1]
    cdef int64_t r
    cdef Part* p
    nc = threads if threads < RANK_RANGES else RANK_RANGES
    if nc > nw:
        nc = nw
    size = (nw + nc - 1) // nc
    nc = (nw + size - 1) // size
    for c in prange(nc, num_threads=threads, schedule="static"):
        cnt[c + 1] = _mark_range(parts, bits, c * size,
                                 (c + 1) * size if (c + 1) * size < nw else nw)
    cnt[0] = base
    for c in range(nc):
        cnt[c + 1] += cnt[c]
    for c in prange(nc, num_threads=threads, schedule="static"):
        _walk_range(bits, below, c * size, (c + 1) * size if (c + 1) * size < nw else nw,
                    cnt[c], segs, segblk, gptr, glen)
    for q in prange(PARTS, num_threads=threads, schedule="dynamic"):
        p = &parts[q]
        for lid in range(p.fresh, p.count):
            r = p.first[lid]
            p.gid[lid] = <int32_t>(below[r >> 6] +
                                   popcount64(bits[r >> 6] & (((<uint64_t>1) << (r & 63)) - 1)))


cdef inline Py_ssize_t _mark_range(const Part* parts, uint64_t* bits, Py_ssize_t w0,
                                   Py_ssize_t w1) noexcept nogil:
    """Clear words ``w0..w1-1`` of the bitmap, set the bits of the new labels' first rows that
    fall in them, and return how many were set."""
    cdef Py_ssize_t q, lid, w, n = 0
    cdef int64_t r
    cdef const Part* p
    memset(bits + w0, 0, (w1 - w0) * sizeof(uint64_t))
    for q in range(PARTS):
        p = &parts[q]
        for lid in range(p.fresh, p.count):
            r = p.first[lid]
            w = r >> 6
            if w0 <= w < w1:
                bits[w] |= (<uint64_t>1) << (r & 63)
                n += 1
    return n


cdef inline void _walk_range(const uint64_t* bits, Py_ssize_t* below, Py_ssize_t w0,
                             Py_ssize_t w1, Py_ssize_t g, const Seg* segs,
                             const Py_ssize_t* segblk, uint64_t* gptr,
                             int64_t* glen) noexcept nogil:
    """For words ``w0..w1-1``: ``below[w]``, the id of the first new label at or after word
    w (``g`` at w0), and the address and length of each new label's first occurrence."""
    cdef Py_ssize_t w, s = -1, i
    cdef int64_t r, a
    cdef uint64_t x
    for w in range(w0, w1):
        below[w] = g
        x = bits[w]
        while x:
            r = (w << 6) + ctz64(x)
            x &= x - 1
            if s < 0:
                s = segblk[r >> SEG_SHIFT]
            while segs[s].at + segs[s].n <= r:
                s += 1
            i = r - segs[s].at
            if segs[s].wide:
                a = (<const int64_t*>segs[s].offs)[i]
                glen[g] = (<const int64_t*>segs[s].offs)[i + 1] - a
            else:
                a = (<const int32_t*>segs[s].offs)[i]
                glen[g] = (<const int32_t*>segs[s].offs)[i + 1] - a
            gptr[g] = <uint64_t>(segs[s].data + a)
            g += 1
