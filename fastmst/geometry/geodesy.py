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
    validation.check_unmasked(a, name, func)
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


def wrap_lon(lon) -> np.ndarray:
    """Longitudes in degrees into [-180, 180), exactly (no rounding).

    ``lon - 360 k`` is a multiple of the input's unit in the last place and no larger, so it is
    representable; ``(lon + 180) % 360 - 180`` would round once more.
    """
    lon = np.asarray(lon, dtype=np.float64)
    out = lon - 360.0 * np.round(lon / 360.0)
    return np.where(out >= 180.0, out - 360.0, out)


def lon_diff(lon2, lon1) -> np.ndarray:
    """``lon2 - lon1`` in degrees, the short way round, in [-180, 180].

    Sites on both sides of the antimeridian (179.9999 and -179.9999) subtract after one of
    them is moved by 360 degrees (exact: the value keeps its binade), so their difference is
    exact too instead of carrying the rounding of a number near 360.
    """
    a = wrap_lon(lon2)
    b = wrap_lon(lon1)
    d = a - b
    a = np.where(d > 180.0, a - 360.0, np.where(d < -180.0, a + 360.0, a))
    return a - b


def cos_lat(lat) -> np.ndarray:
    """cos(latitude) for degrees in [-90, 90], as sin of the colatitude (``90 - |lat|`` is exact
    for |lat| >= 45, so sites near a pole keep their relative precision; cos(radians(90)) would
    be 6e-17, not 0)."""
    lat = np.asarray(lat, dtype=np.float64)
    return np.sin(np.radians(90.0 - np.abs(lat)))


def haversine_m(lon1, lat1, lon2, lat2, radius: float = EARTH_RADIUS_M) -> np.ndarray:
    """Great-circle distance in metres between (lon1, lat1) and (lon2, lat2), in degrees.

    Vectorised over broadcastable arrays.  Latitudes must lie in [-90, 90]; longitudes may be
    any value (they wrap), so links across the antimeridian get their short length.

    Differences are taken in degrees before converting to radians (exact for nearby sites),
    longitudes the short way round (``lon_diff``) and cos(latitude) from the colatitude
    (``cos_lat``), so sites centimetres apart, across the antimeridian or next to a pole keep
    about 15 significant digits.  A pole is one point whatever its longitude.

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
    dlat = np.radians(lat2 - lat1)
    dlon = np.radians(lon_diff(lon2, lon1))
    h = np.sin(dlat / 2) ** 2 + cos_lat(lat1) * cos_lat(lat2) * np.sin(dlon / 2) ** 2
    return 2.0 * radius * np.arcsin(np.sqrt(np.clip(h, 0.0, 1.0)))


def local_frame(lonlat: np.ndarray, lon0: float, lat0: float):
    """Unit vectors of (lon, lat) sites in a frame turned so that (lon0, lat0) is its pole.

    Returns ``(drop, east, north)``: with ``up`` the cosine of the angle from the centre,
    ``drop = 1 - up = 2 hav`` (the haversine quantity), and ``east``, ``north`` the tangent
    components.  Each is formed from differences of degrees, so it keeps its relative precision
    for sites metres apart: the vectors minus the centre are ``(-drop, east, north)``.
    """
    lon = lonlat[:, 0]
    lat = lonlat[:, 1]
    dl = np.radians(lon_diff(lon, lon0))
    dp = np.radians(lat - lat0)
    c = cos_lat(lat)
    s2 = np.sin(dl / 2) ** 2
    east = c * np.sin(dl)
    # sin(lat) cos(lat0) - cos(lat) sin(lat0) cos(dl), without the cancellation
    north = np.sin(dp) + 2.0 * c * np.sin(np.radians(lat0)) * s2
    drop = 2.0 * (np.sin(dp / 2) ** 2 + c * cos_lat(lat0) * s2)
    return drop, east, north


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
