"""Radix sort of edge records under the tie rule.

A record is ``(key - kmin, position)``: the order-preserving key of the edge's weight (see
``tie_rule``; complemented for a maximum forest) shifted so the smallest key is 0, and the input
position, packed in 12 bytes.  The records are sorted by the 96-bit composite (key, position),
which is distinct for every edge, so any correct sort gives exactly the rule order.

``split_records`` computes the records and scatters them straight into 2048 buckets of the top
11 bits (one counting pass and one scatter over the weights; per-thread histogram rows offset in
thread order keep every bucket in position order).  ``sort_bucket`` then sorts one bucket: up
to 2**22 records it mallocs a scratch buffer of the bucket's size and sorts by stable
most-significant-digit scatter passes into it (11-bit digits above 2048 records, 8-bit below,
digits that are constant within the bucket skipped, insertion sort from 24 records down),
copying back after each pass; larger buckets, or when the buffer cannot be allocated, are sorted
in place by 8-bit American-flag passes.  Peak memory is the 12-byte records plus one bucket's
scratch per sorting thread.

This compiled module keeps the kernels and thin typed defs over them (``split_buckets32/64``,
``sort_buckets``, ``openmp_max_threads``); ``split_records``, which checks, sizes and allocates
the arrays and calls ``split_buckets32/64``, is the Python module ``records.py``.
"""
import numpy as np
from cython.parallel cimport prange
from libc.stdint cimport int64_t, uint8_t, uint32_t, uint64_t
from libc.stdlib cimport free, malloc
from libc.string cimport memcpy

from fastmst._kernels._atomics cimport omp_max_threads
from fastmst._kernels.radix cimport Rec, digit_hist, digit_kp, rec_less
from fastmst._kernels.tie_rule cimport ukey_t, rank_key


#: NumPy view of the 12-byte records (packed: key uint64, pos uint32).
RECORD_DTYPE = np.dtype([("key", "<u8"), ("pos", "<u4")], align=False)
#: Largest edge count the 32-bit record positions can hold.
MAX_RECORDS = 2 ** 32
#: Edges per extra thread in the counting, copying, filtering and split passes: below it,
#: waking a thread (which on a busy shared machine can wait for a scheduler slice) costs more
#: than it saves.  2**19 measured best on the 2-core machine when quiet (1000 x 1000 grid, 2M
#: edges: 0.10 s against 0.12 s with 2**21, 2026-12-02).  Tests lower it to run the parallel
#: code on small graphs.
MIN_EDGES_PER_THREAD = 1 << 19

# ---------------------------------------------------------------------------------------------
# MSD radix sort kernels (noexcept nogil; the Kruskal kernels cimport them through radix.pxd)

cdef inline Py_ssize_t _digit(const Rec* r, int s, uint64_t mask) noexcept nogil:
    return digit_kp(r.key, r.pos, s, mask)


cdef inline int _next_shift(int s) noexcept nogil:
    if s >= 8:
        return s - 8
    if s > 0:
        return 0
    return -1


cdef void _insertion(Rec* a, Py_ssize_t n) noexcept nogil:
    cdef Py_ssize_t i, j
    cdef Rec x
    for i in range(1, n):
        x = a[i]
        j = i
        while j > 0 and rec_less(&x, &a[j - 1]):
            a[j] = a[j - 1]
            j -= 1
        a[j] = x


cdef void _permute(Rec* a, Py_ssize_t nb, Py_ssize_t* nxt, const Py_ssize_t* end, int s,
                   uint64_t mask) noexcept nogil:
    """American-flag permutation: move every record into its digit's bucket, in place."""
    cdef Py_ssize_t d, dd
    cdef Rec x, y
    for d in range(nb):
        while nxt[d] < end[d]:
            x = a[nxt[d]]
            dd = _digit(&x, s, mask)
            while dd != d:
                y = a[nxt[dd]]
                a[nxt[dd]] = x
                nxt[dd] += 1
                x = y
                dd = _digit(&x, s, mask)
            a[nxt[d]] = x
            nxt[d] += 1


cdef void _sort_inplace(Rec* a, Py_ssize_t n, int shift) noexcept nogil:
    """Sort ``a[:n]`` (composites agree above bit ``shift + 8``) with in-place 8-bit passes."""
    cdef Py_ssize_t cnt[256]
    cdef Py_ssize_t nxt[256]
    cdef Py_ssize_t end[256]
    cdef Py_ssize_t i, d, acc
    cdef bint constant
    while True:
        if n < 2 or shift < 0:
            return
        if n <= 24:
            _insertion(a, n)
            return
        for d in range(256):
            cnt[d] = 0
        for i in range(n):
            cnt[_digit(&a[i], shift, 0xFF)] += 1
        constant = False
        for d in range(256):
            if cnt[d] == n:
                constant = True
                break
        if not constant:
            break
        shift = _next_shift(shift)
    acc = 0
    for d in range(256):
        nxt[d] = acc
        acc += cnt[d]
        end[d] = acc
    _permute(a, 256, nxt, end, shift, 0xFF)
    acc = 0
    shift = _next_shift(shift)
    for d in range(256):
        if cnt[d] > 1:
            sort_bucket(a + acc, cnt[d], shift)
        acc += cnt[d]


