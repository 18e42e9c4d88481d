"""Tree path queries on spanning forests.

Three near-linear kernels, each behind a function that checks shapes and allocates:

``kruskal_tree``
    The merge tree of a forest: its edges, taken in the tie-rule order, are joined one by one
    with a disjoint set; edge ``i`` becomes internal node ``n_nodes + i`` whose children are the
    two subtrees it joins.  The heaviest edge on the tree path between two nodes is their lowest
    common ancestor in this tree, and the tree is the single-linkage dendrogram.
``PathMaxIndex``
    Range maxima over the merge tree's leaf order: the heaviest edge on the tree path of any
    node pair in a few memory lookups, after an O(V) build.
``root_forest`` / ``cover_paths``
    For sensitivity: the forest rooted by breadth-first search, then non-tree edges taken
    lightest first each mark the still-unmarked tree edges of their tree path (Tarjan,
    "Sensitivity analysis of minimum spanning trees and shortest path trees", 1982).  A disjoint
    set whose sets are the connected regions of marked edges jumps over marked edges, so each
    tree edge is marked once: O((V + E) alpha(V)).

This module is the Python layer (shape checks, dtypes, allocation, results); the compiled
kernels are in ``_paths.pyx``.  Internal arrays are int64, except the lookup tables of
``PathMaxIndex``, which are int32 while node and edge counts fit.
"""
import operator

import numpy as np

from fastmst._kernels import _paths


def kruskal_tree(ftail, fhead, n_nodes):
    """Merge tree of a forest whose edges are given in tie-rule order.

    Parameters
    ----------
    ftail, head : ndarray of shape (F,), dtype=int32 or int64
        Endpoints of the forest edges, ids in [0, n_nodes), ordered by the tie rule.
    n_nodes : int

    Returns
    -------
    kparent : ndarray of shape (n_nodes + F,), dtype=int64
        Parent of every merge-tree node (-1 for the root of each tree).
    left, right : ndarray of shape (F,), dtype=int64
        Children of internal node ``n_nodes + i`` (left < right).
    size : ndarray of shape (F,), dtype=int64
        Number of leaves under internal node ``n_nodes + i``.
    cycle : int
        Index (into the given order) of the first edge that closes a cycle, or -1.  When it is
        not -1 the other outputs are incomplete.
    """
    n = operator.index(n_nodes)
    if ftail.shape[0] != fhead.shape[0]:
        raise ValueError("kruskal_tree: ftail and fhead must have one length.")
    f = ftail.shape[0]
    kparent = np.empty(n + f, dtype=np.int64)
    left = np.empty(f, dtype=np.int64)
    right = np.empty(f, dtype=np.int64)
    size = np.empty(f, dtype=np.int64)
    dsu = np.empty(max(n, 1), dtype=np.int64)
    top = np.empty(max(n, 1), dtype=np.int64)
    rank = np.zeros(max(n, 1), dtype=np.uint8)
    cycle = _paths.kruskal_tree(ftail, fhead, dsu, rank, top, kparent, left, right, size)
    return kparent, left, right, size, cycle


def root_forest(ftail, fhead, n_nodes):
    """Root every tree of an (acyclic) forest at its smallest node, by breadth-first search.

    Returns
    -------
    pnode : ndarray of shape (n_nodes,), dtype=int64
        Parent node (-1 at roots).
    pedge : ndarray of shape (n_nodes,), dtype=int64
        Index of the forest edge to the parent (-1 at roots).
    depth : ndarray of shape (n_nodes,), dtype=int64
    """
    n = operator.index(n_nodes)
    if ftail.shape[0] != fhead.shape[0]:
        raise ValueError("root_forest: ftail and fhead must have one length.")
    f = ftail.shape[0]
    start = np.empty(n + 1, dtype=np.int64)
    adj = np.empty(max(2 * f, 1), dtype=np.int64)
    nbr = np.empty(max(2 * f, 1), dtype=np.int64)
    pnode = np.empty(max(n, 1), dtype=np.int64)
    pedge = np.empty(max(n, 1), dtype=np.int64)
    depth = np.empty(max(n, 1), dtype=np.int64)
    queue = np.empty(max(n, 1), dtype=np.int64)
    _paths.root_forest(ftail, fhead, start, adj, nbr, pnode, pedge, depth, queue)
    return pnode[:n], pedge[:n], depth[:n]


