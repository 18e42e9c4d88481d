"""The core input checks: edge arrays, ids, weights and scalar arguments.

Every function of the package validates its arguments here or, for checks that only one part of
the package needs, beside that code (``fastmst.toolkit.checks``, ``fastmst.geometry.checks``,
``fastmst.dask.checks``, the file checks of ``fastmst.io``).  Each message says what was received,
what was expected and how to fix it, and names the first offending position.  Wrong types raise
TypeError, wrong values raise ValueError.  Nothing here mutates its inputs: conversions make new
arrays, and arrays already in a kernel dtype are passed through without a copy (read-only and
memory-mapped arrays included).
"""
from __future__ import annotations

import functools
import operator
import os
from dataclasses import dataclass

import numpy as np

from fastmst._kernels import threads as kernel_threads

INT32_LIMIT = 2**31

#: ``threads`` above this is refused: more than any machine has cores, and beyond it OpenMP's
#: C ``int`` thread count would be the next limit (2**31).
MAX_THREADS = 4096


def node_bytes(n_nodes: int) -> int:
    """Bytes per node that every solve allocates at least: the union-find parent (4-byte ids
    below 2**31 nodes, 8-byte beyond), the int64 labels of the result and the int64 table
    that numbers the components (``fastmst._kernels.disjoint_set.labels_from_parent``).
    Borůvka needs more (40 bytes per node with 8-byte ids); this is the floor, so a refusal
    based on it is never premature."""
    return (4 if n_nodes < INT32_LIMIT else 8) + 8 + 8


@functools.lru_cache(maxsize=1)
def memory_bytes() -> int | None:
    """Physical memory of this machine (``os.sysconf``), or None where it cannot be read."""
    try:
        return int(os.sysconf("SC_PHYS_PAGES")) * int(os.sysconf("SC_PAGE_SIZE"))
    except (AttributeError, ValueError, OSError):
        return None


def _gib(n_bytes: int) -> str:
    return f"{n_bytes / 2**30:,.1f} GiB"


def node_memory_error(n: int) -> str | None:
    """Why ``n`` nodes cannot be solved on this machine (the per-node arrays alone exceed its
    physical memory, or the address space), or None when they may be."""
    need = n * node_bytes(n)
    have = memory_bytes()
    if need >= 2**63:
        return f"its per-node arrays would need {_gib(need)}, beyond any address space"
    if have is not None and need > have:
        return (f"its per-node arrays alone would need {_gib(need)} "
                f"({node_bytes(n)} bytes per node), more than this machine's {_gib(have)} "
                f"of memory")
    return None

# Weight dtypes the kernels read in place (see _typedefs.pxd); narrower ones are widened once.
_KERNEL_WEIGHTS = {np.dtype(t) for t in (np.float32, np.float64, np.int32, np.int64,
                                         np.uint32, np.uint64)}
_WIDEN = {np.dtype(np.int8): np.int32, np.dtype(np.int16): np.int32,
          np.dtype(np.uint8): np.int32, np.dtype(np.uint16): np.int32,
          np.dtype(np.float16): np.float32}


SHOWN_CHARS = 120   # the most characters an error message shows of a received value


def shown(value) -> str:
    """``repr`` of a received value for an error message; NumPy scalars as plain Python values
    (``7``, not ``np.int64(7)``), arrays of more than 8 values by their shape and dtype, and
    any other repr cut to ``SHOWN_CHARS`` characters."""
    if isinstance(value, np.generic):
        value = value.item()
    if isinstance(value, np.ndarray) and value.size > 8:
        return f"(an array of shape {value.shape}, dtype {value.dtype})"
    text = repr(value)
    if len(text) > SHOWN_CHARS:   # a long list or string: its start is enough to recognise it
        text = text[:SHOWN_CHARS - 3] + "..."
    return text


class FileFormatError(ValueError):
    """A malformed input file or table; the message names the source and the line or row.

    One class for files (``fastmst.io``, which re-exports it) and for the partitions of the
    Dask path (``fastmst.dask``), so that, e.g., a missing column is the same error on both.
    """


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
    check_unmasked(x, name, func)
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


