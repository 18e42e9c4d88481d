"""Cache-aware Kruskal over radix records: radix split, lazy bucket sort, prefetching scan,
early exit.

The records of every edge are split into the 2048 top-digit buckets of the rule order
(``radix.split_records``); the buckets are then sorted one at a time, just before they are
scanned, so buckets after the last edge the forest needs are never sorted.  With
``presorted=True`` the weights are already in rule order and the positions are scanned directly.
"""
import numpy as np
from cython.parallel cimport parallel, threadid
from libc.stdint cimport int32_t, int64_t, uint8_t, uint32_t

from fastmst._kernels._typedefs cimport check_edge_arrays, index_t
from fastmst._kernels.dsu cimport dsu_find, dsu_link
from fastmst._kernels._atomics cimport prefetch
from fastmst._kernels.radix cimport Rec, sort_bucket
from fastmst._kernels import radix
from fastmst._kernels.tie_rule import key_range, weight_bits


#: Below this many edges the sort/scan pipeline of kruskal_radix runs on one thread (too short
#: to pay for waking a second one).  Tests lower it to run the parallel code on small graphs.
MIN_EDGES_PIPELINE = 1 << 22


def check_record_inputs(Py_ssize_t m, Py_ssize_t n_head, weight, Py_ssize_t n_nodes,
                        Py_ssize_t target, str func):
    """The preconditions shared by the record-based Kruskal kernels (``kruskal_radix``,
    ``filter_kruskal``): ``m`` tails, ``n_head`` heads, weights checked by
    ``tie_rule.weight_bits``, fewer than 2**32 edges (32-bit record positions).  Returns
    (weight bits, key kind, target), ``target`` -1 becoming ``n_nodes - 1``."""
    bits, kind = weight_bits(weight, m, func)
    check_edge_arrays(m, n_head, -1, n_nodes, func)
    if m >= radix.MAX_RECORDS:
        raise ValueError(f"{func}: needs E < 2**32 edges (32-bit record positions), received "
                         f"{m}.")
    if target < 0:
        target = max(0, n_nodes - 1)
    return bits, kind, target


cdef Py_ssize_t _scan(const Rec* a, Py_ssize_t n, const index_t* tail, const index_t* head,
                      index_t* parent, uint8_t* rank, int64_t* out, Py_ssize_t count,
                      Py_ssize_t target) noexcept nogil:
    """Kruskal scan of sorted records ``a[:n]``, appending accepted positions to ``out[count:]``.

    The endpoint ids of record i+16 and the parents of record i+6 are prefetched, which hides
    most of the latency of the scattered reads.  Returns the new count (stops at ``target``).
    """
    cdef Py_ssize_t i
    cdef uint32_t e
    cdef index_t ru, rv
    for i in range(n):
        if i + 16 < n:
            e = a[i + 16].pos
            prefetch(&tail[e])
            prefetch(&head[e])
        if i + 6 < n:
            e = a[i + 6].pos
            prefetch(&parent[tail[e]])
            prefetch(&parent[head[e]])
        e = a[i].pos
        ru = dsu_find(parent, tail[e])
        rv = dsu_find(parent, head[e])
        if ru != rv:
            dsu_link(parent, rank, ru, rv)
            out[count] = e
            count += 1
            if count >= target:
                return count
    return count


cdef Py_ssize_t _scan_positions(Py_ssize_t lo, Py_ssize_t hi, const index_t* tail,
                                const index_t* head, index_t* parent, uint8_t* rank,
                                int64_t* out, Py_ssize_t count, Py_ssize_t target) noexcept nogil:
    """Kruskal scan in position order (presorted input): sequential reads, no gather."""
    cdef Py_ssize_t i
    cdef index_t ru, rv
    for i in range(lo, hi):
        if i + 8 < hi:
            prefetch(&parent[tail[i + 8]])
            prefetch(&parent[head[i + 8]])
        ru = dsu_find(parent, tail[i])
        rv = dsu_find(parent, head[i])
        if ru != rv:
            dsu_link(parent, rank, ru, rv)
            out[count] = i
            count += 1
            if count >= target:
                return count
    return count


