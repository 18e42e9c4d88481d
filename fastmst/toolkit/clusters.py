"""Flat single-linkage clusters from a spanning forest: ``SpanningForest.clusters``."""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst._kernels.dsu import labels_from_parent
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
    if k is not None:
        k = check_cluster_count(k, max(forest.n_components, 1), max(n, 1), func)
        keep = f - (k - forest.n_components)
    else:
        t = validation.check_real(threshold, "threshold", func)
        w = forest.weights.astype(np.float64)
        # forest.weights is in tie-rule order: ascending (descending when maximize).
        keep = int(np.searchsorted(-w if forest.maximize else w,
                                   -t if forest.maximize else t, side="right"))
    ft = np.ascontiguousarray(forest.tail[:keep], dtype=np.int64)
    fh = np.ascontiguousarray(forest.head[:keep], dtype=np.int64)
    if n == 0:
        return np.empty(0, dtype=np.int64)
    return labels_from_parent(union_parent(ft, fh, n))[0]


def check_cluster_count(k, low: int, high: int, func: str) -> int:
    """Number of clusters k, an integer in [low, high]."""
    if isinstance(k, (bool, np.bool_)) or not isinstance(k, (int, np.integer)):
        raise TypeError(f"{func}: k must be an integer number of clusters, received "
                        f"{type(k).__name__} {validation.shown(k)}.")
    k = int(k)
    if not low <= k <= high:
        why = (f" (the graph already has {low} connected components, and each is at least one "
               f"cluster)" if low > 1 else "")
        raise ValueError(f"{func}: k = {k} is out of range; expected {low} <= k <= {high}, the "
                         f"number of nodes{why}.")
    return k
