"""Every input check of fastmst, in one place.

Each message says what was received, what was expected and how to fix it, and names the first
offending position.  Wrong types raise TypeError, wrong values raise ValueError.  Nothing here
mutates its inputs: conversions make new arrays, and arrays already in a kernel dtype are passed
through without a copy (read-only and memory-mapped arrays included).
"""
from __future__ import annotations

import operator
import os
from dataclasses import dataclass

import numpy as np

INT32_LIMIT = 2**31

# Weight dtypes the kernels read in place (see _typedefs.pxd); narrower ones are widened once.
_KERNEL_WEIGHTS = {np.dtype(t) for t in (np.float32, np.float64, np.int32, np.int64,
                                         np.uint32, np.uint64)}
_WIDEN = {np.dtype(np.int8): np.int32, np.dtype(np.int16): np.int32,
          np.dtype(np.uint8): np.int32, np.dtype(np.uint16): np.int32,
          np.dtype(np.float16): np.float32}


@dataclass(frozen=True)
class EdgeArrays:
    """Validated edges.

    ``tail``/``head``/``weight`` are the caller's arrays as NumPy arrays (dtypes kept, for the
    result); ``ktail``/``khead``/``kweight`` are contiguous, native-endian arrays in kernel dtypes
    (int32 or int64 ids, the same dtype for both), views of the caller's data where possible.
    """
    tail: np.ndarray
    head: np.ndarray
    weight: np.ndarray
    ktail: np.ndarray
    khead: np.ndarray
    kweight: np.ndarray
    n_nodes: int

    @property
    def n_edges(self) -> int:
        return int(self.tail.shape[0])


def _as_1d(x, name: str, func: str) -> np.ndarray:
    if x is None:
        raise TypeError(f"{func}: {name} is None; expected a 1-D array of length E.")
    try:
        arr = np.asarray(x)
    except (ValueError, TypeError) as exc:
        raise TypeError(f"{func}: {name} could not be read as an array ({exc}); pass a 1-D "
                        f"NumPy array or list of numbers.") from None
    if arr.ndim != 1:
        raise ValueError(f"{func}: {name} must be 1-D, received an array of shape {arr.shape}; "
                         f"pass one value per edge (flatten with .ravel() if that is what "
                         f"you meant).")
    return arr


def _native_contiguous(arr: np.ndarray, dtype=None) -> np.ndarray:
    """The same data as a contiguous native-endian array; no copy when it already is one."""
    dtype = np.dtype(dtype or arr.dtype).newbyteorder("=")
    return np.ascontiguousarray(arr, dtype=dtype)


def check_ids(arr: np.ndarray, name: str, func: str) -> np.ndarray:
    """Check the dtype of an id array; return it (empty float arrays become int64)."""
    kind = arr.dtype.kind
    if arr.size == 0 and kind in "fiu":
        return arr.astype(np.int64) if kind == "f" else arr
    if kind in "iu":
        return arr
    if kind == "b":
        raise TypeError(f"{func}: {name} has dtype bool; node ids must be integers. Convert with "
                        f"{name}.astype(np.int64) if True/False really are node ids 1/0.")
    if kind == "f":
        raise TypeError(f"{func}: {name} has dtype {arr.dtype}; node ids must be integers "
                        f"0..n_nodes-1. If the values are whole numbers, convert with "
                        f"{name}.astype(np.int64).")
    raise TypeError(f"{func}: {name} has dtype {arr.dtype}; node ids must be integers "
                    f"0..n_nodes-1. Map other labels (strings, map ids) to compact integers "
                    f"first, e.g. with np.unique(labels, return_inverse=True).")


