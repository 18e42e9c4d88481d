"""Plan "filter-kruskal" (the default): distributed Filter-Kruskal with the forest on the client.

Edges are totally ordered by the rule (weight key, global edge id) of
``fastmst._kernels.tie_rule``.  A *threshold* is one (key, id) pair; the edges below it form a
prefix of that order.  Level ``k`` of the plan:

1. From the validation pass's sample, keep the sampled edges whose endpoints lie in different
   current components (a uniform sample of the edges still in play) and choose the threshold
   ``T_k`` below which about ``LIGHT_PER_NODE * n`` of them lie (``n`` nodes: the client
   solves that many edges per level); when the estimated rest is no more than that, ``T_k``
   is "no bound" and this level is the last.
2. One pass over the partitions: each task keeps the edges in the band ``[T_{k-1}, T_k)``
   whose endpoints lie in different components of the broadcast labels (a ``np.take`` on
   the band only) and returns them: the *light* edges.  Edges below ``T_{k-1}`` are all
   inside components already (every light edge of an earlier level joined its endpoints),
   so they need no lookup; edges at or above ``T_k`` are left for later levels.
3. The client solves the light edges' forest over the ``n_k`` components with the in-memory
   kernels (positions in partition order are global ids, so ties fall as in the in-memory
   solve).  Because the light edges are a prefix of the rule order among the edges still in
   play, every forest edge found belongs to the final forest (the cut property) and the rest
   are discarded (the cycle property).  The components are contracted and the new labels
   broadcast for the next level.

The first level needs no pass of its own (``FOLD_FIRST_LEVEL``): each validation task also
returns its partition's ``quota`` lightest rows by (key, row), the quotas splitting the light
target by the partitions' shares of the rows (from the source's metadata, else evenly).  A
partition that returned fewer than all its rows returned every row below its own *bound* (the
largest row it returned); ``T_1``, the smallest bound, is therefore a threshold below which
the returned rows are exactly the graph's rows, and they are the first level's light edges
(rows returned at or above ``T_1`` are dropped).  When every partition returned all its rows,
they are the whole graph and the validation pass is the only pass.  The levels go on from
``T_1`` as above.

The forest edges of successive levels come in rule order, level after level, so the result
needs no final sort.  Per-task memory is one partition plus the broadcast labels (4 bytes per
node); the client holds the labels, the forest and one level's light edges.
"""
from __future__ import annotations

import time

import numpy as np

import dask

from fastmst._kernels.tie_rule import weight_keys
from fastmst.dask import boruvka, chunks
from fastmst.solve.solve import solve_trusted

#: Light edges per node: each level's threshold is chosen so that the client solves about
#: ``LIGHT_PER_NODE * n_nodes`` edges (measured on bench/bench_dask.py: see docs/dask.md).
LIGHT_PER_NODE = 1.5
#: Bring the first level's light edges with the validation pass (one read pass fewer): each
#: validation task returns its partition's lightest rows, a quota of ``LIGHT_PER_NODE * n``
#: split by the partitions' shares of the rows.  False runs every level as a pass of its own.
FOLD_FIRST_LEVEL = True
#: The quotas sum to about ``FOLD_SAFETY * LIGHT_PER_NODE * n`` rows (plus one per partition).
FOLD_SAFETY = 1.0
#: Levels at most; the last one takes every edge left (progress is guaranteed before that,
#: this only bounds the passes when the sample is too thin to steer).
MAX_LEVELS = 32


def _below(keys, offset, bound):
    """Mask of the edges strictly below the threshold ``bound``: rule keys ``keys`` of the
    edges whose global ids are ``offset, offset + 1, ...``."""
    tk = np.uint64(bound[0])
    below = keys < tk
    tied = np.flatnonzero(keys == tk)  # few: the threshold's own weight
    if tied.shape[0]:
        below[tied] = tied + offset < bound[1]
    return below


def band(chunk, names, offset, labels, wdtype, maximize, lower, upper):
    """Task of one level: the partition's edges in ``[lower, upper)`` whose endpoints lie in
    different components of ``labels`` (None: every node its own component).

    ``lower``/``upper`` are (key, global id) thresholds or None (no bound).  Returns the kept
    edges as a record (global ids ascending) and the counts (rows read, rows in the band).
    """
    t, h, w = chunks.edge_arrays(chunk, names, wdtype)
    m = t.shape[0]
    if lower is None and upper is None:
        idx = None
    else:
        keys = weight_keys(w, maximize)
        mask = np.ones(m, dtype=bool) if lower is None else ~_below(keys, offset, lower)
        if upper is not None:
            mask &= _below(keys, offset, upper)
        del keys
        idx = np.flatnonzero(mask)
        del mask
    tb, hb = (t, h) if idx is None else (t[idx], h[idx])
    in_band = m if idx is None else int(idx.shape[0])
    if labels is None:
        diff = tb != hb
    else:
        diff = np.take(labels, tb) != np.take(labels, hb)
    keep = np.flatnonzero(diff)
    del diff
    if idx is not None:
        keep = idx[keep]
    rec = {"id": keep + offset, "t": t[keep], "h": h[keep], "w": w[keep]}
    return rec, {"read": int(m), "band": in_band}


