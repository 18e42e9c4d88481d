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
from fastmst.geometry.geodesy import (EARTH_RADIUS_M, cos_lat, haversine_m, local_frame,
                                      wrap_lon)
from fastmst.solve.result import SpanningForest
from fastmst.solve.solve import solve_trusted

__all__ = ["point_spanning_tree", "EARTH_RADIUS_M"]

_FUNC = "point_spanning_tree"
_SMALL = 8          # at most this many distinct points: every pair is a candidate
_CHAIN_WINDOW = 2   # sorted-chain fallbacks link each point to this many successors
_RANK_TOL = 1e-9    # relative singular value below which a direction counts as flat
_CLOSE = 1e-6      # closer pairs (in units of the half extent) make a triangulation untrusted
_REPAIR_PAIRS = 4_000_000    # suspect points x all points, at most this many extra pairs
_HEMI_COS = 0.05    # one stereographic projection when every site is within ~87 deg of the centre
_CAP_ARC = np.pi / 3         # pairs in neither polar cap are at least 60 degrees apart


def pair_position(tail, head, n_points: int) -> np.ndarray:
    """Position of the pair (tail, head), tail < head, in ``scipy.spatial.distance.pdist`` order.

    Pairs are numbered (0, 1), (0, 2), ..., (0, n-1), (1, 2), ...: lexicographic order, so the
    tie rule (length, smaller index, larger index) is the rule (length, position) of
    ``minimum_spanning_forest`` over the complete graph in this order.
    """
    i = np.asarray(tail, dtype=np.int64)
    j = np.asarray(head, dtype=np.int64)
    return i * (2 * n_points - i - 1) // 2 + (j - i - 1)


# --- candidate sets -------------------------------------------------------------------------

def _group_duplicates(X: np.ndarray):
    """Distinct rows of X: (unique rows, smallest original index of each, zero-edge tails/heads)."""
    n = X.shape[0]
    o0 = np.argsort(X[:, 0], kind="stable")
    x0 = X[o0, 0]
    if not (x0[1:] == x0[:-1]).any():                   # common case: no repeated coordinate
        e = np.empty(0, dtype=np.int64)
        return X, np.arange(n, dtype=np.int64), e, e
    order = np.lexsort(X.T[::-1])                       # stable: equal rows by index
    Xs = X[order]
    new = np.ones(n, dtype=bool)
    new[1:] = (Xs[1:] != Xs[:-1]).any(axis=1)
    starts = np.flatnonzero(new)
    reps = order[starts]                                # smallest index of each group
    group = np.cumsum(new) - 1
    dup = ~new
    zt = reps[group[dup]]
    zh = order[dup]
    return Xs[starts], reps, zt, zh


def _all_pairs(m: int):
    i, j = np.triu_indices(m, 1)
    return i.astype(np.int64), j.astype(np.int64)


def _chain_pairs(key: np.ndarray, cyclic: bool = False):
    """Pairs of points adjacent (within a small window) in the order of ``key``."""
    m = key.shape[0]
    order = np.argsort(key, kind="stable").astype(np.int64)
    ts, hs = [], []
    for k in range(1, min(_CHAIN_WINDOW, m - 1) + 1):
        if cyclic:
            ts.append(order)
            hs.append(np.roll(order, -k))
        else:
            ts.append(order[:-k])
            hs.append(order[k:])
    return np.concatenate(ts), np.concatenate(hs)


def _principal(Y: np.ndarray):
    """Centered points, principal axes (rows) and the number of non-flat directions."""
    C = Y - Y.mean(axis=0)
    _, s, vt = np.linalg.svd(C, full_matrices=False)
    rank = int((s > _RANK_TOL * s[0]).sum()) if s[0] > 0 else 0
    return C, vt, rank


def _flat_enough(C, Y, vt_k, t, h):
    """May the pairs (t, h) found for the projection Y = C @ vt_k.T stand for the points C?

    Each point lies within ``eps`` of the line or plane (the largest residual).  Lengths then
    move by at most 2 eps; when every candidate length (every gap along a chain) exceeds 1e9
    eps, that is below float64 resolution, so ranking by the projection is ranking by the
    points.  Otherwise the caller falls back to the exact dense route.
    """
    eps = float(np.sqrt(((C - Y @ vt_k) ** 2).sum(axis=1)).max())
    if eps == 0.0:
        return True
    d = np.sqrt(((Y[t] - Y[h]) ** 2).sum(axis=1))
    return bool(d.size) and float(d.min()) > 1e9 * eps


