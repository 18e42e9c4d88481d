"""Exact minimum spanning trees of point sets: Euclidean, great-circle, and any cdist metric.

Three kinds of route, all exact (the tree of the complete graph of all pairs, see
``point_spanning_tree``'s Notes for what that means in float64):

* Euclidean (and squared Euclidean) in 1-D, 2-D and 3-D: the Delaunay triangulation of the
  centred and scaled points is the candidate set (every minimum spanning tree edge is a
  Delaunay edge), then Kruskal.  Points Qhull cannot resolve (left out, or closer than 1e-6 of
  the extent) are paired with every point over a triangulation of the rest, or dense Prim runs.
* Great-circle on (longitude, latitude): chord length grows with arc length, and the chord
  tree is a subgraph of the spherical Delaunay triangulation, which a stereographic projection
  turns into a planar one (one projection for sites within a hemisphere, two polar caps
  otherwise).
* Any other metric, or Euclidean above 3-D: dense Prim over all pairs, O(n^2) time and O(n)
  memory, distances computed on the fly (native kernels for euclidean, sqeuclidean, cityblock,
  chebyshev and minkowski; ``scipy.spatial.distance.cdist`` one row at a time for the rest).
"""
from __future__ import annotations

import warnings

import numpy as np

from fastmst import validation
from fastmst._kernels.points import METRIC_CODES, dense_prim
from fastmst.geometry import checks
from fastmst.geometry.geodesy import EARTH_RADIUS_M, haversine_m, wrap_lon
from fastmst.geometry.planar import (canonical, delaunay_pairs, group_duplicates,
                                     pair_position)
from fastmst.geometry.sphere import hemisphere_frame, sphere_pairs, unit_vectors
from fastmst.solve.result import SpanningForest
from fastmst.solve.solve import solve_trusted

__all__ = ["point_spanning_tree", "EARTH_RADIUS_M"]

_FUNC = "point_spanning_tree"


def _euclid_lengths(X, t, h, squared):
    s = np.zeros(t.shape[0], dtype=np.float64)
    for j in range(X.shape[1]):               # summed in coordinate order, like the kernel
        dj = X[t, j] - X[h, j]
        s += dj * dj
    return s if squared else np.sqrt(s)


def _normalise_lonlat(LL: np.ndarray) -> np.ndarray:
    """Longitudes into [-180, 180) (exactly, only where outside), a pole's longitude set to 0."""
    out = LL + 0.0                                      # copy; -0.0 becomes 0.0
    lon = out[:, 0]
    wrap = (lon < -180.0) | (lon >= 180.0)
    if wrap.any():
        lon[wrap] = wrap_lon(lon[wrap])
    lon[np.abs(out[:, 1]) == 90.0] = 0.0
    return out


# --- dense Prim -----------------------------------------------------------------------------

def _prim_cdist(X, metric, kwargs):
    """Dense Prim with scipy's cdist for one row per step (any metric cdist knows)."""
    from scipy.spatial.distance import cdist
    n = X.shape[0]
    best_d = np.full(n, np.inf)
    best_u = np.full(n, -1, dtype=np.int64)
    rest = np.arange(1, n, dtype=np.int64)
    added = np.empty(max(n - 1, 0), dtype=np.int64)
    u = 0
    for step in range(n - 1):
        d = cdist(X[u:u + 1], X[rest], metric, **kwargs)[0]
        if np.isnan(d).any():
            v = int(rest[np.flatnonzero(np.isnan(d))[0]])
            raise ValueError(f"{_FUNC}: metric {metric!r} gives NaN between points {u} and {v}; "
                             f"every pair needs a comparable distance (e.g. 'cosine' is "
                             f"undefined for all-zero rows).")
        bu = best_u[rest]
        cur = best_d[rest]
        new_pos = pair_position(np.minimum(u, rest), np.maximum(u, rest), n)
        old_pos = pair_position(np.minimum(bu, rest), np.maximum(bu, rest), n)
        better = (bu < 0) | (d < cur) | ((d == cur) & (new_pos < old_pos))
        upd = rest[better]
        best_d[upd] = d[better]
        best_u[upd] = u
        cd = best_d[rest]
        cand = np.flatnonzero(cd == cd.min())
        if cand.shape[0] > 1:
            r = rest[cand]
            cand = cand[np.argmin(pair_position(np.minimum(best_u[r], r),
                                                np.maximum(best_u[r], r), n))]
        else:
            cand = cand[0]
        u = int(rest[cand])
        added[step] = u
        rest = np.delete(rest, cand)
    other = best_u[added]
    return np.minimum(other, added), np.maximum(other, added), best_d[added]


