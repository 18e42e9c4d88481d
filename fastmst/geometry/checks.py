"""Checks of the point and Steiner-tree functions: coordinates, latitudes, lengths, terminals.

The edge-list checks they share with the rest of the package are in ``fastmst.validation``.
"""
from __future__ import annotations

import numpy as np

from fastmst.validation import check_unmasked, shown


def check_points(points, func: str, name: str = "points") -> np.ndarray:
    """Coordinates as a new or viewed C-contiguous float64 array of shape (n, d); finite values."""
    if points is None:
        raise TypeError(f"{func}: {name} is None; expected an array of shape (n_points, d).")
    check_unmasked(points, name, func)
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
        raise ValueError(f"{func}: {name}[{bad[0]}, {bad[1]}] = {arr[bad[0], bad[1]].item()}; "
                         f"every coordinate must be a finite number. Drop or fill those rows "
                         f"first, e.g. {name}[np.isfinite({name}).all(axis=1)].")
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
            raise ValueError(f"{func}: {name}[{i}, 1] = {arr[i, 1].item()} is not a latitude; "
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
                        f"{type(max_length).__name__} {shown(max_length)}.")
    value = float(max_length)
    if np.isnan(value) or value < 0:
        raise ValueError(f"{func}: max_length must be >= 0 (or None for no limit), received "
                         f"{shown(max_length)}.")
    return None if np.isinf(value) else value


def check_terminals(terminals, n_nodes: int, func: str) -> np.ndarray:
    """Terminal node ids as a new sorted int64 array without repeats."""
    if terminals is None:
        raise TypeError(f"{func}: terminals is None; expected a 1-D array of node ids.")
    check_unmasked(terminals, "terminals", func)
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
        raise ValueError(f"{func}: terminals[{i}] = {arr[i].item()} is not a node; expected ids in "
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
