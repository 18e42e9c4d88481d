"""point_spanning_tree against the all-pairs tree at every coordinate scale.

The class of failure: coordinates far from the origin (projected metres, x ~ 5e5, y ~ 7e6; 3-D
points far out), tiny extents, near-coincident points, duplicates, collinear and coplanar sets,
and great-circle sites metres apart anywhere on the sphere (poles, the antimeridian).  Every case
is compared with the minimum spanning tree of the complete graph:

* Euclidean reference: ``scipy.spatial.distance.pdist`` (every pair) and
  ``scipy.sparse.csgraph.minimum_spanning_tree`` on that matrix.
* Great-circle reference: ``pdist`` with a haversine written here with ``math`` (differences
  taken in degrees before converting, cos(latitude) as sin of the colatitude, so that sites
  centimetres apart and sites near a pole keep their precision), then the same SciPy MST.

csgraph drops zero entries (its "no edge"), so exact zeros (duplicates) are handed to it as the
smallest positive float, 5e-324, which changes no total at the tolerance below.

Tolerance on totals.  fastmst promises the minimum spanning tree of its candidate set under
its float64 lengths, and that candidate set contains a minimum spanning tree under exact
distances; every float64 length is within a few units in the last place (ulp, 2**-52
relative) of the exact one, so the total is within about 8 * 2**-53 relative of the all-pairs
optimum, plus summation rounding (math.fsum on both sides: none).  The reference's own lengths
carry the same few ulp.  rel=1e-12 leaves a factor of about 1000 above that bound while staying
nine orders of magnitude below the failures this module guards against (trees 1.1x-5x heavier).
Where all pairwise lengths are distinct by a clear margin (relative gap > 1e-9, far above
rounding) the tree is unique and the edge sets are compared too.
"""
import math

import numpy as np
import pytest
from hypothesis import given, strategies as st
from scipy.sparse import csr_array
from scipy.sparse.csgraph import minimum_spanning_tree
from scipy.spatial.distance import pdist

import fastmst

RTOL = 1e-12              # see the module docstring
EARTH_R = 6371008.8       # IUGG mean radius, the default of fastmst's great-circle metric


# --- references ---------------------------------------------------------------------------------

def reference_tree(D, n):
    """(total, set of (i, j) edges) of scipy.sparse.csgraph.minimum_spanning_tree over the
    condensed all-pairs vector D (pdist order)."""
    if n < 2:
        return 0.0, set()
    i, j = np.triu_indices(n, 1)
    w = np.where(D == 0.0, 5e-324, D)          # csgraph reads 0 as "no edge"
    T = minimum_spanning_tree(csr_array((w, (i, j)), shape=(n, n))).tocoo()
    data = np.where(T.data == 5e-324, 0.0, T.data)
    edges = {(min(a, b), max(a, b)) for a, b in zip(T.row.tolist(), T.col.tolist())}
    return math.fsum(data.tolist()), edges


def distinct_lengths(D):
    """Are all pair lengths distinct by a relative gap above 1e-9 (the tree is then unique)?"""
    s = np.sort(D)
    return bool(s.size) and s[0] > 0 and bool(np.all(np.diff(s) > 1e-9 * s[1:]))


def hav_ref(a, b, r=EARTH_R):
    """Great-circle distance, written here with `math` (a pole is one point)."""
    lon1, lat1 = float(a[0]), float(a[1])
    lon2, lat2 = float(b[0]), float(b[1])
    dlat = math.radians(lat2 - lat1)
    a, b = math.remainder(lon2, 360.0), math.remainder(lon1, 360.0)   # remainder is exact
    if a - b > 180.0:         # across the antimeridian: move one side by 360 first, which
        a -= 360.0            # is exact for sites near +-180, so the difference is exact too
    elif a - b < -180.0:
        a += 360.0
    dlon = math.radians(a - b)
    c1 = math.sin(math.radians(90.0 - abs(lat1)))             # cos(lat1), exact near a pole
    c2 = math.sin(math.radians(90.0 - abs(lat2)))
    h = math.sin(dlat / 2) ** 2 + c1 * c2 * math.sin(dlon / 2) ** 2
    return 2.0 * r * math.asin(min(1.0, math.sqrt(h)))


def check_against_all_pairs(t, D, n):
    """Spanning tree, total within RTOL of the reference, edge set equal when lengths differ."""
    assert len(t) == n - 1 and t.n_components == 1
    assert np.all(t.tail < t.head)
    ref_total, ref_edges = reference_tree(D, n)
    ours = t.weight
    assert abs(ours - ref_total) <= RTOL * ref_total, (t.method, ours, ref_total)
    if distinct_lengths(D):
        assert set(zip(t.tail.tolist(), t.head.tolist())) == ref_edges, t.method


# --- Euclidean cases ----------------------------------------------------------------------------

