"""Round trips of reading and writing: what was written reads back unchanged (value, sign and
type), in every format; numbers in text files are read exactly or refused, never rounded.

The reference of each round trip is the input itself; integer references are Python's exact
int, float ones Python's float parsing (correctly rounded).
"""

import numpy as np
import pyarrow as pa
import pytest
from hypothesis import Phase, given, settings
from hypothesis import strategies as st

import fastmst.io as fio

_EDGES = "tail,head,weight\na,b,1.5\nb,c,2.5\nc,a,3.5\n"
_NODES = "id,lon,lat\na,10.0,50.0\nb,10.1,50.1\nc,10.2,50.2\n"


def _write(path, text):
    path.write_text(text)
    return path


# --- floats written to text read back as the same floats ----------------------------------

_TEXT_FORMATS = ["csv", "tsv", "csv.gz", "tsv.zst"]


@given(names=st.lists(st.text(st.characters(blacklist_categories=("Cs",),
                                            blacklist_characters="\r\n"), min_size=1),
                      min_size=3, max_size=9, unique=True),
       fmt=st.sampled_from(_TEXT_FORMATS + ["parquet", "npz"]))
def test_labels_read_back_as_written(tmp_path_factory, names, fmt):
    # commas, quotes, tabs, spaces, leading zeros, formulas, numbers-as-text, any script
    n = len(names) - 1
    table = pa.table({"tail": names[:n], "head": names[1:], "weight": np.arange(n) + 0.5})
    path = tmp_path_factory.mktemp("labels") / f"t.{fmt}"
    fio.write_table(path, table)
    back = fio.read_edges(path)
    # reference: the written labels themselves
    assert back.label(back.tail).tolist() == names[:n]
    assert back.label(back.head).tolist() == names[1:]


@settings(phases=(Phase.explicit, Phase.generate))   # no shrinking while the failure is known
@given(weights=st.lists(st.one_of(st.sampled_from([0.0, -0.0, 1.0, -3.0, 1e16, 2.0**53, 1e-7]),
                                  st.floats(allow_nan=False, allow_infinity=False),
                                  st.integers(-2**40, 2**40).map(float)),
                        min_size=2, max_size=8),
       extra=st.lists(st.one_of(st.none(), st.floats(width=32, allow_nan=False,
                                                    allow_infinity=False),
                                st.integers(-9, 9).map(float)),
                      min_size=8, max_size=8).filter(lambda v: v[0] is not None),
       names=st.lists(st.text(st.characters(blacklist_categories=("Cs",),
                                            blacklist_characters="\r\n"), min_size=1),
                      min_size=9, max_size=9, unique=True),
       fmt=st.sampled_from(_TEXT_FORMATS))
def test_text_output_keeps_floats_float(tmp_path_factory, weights, extra, names, fmt):
    # carried columns: the first cell is a number (a column of missing cells only, or one
    # with nan/inf cells, is read back as text by the carried-column typing rule)
    n = len(weights)
    table = pa.table({"tail": names[:n], "head": names[1:n + 1],
                      "weight": pa.array(weights, pa.float64()),
                      "extra": pa.array(extra[:n], pa.float64())})
    path = tmp_path_factory.mktemp("floats") / f"t.{fmt}"
    fio.write_table(path, table)
    back = fio.read_edges(path)
    # reference: the written values themselves, bit for bit (the sign of -0.0 included)
    assert back.label(back.tail).tolist() == names[:n]
    assert back.label(back.head).tolist() == names[1:n + 1]
    assert back.weight.dtype == np.float64
    assert np.asarray(weights, np.float64).view(np.int64).tolist() == \
        back.weight.view(np.int64).tolist()
    got = back.attributes.column("extra")
    assert got.type == pa.float64()
    want = pa.array(extra[:n], pa.float64())
    assert got.is_null().to_pylist() == want.is_null().to_pylist()
    a = np.asarray(want.fill_null(0.0)), np.asarray(got.fill_null(0.0))
    assert np.array_equal(a[0], a[1], equal_nan=True)
    assert np.array_equal(np.signbit(a[0]), np.signbit(a[1]))


def test_forest_csv_keeps_float_weights(tmp_path):
    # -0.0 and whole-number float weights: written as -0 and 1 they read back as int64 0 and 1
    edges = fio.from_table(pa.table({"tail": ["a", "b", "c"], "head": ["b", "c", "a"],
                                     "weight": [-0.0, 1.0, 2.0]}))
    forest = edges.solve()
    fio.write_forest(tmp_path / "f.csv", forest, edges)
    back = fio.read_edges(tmp_path / "f.csv")
    # reference: the forest's own weights (-0.0 and 1.0, the two lightest)
    assert back.weight.dtype == np.float64
    assert back.weight.tolist() == [-0.0, 1.0] and np.signbit(back.weight[0])


