"""Order-preserving radix sort of edges under the (weight, position) rule.

Every weight dtype the kernels read (float32/float64, int32/int64, uint32/uint64) maps to an
unsigned key whose unsigned order is the weight order:

* unsigned integers are their own key;
* signed integers flip the sign bit (two's complement order becomes unsigned order);
* IEEE floats: ``-0.0`` is first replaced by ``+0.0`` (they compare equal, so they must tie and
  fall back to position order); a non-negative float sets the sign bit, a negative one has all
  bits complemented, which orders negative floats (and ``-inf``) below positive ones.

A maximum forest complements every key (descending weight becomes ascending key) instead of
negating a copy of the weights; the position order of ties is unchanged.

Records ``(key - min_key, position)`` are then sorted by an in-place most-significant-digit radix
sort: one 11-bit pass over the whole array splits it into at most 2048 buckets in key order,
and each bucket (small enough to stay in cache for the sizes we meet) is sorted by recursive
8-bit passes that skip any digit that is constant within the bucket, down to an insertion sort
below 24 records.  Because the (key, position) composite is distinct for every edge, this gives
exactly the stable order: ties stay in position order.  No buffer beyond the 12-byte records is
needed, which keeps the peak memory of a 100M-edge sort at 1.2 GB.
"""
import numpy as np
cimport numpy as cnp
cimport cython
from cython.parallel cimport prange
from libc.stdint cimport int64_t, uint8_t, uint32_t, uint64_t
from libc.stdlib cimport free, malloc
from libc.string cimport memcpy

from fastmst._kernels._typedefs cimport weight_t
from fastmst._kernels.radix cimport Rec, rec_less

cnp.import_array()

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
_RADIX_DTYPES = {np.dtype(t) for t in (np.float32, np.float64, np.int32, np.int64, np.uint32,
                                       np.uint64)}

def _kind_and_bits(weight):
    kind = weight.dtype.kind
    if kind == "f":
        code = KIND_FLOAT
    elif kind == "i":
        code = KIND_SIGNED
    else:
        code = KIND_UNSIGNED
    ubits = np.uint32 if weight.dtype.itemsize == 4 else np.uint64
    return code, ubits


def _scalar_keys(weight, bint complement):
    """Keys of min(weight) and max(weight), as Python ints (smallest key first)."""
    code, ubits = _kind_and_bits(weight)
    ext = np.array([weight.min(), weight.max()], dtype=weight.dtype).view(ubits)
    keys = []
    for b in ext.tolist():
        if code == KIND_SIGNED:
            k = b ^ (1 << (ext.itemsize * 8 - 1))
        elif code == KIND_FLOAT:
            top = 1 << (ext.itemsize * 8 - 1)
            if b == top:
                b = 0
            k = (~b & (2 * top - 1)) if b & top else b | top
        else:
            k = b
        if complement:
            k = ~k & ((1 << (ext.itemsize * 8)) - 1)
        keys.append(k)
    return min(keys), max(keys)


# ---------------------------------------------------------------------------------------------
# MSD radix sort kernels (noexcept nogil; cimported by _kruskal through _sort.pxd)

cdef inline Py_ssize_t _digit(const Rec* r, int s, uint64_t mask) noexcept nogil:
    if s >= 32:
        return <Py_ssize_t>((r.key >> (s - 32)) & mask)
    return <Py_ssize_t>(((r.key << (32 - s)) | (<uint64_t>r.pos >> s)) & mask)


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
    cdef Py_ssize_t i, d, acc, nb, j
    cdef int s, width
    cdef uint64_t mask
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
        shift = s - 8 if s >= 8 else (0 if s > 0 else -1)
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