cdef inline int _shift_down(int s, int width) noexcept nogil:
    """The shift of the next digit of ``width`` bits below a digit that ends at ``s + 8``."""
    if s + 8 - width > 0:
        return s + 8 - width
    return 0


cdef void _sort_scratch(Rec* a, Rec* tmp, Py_ssize_t n, int shift) noexcept nogil:
    """Sort ``a[:n]`` (composites agree above bit ``shift + 8``) by stable MSD scatter passes
    into ``tmp`` (same size), 11-bit digits for large inputs, 8-bit below 2048 records."""
    cdef Py_ssize_t cnt[2048]
    cdef Py_ssize_t i, d, acc, j, nb = 0
    cdef int width, s = 0
    cdef uint64_t mask = 0
    cdef bint constant
    while True:
        if n < 2 or shift < 0:
            return
        if n <= 24:
            _insertion(a, n)
            return
        width = 11 if n > 2048 else 8
        nb = (<Py_ssize_t>1) << width
        mask = <uint64_t>(nb - 1)
        s = _shift_down(shift, width)
        for d in range(nb):
            cnt[d] = 0
        for i in range(n):
            cnt[_digit(&a[i], s, mask)] += 1
        constant = False
        for d in range(nb):
            if cnt[d] == n:
                constant = True
                break
        if not constant:
            break
        shift = _next_shift(s)
        if s == 0:
            return
    # exclusive prefix sums, then a stable scatter into tmp and a copy back
    acc = 0
    for d in range(nb):
        j = cnt[d]
        cnt[d] = acc
        acc += j
    for i in range(n):
        d = _digit(&a[i], s, mask)
        tmp[cnt[d]] = a[i]
        cnt[d] += 1
    memcpy(a, tmp, n * sizeof(Rec))
    if s == 0:
        return
    shift = s - 8 if s >= 8 else 0
    acc = 0
    for d in range(nb):
        j = cnt[d] - acc
        if j > 1:
            _sort_scratch(a + acc, tmp + acc, j, shift)
        acc = cnt[d]


cdef void sort_bucket(Rec* a, Py_ssize_t n, int shift) noexcept nogil:
    """Sort ``a[:n]`` whose composites agree on every bit above ``shift + 8``.

    Up to 2**22 records a scratch buffer of the same size is used (fast stable scatters in
    cache); larger ones, or when the buffer cannot be allocated, are sorted in place.
    """
    cdef Rec* tmp
    if n < 2 or shift < 0:
        return
    if n <= 24:
        _insertion(a, n)
        return
    tmp = NULL
    if n <= (1 << 22):
        tmp = <Rec*>malloc(n * sizeof(Rec))
    if tmp == NULL:
        _sort_inplace(a, n, shift)
        return
    _sort_scratch(a, tmp, n, shift)
    free(tmp)


cdef void split_top(Rec* a, Py_ssize_t n, int top_bits, Py_ssize_t* bounds,
                    int* next_shift) noexcept nogil:
    """One 11-bit MSD pass over the top bits.

    OUT: ``bounds[0..2048]`` bucket boundaries (bucket b is ``a[bounds[b]:bounds[b+1]]``, in key
    order); ``next_shift`` the shift to pass to ``sort_bucket`` for each bucket.
    """
    cdef Py_ssize_t cnt[2048]
    cdef Py_ssize_t nxt[2048]
    cdef Py_ssize_t i, d, acc
    cdef int s = top_bits - 11 if top_bits > 11 else 0
    for d in range(2048):
        cnt[d] = 0
    for i in range(n):
        cnt[_digit(&a[i], s, 0x7FF)] += 1
    acc = 0
    for d in range(2048):
        bounds[d] = acc
        nxt[d] = acc
        acc += cnt[d]
    bounds[2048] = acc
    _permute(a, 2048, nxt, bounds + 1, s, 0x7FF)
    next_shift[0] = _next_shift(s)


cdef void sort_records(Rec* a, Py_ssize_t n, int top_bits) noexcept nogil:
    """Sort ``a[:n]`` by (key, pos), serially."""
    cdef Py_ssize_t bounds[2049]
    cdef int s = 0
    cdef Py_ssize_t b
    if n < 2:
        return
    if n <= 4096:
        sort_bucket(a, n, top_bits - 8 if top_bits > 8 else 0)
        return
    split_top(a, n, top_bits, bounds, &s)
    for b in range(2048):
        sort_bucket(a + bounds[b], bounds[b + 1] - bounds[b], s)


