"""Inputs and outputs that reading and writing must refuse or survive: an output that would
replace its input, damaged or mislabelled files, writer arguments, forests written with other
edges, output columns that would replace one another; each refusal says what was received and
what to do.
"""
import os

import numpy as np
import pyarrow as pa
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import fastmst.io as fio

_EDGES = "tail,head,weight\na,b,1.5\nb,c,2.5\nc,a,3.5\n"
_NODES = "id,lon,lat\na,10.0,50.0\nb,10.1,50.1\nc,10.2,50.2\n"


def _alias(tmp_path, src, how):
    """``src`` named another way: the same string, a relative path, a symlink, a hard link."""
    if how == "same":
        return str(src)
    if how == "relative":
        return os.path.relpath(src)
    link = tmp_path / f"link-{how}{src.suffix}"
    if link.exists():
        link.unlink()
    (os.symlink if how == "symlink" else os.link)(src, link)
    return str(link)


def _write(path, text):
    path.write_text(text)
    return path


# --- an output named like the input never replaces it -------------------------------------

@settings(max_examples=30)
@given(fmt=st.sampled_from(fio.WRITE_FORMATS),
       how=st.sampled_from(["same", "relative", "symlink", "hardlink"]),
       layer=st.booleans())
def test_write_forest_refuses_to_replace_its_input(tmp_path_factory, fmt, how, layer):
    tmp = tmp_path_factory.mktemp("same")
    cwd = os.getcwd()
    os.chdir(tmp)
    try:
        if layer:   # edges from a GeoPackage line layer
            base = fio.read_edges(_write(tmp / "e.csv", _EDGES),
                                  nodes=_write(tmp / "n.csv", _NODES))
            src = tmp / "in.gpkg"
            fio.write_geopackage(src, base.solve(), base)
            edges = fio.read_line_layer(src, layer="forest")
        else:
            src = _write(tmp / "in.csv", _EDGES)
            edges = fio.read_edges(src, nodes=_write(tmp / "n.csv", _NODES))
        before = src.read_bytes()
        forest = edges.solve()
        target = _alias(tmp, src, how)
        writers = [lambda: fio.write_forest(target, forest, edges, format=fmt)]
        if fmt == "geojson":
            writers.append(lambda: fio.write_geojson(target, forest, edges))
        if fmt == "gpkg":
            writers.append(lambda: fio.write_geopackage(target, forest, edges))
        for write in writers:
            with pytest.raises(ValueError, match="would replace the input") as info:
                write()
            assert target in str(info.value) and "another output name" in str(info.value)
            assert src.read_bytes() == before   # reference: the input's own bytes
        # another name in the same folder is written
        out = tmp / f"out.{fmt}"
        fio.write_forest(out, forest, edges, format=fmt)
        assert out.stat().st_size > 0
    finally:
        os.chdir(cwd)




# --- damaged binary files are a FileFormatError, never a crash ----------------------------

def _npz_bytes(tmp, compressed):
    path = tmp / "ok.npz"
    (np.savez_compressed if compressed else np.savez)(
        path, tail=np.array(["a", "b", "c"] * 50), head=np.array(["b", "c", "a"] * 50),
        weight=np.arange(150, dtype=np.float64))
    return path.read_bytes()


@given(compressed=st.booleans(), cut=st.floats(0.0, 0.999),
       flip=st.one_of(st.none(), st.floats(0.0, 0.999)))
def test_damaged_npz_is_a_file_format_error(tmp_path_factory, compressed, cut, flip):
    tmp = tmp_path_factory.mktemp("npz")
    data = bytearray(_npz_bytes(tmp, compressed))
    if flip is None:
        data = data[:max(1, int(cut * len(data)))]   # truncated
    else:
        data[int(flip * len(data))] ^= 0xFF           # one damaged byte
    path = tmp / "bad.npz"
    path.write_bytes(bytes(data))
    try:
        back = fio.read_edges(path)
    except fio.FileFormatError as exc:
        assert str(path) in str(exc)
        return
    # a damaged byte the archive does not check (a name, padding): what was read is the edges
    assert flip is not None and back.n_edges == 150


def test_single_array_npz_is_a_file_format_error(tmp_path):
    path = tmp_path / "one.npz"
    with open(path, "wb") as fh:
        np.save(fh, np.arange(3))
    with pytest.raises(fio.FileFormatError, match="numpy.savez"):
        fio.read_edges(path)


# --- a file of another format under a text name is a FileFormatError ----------------------