def _dense_tree(X, metric, kwargs, threads):
    """(tail, head, length) of the exact MST by dense Prim."""
    native = metric in METRIC_CODES and (not kwargs or set(kwargs) <= {"p"})
    if native:
        p = float(kwargs.get("p", 2.0)) if metric == "minkowski" else 2.0
        if metric == "minkowski" and not p >= 1.0:
            raise ValueError(f"{_FUNC}: minkowski needs p >= 1 (a metric), received p={p}.")
        # A parallel step pays one fork/join: the kernel splits only scans of >= 16384 points.
        return dense_prim(X, METRIC_CODES[metric], p, threads, 1024, 16384)
    return _prim_cdist(X, metric, kwargs)


def _metric_defaults(metric, X, kwargs):
    """cdist derives VI / V from its two inputs when absent; fix them once from every point, as
    pdist would, so every step of dense Prim measures with the same metric."""
    kwargs = dict(kwargs)
    if metric == "mahalanobis" and "VI" not in kwargs and X.shape[0] >= 2:
        try:
            kwargs["VI"] = np.linalg.inv(np.atleast_2d(np.cov(X.T))).T
        except np.linalg.LinAlgError:
            raise ValueError(f"{_FUNC}: the covariance of these {X.shape[0]} points is singular,"
                             f" so 'mahalanobis' is undefined; pass metric_kwargs={{'VI': ...}} "
                             f"or use more (or less degenerate) points.") from None
    if metric == "seuclidean" and "V" not in kwargs and X.shape[0] >= 2:
        kwargs["V"] = np.var(X, axis=0, ddof=1)
    return kwargs


def _check_metric(metric, X, kwargs):
    if not isinstance(metric, str):
        raise TypeError(f"{_FUNC}: metric must be a string, received {type(metric).__name__} "
                        f"{metric!r}; expected 'euclidean', 'great-circle' or another name "
                        f"scipy.spatial.distance.cdist accepts.")
    if metric == "great-circle":
        extra = set(kwargs) - {"radius"}
        if extra:
            raise ValueError(f"{_FUNC}: metric 'great-circle' takes only metric_kwargs="
                             f"{{'radius': metres}}, received keys {sorted(extra)}.")
        r = kwargs.get("radius", EARTH_RADIUS_M)
        if isinstance(r, (bool, np.bool_)) or not isinstance(r, (int, float, np.integer,
                                                                 np.floating)):
            raise TypeError(f"{_FUNC}: radius must be a number of metres, received "
                            f"{type(r).__name__} {validation.shown(r)}.")
        if not np.isfinite(r) or r <= 0:
            raise ValueError(f"{_FUNC}: radius must be a positive finite number of metres, "
                             f"received {validation.shown(r)}.")
        return
    if metric in METRIC_CODES and not kwargs:
        return
    from scipy.spatial.distance import cdist
    probe = X[:2] if X.shape[0] >= 2 else np.zeros((2, X.shape[1]))
    try:
        cdist(probe[:1], probe[1:], metric, **kwargs)
    except (ValueError, TypeError) as exc:
        raise ValueError(f"{_FUNC}: metric {metric!r} with metric_kwargs={kwargs!r} is not "
                         f"usable ({exc}); expected 'euclidean', 'great-circle', "
                         f"{', '.join(repr(m) for m in METRIC_CODES if m != 'euclidean')} or "
                         f"another name scipy.spatial.distance.cdist accepts.") from None


# --- the public function --------------------------------------------------------------------

