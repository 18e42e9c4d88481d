"""Bottleneck (minimax) queries on a spanning forest."""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst.toolkit.pathmax import forest_merge_tree, heaviest_on_paths

_FUNC = "SpanningForest.bottleneck"


def bottleneck(forest, a, b, threads=None):
    """Heaviest edge on the forest path between nodes ``a`` and ``b`` (see
    ``SpanningForest.bottleneck`` for the full description)."""
    threads = validation.check_threads(threads, _FUNC)
    qa, qb, shape = validation.check_node_pairs(a, b, forest.n_nodes, _FUNC)
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
