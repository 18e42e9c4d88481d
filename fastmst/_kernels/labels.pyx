"""Text labels to compact ids, in order of first appearance, read from Arrow string buffers.

``text_ids`` numbers the distinct labels of a sequence of Arrow string chunks (the tail column's
chunks, then the head column's) by first appearance and writes each row's id.  It reads the
chunks' offset and data buffers in place (``string`` and ``large_string``; no copy).

Exact: each label's 64-bit hash sits in an open-addressing table with its length and id.  Labels
of up to 8 bytes are hashed by a bijection of their zero-padded bytes, so equal hash and length
means equal label; longer labels are also compared byte by byte with their first occurrence.

Threads: the table is split into ``threads`` shards by hash bits; shard ``s`` numbers its own
labels in reading order (one thread per shard, every thread reads every row, hashes it and keeps
the rows of its shard).  The shards' first positions are then merged by one sort over the
distinct labels, so the ids are the same for every thread count.
"""
import numpy as np
from cython.parallel cimport prange
from libc.stdint cimport int32_t, int64_t, uint8_t, uint64_t
from libc.string cimport memcmp, memcpy


cdef extern from *:
    """
    #if defined(__GNUC__) || defined(__clang__)
    #define FASTMST_PREFETCH(p) __builtin_prefetch((const void *)(p), 0, 1)
    #else
    #define FASTMST_PREFETCH(p) ((void)0)
    #endif
    #if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__
    #define FASTMST_LITTLE_ENDIAN 1
    #else
    #define FASTMST_LITTLE_ENDIAN 0
    #endif
    """
    void prefetch "FASTMST_PREFETCH"(const void *p) noexcept nogil
    const bint LITTLE_ENDIAN "FASTMST_LITTLE_ENDIAN"


ctypedef fused offset_t:
    int32_t
    int64_t

cdef enum:
    PIECE = 65536   # rows handed to one parallel pass: the table never grows inside a pass
    BATCH = 64      # rows hashed (and their table slots prefetched) ahead of the probes
    EMPTY = 0       # the second word of an empty slot


cdef inline uint64_t _mix(uint64_t x) noexcept nogil:
    """A bijection of 64-bit words (xor-shift / odd-multiply rounds)."""
    x ^= x >> 32
    x *= <uint64_t>0xd6e8feb86659fd93ULL
    x ^= x >> 32
    x *= <uint64_t>0xd6e8feb86659fd93ULL
    x ^= x >> 32
    return x


cdef inline uint64_t _hash(const uint8_t *p, Py_ssize_t n, bint room) noexcept nogil:
    """64-bit hash of ``n`` bytes; for n <= 8 a bijection of the zero-padded bytes.  ``room``:
    8 bytes may be read from ``p`` (then, on little-endian machines, short labels are one load
    and a mask)."""
    cdef uint64_t w = 0, h
    cdef Py_ssize_t i = 0
    if n <= 8:
        if room and LITTLE_ENDIAN:
            memcpy(&w, p, 8)
            if n < 8:
                w &= ((<uint64_t>1) << (8 * n)) - 1
        elif n:
            memcpy(&w, p, n)
        return _mix(w)
    h = <uint64_t>n * <uint64_t>0x9e3779b97f4a7c15ULL
    while i + 8 <= n:
        memcpy(&w, p + i, 8)
        h = (h ^ _mix(w)) * <uint64_t>0xff51afd7ed558ccdULL
        i += 8
    if i < n:
        w = 0
        memcpy(&w, p + i, n - i)
        h = (h ^ _mix(w)) * <uint64_t>0xff51afd7ed558ccdULL
    return _mix(h ^ (h >> 29))


cdef inline int _shard(uint64_t h, int threads) noexcept nogil:
    return <int>(((h >> 40) * <uint64_t>threads) >> 24)


