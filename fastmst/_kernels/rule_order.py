"""The Python face of the tie rule: keys of weight arrays, their inverse and the rule order.

The rule itself -- edges by (weight, input position), weight descending for a maximum forest,
``-0.0 == +0.0``, compared through an order-preserving unsigned key of the weight bits -- is
defined in ``fastmst/_kernels/tie_rule.pyx`` (module docstring) and ``tie_rule.pxd`` (the
inline key map and its inverse that the kernels cimport).  This module holds the Python half:
dtype choices, NumPy checks and allocations, around the thin compiled defs of ``tie_rule``
(``fill_keys32/64``, ``first_unsorted32/64``, ``keys_to_weight_bits``):

* ``KERNEL_DTYPES``, ``key_kind``: the weight dtypes the kernels read in place, and their key
  kind;
* ``weight_bits``: the precondition check of every kernel that reads weights as bits;
* ``weight_keys`` and its inverse ``weights_from_keys``; ``key_range``;
* ``first_unsorted`` (is rule-sorted), ``edge_order`` and ``sort_positions`` (the rule order).
"""
import operator

import numpy as np

from fastmst._kernels import radix, records, tie_rule

__all__ = ["KERNEL_DTYPES", "key_kind", "weight_bits", "weight_keys", "weights_from_keys",
           "key_range", "first_unsorted", "edge_order", "sort_positions"]

#: The weight dtypes the kernels read in place (native byte order).
KERNEL_DTYPES = frozenset([np.dtype(t) for t in (np.float32, np.float64, np.int32, np.int64,
                                                 np.uint32, np.uint64)])

# Native kernel dtype -> (key kind code, unsigned dtype of its bits); the codes are the enum of
# tie_rule.pxd (tie_rule.KEY_KINDS).
_KINDS = {d: (tie_rule.KEY_KINDS[d.kind], np.dtype(np.uint32 if d.itemsize == 4 else np.uint64))
          for d in KERNEL_DTYPES}
_U32 = np.dtype(np.uint32)


def key_kind(dtype):
    """``(kind, ubits)`` of a kernel weight dtype: the key kind code (KIND_UNSIGNED,
    KIND_SIGNED or KIND_FLOAT of tie_rule.pxd) and the unsigned dtype of the same width that
    views its bits."""
    dtype = np.dtype(dtype)
    found = _KINDS.get(dtype.newbyteorder("="))
    if found is None:
        raise TypeError(f"tie_rule: weight dtype {dtype} is not a kernel dtype; expected one of "
                        f"float32, float64, int32, int64, uint32, uint64 (validation widens the "
                        f"others).")
    kind, ubits = found
    return kind, (np.uint32 if ubits == _U32 else np.uint64)


def weight_bits(weight, n_edges=-1, func="kernel"):
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
    dtype = weight.dtype
    found = _KINDS.get(dtype)
    if found is None:      # byte-swapped (refused below) or not a kernel dtype (TypeError)
        kind, ubits = key_kind(dtype)
    else:
        kind, ubits = found
    if weight.ndim != 1:
        raise ValueError(f"{func}: weight must be 1-D, received shape {weight.shape}.")
    if n_edges >= 0 and weight.shape[0] != n_edges:
        raise ValueError(f"{func}: weight has {weight.shape[0]} entries but there are {n_edges} "
                         f"edges; pass one weight per edge.")
    if not dtype.isnative:
        raise ValueError(f"{func}: weight has non-native byte order (dtype {dtype.str}); "
                         f"convert with weight.astype(weight.dtype.newbyteorder('=')).")
    if not weight.flags.c_contiguous:
        raise ValueError(f"{func}: weight must be contiguous, received a strided view; pass "
                         f"np.ascontiguousarray(weight).")
    return weight.view(ubits), kind


def _bits_kernels(bits):
    """The thin compiled defs for the width of ``bits`` (uint32 or uint64)."""
    if bits.dtype == _U32:
        return tie_rule.fill_keys32, tie_rule.first_unsorted32
    return tie_rule.fill_keys64, tie_rule.first_unsorted64


