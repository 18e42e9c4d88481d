"""Disjoint sets (union-find, union by rank, true path compression): the thin compiled defs.

The union-find itself is ``dsu.pxd`` (inline, cimported by the kernels).  The Python face --
the ``DisjointSet`` class, ``labels_from_parent`` and ``first_appearance``, with their checks,
dtype choices and allocations -- is ``fastmst/_kernels/disjoint_set.py``.  This module keeps the
typed defs it calls, one per parent dtype (int32 below 2**31 elements, int64 beyond):
``find_int32/64``, ``union_pairs_int32/64``, ``label_parents_int32/64``, and ``label_ids``.
They check that the array lengths agree; the element ids must be in range (the Python face
checks them).
"""
from libc.stdint cimport int32_t, int64_t, uint8_t

from fastmst._kernels._typedefs cimport index_t
from fastmst._kernels.dsu cimport dsu_find, dsu_link, label_first_appearance


cdef index_t _find_grow(index_t* parent, int64_t* size, uint8_t* rank,
                        index_t a, index_t b, bint* merged) noexcept nogil:
    cdef index_t ra = dsu_find(parent, a)
    cdef index_t rb = dsu_find(parent, b)
    cdef index_t r
    if ra == rb:
        merged[0] = False
        return ra
    r = dsu_link(parent, rank, ra, rb)
    size[r] = size[ra] + size[rb]
    merged[0] = True
    return r


cdef Py_ssize_t _union_pairs(index_t[::1] parent, uint8_t[::1] rank, int64_t[::1] size,
                             const int64_t[::1] a, const int64_t[::1] b,
                             uint8_t[::1] out) noexcept nogil:
    cdef Py_ssize_t i, merges = 0
    cdef bint merged = False
    for i in range(a.shape[0]):
        _find_grow(&parent[0], &size[0], &rank[0], <index_t>a[i], <index_t>b[i], &merged)
        out[i] = merged
        merges += merged
    return merges


cdef int64_t _labels_from_parent(index_t[::1] parent, int64_t[::1] table,
                                 int64_t[::1] out) noexcept nogil:
    cdef Py_ssize_t i, n = parent.shape[0]
    for i in range(n):
        dsu_find(&parent[0], <index_t>i)       # afterwards parent[i] is the root of i
    return label_first_appearance(&parent[0], n, &table[0], &out[0])


cdef int _check_lengths(str func, Py_ssize_t n, Py_ssize_t n1, Py_ssize_t n2) except -1:
    if n1 != n or n2 != n:
        raise ValueError(f"{func}: the arrays must have one length, received {n}, {n1} and "
                         f"{n2}; pass arrays allocated for the same elements.")
    return 0


cdef int _check_element(Py_ssize_t x, Py_ssize_t n) except -1:
    if not 0 <= x < n:
        raise ValueError(f"find: x={x} is out of range; expected 0 <= x < {n}.")
    return 0


def find_int32(int32_t[::1] parent, Py_ssize_t x):
    """Root of ``x`` in an int32 parent array; compresses the path (``0 <= x < len(parent)``)."""
    _check_element(x, parent.shape[0])
    return dsu_find(&parent[0], <int32_t>x)


def find_int64(int64_t[::1] parent, Py_ssize_t x):
    """As ``find_int32`` for an int64 parent array."""
    _check_element(x, parent.shape[0])
    return dsu_find(&parent[0], <int64_t>x)


cdef Py_ssize_t _union_checked(index_t[::1] parent, uint8_t[::1] rank, int64_t[::1] size,
                               const int64_t[::1] a, const int64_t[::1] b,
                               uint8_t[::1] out) except -1:
    """``union_pairs_int32/64``: the length checks, then ``_union_pairs`` without the GIL."""
    cdef Py_ssize_t merges = 0
    _check_lengths("union_pairs", parent.shape[0], rank.shape[0], size.shape[0])
    _check_lengths("union_pairs", a.shape[0], b.shape[0], out.shape[0])
    if a.shape[0]:
        with nogil:
            merges = _union_pairs(parent, rank, size, a, b, out)
    return merges


cdef int64_t _labels_checked(index_t[::1] parent, int64_t[::1] table,
                             int64_t[::1] out) except -1:
    """``label_parents_int32/64``: the length check, then ``_labels_from_parent`` without the
    GIL."""
    cdef int64_t k = 0
    _check_lengths("labels_from_parent", parent.shape[0], table.shape[0], out.shape[0])
    if parent.shape[0]:
        with nogil:
            k = _labels_from_parent(parent, table, out)
    return k


def union_pairs_int32(int32_t[::1] parent, uint8_t[::1] rank, int64_t[::1] size,
                      const int64_t[::1] a, const int64_t[::1] b, uint8_t[::1] out):
    """Union the pairs ``(a[i], b[i])`` in order (ids in [0, len(parent)), checked by the
    caller); OUT: ``out[i]`` 1 when pair i merged two sets.  Returns the number of merges."""
    return _union_checked(parent, rank, size, a, b, out)


def union_pairs_int64(int64_t[::1] parent, uint8_t[::1] rank, int64_t[::1] size,
                      const int64_t[::1] a, const int64_t[::1] b, uint8_t[::1] out):
    """As ``union_pairs_int32`` for an int64 parent array."""
    return _union_checked(parent, rank, size, a, b, out)


def label_parents_int32(int32_t[::1] parent, int64_t[::1] table, int64_t[::1] out):
    """OUT: ``out``, the component ids of an int32 parent array (compressed in place) by first
    appearance.  SCRATCH: ``table``, all -1.  Returns the number of components."""
    return _labels_checked(parent, table, out)


def label_parents_int64(int64_t[::1] parent, int64_t[::1] table, int64_t[::1] out):
    """As ``label_parents_int32`` for an int64 parent array."""
    return _labels_checked(parent, table, out)


def label_ids(const int64_t[::1] ids, int64_t[::1] table, int64_t[::1] out):
    """OUT: ``out[i]``, the number of ``ids[i]`` among the distinct ids in order of first
    appearance.  SCRATCH: ``table``, all -1, one entry per possible id (ids in
    [0, len(table)), checked by the caller).  Returns the number of distinct ids."""
    cdef int64_t k = 0
    _check_lengths("first_appearance", ids.shape[0], out.shape[0], out.shape[0])
    if ids.shape[0]:
        with nogil:
            k = label_first_appearance(&ids[0], ids.shape[0], &table[0], &out[0])
    return k
