"""Cache-aware Kruskal over radix records: radix split, lazy bucket sort, prefetching scan,
early exit.

The records of every edge are split into the 2048 top-digit buckets of the rule order
(``records.split_records``); the buckets are then sorted one at a time, just before they are
scanned, so buckets after the last edge the forest needs are never sorted.  With
``presorted=True`` the weights are already in rule order and the positions are scanned directly.

Files: ``radix_kruskal.py`` holds the public function (checks, the split into records,
allocations, result); this compiled module the scans and the sort/scan pipeline, each behind a
thin ``def`` (``scan_positions``, ``kruskal_buckets``).
"""
from cython.parallel cimport parallel, threadid
from libc.stdint cimport int64_t, uint8_t, uint32_t

from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.dsu cimport dsu_find, dsu_link
from fastmst._kernels._atomics cimport prefetch
from fastmst._kernels.radix cimport Rec, sort_bucket


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


# ------------------------------------------------------------------ the thin defs (callers: .py)

cdef int _check_scan(Py_ssize_t m, Py_ssize_t n_head, Py_ssize_t n_parent, Py_ssize_t n_rank,
                     Py_ssize_t n_out, Py_ssize_t target) except -1:
    if n_head != m or n_rank != n_parent or n_parent < 2 or not 0 < target <= n_out:
        raise ValueError(f"radix_kruskal scan: {m} tails need {m} heads, parent and rank of one "
                         f"length >= 2 and 0 < target <= output length; received {n_head}, "
                         f"{n_parent}, {n_rank}, target {target} and {n_out}.")
    return 0


def scan_positions(const index_t[::1] tail, const index_t[::1] head, index_t[::1] parent,
                   uint8_t[::1] rank, Py_ssize_t target, int64_t[::1] out):
    """Kruskal scan in position order (presorted input) until ``target`` accepted edges
    (OUT: ``out``).  Returns the number accepted.  Ids in range are the caller's to ensure."""
    cdef Py_ssize_t m = tail.shape[0], count
    _check_scan(m, head.shape[0], parent.shape[0], rank.shape[0], out.shape[0], target)
    with nogil:
        count = _scan_positions(0, m, &tail[0], &head[0], &parent[0], &rank[0], &out[0], 0,
                                target)
    return count


def kruskal_buckets(uint8_t[::1] raw, const Py_ssize_t[::1] bounds, int shift,
                    const index_t[::1] tail, const index_t[::1] head, index_t[::1] parent,
                    uint8_t[::1] rank, int64_t[::1] out, Py_ssize_t target, Py_ssize_t wave,
                    int threads):
    """Sort the 2048 top buckets of the records ``raw`` (``records.split_records``) lazily and
    scan them in key order until ``target`` edges (``_kruskal_buckets``; OUT: ``out``).
    Returns the number accepted."""
    cdef Py_ssize_t count
    _check_scan(tail.shape[0], head.shape[0], parent.shape[0], rank.shape[0], out.shape[0],
                target)
    if bounds.shape[0] != 2049 or bounds[2048] > raw.shape[0] // 12:
        raise ValueError(f"kruskal_buckets: needs 2049 bucket bounds within the "
                         f"{raw.shape[0] // 12} records, received {bounds.shape[0]}.")
    with nogil:
        count = _kruskal_buckets(<Rec*>&raw[0], &bounds[0], shift, &tail[0], &head[0],
                                 &parent[0], &rank[0], &out[0], target, wave, threads)
    return count
