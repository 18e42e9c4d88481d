"""Text labels to compact ids, in order of first appearance, read from Arrow string buffers.

``text_ids`` numbers the distinct labels of a sequence of Arrow string chunks (the tail column's
chunks, then the head column's) by first appearance and writes each row's id.  It reads the
chunks' offset and data buffers in place (``string`` and ``large_string``; no copy).

Exact: each label's 64-bit hash sits in an open-addressing table with its length and id.  Labels
of up to 8 bytes are hashed by a bijection of their zero-padded bytes, so equal hash and length
means equal label; longer labels are also compared byte by byte with their first occurrence.

Cache-sized work (radix partitioning by hash): the rows are taken in pieces of
``labels.PIECE_ROWS``.  One pass over a piece (``count_piece``) hashes every row and counts the
rows of each of ``PARTS`` partitions (the hash's top byte); a second (``map_piece``) hashes
again (cheaper than storing the hashes and reading them back) and writes 16-byte (hash, row,
length) entries into the partitions, each in row order.  Every partition has its own small
table (1/256 of the distinct labels: in cache), so the probes of one partition run in cache
instead of jumping around one large table; they write each entry's local id to a compact
array.  The probes run in stretches that cannot outgrow the table, and labels of up to 8
bytes go through a loop of their own that keeps its values in registers.  A label's bytes are
found from its row only where needed (the first occurrence of a label of more than 8 bytes,
and the rows compared with it).  New labels of the piece are then ranked by their first row (a
bitmap over the piece, one range of it per thread), which gives their ids; the same walk over
the bitmap, in row order, records each new label's bytes.  A last pass
writes each row's id, reading the partitions' id lists in row order.  Scratch and output arrays
come from pyarrow's memory pool, which keeps freed memory between calls (fresh NumPy arrays of
this size cost page faults and zeroing on every call).

Tables sized ahead: the counting pass also feeds a HyperLogLog estimate of the distinct labels
(2**12 registers, about 1.6 % error).  Before a piece is probed, ``text_ids`` gives the tables
buffers from the memory pool with room for that many labels (``reserve``), so they need not
grow, rehash and fault in fresh pages label by label.  Before each later piece the room is
raised again when the last piece's new labels, times their share of its rows, call for more
(a file whose later rows bring new nodes).  A partition that still outgrows its room (skew)
grows into memory of its own, its pages written before they are read (a fresh page read
first maps the shared zero page, and the first store then costs a copy-on-write fault and a
TLB flush on every thread).

Pieces planned, not counted: after the first piece, the runs of entries (one per block and
partition) are sized from the partition shares of the last piece counted, with slack
(``plan_piece``; row counts per partition change little from piece to piece), which saves
the counting pass.  A piece whose rows overflow a run is counted and mapped again; the ids
never depend on the plan.

Files: this module holds the partition passes and the thin typed ``def``s over one piece
(``count_piece`` or ``plan_piece``, then ``reserve`` when more room is needed, then
``map_piece``), over the distinct labels at the end (``label_offsets``, ``label_bytes``) and
over integer labels (``integer_labels``).  Inline pieces, one concept each: ``label_hash.pxd``
(the segment table, a row's bytes, the hash), ``label_passes.pxd`` (the count and scatter row
passes), ``label_tables.pxd`` (one partition's table: growth and probe),
``label_estimate.pxd`` (the HyperLogLog estimate), ``label_rank.pxd`` (the new labels of a
piece ranked by first row), ``integer_text.pxd`` (integers parsed exactly).  ``fastmst/_kernels/labels.py`` holds ``text_ids`` and ``integer_values``, which check
the chunks, cut them into pieces and allocate every array.

Threads: the row passes split a piece into position blocks (each block's entries sit in block
order within every partition), the partition passes take partitions; every id is fixed by the
rows alone, so the ids are the same for every thread count.
"""
cimport cython
from cython.parallel cimport prange
from libc.stdint cimport int32_t, int64_t, uint8_t, uint32_t, uint64_t
from libc.stdlib cimport calloc, free, realloc
from libc.string cimport memcmp, memcpy, memset

