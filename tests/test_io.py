"""Files, tables and adapters: round trips, geometry weights, malformed input, writing and
messages (text labels read as written: test_io_text_labels.py).

References are named beside each check.  The small graphs here are test fixtures, not demo data.
"""
from __future__ import annotations

import json
import math
import os

import networkx as nx
import numpy as np
import pyarrow as pa
import pytest
import scipy.io
from scipy import sparse

from hypothesis import given, settings
from hypothesis import strategies as st

from fastmst import io
from fastmst.geometry.geodesy import EARTH_RADIUS_M, haversine_m
from fastmst.io import FileFormatError, registry
from io_reference import nx_mst_weight, write_csv

# A labelled test graph: two components, a zero weight, a negative weight, parallel edges.
LINKS = [("alpha", "bravo", 4.0), ("bravo", "charlie", 0.0), ("charlie", "alpha", 2.5),
         ("alpha", "bravo", 1.0), ("delta", "echo", -3.0), ("echo", "foxtrot", 7.0),
         ("foxtrot", "delta", 7.0), ("charlie", "golf", 5.5)]


def _triples(el: io.EdgeList):
    t, h = el.label(el.tail).tolist(), el.label(el.head).tolist()
    return list(zip(t, h, el.weight.tolist()))


# --- reading and round trips ----------------------------------------------------------------------

@pytest.mark.parametrize("name", ["g.csv", "g.tsv", "g.csv.gz", "g.csv.zst", "g.parquet", "g.npz"])
def test_edge_table_round_trip(tmp_path, name):
    """Writing a labelled edge table and reading it back gives the same labelled edges, and the
    forest weight matches networkx's minimum spanning forest (reference library)."""
    table = pa.table({"from": [a for a, _, _ in LINKS], "to": [b for _, b, _ in LINKS],
                      "cost": [w for _, _, w in LINKS]})
    path = io.write_table(tmp_path / name, table)
    el = io.read_edges(path)
    assert el.columns == ("from", "to", "cost")
    assert _triples(el) == LINKS
    assert el.n_nodes == 7
    assert el.labels.tolist() == sorted({x for a, b, _ in LINKS for x in (a, b)})
    f = el.solve()
    # networkx.minimum_spanning_edges (Kruskal) as the reference
    assert f.weight == pytest.approx(nx_mst_weight(LINKS))
    assert f.n_components == 2


@pytest.mark.parametrize("compression", ["none", "snappy", "zstd"])
@pytest.mark.parametrize("dictionary", [True, False])
def test_parquet_edges_outlive_the_file(tmp_path, compression, dictionary):
    """Nothing read_edges returns points into the file: the file truncated and rewritten
    afterwards leaves the edges, labels and carried columns as they were (reference:
    pyarrow.parquet's own read of the file, taken before)."""
    import pyarrow.parquet as pq
    rng = np.random.default_rng(7)
    names = np.array([f"site-{i}" for i in range(300)])
    table = pa.table({"from": names[rng.integers(0, 300, 4000)],
                      "to": names[rng.integers(0, 300, 4000)],
                      "cost": rng.random(4000), "hops": rng.integers(0, 9, 4000),
                      "note": names[rng.integers(0, 300, 4000)]})
    path = tmp_path / "g.parquet"
    pq.write_table(table, path, compression=compression, use_dictionary=dictionary)
    want = pq.read_table(path)
    el = io.read_edges(path, keep_columns="all")
    with open(path, "r+b") as fh:
        fh.truncate(0)
        fh.write(b"\xff" * 4096)
    assert el.label(el.tail).tolist() == want.column("from").to_pylist()
    assert el.label(el.head).tolist() == want.column("to").to_pylist()
    assert el.weight.tolist() == want.column("cost").to_pylist()
    assert el.attributes.column("note").to_pylist() == want.column("note").to_pylist()
    assert el.attributes.column("hops").to_pylist() == want.column("hops").to_pylist()