def point_spanning_tree(points, *, metric: str = "euclidean", max_length=None,
                        metric_kwargs=None, threads=None) -> SpanningForest:
    """Exact minimum spanning tree (or forest, with ``max_length``) of a set of points.

    Parameters
    ----------
    points : array_like of shape (n_points, d)
        One row per point; node ``i`` of the result is row ``i``.  For
        ``metric="great-circle"``, columns are (longitude, latitude) in degrees.
    metric : str
        ``"euclidean"`` (default), ``"great-circle"``, or any metric name
        ``scipy.spatial.distance.cdist`` accepts (``"cityblock"``, ``"chebyshev"``,
        ``"minkowski"``, ``"cosine"``, ...).
    max_length : float, optional
        Keep only tree edges of length <= max_length.  The result is then the minimum spanning
        forest of the "within reach" graph: its components are the single-linkage clusters at
        that distance.
    metric_kwargs : dict, optional
        Extra arguments of the metric, as ``cdist`` takes them (e.g. ``{"p": 3}``); for
        great-circle only ``{"radius": metres}`` (default: the IUGG mean Earth radius).
    threads : int, optional
        Threads for the dense Prim scan.  None (default) runs it on one thread: the scan
        synchronises its threads once per point, which pays off only on otherwise idle cores
        and for large n; pass ``threads=k`` (or <= 0 for every core) to split it.

    Returns
    -------
    SpanningForest
        ``tail < head`` are point indices (int64), ``weights`` the edge lengths (float64;
        metres for great-circle), ``edges`` the position of each pair in
        ``scipy.spatial.distance.pdist`` order (int64), ``n_edges = n(n-1)/2``, ``labels`` and
        ``n_components`` the clusters, ``method`` the route taken, and ``metric``.
        Edges are ordered by (length, smaller index, larger index).  Write it to CSV, Parquet,
        .npz or GeoJSON with ``fastmst.io.write_forest(path, tree, coords=points)``.

    Raises
    ------
    TypeError, ValueError
        Non-numeric or non-finite coordinates, wrong shape, latitudes outside [-90, 90], an
        unknown metric, a negative max_length.

    Notes
    -----
    *Tie rule.*  Pairs are ordered by (length, smaller index, larger index), a total order;
    the tree is the unique minimum spanning tree under it, whichever route runs (up to the
    rounding caveat under *What is guaranteed*).  Duplicate
    points are joined by zero-length edges (the duplicates of a point hang off its first
    occurrence).

    *Routes.*  Euclidean in 2-D/3-D uses the Delaunay triangulation of the distinct points
    (``scipy.spatial.Delaunay`` on the points moved to their bounding box's centre and scaled
    by a power of two) as candidates, O(n log n) expected (``"delaunay"``).  Qhull's output is
    used only if it keeps every point and no two points lie within 1e-6 of the set's half
    extent; otherwise those points are paired with every point and the others triangulated
    again (``"delaunay+close-points"``, while that is at most 4 million extra pairs), or dense
    Prim runs (``"dense-prim"``; ``provenance["fallback"]`` says why).  Collinear or coplanar
    input is projected onto its own line or plane (an isometry to within rounding), where a
    sorted chain or a lower-dimensional triangulation is exact (``"chain"``,
    ``"delaunay-projected"``).  Up to 8 distinct points, every pair is a candidate
    (``"all-pairs"``).  Great-circle: sites within a hemisphere are turned so that their mean
    direction is a pole and projected stereographically from the opposite pole, which maps the
    spherical Delaunay triangulation to the planar one (``"sphere-stereographic"``); other sets
    use two polar caps the same way, certified by the tree having no link of 60 degrees or more
    (``"sphere-caps"``), else adding the convex hull of the unit vectors
    (``"sphere-caps+hull"``).  Other metrics, and Euclidean above 3-D, run dense Prim: O(n^2 d)
    time, O(n) memory, practical to ~100k points.  ``method`` tells which ran;
    ``provenance["candidate_pairs"]`` how many pairs the tree was chosen from.

    *What is guaranteed.*  Lengths are float64, computed from the coordinates as given:
    Euclidean as the square root of the squared coordinate differences summed in coordinate
    order; great-circle by ``fastmst.geometry.geodesy.haversine_m`` (differences taken in
    degrees, so sites centimetres apart keep about 15 significant digits; nearly antipodal
    sites fewer, as arcsin is flat there).  The candidate set
    contains a minimum spanning tree of the complete graph under the exact distances between
    the given coordinates (for the triangulation routes: provided Qhull's triangulation of
    points it keeps, none within 1e-6 of the extent of another, is a Delaunay triangulation),
    and the tree returned is the minimum spanning tree of the candidate set under the float64
    lengths and the tie rule.  So the tree's total is within about 1e-15 (relative) of the
    minimum over all spanning trees under the same float64 lengths, and it is exactly the
    all-pairs tree unless two competing lengths differ only in their last bits, where rounding
    may decide instead of the tie rule.  Great-circle sets that fit no hemisphere and have a
    link of 60 degrees or more take their long links from Qhull's hull of unit vectors,
    accurate to about 1e-15 of the radius.

    *Great-circle lengths* are haversine distances on a sphere of the IUGG mean Earth radius,
    6 371 008.8 m (``fastmst.geometry.geodesy``): a spherical approximation of the ellipsoid,
    within about 0.5 %.  Longitudes may be any value (a link across the antimeridian gets its
    short length); a pole is one point whatever its longitude.

    Caution: a spanning tree has no redundancy; one cut isolates part of the network.  Use it
    to compare and plan layouts, and leave the design of utilities and roads to local codes and
    licensed engineers.

    Examples
    --------
    >>> import fastmst
    >>> t = fastmst.point_spanning_tree([[0, 0], [3, 0], [3, 4], [0, 0]])
    >>> t.tail.tolist(), t.head.tolist(), t.weights.tolist()
    ([0, 0, 1], [3, 1, 2], [0.0, 3.0, 4.0])
    >>> fastmst.point_spanning_tree([[0, 0], [3, 0], [3, 4]], max_length=3.5).n_components
    2
    """
    if metric == "great-circle":
        X = checks.check_lonlat(points, _FUNC)
    else:
        X = checks.check_points(points, _FUNC)
    kwargs = {} if metric_kwargs is None else metric_kwargs
    if not isinstance(kwargs, dict):
        raise TypeError(f"{_FUNC}: metric_kwargs must be a dict or None, received "
                        f"{type(metric_kwargs).__name__}.")
    if isinstance(metric, str):
        kwargs = _metric_defaults(metric, X, kwargs)
    _check_metric(metric, X, kwargs)
    limit = checks.check_max_length(max_length, _FUNC)
    threads = 1 if threads is None else validation.check_threads(threads, _FUNC)
    n, d = X.shape

    with np.errstate(over="ignore", invalid="ignore"):
        return _build(X, n, d, metric, kwargs, limit, threads)


