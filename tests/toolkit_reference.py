"""Brute-force references for the toolkit tests, built on networkx (a reference library).

Nothing here uses fastmst: each function re-derives its answer from networkx primitives
(minimum_spanning_edges, has_path, shortest_path) on small graphs.
"""
import networkx as nx
import numpy as np
from hypothesis import strategies as st


def multigraph(tail, head, weight, n_nodes, keep=None):
    """networkx MultiGraph with edge key = input position."""
    g = nx.MultiGraph()
    g.add_nodes_from(range(n_nodes))
    for p, (u, v, w) in enumerate(zip(tail, head, weight)):
        if keep is None or keep[p]:
            g.add_edge(int(u), int(v), key=p, weight=float(w))
    return g


def nx_forest(tail, head, weight, n_nodes, maximize=False, keep=None):
    """(total weight, set of positions) of a networkx minimum/maximum spanning forest."""
    g = multigraph(tail, head, weight, n_nodes, keep)
    fn = nx.maximum_spanning_edges if maximize else nx.minimum_spanning_edges
    edges = list(fn(g, algorithm="kruskal", keys=True, data=True))
    return sum(d["weight"] for _, _, _, d in edges), {k for _, _, k, _ in edges}


def nx_components(tail, head, n_nodes, keep=None):
    return nx.number_connected_components(multigraph(tail, head, np.zeros(len(tail)), n_nodes,
                                                     keep))


def tree_path_positions(tail, head, forest_positions, n_nodes, u, v):
    """Positions of the forest edges on the tree path u..v (networkx shortest_path in the
    forest), or None when u and v are in different trees."""
    g = nx.Graph()
    g.add_nodes_from(range(n_nodes))
    for p in forest_positions:
        g.add_edge(int(tail[p]), int(head[p]), position=int(p))
    if not nx.has_path(g, u, v):
        return None
    path = nx.shortest_path(g, u, v)
    return [g.edges[a, b]["position"] for a, b in zip(path, path[1:])]


def minimax(tail, head, weight, n_nodes, u, v, maximize=False):
    """Minimax (maximin) path value between u and v over the whole graph, by brute force:
    the smallest threshold t such that u and v are joined by edges of weight <= t."""
    if u == v:
        return np.inf if maximize else -np.inf
    values = sorted(set(float(w) for w in weight), reverse=maximize)
    for t in values:
        keep = [(w >= t) if maximize else (w <= t) for w in weight]
        if nx.has_path(multigraph(tail, head, weight, n_nodes, keep), u, v):
            return t
    return -np.inf if maximize else np.inf


@st.composite
def small_graphs(draw, max_nodes=8, max_edges=14, max_weight=3):
    """Small multigraphs with self-loops, parallel edges and many tied integer weights."""
    n = draw(st.integers(1, max_nodes))
    m = draw(st.integers(0, max_edges))
    tail = draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    head = draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    weight = draw(st.lists(st.integers(-1, max_weight), min_size=m, max_size=m))
    return (np.array(tail, dtype=np.int64), np.array(head, dtype=np.int64),
            np.array(weight, dtype=np.float64), n)


def canonical(labels):
    """Relabel a partition by order of first appearance (compare partitions up to names)."""
    seen = {}
    return [seen.setdefault(x, len(seen)) for x in np.asarray(labels).tolist()]
