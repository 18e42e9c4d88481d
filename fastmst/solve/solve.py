"""The SpanningForest result and minimum_spanning_forest()."""
from __future__ import annotations

import math

import numpy as np

from fastmst import validation
from fastmst._kernels.boruvka import boruvka
from fastmst._kernels.dsu import labels_from_parent
from fastmst._kernels.kruskal import filter_kruskal, forest_bound, forest_size, kruskal, kruskal_radix
from fastmst._kernels.radix import MAX_RECORDS, edge_order, first_unsorted

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
    required_excess : float
        What the ``required`` edges of ``minimum_spanning_forest`` cost: this forest's weight
        minus that of the optimal forest without the requirement (the reverse when maximizing),
        so always >= 0; 0.0 when nothing was required.
    """

    __slots__ = ("edges", "tail", "head", "weights", "n_nodes", "n_edges", "n_components",
                 "labels", "maximize", "method", "_weight", "__dict__")

    required_excess = 0.0

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


    def bottleneck(self, a, b, *, threads=None):
        """Heaviest edge on the forest path between nodes ``a`` and ``b`` (minimax queries).

        Parameters
        ----------
        a, b : int or array_like of int
            Node ids in ``[0, n_nodes)``; arrays of one shape (or broadcastable) give many pairs.
        threads : int, optional
            Worker threads; None or <= 0 means every available core (same answer either way).

        Returns
        -------
        weight : ndarray of float64, shape of the broadcast pairs
            The heaviest edge weight on the tree path: the minimax path value between the two
            nodes over the whole graph.  inf for nodes in different components, -inf for a node
            with itself.  For a maximum forest, the lightest edge on the path (the maximin, or
            widest-path, value); then -inf across components and inf for a node with itself.
        position : ndarray of int64, same shape
            Input position of that edge (the tie-rule-heaviest among equal weights); -1 when
            there is none.  For a forest solved with ``required``/``excluded`` edges the values
            are those of its own tree paths, not minimax values of the whole graph.

        Notes
        -----
        The lowest common ancestor of the two nodes in the forest's merge tree, by range maxima
        over its leaf order: O(V) to build once (cached on the forest), then O(1) per pair.

        Examples
        --------
        >>> import fastmst
        >>> f = fastmst.minimum_spanning_forest([0, 1, 2, 0], [1, 2, 3, 3], [1.0, 4.0, 2.0, 3.0])
        >>> w, p = f.bottleneck([0, 1, 0], [2, 3, 0])
        >>> w.tolist(), p.tolist()
        ([3.0, 3.0, -inf], [3, 3, -1])
        """
        from fastmst.toolkit.bottleneck import bottleneck
        return bottleneck(self, a, b, threads)

    def add_edges(self, tail, head, weight, n_nodes=None) -> "SpanningForest":
        """Optimal forest of the old graph plus new edges, from this forest and the new edges.

        The new edges get positions ``n_edges, n_edges + 1, ...``; node ids may extend past
        ``n_nodes`` (or pass ``n_nodes``).  By the cycle property an edge left out of this
        forest stays out, so only the F forest edges and the K new ones are solved: O((F + K)
        log(F + K)).  The result is identical to a full solve of the combined graph, tie rule
        included, and keeps ``maximize`` and any ``required`` edges of this forest (the
        excluded ones are not in it to begin with).

        Examples
        --------
        >>> import fastmst
        >>> f = fastmst.minimum_spanning_forest([0, 1], [1, 2], [1.0, 5.0])
        >>> g = f.add_edges([0], [2], [2.0])
        >>> g.edges.tolist(), g.weight
        ([0, 2], 3.0)
        """
        from fastmst.toolkit.update import add_edges
        return add_edges(self, tail, head, weight, n_nodes)

    def clusters(self, k=None, threshold=None):
        """Single-linkage flat clusters: labels after cutting the heaviest forest edges.

        Parameters
        ----------
        k : int, optional
            Number of clusters, ``n_components <= k <= n_nodes``: the ``k - n_components``
            heaviest forest edges are cut (``k - 1`` for a connected graph), in tie-rule order.
        threshold : float, optional
            Cut every forest edge heavier than ``threshold`` (like ``fcluster(...,
            criterion="distance")``).  Pass exactly one of ``k`` and ``threshold``.

        Returns
        -------
        labels : ndarray of shape (n_nodes,), dtype=int64
            Cluster ids 0..k-1 in order of first appearance.

        Notes
        -----
        For a maximum forest (weights are similarities) the lightest edges are cut instead, and
        ``threshold`` cuts every edge lighter than it.

        Examples
        --------
        >>> import fastmst
        >>> f = fastmst.minimum_spanning_forest([0, 1, 2], [1, 2, 3], [0.5, 9.0, 1.0])
        >>> f.clusters(k=2).tolist(), f.clusters(threshold=0.7).tolist()
        ([0, 0, 1, 1], [0, 0, 1, 2])
        """
        from fastmst.toolkit.linkage import clusters
        return clusters(self, k, threshold)


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


def minimum_spanning_forest(tail, head, weight, n_nodes=None, *, method="auto",
                            presorted=False, maximize=False, threads=None, required=None,
                            excluded=None) -> SpanningForest:
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
    required, excluded : array_like of int or boolean mask of shape (E,), optional
        Positions that must be in the forest (joined first; a cycle among them is a ValueError
        naming its edges) and positions that may not be.  The result is the optimal forest that
        respects both, and its ``required_excess`` says what the requirement cost.

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
    if required is not None or excluded is not None:
        from fastmst.solve.constraints import constrained_forest
        return constrained_forest(tail, head, weight, n_nodes, required=required,
                                  excluded=excluded, method=method, presorted=presorted,
                                  maximize=maximize, threads=threads)
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
