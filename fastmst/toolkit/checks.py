"""Checks of the toolkit functions that take a graph together with a forest of it
(``check_forest``, ``sensitivity``).

The argument checks of the forest's own methods sit beside their code
(``fastmst.toolkit.bottleneck``, ``fastmst.toolkit.clusters``); the edge-list checks are in
``fastmst.validation``.
"""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst.solve.result import SpanningForest


def validate_graph_with_forest(tail, head, weight, forest, n_nodes, maximize, threads, *,
                               name: str, func: str, strict_maximize: bool):
    """Shared checks of the functions that take a graph and a forest of it.

    ``forest`` is a SpanningForest (its ``maximize``, ``n_nodes`` and edge count are used and
    checked against the graph), an array of edge positions or a boolean mask.  With
    ``strict_maximize`` an explicit ``maximize`` that contradicts a SpanningForest is an error.

    Returns
    -------
    g : EdgeArrays
    pos : ndarray of shape (F,), dtype=int64
        The forest's positions.
    in_forest : ndarray of shape (E,), dtype=bool
    maximize : bool
    threads : int
    """
    expected_edges = None
    if isinstance(forest, SpanningForest):
        if maximize is None:
            maximize = forest.maximize
        elif strict_maximize and bool(maximize) != forest.maximize:
            raise ValueError(f"{func}: maximize={validation.shown(maximize)} contradicts the "
                             f"forest, which is a "
                             f"{'maximum' if forest.maximize else 'minimum'} spanning forest; "
                             f"leave maximize out.")
        if n_nodes is None:
            n_nodes = forest.n_nodes
        expected_edges = forest.n_edges
        forest = forest.edges
    maximize = False if maximize is None else validation.check_bool(maximize, "maximize", func)
    threads = validation.check_threads(threads, func)
    g = validation.validate_edges(tail, head, weight, n_nodes, func=func)
    if expected_edges is not None and expected_edges != g.n_edges:
        raise ValueError(f"{func}: the forest was computed on a graph of {expected_edges} "
                         f"edges, received {g.n_edges}; pass the same edge list.")
    pos = validation.check_positions(forest, g.n_edges, name, func)
    in_forest = check_unique_positions(pos, g.n_edges, name, func)
    return g, pos, in_forest, maximize, threads


def check_unique_positions(pos: np.ndarray, n_edges: int, name: str, func: str) -> np.ndarray:
    """Reject repeated positions in an edge set (``pos`` from check_positions); return the
    boolean membership mask of shape (n_edges,)."""
    mask = np.zeros(n_edges, dtype=bool)
    mask[pos] = True
    if np.count_nonzero(mask) != pos.size:
        order = np.argsort(pos, kind="stable")
        s = pos[order]
        dup = np.flatnonzero(s[1:] == s[:-1])
        i, j = sorted((int(order[dup[0]]), int(order[dup[0] + 1])))
        raise ValueError(f"{func}: {name}[{j}] = {pos[j].item()} repeats {name}[{i}]; an edge set "
                         f"lists each edge position once. Deduplicate with np.unique({name}).")
    return mask
