"""Exact spanning trees of point sets, checked against outside references.

References: scipy.sparse.csgraph.minimum_spanning_tree on scipy.spatial.distance.pdist matrices;
scipy.spatial.Delaunay (the tree is a subgraph of it); networkx.minimum_spanning_tree where
zero-length edges matter (SciPy's dense input treats entries within 1e-8 of zero as "no edge",
so duplicate points are compared on their distinct rows there); scipy.cluster.hierarchy for
single-linkage clusters; a haversine written here with `math`; and Ed Williams, "Aviation
Formulary" (worked example LAX-JFK, recalled from memory).
"""
import math

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from scipy.cluster.hierarchy import fcluster, linkage
from scipy.sparse.csgraph import minimum_spanning_tree
from scipy.spatial import Delaunay
from scipy.spatial.distance import pdist, squareform

import fastmst
from fastmst.geometry.points import pair_position

METRIC_NATIVE = ("euclidean", "cityblock", "chebyshev", "minkowski")

RNG = np.random.default_rng(20261201)


def scipy_total(X, metric="euclidean", **kw):
    """Total length of scipy's MST over the distinct rows (scipy drops zero entries)."""
    U = np.unique(X, axis=0)
    if U.shape[0] < 2:
        return 0.0
    return float(minimum_spanning_tree(squareform(pdist(U, metric, **kw))).sum())


def brute_tie_rule(X, dist):
    """Kruskal over every pair sorted by (length, i, j): the tie rule, from its definition."""
    n = len(X)
    pairs = sorted((dist(X[i], X[j]), i, j) for i in range(n) for j in range(i + 1, n))
    parent = list(range(n))

    def find(a):
        while parent[a] != a:
            parent[a] = parent[parent[a]]
            a = parent[a]
        return a
    out = []
    for d, i, j in pairs:
        ri, rj = find(i), find(j)
        if ri != rj:
            parent[ri] = rj
            out.append((d, i, j))
    return out


def euclid(a, b):
    return math.sqrt(sum((float(x) - float(y)) ** 2 for x, y in zip(a, b)))


def hav_math(a, b, r=6371008.8):
    """Haversine written independently with `math` (R = IUGG mean radius)."""
    l1, p1 = math.radians(a[0]), math.radians(a[1])
    l2, p2 = math.radians(b[0]), math.radians(b[1])
    h = math.sin((p2 - p1) / 2) ** 2 + math.cos(p1) * math.cos(p2) * math.sin((l2 - l1) / 2) ** 2
    return 2 * r * math.asin(min(1.0, math.sqrt(h)))


def nx_total(X, dist):
    """Total of networkx's MST over the complete graph (keeps zero-length edges)."""
    g = nx.Graph()
    g.add_nodes_from(range(len(X)))
    g.add_weighted_edges_from((i, j, dist(X[i], X[j]))
                              for i in range(len(X)) for j in range(i + 1, len(X)))
    return nx.minimum_spanning_tree(g).size(weight="weight")


def assert_spanning_tree(t, n):
    assert len(t) == max(n - 1, 0)
    assert t.n_components == min(n, 1)
    assert np.all(t.tail < t.head)
    g = nx.Graph()
    g.add_nodes_from(range(n))
    g.add_edges_from(zip(t.tail.tolist(), t.head.tolist()))
    assert n == 0 or nx.is_tree(g)


# --- Euclidean ---------------------------------------------------------------------------------

def clustered(n, d):
    centres = RNG.random((8, d)) * 100
    return centres[RNG.integers(0, 8, n)] + RNG.normal(0, 0.5, (n, d))


