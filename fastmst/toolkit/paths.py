"""The path between two nodes in a spanning forest: ``SpanningForest.path``."""
from __future__ import annotations

import numpy as np

from fastmst._kernels.paths import root_forest
from fastmst.toolkit.bottleneck import check_node_pairs

_FUNC = "SpanningForest.path"


def forest_path(forest, a, b) -> np.ndarray:
    """Input positions of the forest edges on the path from node ``a`` to node ``b``, in order
    from ``a``; empty when ``a == b``; None when they lie in different components.

    The forest is rooted once (cached on the forest): O(V) the first time, then O(path length)
    per query.
    """
    qa, qb, shape = check_node_pairs(a, b, forest.n_nodes, _FUNC)
    if qa.size != 1 or shape != ():
        raise ValueError(f"{_FUNC}: a and b must be single node ids, received shapes "
                         f"{np.shape(a)} and {np.shape(b)}; call it once per pair.")
    u, v = int(qa[0]), int(qb[0])
    if forest.labels[u] != forest.labels[v]:
        return None
    rooted = forest._cache.get("rooted")
    if rooted is None:
        rooted = forest._cache["rooted"] = root_forest(
            np.ascontiguousarray(forest.tail, dtype=np.int64),
            np.ascontiguousarray(forest.head, dtype=np.int64), forest.n_nodes)
    pnode, pedge, depth = rooted
    left, right = [], []
    while u != v:                      # climb from the deeper end until the ends meet
        if depth[u] >= depth[v]:
            left.append(int(pedge[u]))
            u = int(pnode[u])
        else:
            right.append(int(pedge[v]))
            v = int(pnode[v])
    idx = np.asarray(left + right[::-1], dtype=np.int64)
    return forest.edges[idx] if idx.size else np.empty(0, dtype=np.int64)
