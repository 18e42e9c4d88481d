"""Kruskal's algorithm over a given edge order."""
import numpy as np
cimport numpy as cnp
from libc.stdint cimport int32_t, int64_t, uint8_t

from fastmst._typedefs cimport index_t
from fastmst._dsu cimport dsu_find, dsu_link, dsu_union

cnp.import_array()


cdef Py_ssize_t _kruskal_scan(const int64_t[::1] order, const index_t[::1] tail,
                              const index_t[::1] head, index_t[::1] parent, uint8_t[::1] rank,
                              Py_ssize_t target, int64_t[::1] out) noexcept nogil:
    """Accept edges in ``order`` that join two trees, until ``target`` are accepted (OUT: out)."""
    cdef Py_ssize_t i, count = 0
    cdef int64_t e
    cdef index_t ru, rv
    if target <= 0:
        return 0
    for i in range(order.shape[0]):
        e = order[i]
        ru = dsu_find(&parent[0], tail[e])
        rv = dsu_find(&parent[0], head[e])
        if ru != rv:
            dsu_link(&parent[0], &rank[0], ru, rv)
            out[count] = e
            count += 1
            if count == target:
                break
    return count


cdef Py_ssize_t _count_merges(const index_t[::1] tail, const index_t[::1] head,
                              index_t[::1] parent, uint8_t[::1] rank) noexcept nogil:
    cdef Py_ssize_t i, merges = 0
    for i in range(tail.shape[0]):
        merges += dsu_union(&parent[0], &rank[0], tail[i], head[i])
    return merges


def forest_size(const index_t[::1] tail, const index_t[::1] head, Py_ssize_t n_nodes):
    """Number of edges of a spanning forest (n_nodes - n_components), by one union pass.

    Returns
    -------
    n_forest_edges : int
    parent : ndarray of shape (n_nodes,)
        The union-find parents after the pass (the components of the graph).
    """
    dtype = np.int32 if index_t is int32_t else np.int64
    parent = np.arange(n_nodes, dtype=dtype)
    rank = np.zeros(n_nodes, dtype=np.uint8)
    cdef index_t[::1] p = parent
    cdef uint8_t[::1] r = rank
    cdef Py_ssize_t merges = 0
    if n_nodes > 0:
        with nogil:
            merges = _count_merges(tail, head, p, r)
    return merges, parent


def kruskal(const int64_t[::1] order, const index_t[::1] tail, const index_t[::1] head,
            Py_ssize_t n_nodes, Py_ssize_t target):
    """Scan ``order`` and keep every edge that joins two trees; stop after ``target`` edges.

    Parameters
    ----------
    order : ndarray of shape (K,), dtype=int64
        Edge positions in the order of the tie rule (validated by the caller).
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Validated endpoint ids in [0, n_nodes).
    n_nodes : int
    target : int
        Number of forest edges (n_nodes - n_components) after which the scan stops.

    Returns
    -------
    edges : ndarray of shape (F,), dtype=int64
        Accepted positions, in acceptance order.
    parent : ndarray of shape (n_nodes,)
        Union-find parents of the final forest.
    """
    dtype = np.int32 if index_t is int32_t else np.int64
    parent = np.arange(n_nodes, dtype=dtype)
    rank = np.zeros(n_nodes, dtype=np.uint8)
    cdef Py_ssize_t cap = max(0, min(target, order.shape[0]))
    out = np.empty(cap, dtype=np.int64)
    cdef index_t[::1] p = parent
    cdef uint8_t[::1] r = rank
    cdef int64_t[::1] o = out
    cdef Py_ssize_t count = 0
    if cap > 0:
        with nogil:
            count = _kruskal_scan(order, tail, head, p, r, cap, o)
    return out[:count], parent


# ---------------------------------------------------------------------------------------------
# Cache-aware Kruskal over radix-sorted records, and Filter-Kruskal.

from cython.parallel cimport parallel, prange, threadid
from libc.stdint cimport uint32_t
from fastmst._sort cimport Rec, rec_less, prefetch, sort_bucket, sort_records
from fastmst._sort import MAX_RECORDS, make_records, split_records, split_records_bits

#: Below this many edges the sort/scan pipeline of kruskal_radix runs on one thread (too short
#: to pay for waking a second one).  Tests lower it to run the parallel code on small graphs.
MIN_EDGES_PIPELINE = 1 << 22


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


def _trivial(tail, head, Py_ssize_t n_nodes, Py_ssize_t target):
    dtype = tail.dtype
    parent = np.arange(n_nodes, dtype=dtype)
    rank = np.zeros(n_nodes, dtype=np.uint8)
    out = np.empty(max(0, min(target, tail.shape[0])), dtype=np.int64)
    return parent, rank, out


