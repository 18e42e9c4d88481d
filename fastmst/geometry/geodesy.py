"""Edge lengths from coordinates: Euclidean, and great-circle on a spherical Earth.

Great-circle lengths use the haversine formula on a sphere of the IUGG mean Earth radius
R1 = 6 371 008.8 m (Moritz, "Geodetic Reference System 1980", Bulletin Géodésique, 1980/2000).
The Earth is an ellipsoid: spherical lengths differ from ellipsoidal (geodesic) ones by up to
about 0.5 %, which is fine for comparing and choosing links but not for surveying.
"""
from __future__ import annotations

import numpy as np

from fastmst import validation

EARTH_RADIUS_M = 6_371_008.8


def _coords(a, name: str, func: str) -> np.ndarray:
    arr = np.asarray(a)
    if arr.dtype.kind not in "iuf":
        raise TypeError(f"{func}: {name} must be numeric coordinates, received dtype "
                        f"{arr.dtype}; convert with .astype(float).")
    arr = arr.astype(np.float64, copy=False)
    if arr.size and not np.isfinite(arr).all():
        first = int(np.flatnonzero(~np.isfinite(arr.reshape(-1)))[0])
        raise ValueError(f"{func}: {name} holds a non-finite value at flat index {first}; "
                         f"every coordinate must be a finite number.")
    return arr


def haversine_m(lon1, lat1, lon2, lat2, radius: float = EARTH_RADIUS_M) -> np.ndarray:
    """Great-circle distance in metres between (lon1, lat1) and (lon2, lat2), in degrees.

    Vectorised over broadcastable arrays.  Latitudes must lie in [-90, 90]; longitudes may be
    any value (they wrap), so links across the antimeridian get their short length.

    Examples
    --------
    >>> round(float(haversine_m(0.0, 0.0, 1.0, 0.0)))   # one degree of the equator
    111195
    """
    f = "haversine_m"
    lon1, lat1, lon2, lat2 = (_coords(x, n, f) for x, n in
                              ((lon1, "lon1"), (lat1, "lat1"), (lon2, "lon2"), (lat2, "lat2")))
    for name, lat in (("lat1", lat1), ("lat2", lat2)):
        if lat.size and (np.abs(lat) > 90).any():
            bad = float(lat.reshape(-1)[np.flatnonzero(np.abs(lat.reshape(-1)) > 90)[0]])
            raise ValueError(f"{f}: {name} = {bad} is not a latitude; expected degrees in "
                             f"[-90, 90]. Are longitude and latitude swapped?")
    p1, p2 = np.radians(lat1), np.radians(lat2)
    dlat = p2 - p1
    dlon = np.radians(lon2 - lon1)
    h = np.sin(dlat / 2) ** 2 + np.cos(p1) * np.cos(p2) * np.sin(dlon / 2) ** 2
    return 2.0 * radius * np.arcsin(np.sqrt(np.clip(h, 0.0, 1.0)))


def edge_lengths(coords, tail, head, *, metric: str = "euclidean") -> np.ndarray:
    """Length of each edge (tail[i], head[i]) from node coordinates.

    Parameters
    ----------
    coords : ndarray of shape (n_nodes, d)
        Node coordinates; for ``metric="great-circle"`` columns are (longitude, latitude) in
        degrees.
    tail, head : ndarray of shape (E,), integer
        Validated node ids in [0, n_nodes).
    metric : {"euclidean", "great-circle"}

    Returns
    -------
    lengths : ndarray of shape (E,), dtype=float64
        In the units of ``coords`` (Euclidean) or metres (great-circle).
    """
    f = "edge_lengths"
    metric = validation.check_choice(metric, ("euclidean", "great-circle"), "metric", f)
    xy = _coords(coords, "coords", f)
    if xy.ndim != 2:
        raise ValueError(f"{f}: coords must have shape (n_nodes, d), received {xy.shape}.")
    t = np.asarray(tail)
    h = np.asarray(head)
    if metric == "euclidean":
        d = xy[t] - xy[h]
        return np.sqrt(np.einsum("ij,ij->i", d, d))
    if xy.shape[1] != 2:
        raise ValueError(f"{f}: great-circle lengths need (longitude, latitude) columns, "
                         f"received {xy.shape[1]} columns.")
    return haversine_m(xy[t, 0], xy[t, 1], xy[h, 0], xy[h, 1])