def check_weights(arr: np.ndarray, func: str, name: str = "weight") -> np.ndarray:
    """Check the dtype and values of a weight array; return it in a kernel dtype."""
    dt = arr.dtype
    if dt.kind == "b":
        raise TypeError(f"{func}: {name} has dtype bool; expected integer or float weights. "
                        f"Convert with {name}.astype(np.int64) if 0/1 costs are meant.")
    if dt.kind not in "iuf":
        raise TypeError(f"{func}: {name} has dtype {dt}; expected integer or float weights "
                        f"(int32, int64, uint32, uint64, float32, float64 are read in place). "
                        f"Convert with {name}.astype(np.float64).")
    native = np.dtype(dt).newbyteorder("=")
    if native in _WIDEN:
        arr = arr.astype(_WIDEN[native])
    elif native not in _KERNEL_WEIGHTS:
        raise TypeError(f"{func}: {name} has dtype {dt}, which the kernels cannot compare "
                        f"exactly; expected float32, float64 or a 32/64-bit integer. Convert "
                        f"with {name}.astype(np.float64).")
    arr = _native_contiguous(arr)
    if arr.dtype.kind == "f" and arr.size and np.isnan(arr.min()):
        first = int(np.flatnonzero(np.isnan(arr))[0])
        raise ValueError(f"{func}: {name}[{first}] is NaN; every edge needs a comparable "
                         f"weight. Drop or fill the NaN edges first (e.g. keep = "
                         f"~np.isnan({name})); infinite weights are allowed.")
    return arr


def check_n_nodes(n_nodes, func: str) -> int | None:
    if n_nodes is None:
        return None
    if isinstance(n_nodes, (bool, np.bool_)) or not isinstance(n_nodes, (int, np.integer)):
        raise TypeError(f"{func}: n_nodes must be an integer or None, received "
                        f"{type(n_nodes).__name__} {n_nodes!r}.")
    n = int(n_nodes)
    if n < 0:
        raise ValueError(f"{func}: n_nodes must be >= 0, received {n}.")
    return n


def _range_error(arr, name, n_nodes, func, given):
    bad_neg = np.flatnonzero(arr < 0) if arr.dtype.kind == "i" else np.empty(0, np.int64)
    bad_big = np.flatnonzero(arr >= n_nodes)
    first = min(bad_neg[:1].tolist() + bad_big[:1].tolist())
    value = arr[first]
    if value < 0:
        raise ValueError(f"{func}: {name}[{first}] = {value} is negative; node ids must be in "
                         f"[0, n_nodes).")
    fix = (f"pass n_nodes >= {int(arr.max()) + 1} or fix the id" if given
           else "fix the id")
    raise ValueError(f"{func}: {name}[{first}] = {value} is out of range; expected ids in "
                     f"[0, {n_nodes}) for n_nodes={n_nodes}; {fix}.")


def _kernel_ids(tail: np.ndarray, head: np.ndarray, n_nodes: int):
    """Both id arrays in one kernel dtype (int32 when ids fit), viewing the data where possible."""
    wide = n_nodes >= INT32_LIMIT
    want = np.dtype(np.int64 if wide else np.int32)

    def reuse(arr):
        nat = arr.dtype.newbyteorder("=")
        if not arr.dtype.isnative or not arr.flags.c_contiguous:
            return None
        if nat in (np.dtype(np.int32), np.dtype(np.int64)):
            return arr
        # Validated ids are in [0, n_nodes), so unsigned data reads the same as signed.
        if nat == np.dtype(np.uint32) and not wide:
            return arr.view(np.int32)
        if nat == np.dtype(np.uint64):
            return arr.view(np.int64)
        return None

    t, h = reuse(tail), reuse(head)
    if t is not None and h is not None and t.dtype == h.dtype and (t.dtype == want or not wide):
        return t, h
    return np.ascontiguousarray(tail, dtype=want), np.ascontiguousarray(head, dtype=want)


