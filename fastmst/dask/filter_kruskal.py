"""Plan "filter-kruskal" (the default): distributed Filter-Kruskal with the forest on the client.

Edges are totally ordered by the rule (weight key, global edge id) of
``fastmst._kernels.tie_rule``.  A *threshold* is one (key, id) pair; the edges below it form a
prefix of that order.  Level ``k`` of the plan:

1. From the validation pass's sample, keep the sampled edges whose endpoints lie in different
   current components (a uniform sample of the edges still in play) and choose the threshold
   ``T_k`` below which about ``light_per_node * n`` of them lie (``n`` nodes: the client
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

from fastmst._kernels.rule_order import weight_keys
from fastmst.dask import boruvka, chunks, runner
from fastmst import validation
from fastmst.solve import constraints

#: Light edges per node by default (``light_per_node=``): each level's threshold is chosen so
#: that the client solves about ``LIGHT_PER_NODE * n_nodes`` edges (measured on
#: bench/bench_dask.py: see docs/dask.md).
LIGHT_PER_NODE = 1.5
#: Bring the first level's light edges with the validation pass (one read pass fewer): each
#: validation task returns its partition's lightest rows, a quota of ``LIGHT_PER_NODE * n``
#: split by the partitions' shares of the rows.  False runs every level as a pass of its own.
FOLD_FIRST_LEVEL = True
#: The quotas sum to about ``FOLD_SAFETY * LIGHT_PER_NODE * n`` rows (plus one per partition).
FOLD_SAFETY = 1.0
#: The client solves each level's light edges in up to this many pieces of consecutive key
#: ranges (lightest first, contracting after each), so the solve's working memory is a
#: fraction of the light edges' (measured per node in docs/dask.md).
ABSORB_PIECES = 8
#: ... but no piece below this many edges (smaller levels are solved in one piece).
MIN_PIECE_EDGES = 1 << 24
#: Sampled keys the pieces' split points are chosen from, and rows per block when mapping
#: every light edge to its piece.
SPLIT_SAMPLE = 1 << 16
SPLIT_BLOCK = 1 << 22
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


def quotas(n_nodes, lengths, n_parts, light_per_node):
    """Rows each validation task returns as its lightest (None: no folded level).

    The light target ``light_per_node * n`` is split by the partitions' shares of the rows
    (``lengths``, from the source's metadata) or evenly; every partition gets at least one
    row, so each truncated partition reports a bound.  Needs the node count before the pass
    (``n_nodes``, or the metadata's largest id)."""
    if not FOLD_FIRST_LEVEL or n_nodes is None or n_parts == 0:
        return None
    target = FOLD_SAFETY * light_per_node * max(1, n_nodes)
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
    # Two passes over the partitions' rows (count, then copy into buffers of the final size),
    # each partition's rows released once copied: the client never holds the rows twice.
    keeps = []
    for i, s in enumerate(stats):
        lt = s["lightest"]
        if t1 is not None and lt["row"].shape[0]:
            gid = lt["row"] + int(offsets[i])
            keeps.append(int(np.count_nonzero(_rule_below(
                weight_keys(lt["w"].astype(kdt, copy=False), maximize), gid, t1))))
        else:
            keeps.append(int(lt["row"].shape[0]))
    in_band = sum(keeps)
    returned = 0
    light = Records(in_band, _ids_dtype(stats, "t"), _ids_dtype(stats, "h"), kdt) \
        if in_band else None
    for i, s in enumerate(stats):
        lt = s.pop("lightest")
        gid = lt["row"] + int(offsets[i])
        w = lt["w"].astype(kdt, copy=False)
        returned += gid.shape[0]
        if keeps[i] == gid.shape[0]:
            if keeps[i]:
                light.extend(gid, lt["t"], lt["h"], w)
        elif keeps[i]:
            keep = _rule_below(weight_keys(w, maximize), gid, t1)
            light.extend(gid[keep], lt["t"][keep], lt["h"][keep], w[keep])
        del lt, gid, w
    return light, t1, returned, in_band


def _ids_dtype(stats, name):
    """The common dtype of the ``name`` ids the validation tasks returned (int32 or int64)."""
    dts = [s["lightest"][name].dtype for s in stats if s["lightest"]["row"].shape[0]]
    return np.result_type(*dts) if dts else np.dtype(np.int64)


class Records:
    """Edges on the client (global ids, endpoints, weights in the kernel dtype) in buffers
    allocated once at their final capacity and filled in order, so that gathering the
    partitions' rows never holds them twice.  ``arrays()`` gives the filled part."""

    NAMES = ("id", "t", "h", "w")

    def __init__(self, capacity, tdt, hdt, wdt):
        self.size = 0
        self.id = np.empty(capacity, np.int64)
        self.t = np.empty(capacity, tdt)
        self.h = np.empty(capacity, hdt)
        self.w = np.empty(capacity, wdt)

    def extend(self, ids, t, h, w):
        a, b = self.size, self.size + ids.shape[0]
        if b > self.id.shape[0]:  # pragma: no cover - a broken invariant
            raise RuntimeError(f"{chunks.FUNC}: internal error: {b} edges for a buffer of "
                               f"{self.id.shape[0]}; please report this with the input.")
        self.id[a:b], self.t[a:b], self.h[a:b], self.w[a:b] = ids, t, h, w
        self.size = b

    def arrays(self):
        """The filled part as a dict of arrays (the buffers shrunk in place to it)."""
        for name in self.NAMES:
            arr = getattr(self, name)
            if arr.shape[0] != self.size:
                # In place, no second copy: no view of a buffer outlives ``extend``.
                arr.resize(self.size, refcheck=False)
        return {name: getattr(self, name) for name in self.NAMES}


def _pieces(w, maximize, pieces):
    """Split the light edges into up to ``pieces`` pieces by key: ``(piece of every edge as
    uint8, number of pieces)``, or ``(None, 1)`` for one piece.  The split points are rule keys
    taken from a strided sample, so every key (and all its ties) falls in one piece, and the
    pieces in order are consecutive ranges of the rule order; computed in blocks, so no
    array of keys for all the edges is held."""
    m = w.shape[0]
    if pieces <= 1 or m == 0:
        return None, 1
    sample = np.sort(weight_keys(np.ascontiguousarray(w[::max(1, m // SPLIT_SAMPLE)]),
                                 maximize))
    splits = np.unique(sample[(np.arange(1, pieces) * sample.shape[0]) // pieces])
    if splits.shape[0] == 0:
        return None, 1
    piece = np.empty(m, np.uint8)
    for a in range(0, m, SPLIT_BLOCK):
        b = min(m, a + SPLIT_BLOCK)
        piece[a:b] = np.searchsorted(splits, weight_keys(w[a:b], maximize), side="right")
    return piece, int(splits.shape[0]) + 1


def _absorb(light, labels, n_comp, maximize, ldt, forest):
    """Solve the light edges' forest on the client, append it to ``forest`` (all of it is
    in the answer), contract the components; returns the new labels and component count.

    The light edges are solved in pieces of consecutive key ranges (``ABSORB_PIECES`` at most,
    none below ``MIN_PIECE_EDGES``), lightest first, contracting after each: Kruskal's order
    over the whole set, with the solve's working memory a fraction of it.  Within a piece
    the edges are in global id order, so positions break ties as ids do."""
    rec = light.arrays()
    m = rec["id"].shape[0]
    piece, pieces = _pieces(rec["w"], maximize,
                            min(ABSORB_PIECES, max(1, m // max(1, MIN_PIECE_EDGES))))
    threads = validation.check_threads(None, chunks.FUNC)
    for j in range(pieces):
        if n_comp <= 1:
            break
        sel = None if piece is None else np.flatnonzero(piece == j)
        t = rec["t"] if sel is None else np.take(rec["t"], sel)
        h = rec["h"] if sel is None else np.take(rec["h"], sel)
        w = rec["w"] if sel is None else np.take(rec["w"], sel)
        if labels is not None:
            t, h = np.take(labels, t), np.take(labels, h)
        # Valid by construction (ids checked in the validation pass, or labels).
        g = validation.trusted_edges(t, h, w, n_comp)
        r, _ = constraints.run(g, "auto", False, maximize, threads)
        del g, t, h, w
        pos = r.edges if sel is None else np.take(sel, r.edges)
        if labels is None:  # the kernel gathered the forest's original endpoints already
            forest.extend(np.take(rec["id"], pos), r.tail, r.head, r.weights)
        else:
            forest.extend(np.take(rec["id"], pos), np.take(rec["t"], pos),
                          np.take(rec["h"], pos), r.weights)
        del pos, sel
        n_comp = int(r.n_components)
        new = r.labels.astype(ldt)
        del r
        labels = new if labels is None else np.take(new, labels)
        del new
    del rec, piece
    return labels, n_comp


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


def solve(run, parts, names, offsets, n, n_edges, kdt, maximize, stats, run_id, column_bytes,
          id_dtypes, light_per_node):
    """Run the levels; return the forest (a Records in rule order), the final labels, the
    number of components, the per-pass details and what the validation pass's folded level
    did (None when it brought no light rows).  ``id_dtypes``: the (tail, head) dtypes of the
    forest's endpoints; ``light_per_node``: each level's light target per node."""
    sample = Sample(stats, offsets, kdt, maximize)
    ldt = boruvka.label_dtype(n)
    labels = None
    n_comp = n
    lower = None
    # The forest has at most n - 1 edges: its buffers are allocated once, at that size.
    forest = Records(max(0, min(n - 1, n_edges)), *id_dtypes, kdt)
    passes = []
    level = 0
    fold = folded(stats, offsets, kdt, maximize)
    runner.release_freed_memory()
    first = None
    done = False
    if fold is not None:
        light, lower, returned, in_band = fold
        del fold
        client_start = time.perf_counter()
        n_light = 0 if light is None else light.size
        if n_light and n_comp > 1:
            labels, n_comp = _absorb(light, labels, n_comp, maximize, ldt, forest)
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
        left, upper = sample.threshold(max(1.0, light_per_node * n))
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
        in_band = sum(c["band"] for _, c in out)
        rows_read = sum(c["read"] for _, c in out)
        n_light = sum(int(r["id"].shape[0]) for r, _ in out)
        client_start = time.perf_counter()
        before = n_comp
        if n_light:
            # The tasks' records copied into one buffer, each released once copied.
            light = Records(n_light, *id_dtypes, kdt)
            for i in range(len(out)):
                r = out[i][0]
                light.extend(r["id"], r["t"], r["h"], r["w"])
                out[i] = None
                del r
            del out
            runner.release_freed_memory()
            labels, n_comp = _absorb(light, labels, n_comp, maximize, ldt, forest)
            del light
        else:
            del out
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
    return forest, labels, n_comp, passes, first
