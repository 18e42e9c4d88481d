"""The kernel contract and the method registry.

Every method is a runner ``runner(g, presorted, maximize, threads) -> KernelResult`` on validated
``EdgeArrays``; all of them return the identical result.  ``RUNNERS`` maps a method name to its
runner, so adding a method is one runner and one entry here (``METHODS`` and the CLI choices
follow).  ``choose_method`` is the rule behind ``method="auto"``.  This module sits below
``fastmst.solve.result``: the solve (``fastmst.solve.constraints.run``/``forest_fields``) turns a
KernelResult into the fields of a ``SpanningForest``.
"""
from __future__ import annotations

from typing import Callable, NamedTuple

import numpy as np

from fastmst import validation
from fastmst._kernels.boruvka import boruvka
from fastmst._kernels.disjoint_set import labels_from_parent
from fastmst._kernels.filter_kruskal import filter_kruskal
from fastmst._kernels.radix import MAX_RECORDS
from fastmst._kernels.radix_kruskal import kruskal_radix
from fastmst._kernels.scan import forest_bound, forest_size, kruskal
from fastmst._kernels.small import MAX_EDGES as SMALL_EDGES
from fastmst._kernels.small import MAX_NODES as SMALL_NODES
from fastmst._kernels.small import small_forest
from fastmst._kernels.rule_order import edge_order, sort_positions


class KernelResult(NamedTuple):
    """What every method returns.

    edges : ndarray of shape (F,), dtype=int64
        Forest positions in tie-rule order.
    labels : ndarray of shape (n_nodes,), dtype=int64
        Component ids 0..k-1 in order of first appearance.
    n_components : int
    tail, head, weights : ndarray of shape (F,)
        The forest edges' endpoints and weights in the input dtypes, bit for bit.
    """
    edges: np.ndarray
    labels: np.ndarray
    n_components: int
    tail: np.ndarray
    head: np.ndarray
    weights: np.ndarray


def kernel_result(g: validation.EdgeArrays, edges: np.ndarray, labels: np.ndarray,
                  n_components: int, maximize: bool, sorted_by_rule: bool,
                  gathered=None) -> KernelResult:
    """A KernelResult from accepted positions, ordering them by the tie rule if needed.

    ``gathered``: the (tail, head, weights) of ``edges`` in kernel dtypes, when the kernel
    copied them out already.  They are cast back to the input dtypes where that is exact: ids
    always (validated into [0, n_nodes)), weights when the kernel dtype widened the input's.
    """
    if not sorted_by_rule and edges.shape[0]:
        edges = sort_positions(edges, g.kweight, maximize)
    parts = []
    for i, arr in enumerate((g.tail, g.head, g.weight)):
        if gathered is not None and (i < 2 or np.can_cast(arr.dtype, gathered[i].dtype, "safe")):
            parts.append(gathered[i].astype(arr.dtype, copy=False))
        else:
            # np.take gathers ~30 % faster than fancy indexing at 1M of 10M positions (measured)
            parts.append(np.take(arr, edges))
    return KernelResult(edges, labels, n_components, *parts)


# --------------------------------------------------------------------------------- runners

def _run_scan_beyond_records(g: validation.EdgeArrays, presorted: bool,
                             maximize: bool) -> KernelResult:
    """More than 2**32 - 1 edges (beyond 32-bit record positions): the stable argsort order,
    then the plain Kruskal scan."""
    target, parent = forest_size(g.ktail, g.khead, g.n_nodes)
    labels, n_components = labels_from_parent(parent)
    del parent
    order = (np.arange(g.n_edges, dtype=np.int64) if presorted
             else edge_order(g.kweight, maximize))
    edges, _ = kruskal(order, g.ktail, g.khead, g.n_nodes, target)
    return kernel_result(g, edges, labels, n_components, maximize, True)


def is_small(g: validation.EdgeArrays) -> bool:
    """Small enough for the one-pass kernel (``fastmst._kernels.small``)."""
    return g.n_edges <= SMALL_EDGES and g.n_nodes <= SMALL_NODES


