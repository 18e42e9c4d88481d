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

Batches (``LabelMapper``): the tables live across ``feed(tail_chunks, head_chunks)`` calls, so
a reader maps each parsed batch while the next is parsed.  Ids are provisional (first
appearance in feed order); each label keeps its first tail row, else its first head row, and
``finish`` ranks labels by that row (a bitmap over the rows) and renumbers every row once, so
the ids equal ``text_ids`` over all tail chunks then all head chunks.  The row passes are in
``_label_rows.pxd``.
"""
import numpy as np
from cython.parallel cimport prange
from libc.stdint cimport int32_t, int64_t, uint8_t, uint32_t, uint64_t
from libc.stdlib cimport calloc, free, realloc
from libc.string cimport memcmp, memcpy, memset

from fastmst._kernels._atomics cimport prefetch
from fastmst._kernels._label_rows cimport (Entry, Seg, _hash_span, _row_block, _scatter_span,
                                           popcount64)


cdef enum:
    PARTS = 256     # partitions (top byte of the hash)
    EMPTY = 0       # the second word of an empty table slot

cdef int64_t HEAD = (<int64_t>1) << 40    # keys of head rows: HEAD + row in the head column

#: Rows handed to one round of the passes (tests lower it to run several rounds).
PIECE_ROWS = 1 << 22


ctypedef struct Part:
    uint64_t* slots     # 2 * cap words: (hash, length << 32 | id + 1)
    Py_ssize_t cap
    Py_ssize_t count    # distinct labels so far
    Py_ssize_t fresh    # the first id new in the current piece
    Py_ssize_t ucap
    int64_t* first      # piece position of the first occurrence (labels new in the piece)
    uint64_t* uptr      # that occurrence's bytes
    int64_t* ulen
    int32_t* gid        # the global (provisional) id of each local id
    int64_t* key        # the first row that holds the label (tail rows, then HEAD + head rows)
    bint failed         # an allocation failed
    uint64_t warm       # the sum of the warm-up reads (kept so they are not optimised away)




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
    a = realloc(p.key, u * sizeof(int64_t))
    if a == NULL:
        return False
    p.key = <int64_t*>a
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


cdef void _probe(Part* p, Entry* ent, Py_ssize_t n, Py_ssize_t a, int64_t t0,
                 int64_t h0) noexcept nogil:
    """Local ids (in order of first appearance within the partition) of its entries ``ent[:n]``
    of this piece, written over each entry's ``row`` once read (OUT: ent[:].row, p).  Piece
    positions below ``a`` are tail rows ``t0 + r``, the others head rows ``h0 + r - a``: each
    label keeps its first tail row, else its first head row, in ``p.key``."""
    cdef Py_ssize_t j, slot, mask, lid, r
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
        r = ent[j].row
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
                p.key[lid] = t0 + r if r < a else HEAD + h0 + (r - a)
                break
            if tbl[2 * slot] == h and (w1 >> 32) == length:
                lid = <Py_ssize_t>(w1 & 0xffffffffULL) - 1
                if length <= 8 or memcmp(<const void*>p.uptr[lid], ent[j].ptr, length) == 0:
                    if r < a and p.key[lid] >= HEAD:     # first seen in a head, now in a tail
                        p.key[lid] = t0 + r
                    break
            slot = (slot + 1) & mask
        ent[j].row = <uint32_t>lid


cdef void _probe_all(Part* parts, Entry* ent, const Py_ssize_t* start, Py_ssize_t a,
                     int64_t t0, int64_t h0, int threads) noexcept nogil:
    cdef Py_ssize_t q
    for q in prange(PARTS, num_threads=threads, schedule="dynamic"):
        _probe(&parts[q], ent + start[q], start[q + 1] - start[q], a, t0, h0)


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


cdef void _rank_keys(const int64_t* key, Py_ssize_t n, uint64_t* bits, Py_ssize_t nw,
                     int64_t* below, int32_t* rank) noexcept nogil:
    """``rank[i]``: the rank of ``key[i]`` among the distinct ``key[:n]`` (all < 64 * nw)."""
    cdef Py_ssize_t i, w
    cdef int64_t k, acc = 0
    memset(bits, 0, nw * sizeof(uint64_t))
    for i in range(n):
        bits[key[i] >> 6] |= (<uint64_t>1) << (key[i] & 63)
    for w in range(nw):
        below[w] = acc
        acc += popcount64(bits[w])
    for i in range(n):
        k = key[i]
        rank[i] = <int32_t>(below[k >> 6] +
                            popcount64(bits[k >> 6] & (((<uint64_t>1) << (k & 63)) - 1)))


cdef void _remap(const int32_t* src, const int32_t* perm, int32_t* dst, Py_ssize_t n,
                 int threads) noexcept nogil:
    cdef Py_ssize_t i
    for i in prange(n, num_threads=threads, schedule="static"):
        dst[i] = perm[src[i]]


def _segments(pieces, Py_ssize_t size):
    """Rounds of at most ``size`` rows: (first row of the round, [(chunk index, lo, hi)])."""
    rounds, cur, room, row0, row = [], [], size, 0, 0
    for c, (offs, _) in enumerate(pieces):
        n = int(offs.shape[0]) - 1
        lo = 0
        while lo < n:
            hi = min(n, lo + room)
            cur.append((c, lo, hi))
            room -= hi - lo
            row += hi - lo
            lo = hi
            if room == 0:
                rounds.append((row0, cur))
                cur, room, row0 = [], size, row
    if cur:
        rounds.append((row0, cur))
    return rounds


cdef class LabelMapper:
    """LabelMapper(threads=1)

    Text labels to compact ids fed in batches: ``feed(tail_chunks, head_chunks)`` per batch
    (Arrow ``string``/``large_string`` chunks without nulls; the batch's tail rows and head
    rows), then ``finish()`` -> (tail ids, head ids, int64 offsets, uint8 bytes of the distinct
    labels in id order).  The ids are those of ``text_ids`` over all tail chunks then all head
    chunks (first appearance down the whole tail column, then down the head column), whatever
    the batches: labels get provisional ids in feed order, each keeps its first tail row (else
    its first head row), and ``finish`` renumbers them by that row.  The chunks are kept
    referenced (the tables point into their bytes) until ``finish``.
    """
    cdef Part* parts
    cdef int threads
    cdef Py_ssize_t base, n_tail, n_head, size, nblk
    cdef list keep, fed
    cdef object scratch
    cdef bint finished

    def __cinit__(self, int threads=1):
        if threads < 1:
            raise ValueError(f"LabelMapper: threads must be positive, received {threads}.")
        self.parts = <Part*>calloc(PARTS, sizeof(Part))
        if self.parts == NULL:
            raise MemoryError("LabelMapper: no memory for the label tables.")
        self.threads = threads
        self.nblk = 8 * threads if threads > 1 else 1
        self.keep, self.fed, self.scratch, self.size = [], [], None, 0

    def __dealloc__(self):
        cdef Py_ssize_t q
        if self.parts != NULL:
            for q in range(PARTS):
                free(self.parts[q].slots)
                free(self.parts[q].first)
                free(self.parts[q].uptr)
                free(self.parts[q].ulen)
                free(self.parts[q].gid)
                free(self.parts[q].key)
            free(self.parts)
            self.parts = NULL

    @property
    def rows(self):
        """(tail rows, head rows) fed so far."""
        return self.n_tail, self.n_head

    def feed(self, tail_chunks, head_chunks):
        """Map one batch: its tail column's chunks and its head column's chunks."""
        if self.finished:
            raise ValueError("LabelMapper.feed: the mapper is finished; start a new one.")
        tp = [_pieces(c) for c in tail_chunks]
        hp = [_pieces(c) for c in head_chunks]
        nt = sum(int(o.shape[0]) - 1 for o, _ in tp)
        nh = sum(int(o.shape[0]) - 1 for o, _ in hp)
        if self.n_tail + self.n_head + nt + nh >= 2**31 - 1:
            raise ValueError(f"LabelMapper.feed: {self.n_tail + self.n_head + nt + nh} rows "
                             f"need ids beyond int32; expected fewer than {2**31 - 1} rows.")
        self._feed(tp + hp, nt, nh)
        self.keep.append((tail_chunks, head_chunks))

    cdef _buffers(self, Py_ssize_t size):
        """Scratch arrays for rounds of ``size`` rows (kept between batches)."""
        if size > self.size:
            nw = (size + 63) // 64
            self.scratch = (np.empty(size, np.uint64), np.empty(size, np.uint8),
                            np.empty(size * sizeof(Entry), np.uint8), np.empty(size, np.int32),
                            np.empty((self.nblk + 1) * PARTS, np.intp),
                            np.empty(self.nblk * PARTS, np.intp), np.empty(PARTS + 1, np.intp),
                            np.empty(nw, np.uint64), np.empty(nw, np.intp))
            self.size = size
        return self.scratch

    cdef _feed(self, pieces, Py_ssize_t nt, Py_ssize_t nh):
        cdef Py_ssize_t size, rows, block, nblk = self.nblk, at, q, nseg, done = 0, a
        cdef int64_t t0, h0
        cdef int threads = self.threads
        cdef Py_ssize_t[::1] sv
        cdef Part* parts = self.parts
        total = nt + nh
        if total == 0:
            return
        size = max(1, min(int(PIECE_ROWS), total))
        hrow_a, part_a, ent_a, eid_a, hist_a, off_a, start_a, bits_a, below_a = \
            self._buffers(size)
        ids_a = np.empty(total, dtype=np.int32)
        block = (size + nblk - 1) // nblk
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
        for row0, segs in _segments(pieces, size):
            rows = sum(hi - lo for _, lo, hi in segs)
            a = min(max(nt - row0, 0), rows)
            t0 = self.n_tail + row0
            h0 = self.n_head + max(row0 - nt, 0)
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
                _probe_all(parts, ent, &start[0], a, t0, h0, threads)
            for q in range(PARTS):
                if parts[q].failed:
                    raise MemoryError("LabelMapper: no memory for the label tables.")
            with nogil:
                _rank_new(parts, &bits[0], &below[0], rows, self.base, threads)
                _global_ids(parts, ent, &start[0], &eid[0], threads)
                _write_rows(&part[0], &eid[0], &off[0], rows, block, &ids[done], threads)
            self.base = sum(parts[q].count for q in range(PARTS))
            done += rows
        self.fed.append((ids_a, nt))
        self.n_tail += nt
        self.n_head += nh

    def finish(self):
        """(tail ids, head ids, offsets, bytes) of everything fed; the mapper is then spent."""
        cdef Py_ssize_t q, kk = self.base, nw
        cdef int threads = self.threads
        if self.finished:
            raise ValueError("LabelMapper.finish: the mapper is already finished.")
        self.finished = True
        ptr = np.empty(kk, dtype=np.uint64)
        lens = np.empty(kk, dtype=np.int64)
        key_a = np.empty(kk, dtype=np.int64)
        for q in range(PARTS):
            cq = self.parts[q].count
            if cq:
                g = np.asarray(<int32_t[:cq]>self.parts[q].gid)
                ptr[g] = np.asarray(<uint64_t[:cq]>self.parts[q].uptr)
                lens[g] = np.asarray(<int64_t[:cq]>self.parts[q].ulen)
                key_a[g] = np.asarray(<int64_t[:cq]>self.parts[q].key)
        head = key_a >= HEAD
        key_a[head] += self.n_tail - HEAD          # rows of the tail, then of the head
        ordered = kk < 2 or bool(np.all(key_a[1:] > key_a[:kk - 1]))
        if ordered and len(self.fed) == 1:
            ids_a, nt = self.fed[0]
            ti, hi = ids_a[:nt], ids_a[nt:]
        else:
            ti = np.empty(self.n_tail, dtype=np.int32)
            hi = np.empty(self.n_head, dtype=np.int32)
            perm_a = np.arange(kk, dtype=np.int32)
            if not ordered:
                nw = (self.n_tail + self.n_head + 63) // 64
                bits_a, below_a = np.empty(nw, np.uint64), np.empty(nw, np.int64)
                self._rank(key_a, bits_a, below_a, perm_a)
                ptr[perm_a] = ptr.copy()
                lens[perm_a] = lens.copy()
            self._renumber(perm_a, ti, hi)
        offsets = np.zeros(kk + 1, dtype=np.int64)
        np.cumsum(lens, out=offsets[1:])
        out = np.empty(int(offsets[kk]), dtype=np.uint8)
        _gather_bytes(ptr, offsets, out)
        self.fed, self.keep = [], []       # the label bytes are copied: the chunks may go
        return ti, hi, offsets, out

    cdef _rank(self, key_a, bits_a, below_a, perm_a):
        cdef int64_t[::1] key = key_a, below = below_a
        cdef uint64_t[::1] bits = bits_a
        cdef int32_t[::1] perm = perm_a
        with nogil:
            _rank_keys(&key[0], key.shape[0], &bits[0], bits.shape[0], &below[0], &perm[0])

    cdef _renumber(self, perm_a, ti_a, hi_a):
        """The final ids of every fed row (``perm``: provisional id -> final id)."""
        cdef int32_t[::1] perm = perm_a
        cdef int32_t[::1] src, dst
        cdef Py_ssize_t ot = 0, oh = 0, nt, n
        for ids_a, nt in self.fed:
            n = ids_a.shape[0]
            for lo, hi, dst_a, o in ((0, nt, ti_a, ot), (nt, n, hi_a, oh)):
                if hi > lo:
                    src = ids_a[lo:hi]
                    dst = dst_a[o:o + hi - lo]
                    with nogil:
                        _remap(&src[0], &perm[0], &dst[0], src.shape[0], self.threads)
            ot += nt
            oh += n - nt


def text_ids(chunks, Py_ssize_t n_tail, int threads=1):
    """Compact ids of Arrow string chunks by first appearance.

    ``chunks``: the tail column's chunks then the head column's (``string`` or
    ``large_string``, no nulls); ``n_tail`` rows belong to the tail.  Returns (tail ids, head
    ids) as int32, and the distinct labels as (int64 offsets, uint8 bytes) in id order.
    """
    if threads < 1:
        raise ValueError(f"text_ids: threads must be positive, received {threads}.")
    pieces = [_pieces(c) for c in chunks]
    total = sum(int(o.shape[0]) - 1 for o, _ in pieces)
    if n_tail < 0 or n_tail > total:
        raise ValueError(f"text_ids: n_tail={n_tail} is outside 0..{total} (the rows given).")
    if total >= 2**31 - 1:
        raise ValueError(f"text_ids: {total} rows need ids beyond int32; expected fewer than "
                         f"{2**31 - 1} rows.")
    cdef LabelMapper m = LabelMapper(threads)
    m._feed(pieces, n_tail, total - n_tail)
    return m.finish()
