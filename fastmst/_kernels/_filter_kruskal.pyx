"""Filter-Kruskal over streamed chunks of the rule order.

The 2048 top-digit buckets of the (key, position) order are the partition of Filter-Kruskal
(Osipov, Sanders and Singler, ALENEX 2009) with 2047 pivots.  Instead of writing a record
for every edge up front, the buckets are taken in key order a chunk at a time:

* one pass counts the edges of every bucket in every position block (blocks of positions
  taken by the threads dynamically; counts and slots are laid out per block, in block
  order, so nothing depends on which thread took which block);
* a chunk is a run of consecutive buckets.  Its edges are copied, straight from the input
  arrays in position order, into slots: a 12-byte sort record (key, slot) plus the slot's
  position and endpoints, so the scan never gathers from the input arrays (it writes the
  accepted edges' positions, endpoints and keys, and the keys are mapped back to weights);
* once the scans reject most edges, a chunk is *filtered while it is collected*: the pass in
  position order keeps only the edges whose endpoints are in different trees (read-only
  finds, sequential reads of the endpoint arrays, a bitmap of the largest tree that spares
  most finds), and only the survivors get slots;
* each bucket of the chunk is then filtered again when rejections dominate, sorted in cache
  and scanned, as in the paper's base case; a bucket too large for that goes through the
  paper's pivot recursion.

Edges heavier than the last one the forest needs are never copied, and edges that close a
cycle with lighter ones are dropped before they cost a record.  Dropping such an edge never
changes the forest, and within a bucket the slots are in position order, so sorting by
(key, slot) is sorting by (key, position): the result is exactly plain Kruskal's, for any
chunking and any thread count.

The union-find is the rank-in-parent-word layout of ``dsu.pxd`` (``rp_*``): a find and the link
after it read nothing but the parent array.

Files: ``filter_kruskal.py`` holds the public function and the stream driver (the loop over
chunks, the offsets and allocations, all NumPy); this compiled module the passes over the edges
(count, copy, collect, distribute, mark the largest tree) and the scan of a chunk's buckets, each
behind a thin ``def`` that checks the sizes that protect memory and releases the GIL;
``fk_scan.pxd`` the work on one bucket's records (scan, filter, pivot recursion);
``fk_buckets.pxd`` the sort-ahead pipeline over a chunk's buckets.

The weight bits reach the ``def``s as bytes with their width (4 or 8), so that only the kernels,
not the ``def``s, are specialised per key width.
"""
from cython.parallel cimport prange
from libc.stdint cimport int64_t, uint8_t, uint32_t, uint64_t

from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.dsu cimport rp_root
from fastmst._kernels.fk_buckets cimport Rate, chunk_buckets
from fastmst._kernels.fk_scan cimport both_giant
from fastmst._kernels.radix cimport Rec, digit_hist, digit_kp
from fastmst._kernels.tie_rule cimport rank_key, ukey_t


cdef void _mark_giant(const index_t* parent, Py_ssize_t n, index_t g, uint64_t* giant,
                      int threads) noexcept nogil:
    """OUT: ``giant``, one bit per node, set for the members of the tree rooted at ``g``.

    The trees only grow, so a marked pair stays joined: an edge between two marked nodes
    closes a cycle, and the bitmap (n / 8 bytes, in cache where the parents are not) answers
    that without a find.  Threads own whole words and only read ``parent``.
    """
    cdef Py_ssize_t w, b, x, nw = (n + 63) // 64
    cdef uint64_t word
    for w in prange(nw, num_threads=threads, schedule="dynamic", chunksize=1024):
        word = 0
        for b in range(64):
            x = w * 64 + b
            if x < n and rp_root(parent, <index_t>x) == g:
                word = word | ((<uint64_t>1) << b)
        giant[w] = word


cdef void _scatter(const ukey_t* bits, const index_t* tail, const index_t* head, Py_ssize_t m,
                   int kind, bint comp, uint64_t kmin, int s, Py_ssize_t d0, Py_ssize_t d1,
                   Py_ssize_t* off, Rec* rec, index_t* side, Py_ssize_t nblk,
                   int threads) noexcept nogil:
    """Copy every edge of buckets [d0, d1) into its slot (no filter).

    IN/OUT: ``off[t * 2048 + d]``, the next slot of position block t in bucket d.  The
    ``nblk`` blocks are contiguous position ranges taken by the threads dynamically (a thread
    the OS deschedules holds up one block, not half the pass); their slots are in block order,
    so every bucket's slots are in position order whoever copies which block.
    """
    cdef Py_ssize_t t, i, lo, hi, d, j
    cdef Py_ssize_t* h
    cdef uint64_t k
    for t in prange(nblk, num_threads=threads, schedule="dynamic"):
        lo = m * t // nblk
        hi = m * (t + 1) // nblk
        h = off + t * 2048
        for i in range(lo, hi):
            k = rank_key(bits[i], kind, comp) - kmin
            d = digit_kp(k, <uint32_t>i, s, 0x7FF)
            if d >= d0 and d < d1:
                j = h[d]
                h[d] = j + 1
                rec[j].key = k
                rec[j].pos = <uint32_t>j
                side[3 * j] = <index_t><uint32_t>i
                side[3 * j + 1] = tail[i]
                side[3 * j + 2] = head[i]


