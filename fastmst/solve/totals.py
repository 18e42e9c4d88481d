"""Total weights: the exact sum of weights rounded once to a Python float, for every valid input.

One home for every sum of weights in the package (``SpanningForest.weight``, ``required_excess``,
``check_forest``'s ``excess``, ``steiner_tree``'s ``weight``).  Nothing here raises on valid
weights (any mixture of finite values, +inf and -inf, any integer dtype):

* +inf together with -inf gives NaN (IEEE 754: inf - inf); one kind of infinity gives it;
* finite float weights: ``math.fsum``, which is exact and rounds once, unless a partial sum
  overflows float64; then the exact sum is formed on integers (each float is an integer
  multiple of 2**-1126 once split by ``np.frexp``) and rounded once by Python's correctly
  rounded integer division; a result beyond the float64 range is +-inf;
* integer weights: summed exactly as integers (64-bit values split into 32-bit halves, summed
  in int64 by NumPy), then rounded once.

A difference of two sums (an excess) is formed exactly before its one rounding, so two huge
totals that each overflow can still have a finite difference.
"""
from __future__ import annotations

import math

import numpy as np

# Every finite float64 x is M * 2**e with M an integer of at most 53 bits and e >= -1126
# (frexp gives x = f * 2**k with 0.5 <= |f| < 1 and k >= -1073; M = f * 2**53).
_SHIFT = 1126
_CHUNK = 1 << 30       # int64 partial sums of 32-bit halves stay exact for this many values


def _int_sum(a: np.ndarray) -> int:
    """Exact sum of an integer array, as a Python int (vectorised; no overflow)."""
    total = 0
    for start in range(0, a.shape[0], _CHUNK):
        part = a[start:start + _CHUNK]
        if part.dtype.itemsize < 8:
            total += int(part.sum(dtype=np.int64))
            continue
        if part.dtype.kind == "u":
            hi = (part >> np.uint64(32)).astype(np.int64)
            lo = (part & np.uint64(0xFFFFFFFF)).astype(np.int64)
        else:
            hi = part.astype(np.int64) >> 32                  # arithmetic shift: floor
            lo = part.astype(np.int64) & 0xFFFFFFFF
        total += (int(hi.sum()) << 32) + int(lo.sum())
    return total


def _scaled_float_sum(a: np.ndarray) -> int:
    """Exact sum of finite floats times 2**_SHIFT, as a Python int (vectorised by exponent)."""
    f, k = np.frexp(a.astype(np.float64, copy=False))
    mant = np.ldexp(f, 53).astype(np.int64)             # exact: at most 53 significant bits
    exp = k.astype(np.int64) - 53 + _SHIFT              # >= 0
    order = np.argsort(exp, kind="stable")
    exp, mant = exp[order], mant[order]
    total = 0
    for lo in range(0, mant.shape[0], _CHUNK):       # int64 sums of 27-bit halves stay exact
        m = mant[lo:lo + _CHUNK]
        e = exp[lo:lo + _CHUNK]
        s = np.flatnonzero(np.r_[True, e[1:] != e[:-1]])
        hi_s = np.add.reduceat(m >> 26, s)
        lo_s = np.add.reduceat(m & ((1 << 26) - 1), s)
        for ex, h, low in zip(e[s].tolist(), hi_s.tolist(), lo_s.tolist()):
            total += ((h << 26) + low) << ex
    return total


def _round(scaled: int, shift: int) -> float:
    """``scaled / 2**shift`` rounded once; +-inf beyond the float64 range."""
    if shift == 0:
        try:
            return float(scaled)
        except OverflowError:
            return math.inf if scaled > 0 else -math.inf
    try:
        return scaled / (1 << shift)             # int / int: correctly rounded in CPython
    except OverflowError:
        return math.inf if scaled > 0 else -math.inf


def signed_sum(parts) -> float:
    """The exact value of ``sum(sign * sum(array) for array, sign in parts)`` rounded once.

    ``parts``: pairs of a 1-D integer or float array without NaN and a sign (+1 or -1).
    """
    parts = [(np.asarray(a), s) for a, s in parts]
    floats = [(a, s) for a, s in parts if a.dtype.kind == "f" and a.size]
    pos = neg = False
    for a, s in floats:
        up, down = bool((a == math.inf).any()), bool((a == -math.inf).any())
        if s < 0:
            up, down = down, up
        pos, neg = pos or up, neg or down
    if pos and neg:
        return math.nan
    if pos or neg:
        return math.inf if pos else -math.inf
    ints = [(a, s) for a, s in parts if a.dtype.kind in "iub" and a.size]
    if not floats:
        return _round(sum(s * _int_sum(a) for a, s in ints), 0)
    if not ints:
        values = []
        for a, s in floats:
            values.extend(a.tolist() if s > 0 else (-a).tolist())
        try:
            return math.fsum(values)
        except OverflowError:
            pass                     # a partial sum overflowed: sum exactly on integers
    scaled = sum(s * _scaled_float_sum(a) for a, s in floats)
    scaled += sum(s * _int_sum(a) for a, s in ints) << _SHIFT
    return _round(scaled, _SHIFT)


def total(weights: np.ndarray) -> float:
    """The total of ``weights`` (any integer or float dtype, no NaN), exact and rounded once."""
    return signed_sum([(weights, 1)])


def excess(edges: np.ndarray, weights: np.ndarray, base_edges: np.ndarray,
           base_weights: np.ndarray, maximize: bool) -> float:
    """How much worse the forest ``(edges, weights)`` is than ``(base_edges, base_weights)``
    (positions into one graph, weights aligned with them): its total minus the base's (the
    reverse when maximizing), summed only over the edges that the two do not share (shared
    edges, infinite ones included, cancel exactly), rounded once."""
    mine = ~np.isin(edges, base_edges)
    theirs = ~np.isin(base_edges, edges)
    sign = -1 if maximize else 1
    return signed_sum([(np.asarray(weights)[mine], sign),
                       (np.asarray(base_weights)[theirs], -sign)])