def kruskal_radix(const index_t[::1] tail, const index_t[::1] head, weight,
                  Py_ssize_t n_nodes, bint maximize=False, Py_ssize_t target=-1,
                  int threads=1, bint presorted=False):
    """Cache-aware Kruskal: radix split, lazy bucket sort, prefetching scan, early exit.

    Parameters
    ----------
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Validated endpoint ids (read in place).
    weight : ndarray of shape (E,)
        Validated kernel weights (read in place), ``E < 2**32``.
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
    if target < 0:
        target = max(0, n_nodes - 1)
    parent_a, rank_a, out_a = _trivial(np.asarray(tail), np.asarray(head), n_nodes, target)
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
    raw, bounds, shift = split_records(weight, maximize, threads)
    r = raw
    bd = bounds
    wave = max(1 << 16, m // 64)
    if m < MIN_EDGES_PIPELINE:
        threads = 1
    with nogil:
        count = _kruskal_buckets(<Rec*>&r[0], &bd[0], shift, &tail[0], &head[0], &parent[0],
                                 &rank[0], &out[0], target, wave, threads)
    return out_a[:count], parent_a


cdef Py_ssize_t _filter(Rec* a, Py_ssize_t n, const index_t* tail, const index_t* head,
                        index_t* parent) noexcept nogil:
    """Keep (stably, in place) the records whose endpoints are in different trees.

    The prefetch block is written out here and in _scan on purpose: moving it into a shared
    inline helper measured about 30 % slower at 10M edges (2026-12-02, compare.py A/B).
    """
    cdef Py_ssize_t i, k = 0
    cdef uint32_t e
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
        if dsu_find(parent, tail[e]) != dsu_find(parent, head[e]):
            a[k] = a[i]
            k += 1
    return k


cdef inline const Rec* _median3(const Rec* x, const Rec* y, const Rec* z) noexcept nogil:
    if rec_less(x, y):
        if rec_less(y, z):
            return y
        return z if rec_less(x, z) else x
    if rec_less(x, z):
        return x
    return z if rec_less(y, z) else y


cdef Py_ssize_t _partition(Rec* a, Py_ssize_t n) noexcept nogil:
    """Partition around a pseudo-median of nine evenly spaced records (Tukey's ninther).

    Records lighter than the pivot go first; returns their number, which is at least 4 and
    at most n - 5 for n >= 9 (composites are distinct).
    """
    cdef Py_ssize_t s = n // 9, i, j
    cdef Rec pivot, tmp
    pivot = _median3(_median3(&a[0], &a[s], &a[2 * s]),
                     _median3(&a[3 * s], &a[4 * s], &a[5 * s]),
                     _median3(&a[6 * s], &a[7 * s], &a[8 * s]))[0]
    i = 0
    j = n - 1
    while True:
        while i <= j and rec_less(&a[i], &pivot):
            i += 1
        while i <= j and not rec_less(&a[j], &pivot):
            j -= 1
        if i >= j:
            return i
        tmp = a[i]
        a[i] = a[j]
        a[j] = tmp
        i += 1
        j -= 1


cdef Py_ssize_t _filter_kruskal(Rec* a, Py_ssize_t n, int top_bits, const index_t* tail,
                                const index_t* head, index_t* parent, uint8_t* rank,
                                int64_t* out, Py_ssize_t count, Py_ssize_t target,
                                Py_ssize_t threshold, int depth) noexcept nogil:
    """Filter-Kruskal (Osipov, Sanders and Singler, ALENEX 2009) on records ``a[:n]``.

    Partition around a pivot; recurse on the light side; drop heavy records whose endpoints
    the light side already joined; recurse on the survivors (the paper's scheme, used here
    for buckets too large for the cache-resident base case).  Below ``threshold`` records (or
    past a recursion depth of 64, against adversarial pivots) radix sort and scan.  The
    composite (key, position) order is total, so the result is exactly plain Kruskal's.
    """
    cdef Py_ssize_t nl, nh
    while True:
        if count >= target or n == 0:
            return count
        if n <= threshold or depth > 64:
            sort_records(a, n, top_bits)
            return _scan(a, n, tail, head, parent, rank, out, count, target)
        nl = _partition(a, n)
        count = _filter_kruskal(a, nl, top_bits, tail, head, parent, rank, out, count, target,
                                threshold, depth + 1)
        if count >= target:
            return count
        nh = _filter(a + nl, n - nl, tail, head, parent)
        a = a + nl
        n = nh
        depth += 1


cdef Py_ssize_t _filter_kruskal_buckets(Rec* a, const Py_ssize_t* bounds, int shift,
                                        int top_bits, const index_t* tail, const index_t* head,
                                        index_t* parent, uint8_t* rank, int64_t* out,
                                        Py_ssize_t target, Py_ssize_t threshold) noexcept nogil:
    """Filter-Kruskal whose first partition is the 2048-way radix split.

    The split is a partition around 2047 pivots (the digit boundaries) at the cost of one
    scatter.  Buckets are then taken lightest first, as the light side of each partition is in
    Filter-Kruskal: a bucket is first filtered (records whose endpoints the lighter buckets
    already joined are dropped) once the scans have started rejecting most edges, then the
    survivors are radix sorted in cache and scanned; a bucket above ``threshold`` records goes
    through the pivot recursion instead.  Filtering buckets where many edges are still
    accepted would only double the finds, hence the acceptance-rate switch; either way the
    result is plain Kruskal's.
    """
    cdef Py_ssize_t b, lo, nb, count = 0, before, scanned = 0, accepted = 0
    cdef bint filtering = False
    for b in range(2048):
        lo = bounds[b]
        nb = bounds[b + 1] - lo
        if nb == 0:
            continue
        if filtering:
            nb = _filter(a + lo, nb, tail, head, parent)
        before = count
        if nb > threshold:
            count = _filter_kruskal(a + lo, nb, top_bits, tail, head, parent, rank, out, count,
                                    target, threshold, 0)
        else:
            if nb > 1:
                sort_bucket(a + lo, nb, shift)
            count = _scan(a + lo, nb, tail, head, parent, rank, out, count, target)
        if count >= target:
            break
        scanned += nb
        accepted += count - before
        # Filter while fewer than a quarter of the recently scanned edges join two trees: the
        # filter costs about one scan, a scanned edge about a scan plus a sort, and the sort
        # of a bucket in cache is cheaper than the scattered finds (measured; see
        # docs/performance.md), so the filter pays below roughly that rate.
        if scanned >= 8192:
            filtering = 4 * accepted < scanned
            scanned = 0
            accepted = 0
    return count


def filter_kruskal(const index_t[::1] tail, const index_t[::1] head, weight,
                   Py_ssize_t n_nodes, bint maximize=False, Py_ssize_t target=-1,
                   int threads=1, Py_ssize_t threshold=0):
    """Filter-Kruskal minimum spanning forest (same parameters and result as kruskal_radix).

    ``threshold`` is the size above which a bucket goes through the pivot recursion (0 picks
    ``max(1 << 16, n_nodes // 2)``).  ``threads`` only speeds up the radix split; the scan is
    serial.
    """
    cdef Py_ssize_t m = tail.shape[0]
    if target < 0:
        target = max(0, n_nodes - 1)
    if threshold <= 0:
        threshold = max(1 << 16, n_nodes // 2)
    parent_a, rank_a, out_a = _trivial(np.asarray(tail), np.asarray(head), n_nodes, target)
    cdef index_t[::1] parent = parent_a
    cdef uint8_t[::1] rank = rank_a
    cdef int64_t[::1] out = out_a
    cdef Py_ssize_t count = 0
    cdef uint8_t[::1] r
    cdef Py_ssize_t[::1] bd
    cdef int shift, tb
    if m == 0 or n_nodes < 2 or target == 0:
        return out_a[:0], parent_a
    if m == 1:
        return kruskal_radix(tail, head, weight, n_nodes, maximize, target, 1, True)
    raw, bounds, shift, tb = split_records_bits(weight, maximize, threads)
    r = raw
    bd = bounds
    with nogil:
        count = _filter_kruskal_buckets(<Rec*>&r[0], &bd[0], shift, tb, &tail[0], &head[0],
                                        &parent[0], &rank[0], &out[0], target, threshold)
    return out_a[:count], parent_a


cdef Py_ssize_t _count_touched(const index_t* tail, const index_t* head, Py_ssize_t m,
                               uint8_t* seen, Py_ssize_t n, int threads) noexcept nogil:
    """Number of nodes that are an endpoint of some edge.

    Each thread marks the endpoints of a static slice of the edges in its own row of ``seen``
    (``threads`` zeroed rows of ``n`` bytes), so no byte is written by two threads; the rows
    are then OR-ed node by node.  The count does not depend on the thread count.
    """
    cdef Py_ssize_t i, t, lo, hi, k = 0
    cdef uint8_t* row
    cdef uint8_t v
    for t in prange(threads, num_threads=threads, schedule="static"):
        lo = m * t // threads
        hi = m * (t + 1) // threads
        row = seen + t * n
        for i in range(lo, hi):
            row[tail[i]] = 1
            row[head[i]] = 1
    for i in range(n):
        v = seen[i]
        for t in range(1, threads):
            v = v | seen[t * n + i]
        k += v
    return k


def forest_bound(const index_t[::1] tail, const index_t[::1] head, Py_ssize_t n_nodes,
                 int threads=1):
    """An upper bound on the forest size that is exact when the non-isolated nodes are connected.

    ``(nodes with an edge) - 1``: lets Kruskal stop early on graphs with isolated nodes at the
    cost of one streaming pass (much cheaper than the union pass of ``forest_size``).
    ``threads`` split the pass (one more ``n_nodes`` bytes of scratch per extra thread, and
    one thread per ``fastmst._sort.MIN_EDGES_PER_THREAD`` edges at most); the result does not
    depend on it.
    """
    cdef Py_ssize_t m = tail.shape[0], k = 0
    if m == 0 or n_nodes == 0:
        return 0
    from fastmst import _sort
    cdef int nt = max(1, min(threads, m // _sort.MIN_EDGES_PER_THREAD + 1))
    seen_a = np.zeros(nt * n_nodes, dtype=np.uint8)
    cdef uint8_t[::1] seen = seen_a
    with nogil:
        k = _count_touched(&tail[0], &head[0], m, &seen[0], n_nodes, nt)
    return max(0, k - 1)
