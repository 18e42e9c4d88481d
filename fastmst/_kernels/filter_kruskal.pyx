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

Files: this module holds the passes over the edges (count, copy, collect, distribute) and the
stream driver; ``fk_scan.pxd`` the work on one bucket's records (scan, filter, pivot
recursion); ``fk_buckets.pxd`` the sort-ahead pipeline over a chunk's buckets.
"""
import numpy as np
from cython.parallel cimport prange
from libc.stdint cimport int32_t, int64_t, uint8_t, uint32_t, uint64_t

from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.dsu cimport rp_root, rp_standard_parents
from fastmst._kernels.fk_buckets cimport Rate, chunk_buckets
from fastmst._kernels.fk_scan cimport both_giant
from fastmst._kernels.radix cimport Rec, digit_hist, digit_kp
from fastmst._kernels.tie_rule cimport rank_key, ukey_t
from fastmst._kernels import radix
from fastmst._kernels.radix_kruskal import check_record_inputs, kruskal_radix
from fastmst._kernels.tie_rule import key_range, weights_from_keys


#: Scanned edges between two decisions on filtering (tests lower it to filter small graphs).
FILTER_WINDOW = 8192


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


cdef index_t _largest_root(index_t[::1] parent):
    """The root of the most frequent tree among 1023 evenly spaced nodes (deterministic).

    1023 finds cost next to nothing against a pass over the edges, and a tree holding a
    fraction f of the nodes gets about 1023 f samples, enough to tell the tree that dominates
    the filter's work.  A wrong pick only makes the bitmap spare fewer finds: the forest does
    not depend on it.
    """
    cdef Py_ssize_t n = parent.shape[0], k
    sample = np.linspace(0, n - 1, min(n, 1023)).astype(np.int64)
    roots = np.empty(sample.shape[0], dtype=np.int64)
    cdef int64_t[::1] sv = sample
    cdef int64_t[::1] rv = roots
    for k in range(sv.shape[0]):
        rv[k] = rp_root(&parent[0], <index_t>sv[k])
    values, counts = np.unique(roots, return_counts=True)
    return <index_t>values[int(np.argmax(counts))]


def _slot_offsets(hist, Py_ssize_t d0, Py_ssize_t d1):
    """Slot offsets of buckets [d0, d1) from per-block counts ``hist`` (blocks x 2048).

    Returns ``off`` (blocks x 2048, the first slot of block t in bucket d; buckets in order,
    blocks in order within a bucket) and ``bounds`` (d1 - d0 + 1 bucket boundaries).
    """
    sub = hist[:, d0:d1]
    flat = sub.T.ravel()
    starts = np.cumsum(flat) - flat
    off = np.zeros_like(hist)
    off[:, d0:d1] = starts.reshape(d1 - d0, hist.shape[0]).T
    bounds = np.zeros(d1 - d0 + 1, dtype=np.intp)
    np.cumsum(sub.sum(axis=0), out=bounds[1:])
    return np.ascontiguousarray(off), bounds


def _last_bucket(cum, Py_ssize_t d0, Py_ssize_t cap):
    """The largest d1 > d0 with ``cum[d1] - cum[d0] <= cap`` (at least d0 + 1)."""
    d1 = int(np.searchsorted(cum, cum[d0] + cap, side="right")) - 1
    return max(d1, d0 + 1)


cdef class _Slots:
    """The slots of one chunk: sort records (key, slot) and, per slot, (position, tail, head)
    in the id dtype (a position above 2**31 is stored bit-cast in an int32 word)."""
    cdef public object rec, side
    cdef public Py_ssize_t cap

    def __init__(self, Py_ssize_t cap, dtype):
        self.cap = cap
        self.rec = np.empty(12 * cap, dtype=np.uint8)
        self.side = np.empty(3 * cap, dtype=dtype)


ctypedef struct _Bits:
    # The weight bits: one of the two pointers is set (4- or 8-byte weights).  The stream driver
    # below takes them untyped so that only the three passes over the edges are specialised per
    # width, not the driver.
    const uint32_t* b32
    const uint64_t* b64


cdef Py_ssize_t _fk_stream(_Bits bits, const index_t[::1] tail,
                           const index_t[::1] head, int kind, bint comp, uint64_t kmin,
                           int top_bits, index_t[::1] parent,
                           int64_t[::1] op, index_t[::1] ot, index_t[::1] oh, uint64_t[::1] ow,
                           Py_ssize_t target, int threads, Py_ssize_t threshold,
                           Py_ssize_t chunk) except -1:
    """Driver of the streamed Filter-Kruskal (see the module notes).  Returns the number
    of accepted edges written to ``op``, ``ot``, ``oh``, ``ow``."""
    dtype = np.int32 if index_t is int32_t else np.int64
    cdef Py_ssize_t m = tail.shape[0], count = 0, d0 = 0, d1, d_end, n_range
    cdef int s = top_bits - 11 if top_bits > 11 else 0
    # s < 32: the top digit holds the whole key, so every bucket is one key in slot order
    cdef int shift = s - 8 if s >= 32 else -1
    cdef Rate rate
    cdef Py_ssize_t[::1] hs, offv, bdv, fillv, startv, h2v
    cdef uint8_t[::1] recv, bufv
    cdef index_t[::1] sidev
    cdef uint64_t[::1] gv
    cdef uint8_t[::1] sortv
    cdef Py_ssize_t n_nodes = parent.shape[0]
    cdef index_t g
    rate.scanned = 0
    rate.accepted = 0
    rate.window = max(1, FILTER_WINDOW)
    rate.filtering = False
    giant_a = np.zeros((n_nodes + 63) // 64 + 1, dtype=np.uint64)
    gv = giant_a
    sorted_a = np.zeros(2049, dtype=np.uint8)
    sortv = sorted_a
    # position blocks, taken by the threads dynamically: 8 per thread, so that a thread the OS
    # deschedules holds up an eighth of its share; but at least 2**16 edges per block, so the
    # per-block histogram and offset rows (2048 entries, 16 KB each) stay small next to the
    # edges they count
    cdef Py_ssize_t nblk = 1 if threads <= 1 else min(8 * threads, max(threads, m >> 16))
    hist_a = np.empty(nblk * 2048, dtype=np.intp)
    hs = hist_a
    with nogil:
        if bits.b64 != NULL:
            digit_hist(bits.b64, m, kind, comp, kmin, s, &hs[0], nblk, threads)
        else:
            digit_hist(bits.b32, m, kind, comp, kmin, s, &hs[0], nblk, threads)
    hist = hist_a.reshape(nblk, 2048)
    cum = np.zeros(2049, dtype=np.intp)
    np.cumsum(hist.sum(axis=0), out=cum[1:])
    slots = None
    buf = None
    buf_cap = 0
    fill_a = np.empty(nblk, dtype=np.intp)
    start_a = np.empty(nblk, dtype=np.intp)
    fillv = fill_a
    startv = start_a
    while d0 < 2048 and count < target:
        while d0 < 2048 and cum[d0 + 1] == cum[d0]:
            d0 += 1  # skip empty buckets: every range then holds at least one edge
        if d0 == 2048:
            break
        if not rate.filtering:
            d1 = _last_bucket(cum, d0, chunk)
            n_range = cum[d1] - cum[d0]
            if slots is None or slots.cap < n_range:
                slots = None
                slots = _Slots(max(n_range, chunk), dtype)
            off, bounds = _slot_offsets(hist, d0, d1)
            offv = off.reshape(-1)
            recv = slots.rec
            sidev = slots.side
            with nogil:
                if bits.b64 != NULL:
                    _scatter(bits.b64, &tail[0], &head[0], m, kind, comp, kmin, s, d0, d1,
                             &offv[0], <Rec*>&recv[0], &sidev[0], nblk, threads)
                else:
                    _scatter(bits.b32, &tail[0], &head[0], m, kind, comp, kmin, s, d0, d1,
                             &offv[0], <Rec*>&recv[0], &sidev[0], nblk, threads)
            d_end = d1
        else:
            # mark the largest tree, then collect up to 4 chunks' worth of unfiltered edges
            g = _largest_root(parent)
            with nogil:
                _mark_giant(&parent[0], n_nodes, g, &gv[0], threads)
            d1 = _last_bucket(cum, d0, 4 * chunk)
            counts = hist[:, d0:d1].sum(axis=1)
            n_range = int(counts.sum())
            if n_range > buf_cap:
                buf = None
                buf_cap = n_range
                buf = np.empty(12 * buf_cap, dtype=np.uint8)
            bufv = buf
            start_a[:] = np.cumsum(counts) - counts
            fill_a[:] = start_a
            h2 = np.zeros((nblk, 2048), dtype=np.intp)
            h2v = h2.reshape(-1)
            with nogil:
                if bits.b64 != NULL:
                    _collect(bits.b64, &tail[0], &head[0], m, kind, comp, kmin, s, d0, d1,
                             &parent[0], &gv[0], <Rec*>&bufv[0], &fillv[0], &h2v[0], nblk,
                             threads)
                else:
                    _collect(bits.b32, &tail[0], &head[0], m, kind, comp, kmin, s, d0, d1,
                             &parent[0], &gv[0], <Rec*>&bufv[0], &fillv[0], &h2v[0], nblk,
                             threads)
            cum2 = np.zeros(2049, dtype=np.intp)
            np.cumsum(h2.sum(axis=0), out=cum2[1:])
            if slots is None:
                slots = _Slots(chunk, dtype)
            d_end = min(d1, _last_bucket(cum2, d0, slots.cap))
            n_range = cum2[d_end] - cum2[d0]
            if slots.cap < n_range:
                slots = None
                slots = _Slots(n_range, dtype)
            off, bounds = _slot_offsets(h2, d0, d_end)
            offv = off.reshape(-1)
            recv = slots.rec
            sidev = slots.side
            with nogil:
                _distribute(<Rec*>&bufv[0], &startv[0], &fillv[0], &tail[0], &head[0], s,
                            d_end, &offv[0], <Rec*>&recv[0], &sidev[0], nblk, threads)
        bdv = bounds
        if n_range > 0:
            with nogil:
                count = chunk_buckets(<Rec*>&recv[0], &bdv[0], d_end - d0, shift, top_bits,
                                       &sidev[0], &parent[0],
                                       &op[0], &ot[0], &oh[0], &ow[0], count, target,
                                       threshold, &rate, &gv[0], &sortv[0], threads)
        d0 = d_end
    return count


def filter_kruskal(const index_t[::1] tail, const index_t[::1] head, weight,
                   Py_ssize_t n_nodes, bint maximize=False, Py_ssize_t target=-1,
                   int threads=1, Py_ssize_t threshold=0, Py_ssize_t chunk=0):
    """Filter-Kruskal minimum spanning forest over streamed chunks (see the module notes).

    Parameters
    ----------
    tail, head, weight, n_nodes, maximize, target
        As for ``radix_kruskal.kruskal_radix`` (``weight`` checked by
        ``tie_rule.weight_bits``: a kernel dtype, native byte order, contiguous, one per edge).
    threads : int
        Threads for the counting, copying and filtering passes; the scan is serial and the
        result does not depend on it.
    threshold : int
        Size above which a bucket goes through the pivot recursion (0 picks
        ``max(1 << 16, n_nodes // 2)``: below 2**16 records, 768 KB, a bucket sorts in cache
        anyway, and a bucket with fewer edges than about half the nodes has too few edges that
        close a cycle for the partitioning and filtering to pay).
    chunk : int
        Slots of a chunk (0 picks ``max(1 << 16, 1.5 * target)``, at most a quarter of the
        edges from 2**24 edges on).  The result does not depend on it.

    Returns
    -------
    edges : ndarray of shape (F,), dtype=int64
        Accepted positions in tie-rule order.
    parent : ndarray of shape (n_nodes,)
        Union-find parents of the forest (``parent[root] == root``).
    tail, head : ndarray of shape (F,)
        Endpoints of the accepted edges (the dtype of ``tail``).
    weights : ndarray of shape (F,)
        Their weights (the dtype of ``weight``), bit for bit.
    """
    cdef Py_ssize_t m = tail.shape[0]
    cdef int kind
    bits, kind, target = check_record_inputs(m, head.shape[0], weight, n_nodes, target,
                                             "filter_kruskal")
    if threshold <= 0:
        threshold = max(1 << 16, n_nodes // 2)
    dtype = np.int32 if index_t is int32_t else np.int64
    parent_a = np.arange(n_nodes, dtype=dtype)
    out_a = np.empty(max(0, min(target, m)), dtype=np.int64)
    cap = out_a.shape[0]
    ot_a = np.empty(cap, dtype=dtype)
    oh_a = np.empty(cap, dtype=dtype)
    ow_a = np.empty(cap, dtype=np.uint64)
    cdef Py_ssize_t count = 0
    cdef uint64_t lo = 0
    cdef int tb
    cdef const uint32_t[::1] b32
    cdef const uint64_t[::1] b64
    cdef _Bits src
    cdef index_t[::1] pv = parent_a
    cdef int64_t[::1] opv = out_a
    cdef index_t[::1] otv = ot_a
    cdef index_t[::1] ohv = oh_a
    cdef uint64_t[::1] owv = ow_a
    if m == 0 or n_nodes < 2 or target == 0:
        count = 0
    elif m == 1:
        edges, parent_a = kruskal_radix(tail, head, weight, n_nodes, maximize, target, 1, True)
        return (edges, parent_a, np.take(np.asarray(tail), edges),
                np.take(np.asarray(head), edges), np.take(weight, edges))
    else:
        if chunk <= 0:
            chunk = max(1 << 16, target + target // 2)
            if m >= (1 << 24):
                chunk = min(chunk, m // 4)
        chunk = max(1, min(chunk, m))
        lo, tb = key_range(weight, maximize)
        threads = max(1, min(threads, m // radix.MIN_EDGES_PER_THREAD + 1))
        parent_a.fill(-1)
        src.b32 = NULL
        src.b64 = NULL
        if bits.dtype == np.uint32:
            b32 = bits
            src.b32 = &b32[0]
        else:
            b64 = bits
            src.b64 = &b64[0]
        count = _fk_stream(src, tail, head, kind, maximize, lo, tb, pv, opv, otv, ohv, owv,
                           target, threads, threshold, chunk)
        with nogil:
            rp_standard_parents(&pv[0], n_nodes)
    edges = out_a[:count]
    weights = weights_from_keys(owv[:count], weight.dtype, maximize, lo, weight, edges)
    return edges, parent_a, ot_a[:count], oh_a[:count], weights