def _too_far(w, metric):
    if w.size and np.isinf(w).any():
        raise ValueError(f"{_FUNC}: a {metric} length of the tree overflows float64; rescale "
                         f"the coordinates (e.g. divide them by 1e100) and scale the lengths "
                         f"back.")


def _sphere_dense_coords(X: np.ndarray) -> np.ndarray:
    """Coordinates whose Euclidean distances are the chords, for dense Prim: the unit vectors
    minus the sites' mean direction in its own frame when they fit in a hemisphere (kept to
    full relative precision for sites metres apart), else the plain unit vectors."""
    frame = hemisphere_frame(X) if X.shape[0] >= 2 else None
    if frame is None:
        return unit_vectors(X)
    drop, east, north = frame
    return np.column_stack([-drop, east, north])


def _build(X, n, d, metric, kwargs, limit, threads):
    route = None
    length = None
    info = {"candidate_pairs": None, "fallback": None}
    why = []
    if metric == "great-circle":
        radius = float(kwargs.get("radius", EARTH_RADIUS_M))
        X = _normalise_lonlat(X)
        if n >= 2:
            U, reps, zt, zh = group_duplicates(X)
            got = sphere_pairs(U, why)
            if got is not None:
                t, h = canonical(np.concatenate([zt, reps[got[0]]]),
                                  np.concatenate([zh, reps[got[1]]]), n)
                route = got[2]
        length = lambda t, h: haversine_m(X[t, 0], X[t, 1], X[h, 0], X[h, 1],  # noqa: E731
                                          radius=radius)
    elif metric in ("euclidean", "sqeuclidean") and not kwargs and d <= 3:
        if n >= 2:
            U, reps, zt, zh = group_duplicates(X + 0.0)
            got = delaunay_pairs(U, why)
            if got is not None:
                t, h = canonical(np.concatenate([zt, reps[got[0]]]),
                                  np.concatenate([zh, reps[got[1]]]), n)
                route = got[2]
        sq = metric == "sqeuclidean"
        length = lambda t, h: _euclid_lengths(X, t, h, sq)  # noqa: E731

    if n < 2:
        t = h = np.empty(0, dtype=np.int64)
        w = np.empty(0, dtype=np.float64)
        f = solve_trusted(t, h, w, n)
        route = "all-pairs"
    elif route is not None:
        info["candidate_pairs"] = int(t.shape[0])
        w = length(t, h)
        f = solve_trusted(t, h, w, n)
        if f.n_components != 1:       # a candidate set must span; never trust one that does not
            why.append("the candidate set did not span")
            route = None
    if route is None:
        route = "dense-prim"
        info["candidate_pairs"] = n * (n - 1) // 2
        info["fallback"] = "; ".join(why) or None
        if length is not None and n > 20000:
            warnings.warn(f"{_FUNC}: no trustworthy {metric} candidate set for these {n} "
                          f"points ({info['fallback']}); running exact dense Prim, O(n^2) "
                          f"time.", RuntimeWarning, stacklevel=3)
        if metric == "great-circle":     # chord length ranks pairs as arc length does
            t, h, w = _dense_tree(_sphere_dense_coords(X), "euclidean", {}, threads)
        else:
            t, h, w = _dense_tree(X, metric, kwargs, threads)
        order = np.argsort(pair_position(t, h, n), kind="stable")
        t, h = t[order], h[order]
        w = length(t, h) if length is not None else w[order]
        f = solve_trusted(t, h, w, n)
    tt, hh, ww = t[f.edges], h[f.edges], w[f.edges]
    _too_far(ww, metric)
    if limit is not None:
        keep = ww <= limit
        tt, hh, ww = tt[keep], hh[keep], ww[keep]
        f = solve_trusted(tt, hh, ww, n)   # labels of the clusters
        tt, hh, ww = tt[f.edges], hh[f.edges], ww[f.edges]
    return SpanningForest(pair_position(tt, hh, n), tt, hh, ww, n, n * (n - 1) // 2,
                          f.n_components, f.labels, False, route,
                          provenance={"function": _FUNC, "metric": metric, **info})