@pytest.mark.parametrize("name,X,route", [
    ("uniform-2d", RNG.random((2000, 2)), "delaunay"),
    ("uniform-3d", RNG.random((1500, 3)), "delaunay"),
    ("clustered-2d", clustered(1500, 2), "delaunay"),
    ("clustered-3d", clustered(1000, 3), "delaunay"),
    # nearly a line (aspect 1e-9): some points closer than 1e-6 of the extent, repaired
    ("wide-range", RNG.random((800, 2)) * np.array([1e6, 1e-3]), "delaunay+close-points"),
])
def test_euclidean_total_matches_scipy(name, X, route):
    """Total length equals scipy.sparse.csgraph.minimum_spanning_tree on the pdist matrix."""
    t = fastmst.point_spanning_tree(X)
    assert_spanning_tree(t, len(X))
    assert t.method == route
    # reference: scipy.sparse.csgraph.minimum_spanning_tree(squareform(pdist(X)))
    assert t.weight == pytest.approx(scipy_total(X), rel=1e-12)


def test_positions_and_lengths_are_pdist_entries():
    """edges index the condensed pdist vector, whose entries are the weights."""
    X = RNG.random((400, 2))
    t = fastmst.point_spanning_tree(X)
    # reference: scipy.spatial.distance.pdist (condensed order (0,1), (0,2), ...)
    np.testing.assert_allclose(pdist(X)[t.edges], t.weights, rtol=1e-15)
    assert t.n_edges == 400 * 399 // 2
    keys = list(zip(t.weights.tolist(), t.edges.tolist()))
    assert keys == sorted(keys)


def test_subgraph_of_delaunay():
    """Every tree edge is an edge of scipy.spatial.Delaunay of the same points."""
    X = RNG.random((3000, 2))
    t = fastmst.point_spanning_tree(X)
    simp = Delaunay(X).simplices
    edges = {tuple(sorted(p)) for s in simp.tolist() for p in ((s[0], s[1]), (s[0], s[2]),
                                                                (s[1], s[2]))}
    # reference: scipy.spatial.Delaunay (Euclidean MST is a subgraph of the triangulation)
    assert all((a, b) in edges for a, b in zip(t.tail.tolist(), t.head.tolist()))


def test_grid_ties_follow_rule():
    """On an integer grid (every length tied many times) the tree is the tie rule's tree."""
    xs, ys = np.meshgrid(np.arange(12), np.arange(9))
    X = np.column_stack([xs.ravel(), ys.ravel()]).astype(float)
    X = X[RNG.permutation(len(X))]
    t = fastmst.point_spanning_tree(X)
    ref = brute_tie_rule(X, euclid)   # reference: definition of the (length, i, j) rule
    assert list(zip(t.tail.tolist(), t.head.tolist())) == [(i, j) for _, i, j in ref]
    # reference: scipy.sparse.csgraph.minimum_spanning_tree on pdist
    assert t.weight == pytest.approx(scipy_total(X), rel=1e-12)


def test_duplicate_heavy():
    """Duplicates join by zero-length edges to their first occurrence; totals match references."""
    base = RNG.random((60, 2))
    X = base[RNG.integers(0, 60, 500)]
    t = fastmst.point_spanning_tree(X)
    assert_spanning_tree(t, 500)
    n_unique = len(np.unique(X, axis=0))
    zero = t.weights == 0
    assert zero.sum() == 500 - n_unique
    first = {}
    for i, row in enumerate(map(tuple, X.tolist())):
        first.setdefault(row, i)
    assert all(first[tuple(X[j])] == i for i, j in zip(t.tail[zero], t.head[zero]))
    # reference: scipy MST over the distinct rows (scipy drops zero-length entries)
    assert t.weight == pytest.approx(scipy_total(X), rel=1e-12)
    # reference: networkx.minimum_spanning_tree on the complete graph, zero edges kept
    Y = X[:150]
    assert fastmst.point_spanning_tree(Y).weight == pytest.approx(nx_total(Y, euclid), rel=1e-12)


