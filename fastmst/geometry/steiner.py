"""Steiner trees along a network: join chosen nodes (terminals), other nodes free to use.

Mehlhorn, "A faster approximation algorithm for the Steiner problem in graphs", Information
Processing Letters 27 (1988), building on Kou, Markowsky and Berman, "A fast algorithm for
Steiner trees", Acta Informatica 15 (1981).
"""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst._kernels.steiner import mark_paths, prune_leaves, voronoi
from fastmst.geometry import checks
from fastmst.solve import totals
from fastmst.solve.solve import solve_trusted

__all__ = ["SteinerTree", "steiner_tree"]

_FUNC = "steiner_tree"
_MAX_ROUNDS = 8     # rounds of (spanning tree of the induced subgraph, prune) until stable


class SteinerTree:
    """A Steiner tree (one per connected component holding terminals) with a proven bound.

    Attributes
    ----------
    edges : ndarray of shape (F,), dtype=int64
        Positions of the chosen edges in the input arrays, ascending.
    tail, head : ndarray of shape (F,)
        Endpoints of the chosen edges (input id dtype).
    weights : ndarray of shape (F,)
        Weights of the chosen edges (input weight dtype).
    weight : float
        Total weight: the exact sum rounded once (inf when it is beyond the float64 range).
    terminals : ndarray of shape (k,), dtype=int64
        The distinct terminals, ascending.
    nodes : ndarray, dtype=int64
        Every node of the result (terminals and the junctions it passes), ascending.
    steiner_nodes : ndarray, dtype=int64
        The nodes of the result that are not terminals.
    n_trees : int
        Number of trees: the connected components of the network that hold terminals.
    connected : bool
        True when every terminal is in one tree.  When False, the terminals cannot all be
        joined: the result is a forest with one tree per component.
    terminal_tree : ndarray of shape (k,), dtype=int64
        Tree id (0..n_trees-1, in order of the terminals) of each terminal.
    ratio_bound : float
        Certified approximation ratio: ``weight <= ratio_bound * optimum``.  It is the largest
        2(1 - 1/k_i) over the trees, k_i the number of terminals of tree i (the optimal tree has
        at most k_i leaves); 1.0 when every tree has at most two terminals (the result is then
        optimal: a shortest path).
    lower_bound : float
        Certified lower bound on the optimum weight: the sum over trees of weight_i divided by
        that tree's ratio.
    n_nodes, n_edges : int
        Size of the input network.
    method : str
        "mehlhorn".
    """

    def __init__(self, edges, tail, head, weights, terminals, nodes, n_trees, terminal_tree,
                 ratio_bound, lower_bound, n_nodes, n_edges):
        self.edges = edges
        self.tail = tail
        self.head = head
        self.weights = weights
        self.terminals = terminals
        self.nodes = nodes
        self.steiner_nodes = np.setdiff1d(nodes, terminals, assume_unique=True)
        self.n_trees = int(n_trees)
        self.terminal_tree = terminal_tree
        self.ratio_bound = float(ratio_bound)
        self.lower_bound = float(lower_bound)
        self.n_nodes = int(n_nodes)
        self.n_edges = int(n_edges)
        self.method = "mehlhorn"
        self.weight = totals.total(np.asarray(weights))

    @property
    def connected(self) -> bool:
        return self.n_trees <= 1

    def __len__(self) -> int:
        return int(self.edges.shape[0])

    def __repr__(self) -> str:
        note = "" if self.connected else ", terminals in separate components"
        return (f"SteinerTree(n_terminals={self.terminals.shape[0]}, n_edges={len(self)}, "
                f"n_trees={self.n_trees}{note}, weight={self.weight!r}, "
                f"ratio_bound={self.ratio_bound:.4g})")

    def to_networkx(self):
        """The tree as a ``networkx.Graph`` (nodes of the result only) with ``weight`` and
        ``position`` edge attributes."""
        import networkx as nx
        g = nx.Graph()
        g.add_nodes_from(self.nodes.tolist())
        g.add_edges_from((u, v, {"weight": w, "position": p}) for u, v, w, p in zip(
            self.tail.tolist(), self.head.tolist(), self.weights.tolist(), self.edges.tolist()))
        return g


