"""Minimum spanning forests of edge lists larger than memory, on Dask.

Install with ``pip install fastmst[dask]``; this module is not imported by ``import fastmst``.

The edges live in a Dask collection (a Dask DataFrame such as ``dd.read_parquet(...)``, a Dask
Bag, or a list of ``dask.delayed`` chunks) with *global* node ids.  Edge ``k`` of partition ``p``
gets the global edge id ``offset[p] + k``, where ``offset`` is the running sum of the partition
lengths, so the ids are the positions the edges would have in the concatenated arrays.  Every
step below breaks ties by (weight, edge id), the rule of :func:`fastmst.minimum_spanning_forest`;
the forest under that total order is unique, so the result is identical to the in-memory solve
on the concatenated arrays, for every partitioning, cluster size and retry.

Two reductions are combined (see ``plan`` in :func:`minimum_spanning_forest`):

* **Filtering by the cycle property.**  The minimum spanning forest of a union of edge sets is
  the forest of the union of their forests.  Each partition is reduced to its local forest by
  the compiled kernels, and the forests are merged in a tree reduction, ``split_every`` at a
  time.  A merge holds at most ``split_every * (n - 1)`` edges, so this is the route for dense
  graphs (many edges per node).
* **Distributed Borůvka rounds.**  Each partition reports, for every component it touches, the
  lightest incident edge (a map), these are min-reduced in a tree, the client contracts the
  chosen edges (all of them belong to the forest), and the new component labels are broadcast
  to every worker (``Client.scatter(..., broadcast=True)``).  Edges inside one component become
  self-loops and are dropped.  The number of components at least halves in each round, which
  is what sparse graphs need: there, local forests keep almost every edge.
"""
from __future__ import annotations

import time
import uuid
from collections.abc import Mapping, Sequence

import numpy as np

import dask
from dask.delayed import Delayed

from fastmst import validation
from fastmst._kernels.dsu import DisjointSet
from fastmst.dask import checks
from fastmst.solve.result import SpanningForest
from fastmst.solve.solve import solve_trusted

__all__ = ["minimum_spanning_forest", "PLANS", "BYTES_PER_EDGE"]

_FUNC = "fastmst.dask.minimum_spanning_forest"

PLANS = ("auto", "filter", "boruvka")

#: Working-set bytes per edge held by one merge task (ids, endpoints, weight, the sorted copy
#: and the kernel's buffers), estimated from the arrays it allocates; with it the 100M- and
#: 200M-edge runs of bench/bench_dask.py stayed under 2.3 GiB per 3 GiB worker.  Used to turn
#: a worker memory limit into the default ``max_task_edges``.
BYTES_PER_EDGE = 96

_DEFAULT_TASK_EDGES = 1 << 24
_MAX_RANGES = 256
_MIN_RANGE = 1 << 16  # components per range at least (smaller ranges only add tasks)


# ---------------------------------------------------------------------------------------------
# Chunks: turning whatever a partition holds into three NumPy arrays.

def _column(values, name, where):
    """One column of a table chunk as a NumPy array, refusing missing values."""
    import pandas as pd
    if isinstance(values, pd.Series):
        if isinstance(values.dtype, np.dtype):  # NaN in float columns is checked later
            return values.to_numpy()
        # an extension dtype (nullable Int64, pyarrow-backed, ...): refuse NA, then unwrap
        checks.check_chunk_no_missing(values, name, _FUNC, where)
        return values.to_numpy(dtype=_numpy_dtype(values.dtype))
    if hasattr(values, "null_count") and hasattr(values, "to_numpy"):  # a pyarrow column
        if values.null_count:
            checks.check_chunk_no_missing(values.to_pandas(), name, _FUNC, where)
        return values.to_numpy()
    return np.asarray(values)


