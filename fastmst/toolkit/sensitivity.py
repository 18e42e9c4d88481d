"""sensitivity: how far each edge weight may move before the optimal forest changes."""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst._kernels.paths import cover_paths, root_forest
from fastmst._kernels.rule_order import edge_order, sort_positions
from fastmst.toolkit.checks import constrained_order, validate_graph_with_forest, weight_gap
from fastmst.toolkit.pathmax import heaviest_on_paths, merge_tree

_FUNC = "sensitivity"


def sensitivity(tail, head, weight, forest, *, maximize=None, threads=None,
                return_partner=False, required=None, excluded=None):
    """Per-edge sensitivity of an optimal spanning forest (Tarjan 1982).

    Parameters
    ----------
    tail, head, weight : array_like of shape (E,)
        The graph, as for ``minimum_spanning_forest``.
    forest : SpanningForest, or array_like of int or boolean mask of shape (E,)
        The optimal forest of this graph (positions of its edges).
    maximize : bool, optional
        The forest is a maximum spanning forest.  Defaults to ``forest.maximize`` for a
        SpanningForest, False otherwise.
    threads : int, optional
        Worker threads for the path queries; None or <= 0 means every available core.  The
        answer does not depend on it.
    return_partner : bool
        Also return, for each edge, the edge it would swap with at its margin.
    required, excluded : array_like of int or boolean mask of shape (E,), optional
        The constraints the forest was solved under, as for ``minimum_spanning_forest``;
        default those of a SpanningForest, else none.  Margins are then those of the optimum
        under the constraints: a required edge stays and an excluded one stays out at any
        weight (margin inf, partner -1), a forest edge is only replaced by an allowed edge, and
        a non-tree edge only replaces an edge that is not required (inf when its whole tree
        path is required).

    Returns
    -------
    margin : ndarray of shape (E,), dtype=float64, indexed by input position
        For a forest edge: how far its weight may rise before it leaves the optimal forest, the
        weight of the lightest non-tree edge whose tree path contains it minus its own weight
        (inf for a bridge of the graph).  For a non-tree edge: how far its weight must fall
        before it can enter, its weight minus the heaviest edge on its tree path.  inf for
        self-loops.  Always >= 0.  With ``maximize`` the directions swap: a forest edge may
        fall by its margin, a non-tree edge must rise by it.
    partner : ndarray of shape (E,), dtype=int64, only with ``return_partner=True``
        For a forest edge, the covering non-tree edge that would replace it (the lightest, and
        the earliest among equal weights); for a non-tree edge, the forest edge it would
        replace (the heaviest on its path, the latest among equal weights); -1 for bridges and
        self-loops.

    Raises
    ------
    ValueError
        When ``forest`` has a cycle, does not span the graph's components, or is not optimal
        (``check_forest`` lists every violation).

    Notes
    -----
    Boundary case, under the tie rule of ``minimum_spanning_forest`` (equal weights: the earlier
    position wins).  A forest edge raised by exactly its margin ties with the covering edge; it
    stays when its position is earlier, otherwise the covering edge replaces it.  A non-tree
    edge lowered by exactly its margin ties with the heaviest path edge (the latest position
    among the heaviest); it enters when its position is earlier than that edge's.  For any
    smaller move the forest stays the same; for any larger one it changes.

    Each margin is the exact difference of two weights rounded once to float64 (so a margin
    between integer weights beyond 2**53 is exact whenever float64 can hold it); the forest
    and the partners are found by comparing the weights in their own dtype.  Non-tree edges
    get their heaviest path edge from range maxima over the merge tree's leaf order; forest
    edges get their lightest covering edge by taking the non-tree edges in tie-rule order and
    marking the unmarked edges of each tree path, jumping over marked ones with a disjoint set
    (Tarjan, "Sensitivity analysis of minimum spanning trees and shortest path trees", 1982).
    O(E log E) for one sort of the non-tree edges, near-linear otherwise.

    Examples
    --------
    >>> import fastmst
    >>> t, h, w = [0, 1, 0, 2], [1, 2, 2, 3], [1.0, 2.0, 4.0, 3.0]
    >>> f = fastmst.minimum_spanning_forest(t, h, w)
    >>> fastmst.sensitivity(t, h, w, f).tolist()
    [3.0, 2.0, 2.0, inf]
    """
    g, pos, in_forest, maximize, threads, req, exc = validate_graph_with_forest(
        tail, head, weight, forest, None, maximize, threads, name="forest", func=_FUNC,
        strict_maximize=True, required=required, excluded=excluded)
    missing = req[~in_forest[req]]
    used = exc[in_forest[exc]]
    if missing.size or used.size:
        what = (f"lacks the required edge at position {missing[0]}" if missing.size else
                f"uses the excluded edge at position {used[0]}")
        raise ValueError(f"{_FUNC}: the forest {what}; pass the forest solved under these "
                         f"constraints (minimum_spanning_forest(..., required=, excluded=)), or "
                         f"the constraints it was solved under.")
    fedges = constrained_order(sort_positions(pos, g.kweight, maximize), req)
    ftail, fhead = g.ktail[fedges], g.khead[fedges]
    tree, cycle = merge_tree(ftail, fhead, fedges, g.n_nodes)
    if tree is None:
        p = int(fedges[cycle])
        raise ValueError(f"{_FUNC}: the forest is not acyclic: the edge at position {p} "
                         f"({g.tail[p]}-{g.head[p]}) closes a cycle with other forest edges. "
                         f"Pass the edges of a spanning forest, e.g. minimum_spanning_forest(...).")
    return_partner = validation.check_bool(return_partner, "return_partner", _FUNC)
    out = np.full(g.n_edges, np.inf, dtype=np.float64)
    partner = np.full(g.n_edges, -1, dtype=np.int64) if return_partner else None
    allowed = ~in_forest & (g.ktail != g.khead)
    allowed[exc] = False
    non = np.flatnonzero(allowed)
    idx = heaviest_on_paths(tree, g.ktail[non], g.khead[non], threads)
    if non.size and idx.min() == -1:
        p = int(non[np.flatnonzero(idx == -1)[0]])
        raise ValueError(f"{_FUNC}: the forest does not span the graph: the edge at position "
                         f"{p} ({g.tail[p]}-{g.head[p]}) joins two of its trees. Pass the optimal "
                         f"spanning forest of this graph (minimum_spanning_forest(...)) and "
                         f"the same required/excluded edges.")
    heavy = fedges[idx]
    # Forest weights gathered once: the per-edge lookups then stay in a V-sized array.
    hw = g.kweight[fedges][idx]
    nw = g.kweight[non]
    worse = (nw > hw) if maximize else (nw < hw)
    stuck = np.isin(heavy, req) if req.size else None   # paths of required edges only
    if stuck is not None:
        worse &= ~stuck
    if worse.any():
        i = int(np.flatnonzero(worse)[0])
        raise ValueError(f"{_FUNC}: the forest is not {'maximum' if maximize else 'minimum'}: "
                         f"the non-tree edge at position {non[i]} (weight "
                         f"{validation.shown(g.weight[non[i]])}) beats the forest edge at "
                         f"position {heavy[i]} (weight {validation.shown(g.weight[heavy[i]])}) "
                         f"on its tree path. check_forest(...) lists "
                         f"every such pair; minimum_spanning_forest(...) gives the optimum "
                         f"(with the same required=/excluded= when the forest was solved under "
                         f"constraints).")
    out[non] = weight_gap(hw, nw) if maximize else weight_gap(nw, hw)
    if return_partner:
        partner[non] = heavy
    if stuck is not None:      # its tree path is all required: it can never enter
        out[non[stuck]] = np.inf
        if return_partner:
            partner[non[stuck]] = -1
    del idx, heavy, worse, hw, nw
    if fedges.size:
        # Lightest first (heaviest first when maximizing).  Equal weights give equal margins,
        # so the order among ties does not matter and the faster unstable sort will do.
        # With partners the tie rule picks the one reported, so the order is the stable one.
        if return_partner:
            ranked = non[edge_order(g.kweight[non], maximize)]
        else:
            order = np.argsort(g.kweight[non])
            ranked = non[order[::-1] if maximize else order]
        pnode, pedge, depth = root_forest(np.ascontiguousarray(ftail),
                                          np.ascontiguousarray(fhead), g.n_nodes)
        cover, _ = cover_paths(pnode, pedge, depth, fedges.shape[0],
                               np.ascontiguousarray(g.ktail[ranked]),
                               np.ascontiguousarray(g.khead[ranked]))
        has = cover >= 0
        f_has = fedges[has]
        c_has = ranked[cover[has]]
        out[f_has] = weight_gap(g.kweight[f_has], g.kweight[c_has]) if maximize else \
            weight_gap(g.kweight[c_has], g.kweight[f_has])
        if return_partner:
            partner[f_has] = c_has
    if req.size:               # required edges stay at any weight
        out[req] = np.inf
        if return_partner:
            partner[req] = -1
    return (out, partner) if return_partner else out
