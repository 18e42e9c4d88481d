# The sort-ahead pipeline of filter_kruskal: buckets of a chunk filtered, sorted and scanned
# in key order while helper threads sort buckets ahead of the scan.
#
# Inline functions of filter_kruskal, kept apart by concept.  No barrier: helpers take buckets
# by compare-and-swap and the scanning thread waits only for a bucket a helper holds, so a
# helper the OS deschedules delays one bucket, not a wave.
from cython.parallel cimport parallel, threadid
from libc.stdint cimport int64_t, uint8_t, uint64_t

from fastmst._kernels._atomics cimport claim8, get8, getz, put8, putz, yield_cpu
from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.fk_scan cimport filter_slots, fk_recurse, scan_slots
from fastmst._kernels.radix cimport Rec, sort_bucket


ctypedef struct Rate:
    # the share of scanned edges accepted over the last window decides on filtering
    Py_ssize_t scanned
    Py_ssize_t accepted
    Py_ssize_t window
    bint filtering

#: Records a helper may sort ahead of the scan (kept small enough to stay in the shared cache).
cdef enum:
    SORT_AHEAD = 1 << 18

# States of a bucket in the sort-ahead pipeline of chunk_buckets.
cdef enum:
    FREE = 0       # nobody has it
    HELPING = 1    # a helper thread is sorting it
    OWNED = 2      # the scanning thread took it (sorts it itself if needed)
    READY = 3      # sorted by a helper


cdef inline Py_ssize_t bucket_run(Rec* a, const Py_ssize_t* bounds, Py_ssize_t nbk,
                            uint8_t* state, uint8_t* stop, Py_ssize_t* progress, int shift,
                            int top_bits,
                            const index_t* side, index_t* parent, int64_t* op,
                            index_t* ot, index_t* oh, uint64_t* ow, Py_ssize_t count,
                            Py_ssize_t target, Py_ssize_t threshold, Rate* rate,
                            const uint64_t* giant) noexcept nogil:
    """Filter, sort and scan the ``nbk`` buckets ``a[bounds[b]:bounds[b+1]]`` in key order.

    ``shift < 0`` means every bucket holds a single key in slot order (already sorted).  With
    ``state`` (not NULL), helper threads may sort buckets ahead: bucket b is taken with a
    compare-and-swap FREE -> OWNED, or, when a helper has it, waited for until READY (the
    filter keeps the order, so a presorted bucket stays sorted); ``stop`` is raised once
    filtering starts, so that buckets are sorted after the filter has shrunk them.  A bucket
    is filtered first while fewer than a quarter of the recently scanned edges join two trees:
    the filter costs about one scan, a scanned edge about a scan plus a sort, so the filter
    pays below roughly that rate (measured; see docs/performance.md).
    """
    cdef Py_ssize_t b, lo, nb, before
    cdef bint presorted
    for b in range(nbk):
        lo = bounds[b]
        nb = bounds[b + 1] - lo
        if nb == 0:
            continue
        presorted = False
        if progress != NULL:
            putz(progress, lo)
        if state != NULL and not claim8(&state[b], FREE, OWNED):
            while get8(&state[b]) != READY:
                yield_cpu()
            presorted = True
        if rate.filtering:
            nb = filter_slots(a + lo, nb, side, parent, giant)
        before = count
        if nb > threshold and shift >= 0 and not presorted:
            count = fk_recurse(a + lo, nb, top_bits, side, parent, op, ot,
                                oh, ow, count, target, threshold, 0, giant)
        else:
            if nb > 1 and shift >= 0 and not presorted:
                sort_bucket(a + lo, nb, shift)
            count = scan_slots(a + lo, nb, side, parent, op, ot, oh, ow,
                                count, target, giant)
        if count >= target:
            break
        rate.scanned += nb
        rate.accepted += count - before
        if rate.scanned >= rate.window:
            rate.filtering = 4 * rate.accepted < rate.scanned
            rate.scanned = 0
            rate.accepted = 0
            if rate.filtering and stop != NULL:
                put8(stop, 1)
    return count


cdef inline Py_ssize_t chunk_buckets(Rec* a, const Py_ssize_t* bounds, Py_ssize_t nbk, int shift,
                               int top_bits, const index_t* side, index_t* parent,
                               int64_t* op, index_t* ot, index_t* oh,
                               uint64_t* ow, Py_ssize_t count, Py_ssize_t target,
                               Py_ssize_t threshold, Rate* rate, const uint64_t* giant,
                               uint8_t* state, int threads) noexcept nogil:
    """Process the ``nbk`` buckets of a chunk in key order (``bucket_run``).

    With several threads and while the scans still accept many edges (no filtering), thread 0
    scans while the others sort buckets ahead of it, each taking a bucket by compare-and-swap;
    nobody waits for a whole wave, so a helper that the OS deschedules (a busy machine) delays
    at most the one bucket it holds.  Helpers stay within ``SORT_AHEAD`` records of the scan.
    Who sorts a bucket does not change the result.
    SCRATCH: ``state`` (nbk + 1 bytes; the last is the stop flag).
    """
    cdef Py_ssize_t b, nb
    cdef Py_ssize_t[1] shared
    cdef Py_ssize_t[1] progress
    cdef int tid
    if threads <= 1 or shift < 0 or rate.filtering:
        return bucket_run(a, bounds, nbk, NULL, NULL, NULL, shift, top_bits, side, parent, op,
                           ot, oh, ow, count, target, threshold, rate, giant)
    for b in range(nbk + 1):
        state[b] = FREE
    shared[0] = count
    progress[0] = 0
    with parallel(num_threads=threads):
        tid = threadid()
        if tid == 0:
            shared[0] = bucket_run(a, bounds, nbk, state, state + nbk, progress, shift,
                                    top_bits, side, parent, op, ot, oh, ow, shared[0], target,
                                    threshold, rate, giant)
            put8(state + nbk, 1)
        else:
            b = 0
            while b < nbk and not get8(state + nbk):
                if bounds[b] > getz(progress) + SORT_AHEAD:
                    yield_cpu()  # far enough ahead of the scan: let others run meanwhile
                    continue
                nb = bounds[b + 1] - bounds[b]
                if 1 < nb <= threshold and claim8(&state[b], FREE, HELPING):
                    sort_bucket(a + bounds[b], nb, shift)
                    put8(&state[b], READY)
                b = b + 1
    return shared[0]