cdef void _map_piece(const offset_t[::1] offs, const uint8_t[::1] buf, int32_t[::1] out,
                     int64_t base, int s, int threads, uint64_t[::1] slots, int64_t[::1] first,
                     uint64_t[::1] uptr, int64_t[::1] ulen, int64_t[::1] count,
                     Py_ssize_t cap, Py_ssize_t ucap) noexcept nogil:
    """Ids of rows ``offs`` whose hash falls in shard ``s`` (OUT: out, the table of shard s).

    ``base`` is the global position of the first row; ids are written as ``local * threads + s``.
    """
    cdef Py_ssize_t n = offs.shape[0] - 1, start, j, m, a, length, slot
    cdef Py_ssize_t mask = cap - 1, tb = 2 * cap * s, ub = ucap * s
    cdef uint64_t h, w1
    cdef int64_t lid
    cdef uint64_t hb[BATCH]
    cdef int32_t sel[BATCH]
    cdef Py_ssize_t k, kept
    cdef uint64_t *tbl = &slots[tb]
    cdef const uint8_t *data = &buf[0]
    cdef Py_ssize_t size = buf.shape[0]
    start = 0
    while start < n:
        m = n - start if n - start < BATCH else BATCH
        kept = 0
        for j in range(m):   # hash a batch, keep this shard's rows (branch-free)
            a = offs[start + j]
            h = _hash(data + a, offs[start + j + 1] - a, a + 8 <= size)
            hb[kept] = h
            sel[kept] = <int32_t>j
            kept += _shard(h, threads) == s
        for k in range(kept):
            prefetch(&tbl[2 * (hb[k] & mask)])
        for k in range(kept):
            h = hb[k]
            j = sel[k]
            a = offs[start + j]
            length = offs[start + j + 1] - a
            slot = h & mask
            while True:
                w1 = tbl[2 * slot + 1]
                if w1 == EMPTY:
                    lid = count[s]
                    count[s] = lid + 1
                    tbl[2 * slot] = h
                    tbl[2 * slot + 1] = (<uint64_t>length << 32) | <uint64_t>(lid + 1)
                    first[ub + lid] = base + start + j
                    uptr[ub + lid] = <uint64_t>(data + a)
                    ulen[ub + lid] = length
                    break
                if tbl[2 * slot] == h and (w1 >> 32) == <uint64_t>length:
                    lid = <int64_t>(w1 & 0xffffffffULL) - 1
                    if length <= 8 or memcmp(<const void *>uptr[ub + lid], data + a,
                                             length) == 0:
                        break
                slot = (slot + 1) & mask
            out[start + j] = <int32_t>(lid * threads + s)
        start += m


cdef void _rehash(const uint64_t[::1] old, Py_ssize_t old_cap, uint64_t[::1] new,
                  Py_ssize_t cap, int threads) noexcept nogil:
    """Move every shard's entries from tables of ``old_cap`` slots to tables of ``cap``."""
    cdef Py_ssize_t s, i, slot, mask = cap - 1
    cdef uint64_t h
    for s in range(threads):
        for i in range(s * old_cap, (s + 1) * old_cap):
            if old[2 * i + 1] == EMPTY:
                continue
            h = old[2 * i]
            slot = h & mask
            while new[2 * (s * cap + slot) + 1] != EMPTY:
                slot = (slot + 1) & mask
            new[2 * (s * cap + slot)] = h
            new[2 * (s * cap + slot) + 1] = old[2 * i + 1]


cdef void _map_all(const offset_t[::1] offs, const uint8_t[::1] data, int32_t[::1] out,
                   int64_t base, int threads, uint64_t[::1] slots, int64_t[::1] first,
                   uint64_t[::1] uptr, int64_t[::1] ulen, int64_t[::1] count,
                   Py_ssize_t cap, Py_ssize_t ucap) noexcept nogil:
    cdef int s
    if threads == 1:
        _map_piece(offs, data, out, base, 0, 1, slots, first, uptr, ulen, count, cap, ucap)
        return
    for s in prange(threads, schedule="static", chunksize=1, num_threads=threads):
        _map_piece(offs, data, out, base, s, threads, slots, first, uptr, ulen, count, cap,
                   ucap)


cdef void _gather_ids(int32_t[::1] ids, const int32_t[::1] remap, int threads) noexcept nogil:
    """ids[i] = remap[ids[i]] (OUT: ids)."""
    cdef Py_ssize_t i
    for i in prange(ids.shape[0], schedule="static", num_threads=threads):
        ids[i] = remap[ids[i]]


cdef void _gather_bytes(const uint64_t[::1] ptr, const int64_t[::1] offsets,
                        uint8_t[::1] out) noexcept nogil:
    """Concatenate the labels at ``ptr`` (lengths from ``offsets``) into ``out``."""
    cdef Py_ssize_t i, k
    for i in range(ptr.shape[0]):
        k = offsets[i + 1] - offsets[i]
        if k:
            memcpy(&out[offsets[i]], <const void *>ptr[i], k)


cdef inline Py_ssize_t _ucap(Py_ssize_t cap):
    """Distinct labels one shard's table of ``cap`` slots may hold (its load stays <= 2/3)."""
    return cap // 3 * 2 + 1


def _pieces(chunk):
    """(offsets as NumPy, data memoryview) of one Arrow string chunk, checked."""
    import pyarrow as pa
    if pa.types.is_string(chunk.type):
        width = np.int32
    elif pa.types.is_large_string(chunk.type):
        width = np.int64
    else:
        raise TypeError(f"text_ids: expected string or large_string chunks, received "
                        f"{chunk.type}; cast the column to text first.")
    if chunk.null_count:
        raise ValueError(f"text_ids: a chunk holds {chunk.null_count} missing labels; expected "
                         f"none. Refuse or drop the missing rows first.")
    bufs = chunk.buffers()
    n = len(chunk)
    offs = np.frombuffer(bufs[1], dtype=width, count=chunk.offset + n + 1)[chunk.offset:] \
        if n else np.zeros(1, dtype=width)
    if offs.size and int(offs[n]) - int(offs[0]) >= 2**32:
        raise ValueError("text_ids: a chunk holds 4 GiB of label bytes or more; expected less. "
                         "Split the column into smaller chunks.")
    data = np.frombuffer(bufs[2], dtype=np.uint8) if bufs[2] is not None and bufs[2].size \
        else np.zeros(1, dtype=np.uint8)
    return offs, data


