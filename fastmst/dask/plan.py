"""The public distributed solve: arguments, the validation pass, the plan, the result."""
from __future__ import annotations

import time
import uuid

import numpy as np

import dask

from fastmst import validation
from fastmst._kernels.disjoint_set import first_appearance
from fastmst.dask import boruvka, chunks, filter_kruskal, runner
from fastmst.solve.result import SpanningForest
from fastmst.solve.solve import solve_trusted

_FUNC = chunks.FUNC

PLANS = ("auto", "filter-kruskal", "filter", "boruvka")

#: Working-set bytes per edge held by one merge task of the plans "filter" and "boruvka" (ids,
#: endpoints, weight, the sorted copy and the kernel's buffers), estimated from the arrays it
#: allocates.  Used to turn a worker memory limit into the default ``max_task_edges``.
BYTES_PER_EDGE = 96


def minimum_spanning_forest(edges, n_nodes=None, *, tail="tail", head="head", weight="weight",
                            maximize=False, plan="auto", split_every=8, max_task_edges=None,
                            light_per_node=None, client=None,
                            progress=False) -> SpanningForest:
    """Minimum (or maximum) spanning forest of an edge list held in a Dask collection.

    Parameters
    ----------
    edges : dask.dataframe.DataFrame, dask.bag.Bag or list of dask.delayed
        The edges, in partitions.  A DataFrame (e.g. ``dd.read_parquet(files)``) needs the
        columns named by ``tail``, ``head`` and ``weight`` (only those are read); each Bag
        partition or delayed chunk may be a pandas/pyarrow table with those columns, a mapping
        of them, a ``(tail, head, weight)`` tuple of arrays, or a list of such chunks or of
        ``(tail, head, weight)`` rows.  Node ids are global integers in ``[0, n_nodes)``.
    n_nodes : int, optional
        Number of nodes; defaults to the largest id + 1.
    tail, head, weight : str
        Column names.
    maximize : bool
        Return the maximum spanning forest instead.
    plan : {"auto", "filter-kruskal", "filter", "boruvka"}
        ``"filter-kruskal"`` (what ``"auto"`` runs): levels of light edges chosen by a weight
        threshold, each level's forest solved on the client, see the Notes.  ``"filter"``:
        every partition reduced to its local forest, the forests merged in a tree.
        ``"boruvka"``: Borůvka rounds until the remaining edges fit in one task, then one
        local solve.  Every plan returns the identical forest.
    split_every : int, >= 2
        Fan-in of the tree reductions of the plans "filter" and "boruvka".
    max_task_edges : int, optional
        The most edges one merge or final task of the plans "filter" and "boruvka" may hold.
        Defaults to the smallest worker memory limit divided by ``BYTES_PER_EDGE`` (at most
        2**24), or 2**24 without a limit.  Not used by "filter-kruskal", whose tasks hold one
        partition each.
    light_per_node : float, optional
        Plan "filter-kruskal": about how many light edges per node each level brings to the
        client (default ``fastmst.dask.filter_kruskal.LIGHT_PER_NODE``, 1.5).  Lower values
        (e.g. 1.0) cut the client's memory (about 24 bytes per light edge, plus the solve's
        working memory) at the cost of more passes; see docs/dask.md (1B edges over 100M
        nodes ran with 1.0 in 6.9 GiB on the client).  Any positive value gives the same forest.
    client : distributed.Client or False, optional
        Defaults to the current client; without one (or with ``False``), Dask's configured
        local scheduler runs the tasks.
    progress : bool
        Show Dask's progress bar for every pass (the dashboard of a distributed cluster shows
        the same tasks live).

    Returns
    -------
    SpanningForest
        As from :func:`fastmst.minimum_spanning_forest` on the concatenated partitions: ``edges``
        are global edge ids (partition offset + row), ordered by (weight, id).
        ``dask_plan`` (also ``provenance["plan"]``) records the passes that ran: for
        "filter-kruskal", ``passes`` (one dict per pass: seconds, rows and column bytes read,
        edges kept, components before and after; the validation pass also the light rows it
        brought) and ``summary``, one line of the same.

    Notes
    -----
    A first pass reads every partition to validate it, count its rows (the offsets that make
    global edge ids) and draw a uniform sample of about 2**20 rows in all.

    "filter-kruskal" then runs levels.  The first comes with the validation pass when the node
    count is known before it (``n_nodes``, or a Parquet source's footers): each task also
    returns its partition's lightest rows, about ``1.5 * n_nodes`` over all partitions, and
    the client keeps those below the smallest partition's largest returned (weight, edge id),
    which are exactly the graph's edges below that threshold.  Each later level is one pass:
    the sample gives a threshold in the (weight, edge id) order below which about
    ``1.5 * n_nodes`` of the edges still joining different components lie; each task returns
    those *light* edges of its partition (label lookups only for the edges between the
    previous threshold and this one).  The client solves each level's forest with the
    in-memory kernels (all of it belongs to the answer), contracts the components and
    broadcasts the labels (4 bytes per node, once per pass).  When the sample says the rest is
    no more than ``1.5 * n_nodes`` edges, the level takes everything left and is the last: on
    random graphs with 2.5 to 8 edges per node, two levels, so two passes in all.  Each pass
    costs one read of the partitions and O(rows) work per task; nothing is persisted between
    passes.
    Tasks hold one partition and the labels; the client holds the labels, the forest and one
    level's light edges (see docs/dask.md for measured peaks).

    Ties are broken exactly as in the in-memory function, so the forest is unique and does not
    depend on the partitioning, the order tasks run in, or retries after a worker is lost.
    """
    validation.check_column_name(tail, "tail", _FUNC)
    validation.check_column_name(head, "head", _FUNC)
    validation.check_column_name(weight, "weight", _FUNC)
    names = (tail, head, weight)
    n_nodes = validation.check_n_nodes(n_nodes, _FUNC)
    maximize = validation.check_bool(maximize, "maximize", _FUNC)
    plan = validation.check_choice(plan, PLANS, "plan", _FUNC)
    split_every = validation.check_count(split_every, "split_every", _FUNC, minimum=2)
    max_task_edges = validation.check_count(max_task_edges, "max_task_edges", _FUNC,
                                            minimum=1, allow_none=True)
    progress = validation.check_bool(progress, "progress", _FUNC)
    if light_per_node is None:
        light_per_node = filter_kruskal.LIGHT_PER_NODE
    light_per_node = validation.check_real(light_per_node, "light_per_node", _FUNC)
    if not 0 < light_per_node < float("inf"):
        raise ValueError(f"{_FUNC}: light_per_node must be a positive finite number of light "
                         f"edges per node, received {light_per_node!r}; e.g. 1.5 (the "
                         f"default) or 1.0 for less client memory.")
    parts = chunks.partitions(edges, names)
    client = runner.get_client(client)
    run = runner.Runner(client, progress)
    if plan == "auto":
        plan = "filter-kruskal"
    if max_task_edges is None and plan != "filter-kruskal":
        max_task_edges = runner.default_task_edges(client, BYTES_PER_EDGE)

    # Pass 0: validate, count rows, find the largest id, draw the sample; for
    # "filter-kruskal", also bring each partition's lightest rows (the first level).
    start = time.perf_counter()
    per = max(chunks.MIN_SAMPLE_PER_PARTITION, chunks.SAMPLE_ROWS // max(1, len(parts)))
    quotas = None
    if plan == "filter-kruskal" and filter_kruskal.FOLD_FIRST_LEVEL:
        lengths_hint, top_hint = chunks.source_hints(edges, names, len(parts))
        n_hint = n_nodes if n_nodes is not None else (
            top_hint + 1 if top_hint is not None else None)
        quotas = filter_kruskal.quotas(n_hint, lengths_hint, len(parts), light_per_node)
    stats = run.run([dask.delayed(chunks.stats, pure=True)(
        p, names, i, n_nodes, per, quotas[i] if quotas else 0, maximize)
        for i, p in enumerate(parts)], "validating partitions")
    lengths = np.array([s["m"] for s in stats], dtype=np.int64)
    offsets = np.concatenate([[0], np.cumsum(lengths)])[:-1] if len(parts) else lengths
    n_edges = int(lengths.sum())
    hi = max([s["hi"] for s in stats], default=-1)
    n = n_nodes if n_nodes is not None else hi + 1
    used = [s for s in stats if s["m"]] or stats
    tdt = np.result_type(*[np.dtype(s["tail"]) for s in used]) if used else np.dtype(np.int64)
    hdt = np.result_type(*[np.dtype(s["head"]) for s in used]) if used else np.dtype(np.int64)
    wdt = np.result_type(*[np.dtype(s["weight"]) for s in used]) if used else np.dtype(
        np.float64)
    kdt = validation.check_weights(np.empty(0, wdt), _FUNC).dtype
    column_bytes = sum(s["nbytes"] for s in stats)
    passes = [{"pass": 0, "kind": "validate", "seconds": round(time.perf_counter() - start, 3),
               "rows_read": n_edges, "column_bytes_read": int(column_bytes),
               "sampled_rows": int(sum(s["sample"]["row"].shape[0] for s in stats))}]

    info = {"plan": plan, "n_partitions": len(parts), "n_nodes": n, "n_edges": n_edges}
    run_id = uuid.uuid4().hex[:12]
    if plan == "filter-kruskal":
        forest_rec, labels, n_comp, more, first = filter_kruskal.solve(
            run, parts, names, offsets, n, n_edges, kdt, maximize, stats, run_id, column_bytes,
            (tdt, hdt), light_per_node)
        del stats
        if first is not None:
            passes[0].update(first, light_quota=int(sum(quotas)))
        passes += more
        info.update(light_per_node=light_per_node, passes=passes)
        start = time.perf_counter()
        forest = _assemble_in_order(forest_rec, labels, n_comp, n, n_edges, maximize,
                                    (tdt, hdt, wdt), info)
        del forest_rec
    else:
        del stats
        chosen, more = boruvka.solve_rounds(run, parts, names, offsets, n, n_edges, kdt,
                                            maximize, plan, split_every, max_task_edges,
                                            run_id)
        info.update(more, max_task_edges=max_task_edges, split_every=split_every,
                    passes=passes)
        start = time.perf_counter()
        forest = _assemble_by_solving(chosen, n, n_edges, maximize, (tdt, hdt, wdt, kdt), info)
    run.phases.append(("assembling the forest (client)", time.perf_counter() - start))
    info["phases"] = [(label, round(s, 3)) for label, s in run.phases]
    info["summary"] = _summary(info)
    return forest


def _summary(info):
    """One line: the passes, rows read, edges kept and seconds of each."""
    items = []
    for p in info["passes"]:
        if p["kind"] == "validate":
            items.append(f"validate {p['rows_read']:,} rows {p['seconds']:.1f} s")
            if "light_rows_returned" in p:
                items[-1] += (f" (+ level 1 from its {p['light_rows_returned']:,} lightest "
                              f"rows: kept {p['edges_kept']:,}, {p['components_before']:,}->"
                              f"{p['components_after']:,} components, client "
                              f"{p['client_seconds']:.1f} s)")
        else:
            items.append(f"{p['kind']} {p['pass']}: kept {p['edges_kept']:,} of "
                         f"{p['rows_read']:,} rows, {p['components_before']:,}->"
                         f"{p['components_after']:,} components, {p['seconds']:.1f} s")
    extra = [f"{label} {s:.1f} s" for label, s in info["phases"]
             if not label.startswith(("validating", "level"))]
    n_passes = len(info["passes"]) + len(info.get("rounds", []))
    if info["plan"] != "filter-kruskal":
        n_passes += 1 if info.get("final") else 0
    return (f"{info['plan']}: {n_passes} passes over {info['n_partitions']} partitions; "
            + "; ".join(items + extra))


def _assemble_in_order(forest_rec, labels, n_comp, n, n_edges, maximize, dtypes, info):
    """The forest from records already in rule order (plan "filter-kruskal"): a
    ``filter_kruskal.Records`` filled level after level, taken as it is (no copy where the
    dtypes already match)."""
    tdt, hdt, wdt = dtypes
    rec = forest_rec.arrays()
    if labels is None:
        labels = np.arange(n, dtype=np.int64)
        n_comp = n
    # Labels numbered by first appearance over the nodes, as the in-memory solve numbers them.
    lab, k = first_appearance(labels.astype(np.int64, copy=False), n_comp)
    del labels
    if k != n_comp or n - k != rec["id"].shape[0]:  # pragma: no cover - a broken invariant
        raise RuntimeError(f"{_FUNC}: internal error: {rec['id'].shape[0]} forest edges for "
                           f"{n} nodes in {k} components; please report this with the input "
                           f"that caused it.")
    return SpanningForest(rec["id"], rec["t"].astype(tdt, copy=False),
                          rec["h"].astype(hdt, copy=False), rec["w"].astype(wdt, copy=False),
                          n, n_edges, k, lab, maximize, "dask-filter-kruskal",
                          provenance={"function": _FUNC, "plan": info})


def _assemble_by_solving(chosen, n, n_edges, maximize, dtypes, info):
    """The forest from records in no particular order (plans "filter" and "boruvka")."""
    tdt, hdt, wdt, kdt = dtypes
    keys = ("id", "t", "h", "w")
    if chosen:
        rec = {k: np.concatenate([c[k] for c in chosen]) for k in keys}
    else:
        rec = {k: np.empty(0, np.int64) for k in keys}
    chosen.clear()
    order = np.argsort(rec["id"], kind="stable")
    ids, t, h = rec.pop("id")[order], rec.pop("t")[order], rec.pop("h")[order]
    w = rec.pop("w")[order].astype(kdt, copy=False)
    del order
    # The union of the chosen edges is a forest; solving it once more orders it by the tie
    # rule and yields the component labels exactly as the in-memory function numbers them.
    f = solve_trusted(t, h, w, n, maximize=maximize, threads=1)
    if len(f) != ids.shape[0]:  # pragma: no cover - a broken invariant
        raise RuntimeError(f"{_FUNC}: internal error: the merged edges are not a forest; "
                           f"please report this with the input that caused it.")
    pos = f.edges
    method = "dask-" + ("+".join(["boruvka"] * bool(info["rounds"])
                                 + ["filter"] * bool(info["final"])) or "none")
    return SpanningForest(ids[pos], t[pos].astype(tdt), h[pos].astype(hdt), w[pos].astype(wdt),
                          n, n_edges, f.n_components, f.labels, maximize, method,
                          provenance={"function": _FUNC, "plan": info})