@pytest.mark.parametrize("name,X,route", [
    ("collinear-2d", np.column_stack([np.arange(300.0), 3 * np.arange(300.0) - 7])[
        np.random.default_rng(1).permutation(300)], "chain"),
    ("collinear-3d", np.outer(np.random.default_rng(2).random(200), [1.0, -2.0, 0.5]) + 4,
     "chain"),
    ("vertical", np.column_stack([np.zeros(100), np.random.default_rng(3).random(100)]),
     "chain"),
    ("coplanar-3d", np.column_stack([np.random.default_rng(4).random((400, 2)),
                                     np.zeros(400)]), "delaunay-projected"),
    ("tilted-plane", (lambda P: np.column_stack([P, P @ [2.0, -1.0]]))(
        np.random.default_rng(5).integers(0, 50, (300, 2)).astype(float)),
     "delaunay-projected"),
])
def test_degenerate_sets(name, X, route):
    """Collinear and coplanar input (no full-dimensional triangulation) stays exact."""
    t = fastmst.point_spanning_tree(X)
    assert_spanning_tree(t, len(X))
    assert t.method == route
    # reference: scipy.sparse.csgraph.minimum_spanning_tree on pdist
    assert t.weight == pytest.approx(scipy_total(X), rel=1e-12)


@pytest.mark.parametrize("X", [np.empty((0, 2)), np.zeros((1, 2)), [[1.0, 2.0], [4.0, 6.0]],
                               [[0, 0], [1, 0], [0, 1]], np.zeros((5, 3)), [[0.0], [3.0], [1.0]]])
def test_tiny_inputs(X):
    """Fewer points than a simplex, one point, none, all equal: a correct (possibly empty) tree."""
    X = np.asarray(X, dtype=float)
    t = fastmst.point_spanning_tree(X)
    assert_spanning_tree(t, len(X))
    ref = brute_tie_rule(X, euclid)   # reference: definition of the tie rule
    assert list(zip(t.tail.tolist(), t.head.tolist())) == [(i, j) for _, i, j in ref]


def test_sqeuclidean_uses_delaunay():
    """Squared Euclidean ranks pairs like Euclidean; lengths are squared (scipy pdist)."""
    X = RNG.random((500, 3))
    t = fastmst.point_spanning_tree(X, metric="sqeuclidean")
    assert t.method == "delaunay"
    # reference: scipy MST on pdist(..., "sqeuclidean")
    assert t.weight == pytest.approx(scipy_total(X, "sqeuclidean"), rel=1e-12)


# --- dense Prim ----------------------------------------------------------------------------------

@pytest.mark.parametrize("metric,kw,d", [
    ("euclidean", {}, 8), ("cityblock", {}, 4), ("chebyshev", {}, 3),
    ("minkowski", {"p": 3.0}, 5), ("cosine", {}, 6), ("canberra", {}, 3),
    ("seuclidean", {}, 3), ("mahalanobis", {}, 3),
])
def test_dense_metrics_match_scipy(metric, kw, d):
    """Dense Prim equals scipy's MST on pdist for the same metric."""
    n = 1200 if metric in METRIC_NATIVE else 400
    X = RNG.random((n, d)) + 0.1
    t = fastmst.point_spanning_tree(X, metric=metric, metric_kwargs=kw or None)
    assert t.method == "dense-prim"
    assert_spanning_tree(t, n)
    # reference: scipy.sparse.csgraph.minimum_spanning_tree(squareform(pdist(X, metric)))
    assert t.weight == pytest.approx(scipy_total(X, metric, **kw), rel=1e-12)


def test_dense_ties_follow_rule_and_threads_agree():
    """Integer 4-D points (many ties): the tie rule's tree, identical for 1 and 2 threads."""
    X = np.random.default_rng(7).integers(0, 3, (60, 4)).astype(float)
    for metric, dist in (("cityblock", lambda a, b: float(np.abs(a - b).sum())),
                         ("euclidean", euclid)):
        ref = brute_tie_rule(X, dist)   # reference: definition of the tie rule
        for threads in (1, 2):
            t = fastmst.point_spanning_tree(X, metric=metric, threads=threads)
            assert list(zip(t.tail.tolist(), t.head.tolist())) == [(i, j) for _, i, j in ref]


