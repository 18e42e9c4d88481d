"""Borůvka's algorithm under the (weight, position) order, parallel with OpenMP.

Each round every component picks its lightest incident edge under the total order
(weight, position) -- an atomic compare-and-swap minimum, so the pick does not depend on which
thread offers first -- then the picks are hooked into stars, the components are renumbered in
increasing id order (contraction by relabelling), and the surviving edges (between different new
components) are compacted, keeping their position order.  Every step is either order-independent
or serial, so the forest and the labels are identical for every thread count.  The GIL is
released throughout.  Without OpenMP the same code runs serially.

Weights are compared through the tie rule's keys of their bits (``tie_rule.rank_key``), so the
kernel is compiled for two id widths and two key widths, whatever the weight dtype.

Files: ``boruvka.py`` holds the public function (checks, allocations, result); this compiled
module the kernel and a thin ``def`` for it and for the labelling.  The weight bits and the
per-component hints reach the ``def`` as bytes with their width (4 or 8), so that only the
kernel, not the ``def``, is specialised per key width.
"""
from cython.parallel cimport parallel, prange, threadid
from libc.stdint cimport int64_t, uint8_t, uint32_t, uint64_t
from libc.stdlib cimport free, malloc
from libc.string cimport memmove

from fastmst._kernels._atomics cimport cas64, load64, load_relaxed, store_relaxed, prefetch_w
from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.dsu cimport dsu_find, label_first_appearance
from fastmst._kernels.tie_rule cimport rank_key, ukey_t

# Bound on the rounds (never reached: see the comment on the round sizes in _boruvka).
cdef enum:
    MAX_ROUNDS = 128


cdef inline void _offer(int64_t* best, ukey_t* hint, Py_ssize_t c, int64_t i, ukey_t ki,
                        const ukey_t* bits, const int64_t* pos, int kind,
                        bint comp) noexcept nogil:
    """Atomically lower best[c] to edge index i (rule key ``ki``) when i comes first.

    Edges are compared by their rule keys (``tie_rule.rank_key`` of the weight bits, the
    ascending order of the rule) and then by index, which is position order.  ``hint[c]`` is
    the key of some edge that was best[c] at some moment; best[c] only comes earlier, so an
    edge whose key is above the hint is rejected without touching best[c] or gathering its
    weight (one random read instead of three dependent ones).
    """
    cdef int64_t cur
    cdef ukey_t kc = ki
    load_relaxed(&hint[c], &kc)
    if ki > kc:
        return
    cur = load64(&best[c])
    while True:
        if cur >= 0:
            kc = <ukey_t>rank_key(bits[pos[cur] if pos != NULL else cur], kind, comp)
            if ki > kc or (ki == kc and i > cur):
                return
        if cas64(&best[c], cur, i):
            store_relaxed(&hint[c], &ki)
            return
        cur = load64(&best[c])