def check_unmasked(x, name: str, func: str) -> None:
    """A masked entry of a NumPy masked array is a missing value: refuse it rather than read the
    data hidden under the mask (np.asarray would)."""
    if not isinstance(x, np.ma.MaskedArray):
        return
    mask = np.ma.getmaskarray(x)
    if mask.any():
        flat = np.flatnonzero(mask.ravel())
        at = np.unravel_index(int(flat[0]), mask.shape)
        where = f"{name}[{', '.join(str(int(k)) for k in at)}]"
        raise ValueError(f"{func}: {name} is a masked array with {flat.size} masked "
                         f"entr{'y' if flat.size == 1 else 'ies'} (the first is {where}); a "
                         f"masked entry is a missing value. Drop those rows or fill them "
                         f"({name}.filled(value)) first.")


def _native_contiguous(arr: np.ndarray, dtype=None) -> np.ndarray:
    """The same data as a contiguous native-endian array; no copy when it already is one."""
    dtype = np.dtype(dtype or arr.dtype).newbyteorder("=")
    return np.ascontiguousarray(arr, dtype=dtype)


def check_ids(arr: np.ndarray, name: str, func: str, code: str | None = None) -> np.ndarray:
    """Check the dtype of an id array; return it (empty float arrays become int64).  ``code``:
    how the user's own code names the array, for the fixes the messages suggest (default
    ``name``)."""
    code = name if code is None else code
    kind = arr.dtype.kind
    if arr.size == 0 and kind in "fiu":
        return arr.astype(np.int64) if kind == "f" else arr
    if kind in "iu":
        return arr
    if kind == "b":
        raise TypeError(f"{func}: {name} has dtype bool; node ids must be integers. Convert with "
                        f"{code}.astype(np.int64) if True/False really are node ids 1/0.")
    if kind == "f":
        raise TypeError(f"{func}: {name} has dtype {arr.dtype}; node ids must be integers "
                        f"0..n_nodes-1. If the values are whole numbers, convert with "
                        f"{code}.astype(np.int64).")
    raise TypeError(f"{func}: {name} has dtype {arr.dtype}; node ids must be integers "
                    f"0..n_nodes-1. Map other labels (strings, map ids) to compact integers "
                    f"first, e.g. with np.unique(labels, return_inverse=True).")


def check_weights(arr: np.ndarray, func: str, name: str = "weight", code: str | None = None,
                  where: str = "") -> np.ndarray:
    """Check the dtype and values of a weight array; return it in a kernel dtype.  ``code``: how
    the user's own code names the array, for the fixes the messages suggest (default ``name``);
    ``where``: the part of a larger input the array is (e.g. "partition 3")."""
    code = name if code is None else code
    at = f" of {where}" if where else ""
    dt = arr.dtype
    if dt.kind == "b":
        raise TypeError(f"{func}: {name} has dtype bool; expected integer or float weights. "
                        f"Convert with {code}.astype(np.int64) if 0/1 costs are meant.")
    if dt.kind not in "iuf":
        raise TypeError(f"{func}: {name} has dtype {dt}; expected integer or float weights "
                        f"(int32, int64, uint32, uint64, float32, float64 are read in place). "
                        f"Convert with {code}.astype(np.float64).")
    native = np.dtype(dt).newbyteorder("=")
    if native in _WIDEN:
        arr = arr.astype(_WIDEN[native])
    elif native not in _KERNEL_WEIGHTS:
        raise TypeError(f"{func}: {name} has dtype {dt}, which the kernels cannot compare "
                        f"exactly; expected float32, float64 or a 32/64-bit integer. Convert "
                        f"with {code}.astype(np.float64).")
    arr = _native_contiguous(arr)
    if arr.dtype.kind == "f" and arr.size and np.isnan(arr.min()):
        first = int(np.flatnonzero(np.isnan(arr))[0])
        raise ValueError(f"{func}: {name}[{first}]{at} is NaN; every edge needs a comparable "
                         f"weight. Drop or fill the NaN edges first (e.g. keep = "
                         f"~np.isnan({code})); infinite weights are allowed.")
    return arr


