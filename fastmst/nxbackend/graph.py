"""NxEdges: a networkx graph seen as edge arrays, in the order networkx iterates its edges.

The conversion keeps references, not copies: the original graph (for its class, graph and node
attributes), its node objects, and the edge attribute dicts themselves.  Weights are *not*
converted here; they are read from the dicts at each call (``fastmst.nxbackend.weights``), so one
conversion serves every ``weight=`` name, and a weight changed in place through
``G[u][v]["weight"] = x`` (which networkx's conversion cache does not notice) is still read
fresh.  What the arrays fix is the structure: adding or removing nodes or edges through
networkx's methods clears networkx's cache of converted graphs; an ``NxEdges`` kept by hand
reflects the graph as it was when converted.

Edge order: position ``i`` of the arrays is the ``i``-th edge of ``G.edges(data=True)`` (of
``G.edges(keys=True, data=True)`` for a multigraph), the order networkx's Kruskal sorts stably.
Both routes below produce that order; ``tests/test_nx_backend.py`` checks it against iterating
``G.edges`` for plain graphs, multigraphs, self-loops, subclasses and views.
"""
from __future__ import annotations

from itertools import chain

import networkx as nx
import numpy as np

from fastmst.nxbackend.gcpause import paused

_INT32_LIMIT = 2**31


class NxEdges:
    """The fastmst backend graph: a networkx graph as arrays of edge endpoints.

    Attributes
    ----------
    graph : networkx.Graph
        The graph converted (not copied); ``convert_to_nx`` returns it.
    nodes : ndarray of shape (V,), dtype=object
        The node objects in ``G``'s node order; ids index it.
    tail, head : ndarray of shape (E,), int32 or int64
        Node ids of each edge's endpoints, oriented as ``G.edges`` yields them.
    data : ndarray of shape (E,), dtype=object
        The edge attribute dicts of ``G`` (the same objects, not copies).
    keys : ndarray of shape (E,), dtype=object, or None
        Edge keys of a multigraph; None for a graph without keys.
    """

    __networkx_backend__ = "fastmst"
    __slots__ = ("graph", "nodes", "tail", "head", "data", "keys", "__networkx_cache__")

    def __init__(self, graph, nodes, tail, head, data, keys):
        self.graph = graph
        self.nodes = nodes
        self.tail = tail
        self.head = head
        self.data = data
        self.keys = keys
        self.__networkx_cache__ = {}

    def is_directed(self) -> bool:
        return self.graph.is_directed()

    def is_multigraph(self) -> bool:
        return self.graph.is_multigraph()

    @property
    def n_edges(self) -> int:
        return int(self.tail.shape[0])

    def __len__(self) -> int:
        return int(self.nodes.shape[0])

    def __repr__(self) -> str:
        return (f"<fastmst NxEdges of {type(self.graph).__name__}: {len(self)} nodes, "
                f"{self.n_edges} edges>")


def _objects(items, count: int) -> np.ndarray:
    """A 1-d object array of ``items`` (tuples stay single elements)."""
    return np.fromiter(items, dtype=object, count=count)


def _plain(G) -> bool:
    """Whether ``G`` keeps its adjacency in plain dicts (no view, no custom factory): then the
    dicts' own order is the order of ``G.edges`` and the fast route may walk them directly."""
    if type(G._adj) is not dict or type(G._node) is not dict:
        return False
    factories = ["adjlist_outer_dict_factory", "adjlist_inner_dict_factory",
                 "edge_attr_dict_factory", "node_dict_factory"]
    if G.is_multigraph():
        factories.append("edge_key_dict_factory")
    return all(getattr(G, f, dict) is dict for f in factories)


def _neighbour_ids(adj: dict, nodes: list, n: int, total: int, dtype) -> np.ndarray:
    """Node id of every adjacency entry, in adjacency order (one C-level pass; a dict lookup per
    entry unless the nodes are exactly 0..n-1 in order, when the labels are the ids)."""
    if nodes == list(range(n)):
        try:
            return np.fromiter(chain.from_iterable(adj.values()), dtype=dtype, count=total)
        except (TypeError, ValueError, OverflowError):
            pass                    # labels equal to 0..n-1 but not convertible: look them up
    index = dict(zip(nodes, range(n)))
    return np.fromiter(map(index.__getitem__, chain.from_iterable(adj.values())), dtype=dtype,
                       count=total)


def _fast(G) -> NxEdges:
    """Arrays straight from the adjacency dicts (no Python loop over the edges)."""
    adj = G._adj
    nodes = list(adj)
    n = len(nodes)
    dtype = np.int32 if n < _INT32_LIMIT else np.int64
    degree = np.fromiter(map(len, adj.values()), dtype=np.int64, count=n)
    total = int(degree.sum())
    src = np.repeat(np.arange(n, dtype=dtype), degree)
    dst = _neighbour_ids(adj, nodes, n, total, dtype)
    # G.edges yields (u, v) while visiting u unless v was visited before: keep v's id >= u's
    keep = dst >= src
    if G.is_multigraph():
        keydicts = _objects(chain.from_iterable(map(dict.values, adj.values())), total)
        count = np.fromiter(map(len, keydicts), dtype=np.int64, count=total)
        keydicts = keydicts[keep]
        count = count[keep]
        m = int(count.sum())
        tail = np.repeat(src[keep], count)
        head = np.repeat(dst[keep], count)
        keys = _objects(chain.from_iterable(keydicts), m)
        data = _objects(chain.from_iterable(map(dict.values, keydicts)), m)
    else:
        data = _objects(chain.from_iterable(map(dict.values, adj.values())), total)[keep]
        tail, head, keys = src[keep], dst[keep], None
    return NxEdges(G, _objects(nodes, n), tail, head, data, keys)


def _general(G) -> NxEdges:
    """Arrays by iterating ``G.edges`` (views, custom dict factories, subclasses)."""
    nodes = list(G)
    n = len(nodes)
    index = dict(zip(nodes, range(n)))
    dtype = np.int32 if n < _INT32_LIMIT else np.int64
    if G.is_multigraph():
        edges = list(G.edges(keys=True, data=True))
        keys = _objects((e[2] for e in edges), len(edges))
    else:
        edges = list(G.edges(data=True))
        keys = None
    m = len(edges)
    tail = np.fromiter((index[e[0]] for e in edges), dtype=dtype, count=m)
    head = np.fromiter((index[e[1]] for e in edges), dtype=dtype, count=m)
    data = _objects((e[-1] for e in edges), m)
    return NxEdges(G, _objects(nodes, n), tail, head, data, keys)


def from_networkx(G) -> NxEdges:
    """Convert a networkx graph (any of its four classes, a subclass or a view).

    Raises
    ------
    TypeError
        ``G`` is not a networkx graph.
    """
    if isinstance(G, NxEdges):
        return G
    if not isinstance(G, nx.Graph):
        raise TypeError(f"fastmst networkx backend: expected a networkx graph (nx.Graph, "
                        f"nx.MultiGraph, ...) or a graph converted by this backend; received "
                        f"{type(G).__name__}. Build one with nx.Graph(edges) first.")
    with paused():
        if _plain(G) and not G.is_directed():
            return _fast(G)
        return _general(G)
