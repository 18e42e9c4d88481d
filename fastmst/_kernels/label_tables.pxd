# One partition's open-addressing table of the label kernel (_labels.pyx): slots of (hash,
# length << 32 | local id + 1), the first occurrence of each local id, growth (into memory of
# its own, also out of a reserved buffer) and the probe of one run of entries.
from libc.stdint cimport int32_t, int64_t, uint32_t, uint64_t
from libc.stdlib cimport calloc, free, malloc, realloc
from libc.string cimport memcmp, memcpy

from fastmst._kernels._atomics cimport prefetch
from fastmst._kernels.label_hash cimport Seg, row_bytes


cdef enum:
    EMPTY = 0       # the second word of an empty table slot


cdef extern from *:
    """
    /* A zero written to every 4096th byte (volatile: kept even though the memory is known to
       be zero), so that each page's first touch is a store. */
    static void fastmst_touch_pages(void* p, size_t n) {
        volatile char* c = (volatile char*)p;
        size_t i;
        for (i = 0; i < n; i += 4096) c[i] = 0;
    }
    """
    void touch_pages "fastmst_touch_pages"(void* p, size_t n) noexcept nogil


ctypedef struct Entry:      # 16 bytes; the label's bytes are found from its row (row_bytes)
    uint64_t h
    uint32_t row        # position within the piece
    uint32_t length


ctypedef struct Part:
    uint64_t* slots     # 2 * cap words: (hash, length << 32 | id + 1)
    Py_ssize_t cap
    Py_ssize_t count    # distinct labels so far
    Py_ssize_t fresh    # the first id new in the current piece
    Py_ssize_t ucap
    int64_t* first      # piece position of the first occurrence (labels new in the piece)
    uint64_t* uptr      # that occurrence's bytes, for labels of more than 8 bytes (compared)
    int32_t* gid        # the global id of each local id
    bint failed         # an allocation failed
    bint own_slots      # slots were allocated here (else they lie in a reserved buffer)
    bint own_ids        # first, uptr and gid were allocated here
    uint64_t warm       # the sum of the warm-up reads (kept so they are not optimised away)


cdef inline bint resize(void** block, Py_ssize_t n, size_t size) noexcept nogil:
    """``*block`` reallocated to ``n`` items of ``size`` bytes (False, and ``*block`` as it
    was, when memory ran out)."""
    cdef void* a = realloc(block[0], n * size)
    if a == NULL:
        return False
    block[0] = a
    return True


cdef inline void* copied(const void* old, Py_ssize_t n, Py_ssize_t keep,
                         size_t size) noexcept nogil:
    """A new block of ``n`` items of ``size`` bytes holding the first ``keep`` items of
    ``old`` (NULL when memory ran out): arrays that lie in a reserved buffer move out this way
    when they must grow."""
    cdef void* a = malloc(n * size)
    if a != NULL and keep:
        memcpy(a, old, keep * size)
    return a


cdef inline bint grow_ids(Part* p) noexcept nogil:
    """Room for more distinct labels in ``p`` (False when memory ran out).  Arrays that lie
    in a reserved buffer are copied to new memory of this module's own."""
    cdef Py_ssize_t u = 2 * p.ucap if p.ucap else 256
    cdef int64_t* first
    cdef uint64_t* uptr
    cdef int32_t* gid
    if p.own_ids:
        if not (resize(<void**>&p.first, u, sizeof(int64_t))
                and resize(<void**>&p.uptr, u, sizeof(uint64_t))
                and resize(<void**>&p.gid, u, sizeof(int32_t))):
            return False
    else:
        first = <int64_t*>copied(p.first, u, p.count, sizeof(int64_t))
        uptr = <uint64_t*>copied(p.uptr, u, p.count, sizeof(uint64_t))
        gid = <int32_t*>copied(p.gid, u, p.count, sizeof(int32_t))
        if first == NULL or uptr == NULL or gid == NULL:
            free(first)
            free(uptr)
            free(gid)
            return False
        p.first, p.uptr, p.gid, p.own_ids = first, uptr, gid, True
    p.ucap = u
    return True


cdef inline void rehash(const uint64_t* old, Py_ssize_t old_cap, uint64_t* new,
                        Py_ssize_t cap) noexcept nogil:
    """Move the filled slots of table ``old`` into the empty table ``new`` (``cap`` slots, a
    power of two)."""
    cdef Py_ssize_t i, slot, mask = cap - 1
    cdef uint64_t h
    for i in range(old_cap):
        if old[2 * i + 1] == EMPTY:
            continue
        h = old[2 * i]
        slot = h & mask
        while new[2 * slot + 1] != EMPTY:
            slot = (slot + 1) & mask
        new[2 * slot] = h
        new[2 * slot + 1] = old[2 * i + 1]


cdef inline bint grow_table(Part* p) noexcept nogil:
    """Double the table of ``p`` and move its entries (False when memory ran out)."""
    cdef Py_ssize_t cap = 2 * p.cap if p.cap else 512
    cdef uint64_t* new = <uint64_t*>calloc(2 * cap, sizeof(uint64_t))
    if new == NULL:
        return False
    # pages written before the rehash reads them: a fresh page read first maps the shared zero
    # page, and the first store then costs a copy-on-write fault and a TLB flush on every thread
    # (seen as a quarter of the time of a 2-thread mapping whose tables grew)
    touch_pages(new, 2 * cap * sizeof(uint64_t))
    rehash(p.slots, p.cap, new, cap)
    if p.own_slots:
        free(p.slots)
    p.slots = new
    p.cap = cap
    p.own_slots = True
    return True


