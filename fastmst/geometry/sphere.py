"""Candidate pairs for great-circle trees on (longitude, latitude): the chord tree is a
subgraph of the spherical Delaunay triangulation, which a stereographic projection turns into a
planar one (one projection for sites within a hemisphere, two polar caps otherwise).
"""
from __future__ import annotations

import numpy as np

from fastmst.geometry.geodesy import cos_lat, haversine_m, local_frame
from fastmst.geometry.planar import (SMALL, all_pairs, canonical, chain_pairs, delaunay_pairs,
                                     flat_enough, principal, simplex_pairs, spatial_order,
                                     suspect_points)
from fastmst.solve.solve import solve_trusted

_HEMI_COS = 0.05    # one stereographic projection when every site is within ~87 deg of the centre
_CAP_ARC = np.pi / 3         # pairs in neither polar cap are at least 60 degrees apart


def unit_vectors(lonlat: np.ndarray) -> np.ndarray:
    lon = np.radians(lonlat[:, 0])
    c = cos_lat(lonlat[:, 1])
    return np.column_stack([c * np.cos(lon), c * np.sin(lon), np.sin(np.radians(lonlat[:, 1]))])


def hemisphere_frame(U: np.ndarray):
    """(drop, east, north) of ``local_frame`` about the sites' mean direction when every site
    lies within acos(_HEMI_COS), about 87 degrees, of it; else None."""
    P = unit_vectors(U)
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
    or None (the reason appended to ``why``).  Like ``delaunay_pairs``, the hull is used only
    when ``suspect_points`` finds nothing against it."""
    from scipy.spatial import ConvexHull, QhullError
    m = U.shape[0]
    P = unit_vectors(U)
    order = spatial_order(P) if m > 20000 else None
    try:
        hull = ConvexHull(P if order is None else P[order])
    except QhullError:
        C, vt, rank = principal(P)
        if rank == 2:
            # Every point on one circle (a great circle or a parallel): the points are in convex
            # position, so their angular order around the centroid is their order on the circle,
            # and chord length grows with the angle between neighbours along it.
            Y = C @ vt[:2].T
            t, h = chain_pairs(np.arctan2(Y[:, 1], Y[:, 0]), cyclic=True)
            if flat_enough(C, Y, vt[:2], t[:m], h[:m]):
                return t, h, "circle-chain"
        why.append(f"Qhull could not build the hull of {m} unit vectors")
        return None
    simp = hull.simplices.astype(np.int64)
    if order is not None:
        simp = order[simp]
    t, h = simplex_pairs(simp)
    reason = suspect_points(P, t, h)[1]
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
        got = delaunay_pairs(_stereographic(*local_frame(U[cap], 0.0, lat0)), why)
        if got is None:
            return None
        ts.append(cap[got[0]])
        hs.append(cap[got[1]])
        extra = "+close-points" if got[2].endswith("+close-points") else extra
    t, h = canonical(np.concatenate(ts), np.concatenate(hs), m)
    arc = haversine_m(U[t, 0], U[t, 1], U[h, 0], U[h, 1], radius=1.0)
    f = solve_trusted(t, h, arc, m)
    if f.n_components == 1 and float(arc[f.edges].max()) < _CAP_ARC * (1.0 - 1e-9):
        return t, h, "sphere-caps" + extra
    got = _hull_pairs(U, why)
    if got is None:
        return None
    return (np.concatenate([t, got[0]]), np.concatenate([h, got[1]]),
            "sphere-caps+hull" + extra)


def sphere_pairs(U: np.ndarray, why: list):
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
    if m <= SMALL:
        return (*all_pairs(m), "all-pairs")
    frame = hemisphere_frame(U)
    if frame is not None:
        got = delaunay_pairs(_stereographic(*frame), why)
        if got is not None:
            extra = "+close-points" if got[2].endswith("+close-points") else ""
            return got[0], got[1], "sphere-stereographic" + extra
    else:
        got = _cap_pairs(U, why)
        if got is not None:
            return got
    return _hull_pairs(U, why)