def quotas(n_nodes, lengths, n_parts):
    """Rows each validation task returns as its lightest (None: no folded level).

    The light target ``LIGHT_PER_NODE * n`` is split by the partitions' shares of the rows
    (``lengths``, from the source's metadata) or evenly; every partition gets at least one
    row, so each truncated partition reports a bound.  Needs the node count before the pass
    (``n_nodes``, or the metadata's largest id)."""
    if not FOLD_FIRST_LEVEL or n_nodes is None or n_parts == 0:
        return None
    target = FOLD_SAFETY * LIGHT_PER_NODE * max(1, n_nodes)
    total = sum(lengths) if lengths is not None else 0
    if total > 0:
        return [max(1, int(np.ceil(target * m / total))) for m in lengths]
    return [max(1, int(np.ceil(target / n_parts)))] * n_parts


def _rule_below(keys, gids, bound):
    """Mask of the rows (rule keys, global ids) strictly below the threshold ``bound``."""
    tk = np.uint64(bound[0])
    return (keys < tk) | ((keys == tk) & (gids < bound[1]))


def folded(stats, offsets, kdt, maximize):
    """The first level from the validation pass's lightest rows, or None without them.

    Every truncated partition returned all its rows below its own bound (the largest row it
    returned), so below ``t1``, the smallest of those bounds, the returned rows are exactly
    the graph's rows.  Returns ``(light record in global id order, t1 or None when every row
    was returned, rows returned, rows in the band)``; a bound whose partition's weight dtype
    is not ``kdt`` is moved down to (its weight's key in ``kdt``, the partition's first id),
    exact under any order-preserving conversion of the weights."""
    if not stats or any("lightest" not in s for s in stats):
        return None
    t1 = None
    for i, s in enumerate(stats):
        b = s["lightest"]["bound"]
        if b is None:
            continue
        if np.dtype(s["lightest"]["wdtype"]) == kdt:
            cand = (int(b[0]), int(offsets[i]) + b[1])
        else:
            cand = (int(weight_keys(b[2].astype(kdt), maximize)[0]), int(offsets[i]))
        t1 = cand if t1 is None or cand < t1 else t1
    recs, returned, in_band = [], 0, 0
    for i, s in enumerate(stats):
        lt = s.pop("lightest")
        gid = lt["row"] + int(offsets[i])
        w = lt["w"].astype(kdt, copy=False)
        returned += gid.shape[0]
        if t1 is not None and gid.shape[0]:
            keep = np.flatnonzero(_rule_below(weight_keys(w, maximize), gid, t1))
            rec = {"id": gid[keep], "t": lt["t"][keep], "h": lt["h"][keep], "w": w[keep]}
        else:
            rec = {"id": gid, "t": lt["t"], "h": lt["h"], "w": w}
        del lt
        in_band += rec["id"].shape[0]
        if rec["id"].shape[0]:
            recs.append(rec)
    light = {k: np.concatenate([r[k] for r in recs]) for k in ("id", "t", "h", "w")} \
        if recs else None
    return light, t1, returned, in_band


def _absorb(light, labels, n_comp, maximize, ldt, chosen):
    """Solve the light edges' forest on the client, keep it (all of it is in the answer),
    contract the components; returns the new labels and component count."""
    if labels is None:
        ct, ch = light["t"], light["h"]
    else:
        ct, ch = np.take(labels, light["t"]), np.take(labels, light["h"])
    # Valid by construction (ids checked in the validation pass, or labels); the light edges
    # are in global id order, so positions break ties as ids do.
    f = solve_trusted(ct, ch, light["w"], n_comp, maximize=maximize, threads=None)
    del ct, ch
    pos = f.edges
    # The solve already gathered the forest's weights (and, on the first level, its
    # endpoints): one random gather of the ids, and of the endpoints on later levels.
    chosen.append({"id": light["id"][pos], "w": f.weights,
                   "t": f.tail if labels is None else light["t"][pos],
                   "h": f.head if labels is None else light["h"][pos]})
    del pos
    new = f.labels.astype(ldt)
    labels = new if labels is None else np.take(new, labels)
    return labels, int(f.n_components)


