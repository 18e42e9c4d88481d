"""Incremental update: the optimal forest after new candidate edges arrive.

Array level, below ``fastmst.solve.result``: ``add_edges`` returns the fields of the new
``SpanningForest``, which ``SpanningForest.add_edges`` wraps.
"""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst._kernels.rule_order import edge_order
from fastmst.solve.constraints import constrained_forest, excess, forest_fields, run

_FUNC = "SpanningForest.add_edges"


def add_edges(forest, tail, head, weight, n_nodes=None, required=None, excluded=None) -> dict:
    """Optimal forest of the old graph plus new edges; see ``SpanningForest.add_edges``.

    ``required``/``excluded`` name new edges by index (0..K-1).  Returns the fields of the new
    ``SpanningForest`` (a dict; with required edges, the fields of the updated optimum without
    them under ``free``).
    """
    new = validation.validate_edges(tail, head, weight, n_nodes, func=_FUNC)
    n = max(forest.n_nodes, new.n_nodes)
    k = new.n_edges
    req_new = np.unique(validation.check_positions(required, k, "required", _FUNC))
    exc_new = np.unique(validation.check_positions(excluded, k, "excluded", _FUNC))
    both = np.intersect1d(req_new, exc_new)
    if both.size:
        raise ValueError(f"{_FUNC}: new edges {both[:10].tolist()} are both required and "
                         f"excluded; an edge can be only one of them. Remove them from one list.")
    allowed = np.ones(k, dtype=bool)
    allowed[exc_new] = False
    usable = np.flatnonzero(allowed)             # new edges that may join the forest
    excluded_all = np.concatenate([forest.excluded, forest.n_edges + exc_new])
    constrained = forest.required.size > 0 or req_new.size > 0
    if not constrained:
        # The old forest is already in rule order and every new edge comes after every old
        # one by position, so the combined rule order is a merge: no sort of the old edges.
        order = np.arange(len(forest), dtype=np.int64)
        new_order = usable[edge_order(new.kweight[usable], forest.maximize)]
    else:
        order = np.argsort(forest.edges, kind="stable")
        new_order = usable
    old_pos = forest.edges[order]
    ids = [np.asarray(forest.tail)[order], new.tail[new_order], np.asarray(forest.head)[order],
           new.head[new_order]]
    if len({a.dtype for a in ids}) > 1:
        ids = [a.astype(np.int64) for a in ids]     # e.g. uint64 with int64 would give floats
    old_w = np.asarray(forest.weights)[order]
    new_w = new.weight[new_order]
    w = np.concatenate([old_w, new_w])
    if w.dtype.kind == "f" and (forest.weights.dtype.kind in "iu" or new.weight.dtype.kind in "iu"):
        # Mixed integer and float weights meet in float64; refuse if that rounds a weight.
        for part in (forest.weights, new.weight):
            # Compared as Python ints: |v| <= 2**53 is exactly what float64 holds.
            if part.dtype.kind in "iu" and part.size and \
                    max(-int(part.min()), int(part.max())) > 2**53:
                raise ValueError(f"{_FUNC}: integer weights above 2**53 cannot be compared "
                                 f"exactly with float weights; pass the new weights as "
                                 f"integers too (dtype {part.dtype}).")
    new_pos = forest.n_edges + new_order
    kk = new_order.shape[0]
    threads = validation.check_threads(None, _FUNC)
    provenance = {"function": _FUNC, "n_new_edges": k}
    if not constrained:
        # Slot of each new edge after every old edge of equal weight (old positions are smaller).
        if forest.maximize:
            at = len(old_w) - np.searchsorted(old_w[::-1], new_w, side="left")
        else:
            at = np.searchsorted(old_w, new_w, side="right")
        slot = at + np.arange(kk, dtype=np.int64)
        is_new = np.zeros(len(old_w) + kk, dtype=bool)
        is_new[slot] = True
        t, h = np.empty(is_new.size, ids[0].dtype), np.empty(is_new.size, ids[0].dtype)
        position = np.empty(is_new.size, np.int64)
        merged_w = np.empty(is_new.size, w.dtype)
        for dst, a, b in ((t, ids[0], ids[1]), (h, ids[2], ids[3]), (position, old_pos, new_pos),
                          (merged_w, old_w, new_w)):
            dst[~is_new] = a
            dst[is_new] = b
        # Valid by construction: ids of both validated lists in [0, n), weights without NaN.
        g = validation.trusted_edges(t, h, merged_w, n)
        sub, used = run(g, "auto", True, forest.maximize, threads)
        return forest_fields(g, sub._replace(edges=position[sub.edges]), forest.maximize, used,
                             n_edges=forest.n_edges + k, provenance=provenance,
                             excluded=excluded_all)
    t = np.concatenate(ids[:2])
    h = np.concatenate(ids[2:])
    position = np.concatenate([old_pos, new_pos])
    g = validation.trusted_edges(t, h, w, n)
    req = np.concatenate([np.searchsorted(old_pos, forest.required),
                          len(old_pos) + np.searchsorted(usable, req_new)])
    sub = constrained_forest(g, req, np.empty(0, dtype=np.int64), method="auto",
                             presorted=False, maximize=forest.maximize, threads=threads)
    # What the requirement costs is measured against the free optimum, updated alongside
    # (a forest without required edges is its own free optimum).
    base = forest._free if forest._free is not None else forest
    free = add_edges(base, tail, head, weight, n_nodes, excluded=exc_new)
    sub.update(edges=position[sub["edges"]], n_edges=forest.n_edges + k,
               required=np.concatenate([forest.required, forest.n_edges + req_new]),
               excluded=excluded_all, provenance=provenance, free=free)
    sub["required_excess"] = excess(sub, free, forest.maximize)
    return sub
