"""Line end points snapped into nodes within a tolerance (for line layers of candidate links).

Two rules, both deterministic and both in the coordinates' own units (the layer's CRS units):

* :func:`snap_points` groups points among themselves: two points closer than or at
  ``tolerance`` share a node, and so, transitively, do chains of such points (single-linkage
  grouping, so a chain of close points can gather points further apart than ``tolerance``;
  :attr:`Snapped.max_shift` says how far any point moved).  Nodes are numbered in order of
  first appearance and placed at their first point (a coordinate of the data, never an average).
* :func:`snap_to_sites` puts every point on its nearest site within ``tolerance``; a point
  with no site that close is an error that names it.  Sites closer together than twice the
  tolerance make the choice depend on the nearest one alone (an exact tie between two sites:
  the first).

``tolerance=0`` joins only points with identical coordinates.  Distances are Euclidean in the
coordinates as given: for longitude/latitude that is degrees (1e-5 degrees of latitude is about
1.1 m), and longitudes are not wrapped at the antimeridian.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from fastmst import validation


@dataclass(frozen=True)
class Snapped:
    """Points grouped into nodes.

    Attributes
    ----------
    node : ndarray of int64, shape (P,)
        The node of each point.
    coords : ndarray of float64, shape (n_nodes, 2)
        Each node's position: its first point.
    max_shift : float
        The largest distance from a point to its node's position.
    """
    node: np.ndarray
    coords: np.ndarray
    max_shift: float


def check_tolerance(tolerance, func: str) -> float:
    """A finite snapping tolerance >= 0 (TypeError for a non-number, ValueError otherwise)."""
    if isinstance(tolerance, (bool, np.bool_)) or not isinstance(
            tolerance, (int, float, np.integer, np.floating)):
        raise TypeError(f"{func}: snap_tolerance must be a number (a distance in the layer's "
                        f"CRS units), received {type(tolerance).__name__} "
                        f"{validation.shown(tolerance)}.")
    t = float(tolerance)
    if not math.isfinite(t) or t < 0:
        raise ValueError(f"{func}: snap_tolerance must be a finite distance >= 0 in the layer's "
                         f"CRS units, received {t}. Use 0 to join only identical end points.")
    return t


def _points(points, func):
    validation.check_unmasked(points, "points", func)
    p = np.asarray(points, dtype=np.float64)
    if p.ndim != 2 or p.shape[1] != 2:
        raise ValueError(f"{func}: points must have shape (P, 2), received shape {p.shape}.")
    if not np.isfinite(p).all():
        i = int(np.flatnonzero(~np.isfinite(p).all(axis=1))[0])
        raise ValueError(f"{func}: point {i} is {p[i].tolist()}; expected finite coordinates.")
    return p


def _first_appearance(groups: np.ndarray) -> np.ndarray:
    """Group ids renumbered 0.. in order of first appearance."""
    if groups.size == 0:
        return groups.astype(np.int64)
    _, first, inverse = np.unique(groups, return_index=True, return_inverse=True)
    rank = np.empty(first.size, dtype=np.int64)
    rank[np.argsort(first, kind="stable")] = np.arange(first.size)
    return rank[inverse.ravel()]


def snap_points(points, tolerance=0.0, *, func="snap_points") -> Snapped:
    """Group points into nodes: points within ``tolerance`` of each other share a node.

    Parameters
    ----------
    points : array of shape (P, 2)
    tolerance : float, default 0
        A distance in the points' units; 0 joins identical points only.

    Examples
    --------
    >>> s = snap_points([[0, 0], [5, 5], [0.1, 0], [5, 5]], 0.5)
    >>> s.node.tolist(), s.coords.tolist()
    ([0, 1, 0, 1], [[0.0, 0.0], [5.0, 5.0]])
    """
    tol = check_tolerance(tolerance, func)
    p = _points(points, func)
    if p.shape[0] == 0:
        return Snapped(np.empty(0, np.int64), np.empty((0, 2)), 0.0)
    # identical points first (exact, by their bits; -0.0 and 0.0 are one point)
    p0 = p + 0.0
    _, exact = np.unique(p0, axis=0, return_inverse=True)
    exact = _first_appearance(exact.ravel())
    if tol > 0:
        from scipy import sparse
        from scipy.sparse.csgraph import connected_components
        from scipy.spatial import cKDTree
        rep = np.zeros(int(exact.max()) + 1, dtype=np.int64)
        rep[exact[::-1]] = np.arange(p.shape[0])[::-1]          # first point of each group
        u = p[rep]
        pairs = cKDTree(u).query_pairs(tol, output_type="ndarray")
        m = u.shape[0]
        g = sparse.coo_array((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])), shape=(m, m))
        _, comp = connected_components(g, directed=False)
        exact = _first_appearance(comp[exact])
    n = int(exact.max()) + 1
    first = np.zeros(n, dtype=np.int64)
    first[exact[::-1]] = np.arange(p.shape[0])[::-1]
    coords = p[first]
    shift = float(np.sqrt(((p - coords[exact]) ** 2).sum(axis=1)).max())
    return Snapped(exact, coords, shift)


def snap_to_sites(points, sites, tolerance=0.0, *, where=None, func="snap_to_sites"):
    """The nearest site (row of ``sites``) of every point, within ``tolerance``.

    ``where(i)`` words point ``i`` for the error raised when a point has no site within
    ``tolerance`` (default "point i").  Returns (site index per point as int64, largest
    distance from a point to its site).
    """
    tol = check_tolerance(tolerance, func)
    p = _points(points, func)
    s = _points(sites, func)
    if p.shape[0] == 0:
        return np.empty(0, np.int64), 0.0
    if s.shape[0] == 0:
        raise ValueError(f"{func}: there are no sites to snap {p.shape[0]} end points to; give "
                         f"a site layer or node table with at least one point.")
    from scipy.spatial import cKDTree
    if s.shape[0] == 1:
        dist = np.sqrt(((p - s[0]) ** 2).sum(axis=1))
        idx = np.zeros(p.shape[0], dtype=np.int64)
    else:   # the two nearest, so that an exact tie goes to the first site
        d2, i2 = cKDTree(s).query(p, k=2)
        dist = d2[:, 0]
        idx = np.where(d2[:, 1] == d2[:, 0], i2.min(axis=1), i2[:, 0])
    far = np.flatnonzero(dist > tol)
    if far.size:
        i = int(far[0])
        name = where(i) if where is not None else f"point {i}"
        raise ValueError(f"{func}: {name} at ({float(p[i, 0])!r}, {float(p[i, 1])!r}) has no "
                         f"site within "
                         f"snap_tolerance={tol!r} (the nearest is site row {int(idx[i])}, "
                         f"{float(dist[i]):.6g} away; {far.size} end points in all are too "
                         f"far). Raise the tolerance (CLI: --snap-tolerance), add the sites, or "
                         f"drop those links.")
    return idx.astype(np.int64), float(dist.max())