def base_shape(shape, n, d, rng):
    """Points in [0, 1]^d of a given kind (the scale and offset are applied afterwards)."""
    if shape == "uniform":
        return rng.random((n, d))
    if shape == "grid":
        k = math.ceil(n ** (1 / d))
        g = np.stack(np.meshgrid(*[np.arange(k)] * d, indexing="ij"), -1).reshape(-1, d)
        return g[rng.permutation(len(g))[:n]] / k
    if shape == "collinear":
        return np.outer(rng.random(n), rng.random(d) + 0.1)
    if shape == "coplanar":       # 3-D points on a tilted plane (2-D: a line)
        uv = rng.random((n, 2))
        basis = rng.random((2, d))
        return uv @ basis
    if shape == "clumps":         # tight clumps in a wide set: two scales at once
        centres = rng.random((max(1, n // 6), d))
        return centres[rng.integers(0, len(centres), n)] + 1e-7 * rng.random((n, d))
    if shape == "duplicates":
        base = rng.random((max(1, n // 3), d))
        return base[rng.integers(0, len(base), n)]
    raise AssertionError(shape)


@st.composite
def euclid_cases(draw):
    d = draw(st.sampled_from([2, 3]))
    n = draw(st.integers(2, 60))
    shape = draw(st.sampled_from(["uniform", "grid", "collinear", "coplanar", "clumps",
                                  "duplicates"]))
    extent = 10.0 ** draw(st.floats(-9, 6))
    offset = [draw(st.sampled_from([0.0, 5e5, 7e6, 1e7]) | st.floats(-7, 7).map(
        lambda e: math.copysign(10 ** abs(e), e))) for _ in range(d)]
    seed = draw(st.integers(0, 2 ** 32 - 1))
    rng = np.random.default_rng(seed)
    X = np.asarray(offset) + extent * base_shape(shape, n, d, rng)
    return X


@given(euclid_cases())
def test_euclidean_equals_all_pairs_at_every_scale(X):
    """Centre offsets 0..1e7, extents 1e-9..1e6, 2-D and 3-D, duplicates, collinear, coplanar,
    grids and clumps: the tree weighs what the all-pairs tree weighs."""
    t = fastmst.point_spanning_tree(X)
    # reference: scipy.spatial.distance.pdist + scipy.sparse.csgraph.minimum_spanning_tree
    check_against_all_pairs(t, pdist(X), len(X))


def _utm_cluster(n, spacing, seed, d=2, offset=(512_345.0, 6_712_345.0)):
    """Points a few spacings apart at projected-metre offsets (a jittered chain of streets)."""
    rng = np.random.default_rng(seed)
    steps = rng.normal(0, spacing, (n, d))
    return np.asarray(offset[:d]) + np.cumsum(steps, axis=0) * 0.2 + rng.random((n, d)) * spacing


@pytest.mark.parametrize("name,X", [
    ("utm metres", _utm_cluster(1500, 3.0, 1)),
    ("utm 0.2-0.5 m nodes", _utm_cluster(1500, 0.3, 2)),
    ("utm 3-D far out", _utm_cluster(1200, 2.0, 3, d=3, offset=(5e5, 7e6, 1e7))),
    ("tiny grid off origin", (lambda g: 1e6 + 1e-4 * g)(np.stack(np.meshgrid(
        np.arange(40.0), np.arange(30.0)), -1).reshape(-1, 2))),
    ("near-coincident pairs", (lambda B: np.vstack([B, B + 1e-9]))(
        np.random.default_rng(4).random((600, 2)) * 100 + 5e5)),
])
def test_euclidean_real_coordinate_sets(name, X):
    """Larger sets of the kinds in the report (projected coordinates a few metres or 0.2-0.5 m
    apart, 3-D far from the origin, a fine grid off the origin, near-coincident pairs)."""
    t = fastmst.point_spanning_tree(X)
    # reference: scipy.spatial.distance.pdist + scipy.sparse.csgraph.minimum_spanning_tree
    check_against_all_pairs(t, pdist(X), len(X))


# --- great-circle cases -------------------------------------------------------------------------

def _lonlat(P):
    lon = np.degrees(np.arctan2(P[:, 1], P[:, 0]))
    lat = np.degrees(np.arctan2(P[:, 2], np.hypot(P[:, 0], P[:, 1])))
    return np.column_stack([lon, lat])


def sphere_cluster(lon0, lat0, radius_m, n, shape, rng):
    """n sites within radius_m of (lon0, lat0), built on the unit sphere."""
    lo, la = math.radians(lon0), math.radians(lat0)
    c = np.array([math.cos(la) * math.cos(lo), math.cos(la) * math.sin(lo), math.sin(la)])
    e = np.array([-math.sin(lo), math.cos(lo), 0.0])
    nv = np.cross(c, e)
    rho = radius_m / EARTH_R
    if shape == "line":
        a = np.full(n, rng.random() * 2 * np.pi)
        s = rho * rng.uniform(-1, 1, n)
    else:
        a = rng.uniform(0, 2 * np.pi, n)
        s = rho * np.sqrt(rng.random(n))
    P = (np.outer(np.cos(s), c) + np.outer(np.sin(s) * np.cos(a), e)
         + np.outer(np.sin(s) * np.sin(a), nv))
    LL = _lonlat(P)
    if shape == "clumps":
        LL = LL[rng.integers(0, max(1, n // 4), n)] + rng.normal(0, 1e-9, (n, 2))
        LL[:, 1] = np.clip(LL[:, 1], -90, 90)
    if shape == "duplicates":
        LL = LL[rng.integers(0, max(1, n // 3), n)]
    return LL


@st.composite
def sphere_cases(draw):
    n = draw(st.integers(2, 45))
    lon0 = draw(st.sampled_from([-180.0, 180.0, 0.0, 179.9999]) | st.floats(-180, 180))
    lat0 = draw(st.sampled_from([-90.0, 90.0, 0.0, 89.9999, -89.99999]) | st.floats(-90, 90))
    radius = 10.0 ** draw(st.floats(-1, 6.7))       # 0.1 m to 5000 km
    shape = draw(st.sampled_from(["disc", "line", "clumps", "duplicates", "global"]))
    seed = draw(st.integers(0, 2 ** 32 - 1))
    rng = np.random.default_rng(seed)
    if shape == "global":
        z = rng.uniform(-1, 1, n)
        return np.column_stack([rng.uniform(-180, 180, n), np.degrees(np.arcsin(z))])
    LL = sphere_cluster(lon0, lat0, radius, n, shape, rng)
    if draw(st.booleans()):
        # the centre itself, and the exact pole under another longitude
        extra = [[lon0, lat0]] + ([[lon0 + 90.0, lat0]] if abs(lat0) == 90 else [])
        LL = np.vstack([LL, extra])
    if draw(st.booleans()):
        # longitudes given as lon + 360 k: quantised to 2**-32 degrees (2.6e-5 m) first, so
        # the shifted value is exact and both sides see the same site
        q = np.round(LL[:, 0] * 2.0 ** 32) / 2.0 ** 32
        k = rng.integers(-2, 3, len(LL))
        LL = np.column_stack([q + 360.0 * k, LL[:, 1]])
    return LL


def hav_pdist(LL):
    P = LL.copy()
    P[np.abs(P[:, 1]) == 90.0, 0] = 0.0          # a pole is one point whatever its longitude
    return pdist(P, hav_ref)


@given(sphere_cases())
def test_great_circle_equals_all_pairs_anywhere(LL):
    """Sites 0.1 m to 5000 km apart anywhere (poles, the antimeridian, wrapped longitudes,
    duplicates, clumps, lines) and global sets: the tree weighs what the all-pairs tree weighs."""
    t = fastmst.point_spanning_tree(LL, metric="great-circle")
    # reference: pdist with the `math` haversine above + scipy.sparse.csgraph.minimum_spanning_tree
    check_against_all_pairs(t, hav_pdist(LL), len(LL))


@pytest.mark.parametrize("name,lon0,lat0,radius,n", [
    ("sites 30 m apart", 5.1, 52.1, 300.0, 1200),
    ("near the north pole", 10.0, 89.9995, 60.0, 800),
    ("on the south pole", 0.0, -90.0, 40.0, 800),
    ("across the antimeridian", 180.0, -16.5, 50.0, 800),
    ("OSM-like 0.3 m", -73.98, 40.75, 6.0, 800),
])
def test_great_circle_real_scale_clusters(name, lon0, lat0, radius, n):
    """Clusters of hundreds of sites tens of metres (or centimetres) apart, incl. poles and the
    antimeridian: the all-pairs tree."""
    LL = sphere_cluster(lon0, lat0, radius, n, "disc", np.random.default_rng(n))
    t = fastmst.point_spanning_tree(LL, metric="great-circle")
    # reference: pdist with the `math` haversine + scipy.sparse.csgraph.minimum_spanning_tree
    check_against_all_pairs(t, hav_pdist(LL), len(LL))


def test_haversine_keeps_precision_for_close_sites():
    """Two sites 1 cm apart near a pole, across the antimeridian and at a large latitude keep
    their length to 1e-9 relative (the `math` reference above, worked in degrees first)."""
    from fastmst.geometry.geodesy import haversine_m
    for a, b in [((179.9999999, 10.0), (-179.99999991, 10.0)),
                 ((33.0, 89.99999), (33.0000001, 89.99999)),
                 ((12.0, -45.0), (12.0, -45.0000000899))]:
        got = float(haversine_m(a[0], a[1], b[0], b[1]))
        # reference: hav_ref (math, differences in degrees)
        assert got == pytest.approx(hav_ref(a, b), rel=1e-9)