cdef Py_ssize_t _boruvka(const index_t* tail, const index_t* head, const ukey_t* bits,
                         int kind, Py_ssize_t n, Py_ssize_t m, bint maximize, int threads,
                         ukey_t* hint, int64_t* out, index_t* final_label,
                         Py_ssize_t* n_final) noexcept nogil:
    """Parallel Borůvka.

    IN: tail, head, bits (the weight bits of m edges, of key kind ``kind``, read in place), n,
    maximize, threads.  SCRATCH: hint (n + 1 keys).
    OUT: out (accepted positions, returns how many), final_label (n: component of each node,
    numbered arbitrarily but deterministically), n_final (number of components).
    Returns -1 when memory runs out.
    """
    cdef Py_ssize_t nc = n, ne = m, r_off = 0, count = 0, nfin = 0, nnew = 0
    cdef Py_ssize_t c, d, i, k, t, lo, hi, level, nlev = 0
    cdef int64_t b
    cdef index_t* cu = <index_t*>tail
    cdef index_t* cv = <index_t*>head
    cdef int64_t* pos = NULL
    cdef index_t* ncu
    cdef index_t* ncv
    cdef int64_t* npos
    cdef index_t nu, nv
    # Round sizes: every component that still has an edge hooks onto another one, so each new
    # component joins at least two old ones and a round has at most half the components of the
    # one before.  Hence (a) the per-round maps of all rounds fit in n + n/2 + n/4 + ... < 2n
    # entries (the 64 extra are headroom, not needed by the bound), and (b) there are at most
    # log2(n) + 1 <= 64 rounds for any n < 2**63: the cap of MAX_ROUNDS (twice that) is never
    # reached, it only guards the fixed-size level arrays, which hold nlev + 1 entries.
    cdef Py_ssize_t cap = 2 * n + 64
    cdef int64_t* best = <int64_t*>malloc((n + 1) * sizeof(int64_t))
    cdef index_t* to = <index_t*>malloc((n + 1) * sizeof(index_t))
    cdef index_t* maps = <index_t*>malloc(cap * sizeof(index_t))
    cdef Py_ssize_t lev_off[MAX_ROUNDS + 1]
    cdef Py_ssize_t lev_n[MAX_ROUNDS + 1]
    cdef Py_ssize_t* chunk = <Py_ssize_t*>malloc((threads + 1) * sizeof(Py_ssize_t))
    cdef index_t* mp
    cdef index_t x
    cdef ukey_t key, worst = <ukey_t>(-1)   # the last key of the order
    cdef bint owned = False
    if best == NULL or to == NULL or maps == NULL or chunk == NULL:
        free(best); free(to); free(maps); free(chunk)
        return -1
    while True:
        # 1. lightest incident edge of every component (order-independent CAS minimum)
        for c in prange(nc, num_threads=threads, schedule="static"):
            best[c] = -1
            hint[c] = worst
        for i in prange(ne, num_threads=threads, schedule="static"):
            if i + 16 < ne:
                prefetch_w(&hint[cu[i + 16]])
                prefetch_w(&hint[cv[i + 16]])
            if cu[i] != cv[i]:
                key = <ukey_t>rank_key(bits[pos[i] if pos != NULL else i], kind, maximize)
                _offer(best, hint, cu[i], i, key, bits, pos, kind, maximize)
                _offer(best, hint, cv[i], i, key, bits, pos, kind, maximize)
        # 2. hook: c -> the other end of its pick; a mutual pair keeps the smaller id as root
        for c in range(nc):
            b = best[c]
            if b < 0:
                to[c] = <index_t>c
            else:
                to[c] = cv[b] if cu[b] == c else cu[b]
        for c in range(nc):
            d = to[c]
            if d != c and to[d] == c and c < d:
                to[c] = <index_t>c
        for c in range(nc):
            if to[c] != c:
                out[count] = pos[best[c]] if pos != NULL else best[c]
                count += 1
        # 3. roots (path compression on the hook forest) and new ids in increasing root order
        mp = maps + r_off
        nnew = 0
        for c in range(nc):
            if to[c] == c:
                if best[c] < 0:
                    mp[c] = <index_t>(-(nfin + 1))   # no edges left: a finished component
                    nfin += 1
                else:
                    mp[c] = <index_t>nnew
                    nnew += 1
        for c in range(nc):
            mp[c] = mp[dsu_find(to, <index_t>c)]
        lev_off[nlev] = r_off
        lev_n[nlev] = nc
        nlev += 1
        r_off += nc
        # 4. compact the surviving edges (between different new components), in order
        for t in prange(threads, num_threads=threads, schedule="static"):
            lo = ne * t // threads
            hi = ne * (t + 1) // threads
            k = 0
            for i in range(lo, hi):
                if cu[i] != cv[i] and mp[cu[i]] != mp[cv[i]]:
                    k = k + 1
            chunk[t + 1] = k
        chunk[0] = 0
        for t in range(threads):
            chunk[t + 1] += chunk[t]
        k = chunk[threads]
        if k == 0 or nnew == 0 or nlev >= MAX_ROUNDS:
            break
        if not owned:
            ncu = <index_t*>malloc(k * sizeof(index_t))
            ncv = <index_t*>malloc(k * sizeof(index_t))
            npos = <int64_t*>malloc(k * sizeof(int64_t))
            if ncu == NULL or ncv == NULL or npos == NULL:
                free(ncu); free(ncv); free(npos); free(best); free(to); free(maps); free(chunk)
                return -1
        else:
            ncu = cu
            ncv = cv
            npos = pos
        for t in prange(threads, num_threads=threads, schedule="static"):
            lo = ne * t // threads
            hi = ne * (t + 1) // threads
            # owned arrays compact in place inside the thread's own slice first
            d = chunk[t] if not owned else lo
            for i in range(lo, hi):
                if cu[i] != cv[i]:
                    nu = mp[cu[i]]
                    nv = mp[cv[i]]
                    if nu != nv:
                        ncu[d] = nu
                        ncv[d] = nv
                        npos[d] = (pos[i] if pos != NULL else i)
                        d = d + 1
        if owned:
            for t in range(1, threads):
                lo = ne * t // threads
                hi = chunk[t + 1] - chunk[t]
                if hi > 0 and lo != chunk[t]:
                    memmove(ncu + chunk[t], ncu + lo, hi * sizeof(index_t))
                    memmove(ncv + chunk[t], ncv + lo, hi * sizeof(index_t))
                    memmove(npos + chunk[t], npos + lo, hi * sizeof(int64_t))
        cu = ncu
        cv = ncv
        pos = npos
        owned = True
        ne = k
        nc = nnew
    # components still open after the last round are finished now
    for c in range(nnew):
        maps[r_off + c] = <index_t>(-(nfin + 1))
        nfin += 1
    lev_off[nlev] = r_off
    lev_n[nlev] = nnew
    # compose the per-round maps backwards into final ids
    mp = maps + r_off
    for c in range(nnew):
        mp[c] = -(mp[c] + 1)
    level = nlev - 1
    while level >= 0:
        mp = maps + lev_off[level]
        for c in prange(lev_n[level], num_threads=threads, schedule="static"):
            x = mp[c]
            if x < 0:
                mp[c] = -(x + 1)
            else:
                mp[c] = maps[lev_off[level + 1] + x]
        level -= 1
    for i in prange(n, num_threads=threads, schedule="static"):
        final_label[i] = maps[i]
    n_final[0] = nfin
    if owned:
        free(cu); free(cv); free(pos)
    free(best); free(to); free(maps); free(chunk)
    return count