cdef void _fill_split(const ukey_t[::1] bits, int kind, bint complement, uint64_t kmin,
                      int top_bits, Rec* out, Py_ssize_t* hist, Py_ssize_t* bounds,
                      int threads) noexcept nogil:
    """Compute the records and scatter them straight into their top-digit buckets.

    Two reads of the weights and one scattered write of the records; no buffer beyond the
    records.  Each thread owns a static slice of positions and its own histogram row, and the
    rows are offset in thread order, so the scatter is stable (every bucket keeps position
    order) and independent of the thread count.
    IN: bits, kind, complement, kmin, top_bits.  SCRATCH: hist (threads * 2048).
    OUT: out (E records), bounds[0..2048].
    """
    cdef Py_ssize_t m = bits.shape[0]
    cdef int s = top_bits - 11 if top_bits > 11 else 0
    cdef Py_ssize_t t, i, j, d, lo, hi, acc
    cdef Py_ssize_t* h
    cdef uint64_t k
    digit_hist(&bits[0], m, kind, complement, kmin, s, hist, threads, threads)
    acc = 0
    for d in range(2048):
        bounds[d] = acc
        for t in range(threads):
            i = hist[t * 2048 + d]
            hist[t * 2048 + d] = acc
            acc += i
    bounds[2048] = acc
    for t in prange(threads, num_threads=threads, schedule="static"):
        lo = m * t // threads
        hi = m * (t + 1) // threads
        h = hist + t * 2048
        for i in range(lo, hi):
            k = rank_key(bits[i], kind, complement) - kmin
            d = digit_kp(k, <uint32_t>i, s, 0x7FF)
            j = h[d]
            h[d] = j + 1
            out[j].key = k
            out[j].pos = <uint32_t>i


cdef int _check_split(Py_ssize_t m, int top_bits, Py_ssize_t n_raw, Py_ssize_t n_hist,
                      Py_ssize_t n_bounds, int threads) except -1:
    if m >= (<Py_ssize_t>1) << 32 or m < 2:           # MAX_RECORDS
        raise ValueError(f"split_records: needs 2 <= E < 2**32 edges, received {m}.")
    if not 1 <= top_bits <= 96:
        raise ValueError(f"split_records: top_bits must be in [1, 96], received {top_bits}.")
    if threads < 1 or n_raw != 12 * m or n_hist < 2048 * threads or n_bounds != 2049:
        raise ValueError(f"split_records: needs threads >= 1 and arrays of 12 * E bytes, "
                         f"2048 * threads and 2049 entries, received threads={threads}, E={m}, "
                         f"{n_raw}, {n_hist} and {n_bounds}; allocate them as records.py does.")
    return 0


def split_buckets32(const uint32_t[::1] bits, int kind, bint maximize, uint64_t kmin,
                    int top_bits, uint8_t[::1] raw, Py_ssize_t[::1] hist,
                    Py_ssize_t[::1] bounds, int threads):
    """OUT: ``raw``, the records of 4-byte weight bits split into 2048 top-digit buckets, and
    ``bounds``.  SCRATCH: ``hist``.  Returns the shift to pass to ``sort_buckets``
    (``records.split_records`` allocates the arrays and documents the arguments)."""
    _check_split(bits.shape[0], top_bits, raw.shape[0], hist.shape[0], bounds.shape[0], threads)
    with nogil:
        _fill_split(bits, kind, maximize, kmin, top_bits, <Rec*>&raw[0], &hist[0], &bounds[0],
                    threads)
    return _next_shift(top_bits - 11 if top_bits > 11 else 0)


def split_buckets64(const uint64_t[::1] bits, int kind, bint maximize, uint64_t kmin,
                    int top_bits, uint8_t[::1] raw, Py_ssize_t[::1] hist,
                    Py_ssize_t[::1] bounds, int threads):
    """As ``split_buckets32`` for 8-byte weight bits."""
    _check_split(bits.shape[0], top_bits, raw.shape[0], hist.shape[0], bounds.shape[0], threads)
    with nogil:
        _fill_split(bits, kind, maximize, kmin, top_bits, <Rec*>&raw[0], &hist[0], &bounds[0],
                    threads)
    return _next_shift(top_bits - 11 if top_bits > 11 else 0)


def sort_buckets(uint8_t[::1] raw, const Py_ssize_t[::1] bounds, int next_shift,
                 Py_ssize_t first, Py_ssize_t last, int threads=1):
    """Sort buckets ``first..last-1`` of ``split_records`` output in place (IN/OUT: raw)."""
    if bounds.shape[0] != 2049 or raw.shape[0] != 12 * bounds[2048]:
        raise ValueError("sort_buckets: raw and bounds must come from one split_records call.")
    if not 0 <= first <= last <= 2048:
        raise ValueError(f"sort_buckets: needs 0 <= first <= last <= 2048, received {first}, "
                         f"{last}.")
    if raw.shape[0] == 0:
        return
    cdef Rec* a = <Rec*>&raw[0]
    cdef Py_ssize_t b
    with nogil:
        for b in prange(first, last, num_threads=threads, schedule="dynamic"):
            sort_bucket(a + bounds[b], bounds[b + 1] - bounds[b], next_shift)


def openmp_max_threads():
    """``omp_get_max_threads()`` of the calling thread: the team size OpenMP would use by
    default (``OMP_NUM_THREADS``, or the limit ``threadpoolctl.threadpool_limits`` set); 0 when
    the kernels were built without OpenMP."""
    return omp_max_threads()

