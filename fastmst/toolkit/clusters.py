"""Flat single-linkage clusters from a spanning forest: ``SpanningForest.clusters``.

A threshold meets the weights exactly, in the weights' own dtype: it is first turned into the
nearest value of that dtype on the kept side (``bound_in_dtype``), then compared there, so
int64 weights beyond 2**53, uint64 weights and float32 weights against a float64 or integer
threshold are never rounded.
"""
from __future__ import annotations

import math

import numpy as np

from fastmst import validation
from fastmst._kernels.disjoint_set import labels_from_parent
from fastmst._kernels.paths import union_parent


def clusters(forest, k=None, threshold=None) -> np.ndarray:
    """Flat single-linkage clusters; see ``SpanningForest.clusters``."""
    func = "SpanningForest.clusters"
    if (k is None) == (threshold is None):
        raise ValueError(f"{func}: pass exactly one of k (number of clusters) or threshold "
                         f"(cut height), received k={validation.shown(k)}, "
                         f"threshold={validation.shown(threshold)}.")
    n = forest.n_nodes
    f = len(forest)
    # Required edges are never cut: they join their sites in every cluster set.
    fixed = np.isin(forest.edges, forest.required) if forest.required.size else None
    cuttable = f if fixed is None else f - int(np.count_nonzero(fixed))
    if k is not None:
        high = max(n, 1) if fixed is None else max(forest.n_components + cuttable, 1)
        k = check_cluster_count(k, max(forest.n_components, 1), high, func,
                                required=f - cuttable)
        cut = k - forest.n_components
        if fixed is None:
            kept = np.arange(f - cut)
        else:   # the cut heaviest edges that are not required (forest order is tie-rule order)
            free = np.flatnonzero(~fixed)
            mask = np.ones(f, dtype=bool)
            mask[free[free.size - cut:]] = False
            kept = np.flatnonzero(mask)
    else:
        t = validation.check_real_exact(threshold, "threshold", func)
        # forest.weights is in tie-rule order: ascending (descending when maximize).
        kept = np.arange(count_within(forest.weights, t, forest.maximize))
        if fixed is not None:
            mask = fixed.copy()
            mask[kept] = True
            kept = np.flatnonzero(mask)
    ft = np.ascontiguousarray(forest.tail[kept], dtype=np.int64)
    fh = np.ascontiguousarray(forest.head[kept], dtype=np.int64)
    if n == 0:
        return np.empty(0, dtype=np.int64)
    return labels_from_parent(union_parent(ft, fh, n))[0]


def check_cluster_count(k, low: int, high: int, func: str, required: int = 0) -> int:
    """Number of clusters k, an integer in [low, high] (``required``: how many forest edges
    may not be cut, for the message)."""
    if isinstance(k, (bool, np.bool_)) or not isinstance(k, (int, np.integer)):
        raise TypeError(f"{func}: k must be an integer number of clusters, received "
                        f"{type(k).__name__} {validation.shown(k)}.")
    k = int(k)
    if not low <= k <= high:
        why = (f" (the graph already has {low} connected components, and each is at least one "
               f"cluster)" if low > 1 else "")
        if required:
            edges = "edge is" if required == 1 else "edges are"
            raise ValueError(f"{func}: k = {k} is out of range; expected {low} <= k <= {high}: "
                             f"{required} required forest {edges} never cut{why}.")
        raise ValueError(f"{func}: k = {k} is out of range; expected {low} <= k <= {high}, the "
                         f"number of nodes{why}.")
    return k


def bound_in_dtype(t: int | float, dtype: np.dtype, upper: bool):
    """The value of ``dtype`` nearest to the exact real ``t`` on one side, or None.

    ``upper``: the largest value ``<= t`` (None when every value of the dtype is above ``t``);
    otherwise the smallest value ``>= t`` (None when every value is below).  For every weight
    ``w`` of the dtype, ``w <= t`` exactly when ``w <= bound`` (``w >= t`` exactly when
    ``w >= bound``), so the comparison can be made in the dtype itself.  Python compares ints
    and floats exactly, which the steps below rely on.
    """
    dtype = np.dtype(dtype)
    if dtype.kind in "iu":
        info = np.iinfo(dtype)
        if isinstance(t, float):
            if math.isinf(t):
                if (t > 0) == upper:
                    return dtype.type(info.max if upper else info.min)
                return None
            t = math.floor(t) if upper else math.ceil(t)
        if upper:
            return None if t < info.min else dtype.type(min(t, info.max))
        return None if t > info.max else dtype.type(max(t, info.min))
    big = float(np.finfo(dtype).max)
    with np.errstate(over="ignore"):          # beyond the dtype's range is handled below
        try:
            c = dtype.type(t)
        except OverflowError:                 # an int beyond float64
            c = dtype.type(math.inf if t > 0 else -math.inf)
        if np.isinf(c) and not (isinstance(t, float) and math.isinf(t)):
            c = dtype.type(big if t > 0 else -big)  # a finite t beyond the dtype's range
        if upper and float(c) > t:
            c = np.nextafter(c, dtype.type(-math.inf))
        elif not upper and float(c) < t:
            c = np.nextafter(c, dtype.type(math.inf))
    return c


def count_within(weights: np.ndarray, t: int | float, descending: bool) -> int:
    """How many of ``weights`` (sorted ascending, or descending with ``descending``) are
    ``<= t`` (``>= t`` when descending): the length of the prefix that a cut at ``t`` keeps,
    compared exactly in the weights' dtype."""
    c = bound_in_dtype(t, weights.dtype, upper=not descending)
    if c is None:
        return 0
    c = np.asarray(c, dtype=weights.dtype)
    if not descending:
        return int(np.searchsorted(weights, c, side="right"))
    # Descending: the prefix of weights >= c is everything but the weights < c.
    return int(weights.shape[0] - np.searchsorted(weights[::-1], c, side="left"))