def boruvka_rounds(const index_t[::1] tail, const index_t[::1] head, const uint8_t[::1] bits,
                   int width, int kind, bint maximize, int threads, uint8_t[::1] hint,
                   int64_t[::1] out, index_t[::1] final_label, Py_ssize_t[::1] n_final):
    """Borůvka rounds over ``m`` edges and ``n = final_label.shape[0]`` nodes (``_boruvka``).

    ``bits``: the weight bits as bytes, ``width`` (4 or 8) per edge, of key kind ``kind``.
    SCRATCH: ``hint`` (n + 1 keys of that width).  OUT: ``out`` (n - 1 positions; returns how
    many), ``final_label`` (n), ``n_final[0]`` (the number of components).  Returns -1 when
    memory runs out.  Needs m >= 1 and n >= 2.
    """
    cdef Py_ssize_t m = tail.shape[0], n = final_label.shape[0], count
    if width != 4 and width != 8:
        raise ValueError(f"boruvka_rounds: the weight bits must be 4 or 8 bytes wide, "
                         f"received {width}.")
    if (m < 1 or n < 2 or head.shape[0] != m or bits.shape[0] != m * width
            or hint.shape[0] != (n + 1) * width or out.shape[0] != n - 1
            or n_final.shape[0] != 1):
        raise ValueError(f"boruvka_rounds: {m} >= 1 edges and {n} >= 2 nodes need {m} heads, "
                         f"{m * width} bytes of weight bits, {(n + 1) * width} bytes of hints, "
                         f"{n - 1} output slots and one count; received {head.shape[0]}, "
                         f"{bits.shape[0]}, {hint.shape[0]}, {out.shape[0]} and "
                         f"{n_final.shape[0]}.")
    with nogil:
        if width == 4:
            count = _boruvka(&tail[0], &head[0], <const uint32_t*>&bits[0], kind, n, m,
                             maximize, threads, <uint32_t*>&hint[0], &out[0], &final_label[0],
                             &n_final[0])
        else:
            count = _boruvka(&tail[0], &head[0], <const uint64_t*>&bits[0], kind, n, m,
                             maximize, threads, <uint64_t*>&hint[0], &out[0], &final_label[0],
                             &n_final[0])
    return count


def first_appearance(const index_t[::1] ids, int64_t[::1] table, int64_t[::1] out):
    """OUT: ``out[i]``, the number of ``ids[i]`` in order of first appearance (0, 1, ...).
    SCRATCH: ``table``, all -1, one entry per possible id (ids in [0, table.shape[0]), the
    caller's to ensure).  Returns the number of distinct ids."""
    cdef Py_ssize_t n = ids.shape[0]
    cdef int64_t k = 0
    if out.shape[0] != n:
        raise ValueError(f"first_appearance: {n} ids need {n} output entries, received "
                         f"{out.shape[0]}.")
    if n:
        with nogil:
            k = label_first_appearance(&ids[0], n, &table[0], &out[0])
    return k
