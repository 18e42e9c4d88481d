"""Required and excluded edges: the lightest forest that keeps some links and avoids others."""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst._kernels.dsu import labels_from_parent
from fastmst._kernels.paths import kruskal_tree, root_forest, union_parent

_FUNC = "minimum_spanning_forest"


def _first_appearance(x: np.ndarray) -> np.ndarray:
    """Relabel ids to 0..k-1 in order of first appearance."""
    if x.size == 0:
        return x.astype(np.int64)
    _, first, inv = np.unique(x, return_index=True, return_inverse=True)
    rank = np.empty(first.shape[0], dtype=np.int64)
    rank[np.argsort(first, kind="stable")] = np.arange(first.shape[0], dtype=np.int64)
    return rank[inv.reshape(-1)]


def _cycle_error(g, req: np.ndarray, at: int):
    """ValueError naming the required edges that form a cycle closed by ``req[at]``."""
    p = int(req[at])
    u, v = int(g.ktail[p]), int(g.khead[p])
    if u == v:
        return ValueError(f"{_FUNC}: required edge at position {p} is a self-loop ({u}-{v}) and "
                          f"can never be in a forest; drop it from required.")
    before = req[:at]
    bt = np.ascontiguousarray(g.ktail[before], dtype=np.int64)
    bh = np.ascontiguousarray(g.khead[before], dtype=np.int64)
    pnode, pedge, depth = root_forest(bt, bh, g.n_nodes)
    path = []
    while u != v:                      # climb from the deeper end until the ends meet
        if depth[u] < depth[v]:
            u, v = v, u
        path.append(int(before[pedge[u]]))
        u = int(pnode[u])
    cyc = sorted(path + [p])
    return ValueError(f"{_FUNC}: the required edges at positions {cyc} form a cycle, so no forest "
                      f"contains them all; drop at least one of them from required.")


def constrained_forest(tail, head, weight, n_nodes=None, *, required=None, excluded=None,
                       method="auto", presorted=False, maximize=False, threads=None):
    """The optimal forest that contains every ``required`` and no ``excluded`` position.

    Called by ``minimum_spanning_forest`` when ``required`` or ``excluded`` is given.  The
    required edges are joined first (contracted); the rest of the forest is the optimal forest
    of the contracted graph without the excluded edges, under the same tie rule.  The result's
    ``required_excess`` is its weight minus the weight of the optimal forest of the graph without
    the excluded edges (that one minus this one when maximizing): what the requirement costs.
    """
    from fastmst.solve.solve import build_forest, minimum_spanning_forest, METHODS
    g = validation.validate_edges(tail, head, weight, n_nodes, func=_FUNC)
    validation.check_choice(method, METHODS, "method", _FUNC)
    maximize = validation.check_bool(maximize, "maximize", _FUNC)
    e = g.n_edges
    req = np.unique(validation.check_positions(required, e, "required", _FUNC))
    exc = np.unique(validation.check_positions(excluded, e, "excluded", _FUNC))
    both = np.intersect1d(req, exc)
    if both.size:
        raise ValueError(f"{_FUNC}: positions {both[:10].tolist()} are both required and "
                         f"excluded; an edge can be only one of them. Remove them from one list.")
    allowed = np.ones(e, dtype=bool)
    allowed[exc] = False
    opts = dict(method=method, presorted=presorted, maximize=maximize, threads=threads)
    if req.size == 0:
        keep = np.flatnonzero(allowed)
        sub = minimum_spanning_forest(g.ktail[keep], g.khead[keep], g.kweight[keep], g.n_nodes,
                                      **opts)
        out = build_forest(g, keep[sub.edges], sub.labels, sub.n_components, maximize,
                           sub.method, True)
        out.required_excess = 0.0
        return out
    rt = np.ascontiguousarray(g.ktail[req], dtype=np.int64)
    rh = np.ascontiguousarray(g.khead[req], dtype=np.int64)
    _, _, _, _, cycle = kruskal_tree(rt, rh, g.n_nodes)
    if cycle >= 0:
        raise _cycle_error(g, req, cycle)
    group, n_groups = labels_from_parent(union_parent(rt, rh, g.n_nodes))
    allowed[req] = False
    keep = np.flatnonzero(allowed)
    sub = minimum_spanning_forest(group[g.ktail[keep]], group[g.khead[keep]], g.kweight[keep],
                                  n_groups, **opts)
    edges = np.concatenate([req, keep[sub.edges]])
    labels = _first_appearance(sub.labels[group])
    out = build_forest(g, edges, labels, sub.n_components, maximize, sub.method, False)
    allowed[req] = True
    free_keep = np.flatnonzero(allowed)
    free = minimum_spanning_forest(g.ktail[free_keep], g.khead[free_keep], g.kweight[free_keep],
                                   g.n_nodes, **opts)
    out.required_excess = (free.weight - out.weight) if maximize else (out.weight - free.weight)
    out.__dict__["_required"] = req
    out.__dict__["_free"] = build_forest(g, free_keep[free.edges], free.labels, free.n_components,
                                         maximize, free.method, True)
    return out
