"""The four networkx spanning-forest functions on the compiled solve.

``minimum_spanning_edges``, ``maximum_spanning_edges``, ``minimum_spanning_tree`` and
``maximum_spanning_tree`` with networkx's signatures and semantics (networkx 3.4 to 3.6), for
``algorithm="kruskal"``:

* the result is networkx's own, edge for edge: networkx's Kruskal sorts the edges stably by
  weight in ``G.edges`` order, and fastmst's tie rule orders by (weight, input position), so
  with the edges given in ``G.edges`` order both pick the same forest, and the forest's edges
  come out in the order networkx accepts them (``SpanningForest.edges`` is in rule order);
* the ``*_edges`` functions return a lazy iterator (a NaN weight raises when it is consumed, as
  in networkx), yielding ``(u, v)``, ``(u, v, d)``, ``(u, v, k)`` or ``(u, v, k, d)`` with the
  graph's own attribute dicts;
* the ``*_tree`` functions build the tree as networkx does (same class, graph attributes, every
  node with its attributes, the forest's edges with copies of their attributes, in networkx's
  insertion order);
* weights that are not plain numbers (see ``fastmst.nxbackend.weights``) run through networkx's
  own implementation, so they keep networkx's answer and exceptions exactly.

``prim`` and Borůvka are declined by ``can_run`` (networkx then runs them itself when
configured to fall back); an unknown algorithm raises networkx's ValueError.
"""
from __future__ import annotations

import networkx as nx
import numpy as np

from fastmst.nxbackend.gcpause import paused
from fastmst.nxbackend.graph import NxEdges, from_networkx
from fastmst.nxbackend.weights import first_nan, read_weights
from fastmst.solve import minimum_spanning_forest

#: networkx's algorithm names (``networkx.algorithms.tree.mst.ALGORITHMS``) and ours.
NX_ALGORITHMS = frozenset({"boruvka", "borůvka", "kruskal", "prim"})
ALGORITHM = "kruskal"


def check_algorithm(algorithm) -> None:
    """networkx's check of ``algorithm`` (its ValueError, its message); an unhashable value
    raises TypeError as networkx's dict lookup does."""
    if algorithm not in NX_ALGORITHMS:
        raise ValueError(f"{algorithm} is not a valid choice for an algorithm.")
    if algorithm != ALGORITHM:
        raise NotImplementedError(f"the fastmst backend runs algorithm='kruskal' only; "
                                  f"received algorithm={algorithm!r}. Call without "
                                  f"backend='fastmst' to run it in networkx.")


def edge_tuple(g: NxEdges, i: int) -> tuple:
    """Edge ``i`` as ``G.edges(data=True)`` (``keys=True`` for multigraphs) yields it."""
    u, v = g.nodes[g.tail[i]], g.nodes[g.head[i]]
    if g.keys is not None:
        return (u, v, g.keys[i], g.data[i])
    return (u, v, g.data[i])


def forest_positions(g: NxEdges, weight, maximize: bool, ignore_nan) -> np.ndarray | None:
    """Positions of the spanning forest's edges in networkx's order of acceptance, or None when
    the weights are not plain numbers (networkx's own code must run)."""
    w = read_weights(g.data, weight)
    if w is None:
        return None
    tail, head, kept = g.tail, g.head, None
    bad = first_nan(w)
    if bad >= 0:
        if not ignore_nan:
            raise ValueError(f"NaN found as an edge weight. Edge {edge_tuple(g, bad)}")
        kept = np.flatnonzero(~np.isnan(w))
        tail, head, w = tail[kept], head[kept], w[kept]
    f = minimum_spanning_forest(tail, head, w, len(g), maximize=maximize)
    return f.edges if kept is None else kept[f.edges]


def edge_tuples(g: NxEdges, positions: np.ndarray, keys, data) -> list:
    """The forest's edges as networkx's Kruskal yields them (a list, built with the garbage
    collector paused: see ``fastmst.nxbackend.gcpause``)."""
    with paused():
        columns = [g.nodes[g.tail[positions]].tolist(), g.nodes[g.head[positions]].tolist()]
        if keys and g.keys is not None:
            columns.append(g.keys[positions].tolist())
        if data:
            columns.append(g.data[positions].tolist())
        return list(zip(*columns))


def _edges(g: NxEdges, maximize: bool, algorithm, weight, keys, data, ignore_nan):
    positions = forest_positions(g, weight, maximize, ignore_nan)
    if positions is None:
        func = nx.maximum_spanning_edges if maximize else nx.minimum_spanning_edges
        yield from func(g.graph, algorithm, weight, keys, data, ignore_nan, backend="networkx")
        return
    yield from edge_tuples(g, positions, keys, data)


def _tree(G, maximize: bool, weight, algorithm, ignore_nan):
    g = from_networkx(G)
    if g.is_directed():
        raise nx.NetworkXNotImplemented("not implemented for directed type")
    check_algorithm(algorithm)
    positions = forest_positions(g, weight, maximize, ignore_nan)
    H = g.graph
    if positions is None:
        func = nx.maximum_spanning_tree if maximize else nx.minimum_spanning_tree
        return func(H, weight, algorithm, ignore_nan, backend="networkx")
    edges = edge_tuples(g, positions, True, True)
    with paused():
        T = H.__class__()
        T.graph.update(H.graph)
        if type(H) is nx.Graph:
            _fill_graph(T, H, edges)
        else:
            T.add_nodes_from(H.nodes.items())
            T.add_edges_from(edges)
    return T


def _fill_graph(T, H, edges) -> None:
    """What ``T.add_nodes_from(H.nodes.items()); T.add_edges_from(edges)`` builds in a new
    ``nx.Graph``, written straight into its dicts: every node with a copy of its attributes, in
    ``H``'s order, then each forest edge (distinct pairs, no self-loop) with a copy of its
    attributes shared by both directions, in the order given.  About half the time of the two
    calls on the 1M-edge graph of ``bench/bench_nx.py``; only for the exact class ``nx.Graph``
    (subclasses may override the methods), and the tests compare the result with networkx's."""
    T._node.update((n, dict(d)) for n, d in H._node.items())
    adj = T._adj
    adj.update((n, {}) for n in H._node)
    for u, v, d in edges:
        adj[u][v] = adj[v][u] = dict(d)


def minimum_spanning_edges(G, algorithm="kruskal", weight="weight", keys=True, data=True,
                           ignore_nan=False):
    """networkx's ``minimum_spanning_edges`` (Kruskal) on the compiled solve."""
    check_algorithm(algorithm)
    return _edges(from_networkx(G), False, algorithm, weight, keys, data, ignore_nan)


def maximum_spanning_edges(G, algorithm="kruskal", weight="weight", keys=True, data=True,
                           ignore_nan=False):
    """networkx's ``maximum_spanning_edges`` (Kruskal) on the compiled solve."""
    check_algorithm(algorithm)
    return _edges(from_networkx(G), True, algorithm, weight, keys, data, ignore_nan)


def minimum_spanning_tree(G, weight="weight", algorithm="kruskal", ignore_nan=False):
    """networkx's ``minimum_spanning_tree`` (Kruskal) on the compiled solve."""
    return _tree(G, False, weight, algorithm, ignore_nan)


def maximum_spanning_tree(G, weight="weight", algorithm="kruskal", ignore_nan=False):
    """networkx's ``maximum_spanning_tree`` (Kruskal) on the compiled solve."""
    return _tree(G, True, weight, algorithm, ignore_nan)


FUNCTIONS = {f.__name__: f for f in (minimum_spanning_edges, maximum_spanning_edges,
                                     minimum_spanning_tree, maximum_spanning_tree)}
