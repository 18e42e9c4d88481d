"""The tie rule: the one total order of edges that every method, kernel and tool follows.

The rule
--------
Edges are ordered by weight ascending (descending for a maximum forest, ``maximize=True``),
and edges of equal weight by input position, earlier first.  ``-0.0`` and ``+0.0`` are equal
weights (IEEE 754), so they tie and fall back to position order.  NaN is not a weight
(validation rejects it).  Every edge has a distinct (weight, position) pair, so the order is
total and the minimum spanning forest under it is unique.

Keys
----
The kernels compare weights through an order-preserving unsigned key of the weight's bits,
for each kernel dtype (float32/float64, int32/int64, uint32/uint64):

* unsigned integers are their own key;
* signed integers flip the sign bit (two's complement order becomes unsigned order);
* IEEE floats: ``-0.0`` is first replaced by ``+0.0``; a non-negative float sets the sign bit,
  a negative one has all bits complemented, which orders negative floats (and ``-inf``) below
  positive ones.

A maximum forest complements every key within its width (descending weight becomes ascending
key) instead of negating a copy of the weights; the position order of ties is unchanged.  The
map is inverted exactly by ``weights_from_keys`` (and ``bits_of`` in ``tie_rule.pxd``), except
that ``-0.0`` comes back as ``+0.0``: both have one key.

This module owns the key map (``weight_keys``; inline ``key_of``/``rank_key`` in the .pxd),
its inverse, ``key_range``, the rule order (``edge_order``, ``sort_positions``) and the
"is rule-sorted" check (``first_unsorted``); ``weight_bits`` is the precondition check of
every kernel that reads weights as bits.
"""
import numpy as np
from libc.stdint cimport uint32_t, uint64_t

from fastmst._kernels import radix


#: The weight dtypes the kernels read in place (native byte order).
KERNEL_DTYPES = frozenset([np.dtype(t) for t in (np.float32, np.float64, np.int32, np.int64,
                                                 np.uint32, np.uint64)])


def key_kind(dtype):
    """``(kind, ubits)`` of a kernel weight dtype: the key kind code (KIND_UNSIGNED,
    KIND_SIGNED or KIND_FLOAT) and the unsigned dtype of the same width that views its bits."""
    dtype = np.dtype(dtype)
    if dtype.newbyteorder("=") not in KERNEL_DTYPES:
        raise TypeError(f"tie_rule: weight dtype {dtype} is not a kernel dtype; expected one of "
                        f"float32, float64, int32, int64, uint32, uint64 (validation widens the "
                        f"others).")
    if dtype.kind == "f":
        kind = KIND_FLOAT
    elif dtype.kind == "i":
        kind = KIND_SIGNED
    else:
        kind = KIND_UNSIGNED
    return kind, (np.uint32 if dtype.itemsize == 4 else np.uint64)


def weight_bits(weight, Py_ssize_t n_edges=-1, str func="kernel"):
    """The precondition check of a kernel that reads weights as bits.

    Parameters
    ----------
    weight : ndarray of shape (E,)
        Weights in a kernel dtype, native byte order, C-contiguous.
    n_edges : int
        The expected length E (the length of the endpoint arrays); -1 skips the check.
    func : str
        The kernel's name, for the messages.

    Returns
    -------
    bits : ndarray of shape (E,), dtype=uint32 or uint64
        A view of the weight bits (no copy).
    kind : int
        The key kind of the dtype.

    Raises
    ------
    TypeError
        ``weight`` is not an ndarray, or its dtype is not a kernel dtype.
    ValueError
        Not 1-D, of the wrong length, byte-swapped or not contiguous: viewing such an array as
        bits would give other keys, and so a different forest.
    """
    if not isinstance(weight, np.ndarray):
        raise TypeError(f"{func}: weight must be a NumPy array, received "
                        f"{type(weight).__name__}; pass the validated weights.")
    kind, ubits = key_kind(weight.dtype)
    if weight.ndim != 1:
        raise ValueError(f"{func}: weight must be 1-D, received shape {weight.shape}.")
    if n_edges >= 0 and weight.shape[0] != n_edges:
        raise ValueError(f"{func}: weight has {weight.shape[0]} entries but there are {n_edges} "
                         f"edges; pass one weight per edge.")
    if not weight.dtype.isnative:
        raise ValueError(f"{func}: weight has non-native byte order (dtype {weight.dtype.str}); "
                         f"convert with weight.astype(weight.dtype.newbyteorder('=')).")
    if not weight.flags.c_contiguous:
        raise ValueError(f"{func}: weight must be contiguous, received a strided view; pass "
                         f"np.ascontiguousarray(weight).")
    return weight.view(ubits), kind