def test_dense_kernel_parallel_blocks_agree():
    """The blocked parallel scan returns the same tree for any block size and thread count."""
    from fastmst._kernels.points import dense_prim
    X = np.random.default_rng(8).integers(0, 4, (1500, 3)).astype(float)
    ref = dense_prim(X, 0, 2.0, 1, 1024)
    for threads, block in ((2, 64), (2, 1000), (1, 7)):
        got = dense_prim(X, 0, 2.0, threads, block, 0)
        assert all(np.array_equal(a, b) for a, b in zip(ref, got))


# --- max_length ----------------------------------------------------------------------------------

def test_max_length_clusters_match_single_linkage():
    """Components under max_length are scipy.cluster.hierarchy's single-linkage clusters."""
    X = clustered(700, 2)
    for limit in (0.3, 1.0, 5.0):
        t = fastmst.point_spanning_tree(X, max_length=limit)
        assert np.all(t.weights <= limit)
        # reference: scipy.cluster.hierarchy.fcluster(linkage(X, "single"), t, "distance")
        ref = fcluster(linkage(X, "single"), limit, "distance")
        assert t.n_components == len(np.unique(ref))
        pairs = set(zip(t.labels.tolist(), ref.tolist()))
        assert len(pairs) == t.n_components
        assert len(t) == 700 - t.n_components


def test_max_length_zero_and_inf():
    """max_length=0 keeps only duplicates joined; inf keeps the whole tree."""
    X = np.array([[0, 0], [0, 0], [1, 0], [5, 5]], dtype=float)
    t0 = fastmst.point_spanning_tree(X, max_length=0)
    assert t0.n_components == 3 and t0.tail.tolist() == [0] and t0.head.tolist() == [1]
    assert len(fastmst.point_spanning_tree(X, max_length=float("inf"))) == 3


# --- great-circle --------------------------------------------------------------------------------

def test_haversine_worked_example():
    """LAX-JFK: 0.623585 rad ~ 2144 nmi (Ed Williams, Aviation Formulary; recalled from memory)."""
    lax = (-(118 + 24 / 60), 33 + 57 / 60)
    jfk = (-(73 + 47 / 60), 40 + 38 / 60)
    t = fastmst.point_spanning_tree(np.array([lax, jfk]), metric="great-circle")
    assert t.weights[0] / 6371008.8 == pytest.approx(0.623585, abs=2e-6)
    assert t.weights[0] == pytest.approx(hav_math(lax, jfk), rel=1e-12)


def sphere_sets():
    r = np.random.default_rng(11)
    lon = r.uniform(-180, 180, 300)
    return [
        ("global", np.column_stack([lon, np.degrees(np.arcsin(r.uniform(-1, 1, 300)))])),
        ("antimeridian", np.column_stack([np.where(r.random(250) < .5, 179.5, -179.5)
                                          + r.normal(0, .3, 250), r.normal(0, 1, 250)])),
        ("poles", np.vstack([np.column_stack([r.uniform(-180, 180, 150), 88 + 2 * r.random(150)]),
                             [[0, 90], [77, 90], [-120, 90]],
                             np.column_stack([r.uniform(-180, 180, 100), -89.5 * np.ones(100)]),
                             [[10, -90], [10, -90]]])),
        ("city", np.column_stack([2.30 + 0.05 * r.random(250), 48.84 + 0.05 * r.random(250)])),
        ("equator", np.column_stack([lon[:200], np.zeros(200)])),
        ("meridian", np.column_stack([np.where(r.random(150) < .5, 30.0, -150.0),
                                      r.uniform(-89, 89, 150)])),
        ("parallel", np.column_stack([lon[:120], np.full(120, -33.0)])),
        ("duplicates", np.vstack([np.column_stack([lon[:40], r.uniform(-60, 60, 40)])] * 4
                                 + [[[180.0, 10.0], [-180.0, 10.0], [540.0, 10.0]]])),
        ("wrapped", np.column_stack([lon[:150] + 360 * r.integers(-2, 3, 150),
                                     r.uniform(-80, 80, 150)])),
    ]