def _csr(n, t, h, ids, w=None):
    """Undirected CSR adjacency of the edges (t, h) with edge ids ``ids`` (and lengths ``w``)."""
    src = np.concatenate([t, h])
    order = np.argsort(src, kind="stable")
    nbr = np.concatenate([h, t])[order]
    arc_edge = np.concatenate([ids, ids])[order]
    indptr = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(np.bincount(src, minlength=n), out=indptr[1:])
    length = None if w is None else np.ascontiguousarray(np.concatenate([w, w])[order])
    return indptr, np.ascontiguousarray(nbr, dtype=np.int64), \
        np.ascontiguousarray(arc_edge, dtype=np.int64), length


def _tree_and_prune(n, t, h, w, nodes_mask, is_terminal):
    """Spanning forest of the subgraph induced by ``nodes_mask``, non-terminal leaves pruned.

    Returns the kept edge positions (ascending).
    """
    cand = np.flatnonzero(nodes_mask[t] & nodes_mask[h] & (t != h))
    f = solve_trusted(t[cand], h[cand], w[cand], n)
    chosen = np.sort(cand[f.edges])
    indptr, nbr, arc_edge, _ = _csr(n, t[chosen], h[chosen],
                                    np.arange(chosen.shape[0], dtype=np.int64))
    alive = prune_leaves(indptr, nbr, arc_edge, is_terminal, chosen.shape[0])
    return chosen[alive]


_MAX_TOTAL = float(np.finfo(np.float64).max) / 2


def _check_lengths_fit(weight: np.ndarray) -> None:
    """Path lengths are float64 sums of edge weights; refuse weights whose total could
    overflow one (every path, and every bridge dist + w + dist, weighs at most the total)."""
    whole = totals.total(weight)
    if whole > _MAX_TOTAL:
        raise ValueError(f"{_FUNC}: the weights add up to {whole!r}, beyond what float64 path "
                         f"lengths can hold (the total must stay below {_MAX_TOTAL:.3g}); "
                         f"scale the weights down, e.g. weight / weight.max(): the tree does "
                         f"not change.")


