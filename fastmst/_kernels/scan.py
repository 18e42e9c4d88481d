"""Plain Kruskal scans and forest sizes: the public functions.

``kruskal`` scans a given edge order (the rule order; used beyond 2**32 - 1 edges, where the
radix records cannot hold positions); ``forest_size`` counts the forest edges by one union pass;
``forest_bound`` bounds them by one streaming pass, which lets the Kruskal kernels stop early.
The kernels are in the compiled module ``_scan``; this module checks, allocates and assembles.
"""
import operator

import numpy as np

from fastmst._kernels import _scan, radix
from fastmst._kernels.edge_checks import check_edge_arrays, check_id_arrays


def forest_size(tail, head, n_nodes):
    """Number of edges of a spanning forest (n_nodes - n_components), by one union pass.

    Returns
    -------
    n_forest_edges : int
    parent : ndarray of shape (n_nodes,)
        The union-find parents after the pass (the components of the graph).
    """
    check_id_arrays(tail, head, "forest_size")
    n_nodes = operator.index(n_nodes)
    check_edge_arrays(tail.shape[0], head.shape[0], -1, n_nodes, "forest_size")
    parent = np.arange(n_nodes, dtype=tail.dtype)
    rank = np.zeros(n_nodes, dtype=np.uint8)
    return _scan.count_merges(tail, head, parent, rank), parent


def kruskal(order, tail, head, n_nodes, target):
    """Scan ``order`` and keep every edge that joins two trees; stop after ``target`` edges.

    Parameters
    ----------
    order : ndarray of shape (K,), dtype=int64
        Edge positions in the order of the tie rule (validated by the caller).
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Validated endpoint ids in [0, n_nodes).
    n_nodes : int
    target : int
        Number of forest edges (n_nodes - n_components) after which the scan stops.

    Returns
    -------
    edges : ndarray of shape (F,), dtype=int64
        Accepted positions, in acceptance order.
    parent : ndarray of shape (n_nodes,)
        Union-find parents of the final forest.
    """
    check_id_arrays(tail, head, "kruskal")
    n_nodes = operator.index(n_nodes)
    target = operator.index(target)
    check_edge_arrays(tail.shape[0], head.shape[0], -1, n_nodes, "kruskal")
    if (not isinstance(order, np.ndarray) or order.dtype != np.int64 or order.ndim != 1
            or not order.flags.c_contiguous):
        raise TypeError(f"kruskal: order must be a contiguous 1-D int64 array, received "
                        f"{getattr(order, 'dtype', type(order).__name__)}; pass "
                        f"np.ascontiguousarray(order, dtype=np.int64).")
    parent = np.arange(n_nodes, dtype=tail.dtype)
    rank = np.zeros(n_nodes, dtype=np.uint8)
    out = np.empty(max(0, min(target, order.shape[0])), dtype=np.int64)
    count = _scan.kruskal_scan(order, tail, head, parent, rank, out.shape[0], out)
    return out[:count], parent


def forest_bound(tail, head, n_nodes, threads=1):
    """An upper bound on the forest size that is exact when the non-isolated nodes are connected.

    ``(nodes with an edge) - 1``: lets Kruskal stop early on graphs with isolated nodes at the
    cost of one streaming pass (much cheaper than the union pass of ``forest_size``).
    ``threads`` split the pass (one more ``n_nodes / 8`` bytes of scratch per extra thread,
    and one thread per ``radix.MIN_EDGES_PER_THREAD`` edges at most); the result does not
    depend on it.
    """
    check_id_arrays(tail, head, "forest_bound")
    n_nodes = operator.index(n_nodes)
    check_edge_arrays(tail.shape[0], head.shape[0], -1, n_nodes, "forest_bound")
    m = tail.shape[0]
    if m == 0 or n_nodes == 0:
        return 0
    nt = max(1, min(operator.index(threads), m // radix.MIN_EDGES_PER_THREAD + 1))
    nw = (n_nodes + 63) // 64
    seen = np.zeros(nt * nw, dtype=np.uint64)
    return max(0, _scan.count_touched(tail, head, seen, nw, nt) - 1)