from fastmst._kernels.integer_text cimport integer_span
from fastmst._kernels.label_estimate cimport REGS, estimate
from fastmst._kernels.label_hash cimport Seg, SEG_SHIFT, seg_rows
from fastmst._kernels.label_passes cimport PARTS, row_pass
from fastmst._kernels.label_rank cimport rank_new
from fastmst._kernels.label_tables cimport (Entry, Part, copied, free_parts, probe, rehash,
                                           resize)


cdef enum:
    EXTRA = 32              # plan_piece: entries a run gets beyond its expected share
cdef double SLACK = 1.15    # plan_piece: the factor of a run's expected share


# ---------------------------------------------------------------------------------------------
# partition passes (the row passes are in label_passes.pxd)

cdef void _probe_all(Part* parts, const Entry* ent, const Py_ssize_t* run,
                     const Py_ssize_t* cur, Py_ssize_t nblk, int32_t* lids, const Seg* segs,
                     const Py_ssize_t* segblk, int threads) noexcept nogil:
    """Every partition's runs (``run``: their first entries, ``cur``: their ends; blocks x
    PARTS), block by block, the partitions taken by the threads."""
    cdef Py_ssize_t q, b, i, k
    cdef uint64_t warm
    cdef Part* p
    for q in prange(PARTS, num_threads=threads, schedule="dynamic"):
        p = &parts[q]
        p.fresh = p.count
        # read the table once in order (streamed from memory) before the scattered probes,
        # which then hit the cache; the probe of entry j + 16 is prefetched
        warm = 0
        for i in range(0, 2 * p.cap, 8):
            warm = warm + p.slots[i]
        p.warm = warm
        for b in range(nblk):
            k = b * PARTS + q
            if p.failed:
                break
            probe(p, ent + run[k], cur[k] - run[k], lids + run[k], segs, segblk)


cdef void _global_ids(Part* parts, const Py_ssize_t* run, const Py_ssize_t* cur,
                      Py_ssize_t nblk, int32_t* ids, int threads) noexcept nogil:
    """``ids[j]``: the local id of entry j replaced by its global id, in place, for the
    entries of every run (``run``: first entries, ``cur``: ends)."""
    cdef Py_ssize_t q, j, b
    cdef int32_t* g
    for q in prange(PARTS, num_threads=threads, schedule="dynamic"):
        g = parts[q].gid
        for b in range(nblk):
            for j in range(run[b * PARTS + q], cur[b * PARTS + q]):
                ids[j] = g[ids[j]]


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
    for b in prange(nb, num_threads=threads, schedule="dynamic"):
        _write_block(part, ids, off0 + b * PARTS, b * block,
                     (b + 1) * block if (b + 1) * block < rows else rows, out)


cdef void _gather_bytes(const uint64_t* ptr, Py_ssize_t n, const int64_t* offsets,
                        uint8_t* out) noexcept nogil:
    """Concatenate the labels at ``ptr[:n]`` (lengths from ``offsets``) into ``out``."""
    cdef Py_ssize_t i, k
    for i in range(n):
        k = offsets[i + 1] - offsets[i]
        if k:
            memcpy(&out[offsets[i]], <const void *>ptr[i], k)


cdef void _offsets(const Py_ssize_t* hist, Py_ssize_t nblk, Py_ssize_t* off,
                   Py_ssize_t* end) noexcept nogil:
    """Runs of entries from the room of each (block, partition) ``hist`` (nblk x PARTS):
    partitions in order, blocks in order within a partition.  OUT: ``off[b * PARTS + q]``,
    the first entry of block b's run in partition q, and ``end[...]`` the run's end."""
    cdef Py_ssize_t q, b, acc = 0
    for q in range(PARTS):
        for b in range(nblk):
            off[b * PARTS + q] = acc
            acc += hist[b * PARTS + q]
            end[b * PARTS + q] = acc


# ---------------------------------------------------------------------------------------------
# the thin defs (their Python half, which slices the chunks into pieces and allocates every
# array, is fastmst/_kernels/labels.py)