@pytest.mark.parametrize("name,LL", sphere_sets())
def test_great_circle_matches_brute_force(name, LL):
    """Great-circle total equals networkx's MST of all pairs under a `math` haversine."""
    t = fastmst.point_spanning_tree(LL, metric="great-circle")
    assert_spanning_tree(t, len(LL))
    if name in ("equator", "meridian", "parallel"):
        # every site on one circle: still a candidate route (cocircular input is triangulated
        # or chained), not the O(n^2) dense one
        assert t.method != "dense-prim"
    for i, j, w in zip(t.tail[:50], t.head[:50], t.weights[:50]):
        # reference: independent haversine (math); the pole/antimeridian copies are one point
        assert w == pytest.approx(hav_math(LL[i], LL[j]), rel=1e-9, abs=1e-6)
    # reference: networkx.minimum_spanning_tree over all pairs (zero-length edges kept)
    assert t.weight == pytest.approx(nx_total(LL, hav_math), rel=1e-11, abs=1e-5)


# --- contract --------------------------------------------------------------------------------

def test_inputs_not_mutated_and_dtypes():
    """Read-only, non-contiguous, integer and float32 inputs work and are left unchanged."""
    X = RNG.random((300, 4)) * 10
    ro = X[:, :2].copy()
    ro.setflags(write=False)
    before = ro.copy()
    t = fastmst.point_spanning_tree(ro)
    assert np.array_equal(ro, before)
    nc = X[:, ::2]                   # non-contiguous view
    assert fastmst.point_spanning_tree(nc).weight == pytest.approx(scipy_total(nc), rel=1e-12)
    Xi = (X[:, :2] * 10).astype(np.int32)
    assert fastmst.point_spanning_tree(Xi).weight == pytest.approx(scipy_total(Xi.astype(float)))
    f32 = X[:, :3].astype(np.float32)
    assert fastmst.point_spanning_tree(f32).weight == pytest.approx(
        scipy_total(f32.astype(np.float64)), rel=1e-12)
    assert t.metric == "euclidean"


@pytest.mark.parametrize("kwargs,exc,match", [
    (dict(points=[[0.0, np.nan], [1, 1]]), ValueError, r"points\[0, 1\] = nan"),
    (dict(points=[1.0, 2.0, 3.0]), ValueError, r"shape \(n_points, d\).*reshape"),
    (dict(points=np.zeros((3, 0))), ValueError, "at least one coordinate"),
    (dict(points=[["a", "b"]]), TypeError, "numeric coordinates"),
    (dict(points=None), TypeError, "is None"),
    (dict(points=[[0, 91], [0, 0]], metric="great-circle"), ValueError, "swapped"),
    (dict(points=[[0, 1, 2]], metric="great-circle"), ValueError, r"shape \(n_points, 2\)"),
    (dict(points=[[0, 1], [2, 3]], metric="manhatan"), ValueError, "manhatan"),
    (dict(points=[[0, 1], [2, 3]], metric=3), TypeError, "metric must be a string"),
    (dict(points=[[0, 1], [2, 3]], max_length=-1), ValueError, "max_length must be >= 0"),
    (dict(points=[[0, 1], [2, 3]], max_length="far"), TypeError, "max_length must be a number"),
    (dict(points=[[0, 1], [2, 3]], metric="minkowski", metric_kwargs={"p": 0.5}), ValueError,
     "p >= 1"),
    (dict(points=[[0, 1], [2, 3]], metric_kwargs=[1]), TypeError, "metric_kwargs"),
    (dict(points=[[0, 0], [0, 0], [1, 1]], metric="cosine"), ValueError, "NaN"),
])
def test_bad_input_is_explained(kwargs, exc, match):
    """Bad input gets a TypeError/ValueError that names what was wrong."""
    pts = kwargs.pop("points")
    with pytest.raises(exc, match=match):
        fastmst.point_spanning_tree(pts, **kwargs)


