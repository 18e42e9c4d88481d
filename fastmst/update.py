"""Incremental update: the optimal forest after new candidate edges arrive."""
from __future__ import annotations

import numpy as np

from fastmst import validation

_FUNC = "SpanningForest.add_edges"


def add_edges(forest, tail, head, weight, n_nodes=None):
    """Optimal forest of the old graph plus new edges; see ``SpanningForest.add_edges``."""
    from fastmst.forest import SpanningForest, minimum_spanning_forest
    new = validation.validate_edges(tail, head, weight, n_nodes, func=_FUNC)
    n = max(forest.n_nodes, new.n_nodes)
    k = new.n_edges
    order = np.argsort(forest.edges, kind="stable")
    old_pos = forest.edges[order]
    ids = [np.asarray(forest.tail)[order], new.tail, np.asarray(forest.head)[order], new.head]
    if len({a.dtype for a in ids}) > 1:
        ids = [a.astype(np.int64) for a in ids]     # e.g. uint64 with int64 would give floats
    t = np.concatenate(ids[:2])
    h = np.concatenate(ids[2:])
    w = np.concatenate([np.asarray(forest.weights)[order], new.weight])
    if w.dtype.kind == "f" and (forest.weights.dtype.kind in "iu" or new.weight.dtype.kind in "iu"):
        # Mixed integer and float weights meet in float64; refuse if that rounds a weight.
        for part in (forest.weights, new.weight):
            if part.dtype.kind in "iu" and part.size and \
                    np.abs(part.astype(np.float64)).max() > 2.0**53:
                raise ValueError(f"{_FUNC}: integer weights above 2**53 cannot be compared "
                                 f"exactly with float weights; pass the new weights as "
                                 f"integers too (dtype {part.dtype}).")
    position = np.concatenate([old_pos, forest.n_edges + np.arange(k, dtype=np.int64)])
    required = forest.__dict__.get("_required")
    extra = {}
    if required is not None:
        extra["required"] = np.searchsorted(old_pos, required)
    sub = minimum_spanning_forest(t, h, w, n, maximize=forest.maximize, **extra)
    out = SpanningForest(position[sub.edges], sub.tail, sub.head, sub.weights, n,
                         forest.n_edges + k, sub.n_components, sub.labels, forest.maximize,
                         "add_edges")
    if required is not None:
        # What the requirement costs is measured against the free optimum, updated alongside.
        free = add_edges(forest.__dict__["_free"], tail, head, weight, n_nodes)
        out.required_excess = ((free.weight - out.weight) if forest.maximize
                               else (out.weight - free.weight))
        out.__dict__["_required"] = required
        out.__dict__["_free"] = free
    return out