#: Partitions of a piece (the hash's top byte), bytes of one entry, rows per segment block,
#: bytes of one block's estimate registers; a planned run's room: its expected share times
#: PLAN_SLACK, plus PLAN_EXTRA entries.
PLAN_SLACK = SLACK
PLAN_EXTRA = EXTRA
REG_BYTES = REGS
N_PARTS = PARTS
ENTRY_BYTES = sizeof(Entry)
SEG_ROWS_LOG2 = SEG_SHIFT


@cython.auto_pickle(False)
cdef class LabelTables:
    """LabelTables()

    The label tables of one ``text_ids`` call: one open-addressing table per partition, the
    first occurrence (address, length) of every distinct label so far, in id order, and the
    registers of the distinct-label estimate.  Between ``count_piece`` and ``map_piece`` it
    holds the counted piece (its segment words, rows, blocks and per-block partition counts).
    Memory allocated here is freed with the object; ``reserve`` buffers are kept alive by it."""
    cdef Part* parts
    cdef uint64_t* gptr
    cdef int64_t* glen
    cdef bint own_g
    cdef Py_ssize_t count, gcap
    cdef uint8_t hll[REGS]
    cdef Py_ssize_t* hist           # the counted piece: blocks x PARTS counts
    cdef Py_ssize_t* segc           # its segment words
    cdef Py_ssize_t nsegc, crows, cblock, cnblk
    cdef Py_ssize_t share[PARTS]    # rows of each partition in the last piece counted
    cdef object keep                # the reserved buffers in use

    def __cinit__(self):
        self.parts = <Part*>calloc(PARTS, sizeof(Part))
        if self.parts == NULL:
            raise MemoryError("text_ids: no memory for the label tables.")
        memset(self.hll, 0, REGS)
        memset(self.share, 0, PARTS * sizeof(Py_ssize_t))
        self.own_g = True
        self.keep = ()

    def __dealloc__(self):
        free_parts(self.parts, PARTS)
        if self.own_g:
            free(self.gptr)
            free(self.glen)
        free(self.hist)
        free(self.segc)


def count_piece(LabelTables tables not None, const Py_ssize_t[::1] seg,
                const Py_ssize_t[::1] segblk, Py_ssize_t rows, Py_ssize_t block,
                uint8_t[::1] regs, int threads, /):
    """Count the rows of each partition of one piece, block by block, into ``tables`` (for
    the ``map_piece`` call that follows, on the same piece) and return the estimated number
    of distinct labels of every piece counted so far.

    ``seg``, ``segblk``, ``rows``: as ``map_piece`` takes them; ``block``: rows per block;
    ``regs``: scratch for the blocks' estimate registers (blocks x 2**12 bytes)."""
    cdef Py_ssize_t nseg = seg.shape[0] // 6, nblk, b, j
    cdef Py_ssize_t* hist
    cdef uint8_t* r
    if threads < 1:
        raise ValueError(f"count_piece: threads must be positive, received {threads}.")
    if rows < 1 or block < 1 or nseg < 1 or seg.shape[0] != 6 * nseg:
        raise ValueError(f"count_piece: expected rows and block >= 1 and 6 words per segment, "
                         f"received rows={rows}, block={block}, {seg.shape[0]} words.")
    nblk = (rows + block - 1) // block
    if (regs.shape[0] < nblk * REGS or segblk.shape[0] < ((rows - 1) >> SEG_SHIFT) + 1
            or seg_rows(&seg[0], nseg) != rows):
        raise ValueError("count_piece: the segment table or a scratch array does not fit the "
                         "piece; use labels.text_ids, which sizes them.")
    _hold_piece(tables, seg, nblk)
    hist = tables.hist
    with nogil:
        memset(hist, 0, nblk * PARTS * sizeof(Py_ssize_t))
        memset(&regs[0], 0, nblk * REGS)
        row_pass(<const Seg*>&seg[0], nseg, rows, block, hist, NULL, NULL, NULL, &regs[0],
                  False, threads)
        memset(tables.share, 0, PARTS * sizeof(Py_ssize_t))
        for b in range(nblk):
            for j in range(PARTS):
                tables.share[j] += hist[b * PARTS + j]
        for b in range(nblk):
            r = &regs[b * REGS]
            for j in range(REGS):
                if r[j] > tables.hll[j]:
                    tables.hll[j] = r[j]
    tables.nsegc, tables.crows, tables.cblock, tables.cnblk = nseg, rows, block, nblk
    return int(estimate(tables.hll) + 0.5)