def cover_paths(pnode, pedge, depth, n_forest_edges, qa, qb):
    """For every forest edge, the first pair (in the given order) whose tree path contains it.

    Parameters
    ----------
    pnode, pedge, depth : outputs of ``root_forest``
    n_forest_edges : int
    qa, qb : ndarray of shape (Q,), dtype=int32 or int64
        Node pairs in the same tree, in the order of priority (the tie-rule order of the
        non-tree edges for sensitivity).

    Returns
    -------
    cover : ndarray of shape (n_forest_edges,), dtype=int64
        Index of the first covering pair, -1 when no pair covers the edge.
    bad : int
        Index of a pair whose nodes lie in two trees (then ``cover`` is incomplete), or -1.
    """
    n_forest_edges = operator.index(n_forest_edges)
    if qa.shape[0] != qb.shape[0]:
        raise ValueError("cover_paths: qa and qb must have one length.")
    if pedge.shape[0] != pnode.shape[0] or depth.shape[0] != pnode.shape[0]:
        raise ValueError("cover_paths: pnode, pedge and depth must have one length.")
    n = pnode.shape[0]
    cover = np.empty(n_forest_edges, dtype=np.int64)
    dsu = np.empty(max(n, 1), dtype=np.int64)
    top = np.empty(max(n, 1), dtype=np.int64)
    rank = np.zeros(max(n, 1), dtype=np.uint8)
    bad = _paths.cover_paths(pnode, pedge, depth, qa, qb, dsu, rank, top, cover)
    return cover, bad


def union_parent(ftail, fhead, n_nodes):
    """Union-find parents after joining every given pair (feed to ``labels_from_parent``).

    Returns
    -------
    parent : ndarray of shape (n_nodes,), dtype=int64
    """
    n_nodes = operator.index(n_nodes)
    if ftail.shape[0] != fhead.shape[0]:
        raise ValueError("union_parent: ftail and fhead must have one length.")
    parent = np.empty(n_nodes, dtype=np.int64)
    rank = np.zeros(max(n_nodes, 1), dtype=np.uint8)
    _paths.union_parent(ftail, fhead, parent, rank)
    return parent


# --- Path maxima by range maxima over the merge tree's leaf order (see ``_paths.pyx`` for the
# method and its source): the index holds the leaf positions, the gaps between neighbouring
# leaves and the range-maxima tables over blocks of ``_paths.BLOCK`` gaps.


class PathMaxIndex:
    """Heaviest forest edge on the tree path of any node pair, in O(1) memory lookups plus at
    most a 32-gap scan per pair, after an O(V) build from the merge tree.

    Parameters
    ----------
    kparent, left, right, size : outputs of ``kruskal_tree`` (without a cycle)
    n_nodes : int
    """
    __slots__ = ("_pos", "_gap", "_pre", "_suf", "_table", "_f", "_n", "_args")

    def __init__(self, kparent, left, right, size, n_nodes):
        n = operator.index(n_nodes)
        if left.shape[0] != right.shape[0] or size.shape[0] != left.shape[0] or \
                kparent.shape[0] != n + left.shape[0]:
            raise ValueError("PathMaxIndex: kparent, left, right and size do not describe one "
                             "merge tree.")
        f = left.shape[0]
        g = max(n - 1, 1)
        nb = (g + _paths.BLOCK - 1) // _paths.BLOCK
        levels = nb.bit_length()                    # floor(log2(nb)) + 1
        offset = np.empty(max(n + f, 1), dtype=np.int64)
        gap = np.full(g, f, dtype=np.int64)
        pre = np.empty(g, dtype=np.int64)
        suf = np.empty(g, dtype=np.int64)
        table = np.empty(levels * nb, dtype=np.int64)
        _paths.leaf_tables(kparent, left, right, size, offset, gap, pre, suf, table)
        if n + f < 2**31 - 1:
            offset, gap, pre, suf, table = [a.astype(np.int32)
                                            for a in (offset, gap, pre, suf, table)]
        self._pos = offset[:n]
        self._gap = gap
        self._pre, self._suf, self._table = pre, suf, table
        self._f, self._n = f, n
        self._args = (np.asarray(kparent), np.asarray(left), np.asarray(right),
                      np.asarray(size), n)

    @property
    def pos(self):
        """Position of every node in the merge tree's leaf order."""
        return self._pos

    @property
    def gap(self):
        """The merge (forest edge index) between neighbouring leaves; F between two trees."""
        return self._gap

    def __reduce__(self):
        """Pickle as the merge tree it was built from (rebuilt in O(V) on load)."""
        return (PathMaxIndex, self._args)

    def query(self, qa, qb, threads=1):
        """Index (into the tie-rule order of the forest edges) of the heaviest edge on each
        pair's path; -1 for pairs in different trees, -2 for a node with itself.

        ``qa`` and ``qb`` must be validated ids in [0, n_nodes).  ``threads`` >= 1 worker
        threads share the pairs (the answer does not depend on it).
        """
        threads = operator.index(threads)
        if threads < 1:
            raise ValueError(f"PathMaxIndex.query: threads must be >= 1, received {threads}.")
        # Below ~64k pairs thread start-up costs more than it saves.
        threads = min(threads, max(1, qa.shape[0] // 65536))
        if qa.shape[0] != qb.shape[0]:
            raise ValueError("PathMaxIndex.query: qa and qb must have one length.")
        if qa.shape[0] and self._n == 0:
            raise ValueError("PathMaxIndex.query: the forest has no nodes.")
        out = np.empty(qa.shape[0], dtype=np.int64)
        # the index tables are all int32 or all int64 (see __init__)
        path_max = _paths.path_max32 if self._gap.dtype == np.int32 else _paths.path_max64
        path_max(self._pos, self._gap, self._pre, self._suf, self._table, self._f, qa, qb, out,
                 threads)
        return out
