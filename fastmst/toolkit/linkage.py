"""Single-linkage clustering from a minimum spanning forest (Gower and Ross, 1969)."""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst.solve.result import SpanningForest
from fastmst.toolkit.pathmax import forest_merge_tree


def single_linkage(forest) -> np.ndarray:
    """The single-linkage dendrogram of a minimum spanning forest, as a SciPy linkage matrix.

    Parameters
    ----------
    forest : SpanningForest
        A minimum spanning forest (``maximize=False``) with non-negative weights, e.g. over
        pairwise distances.

    Returns
    -------
    Z : ndarray of shape (n_nodes - 1, 4), dtype=float64
        The layout of ``scipy.cluster.hierarchy.linkage``: row ``i`` merges clusters ``Z[i, 0]``
        < ``Z[i, 1]`` at height ``Z[i, 2]`` into cluster ``n_nodes + i`` of ``Z[i, 3]`` nodes.
        Nodes are clusters ``0..n_nodes-1``.  Rows follow the forest edges in tie-rule order, so
        heights never decrease.  A disconnected graph's trees are joined last, at height inf, in
        order of their first node.  Usable with ``fcluster``, ``dendrogram``, ``cophenet``.

    Raises
    ------
    ValueError
        For a maximum spanning forest, or when a forest edge weighs less than 0 (SciPy rejects
        negative heights; single linkage only depends on the order of the weights, so shift them).

    Notes
    -----
    The single-linkage hierarchy is the merge order of Kruskal's algorithm on a minimum
    spanning tree (Gower and Ross, "Minimum spanning trees and single linkage cluster analysis",
    1969).  O(V alpha(V)) from the forest.

    Examples
    --------
    >>> import fastmst
    >>> f = fastmst.minimum_spanning_forest([0, 1, 2], [1, 2, 3], [0.5, 2.0, 1.0])
    >>> fastmst.single_linkage(f).tolist()
    [[0.0, 1.0, 0.5, 2.0], [2.0, 3.0, 1.0, 2.0], [4.0, 5.0, 2.0, 4.0]]
    """
    if not isinstance(forest, SpanningForest):
        raise TypeError(f"single_linkage: expected a SpanningForest, received "
                        f"{type(forest).__name__}; compute one with minimum_spanning_forest.")
    if forest.maximize:
        raise ValueError("single_linkage: received a maximum spanning forest; single linkage "
                         "needs a minimum spanning forest of distances. For similarities s, "
                         "solve with weight = -s (or max(s) - s to keep heights >= 0).")
    n = forest.n_nodes
    if n <= 1:
        return np.empty((0, 4), dtype=np.float64)
    heights = forest.weights.astype(np.float64)
    if heights.size and heights[0] < 0:
        bad = int(np.flatnonzero(heights < 0)[0])
        raise ValueError(f"single_linkage: the forest edge at position {forest.edges[bad]} "
                         f"weighs {validation.shown(forest.weights[bad])}; linkage heights must "
                         f"be >= 0 (scipy.cluster.hierarchy rejects negative ones). Shift the "
                         f"weights (e.g. weight - weight.min()): the clusters do not change.")
    tree = forest_merge_tree(forest)
    f = tree.edges.shape[0]
    z = np.empty((n - 1, 4), dtype=np.float64)
    z[:f, 0] = tree.left
    z[:f, 1] = tree.right
    z[:f, 2] = heights
    z[:f, 3] = tree.size
    if f < n - 1:
        roots = np.flatnonzero(tree.kparent == -1)
        roots = roots[np.argsort(_first_leaf(forest, tree, roots), kind="stable")]
        # A root is a node (size 1) or a merge (its size); a forest without edges has no merges.
        sizes = np.ones(roots.shape[0], dtype=np.int64)
        inner = roots >= n
        sizes[inner] = tree.size[roots[inner] - n]
        cur, cur_size = int(roots[0]), int(sizes[0])
        for i, (r, s) in enumerate(zip(roots[1:].tolist(), sizes[1:].tolist())):
            row = f + i
            z[row] = (min(cur, r), max(cur, r), np.inf, cur_size + s)
            cur, cur_size = n + row, cur_size + s
    return z


def _first_leaf(forest, tree, roots: np.ndarray) -> np.ndarray:
    """Component id (order of first node) of each merge-tree root."""
    n = tree.n_nodes
    leaf = np.where(roots < n, roots, 0)
    inner = roots >= n
    leaf[inner] = np.asarray(forest.tail)[roots[inner] - n]
    return forest.labels[leaf]