# --- integer weights in text files are read exactly or refused, never rounded --------------

def _text_file(path, rows, delimiter):
    import gzip
    text = delimiter.join(["tail", "head", "w"]) + "\n" + "".join(
        delimiter.join([f"n{i}", f"n{i + 1}", v]) + "\n" for i, v in enumerate(rows))
    if path.suffix == ".gz":
        path.write_bytes(gzip.compress(text.encode()))
    else:
        path.write_text(text)
    return path


@given(values=st.lists(st.one_of(st.integers(-2**63, 2**64 - 1),
                                 st.integers(2**53 - 4, 2**53 + 4),
                                 st.integers(2**63 - 2, 2**64 - 1),
                                 st.integers(2**64, 2**70)),
                       min_size=1, max_size=6),
       decimal=st.booleans(),
       fmt=st.sampled_from(["csv", "tsv", "csv.gz"]))
def test_large_integer_weights_exact_or_refused(tmp_path_factory, values, decimal, fmt):
    rows = [str(v) for v in values] + (["0.5"] if decimal else [])
    path = _text_file(tmp_path_factory.mktemp("big") / f"w.{fmt}", rows,
                      "\t" if fmt == "tsv" else ",")
    fits = not decimal and (all(-2**63 <= v < 2**63 for v in values)
                            or all(0 <= v < 2**64 for v in values))
    try:
        back = fio.read_edges(path)
    except fio.FileFormatError as exc:
        assert not fits   # 64-bit integers are always read
        assert "cannot hold exactly" in str(exc) and "w" in str(exc)
        return
    # reference: the integers as written (Python's arbitrary-precision int)
    got = [int(x) for x in back.weight.tolist()[:len(values)]]
    assert got == values
    if fits:
        assert back.weight.dtype.kind in "iu"


def test_uint64_forest_weights_round_trip_through_csv(tmp_path):
    w = np.array([2**64 - 1, 2**63 + 1, 5], dtype=np.uint64)
    edges = fio.from_table(pa.table({"tail": ["a", "b", "c"], "head": ["b", "c", "a"],
                                     "weight": w}))
    forest = edges.solve()
    for fmt in _TEXT_FORMATS:
        back = fio.read_edges(fio.write_forest(tmp_path / f"f.{fmt}", forest, edges))
        # reference: the forest's own uint64 weights (5 and 2**63 + 1, the two lightest)
        assert back.weight.dtype == np.uint64
        assert back.weight.tolist() == np.asarray(forest.weights).tolist() == [5, 2**63 + 1]


# --- every format that writes carried columns reads them back -----------------------------

@given(fmt=st.sampled_from(["csv", "tsv", "parquet", "npz"]),
       keep=st.sampled_from(["all", ["note"], []]),
       ids=st.lists(st.text(st.characters(min_codepoint=33, max_codepoint=0x2FFF), min_size=1,
                            max_size=6), min_size=3, max_size=3, unique=True))
def test_carried_columns_and_link_ids_read_back(tmp_path_factory, fmt, keep, ids):
    edges = fio.from_table(pa.table({"tail": ["a", "b", "c"], "head": ["b", "c", "a"],
                                     "weight": [1.5, 2.5, 3.5], "lid": ids,
                                     "note": ["x", "y", "z"], "k": [7, 8, 9]}), link_id="lid")
    forest = edges.solve()
    path = fio.write_forest(tmp_path_factory.mktemp("carry") / f"f.{fmt}", forest, edges)
    back = fio.read_edges(path, link_id="lid", keep_columns=keep)
    # reference: the forest's rows of the input table (positions 0 and 1)
    want = {"lid": ids[:2], "note": ["x", "y"], "k": [7, 8]}
    names = ["lid"] + (["note", "k"] if keep == "all" else list(keep))
    assert back.link_id == "lid"
    assert back.attributes.column_names == names
    assert {n: back.attributes.column(n).to_pylist() for n in names} == \
        {n: want[n] for n in names}
    with pytest.raises(fio.FileFormatError, match="no column 'nope'"):
        fio.read_edges(path, keep_columns=["nope"])


