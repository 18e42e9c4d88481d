"""Argument checks of the network-design functions (``fastmst.design``).

Every check raises TypeError for a wrong type and ValueError for a wrong value, with what was
received, what was expected and how to fix it, before anything large is allocated.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from fastmst import validation
from fastmst._kernels.paths import cover_paths, root_forest
from fastmst._kernels.treewalk import sides_beyond
from fastmst.solve import SpanningForest, minimum_spanning_forest
from fastmst.toolkit.checks import check_unique_positions


@dataclass(frozen=True)
class Design:
    """A validated graph with a spanning forest of its usable links, rooted."""
    g: validation.EdgeArrays
    fpos: np.ndarray        # (F,) int64 positions of the forest's links
    in_forest: np.ndarray   # (E,) bool
    usable: np.ndarray      # (E,) bool: not excluded
    pnode: np.ndarray       # (V,) int64 parent node, -1 at tree tops (smallest node of a tree)
    pedge: np.ndarray       # (V,) int64 index into fpos of the link to the parent, -1 at tops
    depth: np.ndarray       # (V,) int64
    beyond: np.ndarray      # (V,) int64 nodes beyond each node's link to its parent, seen
    #                         from the root given to graph_and_design (sides_beyond)
    others: np.ndarray      # positions of the usable links outside the forest, no self-loops
    root: int               # the checked root, -1 for none


def graph_and_design(tail, head, weight, forest, n_nodes, excluded, func: str,
                     root=None) -> Design:
    """The graph, its usable links and a spanning forest of them.

    ``forest`` None means the minimum spanning forest of the usable links (every link not in
    ``excluded``); otherwise it is a SpanningForest, edge positions or a boolean mask, and must
    be a spanning forest of the usable links: no cycle, no excluded link, and every usable link
    outside it joins two nodes of one of its trees.  ``root`` (a node id or None, checked
    here) is the node from which ``beyond`` counts the sides of each link.
    """
    expected = None
    if isinstance(forest, SpanningForest):
        if forest.maximize:
            raise ValueError(f"{func}: forest is a maximum spanning forest; the design tools "
                             f"work with costs to be kept low. Pass a minimum spanning forest "
                             f"or the positions of your own design.")
        expected = forest.n_edges
        if n_nodes is None:
            n_nodes = forest.n_nodes
        forest = forest.edges
    g = validation.validate_edges(tail, head, weight, n_nodes, func=func)
    if expected is not None and expected != g.n_edges:
        raise ValueError(f"{func}: the forest was computed on a graph of {expected} edges, "
                         f"received {g.n_edges}; pass the same edge list.")
    root = check_node(root, g.n_nodes, "root", func)
    usable = np.ones(g.n_edges, dtype=bool)
    if excluded is not None:
        xpos = validation.check_positions(excluded, g.n_edges, "excluded", func)
        usable[xpos] = False
    if forest is None:
        # without exclusions, the plain solve (the constrained one costs more, same forest)
        fpos = minimum_spanning_forest(g.tail, g.head, g.weight, g.n_nodes,
                                       excluded=None if excluded is None else
                                       np.flatnonzero(~usable)).edges
        fpos = np.asarray(fpos, dtype=np.int64)
        in_forest = np.zeros(g.n_edges, dtype=bool)
        in_forest[fpos] = True
    else:
        fpos = validation.check_positions(forest, g.n_edges, "forest", func)
        in_forest = check_unique_positions(fpos, g.n_edges, "forest", func)
        bad = np.flatnonzero(~usable[fpos])
        if bad.size:
            p = int(fpos[bad[0]])
            raise ValueError(f"{func}: forest holds the excluded link at position {p}; a "
                             f"design may use only links that are not excluded. Drop it from "
                             f"the forest or from excluded.")
    ft = np.ascontiguousarray(g.ktail[fpos])
    fh = np.ascontiguousarray(g.khead[fpos])
    pnode, pedge, depth = root_forest(ft, fh, g.n_nodes)
    if forest is not None:
        # breadth-first search reaches every node once: it uses every link of an acyclic set,
        # and leaves out one link of every cycle
        used = np.zeros(fpos.shape[0], dtype=bool)
        used[pedge[pedge >= 0]] = True
        if not used.all():
            p = int(fpos[np.flatnonzero(~used)[0]])
            raise ValueError(f"{func}: the forest is not acyclic: the link at position {p} "
                             f"({g.tail[p]}-{g.head[p]}) closes a cycle with other forest "
                             f"links. Pass the links of a spanning forest, e.g. "
                             f"minimum_spanning_forest(...).edges.")
    beyond, top, _ = sides_beyond(pnode, depth, root)
    others = np.flatnonzero(usable & ~in_forest & (g.ktail != g.khead))
    d = Design(g, fpos, in_forest, usable, pnode, pedge, depth, beyond, others, root)
    if forest is not None:
        split = np.flatnonzero(top[g.ktail[others]] != top[g.khead[others]])
        if split.size:
            p = int(others[split[0]])
            raise ValueError(f"{func}: the forest does not span the usable links: the link at "
                             f"position {p} ({g.tail[p]}-{g.head[p]}) joins two of its trees. "
                             f"Pass a spanning forest (minimum_spanning_forest(...).edges) or "
                             f"exclude that link.")
    return d


def covering(d: Design, ranked: np.ndarray) -> np.ndarray:
    """For every forest link (in ``d.fpos`` order), the first link of ``ranked`` (positions of
    usable non-forest links, in priority order) whose tree path holds it; -1 where none does."""
    g = d.g
    ranked = np.asarray(ranked, dtype=np.int64)
    cover, _ = cover_paths(d.pnode, d.pedge, d.depth, d.fpos.shape[0],
                           np.ascontiguousarray(g.ktail[ranked]),
                           np.ascontiguousarray(g.khead[ranked]))
    if not ranked.size:
        return cover
    return np.where(cover >= 0, ranked[np.maximum(cover, 0)], -1)


def check_node(value, n_nodes: int, name: str, func: str, allow_none: bool = True):
    """A node id in [0, n_nodes) (or None) as an int, -1 for None."""
    if value is None and allow_none:
        return -1
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
        raise TypeError(f"{func}: {name} must be a node id (an integer), received "
                        f"{type(value).__name__} {validation.shown(value)}; for a label, look "
                        f"it up in the EdgeList's labels first.")
    v = int(value)
    if not 0 <= v < n_nodes:
        raise ValueError(f"{func}: {name} = {v} is not a node; expected an id in "
                         f"[0, {n_nodes}).")
    return v


def check_alpha(alpha, func: str) -> float:
    """The stretch factor of a light shallow tree: a finite real number > 1."""
    a = validation.check_real(alpha, "alpha", func)
    if not (a > 1.0 and math.isfinite(a)):
        raise ValueError(f"{func}: alpha = {validation.shown(alpha)}; expected a finite number "
                         f"> 1 (every site's route to the root at most alpha times its "
                         f"shortest path), e.g. alpha=2.")
    return a


def check_demand(demand, n_nodes: int, func: str) -> np.ndarray:
    """Site demands: None (1 per site) or n_nodes finite, non-negative reals; float64 copy."""
    if demand is None:
        return np.ones(n_nodes, dtype=np.float64)
    arr = np.asarray(demand)
    if arr.dtype.kind not in "iuf" or arr.dtype.kind == "b":
        raise TypeError(f"{func}: demand must hold numbers (one per site), received dtype "
                        f"{arr.dtype}; e.g. demand=np.ones(n_nodes).")
    if arr.shape != (n_nodes,):
        raise ValueError(f"{func}: demand must have shape ({n_nodes},), one entry per node, "
                         f"received shape {arr.shape}.")
    d = arr.astype(np.float64)
    bad = np.flatnonzero(~np.isfinite(d) | (d < 0))
    if bad.size:
        i = int(bad[0])
        raise ValueError(f"{func}: demand[{i}] = {validation.shown(arr[i])}; expected a "
                         f"finite demand >= 0 at every site.")
    return d


def check_capacity(capacity, func: str) -> float:
    """A positive finite capacity per subtree."""
    c = validation.check_real(capacity, "capacity", func)
    if not (c > 0 and math.isfinite(c)):
        raise ValueError(f"{func}: capacity = {validation.shown(capacity)}; expected a finite "
                         f"number > 0 (the most demand one subtree from the root may carry).")
    return c


def check_nonnegative(g, usable, func: str, what: str):
    """Costs of usable links must be >= 0 (shortest paths and the approximation bounds need
    it)."""
    w = g.weight
    if w.dtype.kind == "u" or not g.n_edges:
        return
    neg = np.flatnonzero(usable & (w < 0))
    if neg.size:
        p = int(neg[0])
        raise ValueError(f"{func}: the link at position {p} has weight "
                         f"{validation.shown(w[p])} < 0; {what} needs weights >= 0. Shift or "
                         f"clip the weights, or exclude that link.")
