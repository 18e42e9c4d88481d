# Filter-Kruskal on the slot records of one bucket: scan, filter and the pivot recursion.
#
# Inline functions of filter_kruskal (kept apart by concept: the per-record work, not the
# streaming passes over the edges).  A slot record (key, slot) points at its slot's
# (position, tail, head) in ``side``; the union-find is the rank-in-parent-word layout of
# dsu.pxd (``rp_*``), so a find and the link after it read nothing but the parent array.
from libc.stdint cimport int64_t, uint32_t, uint64_t

from fastmst._kernels._atomics cimport prefetch
from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.dsu cimport rp_find, rp_link
from fastmst._kernels.radix cimport Rec, rec_less, sort_records


cdef inline bint both_giant(const uint64_t* giant, index_t u, index_t v) noexcept nogil:
    """Are u and v both marked members of the largest tree (``giant``: one bit per node)?"""
    return ((giant[u >> 6] >> (u & 63)) & (giant[v >> 6] >> (v & 63)) & 1) != 0


cdef inline void slot_ahead(const Rec* a, Py_ssize_t n, Py_ssize_t i, const index_t* side,
                            const index_t* parent) noexcept nogil:
    """Prefetch for a loop over slot records: the slot of record i + 32 and the parents of
    record i + 12's endpoints (hides most of the latency of the scattered reads)."""
    cdef uint32_t s
    if i + 32 < n:
        prefetch(&side[3 * a[i + 32].pos])
    if i + 12 < n:
        s = a[i + 12].pos
        prefetch(&parent[side[3 * s + 1]])
        prefetch(&parent[side[3 * s + 2]])


cdef inline Py_ssize_t scan_slots(const Rec* a, Py_ssize_t n, const index_t* side,
                            index_t* parent, int64_t* op, index_t* ot,
                            index_t* oh, uint64_t* ow, Py_ssize_t count,
                            Py_ssize_t target, const uint64_t* giant) noexcept nogil:
    """Kruskal scan of sorted slot records ``a[:n]``; accepted edges are appended to the
    output arrays (position, endpoints, shifted key) from ``count`` on.  Returns the new count
    (stops at ``target``).  The slot of record i + 32 and the parents of record i + 12 are
    prefetched (``slot_ahead``)."""
    cdef Py_ssize_t i
    cdef uint32_t s
    cdef index_t u, v, ru, rv
    for i in range(n):
        slot_ahead(a, n, i, side, parent)
        s = a[i].pos
        u = side[3 * s + 1]
        v = side[3 * s + 2]
        if both_giant(giant, u, v):
            continue
        ru = rp_find(parent, u)
        rv = rp_find(parent, v)
        if ru != rv:
            rp_link(parent, ru, rv)
            op[count] = <uint32_t>side[3 * s]
            ot[count] = u
            oh[count] = v
            ow[count] = a[i].key
            count += 1
            if count >= target:
                return count
    return count


cdef inline Py_ssize_t filter_slots(Rec* a, Py_ssize_t n, const index_t* side, index_t* parent,
                              const uint64_t* giant) noexcept nogil:
    """Keep (stably, in place) the slot records whose endpoints are in different trees."""
    cdef Py_ssize_t i, k = 0
    cdef uint32_t s
    for i in range(n):
        slot_ahead(a, n, i, side, parent)
        s = a[i].pos
        if both_giant(giant, side[3 * s + 1], side[3 * s + 2]):
            continue
        if rp_find(parent, side[3 * s + 1]) != rp_find(parent, side[3 * s + 2]):
            a[k] = a[i]
            k += 1
    return k


cdef inline const Rec* median3(const Rec* x, const Rec* y, const Rec* z) noexcept nogil:
    if rec_less(x, y):
        if rec_less(y, z):
            return y
        return z if rec_less(x, z) else x
    if rec_less(x, z):
        return x
    return z if rec_less(y, z) else y


cdef inline Py_ssize_t partition_records(Rec* a, Py_ssize_t n) noexcept nogil:
    """Partition around a pseudo-median of nine evenly spaced records (Tukey's ninther).

    Records lighter than the pivot go first; returns their number, which is at least 4 and
    at most n - 5 for n >= 9 (composites are distinct).
    """
    cdef Py_ssize_t s = n // 9, i, j
    cdef Rec pivot, tmp
    pivot = median3(median3(&a[0], &a[s], &a[2 * s]),
                     median3(&a[3 * s], &a[4 * s], &a[5 * s]),
                     median3(&a[6 * s], &a[7 * s], &a[8 * s]))[0]
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


cdef inline Py_ssize_t fk_recurse(Rec* a, Py_ssize_t n, int top_bits, const index_t* side,
                            index_t* parent, int64_t* op, index_t* ot,
                            index_t* oh, uint64_t* ow, Py_ssize_t count, Py_ssize_t target,
                            Py_ssize_t threshold, int depth, const uint64_t* giant) noexcept nogil:
    """The paper's recursion on slot records ``a[:n]`` (one bucket too large for the cache).

    Partition around a pivot; recurse on the light side; drop heavy records whose endpoints
    the light side already joined; recurse on the survivors.  Below ``threshold`` records (or
    past a recursion depth of 64, against adversarial pivots) radix sort and scan.
    """
    cdef Py_ssize_t nl, nh
    while True:
        if count >= target or n == 0:
            return count
        if n <= threshold or depth > 64:
            sort_records(a, n, top_bits)
            return scan_slots(a, n, side, parent, op, ot, oh, ow, count,
                               target, giant)
        nl = partition_records(a, n)
        count = fk_recurse(a, nl, top_bits, side, parent, op, ot, oh, ow,
                            count, target, threshold, depth + 1, giant)
        if count >= target:
            return count
        nh = filter_slots(a + nl, n - nl, side, parent, giant)
        a = a + nl
        n = nh
        depth += 1