# --- property tests ----------------------------------------------------------------------------

coords = st.integers(min_value=-3, max_value=3)


@settings(deadline=None, derandomize=True, max_examples=60)
@given(st.integers(1, 3).flatmap(lambda d: st.lists(st.lists(coords, min_size=d, max_size=d),
                                                    min_size=0, max_size=25)))
def test_small_integer_sets_follow_tie_rule(rows):
    """Random tiny integer sets (duplicates, collinear, ties): exactly the tie rule's tree."""
    d = len(rows[0]) if rows else 2
    X = np.asarray(rows, dtype=float).reshape(-1, d)
    t = fastmst.point_spanning_tree(X)
    ref = brute_tie_rule(X, euclid)   # reference: definition of the tie rule
    assert list(zip(t.tail.tolist(), t.head.tolist())) == [(i, j) for _, i, j in ref]
    assert np.array_equal(t.edges, pair_position(t.tail, t.head, len(X)))


@settings(deadline=None, derandomize=True, max_examples=30)
@given(st.lists(st.tuples(st.integers(-4, 4).map(lambda v: 45.0 * v),
                          st.integers(-2, 2).map(lambda v: 45.0 * v)), min_size=2, max_size=20))
def test_great_circle_coarse_grid(rows):
    """Coarse lon/lat grids (poles, antimeridian, circles, duplicates) match brute force."""
    LL = np.asarray(rows, dtype=float)
    t = fastmst.point_spanning_tree(LL, metric="great-circle")
    assert_spanning_tree(t, len(LL))
    # reference: networkx MST of all pairs under the `math` haversine
    assert t.weight == pytest.approx(nx_total(LL, hav_math), rel=1e-11, abs=1e-5)


def test_near_coincident_points_are_repaired_exactly():
    """Points closer than 1e-6 of the extent (where Qhull's triangulation cannot be trusted)
    are paired with every point, the rest triangulated again; totals match references."""
    r = np.random.default_rng(12)
    B = r.random((250, 2))
    X = np.vstack([B, B[:80] + r.normal(0, 1e-13, (80, 2)), B[:40] + 1e-9])
    t = fastmst.point_spanning_tree(X)
    assert t.method == "delaunay+close-points"
    assert t.provenance["candidate_pairs"] < len(X) * (len(X) - 1) // 2
    assert_spanning_tree(t, len(X))
    # reference: networkx MST of all pairs (distances below 1e-8 would be dropped by scipy)
    assert t.weight == pytest.approx(nx_total(X, euclid), rel=1e-12)
    LL = np.column_stack([r.uniform(-180, 180, 200), r.uniform(-80, 80, 200)])
    LL = np.vstack([LL, LL[:60] + 1e-12])
    s = fastmst.point_spanning_tree(LL, metric="great-circle")
    assert s.method == "sphere-caps+close-points"
    # reference: networkx MST of all pairs under the `math` haversine
    assert s.weight == pytest.approx(nx_total(LL, hav_math), rel=1e-11)


def test_untrusted_triangulation_falls_back_and_says_why():
    """Too many close points for the repair budget: exact dense Prim, the reason recorded."""
    from fastmst.geometry import planar as P   # the repair budget lives with the Delaunay pairs
    r = np.random.default_rng(16)
    B = r.random((300, 2)) * 1e3 + 5e5
    X = np.vstack([B, B + 1e-7])
    old = P._REPAIR_PAIRS
    try:
        P._REPAIR_PAIRS = 10                     # force the fallback on a small set
        t = fastmst.point_spanning_tree(X)
    finally:
        P._REPAIR_PAIRS = old
    assert t.method == "dense-prim"
    assert "closer than" in t.provenance["fallback"]
    # reference: scipy MST on pdist (no zero lengths here)
    assert t.weight == pytest.approx(scipy_total(X), rel=1e-12)