def run_kruskal(g: validation.EdgeArrays, presorted: bool, maximize: bool,
                threads: int) -> KernelResult:
    """Kruskal: small graphs by the one-pass kernel (merge sort and scan), larger ones
    radix-sorted (positions scanned directly when ``presorted``)."""
    if is_small(g):
        r = small_forest(g.ktail, g.khead, g.kweight, g.n_nodes, maximize)
        if r is not None:
            return kernel_result(g, r[0], r[1], r[2], maximize, True)
    if g.n_edges >= MAX_RECORDS:
        return _run_scan_beyond_records(g, presorted, maximize)
    # Stop at (nodes with an edge) - 1 accepted edges: exact for a connected graph with
    # isolated nodes; a graph split further is scanned to the end (see docs/performance.md).
    target = forest_bound(g.ktail, g.khead, g.n_nodes, threads)
    edges, parent = kruskal_radix(g.ktail, g.khead, g.kweight, g.n_nodes, maximize, target,
                                  threads, presorted)
    labels, n_components = labels_from_parent(parent)
    return kernel_result(g, edges, labels, n_components, maximize, True)


def run_filter_kruskal(g: validation.EdgeArrays, presorted: bool, maximize: bool,
                       threads: int) -> KernelResult:
    """Streamed Filter-Kruskal; presorted input needs no filter and takes the Kruskal scan."""
    if presorted or g.n_edges >= MAX_RECORDS:
        return run_kruskal(g, presorted, maximize, threads)
    target = forest_bound(g.ktail, g.khead, g.n_nodes, threads)
    edges, parent, ftail, fhead, fweights = filter_kruskal(
        g.ktail, g.khead, g.kweight, g.n_nodes, maximize, target, threads)
    labels, n_components = labels_from_parent(parent)
    return kernel_result(g, edges, labels, n_components, maximize, True,
                         (ftail, fhead, fweights))


def run_boruvka(g: validation.EdgeArrays, presorted: bool, maximize: bool,
                threads: int) -> KernelResult:
    """Parallel Borůvka (needs no sort, so ``presorted`` changes nothing)."""
    edges, labels, n_components = boruvka(g.ktail, g.khead, g.kweight, g.n_nodes, maximize,
                                          threads)
    return kernel_result(g, edges, labels, n_components, maximize, False)


Runner = Callable[[validation.EdgeArrays, bool, bool, int], KernelResult]

#: Method name -> runner.  Adding a method: write its runner and add it here.
RUNNERS: dict[str, Runner] = {
    "kruskal": run_kruskal,
    "filter-kruskal": run_filter_kruskal,
    "boruvka": run_boruvka,
}

METHODS = ("auto", *RUNNERS)


def choose_method(g: validation.EdgeArrays, presorted: bool, threads: int) -> str:
    """The rule behind ``method="auto"`` (measurements in docs/performance.md).

    * ``presorted=True``: "kruskal", which then scans the edges in input order with no sort;
    * up to ``SMALL_EDGES`` (4,096) edges and ``SMALL_NODES`` (65,536) nodes: "kruskal", which
      runs the one-pass kernel of ``fastmst._kernels.small``: on such graphs the general
      route's fixed costs (buffers, passes, threads) outweigh the work
      (bench/bench_calls.py);
    * more than 2**32 - 1 edges: "boruvka" (the radix records hold 32-bit positions; beyond
      them Kruskal falls back to a comparison sort, while Borůvka needs no sort at all);
    * otherwise "filter-kruskal": fastest (or within the noise of the fastest) on every graph
      family and size measured, with one or two threads: edges heavier than the forest needs
      are never copied, and most edges that close a cycle are dropped before they are sorted.
    """
    if presorted or is_small(g):
        return "kruskal"
    if g.n_edges >= MAX_RECORDS:
        return "boruvka"
    return "filter-kruskal"