cdef _hold_piece(LabelTables tables, const Py_ssize_t[::1] seg, Py_ssize_t nblk):
    """Room in ``tables`` for the run sizes of ``nblk`` blocks and a copy of ``seg``."""
    cdef Py_ssize_t* hist = <Py_ssize_t*>realloc(tables.hist, nblk * PARTS * sizeof(Py_ssize_t))
    cdef Py_ssize_t* segc
    if hist == NULL:
        raise MemoryError("text_ids: no memory for the partition counts.")
    tables.hist = hist
    segc = <Py_ssize_t*>realloc(tables.segc, seg.shape[0] * sizeof(Py_ssize_t))
    if segc == NULL:
        raise MemoryError("text_ids: no memory for the partition counts.")
    tables.segc = segc
    memcpy(segc, &seg[0], seg.shape[0] * sizeof(Py_ssize_t))


def largest_partition(LabelTables tables not None, /):
    """The most labels one partition holds (a reservation must have room for them)."""
    cdef Py_ssize_t q, most = 0
    for q in range(PARTS):
        if tables.parts[q].count > most:
            most = tables.parts[q].count
    return most


def plan_piece(LabelTables tables not None, const Py_ssize_t[::1] seg,
               const Py_ssize_t[::1] segblk, Py_ssize_t rows, Py_ssize_t block,
               Py_ssize_t room, /):
    """Plan the runs of one piece without a counting pass, for the ``map_piece`` call that
    follows: each (block, partition) run gets that partition's share of the rows in the last
    piece ``count_piece`` counted, times the block's rows, with slack (x SLACK +
    EXTRA).  Returns
    the entries the runs take, or -1 (nothing planned) when nothing was counted yet or they
    would take more than ``room`` entries; ``map_piece`` returns -2 when the piece's rows
    fall otherwise than planned (then count it).  The ids do not depend on the plan."""
    cdef Py_ssize_t nseg = seg.shape[0] // 6, nblk, b, q, n, total = 0, counted = 0
    cdef double f
    if rows < 1 or block < 1 or nseg < 1 or seg.shape[0] != 6 * nseg:
        raise ValueError(f"plan_piece: expected rows and block >= 1 and 6 words per segment, "
                         f"received rows={rows}, block={block}, {seg.shape[0]} words.")
    nblk = (rows + block - 1) // block
    if (segblk.shape[0] < ((rows - 1) >> SEG_SHIFT) + 1 or seg_rows(&seg[0], nseg) != rows):
        raise ValueError("plan_piece: the segment table does not fit the piece; use "
                         "labels.text_ids, which sizes it.")
    for q in range(PARTS):
        counted += tables.share[q]
    if counted == 0:
        return -1
    _hold_piece(tables, seg, nblk)
    for b in range(nblk):
        n = block if (b + 1) * block <= rows else rows - b * block
        for q in range(PARTS):
            f = <double>tables.share[q] * <double>n / <double>counted
            tables.hist[b * PARTS + q] = <Py_ssize_t>(SLACK * f) + EXTRA
            total += tables.hist[b * PARTS + q]
    if total > room:
        tables.crows = 0
        return -1
    tables.nsegc, tables.crows, tables.cblock, tables.cnblk = nseg, rows, block, nblk
    return total