def weight_keys(weight, maximize=False):
    """The order-preserving keys of weights (complemented when ``maximize``).

    ``weight`` as for ``weight_bits``.  Returns an ndarray of shape (E,), dtype=uint64, whose
    unsigned order is the rule's weight order (``-0.0`` and ``+0.0`` have one key).
    """
    bits, kind = weight_bits(weight, -1, "weight_keys")
    out = np.empty(bits.shape[0], dtype=np.uint64)
    _bits_kernels(bits)[0](bits, kind, maximize, out)
    return out


def weights_from_keys(keys, dtype, maximize=False, kmin=0, source=None, positions=None):
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
    width = 32 if ubits is np.uint32 else 64
    out = np.asarray(keys)
    tie_rule.keys_to_weight_bits(out, kind, maximize, kmin, width)
    if width == 32:
        out = out.astype(np.uint32)
    out = out.view(np.dtype(dtype).newbyteorder("="))
    if source is not None and out.dtype.kind == "f" and out.shape[0]:
        zero = np.flatnonzero(out == 0)
        if zero.shape[0]:
            out[zero] = np.take(source, np.asarray(positions)[zero])  # keeps the sign of -0.0
    return out


def key_range(weight, maximize):
    """``(kmin, top_bits)`` of validated weights (one min/max pass): the smallest key, and the
    number of significant bits of the composite ``(key - kmin) * 2**32 + position`` that the
    radix records sort by."""
    m = weight.shape[0]
    if m == 0:
        raise ValueError("key_range: needs at least one weight.")
    ext = np.empty(2, dtype=weight.dtype)
    ext[0] = np.minimum.reduce(weight)
    ext[1] = np.maximum.reduce(weight)
    found = _KINDS.get(ext.dtype)
    if found is None:
        keys = weight_keys(ext, maximize)    # refuses what is not a native kernel dtype
    else:
        keys = np.empty(2, dtype=np.uint64)
        fill = tie_rule.fill_keys32 if found[1] == _U32 else tie_rule.fill_keys64
        fill(ext.view(found[1]), found[0], maximize, keys)
    kmin, kmax = sorted(keys.tolist())
    span = kmax - kmin
    top_bits = 32 + span.bit_length() if span > 0 else max(1, (m - 1).bit_length())
    return kmin, top_bits


def first_unsorted(weight, descending=False):
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
    return _bits_kernels(bits)[1](bits, kind, descending)


def edge_order(weight, descending=False, threads=1):
    """Positions sorted by the rule: (weight, position); weight descending when ``descending``.

    ``weight`` holds no NaN.  Kernel dtypes are radix sorted (non-contiguous or byte-swapped
    input is copied first); other dtypes, and more than 2**32 - 1 edges, use the stable NumPy
    sort.  The result does not depend on ``threads``.

    Returns
    -------
    order : ndarray of shape (E,), dtype=int64
    """
    weight = np.asarray(weight)
    threads = operator.index(threads)
    m = weight.shape[0]
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
    raw, bounds, shift = records.split_records(bits, kind, descending, kmin, top_bits, threads)
    radix.sort_buckets(raw, bounds, shift, 0, 2048, threads)
    return raw.view(radix.RECORD_DTYPE)["pos"].astype(np.int64)


def sort_positions(positions, weight, maximize=False):
    """Distinct ``positions`` reordered by the rule (weights ``weight[positions]``).

    No sort when they already are in rule order (as the edges of a SpanningForest are).

    Returns
    -------
    order : ndarray of shape (len(positions),), dtype=int64
    """
    positions = np.asarray(positions)
    n = positions.shape[0]
    if n > 1:
        w = weight[positions]
        ahead = (w[1:] < w[:n - 1]) if maximize else (w[1:] > w[:n - 1])
        if np.all(ahead | ((w[1:] == w[:n - 1]) & (positions[1:] > positions[:n - 1]))):
            return positions.astype(np.int64, copy=False)
    pos = np.sort(positions).astype(np.int64, copy=False)
    if pos.size == 0:
        return pos
    return pos[edge_order(weight[pos], maximize)]