def text_ids(chunks, Py_ssize_t n_tail, int threads=1):
    """Compact ids of Arrow string chunks by first appearance.

    ``chunks``: the tail column's chunks then the head column's (``string`` or
    ``large_string``, no nulls); ``n_tail`` rows belong to the tail.  Returns (tail ids, head
    ids) as int32, and the distinct labels as (int64 offsets, uint8 bytes) in id order.
    """
    cdef const uint8_t[::1] data
    cdef int32_t[::1] ids
    cdef uint64_t[::1] slots
    cdef int64_t[::1] first, ulen, count
    cdef uint64_t[::1] uptr
    cdef Py_ssize_t cap, need, k, lo, hi, total, old_cap
    if threads < 1:
        raise ValueError(f"text_ids: threads must be positive, received {threads}.")
    pieces = [_pieces(c) for c in chunks]
    total = sum(int(o.shape[0]) - 1 for o, _ in pieces)
    if n_tail < 0 or n_tail > total:
        raise ValueError(f"text_ids: n_tail={n_tail} is outside 0..{total} (the rows given).")
    if total * threads >= 2**31 - 1:
        raise ValueError(f"text_ids: {total} rows with {threads} threads need ids beyond int32; "
                         f"expected fewer than {(2**31 - 1) // threads} rows.")
    ids = np.empty(total, dtype=np.int32)
    cap = 1024
    slots = np.zeros(2 * cap * threads, dtype=np.uint64)
    first = np.empty(_ucap(cap) * threads, dtype=np.int64)
    uptr = np.empty(_ucap(cap) * threads, dtype=np.uint64)
    ulen = np.empty(_ucap(cap) * threads, dtype=np.int64)
    count = np.zeros(threads, dtype=np.int64)
    base = 0
    for offs, buf in pieces:
        data = buf
        n = int(offs.shape[0]) - 1
        for lo in range(0, n, PIECE):
            hi = min(n, lo + PIECE)
            need = (int(np.max(count)) + hi - lo) * 3 // 2   # load factor <= 2/3
            if need > cap:
                cap, old_cap = _grow(cap, need), cap
                new = np.zeros(2 * cap * threads, dtype=np.uint64)
                _rehash(slots, old_cap, new, cap, threads)
                slots = new
                first = _regrow(first, _ucap(old_cap), _ucap(cap), threads)
                uptr = _regrow(uptr, _ucap(old_cap), _ucap(cap), threads)
                ulen = _regrow(ulen, _ucap(old_cap), _ucap(cap), threads)
            view = offs[lo:hi + 1]
            if view.dtype == np.int32:
                _map_all[int32_t](view, data, ids[base + lo:base + hi], base + lo, threads,
                                  slots, first, uptr, ulen, count, cap, _ucap(cap))
            else:
                _map_all[int64_t](view, data, ids[base + lo:base + hi], base + lo, threads,
                                  slots, first, uptr, ulen, count, cap, _ucap(cap))
        base += n
    # merge the shards: global id = rank of the first position among all distinct labels
    half = _ucap(cap)
    cnt = np.asarray(count)
    firsts = np.concatenate([np.asarray(first)[s * half:s * half + cnt[s]] for s in range(threads)])
    codes = np.concatenate([np.arange(cnt[s], dtype=np.int64) * threads + s
                            for s in range(threads)])
    where = np.concatenate([np.arange(s * half, s * half + cnt[s]) for s in range(threads)])
    order = np.argsort(firsts, kind="stable")
    remap = np.zeros(max(1, int(cnt.max()) * threads), dtype=np.int32)
    remap[codes[order]] = np.arange(order.size, dtype=np.int32)
    _gather_ids(ids, remap, threads)
    k = order.size
    lens = np.asarray(ulen)[where[order]]
    offsets = np.zeros(k + 1, dtype=np.int64)
    np.cumsum(lens, out=offsets[1:])
    out = np.empty(int(offsets[k]), dtype=np.uint8)
    _gather_bytes(np.asarray(uptr)[where[order]], offsets, out)
    arr = np.asarray(ids)
    return arr[:n_tail], arr[n_tail:], offsets, out


def _grow(Py_ssize_t cap, Py_ssize_t need):
    while cap < need:
        cap *= 2
    return cap


def _regrow(a, Py_ssize_t old, Py_ssize_t new, int threads):
    """Per-shard regions of ``old`` entries moved to regions of ``new``."""
    a = np.asarray(a)
    b = np.empty(new * threads, dtype=a.dtype)
    for s in range(threads):
        b[s * new:s * new + old] = a[s * old:(s + 1) * old]
    return b
