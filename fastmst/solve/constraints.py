"""Required and excluded edges: the lightest forest that keeps some links and avoids others.

Works on validated arrays (``fastmst.validation.EdgeArrays`` and checked positions) and returns
the fields of a ``SpanningForest`` as a dict, so that it sits below ``fastmst.solve.result``:
the public entry ``minimum_spanning_forest(..., required=, excluded=)`` validates once, calls
``constrained_forest`` and wraps the fields; ``SpanningForest.add_edges`` calls it too, to keep
a forest's required edges through an update.  ``run`` and ``forest_fields`` are the two steps
of every validated solve (a registered method, then the fields of its result).
"""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst._kernels.disjoint_set import first_appearance, labels_from_parent
from fastmst._kernels.paths import kruskal_tree, root_forest, union_parent
from fastmst.solve import methods, totals

_FUNC = "minimum_spanning_forest"


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


def run(g: validation.EdgeArrays, method: str, presorted: bool, maximize: bool,
        threads: int) -> tuple[methods.KernelResult, str]:
    """Run a registered method ("auto" resolved by ``methods.choose_method``) on valid edges;
    return its result and the method that ran."""
    if method == "auto":
        method = methods.choose_method(g, presorted, threads)
    return methods.RUNNERS[method](g, presorted, maximize, threads), method


def forest_fields(g: validation.EdgeArrays, r: methods.KernelResult, maximize: bool,
                  method: str, **extra) -> dict:
    """The keyword arguments of the ``SpanningForest`` of a kernel result on ``g`` (``extra``
    adds or overrides fields)."""
    fields = dict(edges=r.edges, tail=r.tail, head=r.head, weights=r.weights,
                  n_nodes=g.n_nodes, n_edges=g.n_edges, n_components=r.n_components,
                  labels=r.labels, maximize=maximize, method=method)
    fields.update(extra)
    return fields


def excess(fields: dict, free: dict, maximize: bool) -> float:
    """What the forest ``fields`` costs over the optimum ``free`` (fields of one graph): the
    exact difference of their totals over the edges they do not share, rounded once."""
    return totals.excess(fields["edges"], fields["weights"], free["edges"], free["weights"],
                         maximize)


def _solve_subgraph(g, keep: np.ndarray, group, n_nodes: int, opts: dict):
    """The optimal forest of the edges ``keep`` of ``g`` (endpoints mapped through ``group``
    when given); the edges are valid by construction, so nothing is checked again."""
    t, h = g.ktail[keep], g.khead[keep]
    if group is not None:
        t, h = group[t], group[h]
    sub = validation.trusted_edges(t, h, g.kweight[keep], n_nodes)
    return run(sub, opts["method"], opts["presorted"], opts["maximize"], opts["threads"])


def constrained_forest(g: validation.EdgeArrays, required: np.ndarray, excluded: np.ndarray, *,
                       method: str, presorted: bool, maximize: bool, threads: int) -> dict:
    """The optimal forest of validated edges that contains every ``required`` and no
    ``excluded`` position (both int64 arrays of positions in ``[0, n_edges)``, any order), as
    ``SpanningForest`` fields.

    The required edges are joined first (contracted); the rest of the forest is the optimal
    forest of the contracted graph without the excluded edges, under the same tie rule.  This
    is the one meaning of required and excluded in fastmst: ``check_forest``,
    ``sensitivity``, ``SpanningForest.clusters``/``add_edges`` and the command line measure a
    forest against this optimum (docs/toolkit.md, "Required and excluded links").  The
    result's ``required_excess`` is its weight minus the weight of the optimal forest of the
    graph without the excluded edges (that one minus this one when maximizing): what the
    requirement costs; that forest's fields are under ``free``.  ``method``, ``presorted``
    and ``threads`` are already checked.
    """
    e = g.n_edges
    req = np.unique(required)
    exc = np.unique(excluded)
    both = np.intersect1d(req, exc)
    if both.size:
        raise ValueError(f"{_FUNC}: positions {both[:10].tolist()} are both required and "
                         f"excluded; an edge can be only one of them. Remove them from one list.")
    allowed = np.ones(e, dtype=bool)
    allowed[exc] = False
    opts = dict(method=method, presorted=presorted, maximize=maximize, threads=threads)
    provenance = {"function": _FUNC, "n_required": int(req.size), "n_excluded": int(exc.size)}
    if req.size == 0:
        keep = np.flatnonzero(allowed)
        sub, used = _solve_subgraph(g, keep, None, g.n_nodes, opts)
        r = methods.kernel_result(g, keep[sub.edges], sub.labels, sub.n_components, maximize,
                                  True)
        return forest_fields(g, r, maximize, used, provenance=provenance, excluded=exc)
    rt = np.ascontiguousarray(g.ktail[req], dtype=np.int64)
    rh = np.ascontiguousarray(g.khead[req], dtype=np.int64)
    _, _, _, _, cycle = kruskal_tree(rt, rh, g.n_nodes)
    if cycle >= 0:
        raise _cycle_error(g, req, cycle)
    group, n_groups = labels_from_parent(union_parent(rt, rh, g.n_nodes))
    allowed[req] = False
    keep = np.flatnonzero(allowed)
    sub, used = _solve_subgraph(g, keep, group, n_groups, opts)
    edges = np.concatenate([req, keep[sub.edges]])
    labels, _ = first_appearance(np.ascontiguousarray(sub.labels[group], dtype=np.int64),
                                 sub.n_components)
    out = forest_fields(g, methods.kernel_result(g, edges, labels, sub.n_components, maximize,
                                                 False), maximize, used)
    allowed[req] = True
    free_keep = np.flatnonzero(allowed)
    sub, used = _solve_subgraph(g, free_keep, None, g.n_nodes, opts)
    free = forest_fields(g, methods.kernel_result(g, free_keep[sub.edges], sub.labels,
                                                  sub.n_components, maximize, True),
                         maximize, used, excluded=exc)
    out.update(required=req, excluded=exc, required_excess=excess(out, free, maximize),
               provenance=provenance, free=free)
    return out