@given(kind=st.sampled_from(["text", "int", "float", "bool"]), at=st.integers(0, 2))
def test_npz_refuses_missing_cells(tmp_path_factory, kind, at):
    values = {"text": ["x", "y", "z"], "int": [1, 2, 3], "float": [0.5, 1.5, 2.5],
              "bool": [True, False, True]}[kind]
    values = [None if i == at else v for i, v in enumerate(values)]
    table = pa.table({"tail": ["a", "b", "c"], "head": ["b", "c", "a"],
                      "weight": [1.0, 2.0, 3.0], "extra": values})
    tmp = tmp_path_factory.mktemp("npz")
    with pytest.raises(ValueError, match=rf"column 'extra': row {at} .* missing.*Parquet"):
        fio.write_table(tmp / "t.npz", table)
    assert not list(tmp.iterdir())   # nothing written, no temporary file left
    # the same table through Parquet keeps the missing cell (reference: the table itself)
    back = fio.read_edges(fio.write_table(tmp / "t.parquet", table))
    assert back.attributes.column("extra").to_pylist() == values


# --- NumPy text labels with a NUL inside keep every character -----------------------------

_WITH_NUL = st.lists(st.text(st.sampled_from(["a", "0", "\x00", "é", ","]), min_size=1,
                             max_size=5).filter(lambda s: not s.endswith("\x00")),
                     min_size=3, max_size=6, unique=True).filter(
                         lambda v: any("\x00" in s for s in v))


@given(names=_WITH_NUL, fmt=st.sampled_from(["npz", "parquet", "csv"]))
def test_numpy_labels_with_nul_keep_every_character(tmp_path_factory, names, fmt):
    # NumPy pads text with NULs, so a label cannot end in one (the .npz writer refuses those)
    text = np.array(names)
    assert fio.label_array(text).to_pylist() == names   # reference: the labels themselves
    n = len(names) - 1
    t, h, labels = fio.encode_labels(text[:n], text[1:], "<test>")
    assert [labels[i] for i in t] == names[:n] and [labels[i] for i in h] == names[1:]
    edges = fio.EdgeList(np.arange(n), np.arange(1, n + 1), np.arange(n) + 1.0, n + 1,
                         labels=text)
    path = fio.write_forest(tmp_path_factory.mktemp("nul") / f"f.{fmt}", edges.solve(), edges)
    back = fio.read_edges(path)
    assert back.label(back.tail).tolist() == names[:n]
    assert back.label(back.head).tolist() == names[1:]


# --- an empty forest (isolated nodes only) is written in every format ---------------------

@settings(max_examples=30)
@given(fmt=st.sampled_from(fio.WRITE_FORMATS), text=st.booleans(), n=st.integers(1, 4))
def test_empty_forest_written_with_typed_columns(tmp_path_factory, fmt, text, n):
    import pyarrow.parquet as pq
    labels = [f"s{i}" for i in range(n)] if text else list(range(10, 10 + n))
    nodes = fio.read_nodes(pa.table({"id": labels, "lon": [1.0 + i for i in range(n)],
                                     "lat": [2.0 + i for i in range(n)]}))
    edges = fio.from_table(pa.table({"tail": labels[:1], "head": labels[:1],
                                     "weight": [1.0]}), nodes=nodes)   # a self-loop only
    forest = edges.solve()
    assert len(forest.edges) == 0
    path = fio.write_forest(tmp_path_factory.mktemp("empty") / f"f.{fmt}", forest, edges)
    label_type = pa.string() if text else pa.int64()
    if fmt == "parquet":   # reference: the label type of the node table
        schema = pq.read_schema(path)
        assert schema.field("tail").type == label_type == schema.field("head").type
    if fmt == "gpkg":
        import pyogrio
        _, sites = pyogrio.read_arrow(str(path), layer="sites")
        assert sites.column("node").to_pylist() == labels
        assert sites.column("isolated").to_pylist() == [True] * n
        _, lines = pyogrio.read_arrow(str(path), layer="forest")
        assert lines.num_rows == 0
    if fmt == "geojson":
        import json
        assert json.loads(path.read_text())["features"] == []
    if fmt in ("csv", "tsv"):
        assert path.read_text().splitlines() == [
            '"tail","head","weight","position"'.replace(",", "," if fmt == "csv" else "\t")]


# --- integer ids of any width are looked up exactly ----------------------------------------

_ID = st.one_of(st.integers(0, 5), st.integers(2**63 - 2, 2**64 - 1), st.integers(-2**63, -1),
                st.integers(2**53 - 2, 2**53 + 2))


def _id_column(values, kind):
    if kind == "text":
        return pa.array([str(v) for v in values])
    if kind == "uint64" and all(v >= 0 for v in values):
        return pa.array(values, pa.uint64())
    if all(-2**63 <= v < 2**63 for v in values):
        return pa.array(values, pa.int64())
    return None