def reserve(LabelTables tables not None, uint64_t[::1] slots, int64_t[::1] first,
            uint64_t[::1] uptr, int32_t[::1] gid, uint64_t[::1] gptr, int64_t[::1] glen,
            int threads, /):
    """Move the tables into these buffers, which ``tables`` then keeps alive: ``slots`` holds
    N_PARTS tables of ``cap`` slots (2 words each; ``cap`` a power of two with room for every
    partition's labels at load 2/3), ``first``, ``uptr`` and ``gid`` N_PARTS x ``ucap`` ids
    (``ucap`` at least the most labels one partition holds), ``gptr``/``glen`` room for the
    distinct labels so far.  Sized ahead of ``map_piece`` from ``count_piece``'s estimate, so
    the tables need not grow (nor fault in fresh pages) label by label.  ``threads`` take
    the partitions."""
    cdef Py_ssize_t cap = slots.shape[0] // (2 * PARTS), ucap = first.shape[0] // PARTS, q
    cdef Part* p
    cdef uint64_t* arena
    if (cap < 2 or cap & (cap - 1) or slots.shape[0] != 2 * PARTS * cap
            or first.shape[0] != PARTS * ucap or uptr.shape[0] != PARTS * ucap
            or gid.shape[0] != PARTS * ucap or gptr.shape[0] < tables.count
            or glen.shape[0] != gptr.shape[0]):
        raise ValueError("reserve: expected N_PARTS x cap slot pairs (cap a power of two), "
                         "N_PARTS x ucap ids in first, uptr and gid, and gptr and glen of one "
                         "length, at least the labels so far; use labels.text_ids, which "
                         "sizes them.")
    if threads < 1:
        raise ValueError(f"reserve: threads must be positive, received {threads}.")
    for q in range(PARTS):
        if 3 * tables.parts[q].count > 2 * cap or tables.parts[q].count > ucap:
            raise ValueError(f"reserve: partition {q} holds {tables.parts[q].count} labels; "
                             f"expected room for them (cap={cap} slots, ucap={ucap}).")
    arena = &slots[0]
    with nogil:
        for q in prange(PARTS, num_threads=threads, schedule="dynamic"):
            p = &tables.parts[q]
            memset(arena + 2 * cap * q, 0, 2 * cap * sizeof(uint64_t))
            if p.cap:
                rehash(p.slots, p.cap, arena + 2 * cap * q, cap)
            if p.own_slots:
                free(p.slots)
            p.slots, p.cap, p.own_slots = arena + 2 * cap * q, cap, False
            if p.count:
                memcpy(&first[ucap * q], p.first, p.count * sizeof(int64_t))
                memcpy(&uptr[ucap * q], p.uptr, p.count * sizeof(uint64_t))
                memcpy(&gid[ucap * q], p.gid, p.count * sizeof(int32_t))
            if p.own_ids:
                free(p.first)
                free(p.uptr)
                free(p.gid)
            p.first, p.uptr, p.gid, p.ucap, p.own_ids = (&first[ucap * q], &uptr[ucap * q],
                                                         &gid[ucap * q], ucap, False)
        if tables.count:
            memcpy(&gptr[0], tables.gptr, tables.count * sizeof(uint64_t))
            memcpy(&glen[0], tables.glen, tables.count * sizeof(int64_t))
        if tables.own_g:
            free(tables.gptr)
            free(tables.glen)
    tables.gptr = &gptr[0] if gptr.shape[0] else NULL
    tables.glen = &glen[0] if glen.shape[0] else NULL
    tables.gcap, tables.own_g = gptr.shape[0], False
    tables.keep = (slots, first, uptr, gid, gptr, glen)


