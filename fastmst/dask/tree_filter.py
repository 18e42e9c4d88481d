"""Plan "filter": every partition reduced to its local forest, the forests merged in a tree.

By the cycle property, the minimum spanning forest of a union of edge sets is the forest of
the union of their forests.  A leaf task reduces one partition to its local forest with the
compiled kernels; merge tasks take ``split_every`` forests at a time and keep the forest of
their union.  A merge holds at most ``split_every * (n - 1)`` edges, so this plan suits dense
graphs whose node set is small; on sparse graphs the local forests keep almost every edge.

A *record* is the dict of arrays one task hands on, in global edge id order: ``id`` (global
edge ids), ``t``/``h`` (node ids), ``w`` (weights in the kernel dtype) and ``ct``/``ch`` (the
endpoints' current components).
"""
from __future__ import annotations

import numpy as np

from fastmst.dask import chunks
from fastmst.solve.solve import solve_trusted


def empty_record(wdtype):
    z = np.empty(0, np.int64)
    return {"id": z, "t": z, "h": z, "w": np.empty(0, wdtype), "ct": z, "ch": z}


def relabelled(chunk, names, offset, labels, wdtype):
    """The chunk's edges with global ids and current component ids, self-loops dropped."""
    t, h, w = chunks.edge_arrays(chunk, names, wdtype)
    if labels is None:
        ct, ch = t, h
    else:
        ct, ch = np.take(labels, t), np.take(labels, h)
    keep = np.flatnonzero(ct != ch)
    if keep.shape[0] == t.shape[0]:  # no self-loop: skip the copies
        rec = {"id": keep + offset, "t": t, "h": h, "w": w, "ct": ct, "ch": ch}
    else:
        rec = {"id": keep + offset, "t": t[keep], "h": h[keep], "w": w[keep],
               "ct": ct[keep], "ch": ch[keep]}
    return rec, int(t.shape[0])


def local_forest(rec, n_comp, maximize):
    """Positions (ascending) of the forest of a record's edges under the (weight, id) rule."""
    m = rec["id"].shape[0]
    if m == 0:
        return np.empty(0, np.int64)
    ct, ch = rec["ct"], rec["ch"]
    if n_comp > 8 * m + 1024:  # compact the ids so the kernel's work arrays stay O(m)
        uniq, inv = np.unique(np.concatenate([ct, ch]), return_inverse=True)
        ct, ch, n_comp = inv[:m], inv[m:], uniq.shape[0]
    # Valid by construction: ids checked in pass 0 (or component labels), kernel weights.
    # Records are in global id order, so positions break ties as global ids do.
    f = solve_trusted(ct, ch, rec["w"], n_comp, maximize=maximize, threads=1)
    return np.sort(f.edges)


def take(rec, idx):
    return {k: v[idx] for k, v in rec.items()}


def leaf(chunk, names, offset, labels, n_comp, wdtype, maximize):
    """Map task: one partition reduced to its local forest."""
    rec, _ = relabelled(chunk, names, offset, labels, wdtype)
    return take(rec, local_forest(rec, n_comp, maximize))


def merge(records, n_comp, maximize, wdtype):
    """Reduce task: the forest of the union of several forests."""
    records = [r for r in records if r["id"].shape[0]]
    if not records:
        return empty_record(wdtype)
    rec = {k: np.concatenate([r[k] for r in records]) for k in records[0]}
    order = np.argsort(rec["id"], kind="stable")
    rec = take(rec, order)
    return take(rec, local_forest(rec, n_comp, maximize))
