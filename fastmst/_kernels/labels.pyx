"""Text labels to compact ids, in order of first appearance, read from Arrow string buffers.

``text_ids`` numbers the distinct labels of a sequence of Arrow string chunks (the tail column's
chunks, then the head column's) by first appearance and writes each row's id.  It reads the
chunks' offset and data buffers in place (``string`` and ``large_string``; no copy).

Exact: each label's 64-bit hash sits in an open-addressing table with its length and id.  Labels
of up to 8 bytes are hashed by a bijection of their zero-padded bytes, so equal hash and length
means equal label; longer labels are also compared byte by byte with their first occurrence.

Cache-sized work (radix partitioning by hash): the rows are taken in pieces of ``PIECE_ROWS``.
One pass over a piece hashes every row; a second writes (hash, pointer, length, row) entries
into ``PARTS`` partitions by the hash's top byte, each in row order.  Every partition has its
own small table (1/256 of the distinct labels: in cache), so the probes of one partition run
in cache instead of jumping around one large table.  New labels of the piece are then ranked by
their first row (a bitmap over the piece), which gives their ids, and a last pass writes each
row's id, reading the partitions' id lists in row order.

Threads: the row passes split a piece into position blocks (each block's entries sit in block
order within every partition), the partition passes take partitions; every id is fixed by the
rows alone, so the ids are the same for every thread count.
"""
import numpy as np
from cython.parallel cimport prange
from libc.stdint cimport int32_t, int64_t, uint8_t, uint32_t, uint64_t
from libc.stdlib cimport calloc, free, realloc
from libc.string cimport memcmp, memcpy, memset

from fastmst._kernels._atomics cimport prefetch


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

cdef enum:
    PARTS = 256     # partitions (top byte of the hash)
    EMPTY = 0       # the second word of an empty table slot

#: Rows handed to one round of the passes (tests lower it to run several rounds).
PIECE_ROWS = 1 << 22


ctypedef struct Entry:
    uint64_t h
    const uint8_t* ptr
    uint32_t length
    uint32_t row        # position within the piece


ctypedef struct Part:
    uint64_t* slots     # 2 * cap words: (hash, length << 32 | id + 1)
    Py_ssize_t cap
    Py_ssize_t count    # distinct labels so far
    Py_ssize_t fresh    # the first id new in the current piece
    Py_ssize_t ucap
    int64_t* first      # piece position of the first occurrence (labels new in the piece)
    uint64_t* uptr      # that occurrence's bytes
    int64_t* ulen
    int32_t* gid        # the global id of each local id
    bint failed         # an allocation failed
    uint64_t warm       # the sum of the warm-up reads (kept so they are not optimised away)


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


cdef void _hash_span(const offset_t* offs, const uint8_t* data, Py_ssize_t size,
                     Py_ssize_t i0, Py_ssize_t i1, uint64_t* hrow, Py_ssize_t* hb) noexcept nogil:
    cdef Py_ssize_t i, a
    cdef uint64_t h
    for i in range(i0, i1):
        a = offs[i]
        h = _hash(data + a, offs[i + 1] - a, a + 8 <= size)
        hrow[i] = h
        hb[h >> 56] += 1


cdef void _scatter_span(const offset_t* offs, const uint8_t* data, Py_ssize_t i0,
                        Py_ssize_t i1, Py_ssize_t at, const uint64_t* hrow, Py_ssize_t* ob,
                        Entry* ent, uint8_t* part) noexcept nogil:
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


