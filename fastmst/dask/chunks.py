"""Partitions of a Dask edge collection, and each partition's edges as NumPy arrays.

``partitions`` turns the user's collection (Dask DataFrame, Bag, list of ``dask.delayed``) into
one Delayed per partition, selecting only the three edge columns of a DataFrame so that a
Parquet source reads nothing else.  ``chunk_arrays`` turns whatever one partition yields (a
pandas or pyarrow table, a mapping, a tuple, rows) into ``(tail, head, weight)`` arrays.
``stats`` is the validation pass's task: it checks one partition, draws its weight sample and,
for the plan "filter-kruskal", returns its lightest rows (``lightest``).  ``source_hints`` reads
row counts and the largest id from a Parquet source's footers before that pass.
"""
from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np

import pandas as pd
from dask.delayed import Delayed

from fastmst import validation
from fastmst._kernels.rule_order import weight_keys
from fastmst.dask import checks

FUNC = "fastmst.dask.minimum_spanning_forest"
_FUNC = FUNC

#: Rows sampled by the validation pass over all partitions together (split evenly between the
#: partitions; each sampled row stands for ``rows / sampled`` rows of its partition).
SAMPLE_ROWS = 1 << 20
#: Rows sampled per partition at least (all of a smaller partition).
MIN_SAMPLE_PER_PARTITION = 256


def _column(values, name, where):
    """One column of a table chunk as a NumPy array, refusing missing values."""
    if isinstance(values, pd.Series):
        if isinstance(values.dtype, np.dtype):  # NaN in float columns is checked later
            return values.to_numpy()
        # an extension dtype (nullable Int64, pyarrow-backed, ...): refuse NA, then unwrap
        checks.check_chunk_no_missing(values, name, _FUNC, where)
        return values.to_numpy(dtype=numpy_dtype(values.dtype))
    if hasattr(values, "null_count") and hasattr(values, "to_numpy"):  # a pyarrow column
        if values.null_count:
            checks.check_chunk_no_missing(values.to_pandas(), name, _FUNC, where)
        return values.to_numpy()
    return np.asarray(values)


def chunk_arrays(chunk, names, where):
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
        parts = [chunk_arrays(c, names, f"{where}, item {i}") for i, c in enumerate(chunk)]
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


def stats(chunk, names, index, n_nodes, per_partition, quota=0, maximize=False):
    """Task of the validation pass: check one partition, count its rows, find its largest id,
    and draw ``per_partition`` rows uniformly without replacement (seeded by ``index``, so a
    retried task draws the same rows).  The sample keeps the rows' endpoints and weights in
    the partition's own dtypes; the client maps them to the rule's keys.

    With ``quota`` > 0 the task also returns its ``quota`` lightest rows (``lightest``), the
    first level of the plan "filter-kruskal" brought by this pass."""
    where = f"partition {index}"
    t, h, w = chunk_arrays(chunk, names, where)
    if not (t.shape == h.shape == w.shape) or t.ndim != 1:
        raise ValueError(f"{_FUNC}: tail, head and weight of {where} must be 1-D with one entry "
                         f"per edge, received shapes {t.shape}, {h.shape} and {w.shape}.")
    checks.check_chunk_ids(t, "tail", n_nodes, _FUNC, where, code=f"edges[{names[0]!r}]")
    checks.check_chunk_ids(h, "head", n_nodes, _FUNC, where, code=f"edges[{names[1]!r}]")
    wk = validation.check_weights(w, _FUNC, "weight", code=f"edges[{names[2]!r}]", where=where)
    m = int(t.shape[0])
    hi = max(int(t.max()), int(h.max())) if m else -1
    k = min(m, int(per_partition))
    if k == m:
        rows = np.arange(m, dtype=np.int64)
    else:
        rows = np.sort(np.random.default_rng([index, m]).choice(m, k, replace=False))
    sample = {"row": rows, "t": as_ids(t[rows]), "h": as_ids(h[rows]), "w": w[rows]}
    out = {"m": m, "hi": hi, "tail": t.dtype.str, "head": h.dtype.str, "weight": w.dtype.str,
           "nbytes": int(t.nbytes + h.nbytes + w.nbytes), "sample": sample}
    if quota:
        out["lightest"] = lightest(t, h, wk, int(quota), maximize)
    return out


