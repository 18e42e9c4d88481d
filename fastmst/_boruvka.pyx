"""Borůvka's algorithm under the (weight, position) order."""
import numpy as np
cimport numpy as cnp
from libc.stdint cimport int32_t, int64_t, uint8_t

from fastmst._typedefs cimport index_t, weight_t
from fastmst._dsu cimport dsu_find, dsu_link

cnp.import_array()


cdef Py_ssize_t _boruvka(const index_t[::1] tail, const index_t[::1] head,
                         const weight_t[::1] weight, bint maximize,
                         index_t[::1] parent, uint8_t[::1] rank, int64_t[::1] best,
                         int64_t[::1] alive, int64_t[::1] out) noexcept nogil:
    """Serial Borůvka rounds.

    IN: tail, head, weight, maximize.  SCRATCH: best (per root, -1 when empty), alive.
    OUT: parent/rank (final components), out (accepted positions); returns how many.
    Edges in ``alive`` stay in increasing position, so a later candidate of equal weight never
    replaces an earlier one: that is the position tie rule.
    """
    cdef Py_ssize_t n = parent.shape[0]
    cdef Py_ssize_t m = tail.shape[0]
    cdef Py_ssize_t i, k, n_alive = m, count = 0, merged
    cdef int64_t e, b
    cdef index_t ru, rv, v
    for i in range(m):
        alive[i] = i
    while n_alive > 0:
        k = 0
        for i in range(n_alive):
            e = alive[i]
            ru = dsu_find(&parent[0], tail[e])
            rv = dsu_find(&parent[0], head[e])
            if ru == rv:
                continue
            alive[k] = e
            k += 1
            b = best[ru]
            if b < 0 or (weight[e] > weight[b] if maximize else weight[e] < weight[b]):
                best[ru] = e
            b = best[rv]
            if b < 0 or (weight[e] > weight[b] if maximize else weight[e] < weight[b]):
                best[rv] = e
        n_alive = k
        merged = 0
        for i in range(n):
            e = best[i]
            if e < 0:
                continue
            best[i] = -1
            ru = dsu_find(&parent[0], tail[e])
            rv = dsu_find(&parent[0], head[e])
            if ru != rv:
                dsu_link(&parent[0], &rank[0], ru, rv)
                out[count] = e
                count += 1
                merged += 1
        if merged == 0:
            break
    return count


def boruvka(const index_t[::1] tail, const index_t[::1] head, const weight_t[::1] weight,
            Py_ssize_t n_nodes, bint maximize=False):
    """Minimum (or maximum) spanning forest by Borůvka rounds.

    Returns
    -------
    edges : ndarray of shape (F,), dtype=int64
        Accepted positions, in round order (the caller sorts them).
    parent : ndarray of shape (n_nodes,)
        Union-find parents of the final forest.
    """
    dtype = np.int32 if index_t is int32_t else np.int64
    parent = np.arange(n_nodes, dtype=dtype)
    rank = np.zeros(n_nodes, dtype=np.uint8)
    best = np.full(n_nodes, -1, dtype=np.int64)
    alive = np.empty(tail.shape[0], dtype=np.int64)
    out = np.empty(max(0, n_nodes - 1), dtype=np.int64)
    cdef index_t[::1] p = parent
    cdef uint8_t[::1] r = rank
    cdef int64_t[::1] bst = best
    cdef int64_t[::1] alv = alive
    cdef int64_t[::1] o = out
    cdef Py_ssize_t count = 0
    if n_nodes > 1 and tail.shape[0] > 0:
        with nogil:
            count = _boruvka(tail, head, weight, maximize, p, r, bst, alv, o)
    return out[:count], parent