def steiner_tree(tail, head, weight, terminals, n_nodes=None) -> SteinerTree:
    """A Steiner tree joining ``terminals`` along an undirected network, with a proven bound.

    Parameters
    ----------
    tail, head : array_like of shape (E,), integer dtype
        Endpoints of each edge, ids in ``[0, n_nodes)``.
    weight : array_like of shape (E,)
        Finite, non-negative edge lengths or costs whose total stays below half the float64
        maximum (about 9e307), so that no path length overflows.
    terminals : array_like of shape (k,), integer dtype
        The nodes to join (repeats are ignored).
    n_nodes : int, optional
        Number of nodes; defaults to the largest id + 1.

    Returns
    -------
    SteinerTree
        Chosen edge positions, total weight, ``ratio_bound`` and ``lower_bound``.  When the
        terminals lie in different connected components, one tree per component
        (``connected`` is False, ``n_trees`` and ``terminal_tree`` say which is which).
        The result can be written to files with fastmst's forest writers.

    Raises
    ------
    TypeError, ValueError
        Malformed edges, negative or non-finite weights (or weights whose total is beyond
        the bound above), terminals that are not nodes.

    Notes
    -----
    Mehlhorn's (1988) version of the Kou–Markowsky–Berman (1981) heuristic: one multi-source
    Dijkstra splits the nodes into Voronoi regions of the terminals; each edge between two
    regions bridges its two terminals at dist(u) + w + dist(v); the minimum spanning tree of
    those bridges is expanded into shortest paths; then a minimum spanning tree of the subgraph
    the paths' nodes induce is taken and leaves that are not terminals are pruned (repeated
    while it still gets lighter).  The weight is at most 2(1 - 1/l) times the optimum, l the
    number of leaves of an optimal tree (l <= k), which ``ratio_bound`` reports.  O(E + V log V)
    time with a binary heap.  Deterministic: the heap is ordered by (distance, node) and every
    spanning tree step uses fastmst's (weight, position) tie rule.  Path lengths are summed in
    float64.

    A Steiner tree has no redundancy: one cut disconnects customers.  Use it for planning and
    comparison, and leave the design of networks to local codes and licensed engineers.

    Examples
    --------
    >>> import fastmst
    >>> # three customers 0, 1, 2 around a street junction 3 (invented example)
    >>> t = [0, 1, 2, 0, 1, 0]; h = [3, 3, 3, 1, 2, 2]; w = [1.0, 1.0, 1.0, 3.0, 3.0, 3.0]
    >>> s = fastmst.steiner_tree(t, h, w, terminals=[0, 1, 2])
    >>> s.weight, s.steiner_nodes.tolist(), s.edges.tolist()
    (3.0, [3], [0, 1, 2])
    """
    g = validation.validate_edges(tail, head, weight, n_nodes, func=_FUNC)
    checks.check_nonnegative_finite(g.weight, _FUNC)
    _check_lengths_fit(g.weight)
    n, m = g.n_nodes, g.n_edges
    term = checks.check_terminals(terminals, n, _FUNC)
    k = term.shape[0]
    t = np.asarray(g.ktail, dtype=np.int64)
    h = np.asarray(g.khead, dtype=np.int64)
    w = np.asarray(g.kweight, dtype=np.float64)
    is_terminal = np.zeros(n, dtype=np.uint8)
    is_terminal[term] = 1

    if k >= 2 and m:
        indptr, nbr, arc_edge, length = _csr(n, t, h, np.arange(m, dtype=np.int64), w)
        dist, region, pred_edge, pred_node = voronoi(indptr, nbr, length, arc_edge, term)
        rt, rh = region[t], region[h]
        bridge = np.flatnonzero((rt >= 0) & (rh >= 0) & (rt != rh))
        with np.errstate(over="ignore"):         # lengths beyond float64 become inf
            bw = dist[t[bridge]] + w[bridge] + dist[h[bridge]]
        f = solve_trusted(rt[bridge], rh[bridge], bw, k)
        picked = bridge[f.edges]
        mark = mark_paths(np.concatenate([t[picked], h[picked]]), pred_edge, pred_node, m)
        mark[picked] = True
        nodes_mask = np.zeros(n, dtype=bool)
        nodes_mask[t[mark]] = True
        nodes_mask[h[mark]] = True
        nodes_mask[term] = True
        chosen = _tree_and_prune(n, t, h, w, nodes_mask, is_terminal)
        total = totals.total(g.weight[chosen])
        for _ in range(_MAX_ROUNDS - 1):
            nodes_mask[:] = False
            nodes_mask[t[chosen]] = True
            nodes_mask[h[chosen]] = True
            nodes_mask[term] = True
            again = _tree_and_prune(n, t, h, w, nodes_mask, is_terminal)
            again_total = totals.total(g.weight[again])
            if not again_total < total:
                break
            chosen, total = again, again_total
    else:
        chosen = np.empty(0, dtype=np.int64)

    # Trees of the result, and the bound per tree.
    comp = solve_trusted(t[chosen], h[chosen], w[chosen], n)
    lab = comp.labels[term]
    _, first, tree_of = np.unique(lab, return_index=True, return_inverse=True)
    rank = np.empty(first.shape[0], dtype=np.int64)
    rank[np.argsort(first, kind="stable")] = np.arange(first.shape[0])
    terminal_tree = rank[tree_of] if k else np.empty(0, dtype=np.int64)
    n_trees = int(first.shape[0])
    label_to_tree = np.full(comp.n_components, -1, dtype=np.int64)
    label_to_tree[lab] = terminal_tree
    k_tree = np.bincount(terminal_tree, minlength=n_trees)
    ratio = np.where(k_tree >= 2, 2.0 * (1.0 - 1.0 / np.maximum(k_tree, 1)), 1.0)
    ratio = np.maximum(ratio, 1.0)
    with np.errstate(over="ignore"):     # a tree heavier than float64 holds: inf
        w_tree = np.bincount(label_to_tree[comp.labels[t[chosen]]], weights=w[chosen],
                             minlength=n_trees) if chosen.shape[0] else np.zeros(n_trees)
        lower = float(np.sum(w_tree / ratio)) if n_trees else 0.0
    nodes = np.union1d(np.union1d(t[chosen], h[chosen]), term).astype(np.int64)
    return SteinerTree(chosen, g.tail[chosen], g.head[chosen], g.weight[chosen], term, nodes,
                       n_trees, terminal_tree, float(ratio.max()) if n_trees else 1.0, lower,
                       n, m)