def _other_format(tmp, kind):
    """Bytes of an edge table in format ``kind``, not CSV/TSV text."""
    table = pa.table({"tail": ["a", "b"], "head": ["b", "c"], "weight": [1.0, 2.0],
                      "lon": [1.0, 2.0], "lat": [3.0, 4.0]})
    if kind in ("parquet", "npz", "csv.gz", "tsv.zst", "csv.bz2"):
        return fio.write_table(tmp / f"t.{kind}", table).read_bytes()
    if kind == "gpkg":
        edges = fio.from_table(table.select(["tail", "head", "weight"]),
                               nodes=pa.table({"id": ["a", "b", "c"], "lon": [1.0, 2.0, 3.0],
                                               "lat": [3.0, 4.0, 5.0]}))
        return fio.write_geopackage(tmp / "t.gpkg", edges.solve(), edges).read_bytes()
    if kind == "npy":
        with open(tmp / "t.npy", "wb") as fh:
            np.save(fh, np.arange(6))
        return (tmp / "t.npy").read_bytes()
    text = "tail,head,weight,lon,lat\nété,b,1,1,3\nb,c,2,2,4\n"
    return text.encode("utf-16" if kind == "utf-16" else "latin-1")


@settings(max_examples=30)
@given(kind=st.sampled_from(["parquet", "npz", "csv.gz", "tsv.zst", "csv.bz2", "gpkg", "npy",
                             "utf-16", "latin-1"]),
       name=st.sampled_from(["e.csv", "e.tsv", "e.txt"]),
       reader=st.sampled_from(["edges", "nodes"]))
def test_other_formats_under_a_text_name(tmp_path_factory, kind, name, reader):
    tmp = tmp_path_factory.mktemp("named")
    path = tmp / name
    path.write_bytes(_other_format(tmp, kind))
    read = fio.read_edges if reader == "edges" else fio.read_nodes
    with pytest.raises(fio.FileFormatError) as info:
        read(path)
    msg = str(info.value)
    # (CSV text under a .tsv name is first told about its separator)
    assert str(path) in msg and ("UTF-8" in msg or "suffix" in msg or "separator" in msg)


# --- GeoJSON longitudes stay in [-180, 180] -------------------------------------------------

@given(lon=st.lists(st.floats(-900.0, 900.0), min_size=3, max_size=6),
       lat=st.floats(-80.0, 80.0))
def test_geojson_longitudes_in_range(tmp_path_factory, lon, lat):
    import json
    import math
    n = len(lon)
    labels = [f"s{i}" for i in range(n)]
    nodes = fio.read_nodes(pa.table({"id": labels, "lon": lon,
                                     "lat": [lat + 0.1 * i for i in range(n)]}))
    before = nodes.coords.copy()
    edges = fio.from_table(pa.table({"tail": labels[:-1], "head": labels[1:],
                                     "weight": np.arange(n - 1) + 1.0}), nodes=nodes)
    path = tmp_path_factory.mktemp("geo") / "f.geojson"
    fio.write_geojson(path, edges.solve(), edges, sites=True)
    doc = json.loads(path.read_text())
    site = {}
    for feat in doc["features"]:
        g = feat["geometry"]
        points = [g["coordinates"]] if g["type"] == "Point" else \
            g["coordinates"] if g["type"] == "LineString" else \
            [p for line in g["coordinates"] for p in line]
        if g["type"] == "Point":
            site[feat["properties"]["node"]] = g["coordinates"]
        for x, _ in points:
            assert -180.0 <= x <= 180.0   # RFC 7946, section 4
    for i, name in enumerate(labels):
        # reference: Python's math.remainder (IEEE remainder, exact) of the given longitude
        want = math.remainder(lon[i], 360.0)
        assert site[name][0] == pytest.approx(want, abs=1e-7) or \
            abs(abs(want) - 180.0) < 1e-7 and abs(site[name][0]) == pytest.approx(180.0)
    assert np.array_equal(nodes.coords, before)   # the input is not changed


# --- writer arguments: errors say what was received and what to do -----------------------

@given(fmt=st.sampled_from(["parquet", "npz", "geojson", "gpkg"]),
       suffix=st.sampled_from([".gz", ".zst", ".bz2", ".GZ"]))
def test_compressed_suffix_on_a_binary_output(tmp_path_factory, fmt, suffix):
    tmp = tmp_path_factory.mktemp("comp")
    edges = fio.read_edges(_write(tmp / "e.csv", _EDGES), nodes=_write(tmp / "n.csv", _NODES))
    path = tmp / f"out.{fmt}{suffix}"
    with pytest.raises(ValueError) as info:
        fio.write_forest(path, edges.solve(), edges)
    msg = str(info.value)
    assert str(path) in msg and "written compressed" in msg and f"{suffix!r} suffix" in msg
    assert "Decompress" not in msg
    assert not path.exists()


