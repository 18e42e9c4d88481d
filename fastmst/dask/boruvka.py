"""Plans "boruvka" and "filter": distributed Borůvka rounds, then the filter tree.

A Borůvka round: each partition reports, for every component it touches, its lightest
incident edge by (weight, global id) (a map); these are min-reduced per range of components
in trees (``split_every`` at a time); the client contracts the chosen edges (all of them are
forest edges) and broadcasts the new component labels.  Edges inside one component become
self-loops and are dropped.  The number of components at least halves per round, but every
round reads every partition; the distributed Filter-Kruskal plan (``filter_kruskal``) needs
fewer and cheaper passes and is the default.  The per-task work here is sparse (a sort by
component), never an array sized by the number of components.
"""
from __future__ import annotations

import time

import numpy as np

import dask

from fastmst import validation
from fastmst._kernels.disjoint_set import DisjointSet
from fastmst._kernels.rule_order import weight_keys
from fastmst.dask import chunks, runner, tree_filter

#: Components per range at least (smaller ranges only add tasks), and ranges at most.
MIN_RANGE = 1 << 16
MAX_RANGES = 256


def label_dtype(n):
    return np.int32 if n < validation.INT32_LIMIT else np.int64


def select(comp, w, ids, maximize):
    """For every distinct component in ``comp``, the row of its lightest entry by the rule
    (weight key, then global id).  Sparse: one sort of the entries, O(m log m), nothing sized
    by the number of components.  Returns ``(components ascending, rows)``."""
    if comp.shape[0] == 0:
        return comp.astype(np.int64), np.empty(0, np.int64)
    order = np.lexsort((ids, weight_keys(w, maximize), comp))
    cs = comp[order]
    first = np.flatnonzero(np.concatenate([[True], cs[1:] != cs[:-1]]))
    return cs[first].astype(np.int64), order[first]


def candidates(chunk, names, offset, labels, n_comp, wdtype, maximize, bounds):
    """Map task of a round: per touched component, its lightest incident edge.

    Returns one piece per component range ``[bounds[r], bounds[r+1])`` (each range is
    min-reduced by its own tree), each a ``(candidates, rows)`` pair; ``rows`` (the edges not
    yet self-loops) is counted in the first piece only.
    """
    rec, _ = tree_filter.relabelled(chunk, names, offset, labels, wdtype)
    m = rec["id"].shape[0]
    comp = np.concatenate([rec["ct"], rec["ch"]])
    w2 = np.concatenate([rec["w"], rec["w"]])
    ids = np.concatenate([rec["id"], rec["id"]])
    comps, rows = select(comp, w2, ids, maximize)
    del comp, w2, ids
    rows[rows >= m] -= m
    out = {k: rec[k][rows] for k in ("id", "t", "h", "w")}
    out["comp"] = comps.astype(label_dtype(n_comp))
    cut = np.searchsorted(comps, bounds)  # comps are ascending
    return tuple(({k: v[cut[r]:cut[r + 1]] for k, v in out.items()}, m if r == 0 else 0)
                 for r in range(len(bounds) - 1))


def merge_candidates(parts, maximize, wdtype):
    """Reduce task of a round: the lightest candidate of every component of one range."""
    recs = [p[0] for p in parts if p[0]["id"].shape[0]]
    survivors = sum(p[1] for p in parts)
    if not recs:
        z = np.empty(0, np.int64)
        return {"id": z, "t": z, "h": z, "w": np.empty(0, wdtype), "comp": z}, survivors
    rec = {k: np.concatenate([r[k] for r in recs]) for k in recs[0]}
    comps, rows = select(rec["comp"], rec["w"], rec["id"], maximize)
    return tree_filter.take(rec, rows), survivors


def contract(cand, labels, n_comp, n):
    """Union the components joined by the chosen edges; return the new labels."""
    uniq, first = np.unique(cand["id"], return_index=True)
    rec = {k: cand[k][first] for k in ("id", "t", "h", "w")}
    cand.clear()  # the client holds O(n): free the candidates as soon as possible
    del first
    ct, ch = (rec["t"], rec["h"]) if labels is None else (labels[rec["t"]], labels[rec["h"]])
    ds = DisjointSet(n_comp)
    merged = ds.union_pairs(ct, ch)
    if int(np.count_nonzero(merged)) != uniq.shape[0]:  # pragma: no cover - a broken invariant
        raise RuntimeError(f"{chunks.FUNC}: internal error: the Borůvka candidates closed a "
                           f"cycle; please report this with the input that caused it.")
    new = ds.labels()
    labels = (new if labels is None else new[labels]).astype(label_dtype(n))
    return labels, int(ds.n_sets), rec


def solve_rounds(run, parts, names, offsets, n, n_edges, kdt, maximize, plan, split_every,
                 max_task_edges, run_id):
    """Plans "boruvka" (rounds until the rest fits one task) and "filter" (the tree at once).

    Returns the forest records found (in no particular order) and the plan's details.
    """
    chosen = []
    labels = None
    n_comp = n
    remaining = n_edges
    info = {"rounds": [], "final": None}
    round_no = 0
    while remaining > 0 and n_comp > 1:
        fits = remaining <= max_task_edges
        if plan == "filter" or fits:
            shared = run.share(labels, f"{run_id}-{round_no}")
            leaves = [dask.delayed(tree_filter.leaf, pure=True)(
                p, names, int(offsets[i]), shared, n_comp, kdt, maximize)
                for i, p in enumerate(parts)]
            fan = max(2, len(leaves)) if fits else split_every
            root = runner.tree(leaves, tree_filter.merge, fan, n_comp, maximize, kdt,
                               name=f"fastmst-merge-{run_id}-{round_no}")
            (rec,) = run.run([root], "merging local forests" if not fits
                             else "final local solve")
            chosen.append(rec)
            info["final"] = {"kind": "single task" if fits else "filter tree",
                             "n_components": n_comp, "edges_bound": remaining,
                             "fan_in": fan}
            break
        shared = run.share(labels, f"{run_id}-{round_no}")
        span = max(MIN_RANGE, max_task_edges // split_every)
        n_ranges = int(min(MAX_RANGES, -(-n_comp // span)))
        bounds = np.linspace(0, n_comp, n_ranges + 1).round().astype(np.int64)
        maps = [dask.delayed(candidates, pure=True, nout=n_ranges)(
                    p, names, int(offsets[i]), shared, n_comp, kdt, maximize, bounds)
                for i, p in enumerate(parts)]
        roots = [runner.tree([mp[r] for mp in maps], merge_candidates, split_every,
                             maximize, kdt, name=f"fastmst-boruvka-{run_id}-{round_no}-{r}")
                 for r in range(n_ranges)]
        pieces = run.run(roots, f"Borůvka round {round_no + 1}")
        survivors = sum(p[1] for p in pieces)
        cand = {k: np.concatenate([p[0][k] for p in pieces]) for k in pieces[0][0]}
        del shared, pieces
        remaining = survivors
        if cand["id"].shape[0] == 0:
            break
        start = time.perf_counter()
        before = n_comp
        labels, n_comp, rec = contract(cand, labels, n_comp, n)
        run.phases.append((f"contraction {round_no + 1} (client)",
                           time.perf_counter() - start))
        chosen.append(rec)
        info["rounds"].append({"n_components_before": before, "n_components_after": n_comp,
                               "edges_not_self_loops": survivors,
                               "forest_edges": int(rec["id"].shape[0]),
                               "component_ranges": n_ranges})
        round_no += 1
    return chosen, info