def test_great_circle_radius_and_kwargs():
    """radius= scales lengths (the tree is unchanged); other keys are refused."""
    LL = np.column_stack([np.linspace(0, 40, 30), np.linspace(-20, 35, 30) ** 2 / 40])
    a = fastmst.point_spanning_tree(LL, metric="great-circle")
    b = fastmst.point_spanning_tree(LL, metric="great-circle", metric_kwargs={"radius": 1.0})
    assert np.array_equal(a.edges, b.edges)
    # reference: the `math` haversine above on the unit sphere
    np.testing.assert_allclose(b.weights, [hav_math(LL[i], LL[j], r=1.0)
                                           for i, j in zip(b.tail, b.head)], rtol=1e-12)
    with pytest.raises(ValueError, match="radius"):
        fastmst.point_spanning_tree(LL, metric="great-circle", metric_kwargs={"p": 2})
    with pytest.raises(ValueError, match="positive finite"):
        fastmst.point_spanning_tree(LL, metric="great-circle", metric_kwargs={"radius": -1})


def test_extreme_coordinates_are_refused_or_exact():
    """Overflowing lengths raise; a far outlier that breaks Qhull still gives the exact tree."""
    X = np.random.default_rng(13).random((40, 2))
    with pytest.raises(ValueError, match="overflows float64"):
        fastmst.point_spanning_tree(X * 1e300)
    Y = np.vstack([X, [[1e100, 1e100]]])
    t = fastmst.point_spanning_tree(Y)
    # reference: scipy MST on pdist (the outlier's link dominates; the rest must match too)
    assert t.weight == pytest.approx(scipy_total(Y), rel=1e-12)
    assert fastmst.point_spanning_tree(X).weight == pytest.approx(
        math.fsum(sorted(t.weights.tolist())[:-1]), rel=1e-12)


def test_large_set_matches_scipy_on_delaunay_edges():
    """25k points (the spatially ordered Qhull route): the total equals scipy's MST of the
    Delaunay edge graph, and every edge is a Delaunay edge."""
    from scipy import sparse
    X = np.random.default_rng(14).random((25000, 2))
    t = fastmst.point_spanning_tree(X)
    simp = Delaunay(X).simplices          # reference: scipy.spatial.Delaunay
    a = np.concatenate([simp[:, 0], simp[:, 0], simp[:, 1]])
    b = np.concatenate([simp[:, 1], simp[:, 2], simp[:, 2]])
    g = sparse.csr_array((np.ones(a.shape[0]), (np.minimum(a, b), np.maximum(a, b))),
                         shape=(25000, 25000))
    present = set(zip(*g.nonzero()))
    assert all((i, j) in present for i, j in zip(t.tail.tolist(), t.head.tolist()))
    key = np.unique(np.minimum(a, b) * 25000 + np.maximum(a, b))
    i, j = key // 25000, key % 25000
    gw = sparse.csr_array((np.sqrt(((X[i] - X[j]) ** 2).sum(axis=1)), (i, j)),
                          shape=(25000, 25000))
    # reference: scipy.sparse.csgraph.minimum_spanning_tree over the Delaunay edges
    assert t.weight == pytest.approx(float(minimum_spanning_tree(gw).sum()), rel=1e-12)


@settings(deadline=None, derandomize=True, max_examples=40)
@given(st.integers(2, 3).flatmap(lambda d: st.lists(
    st.lists(st.floats(-1e6, 1e6, allow_nan=False) | st.sampled_from([0.0, 1.0, -1.0, 1e-9]),
             min_size=d, max_size=d), min_size=0, max_size=40)))
