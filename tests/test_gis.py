"""GIS layers in and out: line layers of links (end points snapped into nodes), point layers of
sites, GeoPackage output (forest, sites, clusters) and GeoJSON output.

Real layers shipped inside registry packages (tests/real_data.py; a missing package skips,
CI fails through test_real_data.py::test_realdata_packages_installed_in_ci):
momepy/datasets/bubenec.gpkg (layer "streets", EPSG:3857) and
libpysal/examples/geodanet/streets.shp (Arizona State Plane, US survey feet).

References, none of them fastmst code: the same network built independently here with
geopandas/shapely (end points of each line, lengths from ``GeoSeries.length``) and solved with
scipy.sparse.csgraph.minimum_spanning_tree (``real_data.scipy_forest``, tie rule by ranks);
scipy.cluster.hierarchy single linkage (``fcluster`` with the distance criterion) for snapping;
brute-force NumPy nearest sites; pyproj.Geod (WGS 84 ellipsoid) for lengths on lon/lat layers;
pyproj.Transformer for GeoJSON coordinates; pyogrio for reading back what fastmst wrote.
"""
import json
import warnings

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

import fastmst
from fastmst import io
from fastmst.io.checks import FileFormatError
from fastmst.io.snapping import snap_points, snap_to_sites
import real_data as rd

pyogrio = pytest.importorskip("pyogrio")
shapely = pytest.importorskip("shapely")
pyproj = pytest.importorskip("pyproj")


def bubenec():
    return str(rd.package_file("momepy", "datasets", "bubenec.gpkg"))


def geodanet():
    return str(rd.package_file("libpysal", "examples", "geodanet", "streets.shp"))


def reference_network(path, layer=None):
    """(tail, head, n, node xy, lengths) of a line layer built with geopandas alone: nodes are
    the distinct end-point coordinates (np.unique), lengths GeoSeries.length."""
    gpd = pytest.importorskip("geopandas")
    g = gpd.read_file(path, layer=layer).geometry
    start = shapely.get_coordinates(g.apply(lambda x: shapely.Point(x.coords[0])))
    end = shapely.get_coordinates(g.apply(lambda x: shapely.Point(x.coords[-1])))
    xy, inv = np.unique(np.concatenate([start, end]), axis=0, return_inverse=True)
    inv = inv.ravel()
    m = len(g)
    return inv[:m], inv[m:], len(xy), xy, g.length.to_numpy(np.float64)


def _quiet_write(table, path, **kw):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        warnings.simplefilter("ignore", UserWarning)   # a layer written without a CRS on purpose
        pyogrio.write_arrow(table, str(path), driver="GPKG", geometry_name="geometry", **kw)


def _layer(path, wkb, layer="links", geometry_type="LineString", crs="EPSG:25833", **cols):
    import pyarrow as pa
    data = {k: pa.array(v) for k, v in cols.items()}
    data["geometry"] = pa.array(list(wkb), type=pa.binary())
    _quiet_write(pa.table(data), path, layer=layer, geometry_type=geometry_type, crs=crs)
    return path


# --- real layers against the same network read as an edge list --------------------------------

@pytest.mark.parametrize("which", ["bubenec", "geodanet"])
def test_real_line_layers_match_scipy_on_the_same_network(which):
    """Source: momepy/datasets/bubenec.gpkg layer 'streets' and libpysal geodanet streets.shp.
    Reference: the network built with geopandas (end points, GeoSeries.length), solved by
    scipy.sparse.csgraph (tie rule by ranks): same nodes, same lengths, same forest edges and
    the same number of components (scipy connected_components)."""
    from scipy import sparse
    from scipy.sparse.csgraph import connected_components
    path, layer = (bubenec(), "streets") if which == "bubenec" else (geodanet(), None)
    el = io.read_line_layer(path)
    t, h, n, xy, length = reference_network(path, layer)
    assert el.n_nodes == n and el.n_edges == len(t)
    np.testing.assert_allclose(el.weight, length, rtol=1e-12)
    # the nodes are the same points (fastmst numbers them by first appearance)
    np.testing.assert_array_equal(el.coords[el.tail], xy[t])
    np.testing.assert_array_equal(el.coords[el.head], xy[h])
    f = el.solve()
    ref, total = rd.scipy_forest(t, h, length, n)
    assert sorted(f.edges.tolist()) == sorted(ref.tolist())
    assert f.weight == pytest.approx(total, rel=1e-12)
    k, _ = connected_components(sparse.coo_array((np.ones(len(t)), (t, h)), shape=(n, n)),
                                directed=False)
    assert f.n_components == k
    assert el.crs is not None and not el.crs.geographic