def _chunk_arrays(chunk, names, where):
    """``(tail, head, weight)`` NumPy arrays of one chunk (a table, mapping, triple or rows)."""
    t, h, w = names
    wanted = {"tail": t, "head": h, "weight": w}
    if isinstance(chunk, list) and not chunk:
        z = np.empty(0, np.int64)
        return z, z, np.empty(0, np.float64)
    if isinstance(chunk, list):  # a Bag partition: several chunks, or (tail, head, weight) rows
        first = chunk[0]
        if isinstance(first, (tuple, list)) and len(first) == 3 and np.ndim(first[0]) == 0:
            cols = list(zip(*chunk))
            return (np.asarray(cols[0]), np.asarray(cols[1]), np.asarray(cols[2]))
        parts = [_chunk_arrays(c, names, f"{where}, item {i}") for i, c in enumerate(chunk)]
        return tuple(np.concatenate([p[k] for p in parts]) for k in range(3))
    if hasattr(chunk, "columns") and hasattr(chunk, "__getitem__") and not isinstance(
            chunk, Mapping):
        present = list(chunk.columns) if not hasattr(chunk, "column_names") else list(
            chunk.column_names)
        checks.check_columns(present, wanted, _FUNC, where)
        return tuple(_column(chunk[c], role, where) for role, c in zip(wanted, names))
    if hasattr(chunk, "column_names"):  # pyarrow Table / RecordBatch
        checks.check_columns(chunk.column_names, wanted, _FUNC, where)
        return tuple(_column(chunk.column(c), role, where) for role, c in zip(wanted, names))
    if isinstance(chunk, Mapping):
        checks.check_columns(list(chunk.keys()), wanted, _FUNC, where)
        return tuple(_column(chunk[c], role, where) for role, c in zip(wanted, names))
    if isinstance(chunk, tuple) and len(chunk) == 3:
        return tuple(_column(c, role, where) for role, c in zip(wanted, chunk))
    raise TypeError(f"{_FUNC}: {where} holds a {type(chunk).__name__}; expected a pandas or "
                    f"pyarrow table with columns {list(names)!r}, a mapping of those columns, a "
                    f"(tail, head, weight) tuple of arrays, or a list of such chunks or of "
                    f"(tail, head, weight) rows.")


def _stats(chunk, names, index, n_nodes):
    """Validate one chunk; return its length, largest id and dtypes."""
    where = f"partition {index}"
    t, h, w = _chunk_arrays(chunk, names, where)
    if not (t.shape == h.shape == w.shape) or t.ndim != 1:
        raise ValueError(f"{_FUNC}: tail, head and weight of {where} must be 1-D with one entry "
                         f"per edge, received shapes {t.shape}, {h.shape} and {w.shape}.")
    checks.check_chunk_ids(t, "tail", n_nodes, _FUNC, where)
    checks.check_chunk_ids(h, "head", n_nodes, _FUNC, where)
    validation.check_weights(w, _FUNC, f"weight ({where})")
    hi = max(int(t.max()), int(h.max())) if t.size else -1
    return {"m": int(t.shape[0]), "hi": hi, "tail": t.dtype.str, "head": h.dtype.str,
            "weight": w.dtype.str}


# ---------------------------------------------------------------------------------------------
# Records: the edges one task hands on, as a dict of arrays in global edge id order.

def _empty_record(wdtype):
    z = np.empty(0, np.int64)
    return {"id": z, "t": z, "h": z, "w": np.empty(0, wdtype), "ct": z, "ch": z}


def _relabelled(chunk, names, offset, labels, wdtype):
    """The chunk's edges with global ids and current component ids, self-loops dropped."""
    t, h, w = _chunk_arrays(chunk, names, "a partition")
    if t.size == 0:
        t = h = np.empty(0, np.int64)  # empty float columns of an all-empty chunk
    # int32/int64 ids are used as they are; others become int64 so chunks concatenate exactly
    t, h = (x if x.dtype in (np.dtype(np.int32), np.dtype(np.int64)) else x.astype(np.int64)
            for x in (t, h))
    w = w.astype(wdtype, copy=False)
    if labels is None:
        ct, ch = t, h
    else:
        ct, ch = labels[t], labels[h]
    keep = np.flatnonzero(ct != ch)
    if keep.shape[0] == t.shape[0]:  # no self-loop: skip the copies
        rec = {"id": keep + offset, "t": t, "h": h, "w": w, "ct": ct, "ch": ch}
    else:
        rec = {"id": keep + offset, "t": t[keep], "h": h[keep], "w": w[keep],
               "ct": ct[keep], "ch": ch[keep]}
    return rec, int(t.shape[0])


def _local_forest(rec, n_comp, maximize):
    """Positions (ascending) of the forest of a record's edges under the (weight, id) rule."""
    m = rec["id"].shape[0]
    if m == 0:
        return np.empty(0, np.int64)
    ct, ch = rec["ct"], rec["ch"]
    if n_comp > 8 * m + 1024:  # compact the ids so the kernel's work arrays stay O(m)
        uniq, inv = np.unique(np.concatenate([ct, ch]), return_inverse=True)
        ct, ch, n_comp = inv[:m], inv[m:], uniq.shape[0]
    # Valid by construction: ids checked in pass 0 (or component labels), kernel weights.
    f = solve_trusted(ct, ch, rec["w"], n_comp, maximize=maximize, threads=1)
    return np.sort(f.edges)