def _centre_scale(U: np.ndarray) -> np.ndarray:
    """U moved to the centre of its bounding box and scaled by a power of two into [-1, 1].

    Qhull's tolerances are relative to the largest coordinate: handed raw projected metres
    (x ~ 5e5, y ~ 7e6) it cannot tell points a few metres apart from one another and leaves
    some out.  The translation rounds each coordinate once, to half a unit in the last place
    of the *centred* value (exact where it keeps the binade, as for a cluster far from the
    origin); the scaling is exact.
    """
    lo = U.min(axis=0)
    hi = U.max(axis=0)
    V = U - (lo * 0.5 + hi * 0.5)                      # no overflow near +-1.8e308
    span = float(np.abs(V).max())
    if span > 0.0 and np.isfinite(span):
        V = np.ldexp(V, -int(np.frexp(span)[1]))
    return V


def _suspect_points(V: np.ndarray, t: np.ndarray, h: np.ndarray):
    """Points that make Qhull's triangulation (pairs t, h) of the centred and scaled points V
    untrustworthy: (sorted indices, reason), or (empty, None) when there are none.

    Qhull works to a tolerance relative to the largest coordinate (about 1e-15 after
    ``_centre_scale``); Delaunay tests compare squared lengths, so points closer together than
    about the square root of that (3e-8 of the extent) can be triangulated wrongly even when
    Qhull keeps them, and nearly coincident points are left out.  Suspect: every point left out
    of all simplices, and the later point of every pair within ``_CLOSE`` (1e-6 of the half
    extent, a factor of about 1e3 above that limit in squared terms).  Without them no two
    points are that close.
    """
    from scipy.spatial import cKDTree
    m = V.shape[0]
    covered = np.zeros(m, dtype=bool)
    covered[t] = True
    covered[h] = True
    close = cKDTree(V, balanced_tree=False, compact_nodes=False).query_pairs(
        _CLOSE, output_type="ndarray")
    left = np.flatnonzero(~covered)
    if left.shape[0] == 0 and close.shape[0] == 0:
        return left, None
    bad = np.union1d(left, close.max(axis=1) if close.shape[0] else left)
    return bad, (f"{left.shape[0]} of {m} points left out by Qhull, {close.shape[0]} pairs "
                 f"closer than {_CLOSE:g} of the extent")


def _spatial_order(P: np.ndarray) -> np.ndarray:
    """A Morton (Z-order) permutation of 2-D or 3-D points: Qhull runs faster on points that
    arrive in a spatially coherent order (about 20 % less CPU time at 1M points)."""
    m, d = P.shape
    lo = P.min(axis=0)
    span = float((P.max(axis=0) - lo).max()) or 1.0
    bits = 16 if d == 2 else 10
    q = ((P - lo) * ((2 ** bits - 1) / span)).astype(np.uint64)
    if d == 2:
        masks = ((16, 0x0000FFFF0000FFFF), (8, 0x00FF00FF00FF00FF), (4, 0x0F0F0F0F0F0F0F0F),
                 (2, 0x3333333333333333), (1, 0x5555555555555555))
    else:
        masks = ((16, 0x030000FF), (8, 0x0300F00F), (4, 0x030C30C3), (2, 0x09249249))
    key = np.zeros(m, dtype=np.uint64)
    for axis in range(d):
        v = q[:, axis].copy()
        for shift, mask in masks:
            v = (v | (v << np.uint64(shift))) & np.uint64(mask)
        key |= v << np.uint64(axis)
    return np.argsort(key, kind="stable")


def _simplex_pairs(simp: np.ndarray):
    k = simp.shape[1]
    ts, hs = [], []
    for a in range(k):
        for b in range(a + 1, k):
            ts.append(simp[:, a])
            hs.append(simp[:, b])
    return np.concatenate(ts), np.concatenate(hs)


def _flat_pairs(V: np.ndarray, why: list, repair: bool):
    """Candidates for points Qhull cannot triangulate in their own dimension: projected onto
    their line (a sorted chain) or plane (a planar triangulation) when that is an isometry to
    within rounding (``_flat_enough``); None otherwise."""
    m, d = V.shape
    C, vt, rank = _principal(V)
    if rank >= d:
        why.append(f"Qhull could not triangulate {m} points in {d}-D")
        return None
    if rank <= 1:
        Y = C @ vt[:1].T
        t, h = _chain_pairs(Y[:, 0])
        if _flat_enough(C, Y, vt[:1], t[:m - 1], h[:m - 1]):
            return t, h, "chain"
        why.append("nearly but not exactly collinear points")
        return None
    Y = C @ vt[:rank].T
    got = _delaunay_pairs(Y, why, repair)
    if got is None:
        return None
    if not _flat_enough(C, Y, vt[:rank], got[0], got[1]):
        why.append("nearly but not exactly coplanar points")
        return None
    return got[0], got[1], got[2] + "-projected"


