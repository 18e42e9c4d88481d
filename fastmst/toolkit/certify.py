"""check_forest: is a given edge set an optimal spanning forest, and if not, why not."""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from fastmst.solve import totals
from fastmst.solve.constraints import constrained_forest
from fastmst.solve.solve import solve_validated
from fastmst.toolkit.checks import constrained_order, validate_graph_with_forest, weight_gap
from fastmst._kernels.rule_order import sort_positions
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
        One tree per connected component of the graph without its excluded edges: no allowed
        edge joins two of the given trees.  False when ``is_forest`` is False.
    is_minimum : bool
        A spanning forest that contains every required edge, no excluded edge, and satisfies
        the cycle condition under those constraints (a maximum one with ``maximize``).
    violations : ndarray of shape (K,), dtype=int64
        Positions, ascending, of the allowed non-tree edges strictly lighter (heavier with
        ``maximize``) than the heaviest (lightest) edge on their tree path that is not
        required.  Empty when not a forest.
    replaces : ndarray of shape (K,), dtype=int64
        For each violation, the position of that tree edge: adding ``violations[i]`` and
        removing ``replaces[i]`` gives a strictly better spanning forest that keeps every
        required edge and uses no excluded one.
    excess : float
        Weight of the given forest minus the optimum under the same constraints (optimum
        minus it with ``maximize``), the exact difference over the edges the two do not share,
        rounded once (+inf when an infinite weight makes the difference); 0.0 when minimum, NaN
        when the edges are not a spanning forest or break a constraint.
    cycle : int
        Position of the first given edge (in tie-rule order) that closes a cycle, or -1.
    crossing : ndarray of shape (C,), dtype=int64
        Positions of the allowed edges that join two different given trees (they show why
        the forest is not spanning).
    savings : ndarray of shape (K,), dtype=float64
        For each violation, what its swap saves: the weight of ``replaces[i]`` minus that of
        ``violations[i]`` (the reverse with ``maximize``), the exact difference rounded once;
        always > 0.
    missing_required : ndarray of int64
        Required positions that the given edges lack.
    used_excluded : ndarray of int64
        Excluded positions that the given edges use.
    """
    is_forest: bool
    is_spanning: bool
    is_minimum: bool
    violations: np.ndarray
    replaces: np.ndarray
    excess: float
    cycle: int
    crossing: np.ndarray
    savings: np.ndarray = field(default_factory=lambda: _empty().astype(np.float64))
    missing_required: np.ndarray = field(default_factory=lambda: _empty())
    used_excluded: np.ndarray = field(default_factory=lambda: _empty())

    def __bool__(self) -> bool:
        return self.is_minimum

    def best_swaps(self):
        """One swap per removed edge, the one that saves most, ranked by saving.

        Returns ``(add, remove, saving)``: arrays of equal length, ``saving`` descending (ties
        by ``remove`` position, then ``add`` position).  For each forest edge that some
        profitable swap removes, ``add`` is the edge whose swap saves most (the earliest
        position among equal savings).  Each swap is measured against the given forest on its
        own; after one swap the others must be checked again (``check_forest``).

        >>> import fastmst
        >>> c = fastmst.check_forest([0, 1, 0, 0], [1, 2, 2, 2], [1.0, 5.0, 2.0, 3.0], [0, 1])
        >>> [a.tolist() for a in c.best_swaps()]
        [[2], [1], [3.0]]
        """
        if self.violations.size == 0:
            return _empty(), _empty(), np.empty(0, dtype=np.float64)
        order = np.lexsort((self.violations, -self.savings, self.replaces))
        r = self.replaces[order]
        first = np.ones(r.size, dtype=bool)
        first[1:] = r[1:] != r[:-1]
        add, rem, sav = self.violations[order][first], r[first], self.savings[order][first]
        rank = np.lexsort((add, rem, -sav))
        return add[rank], rem[rank], sav[rank]


def _empty():
    return np.empty(0, dtype=np.int64)


def check_forest(tail, head, weight, edges, n_nodes=None, *, maximize=None,
                 threads=None, required=None, excluded=None) -> ForestCheck:
    """Certify that ``edges`` is a minimum (or maximum) spanning forest of the graph, under
    required and excluded edges when given.

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
    required, excluded : array_like of int or boolean mask of shape (E,), optional
        Positions the forest must contain and positions it may not use, as for
        ``minimum_spanning_forest``; default those of a SpanningForest, else none.  The
        forest is then checked against the optimum under these constraints: the optimal
        forest that contains the required edges and avoids the excluded ones.

    Returns
    -------
    ForestCheck
        ``is_forest``, ``is_spanning``, ``is_minimum``, ``violations``, ``replaces``,
        ``savings``, ``excess``, ``cycle``, ``crossing``, ``missing_required``,
        ``used_excluded``; ``best_swaps()`` ranks one swap per removed edge.

    Notes
    -----
    The test is the cycle condition: a spanning forest is minimum exactly when every non-tree
    edge weighs at least as much as the heaviest edge on its tree path (Komlós, "Linear
    verification for spanning trees", 1985; King, "A simpler minimum spanning tree
    verification algorithm", 1997).  Under constraints the required edges are contracted and
    the excluded ones removed, so the condition compares each allowed non-tree edge with the
    heaviest *non-required* edge on its path, and a swap never removes a required edge or adds
    an excluded one.  Ties are allowed: any of several equally light forests passes, not only
    the one the tie rule of ``minimum_spanning_forest`` picks.  The heaviest path edge of every
    non-tree edge is the lowest common ancestor of its ends in the forest's merge tree, found
    by range maxima over the tree's leaf order: O(V log V) to sort the forest edges and build,
    then O(1) per non-tree edge.  ``excess`` needs a full solve only when there are violations.

    Examples
    --------
    >>> import fastmst
    >>> c = fastmst.check_forest([0, 1, 0], [1, 2, 2], [1.0, 2.0, 1.5], [0, 1])
    >>> c.is_minimum, c.violations.tolist(), c.replaces.tolist(), c.excess
    (False, [2], [1], 0.5)
    >>> fastmst.check_forest([0, 1, 0], [1, 2, 2], [1.0, 2.0, 1.5], [0, 1], required=[1]).is_minimum
    True
    """
    g, pos, in_forest, maximize, threads, req, exc = validate_graph_with_forest(
        tail, head, weight, edges, n_nodes, maximize, threads, name="edges", func=_FUNC,
        strict_maximize=False, required=required, excluded=excluded)
    missing = req[~in_forest[req]]
    used = exc[in_forest[exc]]
    order = constrained_order(sort_positions(pos, g.kweight, maximize), req)
    tree, cycle = merge_tree(g.ktail[order], g.khead[order], order, g.n_nodes)
    if tree is None:
        return ForestCheck(False, False, False, _empty(), _empty(), math.nan,
                           int(order[cycle]), _empty(), missing_required=missing,
                           used_excluded=used)
    allowed = ~in_forest
    allowed[exc] = False
    non = np.flatnonzero(allowed)
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
    if req.size:
        worse &= ~np.isin(heavy, req)      # a required edge is never swapped out
    violations = cand[worse]
    replaces = heavy[worse]
    savings = weight_gap(cw[worse], hw[worse]) if maximize else weight_gap(hw[worse], cw[worse])
    is_spanning = crossing.size == 0
    kept = missing.size == 0 and used.size == 0
    is_minimum = bool(is_spanning and kept and violations.size == 0)
    if not is_spanning or not kept:
        excess = math.nan
    elif is_minimum:
        excess = 0.0
    elif req.size or exc.size:
        best = constrained_forest(g, req, exc, method="auto", presorted=False,
                                  maximize=maximize, threads=threads)
        excess = totals.excess(pos, g.weight[pos], best["edges"], best["weights"], maximize)
    else:
        best = solve_validated(g, maximize=maximize, threads=threads)
        excess = totals.excess(pos, g.weight[pos], best.edges, best.weights, maximize)
    return ForestCheck(True, bool(is_spanning), is_minimum, violations, replaces, float(excess),
                       -1, crossing, savings, missing, used)
