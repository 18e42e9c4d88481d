"""Filter-Kruskal over streamed chunks of the rule order: the public function and the driver.

The method and its passes are described in the compiled module ``_filter_kruskal`` (the passes
over the edges and the scan of a chunk's buckets, each behind a thin ``def``).  This module
holds what is Python-level: the checks, the choice of sizes, the allocations, the loop over
chunks with its slot offsets (NumPy over 2048 buckets per chunk, negligible next to a pass over
the edges) and the assembly of the result.  The result is exactly plain Kruskal's, for any
chunking and any thread count.
"""
import operator

import numpy as np

from fastmst._kernels import _filter_kruskal as _fk
from fastmst._kernels import radix
from fastmst._kernels.edge_checks import check_id_arrays
from fastmst._kernels.radix_kruskal import check_record_inputs, kruskal_radix
from fastmst._kernels.rule_order import key_range, weights_from_keys

#: Scanned edges between two decisions on filtering (tests lower it to filter small graphs).
FILTER_WINDOW = 8192


def _largest_root(parent):
    """The root of the most frequent tree among 1023 evenly spaced nodes (deterministic).

    1023 finds cost next to nothing against a pass over the edges, and a tree holding a
    fraction f of the nodes gets about 1023 f samples, enough to tell the tree that dominates
    the filter's work.  A wrong pick only makes the bitmap spare fewer finds: the forest does
    not depend on it.  ``parent`` is in the rank-in-parent-word form (a root's word < 0): the
    finds follow it without compressing, all samples at once.
    """
    n = parent.shape[0]
    x = np.linspace(0, n - 1, min(n, 1023)).astype(np.int64)
    up = parent[x]
    while True:
        step = up >= 0
        if not step.any():
            break
        x = np.where(step, up, x)
        up = parent[x]
    values, counts = np.unique(x, return_counts=True)
    return int(values[int(np.argmax(counts))])


def _slot_offsets(hist, d0, d1):
    """Slot offsets of buckets [d0, d1) from per-block counts ``hist`` (blocks x 2048).

    Returns ``off`` (blocks x 2048 flattened, the first slot of block t in bucket d; buckets in
    order, blocks in order within a bucket) and ``bounds`` (d1 - d0 + 1 bucket boundaries).
    """
    sub = hist[:, d0:d1]
    flat = sub.T.ravel()
    starts = np.cumsum(flat) - flat
    off = np.zeros_like(hist)
    off[:, d0:d1] = starts.reshape(d1 - d0, hist.shape[0]).T
    bounds = np.zeros(d1 - d0 + 1, dtype=np.intp)
    np.cumsum(sub.sum(axis=0), out=bounds[1:])
    return np.ascontiguousarray(off).reshape(-1), bounds


def _last_bucket(cum, d0, cap):
    """The largest d1 > d0 with ``cum[d1] - cum[d0] <= cap`` (at least d0 + 1)."""
    d1 = int(np.searchsorted(cum, cum[d0] + cap, side="right")) - 1
    return max(d1, d0 + 1)


class _Slots:
    """The slots of one chunk: sort records (key, slot; 12 bytes) and, per slot, (position,
    tail, head) in the id dtype (a position above 2**31 is stored bit-cast in an int32 word)."""
    __slots__ = ("rec", "side", "cap")

    def __init__(self, cap, dtype):
        self.cap = cap
        self.rec = np.empty(12 * cap, dtype=np.uint8)
        self.side = np.empty(3 * cap, dtype=dtype)