def _take(rec, idx):
    return {k: v[idx] for k, v in rec.items()}


def _leaf(chunk, names, offset, labels, n_comp, wdtype, maximize):
    """Map task of the filter: one partition reduced to its local forest."""
    rec, _ = _relabelled(chunk, names, offset, labels, wdtype)
    return _take(rec, _local_forest(rec, n_comp, maximize))


def _merge(records, n_comp, maximize, wdtype):
    """Reduce task of the filter: the forest of the union of several forests."""
    records = [r for r in records if r["id"].shape[0]]
    if not records:
        return _empty_record(wdtype)
    rec = {k: np.concatenate([r[k] for r in records]) for k in records[0]}
    order = np.argsort(rec["id"], kind="stable")
    rec = _take(rec, order)
    return _take(rec, _local_forest(rec, n_comp, maximize))


# ---------------------------------------------------------------------------------------------
# Borůvka: lightest incident edge of every component.

def _extreme(wdtype, maximize):
    dt = np.dtype(wdtype)
    if dt.kind == "f":
        return -np.inf if maximize else np.inf
    info = np.iinfo(dt)
    return info.min if maximize else info.max


_NO_EDGE = np.iinfo(np.int64).max


def _select(comp, w, ids, n_comp, maximize):
    """For every component in ``comp``, the row of its lightest entry by (weight, id).

    Dense scatter over the ``n_comp`` components: O(len(comp) + n_comp) time, no sort and no
    search (both are bound by memory latency at this size).  Returns ``(components, rows)``.
    """
    best_w = np.full(n_comp, _extreme(w.dtype, maximize), dtype=w.dtype)
    (np.maximum if maximize else np.minimum).at(best_w, comp, w)
    tied = np.flatnonzero(w == best_w[comp])
    del best_w
    tc, ti = comp[tied], ids[tied]
    best_id = np.full(n_comp, _NO_EDGE, dtype=np.int64)
    np.minimum.at(best_id, tc, ti)
    win = ti == best_id[tc]
    comps = np.flatnonzero(best_id != _NO_EDGE)
    del best_id
    row = np.empty(n_comp, dtype=np.int64)
    row[tc[win]] = tied[win]  # copies of one edge (same id) are interchangeable
    return comps, row[comps]


def _candidates(chunk, names, offset, labels, n_comp, wdtype, maximize, bounds):
    """Map task of a Borůvka round: per touched component, its lightest incident edge.

    Returns one piece per component range ``[bounds[r], bounds[r+1])`` (so that each range is
    min-reduced by its own tasks), each a ``(candidates, rows)`` pair; ``rows`` (the edges not
    yet self-loops) is counted in the first piece only.
    """
    rec, _ = _relabelled(chunk, names, offset, labels, wdtype)
    m = rec["id"].shape[0]
    comp = np.concatenate([rec["ct"], rec["ch"]])
    w2 = np.concatenate([rec["w"], rec["w"]])
    ids = np.concatenate([rec["id"], rec["id"]])
    comps, rows = _select(comp, w2, ids, n_comp, maximize)
    del comp, w2, ids
    rows[rows >= m] -= m
    # 28 bytes per candidate (int32 ids): the client recomputes the components from labels.
    out = {k: rec[k][rows] for k in ("id", "t", "h", "w")}
    out["comp"] = comps.astype(_label_dtype(n_comp))
    cut = np.searchsorted(comps, bounds)  # comps are ascending
    return tuple(({k: v[cut[r]:cut[r + 1]] for k, v in out.items()}, m if r == 0 else 0)
                 for r in range(len(bounds) - 1))


def _merge_candidates(parts, lo, size, maximize, wdtype):
    """Reduce task of a Borůvka round: the lightest candidate of every component of one
    range ``[lo, lo + size)``."""
    recs = [p[0] for p in parts if p[0]["id"].shape[0]]
    survivors = sum(p[1] for p in parts)
    if not recs:
        z = np.empty(0, np.int64)
        return {"id": z, "t": z, "h": z, "w": np.empty(0, wdtype), "comp": z}, survivors
    rec = {k: np.concatenate([r[k] for r in recs]) for k in recs[0]}
    comps, rows = _select(rec["comp"] - lo, rec["w"], rec["id"], size, maximize)
    out = _take(rec, rows)
    out["comp"] = (comps + lo).astype(rec["comp"].dtype)
    return out, survivors