cdef void _collect(const ukey_t* bits, const index_t* tail, const index_t* head, Py_ssize_t m,
                   int kind, bint comp, uint64_t kmin, int s, Py_ssize_t d0, Py_ssize_t d1,
                   const index_t* parent, const uint64_t* giant, Rec* buf, Py_ssize_t* fill,
                   Py_ssize_t* hist2, Py_ssize_t nblk, int threads) noexcept nogil:
    """Append (key, position) of every edge of buckets [d0, d1) whose endpoints are in
    different trees to position block t's part of ``buf``, in position order (blocks as in
    ``_scatter``).

    IN/OUT: ``fill[t]``, block t's next free record (its part is sized by the unfiltered
    count, so it cannot overflow).  OUT: ``hist2[t * 2048 + d]`` (zeroed by the caller), the
    survivors per block and bucket.  The finds only read ``parent``.
    """
    cdef Py_ssize_t t, i, lo, hi, d, j, keep
    cdef Py_ssize_t* h
    cdef uint64_t k
    for t in prange(nblk, num_threads=threads, schedule="dynamic"):
        lo = m * t // nblk
        hi = m * (t + 1) // nblk
        h = hist2 + t * 2048
        j = fill[t]
        for i in range(lo, hi):
            k = rank_key(bits[i], kind, comp) - kmin
            d = digit_kp(k, <uint32_t>i, s, 0x7FF)
            # the common cases (outside the range, or both ends in the largest tree) take no
            # branch on the random key; only the rest go to the finds
            if ((d >= d0) & (d < d1) & (not both_giant(giant, tail[i], head[i]))):
                keep = rp_root(parent, tail[i]) != rp_root(parent, head[i])
                buf[j].key = k
                buf[j].pos = <uint32_t>i
                j = j + keep
                h[d] += keep
        fill[t] = j


cdef void _distribute(const Rec* buf, const Py_ssize_t* start, const Py_ssize_t* fill,
                      const index_t* tail, const index_t* head, int s,
                      Py_ssize_t d_end, Py_ssize_t* off, Rec* rec, index_t* side,
                      Py_ssize_t nblk, int threads) noexcept nogil:
    """Move the collected survivors of buckets below ``d_end`` into their slots (``off`` as in
    ``_scatter``); survivors of later buckets are dropped (collected again later)."""
    cdef Py_ssize_t t, r, d, j
    cdef uint32_t i
    cdef uint64_t k
    cdef Py_ssize_t* h
    for t in prange(nblk, num_threads=threads, schedule="dynamic"):
        h = off + t * 2048
        for r in range(start[t], fill[t]):
            k = buf[r].key
            i = buf[r].pos
            d = digit_kp(k, i, s, 0x7FF)
            if d < d_end:
                j = h[d]
                h[d] = j + 1
                rec[j].key = k
                rec[j].pos = <uint32_t>j
                side[3 * j] = <index_t>i
                side[3 * j + 1] = tail[i]
                side[3 * j + 2] = head[i]




# ------------------------------------------------------------------ the thin defs (driver: .py)

cdef int _check_pass(Py_ssize_t n_bytes, int width, Py_ssize_t m, Py_ssize_t n_head,
                     Py_ssize_t d0, Py_ssize_t d1, Py_ssize_t n_rows,
                     Py_ssize_t nblk) except -1:
    """The sizes a pass over the edges relies on (one place for every def below)."""
    if width != 4 and width != 8:
        raise ValueError(f"filter_kruskal pass: the weight bits must be 4 or 8 bytes wide, "
                         f"received {width}.")
    if n_bytes != m * width or n_head != m:
        raise ValueError(f"filter_kruskal pass: {m} tails need {m} heads and {m * width} bytes "
                         f"of weight bits, received {n_head} and {n_bytes}.")
    if not 0 <= d0 <= d1 <= 2048:
        raise ValueError(f"filter_kruskal pass: buckets [{d0}, {d1}) are outside [0, 2048).")
    if nblk < 1 or n_rows != nblk * 2048:
        raise ValueError(f"filter_kruskal pass: {nblk} position blocks need {nblk * 2048} "
                         f"counters (blocks x 2048), received {n_rows}.")
    return 0