def _fk_stream(bits, kind, comp, kmin, top_bits, tail, head, parent, op, ot, oh, ow, target,
               threads, threshold, chunk):
    """Driver of the streamed Filter-Kruskal (see ``_filter_kruskal``).  Returns the number
    of accepted edges written to ``op``, ``ot``, ``oh``, ``ow``."""
    width = bits.dtype.itemsize
    raw = bits.view(np.uint8)
    dtype = tail.dtype
    m = tail.shape[0]
    count = 0
    d0 = 0
    s = top_bits - 11 if top_bits > 11 else 0
    # s < 32: the top digit holds the whole key, so every bucket is one key in slot order
    shift = s - 8 if s >= 32 else -1
    # the filter decision carried from chunk to chunk: scanned, accepted, window, filtering
    rate = np.array([0, 0, max(1, FILTER_WINDOW), 0], dtype=np.intp)
    giant = np.zeros((parent.shape[0] + 63) // 64 + 1, dtype=np.uint64)
    state = np.zeros(2049, dtype=np.uint8)
    # position blocks, taken by the threads dynamically: 8 per thread, so that a thread the OS
    # deschedules holds up an eighth of its share; but at least 2**16 edges per block, so the
    # per-block histogram and offset rows (2048 entries, 16 KB each) stay small next to the
    # edges they count
    nblk = 1 if threads <= 1 else min(8 * threads, max(threads, m >> 16))
    hist = np.empty(nblk * 2048, dtype=np.intp)
    _fk.digit_histogram(raw, width, m, kind, comp, kmin, s, hist, nblk, threads)
    hist = hist.reshape(nblk, 2048)
    cum = np.zeros(2049, dtype=np.intp)
    np.cumsum(hist.sum(axis=0), out=cum[1:])
    cum_list = cum.tolist()
    slots = None
    buf = None
    buf_cap = 0
    fill = np.empty(nblk, dtype=np.intp)
    start = np.empty(nblk, dtype=np.intp)
    while d0 < 2048 and count < target:
        while d0 < 2048 and cum_list[d0 + 1] == cum_list[d0]:
            d0 += 1  # skip empty buckets: every range then holds at least one edge
        if d0 == 2048:
            break
        if not rate[3]:
            d1 = _last_bucket(cum, d0, chunk)
            n_range = cum_list[d1] - cum_list[d0]
            if slots is None or slots.cap < n_range:
                slots = None
                slots = _Slots(max(n_range, chunk), dtype)
            off, bounds = _slot_offsets(hist, d0, d1)
            _fk.scatter(raw, width, tail, head, kind, comp, kmin, s, d0, d1, off, slots.rec,
                        slots.side, nblk, threads)
            d_end = d1
        else:
            # mark the largest tree, then collect up to 4 chunks' worth of unfiltered edges
            _fk.mark_giant(parent, _largest_root(parent), giant, threads)
            d1 = _last_bucket(cum, d0, 4 * chunk)
            counts = hist[:, d0:d1].sum(axis=1)
            n_range = int(counts.sum())
            if n_range > buf_cap:
                buf = None
                buf_cap = n_range
                buf = np.empty(12 * buf_cap, dtype=np.uint8)
            start[:] = np.cumsum(counts) - counts
            fill[:] = start
            h2 = np.zeros((nblk, 2048), dtype=np.intp)
            _fk.collect(raw, width, tail, head, kind, comp, kmin, s, d0, d1, parent, giant, buf,
                        fill, h2.reshape(-1), nblk, threads)
            cum2 = np.zeros(2049, dtype=np.intp)
            np.cumsum(h2.sum(axis=0), out=cum2[1:])
            if slots is None:
                slots = _Slots(chunk, dtype)
            d_end = min(d1, _last_bucket(cum2, d0, slots.cap))
            n_range = int(cum2[d_end] - cum2[d0])
            if slots.cap < n_range:
                slots = None
                slots = _Slots(n_range, dtype)
            off, bounds = _slot_offsets(h2, d0, d_end)
            _fk.distribute(buf, start, fill, tail, head, s, d_end, off, slots.rec, slots.side,
                           nblk, threads)
        if n_range > 0:
            count = _fk.scan_chunk(slots.rec, bounds, shift, top_bits, slots.side, parent, op,
                                   ot, oh, ow, count, target, threshold, rate, giant, state,
                                   threads)
        d0 = d_end
    return count


def filter_kruskal(tail, head, weight, n_nodes, maximize=False, target=-1, threads=1,
                   threshold=0, chunk=0):
    """Filter-Kruskal minimum spanning forest over streamed chunks (see the module notes).

    Parameters
    ----------
    tail, head, weight, n_nodes, maximize, target
        As for ``radix_kruskal.kruskal_radix`` (``weight`` checked by
        ``rule_order.weight_bits``: a kernel dtype, native byte order, contiguous, one per edge).
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
    check_id_arrays(tail, head, "filter_kruskal")
    m = tail.shape[0]
    bits, kind, target = check_record_inputs(m, head.shape[0], weight, n_nodes, target,
                                             "filter_kruskal")
    n_nodes = operator.index(n_nodes)
    maximize = bool(maximize)
    threads = operator.index(threads)
    threshold = operator.index(threshold)
    chunk = operator.index(chunk)
    if threshold <= 0:
        threshold = max(1 << 16, n_nodes // 2)
    dtype = tail.dtype
    parent = np.arange(n_nodes, dtype=dtype)
    cap = max(0, min(target, m))
    out = np.empty(cap, dtype=np.int64)
    ot = np.empty(cap, dtype=dtype)
    oh = np.empty(cap, dtype=dtype)
    ow = np.empty(cap, dtype=np.uint64)
    count = 0
    lo = 0
    if m == 0 or n_nodes < 2 or target == 0:
        count = 0
    elif m == 1:
        edges, parent = kruskal_radix(tail, head, weight, n_nodes, maximize, target, 1, True)
        return edges, parent, np.take(tail, edges), np.take(head, edges), np.take(weight, edges)
    else:
        if chunk <= 0:
            chunk = max(1 << 16, target + target // 2)
            if m >= (1 << 24):
                chunk = min(chunk, m // 4)
        chunk = max(1, min(chunk, m))
        lo, tb = key_range(weight, maximize)
        threads = max(1, min(threads, m // radix.MIN_EDGES_PER_THREAD + 1))
        parent.fill(-1)
        count = _fk_stream(bits, kind, maximize, lo, tb, tail, head, parent, out, ot, oh, ow,
                           target, threads, threshold, chunk)
        # rank-in-parent words (-1 - rank) back to parent[root] == root
        roots = np.flatnonzero(parent < 0)
        parent[roots] = roots
    edges = out[:count]
    weights = weights_from_keys(ow[:count], weight.dtype, maximize, lo, weight, edges)
    return edges, parent, ot[:count], oh[:count], weights