def _delaunay_pairs(U: np.ndarray, why: list, repair: bool = True):
    """Candidate pairs (indices into U) containing the Euclidean MST of distinct points U.

    Returns (tail, head, route), or None when only the dense route is safe (the reason
    appended to ``why``).  Qhull sees U centred and scaled (``_centre_scale``).  When
    ``_suspect_points`` names points D, the others K (no two of them close) are triangulated
    again, and each point of D is paired with every point (while that is at most
    ``_REPAIR_PAIRS`` pairs): exact, since the minimum spanning tree of K + D lies in
    MST(K) + {pairs with an end in D} (a pair of K outside MST(K) is the longest edge of a
    cycle in K, so also in K + D), and the triangulation of K contains MST(K).
    """
    from scipy.spatial import Delaunay, QhullError
    m, d = U.shape
    if m <= max(_SMALL, d + 1):
        return (*_all_pairs(m), "all-pairs")
    if d == 1:
        return (*_chain_pairs(U[:, 0]), "chain")
    V = _centre_scale(U)
    order = _spatial_order(V) if m > 20000 else None
    try:
        tri = Delaunay(V if order is None else V[order])
        simp = tri.simplices.astype(np.int64)
    except QhullError:
        simp = None
    if simp is None or (simp.size and int(simp.max()) >= m):
        # no triangulation, or one through Qhull's point at infinity (nearly flat input)
        return _flat_pairs(V, why, repair)
    if order is not None:
        simp = order[simp]
    t, h = _simplex_pairs(simp)
    bad, reason = _suspect_points(V, t, h)
    if reason is None:
        return t, h, "delaunay"
    k = bad.shape[0]
    if not repair or k * m > _REPAIR_PAIRS:
        why.append(reason)
        return None
    keep = np.setdiff1d(np.arange(m, dtype=np.int64), bad)
    got = _delaunay_pairs(U[keep], why, repair=False)
    if got is None:
        return None
    return (np.concatenate([keep[got[0]], np.repeat(bad, m)]),
            np.concatenate([keep[got[1]], np.tile(np.arange(m, dtype=np.int64), k)]),
            got[2] + "+close-points")


def _unit_vectors(lonlat: np.ndarray) -> np.ndarray:
    lon = np.radians(lonlat[:, 0])
    c = cos_lat(lonlat[:, 1])
    return np.column_stack([c * np.cos(lon), c * np.sin(lon), np.sin(np.radians(lonlat[:, 1]))])


def _hemisphere_frame(U: np.ndarray):
    """(drop, east, north) of ``local_frame`` about the sites' mean direction when every site
    lies within acos(_HEMI_COS), about 87 degrees, of it; else None."""
    P = _unit_vectors(U)
    c = P.mean(axis=0)
    norm = float(np.sqrt((c * c).sum()))
    if norm < 1e-3:
        return None
    lon0 = float(np.degrees(np.arctan2(c[1], c[0])))
    lat0 = float(np.degrees(np.arctan2(c[2], np.hypot(c[0], c[1]))))
    drop, east, north = local_frame(U, lon0, lat0)
    return (drop, east, north) if float((1.0 - drop).min()) > _HEMI_COS else None


def _stereographic(drop, east, north) -> np.ndarray:
    """Stereographic projection from the antipode of the frame's centre (``1 + up = 2 - drop``):
    circles on the sphere go to circles in the plane, empty caps to empty discs."""
    s = 2.0 - drop
    return np.column_stack([east / s, north / s])


def _hull_pairs(U: np.ndarray, why: list):
    """Candidate pairs from the convex hull of the unit vectors (the spherical Delaunay
    triangulation), or the cyclic order when every site is on one circle: (tail, head, route),
    or None (the reason appended to ``why``).  Like ``_delaunay_pairs``, the hull is used only
    when ``_suspect_points`` finds nothing against it."""
    from scipy.spatial import ConvexHull, QhullError
    m = U.shape[0]
    P = _unit_vectors(U)
    order = _spatial_order(P) if m > 20000 else None
    try:
        hull = ConvexHull(P if order is None else P[order])
    except QhullError:
        C, vt, rank = _principal(P)
        if rank == 2:
            # Every point on one circle (a great circle or a parallel): the points are in convex
            # position, so their angular order around the centroid is their order on the circle,
            # and chord length grows with the angle between neighbours along it.
            Y = C @ vt[:2].T
            t, h = _chain_pairs(np.arctan2(Y[:, 1], Y[:, 0]), cyclic=True)
            if _flat_enough(C, Y, vt[:2], t[:m], h[:m]):
                return t, h, "circle-chain"
        why.append(f"Qhull could not build the hull of {m} unit vectors")
        return None
    simp = hull.simplices.astype(np.int64)
    if order is not None:
        simp = order[simp]
    t, h = _simplex_pairs(simp)
    reason = _suspect_points(P, t, h)[1]
    if reason is not None:
        why.append(reason + " (unit vectors)")
        return None
    return t, h, "sphere-hull"