cdef Py_ssize_t _kruskal_buckets(Rec* a, const Py_ssize_t* bounds, int shift,
                                 const index_t* tail, const index_t* head, index_t* parent,
                                 uint8_t* rank, int64_t* out, Py_ssize_t target,
                                 Py_ssize_t wave, int threads) noexcept nogil:
    """Sort the top buckets lazily and scan them in key order until ``target`` edges.

    One thread: sort a bucket (it then sits in cache) and scan it at once.  Several threads:
    buckets are grouped in waves of at least ``wave`` records; while thread 0 scans wave k, the
    other threads sort wave k+1.  Buckets after the last needed one are never sorted.
    """
    cdef Py_ssize_t b, count = 0, w0, w1, n0, n1, lo, hi, nb = 2048
    cdef Py_ssize_t[1] shared_count
    cdef uint8_t[2048] done
    cdef int tid, nt
    if threads <= 1:
        for b in range(nb):
            lo = bounds[b]
            hi = bounds[b + 1]
            if hi - lo > 1:
                sort_bucket(a + lo, hi - lo, shift)
            count = _scan(a + lo, hi - lo, tail, head, parent, rank, out, count, target)
            if count >= target:
                break
        return count
    # wave [w0, w1) is sorted and waits to be scanned; [w1, n1) is the next one.
    for b in range(nb):
        done[b] = 0
    w0 = 0
    w1 = 0
    shared_count[0] = 0
    while w0 < nb and shared_count[0] < target:
        n1 = w1
        n0 = 0
        while n1 < nb and (n0 < wave or n1 == w1):
            n0 += bounds[n1 + 1] - bounds[n1]
            n1 += 1
        with parallel(num_threads=threads):
            tid = threadid()
            nt = threads
            if tid == 0:
                if w1 > w0:
                    shared_count[0] = _scan(a + bounds[w0], bounds[w1] - bounds[w0], tail, head,
                                            parent, rank, out, shared_count[0], target)
            else:
                b = w1 + tid - 1
                while b < n1:
                    if bounds[b + 1] - bounds[b] > 1:
                        sort_bucket(a + bounds[b], bounds[b + 1] - bounds[b], shift)
                    done[b] = 1
                    b = b + nt - 1
        # a team smaller than asked for (no OpenMP, or a thread limit) leaves buckets unsorted
        for b in range(w1, n1):
            if not done[b]:
                if bounds[b + 1] - bounds[b] > 1:
                    sort_bucket(a + bounds[b], bounds[b + 1] - bounds[b], shift)
                done[b] = 1
        w0 = w1
        w1 = n1
    return shared_count[0]


def kruskal_radix(const index_t[::1] tail, const index_t[::1] head, weight,
                  Py_ssize_t n_nodes, bint maximize=False, Py_ssize_t target=-1,
                  int threads=1, bint presorted=False):
    """Cache-aware Kruskal: radix split, lazy bucket sort, prefetching scan, early exit.

    Parameters
    ----------
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Validated endpoint ids in [0, n_nodes) (read in place).
    weight : ndarray of shape (E,)
        Validated weights (read in place, ``E < 2**32``), checked by ``tie_rule.weight_bits``:
        a kernel dtype, native byte order, contiguous.
    n_nodes : int
    maximize : bool
    target : int
        Stop after this many accepted edges; ``-1`` means ``n_nodes - 1``.
    threads : int
        Threads for the split and the bucket sorts; the result does not depend on it.
    presorted : bool
        The weights are already in tie-rule order: scan positions directly, no sort.

    Returns
    -------
    edges : ndarray of shape (F,), dtype=int64
        Accepted positions in tie-rule order.
    parent : ndarray of shape (n_nodes,)
        Union-find parents of the forest (complete components when the scan ran to the end
        or stopped at n_nodes - n_components).
    """
    cdef Py_ssize_t m = tail.shape[0]
    bits, kind, target = check_record_inputs(m, head.shape[0], weight, n_nodes, target,
                                             "kruskal_radix")
    parent_a = np.arange(n_nodes, dtype=np.int32 if index_t is int32_t else np.int64)
    rank_a = np.zeros(n_nodes, dtype=np.uint8)
    out_a = np.empty(max(0, min(target, m)), dtype=np.int64)
    cdef index_t[::1] parent = parent_a
    cdef uint8_t[::1] rank = rank_a
    cdef int64_t[::1] out = out_a
    cdef Py_ssize_t count = 0, wave
    cdef Py_ssize_t[::1] bd
    cdef uint8_t[::1] r
    cdef int shift
    if m == 0 or n_nodes < 2 or target == 0:
        return out_a[:0], parent_a
    if presorted or m == 1:
        with nogil:
            count = _scan_positions(0, m, &tail[0], &head[0], &parent[0], &rank[0], &out[0],
                                    0, target)
        return out_a[:count], parent_a
    kmin, top_bits = key_range(weight, maximize)
    raw, bounds, shift = radix.split_records(bits, kind, maximize, kmin, top_bits, threads)
    r = raw
    bd = bounds
    # Waves of the sort/scan pipeline: at least 2**16 records, so that sorting a wave takes
    # long against entering a parallel region, and at most 64 waves over the graph, so the scan
    # waits for the first wave's sort only (1/64 of the work) before the pipeline fills.
    wave = max(1 << 16, m // 64)
    if m < MIN_EDGES_PIPELINE:
        threads = 1
    with nogil:
        count = _kruskal_buckets(<Rec*>&r[0], &bd[0], shift, &tail[0], &head[0], &parent[0],
                                 &rank[0], &out[0], target, wave, threads)
    return out_a[:count], parent_a