cdef void _fill_keys(const ukey_t[::1] bits, int kind, bint complement,
                     uint64_t[::1] out) noexcept nogil:
    cdef Py_ssize_t i
    for i in range(bits.shape[0]):
        out[i] = rank_key(bits[i], kind, complement)


def weight_keys(weight, bint maximize=False):
    """The order-preserving keys of weights (complemented when ``maximize``).

    ``weight`` as for ``weight_bits``.  Returns an ndarray of shape (E,), dtype=uint64, whose
    unsigned order is the rule's weight order (``-0.0`` and ``+0.0`` have one key).
    """
    bits, kind = weight_bits(weight, -1, "weight_keys")
    out = np.empty(bits.shape[0], dtype=np.uint64)
    cdef uint64_t[::1] o = out
    cdef const uint32_t[::1] b32
    cdef const uint64_t[::1] b64
    cdef int k = kind
    if bits.dtype == np.uint32:
        b32 = bits
        with nogil:
            _fill_keys(b32, k, maximize, o)
    else:
        b64 = bits
        with nogil:
            _fill_keys(b64, k, maximize, o)
    return out


def weights_from_keys(uint64_t[::1] keys, dtype, bint maximize=False, uint64_t kmin=0,
                      source=None, positions=None):
    """Inverse of ``weight_keys``: keys back to weights of ``dtype``, bit for bit.

    Parameters
    ----------
    keys : ndarray of shape (F,), dtype=uint64
        Keys minus ``kmin`` (as the radix records hold them).  IN/OUT: overwritten by the weight
        bits (no copy is made; pass a copy to keep them).
    dtype : a kernel weight dtype
    maximize : bool
        The keys are complemented (as ``weight_keys(..., maximize=True)`` made them).
    kmin : int
    source, positions : ndarray, optional
        ``-0.0`` and ``+0.0`` share one key, so a zero comes back as ``+0.0``; given the input
        weights ``source`` and the positions the keys came from, zeros are re-read from
        ``source[positions]`` instead, which keeps the sign of ``-0.0``.

    Returns
    -------
    weights : ndarray of shape (F,), dtype=dtype (native byte order)
    """
    kind, ubits = key_kind(dtype)
    cdef int code = kind
    cdef int width = 8 * np.dtype(ubits).itemsize
    cdef Py_ssize_t n = keys.shape[0]
    if n:
        with nogil:
            keys_to_bits(&keys[0], n, code, maximize, kmin, width)
    out = np.asarray(keys)
    if width == 32:
        out = out.astype(np.uint32)
    out = out.view(np.dtype(dtype).newbyteorder("="))
    if source is not None and out.dtype.kind == "f" and n:
        zero = np.flatnonzero(out == 0)
        if zero.shape[0]:
            out[zero] = np.take(source, np.asarray(positions)[zero])  # keeps the sign of -0.0
    return out


def key_range(weight, bint maximize):
    """``(kmin, top_bits)`` of validated weights (one min/max pass): the smallest key, and the
    number of significant bits of the composite ``(key - kmin) * 2**32 + position`` that the
    radix records sort by."""
    cdef Py_ssize_t m = weight.shape[0]
    if m == 0:
        raise ValueError("key_range: needs at least one weight.")
    ext = np.array([weight.min(), weight.max()], dtype=weight.dtype)
    kmin, kmax = sorted(weight_keys(ext, maximize).tolist())
    span = kmax - kmin
    top_bits = 32 + span.bit_length() if span > 0 else max(1, (m - 1).bit_length())
    return kmin, top_bits