@pytest.mark.parametrize("name", ["f.csv", "f.tsv", "f.csv.gz", "f.parquet", "f.npz"])
def test_forest_round_trip(tmp_path, name):
    """A written forest reads back with the user's labels, weights and input positions."""
    el = io.from_table(pa.table({"a": [x for x, _, _ in LINKS], "b": [y for _, y, _ in LINKS],
                                 "w": [w for _, _, w in LINKS]}))
    f = el.solve()
    out = io.write_forest(tmp_path / name, f, el)
    back = pa.table(io.load_table(out)[0]) if not name.endswith(".npz") else None
    again = io.read_edges(out)
    assert _triples(again) == [(el.label([a])[0], el.label([b])[0], w) for a, b, w in
                               zip(f.tail, f.head, f.weights.tolist())]
    if back is not None:
        assert back.column("position").to_pylist() == f.edges.tolist()
    else:
        with np.load(out) as z:
            assert z["position"].tolist() == f.edges.tolist()


def test_geojson_rfc7946(tmp_path):
    """GeoJSON output is an RFC 7946 FeatureCollection of [lon, lat] LineStrings with labels."""
    nodes = pa.table({"id": ["p", "q", "r"], "lon": [10.0, 10.5, 11.0], "lat": [50.0, 50.1, 50.0]})
    el = io.from_table(pa.table({"t": ["p", "q", "p"], "h": ["q", "r", "r"],
                                 "w": [1.0, 2.0, math.inf]}), nodes=nodes)
    f = el.solve()
    io.write_forest(tmp_path / "f.geojson", f, el)
    doc = json.loads((tmp_path / "f.geojson").read_text())
    assert doc["type"] == "FeatureCollection"
    feats = doc["features"]
    assert [x["geometry"]["type"] for x in feats] == ["LineString"] * 2
    assert feats[0]["geometry"]["coordinates"] == [[10.0, 50.0], [10.5, 50.1]]
    # properties are named as in CSV output: the input's column names (t, h, w), position
    assert {(x["properties"]["t"], x["properties"]["h"]) for x in feats} == \
        {("p", "q"), ("q", "r")}
    assert [x["id"] for x in feats] == [x["properties"]["position"] for x in feats]
    # A link across the antimeridian is cut at +-180 (RFC 7946, section 3.1.9).
    fiji = io.from_table(pa.table({"t": ["w"], "h": ["e"], "w": [1.0]}),
                         nodes=pa.table({"id": ["w", "e"], "lon": [179.0, -179.0],
                                         "lat": [-17.0, -18.0]}))
    io.write_forest(tmp_path / "fj.geojson", fiji.solve(), fiji)
    geom = json.loads((tmp_path / "fj.geojson").read_text())["features"][0]["geometry"]
    assert geom == {"type": "MultiLineString",
                    "coordinates": [[[179.0, -17.0], [180.0, -17.5]],
                                    [[-180.0, -17.5], [-179.0, -18.0]]]}
    planar = io.from_table(pa.table({"t": [0], "h": [1], "w": [1.0]}),
                           nodes=pa.table({"id": [0, 1], "x": [0.0, 1.0], "y": [0.0, 0.0]}))
    with pytest.raises(ValueError, match="RFC 7946.* needs longitude/latitude"):
        io.write_geojson(tmp_path / "p.geojson", planar.solve(), planar)
    assert not (tmp_path / "p.geojson").exists()


def test_integer_labels_noncontiguous_and_big(tmp_path):
    """Integer ids (ids="integer"): map-style int64 ids and 1-based ids are compacted in
    numeric order and mapped back."""
    big = [2**40 + 7, 3, 2**40 + 7, 912_345_678_901]
    p = write_csv(tmp_path / "ids.csv", ["u", "v", "weight"],
                   [(big[0], big[1], 1), (big[1], big[3], 2), (big[2], big[3], 3)])
    el = io.read_edges(p, ids="integer")
    assert el.labels.tolist() == sorted({big[0], big[1], big[3]})
    assert el.label(el.tail).tolist() == [big[0], big[1], big[2]]
    assert el.weight.dtype == np.int64
    one = write_csv(tmp_path / "one.csv", ["u", "v", "w"], [(1, 2, 1), (2, 3, 1), (5, 3, 2)])
    el = io.read_edges(one, ids="integer")
    assert el.labels.tolist() == [1, 2, 3, 5] and el.n_nodes == 4
    assert el.solve().n_components == 1  # no phantom nodes 0 or 4
    dense = write_csv(tmp_path / "d.csv", ["u", "v", "w"], [(0, 1, 1), (1, 2, 1)])
    assert io.read_edges(dense, ids="integer").labels is None
    mixed = io.from_table(pa.table({"u": pa.array([5, 9], pa.int32()),
                                    "v": pa.array([9, 2**40], pa.int64()), "w": [1, 2]}))
    assert mixed.labels.tolist() == [5, 9, 2**40]  # int32 and int64 columns stay integers