def _label_dtype(n):
    return np.int32 if n < validation.INT32_LIMIT else np.int64


# ---------------------------------------------------------------------------------------------
# The driver (runs on the client).

def _partitions(edges, names):
    """The input as a list of Delayed objects, one per partition (each yields one chunk)."""
    try:
        import dask.dataframe as dd
    except ImportError:  # pragma: no cover - dask[dataframe] is part of fastmst[dask]
        dd = None
    if dd is not None and isinstance(edges, dd.DataFrame):
        wanted = dict(zip(("tail", "head", "weight"), names))
        checks.check_columns(list(edges.columns), wanted, _FUNC, "the Dask DataFrame")
        dtypes = edges.dtypes
        for role, col in wanted.items():
            kind = getattr(dtypes[col], "kind", "O")
            if role != "weight" and kind not in "iu":
                validation.check_ids(np.empty(1, dtype=_numpy_dtype(dtypes[col])),
                                     f"{role} column {col!r}", _FUNC)
            if role == "weight":
                validation.check_weights(np.empty(0, dtype=_numpy_dtype(dtypes[col])), _FUNC,
                                         f"weight column {col!r}")
        return list(edges[list(names)].to_delayed(optimize_graph=True))
    if hasattr(edges, "to_delayed") and hasattr(edges, "npartitions"):  # a Bag
        return list(edges.to_delayed(optimize_graph=True))
    if isinstance(edges, Delayed):
        return [edges]
    if isinstance(edges, Sequence) and not isinstance(edges, (str, bytes)):
        parts = list(edges)
        if not parts:
            return parts
        if all(isinstance(p, Delayed) for p in parts):
            return parts
        bad = next(i for i, p in enumerate(parts) if not isinstance(p, Delayed))
        raise TypeError(f"{_FUNC}: edges[{bad}] is a {type(parts[bad]).__name__}; a list input "
                        f"must hold dask.delayed chunks only. Wrap each chunk, e.g. "
                        f"[dask.delayed(pd.read_parquet)(f) for f in files], or pass "
                        f"dd.read_parquet(files).")
    raise TypeError(f"{_FUNC}: edges is a {type(edges).__name__}; expected a Dask DataFrame "
                    f"(e.g. dd.read_parquet(path)), a Dask Bag, or a list of dask.delayed edge "
                    f"chunks. For arrays in memory use fastmst.minimum_spanning_forest.")


def _numpy_dtype(dtype):
    """The NumPy dtype behind a pandas/pyarrow extension dtype (object when there is none)."""
    if isinstance(dtype, np.dtype):
        return dtype
    nd = getattr(dtype, "numpy_dtype", None)
    if nd is None and hasattr(dtype, "pyarrow_dtype"):
        try:
            nd = dtype.pyarrow_dtype.to_pandas_dtype()
        except (NotImplementedError, TypeError):
            nd = None
    return np.dtype(nd) if nd is not None and not isinstance(nd, str) else np.dtype(object)


def _get_client(client):
    if client is False:
        return None
    if client is not None:
        return client
    try:
        from distributed import default_client
        return default_client()
    except (ImportError, ValueError):
        return None


class _Runner:
    """Computes lists of Delayed on the client's cluster (or the local scheduler), with
    Dask's own progress bars when asked."""

    def __init__(self, client, progress):
        self.client = client
        self.progress = progress
        self.phases = []

    def run(self, tasks, label):
        start = time.perf_counter()
        if self.client is not None:
            futures = self.client.compute(tasks)
            if self.progress:
                from distributed import progress
                print(f"fastmst.dask: {label}", flush=True)
                progress(futures)
            out = self.client.gather(futures)
        elif self.progress:
            from dask.diagnostics import ProgressBar
            print(f"fastmst.dask: {label}", flush=True)
            with ProgressBar():
                out = dask.compute(*tasks)
        else:
            out = dask.compute(*tasks)
        self.phases.append((label, time.perf_counter() - start))
        return list(out)

    def share(self, array, round_no):
        """Broadcast an array to every worker once; tasks receive it as an argument."""
        if array is None:
            return None
        if self.client is not None:
            return self.client.scatter(array, broadcast=True, hash=False)
        return dask.delayed(array, name=f"fastmst-labels-{round_no}-{id(array)}")