cdef int _check_slots(Py_ssize_t rec_bytes, Py_ssize_t n_side, Py_ssize_t need) except -1:
    """``need`` slots fit in records of 12 bytes and (position, tail, head) triples."""
    if rec_bytes < 12 * need or n_side < 3 * need:
        raise ValueError(f"filter_kruskal pass: {need} slots need {12 * need} record bytes and "
                         f"{3 * need} side entries, received {rec_bytes} and {n_side}.")
    return 0


def digit_histogram(const uint8_t[::1] bits, int width, Py_ssize_t m, int kind, bint comp,
                    uint64_t kmin, int s, Py_ssize_t[::1] hist, Py_ssize_t nblk, int threads):
    """OUT: ``hist[t * 2048 + d]``, the edges of position block t in top-digit bucket d.

    ``bits``: the weight bits of ``m`` edges as bytes, ``width`` (4 or 8) per edge.
    """
    _check_pass(bits.shape[0], width, m, m, 0, 0, hist.shape[0], nblk)
    with nogil:
        if width == 8:
            digit_hist(<const uint64_t*>&bits[0], m, kind, comp, kmin, s, &hist[0], nblk,
                       threads)
        else:
            digit_hist(<const uint32_t*>&bits[0], m, kind, comp, kmin, s, &hist[0], nblk,
                       threads)