def test_default_and_chosen_columns(tmp_path):
    """Endpoints default to the first two columns, the weight to 'weight', else the third."""
    p = write_csv(tmp_path / "c.csv", ["src", "dst", "note", "weight"],
                   [("a", "b", "x", 5), ("b", "c", "y", 1)])
    el = io.read_edges(p)
    assert el.columns == ("src", "dst", "weight") and el.weight.tolist() == [5, 1]
    el = io.read_edges(p, tail="dst", head="src", weight="weight")
    assert el.label(el.tail).tolist() == ["b", "c"]


def test_weight_length_from_coordinates(tmp_path):
    """weight='length' gives Euclidean lengths for x/y and great-circle metres for lon/lat,
    checked against an independent computation with math (spherical law of cosines)."""
    e = write_csv(tmp_path / "e.csv", ["a", "b"], [(1, 2), (2, 3)])
    xy = write_csv(tmp_path / "xy.csv", ["id", "x", "y"], [(1, 0, 0), (2, 3, 4), (3, 3, 5)])
    el = io.read_edges(e, weight="length", nodes=xy)
    assert el.weight.tolist() == [5.0, 1.0]
    ll = write_csv(tmp_path / "ll.csv", ["id", "lon", "lat"],
                    [(1, -0.1276, 51.5072), (2, 2.3522, 48.8566), (3, 13.405, 52.52)])
    el = io.read_edges(e, weight="length", nodes=ll)
    assert el.geographic

    def law_of_cosines(lon1, lat1, lon2, lat2):
        p1, p2, dl = math.radians(lat1), math.radians(lat2), math.radians(lon2 - lon1)
        c = math.sin(p1) * math.sin(p2) + math.cos(p1) * math.cos(p2) * math.cos(dl)
        return EARTH_RADIUS_M * math.acos(max(-1.0, min(1.0, c)))
    expect = [law_of_cosines(-0.1276, 51.5072, 2.3522, 48.8566),
              law_of_cosines(2.3522, 48.8566, 13.405, 52.52)]
    assert el.weight == pytest.approx(expect, rel=1e-9)


def test_haversine_published_example():
    """Great-circle distance of the BNA-LAX worked example.

    Source: Rosetta Code, "Haversine formula" task (the example from the Wikipedia article
    "Great-circle distance"): Nashville BNA (36.12 N, 86.67 W) to Los Angeles LAX (33.94 N,
    118.40 W) on a sphere of radius 6372.8 km is 2887.2599506 km.  Values recalled from memory.
    """
    d = float(haversine_m(-86.67, 36.12, -118.40, 33.94, radius=6_372_800.0))
    assert d == pytest.approx(2_887_259.9506, abs=0.5)
    # With the IUGG mean radius the distance scales with the radius (same central angle).
    d_iugg = float(haversine_m(-86.67, 36.12, -118.40, 33.94))
    assert d_iugg == pytest.approx(d * EARTH_RADIUS_M / 6_372_800.0, rel=1e-12)
    # One degree of the equator is 2*pi*R/360 (independent computation with math).
    assert float(haversine_m(0, 0, 1, 0)) == pytest.approx(2 * math.pi * EARTH_RADIUS_M / 360,
                                                          rel=1e-12)


def test_node_table_keeps_isolated_nodes(tmp_path):
    """With a node table, compact ids follow its rows, so nodes without edges are isolated."""
    e = write_csv(tmp_path / "e.csv", ["a", "b", "w"], [("n2", "n1", 1.0)])
    n = write_csv(tmp_path / "n.csv", ["id", "x", "y"], [("n1", 0, 0), ("n2", 1, 0),
                                                          ("n3", 2, 2)])
    el = io.read_edges(e, nodes=n)
    assert el.labels.tolist() == ["n1", "n2", "n3"]
    assert el.tail.tolist() == [1] and el.head.tolist() == [0]
    assert el.solve().n_components == 2