cdef Py_ssize_t _first_unsorted(const ukey_t[::1] bits, int kind, bint descending) noexcept nogil:
    cdef Py_ssize_t i
    cdef uint64_t k, prev = rank_key(bits[0], kind, descending)
    for i in range(1, bits.shape[0]):
        k = rank_key(bits[i], kind, descending)
        if k < prev:
            return i
        prev = k
    return -1


def first_unsorted(weight, bint descending=False):
    """Position of the first weight that breaks the rule order, or -1 when it holds.

    Weights in position order are rule-sorted exactly when their keys are non-decreasing:
    the weights non-decreasing (non-increasing with ``descending``), ``-0.0`` and ``+0.0``
    tied.

    Parameters
    ----------
    weight : ndarray of shape (E,)
        Validated weights, as for ``weight_bits``.
    descending : bool
        Check non-increasing instead of non-decreasing order.
    """
    bits, kind = weight_bits(weight, -1, "first_unsorted")
    cdef const uint32_t[::1] b32
    cdef const uint64_t[::1] b64
    cdef int code = kind
    cdef Py_ssize_t i = -1
    if bits.shape[0] < 2:
        return -1
    if bits.dtype == np.uint32:
        b32 = bits
        with nogil:
            i = _first_unsorted(b32, code, descending)
    else:
        b64 = bits
        with nogil:
            i = _first_unsorted(b64, code, descending)
    return i


def edge_order(weight, bint descending=False, int threads=1):
    """Positions sorted by the rule: (weight, position); weight descending when ``descending``.

    ``weight`` holds no NaN.  Kernel dtypes are radix sorted (non-contiguous or byte-swapped
    input is copied first); other dtypes, and more than 2**32 - 1 edges, use the stable NumPy
    sort.  The result does not depend on ``threads``.

    Returns
    -------
    order : ndarray of shape (E,), dtype=int64
    """
    weight = np.asarray(weight)
    cdef Py_ssize_t m = weight.shape[0]
    if weight.dtype.newbyteorder("=") in KERNEL_DTYPES:
        weight = np.ascontiguousarray(weight, dtype=weight.dtype.newbyteorder("="))
    if m >= radix.MAX_RECORDS or weight.dtype not in KERNEL_DTYPES:
        w = weight + 0 if weight.dtype.kind == "f" else weight  # -0.0 + 0 is +0.0
        if not descending:
            return np.argsort(w, kind="stable").astype(np.int64, copy=False)
        rev = np.argsort(w[::-1], kind="stable").astype(np.int64, copy=False)
        return (m - 1 - rev)[::-1].copy()
    if m < 2:
        return np.arange(m, dtype=np.int64)
    bits, kind = weight_bits(weight, m, "edge_order")
    kmin, top_bits = key_range(weight, descending)
    raw, bounds, shift = radix.split_records(bits, kind, descending, kmin, top_bits, threads)
    radix.sort_buckets(raw, bounds, shift, 0, 2048, threads)
    return raw.view(radix.RECORD_DTYPE)["pos"].astype(np.int64)


def sort_positions(positions, weight, bint maximize=False):
    """Distinct ``positions`` reordered by the rule (weights ``weight[positions]``).

    No sort when they already are in rule order (as the edges of a SpanningForest are).

    Returns
    -------
    order : ndarray of shape (len(positions),), dtype=int64
    """
    positions = np.asarray(positions)
    cdef Py_ssize_t n = positions.shape[0]
    if n > 1:
        w = weight[positions]
        ahead = (w[1:] < w[:n - 1]) if maximize else (w[1:] > w[:n - 1])
        if np.all(ahead | ((w[1:] == w[:n - 1]) & (positions[1:] > positions[:n - 1]))):
            return positions.astype(np.int64, copy=False)
    pos = np.sort(positions).astype(np.int64, copy=False)
    if pos.size == 0:
        return pos
    return pos[edge_order(weight[pos], maximize)]