def scatter(const uint8_t[::1] bits, int width, const index_t[::1] tail,
            const index_t[::1] head, int kind, bint comp, uint64_t kmin, int s, Py_ssize_t d0,
            Py_ssize_t d1, Py_ssize_t[::1] off, uint8_t[::1] rec, index_t[::1] side,
            Py_ssize_t nblk, int threads):
    """Copy every edge of buckets [d0, d1) into its slot (``_scatter``; IN/OUT ``off``, the
    next slot of every block and bucket).  ``rec`` and ``side`` must hold every slot the
    offsets reach (the caller's offsets come from the histogram)."""
    cdef Py_ssize_t m = tail.shape[0]
    _check_pass(bits.shape[0], width, m, head.shape[0], d0, d1, off.shape[0], nblk)
    _check_slots(rec.shape[0], side.shape[0], rec.shape[0] // 12)
    with nogil:
        if width == 8:
            _scatter(<const uint64_t*>&bits[0], &tail[0], &head[0], m, kind, comp, kmin, s,
                     d0, d1, &off[0], <Rec*>&rec[0], &side[0], nblk, threads)
        else:
            _scatter(<const uint32_t*>&bits[0], &tail[0], &head[0], m, kind, comp, kmin, s,
                     d0, d1, &off[0], <Rec*>&rec[0], &side[0], nblk, threads)


def collect(const uint8_t[::1] bits, int width, const index_t[::1] tail,
            const index_t[::1] head, int kind, bint comp, uint64_t kmin, int s, Py_ssize_t d0,
            Py_ssize_t d1, const index_t[::1] parent, const uint64_t[::1] giant,
            uint8_t[::1] buf, Py_ssize_t[::1] fill, Py_ssize_t[::1] hist2, Py_ssize_t nblk,
            int threads):
    """Append the edges of buckets [d0, d1) that join two trees to ``buf`` (``_collect``;
    IN/OUT ``fill``, OUT ``hist2`` zeroed by the caller).  Block t's part of ``buf`` starts at
    ``fill[t]`` and must hold the block's unfiltered count."""
    cdef Py_ssize_t m = tail.shape[0]
    _check_pass(bits.shape[0], width, m, head.shape[0], d0, d1, hist2.shape[0], nblk)
    if fill.shape[0] != nblk or giant.shape[0] < (parent.shape[0] + 63) // 64:
        raise ValueError(f"filter_kruskal collect: needs {nblk} fill entries and "
                         f"{(parent.shape[0] + 63) // 64} bitmap words, received "
                         f"{fill.shape[0]} and {giant.shape[0]}.")
    with nogil:
        if width == 8:
            _collect(<const uint64_t*>&bits[0], &tail[0], &head[0], m, kind, comp, kmin, s,
                     d0, d1, &parent[0], &giant[0], <Rec*>&buf[0], &fill[0], &hist2[0], nblk,
                     threads)
        else:
            _collect(<const uint32_t*>&bits[0], &tail[0], &head[0], m, kind, comp, kmin, s,
                     d0, d1, &parent[0], &giant[0], <Rec*>&buf[0], &fill[0], &hist2[0], nblk,
                     threads)


def distribute(const uint8_t[::1] buf, const Py_ssize_t[::1] start,
               const Py_ssize_t[::1] fill, const index_t[::1] tail, const index_t[::1] head,
               int s, Py_ssize_t d_end, Py_ssize_t[::1] off, uint8_t[::1] rec,
               index_t[::1] side, Py_ssize_t nblk, int threads):
    """Move the collected survivors of buckets below ``d_end`` into their slots
    (``_distribute``; ``off`` as for ``scatter``)."""
    _check_pass(0, 4, 0, 0, 0, d_end, off.shape[0], nblk)
    _check_slots(rec.shape[0], side.shape[0], rec.shape[0] // 12)
    if start.shape[0] != nblk or fill.shape[0] != nblk or head.shape[0] != tail.shape[0]:
        raise ValueError(f"filter_kruskal distribute: needs {nblk} start and fill entries and "
                         f"one length of tail and head, received {start.shape[0]}, "
                         f"{fill.shape[0]}, {tail.shape[0]} and {head.shape[0]}.")
    with nogil:
        _distribute(<const Rec*>&buf[0], &start[0], &fill[0], &tail[0], &head[0], s, d_end,
                    &off[0], <Rec*>&rec[0], &side[0], nblk, threads)


def mark_giant(const index_t[::1] parent, index_t g, uint64_t[::1] giant, int threads):
    """OUT: ``giant``, one bit per node, set for the members of the tree rooted at ``g``."""
    cdef Py_ssize_t n = parent.shape[0]
    if not 0 <= g < n or giant.shape[0] < (n + 63) // 64:
        raise ValueError(f"filter_kruskal mark_giant: needs a root in [0, {n}) and "
                         f"{(n + 63) // 64} bitmap words, received {g} and {giant.shape[0]}.")
    with nogil:
        _mark_giant(&parent[0], n, g, &giant[0], threads)


def scan_chunk(uint8_t[::1] rec, const Py_ssize_t[::1] bounds, int shift, int top_bits,
               const index_t[::1] side, index_t[::1] parent, int64_t[::1] op,
               index_t[::1] ot, index_t[::1] oh, uint64_t[::1] ow, Py_ssize_t count,
               Py_ssize_t target, Py_ssize_t threshold, Py_ssize_t[::1] rate,
               const uint64_t[::1] giant, uint8_t[::1] state, int threads):
    """Filter, sort and scan the buckets ``rec[bounds[b]:bounds[b+1]]`` of a chunk in key
    order (``fk_buckets.chunk_buckets``); accepted edges go to ``op``, ``ot``, ``oh``, ``ow``
    from ``count`` on.  IN/OUT: ``rate`` (scanned, accepted, window, filtering).  SCRATCH:
    ``state`` (one byte per bucket and one more).  Returns the new count."""
    cdef Py_ssize_t nbk = bounds.shape[0] - 1, cap = op.shape[0]
    cdef Rate r
    if nbk < 1:
        return count
    _check_slots(rec.shape[0], side.shape[0], bounds[nbk])
    if (ot.shape[0] != cap or oh.shape[0] != cap or ow.shape[0] != cap or
            not 0 <= count <= cap or rate.shape[0] != 4 or state.shape[0] <= nbk or
            giant.shape[0] < (parent.shape[0] + 63) // 64):
        raise ValueError(f"filter_kruskal scan_chunk: needs outputs of one length holding "
                         f"count, 4 rate entries, {nbk + 1} state bytes and "
                         f"{(parent.shape[0] + 63) // 64} bitmap words; received outputs of "
                         f"{cap}, {ot.shape[0]}, {oh.shape[0]} and {ow.shape[0]}, count "
                         f"{count}, {rate.shape[0]}, {state.shape[0]} and {giant.shape[0]}.")
    target = min(target, cap)   # at most every edge is accepted: this only guards the outputs
    r.scanned = rate[0]
    r.accepted = rate[1]
    r.window = rate[2]
    r.filtering = rate[3] != 0
    with nogil:
        count = chunk_buckets(<Rec*>&rec[0], &bounds[0], nbk, shift, top_bits, &side[0],
                              &parent[0], &op[0], &ot[0], &oh[0], &ow[0], count, target,
                              threshold, &r, &giant[0], &state[0], threads)
    rate[0] = r.scanned
    rate[1] = r.accepted
    rate[3] = r.filtering
    return count
