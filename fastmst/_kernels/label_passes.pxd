# The row passes of the label kernel (_labels.pyx) over one piece: position blocks taken by
# the threads, each over its segments (row ranges of one chunk), hashing every row; the count
# pass counts each partition's rows (and raises the distinct-label estimate), the scatter pass
# writes (hash, row, length) entries into each (block, partition) run.
from cython.parallel cimport prange
from libc.stdint cimport int32_t, int64_t, uint8_t, uint32_t, uint64_t

from fastmst._kernels.label_estimate cimport REGS, raise_register
from fastmst._kernels.label_hash cimport Seg, label_hash, offset_t
from fastmst._kernels.label_tables cimport Entry


cdef enum:
    PARTS = 256     # partitions (top byte of the hash)


cdef inline void _count_span(const offset_t* offs, const uint8_t* data, Py_ssize_t size,
                             Py_ssize_t i0, Py_ssize_t i1, Py_ssize_t* hb,
                             uint8_t* reg) noexcept nogil:
    """Count per partition in ``hb`` and raise the block's estimate registers ``reg``."""
    cdef Py_ssize_t i, a, b = offs[i0]
    cdef uint64_t h
    for i in range(i0, i1):
        a = b                   # each offset read once (the stores could alias the offsets)
        b = offs[i + 1]
        h = label_hash(data + a, b - a, a + 8 <= size)
        hb[h >> 56] += 1
        raise_register(reg, h)


cdef inline bint _scatter_span(const offset_t* offs, const uint8_t* data, Py_ssize_t size,
                               Py_ssize_t i0, Py_ssize_t i1, Py_ssize_t at, Py_ssize_t* ob,
                               const Py_ssize_t* end, Entry* ent, uint8_t* part) noexcept nogil:
    """Hash again (cheaper than storing the hashes and reading them back) and write entries
    (``ob``: the next entry of each partition's run, ``end``: the runs' ends).  False when a
    run is full (a planned piece whose rows fall otherwise than planned)."""
    cdef Py_ssize_t i, a, b = offs[i0], j, n
    cdef uint64_t h
    for i in range(i0, i1):
        a = b
        b = offs[i + 1]
        n = b - a
        h = label_hash(data + a, n, a + 8 <= size)
        j = ob[h >> 56]
        if j >= end[h >> 56]:
            return False
        ob[h >> 56] = j + 1
        ent[j].h = h
        ent[j].row = <uint32_t>(at + i)
        ent[j].length = <uint32_t>n
        part[i] = <uint8_t>(h >> 56)
    return True


cdef inline bint _row_block(const Seg* segs, Py_ssize_t nseg, Py_ssize_t k0, Py_ssize_t k1,
                            Py_ssize_t* cnt, const Py_ssize_t* end, Entry* ent, uint8_t* part,
                            uint8_t* reg, bint scatter) noexcept nogil:
    """Count per partition in ``cnt`` and raise the estimate registers ``reg`` (``scatter``
    False) or scatter (``cnt``: the next entry of each partition's run, ``end``: the runs'
    ends) the piece positions ``k0..k1-1``.  False when a run filled up."""
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
                if not _scatter_span(<const int64_t*>g.offs, g.data, g.size, i0, i1, g.at, cnt,
                                     end, ent, part + g.at):
                    return False
            elif not _scatter_span(<const int32_t*>g.offs, g.data, g.size, i0, i1, g.at, cnt,
                                   end, ent, part + g.at):
                return False
        elif g.wide:
            _count_span(<const int64_t*>g.offs, g.data, g.size, i0, i1, cnt, reg)
        else:
            _count_span(<const int32_t*>g.offs, g.data, g.size, i0, i1, cnt, reg)
    return True


cdef inline bint row_pass(const Seg* segs, Py_ssize_t nseg, Py_ssize_t rows, Py_ssize_t block,
                          Py_ssize_t* cnt, const Py_ssize_t* end, Entry* ent, uint8_t* part,
                          uint8_t* reg, bint scatter, int threads) noexcept nogil:
    """The count or scatter pass over a piece, blocks taken by the threads (``cnt``, ``end``
    and ``reg`` hold one row of PARTS or REGS per block).  False when a run filled up."""
    cdef Py_ssize_t b, nb = (rows + block - 1) // block
    cdef int full = 0
    for b in prange(nb, num_threads=threads, schedule="dynamic"):
        if not _row_block(segs, nseg, b * block,
                          (b + 1) * block if (b + 1) * block < rows else rows,
                          cnt + b * PARTS, end + b * PARTS if end != NULL else NULL, ent, part,
                          reg + b * REGS if reg != NULL else NULL, scatter):
            full += 1
    return full == 0