def validate_edges(tail, head, weight, n_nodes=None, *,
                   func: str = "minimum_spanning_forest") -> EdgeArrays:
    """Validate an edge list and prepare the kernel arrays.

    Raises
    ------
    TypeError
        An argument of the wrong type or dtype.
    ValueError
        Arrays of different lengths or not 1-D, NaN weights, ids out of range, bad n_nodes.
    """
    t = check_ids(_as_1d(tail, "tail", func), "tail", func)
    h = check_ids(_as_1d(head, "head", func), "head", func)
    w = _as_1d(weight, "weight", func)
    if not (t.shape[0] == h.shape[0] == w.shape[0]):
        raise ValueError(f"{func}: tail, head and weight must have one length (one entry per "
                         f"edge), received lengths {t.shape[0]}, {h.shape[0]} and {w.shape[0]}.")
    kw = check_weights(w, func)
    n = check_n_nodes(n_nodes, func)
    m = t.shape[0]
    if m:
        lo = min(int(t.min()), int(h.min()))
        hi = max(int(t.max()), int(h.max()))
        limit = n if n is not None else hi + 1
        if lo < 0 or hi >= limit:
            for name, arr in (("tail", t), ("head", h)):
                if (arr.dtype.kind == "i" and int(arr.min()) < 0) or int(arr.max()) >= limit:
                    _range_error(arr, name, limit, func, n is not None)
        n = limit
    elif n is None:
        n = 0
    kt, kh = _kernel_ids(t, h, n)
    return EdgeArrays(t, h, w, kt, kh, kw, n)


def check_choice(value, valid, name: str, func: str) -> str:
    if not isinstance(value, str):
        raise TypeError(f"{func}: {name} must be a string, received {type(value).__name__} "
                        f"{value!r}; expected one of {', '.join(map(repr, valid))}.")
    if value not in valid:
        raise ValueError(f"{func}: unknown {name} {value!r}; expected one of "
                         f"{', '.join(map(repr, valid))}.")
    return value


def check_threads(threads, func: str) -> int:
    """Resolve ``threads`` (None or <= 0 means all available cores) to a positive count."""
    if threads is None:
        return max(1, len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity")
                   else (os.cpu_count() or 1))
    if isinstance(threads, (bool, np.bool_)):
        raise TypeError(f"{func}: threads must be an integer or None, received {threads!r}.")
    try:
        t = operator.index(threads)
    except TypeError:
        raise TypeError(f"{func}: threads must be an integer or None, received "
                        f"{type(threads).__name__} {threads!r}.") from None
    if t <= 0:
        return check_threads(None, func)
    return t


def check_bool(value, name: str, func: str) -> bool:
    if not isinstance(value, (bool, np.bool_)):
        raise TypeError(f"{func}: {name} must be True or False, received "
                        f"{type(value).__name__} {value!r}.")
    return bool(value)


def check_positions(positions, n_edges: int, name: str, func: str) -> np.ndarray:
    """Edge positions in [0, n_edges) as a new int64 array (order kept)."""
    arr = np.asarray(positions if positions is not None else [], dtype=None)
    if arr.ndim != 1:
        raise ValueError(f"{func}: {name} must be a 1-D array of edge positions, received shape "
                         f"{arr.shape}.")
    if arr.size == 0:
        return np.empty(0, dtype=np.int64)
    if arr.dtype.kind == "b":
        if arr.shape[0] != n_edges:
            raise ValueError(f"{func}: {name} is a boolean mask of length {arr.shape[0]}; a mask "
                             f"needs one entry per edge ({n_edges}).")
        return np.flatnonzero(arr).astype(np.int64)
    if arr.dtype.kind not in "iu":
        raise TypeError(f"{func}: {name} must hold integer edge positions (or be a boolean "
                        f"mask), received dtype {arr.dtype}.")
    bad = np.flatnonzero((arr < 0) | (arr >= n_edges))
    if bad.size:
        raise ValueError(f"{func}: {name}[{bad[0]}] = {arr[bad[0]]} is not an edge position; "
                         f"expected positions in [0, {n_edges}).")
    return arr.astype(np.int64)


# --- Files and tables (used by fastmst.io and the command line) -------------------------------