def test_wild_float_sets_match_scipy(rows):
    """Arbitrary float sets (wide ranges, repeats, near-degenerate): a spanning tree whose total
    equals networkx's MST of all pairs (scipy's dense route would drop lengths below 1e-8)."""
    d = len(rows[0]) if rows else 2
    X = np.asarray(rows, dtype=float).reshape(-1, d)
    t = fastmst.point_spanning_tree(X)
    assert_spanning_tree(t, len(X))
    # reference: networkx.minimum_spanning_tree over every pair
    assert t.weight == pytest.approx(nx_total(X, euclid), rel=1e-9, abs=1e-12)


def test_kernels_from_several_threads_at_once():
    """The nogil kernels give the same answers when called from four threads concurrently."""
    from concurrent.futures import ThreadPoolExecutor
    r = np.random.default_rng(15)
    X8 = r.integers(0, 4, (600, 8)).astype(float)
    X2 = r.random((3000, 2))
    t, h, w = (np.arange(999), np.arange(1, 1000), r.random(999))
    jobs = [lambda: fastmst.point_spanning_tree(X8).edges,
            lambda: fastmst.point_spanning_tree(X2).edges,
            lambda: fastmst.steiner_tree(t, h, w, [0, 500, 999]).edges] * 4
    with ThreadPoolExecutor(4) as pool:
        got = list(pool.map(lambda f: f(), jobs))
    for a, b in zip(got[:3], got[3:6]):
        assert np.array_equal(a, b)
    assert all(np.array_equal(got[i], got[i % 3]) for i in range(12))


def test_bench_smoke():
    """bench/bench_points.py runs its four cases at toy sizes and reports agreeing totals."""
    import importlib.util
    import pathlib
    path = pathlib.Path(__file__).resolve().parents[1] / "bench" / "bench_points.py"
    spec = importlib.util.spec_from_file_location("bench_points", path)
    bench = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(bench)
    import re
    for name, (n, brute_n) in {"planar": (3000, 200), "sphere": (3000, 200),
                               "dense": (400, 200)}.items():
        row = bench.CASES[name](n, brute_n, 1)
        assert row["fastmst_s"] >= 0 and "ratio" in row["brute"]
        assert float(re.search(r"\|dW\|/W=([0-9.e+-]+)", row["brute"]).group(1)) < 1e-12
    row = bench.case_steiner(40, 12, 1, k=20)
    assert float(re.search(r"W ours/nx=([0-9.]+)", row["brute"]).group(1)) < 1.5


def test_point_tree_written_as_geojson(tmp_path):
    """A great-circle point tree goes to GeoJSON (RFC 7946) through fastmst.io.write_forest:
    one LineString per tree edge, endpoints equal to the input [longitude, latitude]."""
    import json

    from fastmst import io

    rng = np.random.default_rng(11)
    lonlat = np.column_stack([rng.uniform(-10, 10, 50), rng.uniform(40, 55, 50)])
    tree = fastmst.point_spanning_tree(lonlat, metric="great-circle")
    path = tmp_path / "tree.geojson"
    io.write_forest(path, tree, coords=lonlat)
    doc = json.loads(path.read_text())
    assert doc["type"] == "FeatureCollection" and len(doc["features"]) == 49
    for feat, t, h in zip(doc["features"], tree.tail.tolist(), tree.head.tolist()):
        a, b = feat["geometry"]["coordinates"]
        np.testing.assert_allclose(a, lonlat[t], atol=1e-7)
        np.testing.assert_allclose(b, lonlat[h], atol=1e-7)
    with pytest.raises(ValueError, match=r"coords must have shape \(50, 2\)"):
        io.write_forest(tmp_path / "bad.geojson", tree, coords=lonlat[:10])
    assert not (tmp_path / "bad.geojson").exists()