def lightest(t, h, w, quota, maximize):
    """The ``quota`` lightest rows of a partition by (weight key, row), self-loops left out
    of the returned rows (they are never forest edges) but counted in the quota.

    Returns ``row`` (ascending), ``t``, ``h``, ``w`` (the kernel dtype ``w`` is in) and
    ``bound``: None when every row was taken, else ``(key, row, weight)`` of the largest row
    taken: every row of the partition below it in the rule order is among the returned ones.
    O(rows): one key map, one partition of the keys, two comparisons."""
    m = t.shape[0]
    if quota >= m:
        sel, bound = np.arange(m, dtype=np.int64), None
    else:
        keys = weight_keys(w, maximize)
        kth = np.partition(keys, quota - 1)[quota - 1]
        mask = keys < kth
        ties = np.flatnonzero(keys == kth)[:quota - int(np.count_nonzero(mask))]
        mask[ties] = True  # the tied rows with the lowest positions: the rule's order
        del keys
        sel = np.flatnonzero(mask)
        del mask
        last = int(ties[-1])
        bound = (int(kth), last, w[last:last + 1].copy())
    sel = sel[t[sel] != h[sel]]
    return {"row": sel, "t": as_ids(t[sel]), "h": as_ids(h[sel]), "w": w[sel],
            "bound": bound, "wdtype": w.dtype.str}


def as_ids(x):
    """int32/int64 ids as they are; other integer dtypes as int64 (so chunks concatenate
    exactly and index the label arrays)."""
    if x.dtype in (np.dtype(np.int32), np.dtype(np.int64)):
        return x
    return x.astype(np.int64)


def edge_arrays(chunk, names, wdtype):
    """The chunk's ``(tail, head, weight)`` for the solve passes: ids as ``as_ids``, weights in
    the common kernel dtype ``wdtype``, empty chunks as empty int64 ids."""
    t, h, w = chunk_arrays(chunk, names, "a partition")
    if t.size == 0:
        t = h = np.empty(0, np.int64)  # empty float columns of an all-empty chunk
    return as_ids(t), as_ids(h), w.astype(wdtype, copy=False)


def partitions(edges, names):
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
                validation.check_ids(np.empty(1, dtype=numpy_dtype(dtypes[col])),
                                     f"{role} column {col!r}", _FUNC, code=f"edges[{col!r}]")
            if role == "weight":
                validation.check_weights(np.empty(0, dtype=numpy_dtype(dtypes[col])), _FUNC,
                                         f"weight column {col!r}", code=f"edges[{col!r}]")
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


def source_hints(edges, names, n_parts):
    """``(rows per partition, largest node id)`` from a Parquet source's metadata (file
    footers: no column is read), each None when unknown (another source, missing statistics,
    partitions that are not whole files or row groups, a Dask version without this route).

    Hints only: they size the validation pass's light rows; the row counts and ids that
    matter are the ones that pass counts and checks."""
    try:
        from dask.dataframe.dask_expr.io.parquet import ReadParquet, _collect_pq_statistics
        expr = edges[list(names)].expr.optimize(fuse=False)
        if not isinstance(expr, ReadParquet) or expr.filters:
            return None, None
        found = _collect_pq_statistics(expr, columns=[names[0], names[1]])
    except Exception:  # noqa: BLE001 - an optional shortcut; the pass itself counts the rows
        return None, None
    if not found or len(found) != n_parts:
        return None, None
    lengths = [int(s.get("num-rows", -1)) for s in found]
    if min(lengths) < 0:
        return None, None
    tops = []
    for s, m in zip(found, lengths):
        cols = {c.get("name"): c.get("max") for c in s.get("columns", [])}
        if m and not all(isinstance(cols.get(c), (int, np.integer)) for c in names[:2]):
            return lengths, None
        if m:
            tops.append(max(int(cols[names[0]]), int(cols[names[1]])))
    return lengths, max(tops, default=-1)


def numpy_dtype(dtype):
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