class FileFormatError(ValueError):
    """A malformed input file or table; the message names the source and the line or row."""


def check_column(name, present, source: str, role: str, func: str) -> str:
    """``name`` must be one of the ``present`` column names of ``source``."""
    if not isinstance(name, str):
        raise TypeError(f"{func}: the {role} column must be given by name (a string), received "
                        f"{type(name).__name__} {name!r}.")
    if name not in present:
        listed = ", ".join(map(repr, present)) or "none"
        raise FileFormatError(f"{source}: no column {name!r} for the {role}; the columns present "
                              f"are {listed}. Pick one of them (CLI: --{role} COLUMN).")
    return name


def check_no_missing(missing: np.ndarray, column: str, source: str, where, func: str) -> None:
    """Raise naming the first True entry of the boolean ``missing`` (``where(i)`` words it)."""
    if missing.size and missing.any():
        first = int(np.flatnonzero(missing)[0])
        raise FileFormatError(f"{source}: {where(first)}: column {column!r} is empty or missing "
                              f"({int(missing.sum())} such rows in all); every edge needs a "
                              f"value there. Fill or drop those rows.")


def check_unique_labels(labels: np.ndarray, column: str, source: str, where) -> None:
    """Node labels of a node table must be unique."""
    order = np.argsort(labels, kind="stable")
    s = labels[order]
    dup = np.flatnonzero(s[1:] == s[:-1])
    if dup.size:
        a, b = sorted((int(order[dup[0]]), int(order[dup[0] + 1])))
        raise FileFormatError(f"{source}: node {s[dup[0]]!r} in column {column!r} appears twice "
                              f"({where(a)} and {where(b)}); node ids must be unique. Remove the "
                              f"duplicate rows.")


# --- checks of the network-design toolkit (check_forest, sensitivity, bottleneck, clusters) ---

def validate_graph_with_forest(tail, head, weight, forest, n_nodes, maximize, threads, *,
                               name: str, func: str, strict_maximize: bool):
    """Shared checks of the functions that take a graph and a forest of it.

    ``forest`` is a SpanningForest (its ``maximize``, ``n_nodes`` and edge count are used and
    checked against the graph), an array of edge positions or a boolean mask.  With
    ``strict_maximize`` an explicit ``maximize`` that contradicts a SpanningForest is an error.

    Returns
    -------
    g : EdgeArrays
    pos : ndarray of shape (F,), dtype=int64
        The forest's positions.
    in_forest : ndarray of shape (E,), dtype=bool
    maximize : bool
    threads : int
    """
    from fastmst.solve.solve import SpanningForest
    expected_edges = None
    if isinstance(forest, SpanningForest):
        if maximize is None:
            maximize = forest.maximize
        elif strict_maximize and bool(maximize) != forest.maximize:
            raise ValueError(f"{func}: maximize={maximize!r} contradicts the forest, which is a "
                             f"{'maximum' if forest.maximize else 'minimum'} spanning forest; "
                             f"leave maximize out.")
        if n_nodes is None:
            n_nodes = forest.n_nodes
        expected_edges = forest.n_edges
        forest = forest.edges
    maximize = False if maximize is None else check_bool(maximize, "maximize", func)
    threads = check_threads(threads, func)
    g = validate_edges(tail, head, weight, n_nodes, func=func)
    if expected_edges is not None and expected_edges != g.n_edges:
        raise ValueError(f"{func}: the forest was computed on a graph of {expected_edges} "
                         f"edges, received {g.n_edges}; pass the same edge list.")
    pos = check_positions(forest, g.n_edges, name, func)
    in_forest = check_unique_positions(pos, g.n_edges, name, func)
    return g, pos, in_forest, maximize, threads


