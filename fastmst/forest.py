"""The SpanningForest result and minimum_spanning_forest()."""
from __future__ import annotations

import math

import numpy as np

from fastmst import validation
from fastmst._boruvka import boruvka
from fastmst._dsu import labels_from_parent
from fastmst._kruskal import filter_kruskal, forest_bound, forest_size, kruskal, kruskal_radix
from fastmst._sort import MAX_RECORDS, edge_order, first_unsorted

METHODS = ("auto", "kruskal", "filter-kruskal", "boruvka")

_FUNC = "minimum_spanning_forest"


class SpanningForest:
    """A minimum (or maximum) spanning forest of an edge list.

    Attributes
    ----------
    edges : ndarray of shape (F,), dtype=int64
        Positions of the forest's edges in the input arrays, ordered by the tie rule: weight
        ascending (descending when ``maximize``), equal weights by position.  ``F`` is
        ``n_nodes - n_components``.
    tail, head : ndarray of shape (F,)
        Endpoints of the forest's edges, in the input id dtype.
    weights : ndarray of shape (F,)
        Weights of the forest's edges, in the input weight dtype.
    n_nodes : int
    n_edges : int
        Number of edges of the input graph (positions of later edges continue from here).
    n_components : int
        Connected components of the graph, isolated nodes included.
    labels : ndarray of shape (n_nodes,), dtype=int64
        Component id of every node, 0..n_components-1 in order of first appearance.
    maximize : bool
        True for a maximum spanning forest.
    method : str
        The algorithm that ran ("kruskal", "boruvka", ...).
    """

    __slots__ = ("edges", "tail", "head", "weights", "n_nodes", "n_edges", "n_components",
                 "labels", "maximize", "method", "_weight", "__dict__")

    def __init__(self, edges, tail, head, weights, n_nodes, n_edges, n_components, labels,
                 maximize=False, method=""):
        self.edges = edges
        self.tail = tail
        self.head = head
        self.weights = weights
        self.n_nodes = int(n_nodes)
        self.n_edges = int(n_edges)
        self.n_components = int(n_components)
        self.labels = labels
        self.maximize = bool(maximize)
        self.method = method
        self._weight = None

    @property
    def weight(self) -> float:
        """Total weight as a Python float, summed exactly rounded (``math.fsum``)."""
        if self._weight is None:
            self._weight = math.fsum(self.weights.tolist())
        return self._weight

    def __len__(self) -> int:
        return int(self.edges.shape[0])

    def __repr__(self) -> str:
        kind = "maximum" if self.maximize else "minimum"
        return (f"SpanningForest({kind}, n_nodes={self.n_nodes}, n_forest_edges={len(self)}, "
                f"n_components={self.n_components}, weight={self.weight!r})")

    def to_scipy(self):
        """The forest as a symmetric ``scipy.sparse.csr_array`` of shape (n_nodes, n_nodes).

        Zero-weight forest edges are kept as explicit stored entries (``.nnz`` counts them).
        """
        from scipy import sparse
        rows = np.concatenate([self.tail, self.head]).astype(np.int64, copy=False)
        cols = np.concatenate([self.head, self.tail]).astype(np.int64, copy=False)
        data = np.concatenate([self.weights, self.weights])
        return sparse.coo_array((data, (rows, cols)), shape=(self.n_nodes, self.n_nodes)).tocsr()

    def to_networkx(self):
        """The forest as a ``networkx.Graph`` with ``weight`` and ``position`` edge attributes.

        Every node 0..n_nodes-1 is present, isolated ones included.
        """
        import networkx as nx
        g = nx.Graph()
        g.add_nodes_from(range(self.n_nodes))
        g.add_edges_from(
            (u, v, {"weight": w, "position": p})
            for u, v, w, p in zip(self.tail.tolist(), self.head.tolist(),
                                  self.weights.tolist(), self.edges.tolist())
        )
        return g


def _rule_order(weights: np.ndarray, maximize: bool) -> np.ndarray:
    """Order of ``weights`` by the tie rule (the array must already be in position order)."""
    return edge_order(weights, maximize)


def build_forest(g: validation.EdgeArrays, edges: np.ndarray, labels: np.ndarray,
                 n_components: int, maximize: bool, method: str,
                 sorted_by_rule: bool) -> SpanningForest:
    """Wrap accepted positions into a SpanningForest, ordering them by the tie rule if needed."""
    if not sorted_by_rule and edges.shape[0]:
        edges = np.sort(edges)
        edges = edges[_rule_order(g.kweight[edges], maximize)]
    return SpanningForest(edges, g.tail[edges], g.head[edges], g.weight[edges], g.n_nodes,
                          g.n_edges, n_components, labels, maximize, method)