@given(node_ids=st.lists(_ID, min_size=2, max_size=5, unique=True),
       pick=st.lists(st.integers(0, 10), min_size=2, max_size=4),
       stranger=st.one_of(st.none(), _ID),
       kinds=st.tuples(st.sampled_from(["int64", "uint64", "text"]),
                       st.sampled_from(["int64", "uint64", "text"])))
def test_node_lookup_exact_across_integer_widths(node_ids, pick, stranger, kinds):
    ends = [node_ids[i % len(node_ids)] for i in pick]
    if stranger is not None and stranger not in node_ids:
        ends[-1] = stranger
    ncol, ecol = _id_column(node_ids, kinds[0]), _id_column(ends, kinds[1])
    if ncol is None or ecol is None:
        return   # that type cannot hold these ids
    nodes = fio.read_nodes(pa.table({"id": ncol, "x": np.arange(len(node_ids), dtype=float),
                                     "y": np.zeros(len(node_ids))}))
    table = pa.table({"tail": ecol.slice(0, len(ends) - 1), "head": ecol.slice(1),
                      "weight": np.ones(len(ends) - 1)})
    # reference: Python's exact integer comparison of the ids
    row = {v: i for i, v in enumerate(node_ids)}
    if any(v not in row for v in ends):
        with pytest.raises(fio.FileFormatError, match="is not in the node table"):
            fio.from_table(table, nodes=nodes)
        return
    edges = fio.from_table(table, nodes=nodes)
    assert edges.tail.tolist() == [row[v] for v in ends[:-1]]
    assert edges.head.tolist() == [row[v] for v in ends[1:]]


@settings(max_examples=25)
@given(ids=st.lists(st.one_of(st.integers(0, 2**63 - 1), st.integers(2**63, 2**64 - 1)),
                    min_size=3, max_size=5, unique=True),
       weights=st.lists(st.integers(0, 2**64 - 1), min_size=2, max_size=2))
def test_geopackage_keeps_uint64_exact(tmp_path_factory, ids, weights):
    import pyogrio
    n = len(ids)
    nodes = fio.read_nodes(pa.table({"id": pa.array(ids, pa.uint64()),
                                     "lon": [float(i) for i in range(n)],
                                     "lat": [float(i) for i in range(n)]}))
    w = (weights * n)[:n - 1]
    edges = fio.from_table(pa.table({"tail": pa.array(ids[:-1], pa.uint64()),
                                     "head": pa.array(ids[1:], pa.uint64()),
                                     "weight": pa.array(w, pa.uint64())}), nodes=nodes)
    forest = edges.solve()
    path = fio.write_geopackage(tmp_path_factory.mktemp("u64") / "f.gpkg", forest, edges)
    _, sites = pyogrio.read_arrow(str(path), layer="sites")
    _, lines = pyogrio.read_arrow(str(path), layer="forest")
    # reference: the ids and weights as given (Python ints), compared exactly
    assert [int(v) for v in sites.column("node").to_pylist()] == ids
    pos = lines.column("position").to_pylist()
    assert [int(v) for v in lines.column("tail").to_pylist()] == [ids[p] for p in pos]
    assert [int(v) for v in lines.column("weight").to_pylist()] == [w[p] for p in pos]


# --- the header line is found as the parser finds it ---------------------------------------

_NAME = st.text(st.characters(blacklist_categories=("Cs",), blacklist_characters="\r\n\x00"),
                min_size=1, max_size=12).filter(
                    lambda s: s not in ("tail", "head", "weight", "position"))


@given(names=st.lists(_NAME, min_size=1, max_size=3, unique=True),
       long=st.booleans(), fmt=st.sampled_from(_TEXT_FORMATS))
def test_column_names_read_back_as_written(tmp_path_factory, names, long, fmt):
    # Unicode line breaks (U+2028, \x0b, \x85 ...) in a name, and a header beyond 64 KiB
    if long:
        names = names[:-1] + [names[-1] + "x" * 70_000]
    cols = {"tail": ["a", "b"], "head": ["b", "c"], "weight": [1.5, 2.5]}
    cols.update({n: [i, i + 1] for i, n in enumerate(names)})
    path = fio.write_table(tmp_path_factory.mktemp("names") / f"t.{fmt}", pa.table(cols))
    back = fio.read_edges(path)
    # reference: the names and values written
    assert back.attributes.column_names == names
    assert [back.attributes.column(n).to_pylist() for n in names] == \
        [[i, i + 1] for i in range(len(names))]


@given(blank=st.lists(st.sampled_from(["\n", "\r\n", "\r"]), min_size=1, max_size=3),
       end=st.sampled_from(["\n", "\r\n", "\r"]))