def check_unique_positions(pos: np.ndarray, n_edges: int, name: str, func: str) -> np.ndarray:
    """Reject repeated positions in an edge set (``pos`` from check_positions); return the
    boolean membership mask of shape (n_edges,)."""
    mask = np.zeros(n_edges, dtype=bool)
    mask[pos] = True
    if np.count_nonzero(mask) != pos.size:
        order = np.argsort(pos, kind="stable")
        s = pos[order]
        dup = np.flatnonzero(s[1:] == s[:-1])
        i, j = sorted((int(order[dup[0]]), int(order[dup[0] + 1])))
        raise ValueError(f"{func}: {name}[{j}] = {pos[j]} repeats {name}[{i}]; an edge set "
                         f"lists each edge position once. Deduplicate with np.unique({name}).")
    return mask


def check_node_pairs(a, b, n_nodes: int, func: str):
    """Node ids of query pairs: two broadcastable integer arrays with ids in [0, n_nodes).

    Returns (a, b, shape) with a and b flattened to contiguous int64 arrays.
    """
    arrs = []
    for name, x in (("a", a), ("b", b)):
        if x is None:
            raise TypeError(f"{func}: {name} is None; expected node ids (an integer or an array "
                            f"of integers).")
        arr = np.asarray(x)
        if arr.dtype.kind not in "iu" and not (arr.size == 0 and arr.dtype.kind == "f"):
            raise TypeError(f"{func}: {name} has dtype {arr.dtype}; expected integer node ids "
                            f"0..n_nodes-1. Convert with np.asarray({name}).astype(np.int64).")
        arrs.append(arr)
    try:
        a2, b2 = np.broadcast_arrays(*arrs)
    except ValueError:
        raise ValueError(f"{func}: a and b must have one shape (or broadcast to one), received "
                         f"shapes {arrs[0].shape} and {arrs[1].shape}.") from None
    shape = a2.shape
    out = []
    for name, arr in (("a", a2), ("b", b2)):
        flat = np.ascontiguousarray(arr.reshape(-1), dtype=np.int64)
        if flat.size:
            bad = np.flatnonzero((flat < 0) | (flat >= n_nodes))
            if bad.size:
                raise ValueError(f"{func}: {name} holds node id {flat[bad[0]]} (at flat index "
                                 f"{bad[0]}); expected ids in [0, {n_nodes}) for this forest of "
                                 f"{n_nodes} nodes.")
        out.append(flat)
    return out[0], out[1], shape


def check_cluster_count(k, low: int, high: int, func: str) -> int:
    """Number of clusters k, an integer in [low, high]."""
    if isinstance(k, (bool, np.bool_)) or not isinstance(k, (int, np.integer)):
        raise TypeError(f"{func}: k must be an integer number of clusters, received "
                        f"{type(k).__name__} {k!r}.")
    k = int(k)
    if not low <= k <= high:
        why = (f" (the graph already has {low} connected components, and each is at least one "
               f"cluster)" if low > 1 else "")
        raise ValueError(f"{func}: k = {k} is out of range; expected {low} <= k <= {high}, the "
                         f"number of nodes{why}.")
    return k


def check_real(value, name: str, func: str) -> float:
    """A real number (not NaN), e.g. a cut threshold."""
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer,
                                                                   np.floating)):
        raise TypeError(f"{func}: {name} must be a real number, received "
                        f"{type(value).__name__} {value!r}.")
    v = float(value)
    if v != v:
        raise ValueError(f"{func}: {name} is NaN; expected a real number.")
    return v


# --- points and Steiner trees ----------------------------------------------------------------

