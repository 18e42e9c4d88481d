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

_NONE = np.empty(0, dtype=np.int64)


def validate_graph_with_forest(tail, head, weight, forest, n_nodes, maximize, threads, *,
                               name: str, func: str, strict_maximize: bool, required=None,
                               excluded=None):
    """Shared checks of the functions that take a graph and a forest of it.

    ``forest`` is a SpanningForest (its ``maximize``, ``n_nodes`` and edge count are used and
    checked against the graph), an array of edge positions or a boolean mask.  With
    ``strict_maximize`` an explicit ``maximize`` that contradicts a SpanningForest is an error.

    ``required``/``excluded`` (positions or boolean masks) default to those of a
    SpanningForest, else to none; a position in both is a ValueError.

    Returns
    -------
    g : EdgeArrays
    pos : ndarray of shape (F,), dtype=int64
        The forest's positions.
    in_forest : ndarray of shape (E,), dtype=bool
    maximize : bool
    threads : int
    req, exc : ndarray of int64
        The required and excluded positions, ascending and unique.
    """
    expected_edges = None
    constraints = (_NONE, _NONE)
    if isinstance(forest, SpanningForest):
        constraints = (forest.required, forest.excluded)
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
    req = np.unique(validation.check_positions(
        constraints[0] if required is None else required, g.n_edges, "required", func))
    exc = np.unique(validation.check_positions(
        constraints[1] if excluded is None else excluded, g.n_edges, "excluded", func))
    both = np.intersect1d(req, exc)
    if both.size:
        raise ValueError(f"{func}: positions {both[:10].tolist()} are both required and "
                         f"excluded; an edge can be only one of them. Remove them from one list.")
    return g, pos, in_forest, maximize, threads, req, exc


def constrained_order(fedges: np.ndarray, req: np.ndarray) -> np.ndarray:
    """Forest positions (``fedges`` in tie-rule order) with the required ones first.

    A merge tree built in this order makes the "heaviest" edge of a tree path its heaviest
    edge that is not required, and a required one only when the path has nothing else: the
    cycle condition of the optimum under constraints, where required edges are contracted.
    """
    if req.size == 0:
        return fedges
    is_req = np.isin(fedges, req)
    return np.concatenate([fedges[is_req], fedges[~is_req]])


def weight_gap(high: np.ndarray, low: np.ndarray) -> np.ndarray:
    """high - low (``high >= low`` elementwise, one weight dtype) as float64, the exact
    difference rounded once; equal values (infinities included) give 0.

    Integer weights are subtracted in uint64, modulo 2**64: the exact difference lies in
    [0, 2**64), so the wrapped result is exact, and one conversion rounds it.  Float weights
    are subtracted in float64, which rounds the exact difference once (float32 widens
    exactly); an overflow gives inf.
    """
    if high.dtype.kind in "iu":
        with np.errstate(over="ignore"):
            return (high.astype(np.uint64) - low.astype(np.uint64)).astype(np.float64)
    h = high.astype(np.float64)
    lo = low.astype(np.float64)
    with np.errstate(invalid="ignore", over="ignore"):
        return np.where(h == lo, 0.0, h - lo)


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