@given(compression=st.one_of(st.sampled_from(["lz4", "GZIP", "zip", ""]), st.integers(),
                             st.just(b"gzip")))
def test_write_table_compression_checked(tmp_path_factory, compression):
    tmp = tmp_path_factory.mktemp("comp")
    table = pa.table({"tail": ["a"], "head": ["b"], "weight": [1.0]})
    error = TypeError if not isinstance(compression, str) else ValueError
    with pytest.raises(error, match="compression must be one of bz2, gzip, zstd or None, "
                                    "received"):
        fio.write_table(tmp / "t.csv", table, compression=compression)
    assert not list(tmp.iterdir())


# --- write_geojson(properties=...) is checked, never cut short or merged -------------------

@given(length=st.integers(0, 5), name=st.sampled_from(["extra", "tail", "head", "weight",
                                                       "position", "cluster"]),
       scalar=st.booleans())
def test_geojson_properties_checked(tmp_path_factory, length, name, scalar):
    import json
    tmp = tmp_path_factory.mktemp("props")
    edges = fio.read_edges(_write(tmp / "e.csv", _EDGES), nodes=_write(tmp / "n.csv", _NODES))
    forest = edges.solve()
    n = len(forest.edges)                     # 2 forest edges
    values = 7 if scalar else list(range(10, 10 + length))
    path = tmp / "f.geojson"
    if name != "extra":
        with pytest.raises(ValueError, match=f"property '{name}' would replace"):
            fio.write_geojson(path, forest, edges, properties={name: values})
    elif scalar or length != n:
        with pytest.raises(ValueError, match=rf"one value per forest edge \({n},"):
            fio.write_geojson(path, forest, edges, properties={name: values})
    else:
        fio.write_geojson(path, forest, edges, properties={name: values})
        feats = json.loads(path.read_text())["features"]
        # reference: the values given, in the forest's order
        assert [f["properties"]["extra"] for f in feats] == values
        assert [f["properties"]["tail"] for f in feats] == \
            edges.label(forest.tail).tolist()
        return
    assert not path.exists()
    with pytest.raises(TypeError, match="dict of arrays"):
        fio.write_geojson(path, forest, edges, properties=[values])


# --- a forest is written only with the edges it was solved from ----------------------------

@given(n=st.integers(2, 8), data=st.data(), shuffle=st.booleans(),
       fmt=st.sampled_from(["csv", "parquet", "npz"]))
def test_forest_written_with_other_edges_is_refused(tmp_path_factory, n, data, shuffle, fmt):
    m = data.draw(st.integers(1, 12))
    ends = data.draw(st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)),
                              min_size=m, max_size=m))
    table = pa.table({"tail": [f"v{a}" for a, _ in ends], "head": [f"v{b}" for _, b in ends],
                      "weight": np.arange(m, dtype=float)})
    order = data.draw(st.permutations(range(m))) if shuffle else list(range(m))
    other = table.take(pa.array(order, pa.int64()))
    edges = fio.from_table(table)
    forest = edges.solve()
    other_edges = fio.from_table(other)
    path = tmp_path_factory.mktemp("other") / f"f.{fmt}"
    try:
        fio.write_forest(path, forest, other_edges)
    except ValueError as exc:
        assert "the forest" in str(exc) and "solved from" in str(exc)
        assert shuffle and not path.exists()
        return
    # whatever is written names rows of the table it was written with (reference: that
    # table's own rows)
    if len(forest.edges) == 0:   # self-loops only: a header and no rows
        assert path.exists()
        return
    back = fio.read_edges(path)
    pos = np.asarray(forest.edges)
    rows = other.take(pa.array(pos, pa.int64()))
    got = sorted(zip(back.label(back.tail).tolist(), back.label(back.head).tolist()))
    want = sorted(zip(rows.column("tail").to_pylist(), rows.column("head").to_pylist()))
    assert [tuple(sorted(p)) for p in got] == [tuple(sorted(p)) for p in want]