def check_points(points, func: str, name: str = "points") -> np.ndarray:
    """Coordinates as a new or viewed C-contiguous float64 array of shape (n, d); finite values."""
    if points is None:
        raise TypeError(f"{func}: {name} is None; expected an array of shape (n_points, d).")
    try:
        arr = np.asarray(points)
    except (ValueError, TypeError) as exc:
        raise TypeError(f"{func}: {name} could not be read as an array ({exc}); pass a NumPy "
                        f"array of shape (n_points, d), one row per point.") from None
    if arr.dtype.kind == "b" or arr.dtype.kind not in "iuf":
        raise TypeError(f"{func}: {name} has dtype {arr.dtype}; expected numeric coordinates. "
                        f"Convert with np.asarray({name}, dtype=float).")
    if arr.ndim != 2:
        raise ValueError(f"{func}: {name} must have shape (n_points, d), received an array of "
                         f"shape {arr.shape}; for one coordinate per point pass "
                         f"{name}.reshape(-1, 1).")
    if arr.shape[1] == 0:
        raise ValueError(f"{func}: {name} has shape {arr.shape}: points need at least one "
                         f"coordinate column.")
    arr = np.ascontiguousarray(arr, dtype=np.float64)
    if arr.size and not np.isfinite(arr).all():
        bad = np.argwhere(~np.isfinite(arr))[0]
        raise ValueError(f"{func}: {name}[{bad[0]}, {bad[1]}] = {arr[bad[0], bad[1]]}; every "
                         f"coordinate must be a finite number. Drop or fill those rows first, "
                         f"e.g. {name}[np.isfinite({name}).all(axis=1)].")
    return arr


def check_lonlat(points, func: str, name: str = "points") -> np.ndarray:
    """(longitude, latitude) rows in degrees, latitudes in [-90, 90]; float64 (n, 2)."""
    arr = check_points(points, func, name)
    if arr.shape[1] != 2:
        raise ValueError(f"{func}: metric='great-circle' needs {name} of shape (n_points, 2) "
                         f"holding (longitude, latitude) in degrees, received shape "
                         f"{arr.shape}.")
    if arr.size:
        bad = np.flatnonzero(np.abs(arr[:, 1]) > 90.0)
        if bad.size:
            i = int(bad[0])
            raise ValueError(f"{func}: {name}[{i}, 1] = {arr[i, 1]} is not a latitude; "
                             f"expected degrees in [-90, 90] in column 1 (column 0 is "
                             f"longitude). Are longitude and latitude swapped?")
    return arr


def check_max_length(max_length, func: str) -> float | None:
    """None, or a non-negative real number (inf means no limit)."""
    if max_length is None:
        return None
    if isinstance(max_length, (bool, np.bool_)) or not isinstance(
            max_length, (int, float, np.integer, np.floating)):
        raise TypeError(f"{func}: max_length must be a number or None, received "
                        f"{type(max_length).__name__} {max_length!r}.")
    value = float(max_length)
    if np.isnan(value) or value < 0:
        raise ValueError(f"{func}: max_length must be >= 0 (or None for no limit), received "
                         f"{max_length!r}.")
    return None if np.isinf(value) else value


def check_terminals(terminals, n_nodes: int, func: str) -> np.ndarray:
    """Terminal node ids as a new sorted int64 array without repeats."""
    if terminals is None:
        raise TypeError(f"{func}: terminals is None; expected a 1-D array of node ids.")
    arr = np.asarray(terminals)
    if arr.ndim != 1:
        raise ValueError(f"{func}: terminals must be a 1-D array of node ids, received shape "
                         f"{arr.shape}.")
    if arr.size == 0:
        return np.empty(0, dtype=np.int64)
    if arr.dtype.kind not in "iu":
        raise TypeError(f"{func}: terminals has dtype {arr.dtype}; expected integer node ids "
                        f"in [0, n_nodes). Convert with terminals.astype(np.int64).")
    bad = np.flatnonzero((arr < 0) | (arr >= n_nodes))
    if bad.size:
        i = int(bad[0])
        raise ValueError(f"{func}: terminals[{i}] = {arr[i]} is not a node; expected ids in "
                         f"[0, {n_nodes}) for n_nodes={n_nodes}. Pass n_nodes if the graph has "
                         f"nodes beyond the largest edge endpoint.")
    return np.unique(arr.astype(np.int64))


