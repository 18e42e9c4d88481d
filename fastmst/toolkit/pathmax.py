"""The heaviest forest edge on tree paths: the step shared by check_forest, sensitivity,
bottleneck and single_linkage.

A forest's edges taken in the tie-rule order and joined one by one form its merge tree (see
``fastmst._kernels.paths.kruskal_tree``); the heaviest edge on the tree path between two nodes is their
lowest common ancestor there, found by range maxima over the tree's leaf order
(``fastmst._kernels.paths.PathMaxIndex``).  "Heaviest" is in the tie-rule order: largest weight, and among equal
weights the latest position (for a maximum forest: smallest weight, then latest position).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fastmst._kernels.paths import PathMaxIndex, kruskal_tree


@dataclass(frozen=True)
class MergeTree:
    """Merge tree of a forest.  Internal node ``n_nodes + i`` is the forest edge ``edges[i]``."""
    edges: np.ndarray      # forest positions in tie-rule order, int64
    kparent: np.ndarray
    left: np.ndarray
    right: np.ndarray
    size: np.ndarray
    n_nodes: int
    index: PathMaxIndex


def merge_tree(ftail: np.ndarray, fhead: np.ndarray, edges: np.ndarray, n_nodes: int):
    """Merge tree of forest edges already in tie-rule order.

    Returns (tree, cycle) where ``cycle`` is the index into ``edges`` of the first edge that
    closes a cycle (then ``tree`` is None), or -1.
    """
    ft = np.ascontiguousarray(ftail, dtype=np.int64)
    fh = np.ascontiguousarray(fhead, dtype=np.int64)
    kparent, left, right, size, cycle = kruskal_tree(ft, fh, n_nodes)
    if cycle >= 0:
        return None, cycle
    index = PathMaxIndex(kparent, left, right, size, n_nodes)
    return MergeTree(np.asarray(edges, dtype=np.int64), kparent, left, right, size,
                     int(n_nodes), index), -1


def heaviest_on_paths(tree: MergeTree, qa: np.ndarray, qb: np.ndarray,
                      threads: int = 1) -> np.ndarray:
    """Index into ``tree.edges`` of the heaviest edge on each pair's path; -1 for pairs in two
    trees, -2 for a node paired with itself."""
    if qa.dtype != qb.dtype or qa.dtype not in (np.dtype(np.int32), np.dtype(np.int64)):
        qa = np.ascontiguousarray(qa, dtype=np.int64)
        qb = np.ascontiguousarray(qb, dtype=np.int64)
    return tree.index.query(np.ascontiguousarray(qa), np.ascontiguousarray(qb), threads)


def forest_merge_tree(forest) -> MergeTree:
    """The merge tree of a SpanningForest (its ``edges`` are already in tie-rule order), kept
    in the forest's private cache."""
    tree = forest._cache.get("merge_tree")
    if tree is None:
        tree, cycle = merge_tree(forest.tail, forest.head, forest.edges, forest.n_nodes)
        if cycle >= 0:
            raise ValueError(f"the SpanningForest's edge at position {forest.edges[cycle]} "
                             f"closes a cycle; this object was not produced by "
                             f"minimum_spanning_forest or has been modified.")
        forest._cache["merge_tree"] = tree
    return tree