@given(n=st.integers(2, 12), fmt=st.sampled_from(["csv", "parquet", "geojson"]))
def test_point_tree_written_without_edges(tmp_path_factory, n, fmt):
    import fastmst
    rng = np.random.default_rng(n)
    lonlat = np.column_stack([rng.uniform(-10, 10, n), rng.uniform(-10, 10, n)])
    tree = fastmst.point_spanning_tree(lonlat)
    tmp = tmp_path_factory.mktemp("pts")
    fio.write_forest(tmp / f"t.{fmt}", tree, coords=lonlat)   # no edges: the forest itself
    other = fio.from_table(pa.table({"tail": [f"s{i}" for i in range(n)],
                                     "head": [f"s{(i + 1) % n}" for i in range(n)],
                                     "weight": np.ones(n)}))
    if n > 2 and fmt != "geojson":   # point-pair positions do not name rows of a ring
        with pytest.raises(ValueError, match="not solved from"):
            fio.write_forest(tmp / f"u.{fmt}", tree, other)


# --- output columns never replace one another -------------------------------------------

@given(header=st.permutations(["position", "tail", "head", "weight", "w", "x"]),
       fmt=st.sampled_from(["csv", "parquet", "npz"]))
def test_output_columns_keep_their_values(tmp_path_factory, header, fmt):
    # the first two columns are the end points, then 'weight' or else the third column
    values = {"position": ["p0", "p1", "p2"], "tail": ["t0", "t1", "t2"],
              "head": ["h0", "h1", "h2"], "weight": [3.5, 1.5, 2.5], "w": [9.5, 8.5, 7.5],
              "x": ["x0", "x1", "x2"]}
    tn, hn = header[0], header[1]
    if any(isinstance(values[c][0], float) for c in (tn, hn)):
        return   # decimal numbers are not node labels
    rest = [c for c in header if c not in (tn, hn)]
    wn = "weight" if "weight" in rest else rest[0]
    if isinstance(values[wn][0], str):
        return   # text is not a weight
    table = pa.table({c: values[c] for c in header})
    edges = fio.from_table(table)
    forest = edges.solve()
    out = fio.forest_table(forest, edges)
    assert len(set(out.column_names)) == len(out.column_names)
    pos = out.column("position").to_pylist()
    # reference: the input table's own rows at the written positions
    first = out.column_names[:3]
    for name, role in zip(first, (tn, hn, wn)):
        assert out.column(name).to_pylist() == [values[role][p] for p in pos]
    for c in out.column_names[4:]:
        assert out.column(c).to_pylist() == [values[c][p] for p in pos]
    path = fio.write_table(tmp_path_factory.mktemp("cols") / f"f.{fmt}", out)
    assert fio.read_edges(path, tail=first[0], head=first[1], weight=first[2]).n_edges == \
        len(pos)


# --- spreadsheet_safe reaches every text column --------------------------------------------

@given(kind=st.sampled_from(["string", "large_string", "dict", "dict_large", "pandas"]),
       risky=st.lists(st.sampled_from(["=1+2", "+cmd", "-x", "@sum", "\tz", "ok", "7"]),
                      min_size=2, max_size=2),
       fmt=st.sampled_from(["csv", "tsv", "csv.gz"]))
def test_spreadsheet_safe_every_text_column(tmp_path_factory, kind, risky, fmt):
    import pandas as pd
    if kind == "pandas":
        edges = fio.from_table(pd.DataFrame({"tail": ["a", "b"], "head": ["b", "c"],
                                             "weight": [1.5, 2.5],
                                             "note": pd.Categorical(risky)}))
    else:
        typ = pa.large_string() if "large" in kind else pa.string()
        note = pa.array(risky, typ)
        if kind.startswith("dict"):
            note = note.dictionary_encode()
        edges = fio.from_table(pa.table({"tail": ["a", "b"], "head": ["b", "c"],
                                         "weight": [1.5, 2.5], "note": note}))
    forest = edges.solve()
    path = fio.write_forest(tmp_path_factory.mktemp("safe") / f"f.{fmt}", forest, edges,
                            spreadsheet_safe=True)
    back = fio.read_edges(path)
    got = back.attributes.column("note").to_pylist()
    # reference: the common apostrophe prefix (common practice, no source) on risky cells
    want = ["'" + v if v[0] in "=+-@\t" else v
            for v in (risky[p] for p in np.asarray(forest.edges))]
    assert [str(g) for g in got] == want


@pytest.mark.parametrize("column", ["x", "y"])
def test_node_table_missing_coordinate_says_nodes(tmp_path, column):
    """A node table row without a coordinate is refused in terms of nodes, not edges."""
    path = tmp_path / "nodes.csv"
    row = "b,,1" if column == "x" else "b,1,"
    path.write_text(f"id,x,y\na,0,0\n{row}\nc,2,2\n")
    with pytest.raises(fio.FileFormatError, match=rf"line 3\): column '{column}' is empty or "
                                              r"missing.*every node needs coordinates"):
        fio.read_nodes(path)