def check_nonnegative_finite(weight: np.ndarray, func: str, name: str = "weight") -> None:
    """Weights must be finite and >= 0 (shortest paths need it)."""
    if weight.size == 0:
        return
    if weight.dtype.kind == "f":
        bad = np.flatnonzero(~np.isfinite(weight) | (weight < 0))
    elif weight.dtype.kind == "i":
        bad = np.flatnonzero(weight < 0)
    else:
        return
    if bad.size:
        i = int(bad[0])
        raise ValueError(f"{func}: {name}[{i}] = {weight[i].item()!r}; Steiner trees need "
                         f"finite, non-negative weights (lengths or costs along the network). Drop "
                         f"the edge, or shift costs so they are >= 0.")
# ---------------------------------------------------------------------------------------------
# Checks of the distributed path (fastmst.dask): column names, chunk arrays, tuning knobs.

def check_column_name(value, name: str, func: str) -> str:
    """A column name given as ``tail=``/``head=``/``weight=`` must be a non-empty string."""
    if not isinstance(value, str) or not value:
        raise TypeError(f"{func}: {name} must be a column name (a non-empty string), received "
                        f"{type(value).__name__} {value!r}; e.g. {name}={name!r}.")
    return value


def check_columns(present, wanted: dict, func: str, where: str = "") -> None:
    """Every wanted column (role -> name) must be among ``present``; list the present ones."""
    present = [str(c) for c in present]
    missing = [f"{role}={col!r}" for role, col in wanted.items() if col not in present]
    if missing:
        at = f" in {where}" if where else ""
        raise ValueError(f"{func}: column{'s' if len(missing) > 1 else ''} "
                         f"{', '.join(missing)} not found{at}; the columns present are "
                         f"{present!r}. Pass the right names, e.g. "
                         f"minimum_spanning_forest(edges, tail='src', head='dst', "
                         f"weight='cost').")


def check_chunk_no_missing(values, name: str, func: str, where: str = "") -> None:
    """A column read from a table must not hold missing values (NA/None)."""
    import pandas as pd
    mask = pd.isna(values)
    if mask.any():
        first = int(np.flatnonzero(np.asarray(mask))[0])
        at = f" of {where}" if where else ""
        raise ValueError(f"{func}: {name}[{first}]{at} is missing (NA); every edge needs two "
                         f"endpoints and a weight. Drop the incomplete rows first, e.g. "
                         f"edges.dropna(subset=[...]).")


def check_chunk_ids(arr: np.ndarray, name: str, n_nodes, func: str, where: str) -> None:
    """Ids of one chunk of a distributed edge list: integers in [0, n_nodes)."""
    check_ids(arr, f"{name} ({where})", func)
    if arr.size == 0:
        return
    if arr.dtype.kind == "i" and int(arr.min()) < 0:
        first = int(np.flatnonzero(arr < 0)[0])
        raise ValueError(f"{func}: {name}[{first}] = {arr[first]} of {where} is negative; node "
                         f"ids must be global integers in [0, n_nodes). Map labels to compact "
                         f"ids first.")
    if n_nodes is not None and int(arr.max()) >= n_nodes:
        first = int(np.flatnonzero(arr >= n_nodes)[0])
        raise ValueError(f"{func}: {name}[{first}] = {arr[first]} of {where} is out of range; "
                         f"expected ids in [0, {n_nodes}) for n_nodes={n_nodes}; pass "
                         f"n_nodes >= {int(arr.max()) + 1} or fix the id.")


def check_count(value, name: str, func: str, minimum: int = 1, allow_none: bool = False):
    """An integer knob such as ``split_every`` or ``max_task_edges`` (>= minimum)."""
    if value is None and allow_none:
        return None
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
        none = " or None" if allow_none else ""
        raise TypeError(f"{func}: {name} must be an integer{none}, received "
                        f"{type(value).__name__} {value!r}.")
    if int(value) < minimum:
        raise ValueError(f"{func}: {name} must be >= {minimum}, received {int(value)}.")
    return int(value)
