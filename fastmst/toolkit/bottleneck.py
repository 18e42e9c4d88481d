"""Bottleneck (minimax) queries on a spanning forest: ``SpanningForest.bottleneck``."""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst.toolkit.pathmax import forest_merge_tree, heaviest_on_paths

_FUNC = "SpanningForest.bottleneck"


def bottleneck(forest, a, b, threads=None):
    """Heaviest edge on the forest path between nodes ``a`` and ``b`` (see
    ``SpanningForest.bottleneck`` for the full description)."""
    threads = validation.check_threads(threads, _FUNC)
    qa, qb, shape = check_node_pairs(a, b, forest.n_nodes, _FUNC)
    tree = forest_merge_tree(forest)
    idx = heaviest_on_paths(tree, qa, qb, threads)
    far, same = (np.inf, -np.inf) if not forest.maximize else (-np.inf, np.inf)
    value = np.full(idx.shape[0], far, dtype=np.float64)
    position = np.full(idx.shape[0], -1, dtype=np.int64)
    ok = idx >= 0
    position[ok] = tree.edges[idx[ok]]
    value[ok] = forest.weights[idx[ok]].astype(np.float64)
    value[idx == -2] = same
    return value.reshape(shape), position.reshape(shape)


def check_node_pairs(a, b, n_nodes: int, func: str):
    """Node ids of query pairs: two broadcastable integer arrays with ids in [0, n_nodes).

    Returns (a, b, shape) with a and b flattened to contiguous int64 arrays.
    """
    arrs = []
    for name, x in (("a", a), ("b", b)):
        if x is None:
            raise TypeError(f"{func}: {name} is None; expected node ids (an integer or an array "
                            f"of integers).")
        arr = np.asarray(x)
        if arr.dtype.kind not in "iu" and not (arr.size == 0 and arr.dtype.kind == "f"):
            raise TypeError(f"{func}: {name} has dtype {arr.dtype}; expected integer node ids "
                            f"0..n_nodes-1. Convert with np.asarray({name}).astype(np.int64).")
        arrs.append(arr)
    try:
        a2, b2 = np.broadcast_arrays(*arrs)
    except ValueError:
        raise ValueError(f"{func}: a and b must have one shape (or broadcast to one), received "
                         f"shapes {arrs[0].shape} and {arrs[1].shape}.") from None
    shape = a2.shape
    out = []
    for name, arr in (("a", a2), ("b", b2)):
        flat = np.ascontiguousarray(arr.reshape(-1), dtype=np.int64)
        if flat.size:
            bad = np.flatnonzero((flat < 0) | (flat >= n_nodes))
            if bad.size:
                raise ValueError(f"{func}: {name} holds node id {flat[bad[0]].item()} (at flat "
                                 f"index {bad[0]}); expected ids in [0, {n_nodes}) for this "
                                 f"forest of {n_nodes} nodes.")
        out.append(flat)
    return out[0], out[1], shape