cdef Py_ssize_t split_top(Rec* a, Py_ssize_t n, int top_bits, Py_ssize_t* bounds,
                          int* next_shift) noexcept nogil:
    """One 11-bit MSD pass over the top bits.

    OUT: ``bounds[0..2048]`` bucket boundaries (bucket b is ``a[bounds[b]:bounds[b+1]]``, in key
    order); ``next_shift`` the shift to pass to ``sort_bucket`` for each bucket.  Returns 2048.
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
    return 2048


cdef void sort_records(Rec* a, Py_ssize_t n, int top_bits) noexcept nogil:
    """Sort ``a[:n]`` by (key, pos), serially."""
    cdef Py_ssize_t bounds[2049]
    cdef int s
    cdef Py_ssize_t b
    if n < 2:
        return
    if n <= 4096:
        sort_bucket(a, n, top_bits - 8 if top_bits > 8 else 0)
        return
    split_top(a, n, top_bits, bounds, &s)
    for b in range(2048):
        sort_bucket(a + bounds[b], bounds[b + 1] - bounds[b], s)


cdef Py_ssize_t _first_unsorted(const weight_t[::1] w, bint descending) noexcept nogil:
    cdef Py_ssize_t i
    if descending:
        for i in range(1, w.shape[0]):
            if w[i] > w[i - 1]:
                return i
    else:
        for i in range(1, w.shape[0]):
            if w[i] < w[i - 1]:
                return i
    return -1


def first_unsorted(const weight_t[::1] weight, bint descending=False):
    """Position of the first weight that breaks the order, or -1 when the order holds.

    Parameters
    ----------
    weight : ndarray of shape (E,)
        Validated, contiguous weights (no NaN).
    descending : bool
        Check non-increasing instead of non-decreasing order.
    """
    cdef Py_ssize_t i
    with nogil:
        i = _first_unsorted(weight, descending)
    return i


def edge_order(weight, bint descending=False, int threads=1):
    """Positions sorted by (weight, position); weight descending when ``descending``.

    ``weight`` holds no NaN.  ``-0.0`` and ``+0.0`` tie.  Kernel dtypes (float32/64,
    int32/64, uint32/64) are radix sorted (see the module notes; non-contiguous or
    byte-swapped input is copied first); other dtypes, and more than 2**32 - 1 edges, use the
    stable NumPy sort.

    Returns
    -------
    order : ndarray of shape (E,), dtype=int64
    """
    weight = np.asarray(weight)
    cdef Py_ssize_t m = weight.shape[0]
    if weight.dtype.newbyteorder("=") in _RADIX_DTYPES:
        weight = np.ascontiguousarray(weight, dtype=weight.dtype.newbyteorder("="))
    if m >= MAX_RECORDS or weight.dtype not in _RADIX_DTYPES:
        w = weight + 0 if weight.dtype.kind == "f" else weight  # -0.0 + 0 is +0.0
        if not descending:
            return np.argsort(w, kind="stable").astype(np.int64, copy=False)
        rev = np.argsort(w[::-1], kind="stable").astype(np.int64, copy=False)
        return (m - 1 - rev)[::-1].copy()
    if m < 2:
        return np.arange(m, dtype=np.int64)
    raw, bounds, shift = split_records(weight, descending, threads)
    sort_buckets(raw, bounds, shift, 0, 2048, threads)
    return raw.view(RECORD_DTYPE)["pos"].astype(np.int64)


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
    cdef uint64_t mask = (<uint64_t>0) - 1 if ukey_t is uint64_t else <uint64_t>0xFFFFFFFF
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
            k = _rank_key(bits[i], kind, complement, mask)
            k = k - kmin
            d = _digit_kp(k, <uint32_t>i, s, 0x7FF)
            j = h[d]
            h[d] = j + 1
            out[j].key = k
            out[j].pos = <uint32_t>i


def key_range(weight, bint maximize):
    """``(kind, ubits, kmin, top_bits)`` of validated weights: the key kind code, the unsigned
    view dtype of the weight bits, the smallest key, and the number of significant bits of the
    96-bit composite ``(key - kmin) * 2**32 + position`` (one min/max of the weights)."""
    code, ubits = _kind_and_bits(weight)
    kmin, kmax = _scalar_keys(weight, maximize)
    span = kmax - kmin
    m = weight.shape[0]
    top_bits = 32 + span.bit_length() if span > 0 else max(1, (m - 1).bit_length())
    return code, ubits, kmin, top_bits


def split_records(weight, bint maximize=False, int threads=1):
    """Records of validated weights, already split into 2048 top-digit buckets in key order.

    Parameters
    ----------
    weight : ndarray of shape (E,)
        Contiguous native weights in a kernel dtype (no NaN), ``2 <= E < 2**32``.
    maximize : bool
        Complement the keys (descending weight order).
    threads : int
        Threads for the two passes; the result does not depend on it.

    Returns
    -------
    records : ndarray of shape (12 * E,), dtype=uint8
        Packed records; bucket b is ``records[12*bounds[b]:12*bounds[b+1]]``, each bucket in
        position order (not yet sorted by key within).
    bounds : ndarray of shape (2049,), dtype=intp
    next_shift : int
        The shift to pass to the bucket sort.
    """
    cdef Py_ssize_t m = weight.shape[0]
    if m >= MAX_RECORDS or m < 2:
        raise ValueError(f"split_records: needs 2 <= E < 2**32 edges, received {m}.")
    code, ubits, kmin, top_bits = key_range(weight, maximize)
    threads = max(1, min(threads, m // MIN_EDGES_PER_THREAD + 1))
    raw = np.empty(12 * m, dtype=np.uint8)
    bounds = np.empty(2049, dtype=np.intp)
    hist = np.empty(threads * 2048, dtype=np.intp)
    cdef uint8_t[::1] r = raw
    cdef Py_ssize_t[::1] bd = bounds
    cdef Py_ssize_t[::1] hs = hist
    cdef Rec* out = <Rec*>&r[0]
    cdef uint64_t lo = kmin
    cdef int kind = code, tb = top_bits, nt = threads
    cdef const uint32_t[::1] b32
    cdef const uint64_t[::1] b64
    if ubits is np.uint32:
        b32 = weight.view(np.uint32)
        with nogil:
            _fill_split(b32, kind, maximize, lo, tb, out, &hs[0], &bd[0], nt)
    else:
        b64 = weight.view(np.uint64)
        with nogil:
            _fill_split(b64, kind, maximize, lo, tb, out, &hs[0], &bd[0], nt)
    s = top_bits - 11 if top_bits > 11 else 0
    return raw, bounds, _next_shift(s)


def sort_buckets(raw, bounds, int next_shift, Py_ssize_t first, Py_ssize_t last, int threads=1):
    """Sort buckets ``first..last-1`` of ``split_records`` output in place."""
    cdef uint8_t[::1] r = raw
    cdef Py_ssize_t[::1] bd = bounds
    cdef Rec* a = <Rec*>&r[0]
    cdef Py_ssize_t b
    with nogil:
        for b in prange(first, last, num_threads=threads, schedule="dynamic"):
            sort_bucket(a + bd[b], bd[b + 1] - bd[b], next_shift)
    return raw