def _cap_pairs(U: np.ndarray, why: list):
    """Global sets: two stereographic caps, certified; (tail, head, route) or None.

    Sites at latitude <= 30 are projected from the north pole, sites at latitude >= -30 from
    the south pole, each planar Delaunay triangulation computed as for Euclidean points.  A
    chord MST edge (p, q) has an empty diametral ball; when the projection pole lies outside
    that ball (the pole opposite the side of the chord's midpoint always does) the ball's cap
    maps to an empty disc through p and q, so (p, q) is a planar Delaunay edge.  A pair in
    neither cap has one site above 30 degrees north and one below 30 south: at least 60 degrees
    apart.  So when the tree found has no edge as long as 60 degrees, no uncovered pair can
    shorten it; otherwise the convex hull's pairs are added (route "sphere-caps+hull").
    """
    m = U.shape[0]
    ts, hs, extra = [], [], ""
    for cap, lat0 in ((np.flatnonzero(U[:, 1] <= 30.0), -90.0),
                      (np.flatnonzero(U[:, 1] >= -30.0), 90.0)):
        if cap.shape[0] < 2:
            continue
        got = _delaunay_pairs(_stereographic(*local_frame(U[cap], 0.0, lat0)), why)
        if got is None:
            return None
        ts.append(cap[got[0]])
        hs.append(cap[got[1]])
        extra = "+close-points" if got[2].endswith("+close-points") else extra
    t, h = _canonical(np.concatenate(ts), np.concatenate(hs), m)
    arc = haversine_m(U[t, 0], U[t, 1], U[h, 0], U[h, 1], radius=1.0)
    f = solve_trusted(t, h, arc, m)
    if f.n_components == 1 and float(arc[f.edges].max()) < _CAP_ARC * (1.0 - 1e-9):
        return t, h, "sphere-caps" + extra
    got = _hull_pairs(U, why)
    if got is None:
        return None
    return (np.concatenate([t, got[0]]), np.concatenate([h, got[1]]),
            "sphere-caps+hull" + extra)


def _sphere_pairs(U: np.ndarray, why: list):
    """Candidate pairs containing the great-circle MST of distinct normalised (lon, lat) U:
    (tail, head, route) or None (the reason appended to ``why``).

    Chord length grows with arc length, so the great-circle MST is the chord MST of the unit
    vectors, a subgraph of their spherical Delaunay triangulation.  Sites within a hemisphere
    are turned so that their mean direction is a pole and projected stereographically from the
    opposite pole (from differences of degrees: sites centimetres apart keep their precision);
    the planar Delaunay triangulation of the projection contains the tree (see ``_cap_pairs``).
    Global sets use two such caps; one circle, or a failed triangulation, the hull route.
    """
    m = U.shape[0]
    if m <= _SMALL:
        return (*_all_pairs(m), "all-pairs")
    frame = _hemisphere_frame(U)
    if frame is not None:
        got = _delaunay_pairs(_stereographic(*frame), why)
        if got is not None:
            extra = "+close-points" if got[2].endswith("+close-points") else ""
            return got[0], got[1], "sphere-stereographic" + extra
    else:
        got = _cap_pairs(U, why)
        if got is not None:
            return got
    return _hull_pairs(U, why)


def _canonical(t, h, n):
    """Distinct pairs with tail < head, in lexicographic (= pdist position) order."""
    a = np.minimum(t, h)
    b = np.maximum(t, h)
    keep = a != b
    key = np.sort(a[keep] * np.int64(n) + b[keep])
    if key.shape[0] > 1:
        first = np.ones(key.shape[0], dtype=bool)
        first[1:] = key[1:] != key[:-1]
        key = key[first]
    return key // n, key % n


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
    frame = _hemisphere_frame(X) if X.shape[0] >= 2 else None
    if frame is None:
        return _unit_vectors(X)
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
            U, reps, zt, zh = _group_duplicates(X)
            got = _sphere_pairs(U, why)
            if got is not None:
                t, h = _canonical(np.concatenate([zt, reps[got[0]]]),
                                  np.concatenate([zh, reps[got[1]]]), n)
                route = got[2]
        length = lambda t, h: haversine_m(X[t, 0], X[t, 1], X[h, 0], X[h, 1],  # noqa: E731
                                          radius=radius)
    elif metric in ("euclidean", "sqeuclidean") and not kwargs and d <= 3:
        if n >= 2:
            U, reps, zt, zh = _group_duplicates(X + 0.0)
            got = _delaunay_pairs(U, why)
            if got is not None:
                t, h = _canonical(np.concatenate([zt, reps[got[0]]]),
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
