"""Exact dense Prim over points: the checks and allocations around the compiled kernel.

``dense_prim`` checks its input, allocates the slot arrays and calls ``_points.prim``, the thin
typed def over the ``noexcept nogil`` Prim of ``_points.pyx`` (whose docstring describes the
method: candidate edges ordered by (length, smaller index, larger index), blocked scans).
"""
import numpy as np

from fastmst._kernels import _points

# Metric codes of the native kernel (geometry/points.py maps names to these).
METRIC_CODES = {"euclidean": 0, "sqeuclidean": 1, "cityblock": 2, "chebyshev": 3,
                "minkowski": 4}

#: Default points per block of the scan (``dense_prim(block=...)``): a block's coordinates and
#: best links stay in cache while it is relaxed.
DEF_BLOCK = 1024


def dense_prim(X, metric, p=2.0, n_threads=1, block=DEF_BLOCK, par_min=16384):
    """Minimum spanning tree of the complete graph on the rows of X (native metrics).

    Parameters
    ----------
    X : ndarray of shape (n, d), dtype=float64, C-contiguous
    metric : int
        A code from ``METRIC_CODES``.
    p : float
        Exponent for minkowski.
    n_threads : int
    block : int
        Points per block of the parallel scan.
    par_min : int
        Steps with fewer points left than this scan serially (a parallel step costs one
        fork/join, worth it only for long scans).

    Returns
    -------
    tail, head : ndarray of shape (n - 1,), dtype=int64
        Tree edges with tail < head, in the order Prim added them.
    length : ndarray of shape (n - 1,), dtype=float64
    """
    if not isinstance(X, np.ndarray):
        raise TypeError(f"dense_prim: X must be a NumPy array, received {type(X).__name__}; "
                        f"pass np.ascontiguousarray(X, dtype=np.float64).")
    if X.dtype != np.float64 or X.ndim != 2 or not X.flags.c_contiguous:
        raise ValueError(f"dense_prim: X must be a C-contiguous 2-D float64 array, received "
                         f"dtype {X.dtype}, shape {X.shape}"
                         f"{'' if X.flags.c_contiguous else ', strided'}; pass "
                         f"np.ascontiguousarray(X, dtype=np.float64).")
    n = X.shape[0]
    if metric < 0 or metric > 4:
        raise ValueError(f"dense_prim: unknown metric code {metric}.")
    if block < 1:
        raise ValueError(f"dense_prim: block must be >= 1, received {block}.")
    if n <= 1:
        e = np.empty(0, dtype=np.int64)
        return e, e.copy(), np.empty(0, dtype=np.float64)
    if X.shape[1] < 1:
        raise ValueError("dense_prim: points need at least one coordinate.")
    Xs = np.array(X[1:], dtype=np.float64, order="C")      # slots: every point but 0
    ids = np.arange(1, n, dtype=np.int64)
    bd = np.full(n - 1, np.inf, dtype=np.float64)
    thr = np.full(n - 1, np.inf, dtype=np.float64)
    bu = np.full(n - 1, -1, dtype=np.int64)
    xu = np.array(X[0], dtype=np.float64)
    added = np.empty(n - 1, dtype=np.int64)
    out_u = np.empty(n - 1, dtype=np.int64)
    out_d = np.empty(n - 1, dtype=np.float64)
    nb = (n + block - 1) // block
    blk_pos = np.empty(nb, dtype=np.int64)
    blk_nan = np.zeros(nb, dtype=np.uint8)
    if _points.prim(Xs, metric, p, max(1, n_threads), block, ids, bd, thr, bu, xu, added, out_u,
                    out_d, blk_pos, blk_nan, par_min):
        raise ValueError("dense_prim: a distance evaluated to NaN; every pair of points needs a "
                         "comparable distance.")
    return np.minimum(out_u, added), np.maximum(out_u, added), out_d
