"""Candidate pairs of points in 1-D to 3-D whose minimum spanning tree is the exact one: the
Delaunay triangulation of the centred and scaled points, with the points Qhull cannot resolve
(left out, or closer than ``_CLOSE`` of the extent) paired with every point, and sorted-chain
pairs where the points are flat.  Used by ``point_spanning_tree`` (fastmst.geometry.points) and
by the spherical route (fastmst.geometry.sphere), whose projections are planar.
"""
from __future__ import annotations

import numpy as np

SMALL = 8          # at most this many distinct points: every pair is a candidate
_CHAIN_WINDOW = 2   # sorted-chain fallbacks link each point to this many successors
_RANK_TOL = 1e-9    # relative singular value below which a direction counts as flat
_CLOSE = 1e-6      # closer pairs (in units of the half extent) make a triangulation untrusted
_REPAIR_PAIRS = 4_000_000    # suspect points x all points, at most this many extra pairs


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

def group_duplicates(X: np.ndarray):
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


def all_pairs(m: int):
    i, j = np.triu_indices(m, 1)
    return i.astype(np.int64), j.astype(np.int64)


def chain_pairs(key: np.ndarray, cyclic: bool = False):
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


def principal(Y: np.ndarray):
    """Centered points, principal axes (rows) and the number of non-flat directions."""
    C = Y - Y.mean(axis=0)
    _, s, vt = np.linalg.svd(C, full_matrices=False)
    rank = int((s > _RANK_TOL * s[0]).sum()) if s[0] > 0 else 0
    return C, vt, rank


def flat_enough(C, Y, vt_k, t, h):
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


def suspect_points(V: np.ndarray, t: np.ndarray, h: np.ndarray):
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


def spatial_order(P: np.ndarray) -> np.ndarray:
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


def simplex_pairs(simp: np.ndarray):
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
    within rounding (``flat_enough``); None otherwise."""
    m, d = V.shape
    C, vt, rank = principal(V)
    if rank >= d:
        why.append(f"Qhull could not triangulate {m} points in {d}-D")
        return None
    if rank <= 1:
        Y = C @ vt[:1].T
        t, h = chain_pairs(Y[:, 0])
        if flat_enough(C, Y, vt[:1], t[:m - 1], h[:m - 1]):
            return t, h, "chain"
        why.append("nearly but not exactly collinear points")
        return None
    Y = C @ vt[:rank].T
    got = delaunay_pairs(Y, why, repair)
    if got is None:
        return None
    if not flat_enough(C, Y, vt[:rank], got[0], got[1]):
        why.append("nearly but not exactly coplanar points")
        return None
    return got[0], got[1], got[2] + "-projected"


def delaunay_pairs(U: np.ndarray, why: list, repair: bool = True):
    """Candidate pairs (indices into U) containing the Euclidean MST of distinct points U.

    Returns (tail, head, route), or None when only the dense route is safe (the reason
    appended to ``why``).  Qhull sees U centred and scaled (``_centre_scale``).  When
    ``suspect_points`` names points D, the others K (no two of them close) are triangulated
    again, and each point of D is paired with every point (while that is at most
    ``_REPAIR_PAIRS`` pairs): exact, since the minimum spanning tree of K + D lies in
    MST(K) + {pairs with an end in D} (a pair of K outside MST(K) is the longest edge of a
    cycle in K, so also in K + D), and the triangulation of K contains MST(K).
    """
    from scipy.spatial import Delaunay, QhullError
    m, d = U.shape
    if m <= max(SMALL, d + 1):
        return (*all_pairs(m), "all-pairs")
    if d == 1:
        return (*chain_pairs(U[:, 0]), "chain")
    V = _centre_scale(U)
    order = spatial_order(V) if m > 20000 else None
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
    t, h = simplex_pairs(simp)
    bad, reason = suspect_points(V, t, h)
    if reason is None:
        return t, h, "delaunay"
    k = bad.shape[0]
    if not repair or k * m > _REPAIR_PAIRS:
        why.append(reason)
        return None
    keep = np.setdiff1d(np.arange(m, dtype=np.int64), bad)
    got = delaunay_pairs(U[keep], why, repair=False)
    if got is None:
        return None
    return (np.concatenate([keep[got[0]], np.repeat(bad, m)]),
            np.concatenate([keep[got[1]], np.tile(np.arange(m, dtype=np.int64), k)]),
            got[2] + "+close-points")


def canonical(t, h, n):
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
