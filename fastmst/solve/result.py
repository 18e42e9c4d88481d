"""SpanningForest: the result of every solve.

Every field is declared in the class (``__slots__``, no ``__dict__``); nothing is attached from
outside.  The forest's methods call the toolkit's array engines, which sit below this module:
``fastmst.toolkit.pathmax`` (merge tree), ``bottleneck``, ``paths``, ``clusters`` and ``update``.
"""
from __future__ import annotations

import numpy as np

from fastmst.solve import totals
from fastmst.toolkit import bottleneck as _bottleneck
from fastmst.toolkit import clusters as _clusters
from fastmst.toolkit import paths as _paths
from fastmst.toolkit import update as _update

_NONE = np.empty(0, dtype=np.int64)
_NONE.flags.writeable = False


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
        The algorithm that built the forest: the kernel that ran ("kruskal", "filter-kruskal",
        "boruvka"), the route of a point tree ("delaunay", "dense-prim", ...), or the passes of
        a Dask solve ("dask-boruvka+filter", ...).
    required : ndarray of shape (R,), dtype=int64
        Positions of the edges the forest was required to contain, ascending; empty when
        nothing was required.  ``add_edges`` keeps them.
    excluded : ndarray of shape (X,), dtype=int64
        Positions of the edges the forest was forbidden to use, ascending; empty when nothing
        was excluded.  ``add_edges``, ``check_forest``, ``sensitivity`` and ``clusters`` honour
        both lists (see docs/toolkit.md, "Required and excluded links").
    required_excess : float
        What the ``required`` edges of ``minimum_spanning_forest`` cost: this forest's weight
        minus that of the optimal forest without the requirement (the reverse when maximizing),
        so always >= 0 (or NaN); 0.0 when nothing was required.  The exact difference over the
        edges the two forests do not share, rounded once, so shared infinite edges cancel.
    provenance : dict
        Which call produced the forest: ``provenance["function"]`` is
        "minimum_spanning_forest", "SpanningForest.add_edges", "point_spanning_tree" or
        "fastmst.dask.minimum_spanning_forest"; the other keys are that call's details
        (``n_required`` and ``n_excluded`` of a constrained solve, ``n_new_edges`` of an
        update, ``metric`` of a point tree, ``plan`` of a Dask solve).
    metric : str or None
        The metric of a point tree (``provenance["metric"]``); None for other forests.
    dask_plan : dict or None
        The passes a Dask solve ran: rounds, sizes and seconds (``provenance["plan"]``); None
        for other forests.
    weight : float
        Total weight: the exact sum rounded once (NaN when +inf and -inf weights meet, +-inf
        when the sum is beyond float64; see ``fastmst.solve.totals``).

    Notes
    -----
    Two private fields: ``_free``, for a forest with ``required`` edges the optimal forest of
    the same graph without the requirement (``add_edges`` updates it to keep
    ``required_excess`` right), else None; and ``_cache``, values computed once on demand (the
    total weight, the merge tree of ``bottleneck`` and ``single_linkage``).  A pickled forest
    leaves the cache behind.
    """

    __slots__ = ("edges", "tail", "head", "weights", "n_nodes", "n_edges", "n_components",
                 "labels", "maximize", "method", "required", "required_excess", "provenance",
                 "excluded", "_free", "_cache")

    def __init__(self, edges, tail, head, weights, n_nodes, n_edges, n_components, labels,
                 maximize=False, method="", *, required=None, required_excess=0.0,
                 provenance=None, free=None, excluded=None):
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
        self.required = _NONE if required is None else required
        self.excluded = _NONE if excluded is None else excluded
        self.required_excess = float(required_excess)
        self.provenance = ({"function": "minimum_spanning_forest"} if provenance is None
                           else provenance)
        self._free = free
        self._cache = {}

    @classmethod
    def _small(cls, r: tuple, maximize: bool) -> "SpanningForest":
        """A forest from the tuple of ``fastmst._kernels.small.small_forest`` (every field
        already of its final type: this is the per-call cost of a small solve)."""
        self = cls.__new__(cls)
        (self.edges, self.labels, self.n_components, self.n_nodes, self.n_edges, self.tail,
         self.head, self.weights) = r
        self.maximize = maximize
        self.method = "kruskal"
        self.required = _NONE
        self.excluded = _NONE
        self.required_excess = 0.0
        self.provenance = {"function": "minimum_spanning_forest"}
        self._free = None
        self._cache = {}
        return self

    @classmethod
    def _from_fields(cls, fields: dict) -> "SpanningForest":
        """A forest from the field dict of the array-level solves (``fastmst.solve.constraints``,
        ``fastmst.toolkit.update``); a nested ``free`` dict becomes a forest too."""
        free = fields.get("free")
        if isinstance(free, dict):
            fields = {**fields, "free": cls._from_fields(free)}
        return cls(**fields)

    def __getstate__(self):
        return {k: getattr(self, k) for k in self.__slots__ if k != "_cache"}

    def __setstate__(self, state):
        self.excluded = _NONE          # forests pickled before the field existed
        for k, v in state.items():
            setattr(self, k, v)
        self._cache = {}

    @property
    def metric(self) -> str | None:
        """The metric of a point tree; None for other forests."""
        return self.provenance.get("metric")

    @property
    def dask_plan(self) -> dict | None:
        """The passes of a Dask solve (rounds, sizes, seconds); None for other forests."""
        return self.provenance.get("plan")

    @property
    def weight(self) -> float:
        """Total weight as a Python float: the exact sum rounded once, never raising (NaN for
        +inf with -inf, +-inf beyond the float64 range)."""
        total = self._cache.get("weight")
        if total is None:
            total = self._cache["weight"] = totals.total(self.weights)
        return total

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
            The path's edges are compared in the weights' own dtype; only the value returned
            is converted to float64 (integer weights beyond 2**53 round to the nearest
            float64; the input weight at ``position`` is the exact value).
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
        return _bottleneck.bottleneck(self, a, b, threads)

    def path(self, a, b):
        """Input positions of the forest edges on the path from node ``a`` to node ``b``.

        In order from ``a``; an empty array when ``a == b``; None when the two nodes lie in
        different components.  For a forest solved with ``required``/``excluded`` edges this
        is the path of that design.  The heaviest of them is ``bottleneck(a, b)``.

        Examples
        --------
        >>> import fastmst
        >>> f = fastmst.minimum_spanning_forest([0, 1, 2, 0], [1, 2, 3, 3], [1.0, 4.0, 2.0, 3.0])
        >>> f.path(0, 2).tolist(), f.path(1, 1).tolist()
        ([3, 2], [])
        """
        return _paths.forest_path(self, a, b)

    def add_edges(self, tail, head, weight, n_nodes=None, *, required=None,
                  excluded=None) -> "SpanningForest":
        """Optimal forest of the old graph plus new edges, from this forest and the new edges.

        The new edges get positions ``n_edges, n_edges + 1, ...``; node ids may extend past
        ``n_nodes`` (or pass ``n_nodes``).  By the cycle property an edge left out of this
        forest stays out, so only the F forest edges and the K new ones are solved: O((F + K)
        log(F + K)).  The result is identical to a full solve of the combined graph, tie rule
        included, and keeps ``maximize`` and the ``required`` and ``excluded`` edges of this
        forest.  ``required`` and ``excluded`` name new edges by their index in ``tail``
        (0..K-1; or boolean masks of length K): required new edges join the forest, excluded
        ones never do; the result's ``required``/``excluded`` hold their positions
        (``n_edges + index``) beside the old ones.

        Examples
        --------
        >>> import fastmst
        >>> f = fastmst.minimum_spanning_forest([0, 1], [1, 2], [1.0, 5.0])
        >>> g = f.add_edges([0], [2], [2.0])
        >>> g.edges.tolist(), g.weight
        ([0, 2], 3.0)
        """
        return SpanningForest._from_fields(_update.add_edges(self, tail, head, weight, n_nodes,
                                                             required, excluded))

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

        A forest solved with ``required`` edges never has them cut: the clusters are cut from
        its other edges only, so ``k`` is at most ``n_components`` plus their number.
        """
        return _clusters.clusters(self, k, threshold)