def _tree(items, combine, split_every, *args, name):
    """Reduce ``items`` (Delayed) ``split_every`` at a time until one is left."""
    level = 0
    while len(items) > 1:
        items = [dask.delayed(combine, pure=True)(items[i:i + split_every], *args,
                                                  dask_key_name=f"{name}-{level}-{i}")
                 for i in range(0, len(items), split_every)]
        level += 1
    return items[0]


def minimum_spanning_forest(edges, n_nodes=None, *, tail="tail", head="head", weight="weight",
                            maximize=False, plan="auto", split_every=8, max_task_edges=None,
                            client=None, progress=False) -> SpanningForest:
    """Minimum (or maximum) spanning forest of an edge list held in a Dask collection.

    Parameters
    ----------
    edges : dask.dataframe.DataFrame, dask.bag.Bag or list of dask.delayed
        The edges, in partitions.  A DataFrame (e.g. ``dd.read_parquet(files)``) needs the
        columns named by ``tail``, ``head`` and ``weight``; each Bag partition or delayed chunk
        may be a pandas/pyarrow table with those columns, a mapping of them, a
        ``(tail, head, weight)`` tuple of arrays, or a list of such chunks or of
        ``(tail, head, weight)`` rows.  Node ids are global integers in ``[0, n_nodes)``.
    n_nodes : int, optional
        Number of nodes; defaults to the largest id + 1.
    tail, head, weight : str
        Column names.
    maximize : bool
        Return the maximum spanning forest instead.
    plan : {"auto", "filter", "boruvka"}
        ``"filter"``: reduce every partition to its local forest and merge the forests in a tree.
        ``"boruvka"``: Borůvka rounds until the remaining edges fit in one task, then one local
        solve.  ``"auto"`` combines them by the rule in the Notes.  Every plan returns the
        identical forest.
    split_every : int, >= 2
        Fan-in of the tree reductions (forests merged, or candidate sets min-reduced, per task).
    max_task_edges : int, optional
        The most edges one merge or final solve may hold.  Defaults to the smallest worker
        memory limit divided by ``BYTES_PER_EDGE`` (at most 2**24 = 16.8M), or 2**24 without
        a limit.  Map tasks hold one partition each: keep partitions below this size too.
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
        ``provenance["plan"]`` (also ``dask_plan``) records the passes that ran (rounds,
        sizes, seconds).

    Notes
    -----
    One pass first reads every partition to validate it and count its rows (the offsets).
    Then, with ``n`` the current number of components (the nodes, then the components left
    by Borůvka rounds), ``R`` an upper bound on the edges that are not yet self-loops and
    ``B = max_task_edges``, ``plan="auto"`` repeats:

    1. ``R <= B``: one task merges all the local forests: a final local solve.  Done.
    2. ``split_every * (n - 1) <= B``: filter (local forests merged ``split_every`` at a time,
       each merge at most ``split_every * (n - 1) <= B`` edges).  Done.
    3. Otherwise one Borůvka round, which at least halves ``n``; repeat.  The components are
       cut into ranges of ``max(B // split_every, 65536)`` components (at most 256 ranges)
       and the candidates of each range are min-reduced by their own tree, ``split_every``
       at a time, so that no reduction holds more than ``max(B, 65536 * split_every)``
       candidates.

    Memory per task is therefore bounded by one partition plus ``B`` edges plus O(n) for the
    component labels (4 bytes per node, 8 beyond 2**31 nodes) and the per-component minima
    (16 bytes per component); the client holds O(n) as well (labels and the forest).
    Each pass re-reads the partitions from their source; nothing is persisted.

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
    parts = _partitions(edges, names)
    client = _get_client(client)
    if max_task_edges is None:
        max_task_edges = _default_task_edges(client)
    runner = _Runner(client, progress)

    # Pass 0: validate, count rows, find the largest id.
    stats = runner.run([dask.delayed(_stats, pure=True)(p, names, i, n_nodes)
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

    chosen = []  # records of forest edges found so far
    labels = None  # node -> current component; None while every node is its own
    n_comp = n
    remaining = n_edges
    info = {"plan": plan, "n_partitions": len(parts), "max_task_edges": max_task_edges,
            "split_every": split_every, "rounds": [], "final": None}
    round_no = 0
    run_id = uuid.uuid4().hex[:12]
    while remaining > 0 and n_comp > 1:
        fits = remaining <= max_task_edges
        if plan == "filter" or fits or (plan == "auto"
                                        and split_every * (n_comp - 1) <= max_task_edges):
            shared = runner.share(labels, round_no)
            leaves = [dask.delayed(_leaf, pure=True)(p, names, int(offsets[i]), shared, n_comp,
                                                     kdt, maximize)
                      for i, p in enumerate(parts)]
            fan = max(2, len(leaves)) if fits else split_every
            root = _tree(leaves, _merge, fan, n_comp, maximize, kdt,
                         name=f"fastmst-merge-{run_id}-{round_no}")
            (rec,) = runner.run([root], "merging local forests" if not fits
                                else "final local solve")
            chosen.append(rec)
            info["final"] = {"kind": "single task" if fits else "filter tree",
                             "n_components": n_comp, "edges_bound": remaining,
                             "fan_in": fan}
            break
        shared = runner.share(labels, round_no)
        # Components are split into ranges, each min-reduced by its own tree, so that no
        # reduction holds more than split_every * range entries (<= max_task_edges).
        span = max(_MIN_RANGE, max_task_edges // split_every)
        n_ranges = int(min(_MAX_RANGES, -(-n_comp // span)))
        bounds = np.linspace(0, n_comp, n_ranges + 1).round().astype(np.int64)
        maps = [dask.delayed(_candidates, pure=True, nout=n_ranges)(
                    p, names, int(offsets[i]), shared, n_comp, kdt, maximize, bounds)
                for i, p in enumerate(parts)]
        roots = [_tree([mp[r] for mp in maps], _merge_candidates, split_every,
                       int(bounds[r]), int(bounds[r + 1] - bounds[r]), maximize, kdt,
                       name=f"fastmst-boruvka-{run_id}-{round_no}-{r}")
                 for r in range(n_ranges)]
        pieces = runner.run(roots, f"Borůvka round {round_no + 1}")
        survivors = sum(p[1] for p in pieces)
        cand = {k: np.concatenate([p[0][k] for p in pieces]) for k in pieces[0][0]}
        del shared, pieces
        remaining = survivors
        if cand["id"].shape[0] == 0:
            break
        start = time.perf_counter()
        labels, n_comp, rec = _contract(cand, labels, n_comp, n)
        runner.phases.append((f"contraction {round_no + 1} (client)",
                              time.perf_counter() - start))
        chosen.append(rec)
        info["rounds"].append({"n_components_before": int(info["rounds"][-1][
            "n_components_after"] if info["rounds"] else n), "n_components_after": n_comp,
            "edges_not_self_loops": survivors, "forest_edges": int(rec["id"].shape[0]),
            "component_ranges": n_ranges})
        round_no += 1
    info["phases"] = runner.phases
    start = time.perf_counter()
    forest = _assemble(chosen, n, n_edges, maximize, (tdt, hdt, wdt, kdt), info)
    runner.phases.append(("assembling the forest (client)", time.perf_counter() - start))
    return forest


def _default_task_edges(client):
    if client is None:
        return _DEFAULT_TASK_EDGES
    try:
        limits = [w.get("memory_limit") or 0
                  for w in client.scheduler_info()["workers"].values()]
    except Exception:  # noqa: BLE001 - an unreachable scheduler surfaces on the first compute
        return _DEFAULT_TASK_EDGES
    limits = [x for x in limits if x]
    if not limits:
        return _DEFAULT_TASK_EDGES
    return int(max(1024, min(_DEFAULT_TASK_EDGES, min(limits) // BYTES_PER_EDGE)))


def _contract(cand, labels, n_comp, n):
    """Union the components joined by the chosen edges; return the new labels."""
    uniq, first = np.unique(cand["id"], return_index=True)
    rec = {k: cand[k][first] for k in ("id", "t", "h", "w")}
    cand.clear()  # the client holds O(n): free the candidates as soon as possible
    del first
    ct, ch = (rec["t"], rec["h"]) if labels is None else (labels[rec["t"]], labels[rec["h"]])
    ds = DisjointSet(n_comp)
    merged = ds.union_pairs(ct, ch)
    if int(np.count_nonzero(merged)) != uniq.shape[0]:  # pragma: no cover - a broken invariant
        raise RuntimeError(f"{_FUNC}: internal error: the Borůvka candidates closed a cycle; "
                           f"please report this with the input that caused it.")
    new = ds.labels()
    labels = (new if labels is None else new[labels]).astype(_label_dtype(n))
    return labels, int(ds.n_sets), rec


def _assemble(chosen, n, n_edges, maximize, dtypes, info):
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