cdef void _row_block(const Seg* segs, Py_ssize_t nseg, Py_ssize_t k0, Py_ssize_t k1,
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


cdef void _row_pass(const Seg* segs, Py_ssize_t nseg, Py_ssize_t rows, Py_ssize_t block,
                    uint64_t* hrow, Py_ssize_t* cnt, Entry* ent, uint8_t* part, bint scatter,
                    int threads) noexcept nogil:
    cdef Py_ssize_t b, nb = (rows + block - 1) // block
    for b in prange(nb, num_threads=threads, schedule="dynamic"):
        _row_block(segs, nseg, b * block, (b + 1) * block if (b + 1) * block < rows else rows,
                   hrow, cnt + b * PARTS, ent, part, scatter)


# ---------------------------------------------------------------------------------------------
# partition passes

cdef bint _grow_ids(Part* p) noexcept nogil:
    """Room for more distinct labels in ``p`` (False when memory ran out)."""
    cdef Py_ssize_t u = 2 * p.ucap if p.ucap else 256
    cdef void* a = realloc(p.first, u * sizeof(int64_t))
    if a == NULL:
        return False
    p.first = <int64_t*>a
    a = realloc(p.uptr, u * sizeof(uint64_t))
    if a == NULL:
        return False
    p.uptr = <uint64_t*>a
    a = realloc(p.ulen, u * sizeof(int64_t))
    if a == NULL:
        return False
    p.ulen = <int64_t*>a
    a = realloc(p.gid, u * sizeof(int32_t))
    if a == NULL:
        return False
    p.gid = <int32_t*>a
    p.ucap = u
    return True


cdef bint _grow_table(Part* p) noexcept nogil:
    """Double the table of ``p`` and move its entries (False when memory ran out)."""
    cdef Py_ssize_t cap = 2 * p.cap if p.cap else 512, i, slot, mask = cap - 1
    cdef uint64_t* new = <uint64_t*>calloc(2 * cap, sizeof(uint64_t))
    cdef uint64_t h
    if new == NULL:
        return False
    for i in range(p.cap):
        if p.slots[2 * i + 1] == EMPTY:
            continue
        h = p.slots[2 * i]
        slot = h & mask
        while new[2 * slot + 1] != EMPTY:
            slot = (slot + 1) & mask
        new[2 * slot] = h
        new[2 * slot + 1] = p.slots[2 * i + 1]
    free(p.slots)
    p.slots = new
    p.cap = cap
    return True


cdef void _probe(Part* p, Entry* ent, Py_ssize_t n) noexcept nogil:
    """Local ids (in order of first appearance within the partition) of its entries ``ent[:n]``
    of this piece, written over each entry's ``row`` once read (OUT: ent[:].row, p)."""
    cdef Py_ssize_t j, slot, mask, lid
    cdef uint64_t h, w1, length
    cdef uint64_t* tbl
    cdef uint64_t warm = 0
    cdef Py_ssize_t i
    p.fresh = p.count
    # read the table once in order (streamed from memory) before the scattered probes, which
    # then hit the cache; the probe of entry j + 16 is prefetched
    for i in range(0, 2 * p.cap, 8):
        warm += p.slots[i]
    p.warm = warm
    for j in range(n):
        if 3 * (p.count + 1) > 2 * p.cap:        # load factor <= 2/3
            if not _grow_table(p):
                p.failed = True
                return
        if j + 16 < n:
            prefetch(&p.slots[2 * (ent[j + 16].h & (p.cap - 1))])
        if p.count + 1 > p.ucap:
            if not _grow_ids(p):
                p.failed = True
                return
        h = ent[j].h
        length = ent[j].length
        tbl = p.slots
        mask = p.cap - 1
        slot = h & mask
        while True:
            w1 = tbl[2 * slot + 1]
            if w1 == EMPTY:
                lid = p.count
                p.count = lid + 1
                tbl[2 * slot] = h
                tbl[2 * slot + 1] = (length << 32) | <uint64_t>(lid + 1)
                p.first[lid] = ent[j].row
                p.uptr[lid] = <uint64_t>ent[j].ptr
                p.ulen[lid] = <int64_t>length
                break
            if tbl[2 * slot] == h and (w1 >> 32) == length:
                lid = <Py_ssize_t>(w1 & 0xffffffffULL) - 1
                if length <= 8 or memcmp(<const void*>p.uptr[lid], ent[j].ptr, length) == 0:
                    break
            slot = (slot + 1) & mask
        ent[j].row = <uint32_t>lid


cdef void _probe_all(Part* parts, Entry* ent, const Py_ssize_t* start,
                     int threads) noexcept nogil:
    cdef Py_ssize_t q
    for q in prange(PARTS, num_threads=threads, schedule="dynamic"):
        _probe(&parts[q], ent + start[q], start[q + 1] - start[q])


cdef void _rank_new(Part* parts, uint64_t* bits, Py_ssize_t* below, Py_ssize_t rows,
                    Py_ssize_t base, int threads) noexcept nogil:
    """Ids of the labels new in this piece: ``base`` plus the rank of their first row among
    all new labels' first rows (a bitmap of the piece's rows)."""
    cdef Py_ssize_t q, lid, w, nw = (rows + 63) // 64, acc = 0
    cdef int64_t r
    cdef Part* p
    memset(bits, 0, nw * sizeof(uint64_t))
    for q in range(PARTS):
        p = &parts[q]
        for lid in range(p.fresh, p.count):
            r = p.first[lid]
            bits[r >> 6] |= (<uint64_t>1) << (r & 63)
    for w in range(nw):
        below[w] = acc
        acc += popcount64(bits[w])
    for q in prange(PARTS, num_threads=threads, schedule="static"):
        p = &parts[q]
        for lid in range(p.fresh, p.count):
            r = p.first[lid]
            p.gid[lid] = <int32_t>(base + below[r >> 6] +
                                   popcount64(bits[r >> 6] & (((<uint64_t>1) << (r & 63)) - 1)))


cdef void _global_ids(Part* parts, Entry* ent, const Py_ssize_t* start, int32_t* ids,
                      int threads) noexcept nogil:
    """``ids[j]``: the global id of entry j (local id in ``ent[j].row``)."""
    cdef Py_ssize_t q, j
    cdef int32_t* g
    for q in prange(PARTS, num_threads=threads, schedule="static"):
        g = parts[q].gid
        for j in range(start[q], start[q + 1]):
            ids[j] = g[ent[j].row]


cdef void _write_block(const uint8_t* part, const int32_t* ids, const Py_ssize_t* off0,
                       Py_ssize_t k0, Py_ssize_t k1, int32_t* out) noexcept nogil:
    cdef Py_ssize_t cur[PARTS]
    cdef Py_ssize_t k
    cdef uint8_t q
    memcpy(cur, off0, PARTS * sizeof(Py_ssize_t))
    for k in range(k0, k1):
        q = part[k]
        out[k] = ids[cur[q]]
        cur[q] += 1


cdef void _write_rows(const uint8_t* part, const int32_t* ids, const Py_ssize_t* off0,
                      Py_ssize_t rows, Py_ssize_t block, int32_t* out,
                      int threads) noexcept nogil:
    """``out[k]`` for every position k of the piece: the next id of k's partition, read in
    row order (``off0``: each (block, partition)'s first entry)."""
    cdef Py_ssize_t b, nb = (rows + block - 1) // block
    for b in prange(nb, num_threads=threads, schedule="static"):
        _write_block(part, ids, off0 + b * PARTS, b * block,
                     (b + 1) * block if (b + 1) * block < rows else rows, out)


cdef void _gather_bytes(const uint64_t[::1] ptr, const int64_t[::1] offsets,
                        uint8_t[::1] out) noexcept nogil:
    """Concatenate the labels at ``ptr`` (lengths from ``offsets``) into ``out``."""
    cdef Py_ssize_t i, k
    for i in range(ptr.shape[0]):
        k = offsets[i + 1] - offsets[i]
        if k:
            memcpy(&out[offsets[i]], <const void *>ptr[i], k)


def _pieces(chunk):
    """(offsets as NumPy, data memoryview) of one Arrow string chunk, checked."""
    import pyarrow as pa
    if pa.types.is_string(chunk.type):
        width = np.int32
    elif pa.types.is_large_string(chunk.type):
        width = np.int64
    else:
        raise TypeError(f"text_ids: expected string or large_string chunks, received "
                        f"{chunk.type}; cast the column to text first.")
    if chunk.null_count:
        raise ValueError(f"text_ids: a chunk holds {chunk.null_count} missing labels; expected "
                         f"none. Refuse or drop the missing rows first.")
    bufs = chunk.buffers()
    n = len(chunk)
    offs = np.frombuffer(bufs[1], dtype=width, count=chunk.offset + n + 1)[chunk.offset:] \
        if n else np.zeros(1, dtype=width)
    if offs.size and int(offs[n]) - int(offs[0]) >= 2**32:
        raise ValueError("text_ids: a chunk holds 4 GiB of label bytes or more; expected less. "
                         "Split the column into smaller chunks.")
    data = np.frombuffer(bufs[2], dtype=np.uint8) if bufs[2] is not None and bufs[2].size \
        else np.zeros(1, dtype=np.uint8)
    return offs, data


def _segments(pieces, Py_ssize_t size):
    """Rounds of at most ``size`` rows: lists of (chunk index, lo, hi)."""
    rounds, cur, room = [], [], size
    for c, (offs, _) in enumerate(pieces):
        n = int(offs.shape[0]) - 1
        lo = 0
        while lo < n:
            hi = min(n, lo + room)
            cur.append((c, lo, hi))
            room -= hi - lo
            lo = hi
            if room == 0:
                rounds.append(cur)
                cur, room = [], size
    if cur:
        rounds.append(cur)
    return rounds


def text_ids(chunks, Py_ssize_t n_tail, int threads=1):
    """Compact ids of Arrow string chunks by first appearance.

    ``chunks``: the tail column's chunks then the head column's (``string`` or
    ``large_string``, no nulls); ``n_tail`` rows belong to the tail.  Returns (tail ids, head
    ids) as int32, and the distinct labels as (int64 offsets, uint8 bytes) in id order.
    """
    cdef Py_ssize_t total, size, rows, block, nblk, at, base, q, k, nseg, done
    cdef Py_ssize_t[::1] sv
    cdef Part* parts = NULL
    if threads < 1:
        raise ValueError(f"text_ids: threads must be positive, received {threads}.")
    pieces = [_pieces(c) for c in chunks]
    total = sum(int(o.shape[0]) - 1 for o, _ in pieces)
    if n_tail < 0 or n_tail > total:
        raise ValueError(f"text_ids: n_tail={n_tail} is outside 0..{total} (the rows given).")
    if total >= 2**31 - 1:
        raise ValueError(f"text_ids: {total} rows need ids beyond int32; expected fewer than "
                         f"{2**31 - 1} rows.")
    ids_a = np.empty(total, dtype=np.int32)
    size = max(1, min(int(PIECE_ROWS), total))
    nblk = 8 * threads if threads > 1 else 1
    block = (size + nblk - 1) // nblk
    hrow_a = np.empty(size, dtype=np.uint64)
    part_a = np.empty(size, dtype=np.uint8)
    ent_a = np.empty(size * sizeof(Entry), dtype=np.uint8)
    eid_a = np.empty(size, dtype=np.int32)
    hist_a = np.empty((nblk + 1) * PARTS, dtype=np.intp)
    off_a = np.empty(nblk * PARTS, dtype=np.intp)
    start_a = np.empty(PARTS + 1, dtype=np.intp)
    bits_a = np.empty((size + 63) // 64, dtype=np.uint64)
    below_a = np.empty((size + 63) // 64, dtype=np.intp)
    cdef uint64_t[::1] hrow = hrow_a
    cdef uint8_t[::1] part = part_a
    cdef uint8_t[::1] entv = ent_a
    cdef int32_t[::1] eid = eid_a
    cdef Py_ssize_t[::1] hist = hist_a
    cdef Py_ssize_t[::1] off = off_a
    cdef Py_ssize_t[::1] start = start_a
    cdef uint64_t[::1] bits = bits_a
    cdef Py_ssize_t[::1] below = below_a
    cdef int32_t[::1] ids = ids_a
    cdef Entry* ent = <Entry*>&entv[0]
    parts = <Part*>calloc(PARTS, sizeof(Part))
    if parts == NULL:
        raise MemoryError("text_ids: no memory for the label tables.")
    try:
        base = 0
        done = 0
        for segs in _segments(pieces, size):
            rows = sum(hi - lo for _, lo, hi in segs)
            seg_a = np.zeros((len(segs), 6), dtype=np.intp)
            at = 0
            for r, (c, lo, hi) in enumerate(segs):
                offs, data = pieces[c]
                seg_a[r] = (offs.ctypes.data + lo * offs.itemsize, data.ctypes.data, data.size,
                            at, hi - lo, offs.itemsize == 8)
                at += hi - lo
            sv = seg_a.reshape(-1)
            nseg = len(segs)
            hist_a[:] = 0
            with nogil:
                _row_pass(<const Seg*>&sv[0], nseg, rows, block, &hrow[0], &hist[0], ent,
                          &part[0], False, threads)
            # entries: partitions in order, blocks in order within a partition
            h2 = hist_a[:nblk * PARTS].reshape(nblk, PARTS)
            flat = h2.T.ravel()
            starts = np.cumsum(flat) - flat
            off_a[:] = starts.reshape(PARTS, nblk).T.ravel()
            start_a[:PARTS] = starts.reshape(PARTS, nblk)[:, 0]
            start_a[PARTS] = rows
            off0 = off_a.copy()
            with nogil:
                _row_pass(<const Seg*>&sv[0], nseg, rows, block, &hrow[0], &off[0], ent,
                          &part[0], True, threads)
            off_a[:] = off0
            with nogil:
                _probe_all(parts, ent, &start[0], threads)
            for q in range(PARTS):
                if parts[q].failed:
                    raise MemoryError("text_ids: no memory for the label tables.")
            with nogil:
                _rank_new(parts, &bits[0], &below[0], rows, base, threads)
                _global_ids(parts, ent, &start[0], &eid[0], threads)
                _write_rows(&part[0], &eid[0], &off[0], rows, block, &ids[done], threads)
            base = sum(parts[q].count for q in range(PARTS))
            done += rows
        # the distinct labels in id order
        kk = base
        ptr = np.empty(kk, dtype=np.uint64)
        lens = np.empty(kk, dtype=np.int64)
        for q in range(PARTS):
            cq = parts[q].count
            if cq:
                g = np.asarray(<int32_t[:cq]>parts[q].gid)
                ptr[g] = np.asarray(<uint64_t[:cq]>parts[q].uptr)
                lens[g] = np.asarray(<int64_t[:cq]>parts[q].ulen)
    finally:
        for q in range(PARTS):
            free(parts[q].slots)
            free(parts[q].first)
            free(parts[q].uptr)
            free(parts[q].ulen)
            free(parts[q].gid)
        free(parts)
    offsets = np.zeros(kk + 1, dtype=np.int64)
    np.cumsum(lens, out=offsets[1:])
    out = np.empty(int(offsets[kk]), dtype=np.uint8)
    _gather_bytes(ptr, offsets, out)
    return ids_a[:n_tail], ids_a[n_tail:], offsets, out