def check_n_nodes(n_nodes, func: str) -> int | None:
    if n_nodes is None:
        return None
    if isinstance(n_nodes, (bool, np.bool_)) or not isinstance(n_nodes, (int, np.integer)):
        raise TypeError(f"{func}: n_nodes must be an integer or None, received "
                        f"{type(n_nodes).__name__} {shown(n_nodes)}.")
    n = int(n_nodes)
    if n < 0:
        raise ValueError(f"{func}: n_nodes must be >= 0, received {n}.")
    return n


def _range_error(arr, name, n_nodes, func, given):
    bad_neg = np.flatnonzero(arr < 0) if arr.dtype.kind == "i" else np.empty(0, np.int64)
    bad_big = np.flatnonzero(arr >= n_nodes)
    first = min(bad_neg[:1].tolist() + bad_big[:1].tolist())
    value = arr[first].item()
    if value < 0:
        raise ValueError(f"{func}: {name}[{first}] = {value} is negative; node ids must be in "
                         f"[0, n_nodes).")
    fix = (f"pass n_nodes >= {int(arr.max()) + 1} or fix the id" if given
           else "fix the id")
    raise ValueError(f"{func}: {name}[{first}] = {value} is out of range; expected ids in "
                     f"[0, {n_nodes}) for n_nodes={n_nodes}; {fix}.")


def _too_large_id_error(t: np.ndarray, h: np.ndarray, hi: int, m: int, why: str, func: str):
    """ValueError for the largest id when, without n_nodes, it implies more nodes than this
    machine holds (ids far beyond the edge count are labels, not compact indices)."""
    name, arr = ("tail", t) if int(t.max()) == hi else ("head", h)
    first = int(np.flatnonzero(arr == arr.dtype.type(hi))[0])
    raise ValueError(f"{func}: {name}[{first}] = {hi} implies n_nodes = {hi + 1} (ids run from 0 "
                     f"to the largest one), and {why}. Ids are compact indices 0..n_nodes-1; "
                     f"with {m} {'edge' if m == 1 else 'edges'}, ids this large are labels or a typo: relabel them with "
                     f"labels, idx = np.unique(np.concatenate([tail, head]), "
                     f"return_inverse=True) (tail = idx[:E], head = idx[E:]), or fix the id.")


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
    if n is not None:
        why = node_memory_error(n)
        if why:
            raise ValueError(f"{func}: n_nodes={n} is more nodes than this machine can hold: "
                             f"{why}. Pass the number of nodes actually used (ids 0..n_nodes-1; "
                             f"relabel sparse ids compactly with np.unique(np.concatenate([tail, "
                             f"head]), return_inverse=True)).")
    m = t.shape[0]
    if m:
        lo = min(int(t.min()), int(h.min()))
        hi = max(int(t.max()), int(h.max()))
        limit = n if n is not None else hi + 1
        if lo < 0 or hi >= limit:
            for name, arr in (("tail", t), ("head", h)):
                if (arr.dtype.kind == "i" and int(arr.min()) < 0) or int(arr.max()) >= limit:
                    _range_error(arr, name, limit, func, n is not None)
        if n is None:
            why = node_memory_error(limit)
            if why:
                _too_large_id_error(t, h, hi, m, why, func)
        n = limit
    elif n is None:
        n = 0
    kt, kh = _kernel_ids(t, h, n)
    return EdgeArrays(t, h, w, kt, kh, kw, n)


def trusted_edges(tail: np.ndarray, head: np.ndarray, weight: np.ndarray,
                  n_nodes: int) -> EdgeArrays:
    """``EdgeArrays`` of edges that are valid by construction, without checking them.

    For internals that derive a new edge list from validated arrays (a subgraph, a contracted
    graph, a candidate set, an update): ``tail``/``head`` are integer ids in ``[0, n_nodes)``
    and ``weight`` has an integer or float dtype that ``check_weights`` accepts, without NaN.
    They are kept as the caller's arrays (the result keeps their dtypes); the kernel arrays
    view them when they already are contiguous, native-endian and in a kernel dtype.
    """
    n = int(n_nodes)
    kt, kh = _kernel_ids(tail, head, n)
    native = weight.dtype.newbyteorder("=")
    kw = _native_contiguous(weight.astype(_WIDEN[native]) if native in _WIDEN else weight)
    return EdgeArrays(tail, head, weight, kt, kh, kw, n)


