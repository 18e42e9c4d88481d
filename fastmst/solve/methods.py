"""The kernel contract and the method registry.

Every method turns validated ``EdgeArrays`` into the same result; ``run_method`` dispatches to it
and ``choose_method`` is the rule behind ``method="auto"``.
"""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst._kernels.boruvka import boruvka
from fastmst._kernels.dsu import labels_from_parent
from fastmst._kernels.kruskal import filter_kruskal, forest_bound, forest_size, kruskal, kruskal_radix
from fastmst._kernels.radix import MAX_RECORDS, edge_order
from fastmst.solve.result import SpanningForest

METHODS = ("auto", "kruskal", "filter-kruskal", "boruvka")


def _rule_order(weights: np.ndarray, maximize: bool) -> np.ndarray:
    """Order of ``weights`` by the tie rule (the array must already be in position order)."""
    return edge_order(weights, maximize)


def build_forest(g: validation.EdgeArrays, edges: np.ndarray, labels: np.ndarray,
                 n_components: int, maximize: bool, method: str, sorted_by_rule: bool,
                 gathered=None) -> SpanningForest:
    """Wrap accepted positions into a SpanningForest, ordering them by the tie rule if needed.

    ``gathered``: the (tail, head, weights) of ``edges`` in kernel dtypes, when the kernel
    copied them out already.  They are cast back to the input dtypes where that is exact: ids
    always (validated into [0, n_nodes)), weights when the kernel dtype widened the input's.
    """
    if not sorted_by_rule and edges.shape[0]:
        edges = np.sort(edges)
        edges = edges[_rule_order(g.kweight[edges], maximize)]
    parts = []
    for i, arr in enumerate((g.tail, g.head, g.weight)):
        if gathered is not None and (i < 2 or np.can_cast(arr.dtype, gathered[i].dtype, "safe")):
            parts.append(gathered[i].astype(arr.dtype, copy=False))
        else:
            # np.take gathers ~30 % faster than fancy indexing at 1M of 10M positions (measured)
            parts.append(np.take(arr, edges))
    return SpanningForest(edges, *parts, g.n_nodes, g.n_edges, n_components, labels, maximize,
                          method)


def choose_method(g: validation.EdgeArrays, presorted: bool, threads: int) -> str:
    """The rule behind ``method="auto"`` (measurements in docs/performance.md).

    * ``presorted=True``: "kruskal", which then scans the edges in input order with no sort;
    * more than 2**32 - 1 edges: "boruvka" (the radix records hold 32-bit positions; beyond
      them Kruskal falls back to a comparison sort, while Borůvka needs no sort at all);
    * otherwise "filter-kruskal": fastest (or within the noise of the fastest) on every graph
      family and size measured, with one or two threads: edges heavier than the forest needs
      are never copied, and most edges that close a cycle are dropped before they are sorted.
    """
    if presorted:
        return "kruskal"
    if g.n_edges >= MAX_RECORDS:
        return "boruvka"
    return "filter-kruskal"


def run_method(g: validation.EdgeArrays, method: str, presorted: bool, maximize: bool,
                threads: int) -> SpanningForest:
    """Dispatch validated edges to a kernel (every kernel returns the identical forest)."""
    if method == "boruvka":
        edges, labels, n_components = boruvka(g.ktail, g.khead, g.kweight, g.n_nodes,
                                              maximize, threads)
        return build_forest(g, edges, labels, n_components, maximize, method, False)
    if g.n_edges >= MAX_RECORDS:
        # Beyond 32-bit record positions: stable argsort, then the plain Kruskal scan.
        target, parent = forest_size(g.ktail, g.khead, g.n_nodes)
        labels, n_components = labels_from_parent(parent)
        del parent
        order = (np.arange(g.n_edges, dtype=np.int64) if presorted
                 else edge_order(g.kweight, maximize))
        edges, _ = kruskal(order, g.ktail, g.khead, g.n_nodes, target)
        return build_forest(g, edges, labels, n_components, maximize, method, True)
    # Stop at (nodes with an edge) - 1 accepted edges: exact for a connected graph with
    # isolated nodes; a graph split further is scanned to the end (see docs/performance.md).
    target = forest_bound(g.ktail, g.khead, g.n_nodes, threads)
    if method == "filter-kruskal" and not presorted:
        edges, parent, ftail, fhead, fweights = filter_kruskal(
            g.ktail, g.khead, g.kweight, g.n_nodes, maximize, target, threads)
        labels, n_components = labels_from_parent(parent)
        return build_forest(g, edges, labels, n_components, maximize, method, True,
                            (ftail, fhead, fweights))
    else:
        edges, parent = kruskal_radix(g.ktail, g.khead, g.kweight, g.n_nodes, maximize,
                                      target, threads, presorted)
    labels, n_components = labels_from_parent(parent)
    return build_forest(g, edges, labels, n_components, maximize, method, True)