def test_geopackage_without_crs_writes_without_warning(tmp_path):
    """Planar coordinates of unknown CRS are written without one, as documented; pyogrio's
    warning about the missing CRS is not passed on (it printed twice under the CLI's -q)."""
    import warnings
    pytest.importorskip("pyogrio")
    nodes = tmp_path / "nodes.csv"
    nodes.write_text("id,x,y\na,0,0\nb,3,4\nc,6,0\n")
    edges = tmp_path / "edges.csv"
    edges.write_text("tail,head,weight\na,b,5\nb,c,5\na,c,6\n")
    el = fio.read_edges(edges, nodes=fio.read_nodes(nodes))
    with warnings.catch_warnings(record=True) as seen:
        warnings.simplefilter("always")
        out = fio.write_geopackage(tmp_path / "f.gpkg", el.solve(), el)
    assert not [w for w in seen if "crs" in str(w.message).lower()]
    import pyogrio
    assert pyogrio.read_info(out, layer="forest")["crs"] is None


def test_table_with_header_and_no_rows_says_rows(tmp_path):
    """A table that is not an edge list (a node or demand table) is not told it has no edges."""
    path = tmp_path / "demand.csv"
    path.write_text("site,demand\n")
    with pytest.raises(fio.FileFormatError, match="but no data rows; expected one line per "
                                                  "data row"):
        fio.load_table(path)
    edges = tmp_path / "e.csv"
    edges.write_text("tail,head,weight\n")
    with pytest.raises(fio.FileFormatError, match="but no edges; expected one line per edge"):
        fio.read_edges(edges)


def test_missing_column_message_names_the_cli_option_as_spelled(tmp_path):
    path = tmp_path / "e.csv"
    path.write_text("tail,head,weight\na,b,1\n")
    with pytest.raises(fio.FileFormatError, match=r"\(CLI: --keep-columns COLUMN\)"):
        fio.read_edges(path, keep_columns=["nope"])


# --- labels that are not UTF-8 -----------------------------------------------------------------

# Byte sequences Python's UTF-8 decoder refuses (the reference here): a lone continuation
# byte, a cut two-byte sequence, an encoded surrogate, an overlong form, a code point beyond
# U+10FFFF, a Latin-1 word.
_NOT_UTF8 = [b"\x80", b"\xc3", b"\xed\xa0\x80", b"\xc0\xaf", b"\xf5\x80\x80\x80", b"caf\xe9"]


@settings(max_examples=60, deadline=None)
@given(labels=st.lists(st.text(st.characters(blacklist_characters='\r\n",\x00',
                                             blacklist_categories=("Cs",)),
                               min_size=1, max_size=6), min_size=2, max_size=40),
       bad=st.lists(st.tuples(st.integers(0, 39), st.sampled_from(["tail", "head"]),
                              st.sampled_from(_NOT_UTF8)), max_size=3),
       compressed=st.booleans())
def test_labels_not_utf8_are_refused_naming_the_first_row(tmp_path_factory, labels, bad,
                                                           compressed):
    """Label columns are parsed as bytes and checked once mapped: every label that Python's
    decoder refuses is found, the message names the first row that holds one and its column;
    valid UTF-8 labels read as the text they are."""
    rows = [[lab.encode(), labels[(i + 1) % len(labels)].encode()]
            for i, lab in enumerate(labels)]
    for r, col, junk in bad:
        rows[r % len(rows)][col == "head"] = junk
    body = b"tail,head,weight\n" + b"".join(b'"%s","%s",%d\n' % (t, h, i)
                                             for i, (t, h) in enumerate(rows))
    path = tmp_path_factory.mktemp("utf8") / ("e.csv.gz" if compressed else "e.csv")
    if compressed:
        import gzip
        body = gzip.compress(body)
    path.write_bytes(body)

    def decodes(b):
        try:
            b.decode("utf-8")
            return True
        except UnicodeDecodeError:
            return False
    broken = [(i, c) for i, row in enumerate(rows) for c, cell in zip(("tail", "head"), row)
              if not decodes(cell)]
    if not broken:
        el = fio.read_edges(path)
        assert el.label(el.tail).tolist() == [t.decode() for t, _ in rows]
        assert el.label(el.head).tolist() == [h.decode() for _, h in rows]
        return
    with pytest.raises(fio.FileFormatError) as info:
        fio.read_edges(path)
    row, col = broken[0]
    msg = str(info.value)
    assert f"data row {row + 1} (line {row + 2})" in msg and f"column {col!r}" in msg
    assert "not UTF-8" in msg and "iconv" in msg