def check_choice(value, valid, name: str, func: str) -> str:
    if not isinstance(value, str):
        raise TypeError(f"{func}: {name} must be a string, received {type(value).__name__} "
                        f"{shown(value)}; expected one of {', '.join(map(repr, valid))}.")
    if value not in valid:
        raise ValueError(f"{func}: unknown {name} {value!r}; expected one of "
                         f"{', '.join(map(repr, valid))}.")
    return value


def check_threads(threads, func: str) -> int:
    """Resolve ``threads`` (None or <= 0 means all available cores) to a positive count."""
    if threads is None:
        return kernel_threads.default_threads()  # OMP_NUM_THREADS, threadpoolctl apply
    if isinstance(threads, (bool, np.bool_)):
        raise TypeError(f"{func}: threads must be an integer or None, received "
                        f"{type(threads).__name__} {shown(threads)}.")
    try:
        t = operator.index(threads)
    except TypeError:
        raise TypeError(f"{func}: threads must be an integer or None, received "
                        f"{type(threads).__name__} {shown(threads)}.") from None
    if t <= 0:
        return check_threads(None, func)
    if t > MAX_THREADS:
        raise ValueError(f"{func}: threads={t} is more than any machine has cores (at most "
                         f"{MAX_THREADS} are accepted); pass threads=None (or <= 0) for every "
                         f"available core, or a smaller count.")
    return t


def check_bool(value, name: str, func: str) -> bool:
    if not isinstance(value, (bool, np.bool_)):
        raise TypeError(f"{func}: {name} must be True or False, received "
                        f"{type(value).__name__} {shown(value)}.")
    return bool(value)


def check_positions(positions, n_edges: int, name: str, func: str) -> np.ndarray:
    """Edge positions in [0, n_edges) as a new int64 array (order kept)."""
    check_unmasked(positions, name, func)
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
        raise ValueError(f"{func}: {name}[{bad[0]}] = {arr[bad[0]].item()} is not an edge "
                         f"position; expected positions in [0, {n_edges}).")
    return arr.astype(np.int64)


def check_real(value, name: str, func: str) -> float:
    """A real number (not NaN), e.g. a cut threshold."""
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer,
                                                                   np.floating)):
        raise TypeError(f"{func}: {name} must be a real number, received "
                        f"{type(value).__name__} {shown(value)}.")
    v = float(value)
    if v != v:
        raise ValueError(f"{func}: {name} is NaN; expected a real number.")
    return v


def check_real_exact(value, name: str, func: str) -> int | float:
    """A real number (not NaN) as an exact Python ``int`` or ``float``: integers (NumPy ones
    included, uint64 beyond 2**63 too) stay integers, floats of any width become the float64
    of the same value.  For comparisons with weights that must not round (see
    ``fastmst.toolkit.clusters``)."""
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer,
                                                                   np.floating)):
        raise TypeError(f"{func}: {name} must be a real number, received "
                        f"{type(value).__name__} {shown(value)}.")
    if isinstance(value, (int, np.integer)):
        return int(value)
    v = float(value)          # float16/32/64 widen exactly; longdouble is rounded to float64
    if v != v:
        raise ValueError(f"{func}: {name} is NaN; expected a real number.")
    return v


def check_count(value, name: str, func: str, minimum: int = 1, allow_none: bool = False):
    """An integer knob such as ``split_every`` or ``max_task_edges`` (>= minimum)."""
    if value is None and allow_none:
        return None
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
        none = " or None" if allow_none else ""
        raise TypeError(f"{func}: {name} must be an integer{none}, received "
                        f"{type(value).__name__} {shown(value)}.")
    if int(value) < minimum:
        raise ValueError(f"{func}: {name} must be >= {minimum}, received {int(value)}.")
    return int(value)


def check_column_name(value, name: str, func: str) -> str:
    """A column name given as ``tail=``/``head=``/``weight=``: a non-empty string."""
    if not isinstance(value, str):
        raise TypeError(f"{func}: {name} must be a column name (a string), received "
                        f"{type(value).__name__} {shown(value)}; e.g. {name}={name!r}.")
    if not value:
        raise ValueError(f"{func}: {name} is the empty string; expected the name of a column, "
                         f"e.g. {name}={name!r}.")
    return value
