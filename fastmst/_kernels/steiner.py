"""Kernels of the Steiner tree heuristic: Voronoi regions, path expansion, leaf pruning.

The graph arrives as a CSR adjacency of arcs (each undirected edge twice) with float64 lengths.
These functions allocate the outputs and scratch arrays and call the thin typed defs of
``_steiner.pyx`` (``voronoi_regions``, ``mark_path_edges``, ``prune_forest``), which run the
``noexcept nogil`` kernels.
"""
import numpy as np

from fastmst._kernels import _steiner


def voronoi(indptr, nbr, length, arc_edge, sources):
    """Voronoi regions of ``sources`` by one multi-source Dijkstra.

    Parameters
    ----------
    indptr : ndarray of shape (n + 1,), dtype=int64
    nbr, arc_edge : ndarray of shape (A,), dtype=int64
        Arc heads and the input edge position of each arc.
    length : ndarray of shape (A,), dtype=float64, non-negative
    sources : ndarray of shape (k,), dtype=int64, distinct node ids

    Returns
    -------
    dist : ndarray of shape (n,), dtype=float64 (inf where unreached)
    region, pred_edge, pred_node : ndarray of shape (n,), dtype=int64 (-1 where none)
    """
    n = indptr.shape[0] - 1
    dist = np.full(n, np.inf, dtype=np.float64)
    region = np.full(n, -1, dtype=np.int64)
    pred_edge = np.full(n, -1, dtype=np.int64)
    pred_node = np.full(n, -1, dtype=np.int64)
    done = np.zeros(n, dtype=np.uint8)
    cap = nbr.shape[0] + sources.shape[0] + 1
    hkey = np.empty(cap, dtype=np.float64)
    hnode = np.empty(cap, dtype=np.int64)
    _steiner.voronoi_regions(indptr, nbr, length, arc_edge, sources, dist, region, pred_edge,
                             pred_node, done, hkey, hnode)
    return dist, region, pred_edge, pred_node


def mark_paths(starts, pred_edge, pred_node, n_edges):
    """Mark the edges of the shortest paths from each start node back to its source.

    Returns
    -------
    edge_mark : ndarray of shape (n_edges,), dtype=bool
    """
    node_seen = np.zeros(pred_edge.shape[0], dtype=np.uint8)
    edge_mark = np.zeros(n_edges, dtype=np.uint8)
    _steiner.mark_path_edges(starts, pred_edge, pred_node, node_seen, edge_mark)
    return edge_mark.view(np.bool_)


def prune_leaves(indptr, nbr, arc_edge, keep_node, n_edges):
    """Repeatedly remove leaves not in ``keep_node`` from a forest given as a CSR adjacency.

    Returns
    -------
    edge_alive : ndarray of shape (n_edges,), dtype=bool
        True for the edges that remain (indexed by ``arc_edge`` values).
    """
    n = indptr.shape[0] - 1
    degree = np.diff(np.asarray(indptr)).astype(np.int64)
    edge_alive = np.ones(n_edges, dtype=np.uint8)
    stack = np.empty(max(n, 1), dtype=np.int64)
    _steiner.prune_forest(indptr, nbr, arc_edge, keep_node, degree, edge_alive, stack)
    return edge_alive.view(np.bool_)