class Sample:
    """The validation pass's sample on the client: rule keys, global ids, endpoints and how
    many edges each sampled row stands for."""

    def __init__(self, stats, offsets, kdt, maximize):
        parts = [(s["sample"], int(offsets[i]), s["m"] / max(1, s["sample"]["row"].shape[0]))
                 for i, s in enumerate(stats) if s["m"]]
        if parts:
            self.gid = np.concatenate([p["row"] + off for p, off, _ in parts])
            self.t = np.concatenate([p["t"].astype(np.int64) for p, _, _ in parts])
            self.h = np.concatenate([p["h"].astype(np.int64) for p, _, _ in parts])
            w = np.concatenate([p["w"].astype(kdt) for p, _, _ in parts])
            self.key = weight_keys(w, maximize)
            self.per = np.concatenate([np.full(p["row"].shape[0], r) for p, _, r in parts])
        else:
            z = np.empty(0, np.int64)
            self.gid, self.t, self.h = z, z, z
            self.key, self.per = np.empty(0, np.uint64), np.empty(0, np.float64)

    def keep_remaining(self, labels):
        """Drop the sampled edges that are inside one component now (for good)."""
        if labels is None:
            keep = self.t != self.h
        else:
            keep = labels[self.t] != labels[self.h]
        for name in ("gid", "t", "h", "key", "per"):
            setattr(self, name, getattr(self, name)[keep])

    def threshold(self, target):
        """``(estimated edges left, threshold)``: the (key, id) below which about ``target``
        of the edges left lie, or None when the estimate is at most ``target`` (or too few
        sampled edges are left to steer by)."""
        left = float(self.per.sum())
        if left <= target or self.gid.shape[0] < 2:
            return left, None
        order = np.lexsort((self.gid, self.key))
        i = int(np.searchsorted(np.cumsum(self.per[order]), target, side="right"))
        i = min(max(i, 1), order.shape[0] - 1)  # at least one sampled edge is light
        j = order[i]
        return left, (int(self.key[j]), int(self.gid[j]))


def solve(run, parts, names, offsets, n, n_edges, kdt, maximize, stats, run_id, column_bytes):
    """Run the levels; return the forest records in rule order, the final labels, the number
    of components, the per-pass details and what the validation pass's folded level did
    (None when it brought no light rows)."""
    sample = Sample(stats, offsets, kdt, maximize)
    ldt = boruvka.label_dtype(n)
    labels = None
    n_comp = n
    lower = None
    chosen = []
    passes = []
    level = 0
    fold = folded(stats, offsets, kdt, maximize)
    first = None
    done = False
    if fold is not None:
        light, lower, returned, in_band = fold
        del fold
        client_start = time.perf_counter()
        n_light = 0 if light is None else int(light["id"].shape[0])
        if n_light and n_comp > 1:
            labels, n_comp = _absorb(light, labels, n_comp, maximize, ldt, chosen)
        del light
        first = {"light_rows_returned": int(returned), "edges_in_band": int(in_band),
                 "edges_kept": n_light, "threshold_found": lower is not None,
                 "forest_edges": int(n - n_comp), "components_before": int(n),
                 "components_after": int(n_comp),
                 "client_seconds": round(time.perf_counter() - client_start, 3)}
        level = 1
        done = lower is None  # every row was returned: the forest is complete
    while n_edges and n_comp > 1 and not done:
        start = time.perf_counter()
        if level:
            sample.keep_remaining(labels)
        left, upper = sample.threshold(max(1.0, LIGHT_PER_NODE * n))
        if level == 0:
            left = float(n_edges)
        if level + 1 >= MAX_LEVELS:
            upper = None
        shared = run.share(labels, f"{run_id}-{level}")
        tasks = [dask.delayed(band, pure=True)(p, names, int(offsets[i]), shared, kdt,
                                               maximize, lower, upper,
                                               dask_key_name=f"fastmst-level-{run_id}-{level}-{i}")
                 for i, p in enumerate(parts)]
        label = f"level {level + 1}" + (" (final)" if upper is None else "")
        out = run.run(tasks, label)
        del shared, tasks
        pass_seconds = run.phases[-1][1]
        recs = [r for r, _ in out if r["id"].shape[0]]
        in_band = sum(c["band"] for _, c in out)
        rows_read = sum(c["read"] for _, c in out)
        light = {k: np.concatenate([r[k] for r in recs]) for k in ("id", "t", "h", "w")} \
            if recs else None
        del out, recs
        client_start = time.perf_counter()
        before = n_comp
        n_light = 0 if light is None else int(light["id"].shape[0])
        if n_light:
            labels, n_comp = _absorb(light, labels, n_comp, maximize, ldt, chosen)
        del light
        client_seconds = time.perf_counter() - client_start
        passes.append({"pass": len(passes) + 1, "kind": "final" if upper is None else "level",
                       "seconds": round(time.perf_counter() - start, 3),
                       "dask_seconds": round(pass_seconds, 3),
                       "client_seconds": round(client_seconds, 3),
                       "rows_read": int(rows_read),
                       "column_bytes_read": int(column_bytes),
                       "edges_estimated_left": int(round(left)),
                       "edges_in_band": int(in_band), "edges_kept": n_light,
                       "forest_edges": int(before - n_comp),
                       "components_before": int(before), "components_after": int(n_comp)})
        level += 1
        if upper is None:
            break
        lower = upper
    return chosen, labels, n_comp, passes, first