cdef inline void probe(Part* p, const Entry* ent, Py_ssize_t n, int32_t* lids, const Seg* segs,
                       const Py_ssize_t* segblk) noexcept nogil:
    """Local ids (in order of first appearance within the partition) of its entries ``ent[:n]``
    (one run: one block's entries of this piece, taken in block order), written to
    ``lids[:n]``.  The entries are taken in stretches that cannot outgrow the table (each
    entry adds at most one label), so the probe loop (``probe_stretch``) never checks for
    growth; the table grows between stretches."""
    cdef Py_ssize_t j = 0, m, limit
    while j < n:
        limit = room(p)
        if p.count >= limit:
            if 3 * (p.count + 1) > 2 * p.cap and not grow_table(p):   # load factor <= 2/3
                p.failed = True
                return
            if p.count + 1 > p.ucap and not grow_ids(p):
                p.failed = True
                return
            continue
        m = limit - p.count
        if m > n - j:
            m = n - j
        p.count = probe_stretch(p.slots, <uint64_t>(p.cap - 1), p.count, ent + j, m, lids + j,
                                p.first, p.uptr, segs, segblk)
        j += m


cdef inline Py_ssize_t probe_stretch(uint64_t* tbl, uint64_t mask, Py_ssize_t count,
                                     const Entry* ent, Py_ssize_t n, int32_t* lids,
                                     int64_t* first, uint64_t* uptr, const Seg* segs,
                                     const Py_ssize_t* segblk) noexcept nogil:
    """The probes of ``ent[:n]`` into a table with room for ``n`` more labels; returns the
    label count after them.  Runs of labels of up to 8 bytes go through ``probe_short``
    (equal hash and length is equal label: a small loop that keeps its values in
    registers); a longer label is probed here, its bytes compared with its first occurrence."""
    cdef Py_ssize_t j = 0, lid
    cdef uint64_t h, w1, length, slot
    while True:
        j += probe_short(tbl, mask, &count, ent + j, n - j, lids + j, first)
        if j >= n:
            return count
        h = ent[j].h
        length = ent[j].length
        slot = h & mask
        while True:
            w1 = tbl[2 * slot + 1]
            if w1 == EMPTY:
                lid = count
                count = fill_slot(tbl, slot, h, length, lid, first, ent[j].row)
                uptr[lid] = <uint64_t>row_bytes(segs, segblk, ent[j].row)
                break
            if tbl[2 * slot] == h and (w1 >> 32) == length:
                lid = <Py_ssize_t>(w1 & 0xffffffffULL) - 1
                if memcmp(<const void*>uptr[lid], row_bytes(segs, segblk, ent[j].row),
                          length) == 0:
                    break
            slot = (slot + 1) & mask
        lids[j] = <int32_t>lid
        j += 1


cdef inline Py_ssize_t probe_short(uint64_t* tbl, uint64_t mask, Py_ssize_t* count_out,
                                   const Entry* ent, Py_ssize_t n, int32_t* lids,
                                   int64_t* first) noexcept nogil:
    """The probes of ``ent[:n]`` up to the first label of more than 8 bytes; returns the
    entries done and updates ``count_out``.  The slot of entry j + 16 is prefetched."""
    cdef Py_ssize_t j, lid, count = count_out[0], ahead = n - 16
    cdef uint64_t h, w1, length, slot
    for j in range(n):
        if j < ahead:
            prefetch(&tbl[2 * (ent[j + 16].h & mask)])
        h = ent[j].h
        length = ent[j].length
        if length > 8:
            count_out[0] = count
            return j
        slot = h & mask
        while True:
            w1 = tbl[2 * slot + 1]
            if w1 == EMPTY:
                lid = count
                count = fill_slot(tbl, slot, h, length, lid, first, ent[j].row)
                break
            if tbl[2 * slot] == h and (w1 >> 32) == length:
                lid = <Py_ssize_t>(w1 & 0xffffffffULL) - 1
                break
            slot = (slot + 1) & mask
        lids[j] = <int32_t>lid
    count_out[0] = count
    return n


cdef inline Py_ssize_t fill_slot(uint64_t* tbl, uint64_t slot, uint64_t h, uint64_t length,
                                 Py_ssize_t lid, int64_t* first, int64_t row) noexcept nogil:
    """Put new label ``lid`` (hash ``h``, ``length`` bytes, first seen at ``row``) into the
    empty ``slot``; returns the label count after it."""
    tbl[2 * slot] = h
    tbl[2 * slot + 1] = (length << 32) | <uint64_t>(lid + 1)
    first[lid] = row
    return lid + 1


cdef inline Py_ssize_t room(const Part* p) noexcept nogil:
    """The largest label count for which one more label needs neither a larger table (load
    factor <= 2/3: 3 * (count + 1) <= 2 * cap) nor larger id arrays (count + 1 <= ucap)."""
    cdef Py_ssize_t by_table = (2 * p.cap) // 3, by_ids = p.ucap
    return by_table if by_table < by_ids else by_ids


cdef inline void free_parts(Part* parts, Py_ssize_t n) noexcept nogil:
    """Free ``n`` partitions' own memory and the array of them."""
    cdef Py_ssize_t q
    if parts == NULL:
        return
    for q in range(n):
        if parts[q].own_slots:
            free(parts[q].slots)
        if parts[q].own_ids:
            free(parts[q].first)
            free(parts[q].uptr)
            free(parts[q].gid)
    free(parts)

