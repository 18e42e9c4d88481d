"""check_forest: is a given edge set an optimal spanning forest, and if not, why not."""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from fastmst.solve import totals
from fastmst.solve.solve import solve_validated
from fastmst.toolkit.checks import validate_graph_with_forest
from fastmst._kernels.tie_rule import sort_positions
from fastmst.toolkit.pathmax import heaviest_on_paths, merge_tree

_FUNC = "check_forest"


@dataclass(frozen=True)
class ForestCheck:
    """Result of ``check_forest``.

    Attributes
    ----------
    is_forest : bool
        The edges contain no cycle (no self-loop, no two parallel edges).
    is_spanning : bool
        One tree per connected component of the graph: no edge of the graph joins two of the
        given trees.  False when ``is_forest`` is False.
    is_minimum : bool
        A spanning forest that satisfies the cycle condition (a maximum one with ``maximize``).
    violations : ndarray of shape (K,), dtype=int64
        Positions, ascending, of the non-tree edges strictly lighter (heavier with ``maximize``)
        than the heaviest (lightest) edge on their tree path.  Empty when not a forest.
    replaces : ndarray of shape (K,), dtype=int64
        For each violation, the position of that tree edge: adding ``violations[i]`` and
        removing ``replaces[i]`` gives a strictly better spanning forest.
    excess : float
        Weight of the given forest minus the optimum (optimum minus it with ``maximize``),
        the exact difference over the edges the two do not share, rounded once (+inf when an
        infinite weight makes the difference); 0.0 when minimum, NaN when the edges are not a
        spanning forest.
    cycle : int
        Position of the first given edge (in tie-rule order) that closes a cycle, or -1.
    crossing : ndarray of shape (C,), dtype=int64
        Positions of the graph's edges that join two different given trees (they show why the
        forest is not spanning).
    """
    is_forest: bool
    is_spanning: bool
    is_minimum: bool
    violations: np.ndarray
    replaces: np.ndarray
    excess: float
    cycle: int
    crossing: np.ndarray

    def __bool__(self) -> bool:
        return self.is_minimum


def _empty():
    return np.empty(0, dtype=np.int64)


def check_forest(tail, head, weight, edges, n_nodes=None, *, maximize=None,
                 threads=None) -> ForestCheck:
    """Certify that ``edges`` is a minimum (or maximum) spanning forest of the graph.

    Parameters
    ----------
    tail, head, weight : array_like of shape (E,)
        The graph, as for ``minimum_spanning_forest``.
    edges : array_like of int, boolean mask of shape (E,), or SpanningForest
        The positions of the forest to check (each at most once).
    n_nodes : int, optional
        Number of nodes; defaults to the largest id + 1.
    maximize : bool, optional
        Check for a maximum spanning forest.  Defaults to ``edges.maximize`` for a
        SpanningForest, False otherwise.
    threads : int, optional
        Worker threads for the path queries; None or <= 0 means every available core.  The
        answer does not depend on it.

    Returns
    -------
    ForestCheck
        ``is_forest``, ``is_spanning``, ``is_minimum``, ``violations``, ``replaces``,
        ``excess``, ``cycle``, ``crossing``.

    Notes
    -----
    The test is the cycle condition: a spanning forest is minimum exactly when every non-tree
    edge weighs at least as much as the heaviest edge on its tree path (Komlós, "Linear
    verification for spanning trees", 1985; King, "A simpler minimum spanning tree
    verification algorithm", 1997).  Ties are allowed: any of several equally light forests
    passes, not only the one the tie rule of ``minimum_spanning_forest`` picks.  The heaviest
    path edge of every non-tree edge is the lowest common ancestor of its ends in the forest's
    merge tree, found by range maxima over the tree's leaf order: O(V log V) to sort the forest
    edges and build, then O(1) per non-tree edge.
    ``excess`` needs a full solve only when there are violations.

    Examples
    --------
    >>> import fastmst
    >>> c = fastmst.check_forest([0, 1, 0], [1, 2, 2], [1.0, 2.0, 1.5], [0, 1])
    >>> c.is_minimum, c.violations.tolist(), c.replaces.tolist(), c.excess
    (False, [2], [1], 0.5)
    """
    g, pos, in_forest, maximize, threads = validate_graph_with_forest(
        tail, head, weight, edges, n_nodes, maximize, threads, name="edges", func=_FUNC,
        strict_maximize=False)
    order = sort_positions(pos, g.kweight, maximize)
    tree, cycle = merge_tree(g.ktail[order], g.khead[order], order, g.n_nodes)
    if tree is None:
        return ForestCheck(False, False, False, _empty(), _empty(), math.nan,
                           int(order[cycle]), _empty())
    non = np.flatnonzero(~in_forest)
    idx = heaviest_on_paths(tree, g.ktail[non], g.khead[non], threads)
    crossing = non[idx == -1]
    inner = idx >= 0
    cand = non[inner]
    hidx = idx[inner]
    heavy = tree.edges[hidx]
    # Forest weights gathered once: the per-edge lookups then stay in a V-sized array.
    hw = g.kweight[tree.edges][hidx]
    cw = g.kweight[cand]
    worse = (cw > hw) if maximize else (cw < hw)
    violations = cand[worse]
    replaces = heavy[worse]
    is_spanning = crossing.size == 0
    is_minimum = bool(is_spanning and violations.size == 0)
    if not is_spanning:
        excess = math.nan
    elif is_minimum:
        excess = 0.0
    else:
        best = solve_validated(g, maximize=maximize, threads=threads)
        excess = totals.excess(pos, g.weight[pos], best.edges, best.weights, maximize)
    return ForestCheck(True, bool(is_spanning), is_minimum, violations, replaces, float(excess),
                       -1, crossing)