def test_geodanet_matches_the_real_data_loader_and_keeps_attributes():
    """libpysal geodanet streets.shp: the same network as tests/real_data.geodanet_streets
    (geopandas, text node labels); the layer's attributes ID and Length travel to the output,
    and its Length attribute chosen as the weight gives the same forest as SciPy on it."""
    net = rd.geodanet_streets()
    tail, head, n, _ = net.compact
    el = io.read_line_layer(geodanet(), weight="Length")
    assert el.n_nodes == n
    assert el.attributes.column_names == ["fid", "ID"] and el.columns[2] == "Length"
    length = el.weight
    ref, _ = rd.scipy_forest(tail, head, length, n)
    assert sorted(el.solve().edges.tolist()) == sorted(ref.tolist())
    assert el.crs.unit == "US survey foot"
    assert "in US survey feet" in el.crs.describe()


# --- snapping ------------------------------------------------------------------------------------

@given(st.integers(1, 60), st.floats(0.0, 3.0), st.integers(0, 10_000))
def test_snap_points_is_single_linkage(n, tol, seed):
    """Reference: scipy.cluster.hierarchy single linkage cut at the tolerance (fcluster,
    criterion "distance": points joined by chains of steps <= tol), on points with exact
    duplicates; same partition, nodes at their first point, numbered by first appearance."""
    from scipy.cluster.hierarchy import fcluster, linkage
    rng = np.random.default_rng(seed)
    p = np.round(rng.uniform(0, 10, (n, 2)), 1)
    p = np.concatenate([p, p[rng.integers(0, n, n // 3)]])
    s = snap_points(p, tol)
    ref = fcluster(linkage(p, "single"), tol, "distance") if len(p) > 1 else np.array([1])
    assert len(set(zip(s.node.tolist(), ref.tolist()))) == len(set(ref.tolist())) == \
        len(s.coords)
    first = [int(np.flatnonzero(s.node == k)[0]) for k in range(len(s.coords))]
    assert first == sorted(first)
    np.testing.assert_array_equal(s.coords, p[first])
    assert s.max_shift == pytest.approx(np.sqrt(((p - s.coords[s.node]) ** 2).sum(1)).max())


@given(st.integers(1, 40), st.integers(1, 30), st.integers(0, 10_000))
def test_snap_to_sites_is_the_nearest_site(n, m, seed):
    """Reference: brute-force NumPy distances to every site (argmin; first on exact ties)."""
    rng = np.random.default_rng(seed)
    sites = np.round(rng.uniform(0, 10, (m, 2)), 0)
    pts = np.round(rng.uniform(0, 10, (n, 2)), 0)
    d = np.sqrt(((pts[:, None, :] - sites[None, :, :]) ** 2).sum(-1))
    best = d.min(1)
    tol = float(best.max())
    idx, shift = snap_to_sites(pts, sites, tol)
    np.testing.assert_allclose(d[np.arange(n), idx], best)
    assert shift == pytest.approx(tol)
    # first of exactly tied sites, where only two tie
    two = (d == best[:, None]).sum(1) == 2
    np.testing.assert_array_equal(idx[two], np.argmin(d, 1)[two])
    if tol > 0:
        with pytest.raises(ValueError, match="has no site within snap_tolerance"):
            snap_to_sites(pts, sites, tol * 0.999)


def test_snapping_joins_broken_ends_of_a_real_layer(tmp_path):
    """bubenec streets with every end point moved by up to 0.4 m (a digitising error): without
    snapping the network falls apart, with snap_tolerance=1 (metres of EPSG:3857) it is the
    original network again (same forest as the unmoved layer)."""
    gpd = pytest.importorskip("geopandas")
    g = gpd.read_file(bubenec(), layer="streets")
    rng = np.random.default_rng(7)

    def jitter(line):
        c = np.asarray(line.coords)
        c[0] += rng.uniform(-0.28, 0.28, 2)
        c[-1] += rng.uniform(-0.28, 0.28, 2)
        return shapely.LineString(c)
    moved = g.geometry.apply(jitter)
    path = _layer(tmp_path / "moved.gpkg", shapely.to_wkb(moved.to_numpy()), crs="EPSG:3857",
                  name=[f"street {i}" for i in range(len(g))])
    broken = io.read_line_layer(path)
    assert broken.n_nodes == 2 * broken.n_edges          # no two ends meet any more
    fixed = io.read_line_layer(path, snap_tolerance=1.0)
    orig = io.read_line_layer(bubenec())
    assert fixed.n_nodes == orig.n_nodes and fixed.max_shift <= 1.0
    assert sorted(fixed.solve().edges.tolist()) == sorted(orig.solve().edges.tolist())
    assert fixed.attributes.column("name").to_pylist()[:2] == ["street 0", "street 1"]


def test_sites_layer_snaps_links_and_keeps_isolated_sites(tmp_path):
    """A point layer of sites near the street junctions of bubenec (within 0.5 m) plus one site
    far from every street: the links snap onto the sites, the forest equals the one of the
    streets alone, and the far site is an isolated site in the GeoPackage's sites layer."""
    streets = io.read_line_layer(bubenec())
    rng = np.random.default_rng(3)
    xy = streets.coords + rng.uniform(-0.3, 0.3, streets.coords.shape)
    xy = np.concatenate([xy, [[1_600_000.0, 6_460_000.0]]])
    ids = [f"S{i:03d}" for i in range(len(xy))]
    sites_path = _layer(tmp_path / "sites.gpkg", shapely.to_wkb(shapely.points(xy)),
                        layer="sites", geometry_type="Point", crs="EPSG:3857", id=ids)
    sites = io.read_point_layer(sites_path)
    assert sites.labels.tolist() == ids and not sites.geographic
    el = io.read_line_layer(bubenec(), nodes=sites, snap_tolerance=0.5)
    assert el.n_nodes == len(ids)
    f = el.solve()
    assert sorted(f.edges.tolist()) == sorted(streets.solve().edges.tolist())
    assert f.n_components == 2
    out = io.write_geopackage(tmp_path / "out.gpkg", f, el)
    _, s = pyogrio.read_arrow(str(out), layer="sites")
    assert s.column("node").to_pylist() == ids
    assert s.column("isolated").to_pylist() == [False] * (len(ids) - 1) + [True]
    with pytest.raises(ValueError, match=r"(start|end) point of feature fid \d+ at \(1603\d+\.\d+, "
                                         r"64\d+\.\d+\) has no site within "
                                         r"snap_tolerance=0.01.*--snap-tolerance"):
        io.read_line_layer(bubenec(), nodes=sites, snap_tolerance=0.01)


# --- GeoPackage output -----------------------------------------------------------------------

def test_geopackage_round_trip_keeps_crs_attributes_and_lines(tmp_path):
    """Write the forest, sites and clusters of geodanet streets, read them back with pyogrio:
    the CRS equals the input's (pyproj CRS equality), the forest layer's attributes equal the
    forest table (fastmst.io.forest_table, the columns CSV gets), its lines are the input lines,
    and the clusters layer agrees with forest.clusters."""
    el = io.read_line_layer(geodanet())
    f = el.solve()
    labels = np.asarray(f.clusters(k=6))
    out = io.write_geopackage(tmp_path / "plan.gpkg", f, el, clusters=labels)
    layers = dict(pyogrio.list_layers(str(out)))
    assert layers == {"forest": "LineString", "sites": "Point", "clusters": "MultiPoint"}
    in_crs = pyproj.CRS.from_user_input(pyogrio.read_info(geodanet())["crs"])
    for name in layers:
        assert pyproj.CRS.from_user_input(pyogrio.read_info(str(out), layer=name)["crs"]) == \
            in_crs
    meta, back = pyogrio.read_arrow(str(out), layer="forest", return_fids=True)
    want = io.forest_table(f, el)
    # GeoPackage keeps the input's feature ids (fid), so rows come back in fid order
    order = np.argsort(back.column("position").to_numpy())
    got = back.drop_columns([meta["geometry_name"]]).take(order)
    want = want.take(np.argsort(want.column("position").to_numpy()))
    assert sorted(got.column_names) == sorted(want.column_names)
    for c in want.column_names:
        assert got.column(c).to_pylist() == want.column(c).to_pylist(), c
    lines_in = shapely.from_wkb(el.lines[np.sort(f.edges)])
    lines_out = shapely.from_wkb(back.column(meta["geometry_name"]).to_numpy(
        zero_copy_only=False)[order])
    assert shapely.equals_exact(lines_in, lines_out, tolerance=0).all()
    _, cl = pyogrio.read_arrow(str(out), layer="clusters")
    sizes = np.bincount(labels)
    assert cl.column("sites").to_pylist() == sizes.tolist()
    assert sum(cl.column("forest_edges").to_pylist()) == len(f) - (labels.max())
    # the forest layer read as a line layer is its own minimum spanning forest
    again = io.read_line_layer(out, layer="forest")
    assert again.n_edges == len(f)
    assert again.solve().weight == pytest.approx(f.weight, rel=1e-12)


def test_write_forest_by_suffix_and_columns(tmp_path):
    """write_forest(".gpkg") goes through the registry (forest and sites layers); columns=
    chooses the carried columns as for every format."""
    el = io.read_line_layer(geodanet())
    f = el.solve()
    out = io.write_forest(tmp_path / "f.gpkg", f, el, columns=["ID"])
    assert sorted(dict(pyogrio.list_layers(str(out)))) == ["forest", "sites"]
    names = pyogrio.read_info(str(out), layer="forest")["fields"].tolist()
    # the layer has an attribute "Length": the geometry's length is named apart from it
    assert names == ["tail", "head", "geometry_length", "position", "ID"]
    csv = io.write_forest(tmp_path / "f.csv", f, el, columns=["ID"])
    assert io.load_table(csv)[0].column_names == names


def test_geographic_layer_lengths_in_metres(tmp_path):
    """bubenec streets reprojected to EPSG:4326 (geopandas to_crs): the CRS is seen as
    geographic, lengths from the geometry are great-circle metres within 0.5 % of the WGS 84
    ellipsoidal lengths of pyproj.Geod (sphere against ellipsoid), the forest is the same as in
    the projected layer, and the tolerance is described in degrees."""
    gpd = pytest.importorskip("geopandas")
    g = gpd.read_file(bubenec(), layer="streets").to_crs("EPSG:4326")
    path = _layer(tmp_path / "ll.gpkg", shapely.to_wkb(g.geometry.to_numpy()), crs="EPSG:4326")
    el = io.read_line_layer(path)
    assert el.geographic and el.crs.geographic and "degrees" in el.crs.describe()
    geod = pyproj.Geod(ellps="WGS84")
    ref = np.array([geod.geometry_length(x) for x in g.geometry])
    np.testing.assert_allclose(el.weight, ref, rtol=5e-3)
    projected = io.read_line_layer(bubenec())
    assert el.n_nodes == projected.n_nodes
    assert sorted(el.solve().edges.tolist()) == sorted(projected.solve().edges.tolist())


# --- GeoJSON -----------------------------------------------------------------------------------

def test_geojson_from_a_projected_layer(tmp_path):
    """GeoJSON of a layer in EPSG:3857: coordinates are the input lines transformed to WGS 84
    (reference: pyproj.Transformer), feature ids are positions, sites are Points with ids
    site/<label>, and clusters number sites and the links inside a cluster."""
    el = io.read_line_layer(bubenec())
    f = el.solve()
    labels = np.asarray(f.clusters(k=3))
    out = io.write_geojson(tmp_path / "f.geojson", f, el, clusters=labels)
    doc = json.loads(out.read_text())
    links = [x for x in doc["features"] if x["geometry"]["type"] == "LineString"]
    sites = [x for x in doc["features"] if x["geometry"]["type"] == "Point"]
    assert [x["id"] for x in links] == f.edges.tolist()
    assert len(sites) == el.n_nodes and sites[0]["id"] == "site/0"
    tr = pyproj.Transformer.from_crs("EPSG:3857", "EPSG:4326", always_xy=True)
    c = shapely.get_coordinates(shapely.from_wkb(el.lines[f.edges[0]]))
    lon, lat = tr.transform(c[:, 0], c[:, 1])
    np.testing.assert_allclose(links[0]["geometry"]["coordinates"], np.column_stack([lon, lat]),
                               atol=1e-7)
    assert set(links[0]["properties"]) == {"tail", "head", "length", "position", "fid",
                                           "cluster"}
    cut = [x for x in links if x["properties"]["cluster"] is None]
    assert len(cut) == 2
    assert [x["properties"]["cluster"] for x in sites] == labels.tolist()


# --- clear errors --------------------------------------------------------------------------------

def _lines(n=2):
    return [shapely.LineString([(i, 0), (i + 1, 0)]) for i in range(n)]


@pytest.mark.parametrize("case", ["missing", "polygon", "multipart", "empty", "null", "nocrs",
                                  "points", "tolerance", "tolerance_type", "two_line_layers"])
def test_clear_errors(tmp_path, case):
    """Each bad layer names what was received, what was expected and how to fix it."""
    p = tmp_path / "x.gpkg"
    if case == "missing":
        with pytest.raises(FileFormatError, match=r"has no layer 'roads'; its layers are "
                                                  r"'tessellation' \(Polygon\).*layer="):
            io.read_line_layer(bubenec(), layer="roads")
    elif case == "polygon":
        with pytest.raises(FileFormatError, match=r"layer 'plots' holds Polygon geometries; "
                                                  r"expected a line"):
            io.read_line_layer(bubenec(), layer="plots")
    elif case == "multipart":
        geoms = _lines(1) + [shapely.MultiLineString([[(5, 0), (6, 0)], [(7, 0), (8, 0)]])]
        _layer(p, shapely.to_wkb(geoms), geometry_type="MultiLineString")
        with pytest.raises(FileFormatError, match=r"fid 2 is a MultiLineString of 2 parts.*"
                                                  r"explode\(\)"):
            io.read_line_layer(p)
    elif case == "empty":
        _layer(p, shapely.to_wkb(_lines(1) + [shapely.LineString()]))
        with pytest.raises(FileFormatError, match=r"fid 2 has an empty geometry.*Delete"):
            io.read_line_layer(p)
    elif case == "null":
        _layer(p, [shapely.to_wkb(_lines(1)[0]), None])
        with pytest.raises(FileFormatError, match=r"fid 2 has no geometry"):
            io.read_line_layer(p)
    elif case == "nocrs":
        _layer(p, shapely.to_wkb(_lines()), crs=None)
        with pytest.raises(FileFormatError, match=r"no coordinate reference system.*set_crs.*"
                                                  r"crs='EPSG"):
            io.read_line_layer(p)
        assert io.read_line_layer(p, crs="EPSG:25833").crs.unit == "metre"
    elif case == "points":
        _layer(p, shapely.to_wkb(shapely.points([[0, 0], [1, 1]])), geometry_type="Unknown")
        with pytest.raises(FileFormatError, match=r"fid 1 is a Point; expected LineString or "
                                                  r"MultiLineString"):
            io.read_line_layer(p)
    elif case == "tolerance":
        with pytest.raises(ValueError, match=r"snap_tolerance must be a finite distance >= 0.*"
                                             r"received -1.0"):
            io.read_line_layer(bubenec(), snap_tolerance=-1)
    elif case == "tolerance_type":
        with pytest.raises(TypeError, match=r"snap_tolerance must be a number.*str '1'"):
            io.read_line_layer(bubenec(), snap_tolerance="1")
    elif case == "two_line_layers":
        _layer(p, shapely.to_wkb(_lines()), layer="a")
        _layer(p, shapely.to_wkb(_lines()), layer="b")
        with pytest.raises(FileFormatError, match=r"has 2 line \(LineString\) layers \('a', "
                                                  r"'b'\); name one with layer="):
            io.read_line_layer(p)


# --- command line --------------------------------------------------------------------------------

def test_cli_reads_a_layer_and_writes_geopackage_layers(tmp_path, capsys):
    """fastmst solve on bubenec streets with --layer/--snap-tolerance writes a GeoPackage whose
    forest equals the API's (the same edge positions) and says what the CRS units mean;
    fastmst clusters writes forest, sites and clusters layers, or GeoJSON sites with their
    cluster; options for layers on a CSV input, and layer outputs of a command that writes
    tables, are usage errors (exit 2)."""
    from fastmst.cli import main
    out = tmp_path / "plan.gpkg"
    rc = main(["solve", bubenec(), "--layer", "streets", "--snap-tolerance", "0.5", "-o",
               str(out), "--quiet"])
    assert rc == 0
    _, back = pyogrio.read_arrow(str(out), layer="forest")
    api = io.read_line_layer(bubenec(), snap_tolerance=0.5).solve()
    assert sorted(back.column("position").to_pylist()) == sorted(api.edges.tolist())
    main(["solve", bubenec(), "--snap-tolerance", "0.5", "-o", str(tmp_path / "f.csv")])
    assert "projected CRS WGS 84 / Pseudo-Mercator" in capsys.readouterr().out
    rc = main(["clusters", bubenec(), "-k", "3", "-o", str(tmp_path / "c.gpkg"), "--quiet"])
    assert rc == 0
    assert dict(pyogrio.list_layers(str(tmp_path / "c.gpkg"))) == {
        "forest": "LineString", "sites": "Point", "clusters": "MultiPoint"}
    assert main(["clusters", bubenec(), "-k", "3", "-o", str(tmp_path / "c.geojson"),
                 "--quiet"]) == 0
    feats = json.loads((tmp_path / "c.geojson").read_text())["features"]
    sites = [x for x in feats if x["geometry"]["type"] == "Point"]
    assert len({x["properties"]["cluster"] for x in sites}) == 3
    assert main(["solve", str(tmp_path / "f.csv"), "--snap-tolerance", "1", "-o",
                 str(tmp_path / "g.csv")]) == 2
    assert "--layer/--snap-tolerance apply to a GeoPackage" in capsys.readouterr().err
    # commands that write tables only refuse layer outputs before any work
    assert main(["margins", bubenec(), "-o", str(tmp_path / "m.gpkg")]) == 2
    assert "writes tables" in capsys.readouterr().err


@settings(max_examples=10)
@given(st.integers(2, 40), st.floats(0.0, 0.6), st.integers(0, 10_000),
       st.sampled_from(["EPSG:25833", "EPSG:4326"]))
def test_line_layers_of_any_shape_match_a_reference(n, tol, seed, crs):
    """Lines between random grid points (some ends moved by up to 0.2, some lines with a bend)
    written with pyogrio and read back: the nodes are the single-linkage groups of the end
    points (scipy.cluster.hierarchy), the lengths those of shapely (projected) or sums of
    haversine legs within 0.5 % of pyproj.Geod (lon/lat), and the forest that of
    scipy.sparse.csgraph on the same edges."""
    import tempfile
    from pathlib import Path
    from scipy.cluster.hierarchy import fcluster, linkage
    rng = np.random.default_rng(seed)
    grid = rng.integers(0, 6, (n, 2, 2)).astype(float)
    grid[rng.random(n) < 0.3, 1] += rng.uniform(-0.2, 0.2, 2)
    bend = (grid[:, 0] + grid[:, 1]) / 2 + rng.uniform(-0.5, 0.5, (n, 2))
    scale = 0.01 if crs == "EPSG:4326" else 1.0          # lon/lat: a small box near 10E 50N
    off = np.array([10.0, 50.0]) if crs == "EPSG:4326" else np.zeros(2)
    lines = [shapely.LineString([a * scale + off, m * scale + off, b * scale + off])
             if rng.random() < 0.5 else shapely.LineString([a * scale + off, b * scale + off])
             for (a, b), m in zip(grid, bend)]
    with tempfile.TemporaryDirectory() as d:
        path = _layer(Path(d) / "l.gpkg", shapely.to_wkb(lines), crs=crs)
        el = io.read_line_layer(path, snap_tolerance=tol * scale)
    ends = np.stack([grid[:, 0], grid[:, 1]], 1).reshape(-1, 2)
    ref = fcluster(linkage(ends, "single"), tol, "distance")
    got = np.stack([el.tail, el.head], 1).reshape(-1)
    assert len(set(zip(got.tolist(), ref.tolist()))) == len(set(ref.tolist())) == el.n_nodes
    if crs == "EPSG:4326":
        geod = pyproj.Geod(ellps="WGS84")
        np.testing.assert_allclose(el.weight, [geod.geometry_length(x) for x in lines],
                                   rtol=5e-3)
    else:
        np.testing.assert_allclose(el.weight, shapely.length(lines), rtol=1e-12)
    positions, _ = rd.scipy_forest(el.tail, el.head, el.weight, el.n_nodes)
    assert sorted(el.solve().edges.tolist()) == sorted(positions.tolist())