def choose_method(g: validation.EdgeArrays, presorted: bool, threads: int) -> str:
    """The rule behind ``method="auto"`` (measurements in docs/performance.md).

    * ``presorted=True``: "kruskal", which then scans the edges in input order with no sort;
    * more than 2**32 - 1 edges: "boruvka" (the radix records hold 32-bit positions; beyond
      them Kruskal falls back to a comparison sort, while Borůvka needs no sort at all);
    * otherwise "filter-kruskal": fastest on every graph family and size measured, with one or
      two threads (its serial scan skips the sort of most edges that close cycles, which beats
      running the sort of plain Kruskal on a second core on a shared 2-core machine).
    """
    if presorted:
        return "kruskal"
    if g.n_edges >= MAX_RECORDS:
        return "boruvka"
    return "filter-kruskal"


def minimum_spanning_forest(tail, head, weight, n_nodes=None, *, method="auto",
                            presorted=False, maximize=False, threads=None) -> SpanningForest:
    """Minimum (or maximum) spanning forest of an undirected edge list.

    Parameters
    ----------
    tail, head : array_like of shape (E,), integer dtype
        Endpoints of each edge, ids in ``[0, n_nodes)``.  Any integer dtype.
    weight : array_like of shape (E,), integer or float dtype
        Edge weights.  Zero, negative and infinite weights are ordinary weights; NaN is an error.
        int32/int64/uint32/uint64/float32/float64 are read in place; narrower dtypes are widened.
    n_nodes : int, optional
        Number of nodes; defaults to the largest id + 1.  Nodes without edges are isolated
        components.
    method : {"auto", "kruskal", "filter-kruskal", "boruvka"}
        Algorithm.  Every method returns the identical forest; "auto" picks by the rule of
        ``choose_method`` (see docs/performance.md).
    presorted : bool
        The caller promises the weights are already non-decreasing (non-increasing with
        ``maximize``); the sort is skipped after an O(E) check.
    maximize : bool
        Return the maximum spanning forest instead.
    threads : int, optional
        Worker threads for the parallel methods; None or <= 0 means every available core.

    Returns
    -------
    SpanningForest

    Raises
    ------
    TypeError, ValueError
        On malformed input; the message names the first offending position.

    Notes
    -----
    The graph is undirected; self-loops are ignored; parallel edges compete like any other edge.
    Ties are broken by input position: among equal weights the earlier edge wins.  The edges are
    thereby totally ordered by (weight, position), the minimum spanning forest under that order is
    unique, and every method, thread count, run and machine returns the same ``edges``.
    Kruskal runs in O(E log E) for the sort plus O(E alpha(V)) for the scan; Borůvka in
    O(E log V).

    Examples
    --------
    >>> import numpy as np, fastmst
    >>> f = fastmst.minimum_spanning_forest([0, 1, 2, 0], [1, 2, 0, 3], [1.0, 2.0, 1.0, 5.0])
    >>> f.edges.tolist(), f.weight, f.n_components
    ([0, 2, 3], 7.0, 1)
    """
    g = validation.validate_edges(tail, head, weight, n_nodes, func=_FUNC)
    method = validation.check_choice(method, METHODS, "method", _FUNC)
    presorted = validation.check_bool(presorted, "presorted", _FUNC)
    maximize = validation.check_bool(maximize, "maximize", _FUNC)
    threads = validation.check_threads(threads, _FUNC)
    if presorted and g.n_edges:
        bad = first_unsorted(g.kweight, maximize)
        if bad >= 0:
            order = "non-increasing" if maximize else "non-decreasing"
            raise ValueError(f"{_FUNC}: presorted=True but the weights are not {order}: "
                             f"weight[{bad}] = {g.weight[bad]!r} follows weight[{bad - 1}] = "
                             f"{g.weight[bad - 1]!r}. Sort the edges first or pass "
                             f"presorted=False.")
    if method == "auto":
        method = choose_method(g, presorted, threads)
    return _run_method(g, method, presorted, maximize, threads)


def _run_method(g: validation.EdgeArrays, method: str, presorted: bool, maximize: bool,
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
    target = forest_bound(g.ktail, g.khead, g.n_nodes)
    if method == "filter-kruskal" and not presorted:
        edges, parent = filter_kruskal(g.ktail, g.khead, g.kweight, g.n_nodes, maximize,
                                       target, threads)
    else:
        edges, parent = kruskal_radix(g.ktail, g.khead, g.kweight, g.n_nodes, maximize,
                                      target, threads, presorted)
    labels, n_components = labels_from_parent(parent)
    return build_forest(g, edges, labels, n_components, maximize, method, True)