def test_matrix_market_keeps_explicit_zeros(tmp_path):
    """.mtx entries are edges, explicit zeros kept; one triangle of a symmetric file is read.
    Reference: scipy.io.mmread of the same file stores the zero entry."""
    p = tmp_path / "s.mtx"
    p.write_text("%%MatrixMarket matrix coordinate real symmetric\n4 4 4\n2 1 0.0\n3 1 2.5\n"
                 "3 2 1.0\n4 4 9.0\n")
    ref = scipy.io.mmread(str(p))
    assert (ref.data == 0).sum() == 2  # stored zero, mirrored
    el = io.read_edges(p)
    assert el.n_edges == 4 and el.n_nodes == 4
    assert sorted(zip(el.label(el.tail).tolist(), el.label(el.head).tolist(),
                      el.weight.tolist())) == [(2, 1, 0.0), (3, 1, 2.5), (3, 2, 1.0), (4, 4, 9.0)]
    f = el.solve()
    assert f.weight == 1.0 and len(f) == 2  # the zero-weight edge is in the forest
    g = tmp_path / "g.mtx"
    scipy.io.mmwrite(str(g), sparse.coo_array(([0.0, 3.0], ([0, 1], [1, 2])), shape=(3, 3)))
    el = io.read_edges(g)
    assert el.weight.tolist() == [0.0, 3.0] and el.labels.tolist() == [1, 2, 3]


def test_dimacs_gr(tmp_path):
    """DIMACS .gr: 'p sp n m' header, 'a u v w' arcs with 1-based ids, comments skipped."""
    p = tmp_path / "r.gr"
    p.write_text("c invented test graph\nc\np sp 4 5\na 1 2 7\na 2 1 7\na 2 3 1\nc mid\n"
                 "a 3 4 2\na 4 1 3\n")
    el = io.read_edges(p)
    assert el.n_nodes == 4 and el.n_edges == 5
    assert el.tail.tolist() == [0, 1, 1, 2, 3] and el.weight.tolist() == [7, 7, 1, 2, 3]
    assert el.label([0, 3]).tolist() == [1, 4]
    triples = _triples(el)
    assert el.solve().weight == nx_mst_weight(triples)  # networkx reference


def test_dimacs_gr_top_comments_take_the_threaded_parse(tmp_path, monkeypatch):
    """Comments only at the top: one parse, without a Python row handler (so on Arrow's
    threads), with the comment lines skipped; a comment between arcs falls back to the parse
    with the handler."""
    from fastmst.io.formats import dimacs
    calls = []
    real = dimacs._read

    def spy(path, delimiter, handler, skip=0):
        calls.append((delimiter, handler is None, skip))
        return real(path, delimiter, handler, skip)
    monkeypatch.setattr(dimacs, "_read", spy)
    p = tmp_path / "top.gr"
    p.write_text("c one\nc two words\np sp 3 2\na 1 2 4\na 2 3 5\n")
    el = io.read_edges(p)
    assert calls == [(" ", True, 2)]
    assert el.tail.tolist() == [0, 1] and el.weight.tolist() == [4, 5]
    calls.clear()
    p.write_text("c one\np sp 3 2\na 1 2 4\nc in between\na 2 3 5\n")
    el = io.read_edges(p)
    assert calls == [(" ", True, 1), (" ", False, 0)]
    assert el.tail.tolist() == [0, 1] and el.weight.tolist() == [4, 5]