def map_piece(LabelTables tables not None, const Py_ssize_t[::1] seg,
              const Py_ssize_t[::1] segblk, Py_ssize_t rows, Py_ssize_t block,
              Py_ssize_t[::1] off, uint8_t[::1] ent, uint8_t[::1] part, int32_t[::1] eid,
              uint64_t[::1] bits, Py_ssize_t[::1] below, int32_t[::1] out, int threads, /):
    """Write the ids of the ``rows`` positions of one piece to ``out[:rows]`` and return the
    number of distinct labels so far, or -2 when a planned piece (``plan_piece``) does not
    fit its runs (nothing was mapped: count the piece, then map it).  The piece must be the
    one ``count_piece`` or ``plan_piece`` just took (the same segment words, rows and block).

    ``seg``: the piece's segments, 6 words each (offsets address from the segment's first
    row, data address, readable bytes, piece position, rows, 1 for int64 offsets), made by
    ``labels._segment_table`` from Arrow buffers that stay alive during the call; ``segblk``:
    the segment of each block of 2**SEG_ROWS_LOG2 rows.  The rest is scratch of the sizes
    ``labels.text_ids`` gives (``off``: 3 x blocks x N_PARTS; ``ent`` and ``eid``: room for
    the entries of the runs, what ``plan_piece`` returns, or ``rows`` after ``count_piece``).
    """
    cdef Py_ssize_t nseg = seg.shape[0] // 6, nblk = tables.cnblk, q, fresh = 0
    cdef Py_ssize_t k, total = 0
    cdef Py_ssize_t *run
    cdef Py_ssize_t *cur
    cdef Py_ssize_t *end
    cdef bint fits
    if threads < 1:
        raise ValueError(f"map_piece: threads must be positive, received {threads}.")
    if (tables.crows == 0 or rows != tables.crows or block != tables.cblock
            or nseg != tables.nsegc or seg.shape[0] != 6 * nseg
            or memcmp(&seg[0], tables.segc, 6 * nseg * sizeof(Py_ssize_t)) != 0):
        raise ValueError("map_piece: expected the piece count_piece (or plan_piece) just took "
                         "(the same segment words, rows and block); call count_piece first.")
    for k in range(nblk * PARTS):
        total += tables.hist[k]
    if (off.shape[0] != 3 * nblk * PARTS
            or ent.shape[0] < total * <Py_ssize_t>sizeof(Entry) or part.shape[0] < rows
            or eid.shape[0] < total or out.shape[0] < rows
            or bits.shape[0] < (rows + 63) // 64 or below.shape[0] < (rows + 63) // 64
            or segblk.shape[0] < ((rows - 1) >> SEG_SHIFT) + 1):
        raise ValueError("map_piece: the segment table or a scratch array does not fit the "
                         "piece; use labels.text_ids, which sizes them.")
    tables.crows = 0    # taken once, mapped once
    run, cur, end = &off[0], &off[nblk * PARTS], &off[2 * nblk * PARTS]
    with nogil:
        _offsets(tables.hist, nblk, run, end)
        memcpy(cur, run, nblk * PARTS * sizeof(Py_ssize_t))
        fits = row_pass(<const Seg*>&seg[0], nseg, rows, block, cur, end, <Entry*>&ent[0],
                         &part[0], NULL, True, threads)
    if not fits:
        return -2
    with nogil:
        _probe_all(tables.parts, <const Entry*>&ent[0], run, cur, nblk, &eid[0],
                   <const Seg*>&seg[0], &segblk[0], threads)
        for q in range(PARTS):
            fresh += tables.parts[q].count
            if tables.parts[q].failed:
                fresh = -1
                break
        if fresh > tables.gcap:
            k = fresh if fresh > 2 * tables.gcap else 2 * tables.gcap
            if not _grow_labels(tables, k):
                fresh = -1
    if fresh < 0:
        raise MemoryError("text_ids: no memory for the label tables.")
    with nogil:
        rank_new(tables.parts, &bits[0], &below[0], rows, tables.count, <const Seg*>&seg[0],
                 &segblk[0], tables.gptr, tables.glen, threads)
        _global_ids(tables.parts, run, cur, nblk, &eid[0], threads)
        _write_rows(&part[0], &eid[0], run, rows, block, &out[0], threads)
    tables.count = fresh
    return fresh