def test_blank_lines_before_the_header(tmp_path_factory, blank, end):
    path = tmp_path_factory.mktemp("blank") / "e.csv"
    path.write_bytes(("".join(blank) + end.join(["tail,head,w", "a,b,1.5", "b,c,2.5"]) +
                      end).encode())
    back = fio.read_edges(path)
    # reference: the lines written (pyarrow's parser skips the empty lines too)
    assert back.columns == ("tail", "head", "w")
    assert back.labels.tolist() == ["a", "b", "c"] and back.weight.tolist() == [1.5, 2.5]


# --- weights in text formats (CSV/TSV, DIMACS .gr): exact, or refused -----------------------

_WEIGHT_TEXT = st.one_of(st.integers(-2**63, 2**64 - 1).map(str),
                         st.integers(2**64, 2**80).map(str),
                         st.sampled_from(["1e400", "-2e308", "inf", "-inf", "1.5", "2.5e300"]),
                         st.integers(2**53 - 2, 2**53 + 2).map(str))


def _gr_file(path, rows):
    n = len(rows) + 1
    path.write_text(f"p sp {n} {len(rows)}\n" +
                    "".join(f"a {i + 1} {i + 2} {v}\n" for i, v in enumerate(rows)))
    return path


@given(rows=st.lists(_WEIGHT_TEXT, min_size=1, max_size=5),
       fmt=st.sampled_from(["csv", "tsv", "gr"]))
def test_text_weights_exact_or_refused(tmp_path_factory, rows, fmt):
    tmp = tmp_path_factory.mktemp("wt")
    path = _gr_file(tmp / "w.gr", rows) if fmt == "gr" else \
        _text_file(tmp / f"w.{fmt}", rows, "\t" if fmt == "tsv" else ",")
    # reference: Python's own parsing (int for integer text, float otherwise)
    exact = [int(v) if v.lstrip("-").isdigit() else float(v) for v in rows]
    overflow = any(v in ("1e400", "-2e308") for v in rows)
    inexact = any(isinstance(x, int) and float(x) != x for x in exact)
    try:
        back = fio.read_edges(path)
    except fio.FileFormatError as exc:
        assert overflow or inexact
        assert ("beyond the range" in str(exc)) or ("cannot hold exactly" in str(exc))
        return
    assert not overflow
    got = back.weight.tolist()
    assert [int(g) if isinstance(x, int) else g for g, x in zip(got, exact)] == exact


@given(fmt=st.sampled_from(["csv", "tsv.gz", "parquet", "npz", "geojson", "gpkg"]),
       slash=st.booleans())
def test_output_that_is_a_folder(tmp_path_factory, fmt, slash):
    tmp = tmp_path_factory.mktemp("dir")
    edges = fio.read_edges(_write(tmp / "e.csv", _EDGES), nodes=_write(tmp / "n.csv", _NODES))
    folder = tmp / f"out.{fmt}"
    folder.mkdir()
    target = str(folder) + ("/" if slash else "")
    with pytest.raises(IsADirectoryError) as info:
        fio.write_forest(target, edges.solve(), edges, format=fmt.split(".")[0])
    msg = str(info.value)
    assert msg.count("cannot write") == 1 and "it is a folder" in msg and "name a file" in msg
    assert list(folder.iterdir()) == [] and sorted(p.name for p in tmp.iterdir()) == \
        ["e.csv", "n.csv", f"out.{fmt}"]   # no temporary file left


@settings(max_examples=200, deadline=None)
@given(values=st.lists(st.one_of(st.floats(allow_nan=True, allow_infinity=True),
                                 st.sampled_from([2.0**53, -2.0**53, 2.0**53 - 1, 1e300]),
                                 st.none()), min_size=1, max_size=30),
       cuts=st.lists(st.integers(0, 30), max_size=3), f32=st.booleans())
def test_needs_text_agrees_with_pyarrow_min_max(values, cuts, f32):
    """io.numbers.needs_text (NumPy over the chunks when no cell is missing) against its rule
    computed with pyarrow.compute.min_max (reference: pyarrow, which skips NaN and nulls)."""
    import pyarrow.compute as pc

    from fastmst.io.numbers import needs_text
    typ = pa.float32() if f32 else pa.float64()
    bounds = [0] + sorted(c % (len(values) + 1) for c in cuts) + [len(values)]
    col = pa.chunked_array([pa.array(values[lo:hi], type=typ, from_pandas=False)
                            for lo, hi in zip(bounds[:-1], bounds[1:])], type=typ)
    lo, hi = pc.min_max(col).values()
    want = lo.as_py() is not None and max(-lo.as_py(), hi.as_py()) >= 2.0**53
    assert needs_text(col) == want