@settings(max_examples=40, deadline=None)
@given(st.integers(1, 30), st.integers(1, 60), st.integers(0, 2**31), st.booleans())
def test_dimacs_gr_layouts_read_alike(tmp_path_factory, n, m, seed, integer_weights):
    """The same arcs read the same whichever way the file is laid out: comments only at the
    top (parsed on Arrow's threads), a comment between arcs (parsed with a row handler on the
    calling thread), tabs and runs of blanks (split at whitespace); each equals the arcs
    written.  A bad arc after top comments is still worded by the line scan."""
    rng = np.random.default_rng(seed)
    u = rng.integers(1, n + 1, m)
    v = rng.integers(1, n + 1, m)
    w = rng.integers(0, 100, m) if integer_weights else np.round(rng.random(m) * 10, 3)
    arcs = [f"a {a} {b} {c}" for a, b, c in zip(u.tolist(), v.tolist(), w.tolist())]
    d = tmp_path_factory.mktemp("gr")
    layouts = {
        "top": ["c invented arcs", "c more words in this comment", f"p sp {n} {m}"] + arcs,
        "middle": [f"p sp {n} {m}"] + arcs[:m // 2] + ["c a comment of five words"]
        + arcs[m // 2:],
        "blanks": ["c x", f"p  sp\t{n} {m} "] + [a.replace(" ", "\t ", 1) for a in arcs],
    }
    for name, lines in layouts.items():
        path = d / f"{name}.gr"
        path.write_text("\n".join(lines) + "\n")
        el = io.read_edges(path)
        assert el.n_nodes == n and el.n_edges == m, name
        assert (el.tail == u - 1).all() and (el.head == v - 1).all(), name
        assert np.array_equal(el.weight, w), name
    bad = d / "bad.gr"
    bad.write_text("c top\n" + f"p sp {n} {m + 1}\n" + "\n".join(arcs) + "\na 1 1\n")
    with pytest.raises(FileFormatError, match=f"line {m + 3}: 'a 1 1' should be"):
        io.read_edges(bad)


_LABELS = st.one_of(
    st.lists(st.integers(-2**62, 2**62), min_size=1, max_size=8, unique=True),
    st.lists(st.integers(0, 30), min_size=1, max_size=8, unique=True),
    st.lists(st.text(min_size=1, max_size=4), min_size=1, max_size=8, unique=True))


@settings(deadline=None, derandomize=True, max_examples=40)
@given(labels=_LABELS, data=st.data())
def test_labels_map_and_back_property(labels, data):
    """Any labels (wide or dense integers, text) map to compact ids and back unchanged, and the
    forest weight equals networkx's on the labelled graph (reference library)."""
    m = data.draw(st.integers(1, 12))
    picks = data.draw(st.lists(st.tuples(st.sampled_from(labels), st.sampled_from(labels),
                                         st.integers(-5, 5)), min_size=m, max_size=m))
    table = pa.table({"a": [p[0] for p in picks], "b": [p[1] for p in picks],
                      "w": [float(p[2]) for p in picks]})
    el = io.from_table(table)
    assert el.label(el.tail).tolist() == [p[0] for p in picks]
    assert el.label(el.head).tolist() == [p[1] for p in picks]
    used = {x for p in picks for x in p[:2]}
    assert el.n_nodes == len(used)
    assert el.solve().weight == nx_mst_weight([(a, b, float(w)) for a, b, w in picks])


# --- adapters --------------------------------------------------------------------------------------

def test_from_scipy_symmetric_and_zeros():
    """Stored entries are edges (explicit zeros kept); symmetric reads one triangle.  Reference:
    networkx minimum spanning forest of the same edges."""
    m = sparse.csr_array((np.array([0.0, 0.0, 2.0, 2.0, 5.0, 5.0]),
                          (np.array([0, 1, 1, 2, 0, 2]), np.array([1, 0, 2, 1, 2, 0]))),
                         shape=(4, 4))
    before = m.data.copy()
    el = io.from_scipy(m)  # auto: the matrix equals its transpose
    assert el.n_edges == 3 and el.n_nodes == 4
    assert sorted(el.weight.tolist()) == [0.0, 2.0, 5.0]
    f = el.solve()
    assert f.weight == nx_mst_weight(_triples(el)) == 2.0
    assert f.n_components == 2
    assert io.from_scipy(m, symmetric=False).n_edges == 6
    np.testing.assert_array_equal(m.data, before)  # input not mutated
    asym = sparse.csr_array(([1.0], ([0], [1])), shape=(2, 2))
    with pytest.raises(ValueError, match="differs from its transpose"):
        io.from_scipy(asym, symmetric=True)
    assert io.from_scipy(asym).n_edges == 1
    with pytest.raises(TypeError, match="scipy.sparse"):
        io.from_scipy(np.eye(2))


def test_from_table_pandas_and_arrow():
    """pandas and pyarrow tables give the same EdgeList; the DataFrame is not modified."""
    import pandas as pd
    df = pd.DataFrame({"a": [x for x, _, _ in LINKS], "b": [y for _, y, _ in LINKS],
                       "weight": [w for _, _, w in LINKS]})
    copy = df.copy()
    e1 = io.from_table(df)
    e2 = io.from_table(pa.Table.from_pandas(df))
    assert _triples(e1) == _triples(e2) == LINKS
    pd.testing.assert_frame_equal(df, copy)
    cat = df.astype({"a": "category", "b": "category"})
    assert _triples(io.from_table(cat)) == LINKS  # pandas categoricals
    with pytest.raises(TypeError, match="DataFrame or a pyarrow Table"):
        io.from_table([1, 2, 3])


def test_networkx_round_trip():
    """from_networkx/to_networkx keep labels and isolated nodes; the forest weight equals
    networkx.minimum_spanning_tree's (reference library)."""
    g = nx.Graph()
    for u, v, w in LINKS:
        if not g.has_edge(u, v) or g[u][v]["weight"] > w:
            g.add_edge(u, v, weight=w)
    g.add_node("hotel")
    el = io.from_networkx(g)
    assert el.n_nodes == 8
    f = el.solve()
    t = io.to_networkx(f, el)
    ref = nx.minimum_spanning_tree(g)
    assert set(t.nodes) == set(g.nodes)
    assert t.size(weight="weight") == pytest.approx(ref.size(weight="weight"))
    g.add_edge("hotel", "india")
    with pytest.raises(ValueError, match="no 'weight' attribute"):
        io.from_networkx(g)
    assert io.from_networkx(g, default=1.0).n_edges == g.number_of_edges()
    with pytest.raises(ValueError, match="directed"):
        io.from_networkx(nx.DiGraph([(0, 1)]))


# --- malformed input --------------------------------------------------------------------------------

MALFORMED = {
    # name: (file name, content, expected message fragment)
    "missing column": ("m.csv", "a,b,cost\n1,2,3\n", None),
    "unparsable number": ("u.csv", "a,b,weight\n1,2,3\n2,3,4,5x\n".replace("4,5x", "4.5x"),
                          r"line 3\): weight '4.5x' in column 'weight' is not a number"),
    "nan weight": ("n.csv", "a,b,weight\n1,2,3\n2,3,nan\n", r"line 3\).*NaN"),
    "missing value": ("v.csv", "a,b,weight\n1,2,3\n2,,4\n", r"line 3\).*'b' is empty"),
    "empty text label": ("t.csv", "a,b,weight\nx,y,3\ny,\"\",4\n", r"line 3\).*'b' is empty"),
    "empty file": ("e.csv", "", "the file is empty"),
    "header only": ("h.csv", "a,b,weight\n", "no edges"),
    "field count": ("f.csv", "a,b,weight\n1,2,3\n2,3\n", "line 3 has 2 fields"),
    "gr header count": ("c.gr", "p sp 3 3\na 1 2 1\na 2 3 1\n", "says 3 arcs but the file has 2"),
    "gr arc before header": ("b.gr", "a 1 2 1\np sp 3 1\n", "line 1: an arc before"),
    "gr id out of range": ("o.gr", "p sp 2 1\na 1 3 1\n", r"line 2: node 3 is outside 1...2"),
    "gr bad weight": ("w.gr", "p sp 2 1\na 1 2 x\n", "line 2: weight 'x' is not a number"),
    "npz missing array": ("z.npz", None, "no weight column; the columns present are 'tail', "
                                         "'head'"),
    "not parquet": ("p.parquet", "hello", "not a readable Parquet file"),
    "not gzip": ("g.csv.gz", "a,b,weight\n1,2,3\n", "could not be read .* gzip-compressed"),
}


def _make(tmp_path, name):
    fname, content, _ = MALFORMED[name]
    p = tmp_path / fname
    if content is None:
        np.savez(p, tail=np.array([0]), head=np.array([1]))
    else:
        p.write_text(content)
    return p


@pytest.mark.parametrize("name", sorted(MALFORMED))
def test_malformed_files(tmp_path, name):
    """Each malformed file raises FileFormatError naming the file and, where there is one, the
    line or row and what to fix."""
    p = _make(tmp_path, name)
    frag = MALFORMED[name][2]
    with pytest.raises(FileFormatError) as info:
        io.read_edges(p, weight="weight" if name == "missing column" else None)
    msg = str(info.value)
    assert str(p) in msg
    if name == "missing column":
        assert "no column 'weight'" in msg and "'a', 'b', 'cost'" in msg
    else:
        assert __import__("re").search(frag, msg), msg


def test_bad_number_after_the_first_block(tmp_path):
    """A bad number far into a large file (beyond pyarrow's type-inference block) is still
    reported with its line."""
    p = tmp_path / "big.csv"
    n = 400_000
    body = "\n".join(f"{i},{i + 1},1.5" for i in range(n))
    p.write_text("a,b,weight\n" + body + "\n7,8,oops\n")
    with pytest.raises(FileFormatError, match=f"line {n + 2}\\): .*'oops' in column 'weight' is "
                                              f"not a number"):
        io.read_edges(p)


def test_ids_not_in_node_table(tmp_path):
    """An endpoint missing from the node table is named with its line and the node file."""
    e = write_csv(tmp_path / "e.csv", ["a", "b", "w"], [("x", "y", 1), ("y", "zz", 2)])
    n = write_csv(tmp_path / "n.csv", ["id", "x", "y"], [("x", 0, 0), ("y", 1, 1)])
    with pytest.raises(FileFormatError, match=r"line 3\): node 'zz' in column 'b' is not in "
                                              r"the node table"):
        io.read_edges(e, nodes=n)


def test_bad_node_tables(tmp_path):
    """Duplicate node ids, swapped lon/lat and missing coordinate columns are named."""
    dup = write_csv(tmp_path / "d.csv", ["id", "lon", "lat"], [("a", 0, 0), ("a", 1, 1)])
    with pytest.raises(FileFormatError, match="appears twice"):
        io.read_nodes(dup)
    swapped = write_csv(tmp_path / "s.csv", ["id", "lon", "lat"], [("a", 45, 120)])
    with pytest.raises(FileFormatError, match="outside \\[-90, 90\\]"):
        io.read_nodes(swapped)
    nocoord = write_csv(tmp_path / "c.csv", ["id", "p", "q"], [("a", 0, 0)])
    with pytest.raises(FileFormatError, match="cannot find coordinate columns"):
        io.read_nodes(nocoord)


def test_decimal_ids_and_unknown_suffix(tmp_path):
    """Decimal node ids in a typed column, and files of unknown format, get errors that say
    what to do; in a text file '1.5' is a text label like any other."""
    p = write_csv(tmp_path / "f.csv", ["a", "b", "w"], [(1.5, 2, 1)])
    assert io.read_edges(p).labels.tolist() == ["1.5", "2"]
    with pytest.raises(FileFormatError, match="not an integer"):
        io.read_edges(p, ids="integer")
    with pytest.raises(FileFormatError, match="decimal numbers"):
        io.from_table(pa.table({"a": [1.5], "b": [2.0], "w": [1.0]}))
    q = tmp_path / "x.dat"
    q.write_text("a,b,w\n1,2,3\n")
    with pytest.raises(ValueError, match="cannot tell the format"):
        io.read_edges(q)
    assert io.read_edges(q, format="csv").n_edges == 1
    with pytest.raises(FileNotFoundError, match="no such file"):
        io.read_edges(tmp_path / "nope.csv")


def test_atomic_write_keeps_old_file(tmp_path):
    """A failing writer leaves an existing output untouched and no temporary file behind."""
    out = tmp_path / "forest.csv"
    out.write_text("old content\n")

    def failing(tmp):
        with open(tmp, "w") as fh:
            fh.write("half a fil")
        raise RuntimeError("disk full (simulated)")
    with pytest.raises(RuntimeError):
        io.atomic_write(out, failing)
    assert out.read_text() == "old content\n"
    assert os.listdir(tmp_path) == ["forest.csv"]
    el = io.from_table(pa.table({"a": [0], "b": [1], "w": [1.0]}))
    io.write_forest(out, el.solve(), el)
    assert out.read_text().splitlines()[0] == '"a","b","w","position"'
    with pytest.raises(FileNotFoundError, match="does not exist"):
        io.write_forest(tmp_path / "nodir" / "f.csv", el.solve(), el)


def test_progress_callback_reports_bytes(tmp_path):
    """read_edges(progress=...) is called with bytes read up to the file size."""
    p = write_csv(tmp_path / "e.csv", ["a", "b", "w"], [(i, i + 1, i) for i in range(2000)])
    seen = []
    el = io.read_edges(p, progress=lambda done, total: seen.append((done, total)))
    assert el.n_edges == 2000
    assert (p.stat().st_size, p.stat().st_size) in seen


def test_registry_one_place_adds_a_format(tmp_path, monkeypatch):
    """A format registered in one place is read by read_edges, listed among the read formats
    and detected from its suffix; a second claim on a suffix or a name is refused."""
    monkeypatch.setattr(registry, "_REGISTRY", dict(registry._REGISTRY))

    def read_pairs(path, compression, request):
        rows = [line.split() for line in open(path)]
        t, h, labels = io.encode_labels(np.array([r[0] for r in rows]),
                                        np.array([r[1] for r in rows]), str(path))
        return io.EdgeList(t, h, np.array([float(r[2]) for r in rows]), len(labels), labels)
    registry.register(registry.Format("pairs", (".pairs",), 99, read_edges=read_pairs))
    (tmp_path / "e.pairs").write_text("a b 2\nb c 1\na c 5\n")
    el = io.read_edges(tmp_path / "e.pairs")
    assert el.labels.tolist() == ["a", "b", "c"] and el.solve().weight == 3.0
    assert registry.names("read")[-1] == "pairs" and "pairs" not in registry.names("write")
    with pytest.raises(ValueError, match="suffix '.pairs' of 'other' already belongs"):
        registry.register(registry.Format("other", (".pairs",), 100))
    with pytest.raises(ValueError, match="already registered"):
        registry.register(registry.Format("csv", (".x",), 100))


def test_format_lists_come_from_the_registry():
    """FORMATS/WRITE_FORMATS and the CLI's --format choices are the registry's lists."""
    from fastmst import cli
    assert io.FORMATS == registry.names("read") == ("csv", "tsv", "parquet", "npz", "mtx", "gr",
                                                    "gpkg")
    assert io.WRITE_FORMATS == registry.names("write") == ("csv", "tsv", "parquet", "npz",
                                                           "geojson", "gpkg")
    solve = cli.build_parser()._subparsers._group_actions[0].choices["solve"]
    fmt = next(a for a in solve._actions if a.dest == "format")
    assert tuple(fmt.choices) == io.FORMATS


def test_nan_messages_name_the_column_kind(tmp_path):
    """A NaN coordinate is reported as a coordinate, a NaN weight as a weight."""
    n = tmp_path / "n.csv"
    n.write_text("id,x,y\n0,1.0,NaN\n1,2.0,3.0\n")
    with pytest.raises(FileFormatError, match="coordinate in column 'y' is NaN .*every node"):
        io.read_nodes(n)
    e = tmp_path / "e.csv"
    e.write_text("a,b,w\n0,1,NaN\n")
    with pytest.raises(FileFormatError, match="weight in column 'w' is NaN .*every edge"):
        io.read_edges(e)


def test_wrong_types_raise_type_error(tmp_path):
    """Wrong types are TypeError: a progress that is not callable, geographic not a bool, a
    column not given by name, a table that is not a path or a table."""
    p = write_csv(tmp_path / "e.csv", ["a", "b", "w"], [(0, 1, 1.0)])
    with pytest.raises(TypeError, match="progress must be a function"):
        io.read_edges(p, progress=5)
    n = tmp_path / "n.csv"
    n.write_text("id,x,y\n0,1.0,2.0\n")
    with pytest.raises(TypeError, match="geographic"):
        io.read_nodes(n, geographic="yes")
    with pytest.raises(TypeError, match="given by name"):
        io.read_edges(p, weight=2)
    with pytest.raises(TypeError, match="expected a file path"):
        io.read_nodes(42)


def test_read_positions_by_position_and_by_labels(tmp_path):
    """Links named by position or by label pairs (either direction) give the same positions;
    a pair names its lightest parallel edge, or all of them with all_parallel=True."""
    el = io.from_table(pa.table({"a": [x for x, _, _ in LINKS], "b": [y for _, y, _ in LINKS],
                                 "w": [w for _, _, w in LINKS]}))
    pairs = tmp_path / "pairs.csv"
    pairs.write_text("u,v\nbravo,alpha\necho,delta\n")
    # alpha--bravo: positions 0 (weight 4) and 3 (weight 1); the lightest is 3
    assert io.read_positions(pairs, el).tolist() == [3, 4]
    assert sorted(io.read_positions(pairs, el, all_parallel=True).tolist()) == [0, 3, 4]
    by_pos = tmp_path / "pos.csv"
    by_pos.write_text("position\n3\n4\n")
    assert io.read_positions(by_pos, el).tolist() == [3, 4]
    bad = tmp_path / "bad.csv"
    bad.write_text("u,v\nalpha,zulu\n")
    with pytest.raises(FileFormatError, match="node 'zulu' is not a node"):
        io.read_positions(bad, el)