cdef bint _grow_labels(LabelTables t, Py_ssize_t k) noexcept nogil:
    """Room for ``k`` distinct labels' (address, length) (False when memory ran out).  Arrays
    that lie in a reserved buffer are copied to new memory of this module's own."""
    cdef uint64_t* gptr
    cdef int64_t* glen
    if t.own_g:
        if not (resize(<void**>&t.gptr, k, sizeof(uint64_t))
                and resize(<void**>&t.glen, k, sizeof(int64_t))):
            return False
    else:
        gptr = <uint64_t*>copied(t.gptr, k, t.count, sizeof(uint64_t))
        glen = <int64_t*>copied(t.glen, k, t.count, sizeof(int64_t))
        if gptr == NULL or glen == NULL:
            free(gptr)
            free(glen)
            return False
        t.gptr, t.glen, t.own_g = gptr, glen, True
    t.gcap = k
    return True


# ---------------------------------------------------------------------------------------------
# integer labels: text written as integers, parsed exactly (``ids="integer"``)


def integer_labels(const Py_ssize_t[::1] seg, int64_t[::1] out, int threads, /):
    """Parse the rows of the segments ``seg`` (6 words each, as ``map_piece`` takes them)
    as integers into ``out`` (one per row).  True when every row is an integer within int64
    (``[+-]?[0-9]+``, leading zeros allowed); False at the first row that is not (``out`` is
    then incomplete: the caller reports that row)."""
    cdef Py_ssize_t nseg = seg.shape[0] // 6, s, rows
    cdef const Seg* segs
    cdef int bad = 0
    if threads < 1:
        raise ValueError(f"integer_labels: threads must be positive, received {threads}.")
    rows = seg_rows(&seg[0], nseg) if nseg and seg.shape[0] == 6 * nseg else -1
    if rows < 0 or out.shape[0] != rows:
        raise ValueError(f"integer_labels: expected 6 words per segment, the segments following "
                         f"on from row 0 and out with one slot per row; received "
                         f"{seg.shape[0]} words and {out.shape[0]} slots.")
    segs = <const Seg*>&seg[0]
    with nogil:
        for s in prange(nseg, num_threads=threads, schedule="dynamic"):
            if segs[s].wide:
                if not integer_span(<const int64_t*>segs[s].offs, segs[s].data, segs[s].n,
                                     &out[segs[s].at]):
                    bad += 1
            elif not integer_span(<const int32_t*>segs[s].offs, segs[s].data, segs[s].n,
                                   &out[segs[s].at]):
                bad += 1
    return bad == 0


def label_offsets(LabelTables tables not None, int64_t[::1] offsets, /):
    """The running sum of the distinct labels' byte lengths in id order, with a leading 0,
    written to ``offsets`` (one more than the labels); returns the last (all their bytes)."""
    cdef Py_ssize_t i, n = tables.count
    if offsets.shape[0] != n + 1:
        raise ValueError(f"label_offsets: offsets must hold {n + 1} values (the labels plus "
                         f"one), received {offsets.shape[0]}.")
    with nogil:
        offsets[0] = 0
        for i in range(n):
            offsets[i + 1] = offsets[i] + tables.glen[i]
    return offsets[n]


def label_bytes(LabelTables tables not None, const int64_t[::1] offsets, uint8_t[::1] out,
                int threads, /):
    """The distinct labels' bytes concatenated in id order into ``out``, at ``offsets`` (as
    ``label_offsets`` writes them); ``threads`` copy ranges of labels.  The chunks must still
    be alive."""
    cdef Py_ssize_t n = tables.count, i, b, nb, step
    cdef bint fits = offsets.shape[0] == n + 1 and offsets[0] == 0
    if threads < 1:
        raise ValueError(f"label_bytes: threads must be positive, received {threads}.")
    if fits:
        for i in range(n):
            if offsets[i + 1] - offsets[i] != tables.glen[i]:
                fits = False
                break
    if not fits or out.shape[0] != offsets[n]:
        raise ValueError("label_bytes: offsets must be the running sum of the label lengths "
                         "(label_offsets) and out hold their last value in bytes.")
    if n and offsets[n]:
        step = 1 << 16
        nb = (n + step - 1) // step
        with nogil:
            for b in prange(nb, num_threads=threads, schedule="dynamic"):
                _gather_bytes(tables.gptr + b * step, (n - b * step) if b == nb - 1 else step,
                              &offsets[b * step], &out[0])
