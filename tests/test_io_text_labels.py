"""Labels are text unless the ids are declared integers: every reader and writer keeps a label
exactly as written (leading zeros, number-like and null-like words, unicode), integer ids only
when asked.  References are named beside each check.
"""
from __future__ import annotations

import json

import numpy as np
import pyarrow as pa
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fastmst import io
from fastmst.io import FileFormatError
from io_reference import nx_mst_weight, write_csv

# --- labels are text unless the ids are declared integers ------------------------------------------

# Label shapes that a type-guessing reader would change: leading zeros, hex- and float-like
# text, true/false words, signs, surrounding spaces, unicode, null-like words.
_TRICKY = ["007", "7", "0x1", "1", "true", "false", "True", "1e3", "1000", "+7", "-0", "0",
           " 7", "7 ", "NA", "null", "nan", "inf", "é", "名前", "a b", "=1+2", "@x", "1.0"]
# Text labels without line breaks (a CSV/TSV writer refuses those, see the test below) and
# without NUL (NumPy's text dtype of .npz cannot end a string with it).
_TEXT = st.text(st.characters(blacklist_categories=("Cs",),
                              blacklist_characters="\r\n\x00\x0b\x0c\x1c\x1d\x1e\x85\u2028\u2029"),
                min_size=1, max_size=6)
_LABEL = st.one_of(st.sampled_from(_TRICKY), _TEXT,
                   st.integers(0, 10**6).map(lambda i: f"{i:0{(i % 4) + 1}d}"),
                   st.integers(0, 255).map(hex))


def _csv_file(path, rows, sep=","):
    """Rows written by Python's csv module (quoting what needs it), as a user's file would be."""
    import csv
    with open(path, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh, delimiter=sep)
        w.writerow(["tail", "head", "weight"])
        w.writerows(rows)
    return path


def _first_appearance(picks):
    seen = {}
    for x in [p[0] for p in picks] + [p[1] for p in picks]:
        seen.setdefault(x, len(seen))
    return list(seen)


@settings(deadline=None, derandomize=True, max_examples=60)
@given(labels=st.lists(_LABEL, min_size=1, max_size=8, unique=True), data=st.data())
def test_text_labels_read_exactly_and_round_trip_every_writer(tmp_path_factory, labels, data):
    """CSV/TSV endpoint columns are read as text, exactly as written: '007' and '7' are two
    nodes, '0x1' and 'true' stay text, and compact ids follow first appearance (tail column,
    then head column).  Every writer (CSV, TSV, Parquet, .npz, GeoJSON) gives the labels back
    unchanged; the forest weight equals networkx's on the labelled graph (reference library)."""
    tmp = tmp_path_factory.mktemp("labels")
    m = data.draw(st.integers(1, 10))
    picks = data.draw(st.lists(st.tuples(st.sampled_from(labels), st.sampled_from(labels),
                                         st.integers(-5, 5)), min_size=m, max_size=m))
    for name, sep in (("e.csv", ","), ("e.tsv", "\t")):
        el = io.read_edges(_csv_file(tmp / name, picks, sep))
        assert el.labels.tolist() == _first_appearance(picks)
        assert el.label(el.tail).tolist() == [p[0] for p in picks]
        assert el.label(el.head).tolist() == [p[1] for p in picks]
        f = el.solve()
        assert f.weight == nx_mst_weight([(a, b, w) for a, b, w in picks])
    want = list(zip(el.label(f.tail).tolist(), el.label(f.head).tolist()))
    if not want:   # self-loops only: an empty forest has no edge list to read back
        return
    for out in ("f.csv", "f.tsv", "f.csv.gz", "f.parquet", "f.npz"):
        back = io.read_edges(io.write_forest(tmp / out, f, el))
        assert list(zip(back.label(back.tail).tolist(), back.label(back.head).tolist())) == want
    coords = np.arange(2 * el.n_nodes, dtype=float).reshape(-1, 2) % 80
    geo = io.EdgeList(el.tail, el.head, el.weight, el.n_nodes, el.labels, coords, True)
    doc = json.loads(io.write_forest(tmp / "f.geojson", f, geo).read_text(encoding="utf-8"))
    assert [(x["properties"]["tail"], x["properties"]["head"]) for x in doc["features"]] == want


def test_integer_ids_only_when_asked(tmp_path):
    """ids="integer" reads endpoint columns as integers ('007' is node 7); the default keeps
    them as text, also in a node table and in lists of links."""
    p = write_csv(tmp_path / "e.csv", ["u", "v", "w"],
                   [("007", "7", 1), ("7", "0x1", 2), ("true", "007", 3)])
    el = io.read_edges(p)
    assert el.labels.tolist() == ["007", "7", "true", "0x1"] and el.n_nodes == 4
    assert el.solve().n_components == 1
    q = write_csv(tmp_path / "i.csv", ["u", "v", "w"], [("007", "7", 1), ("8", "09", 2)])
    ints = io.read_edges(q, ids="integer")
    assert ints.labels.tolist() == [7, 8, 9] and ints.n_nodes == 3
    with pytest.raises(FileFormatError, match=r"line 4\).*'true'.*not an integer"):
        io.read_edges(p, ids="integer")
    with pytest.raises(ValueError, match="unknown ids 'int'"):
        io.read_edges(p, ids="int")
    nodes = tmp_path / "n.csv"
    nodes.write_text("id,x,y\n007,0,0\n7,1,0\ntrue,2,0\n0x1,3,0\n")
    withn = io.read_edges(p, nodes=nodes)
    assert withn.labels.tolist() == ["007", "7", "true", "0x1"]
    assert withn.label(withn.tail).tolist() == ["007", "7", "true"]
    assert io.read_nodes(nodes, ids="text").labels.tolist() == ["007", "7", "true", "0x1"]
    links = tmp_path / "l.csv"
    links.write_text("a,b\n7,007\n")
    assert io.read_positions(links, el).tolist() == [0]


def test_same_label_same_node_whatever_the_column_holds(tmp_path):
    """A label is one node whether its column is all digits or not (CSV and typed tables)."""
    p = write_csv(tmp_path / "e.csv", ["u", "v", "w"], [("1", "2", 1), ("3", "x", 1)])
    el = io.read_edges(p)     # column u is all digits, column v is not
    assert el.labels.tolist() == ["1", "3", "2", "x"]
    t = pa.table({"u": pa.array([1, 2], pa.int64()), "v": ["2", "x"], "w": [1.0, 1.0]})
    mixed = io.from_table(t)
    assert mixed.n_nodes == 3 and mixed.solve().n_components == 1


def test_true_false_labels_round_trip(tmp_path):
    """true/false labels come back as the same words, not as booleans."""
    p = write_csv(tmp_path / "b.csv", ["u", "v", "w"], [("true", "false", 1), ("false", "x", 2)])
    el = io.read_edges(p)
    out = io.write_forest(tmp_path / "f.csv", el.solve(), el)
    assert out.read_text().splitlines()[1:] == ['"true","false",1,0', '"false","x",2,1']
    assert io.read_edges(out).labels.tolist() == ["true", "false", "x"]


def test_csv_writer_refuses_line_breaks_in_labels(tmp_path):
    """A label with a line break cannot be read back from CSV at full speed: the writer refuses
    it, naming the label and the formats that keep it (Parquet, .npz)."""
    el = io.from_table(pa.table({"a": ["x\ny", "b"], "b": ["b", "c"], "w": [1, 2]}))
    f = el.solve()
    with pytest.raises(ValueError, match=r"f\.csv.*label 'x\\ny' has a line break.*Parquet"):
        io.write_forest(tmp_path / "f.csv", f, el)
    assert not (tmp_path / "f.csv").exists()
    back = io.read_edges(io.write_forest(tmp_path / "f.parquet", f, el))
    assert "x\ny" in back.labels.tolist()


def test_progress_never_shows_done_while_work_continues(tmp_path):
    """After the last byte is parsed the reader still checks and maps labels: it says so by a
    call with total None (a spinner), so a bar never sits at 100 % while work continues."""
    p = write_csv(tmp_path / "e.csv", ["a", "b", "w"], [(f"n{i}", f"n{i + 1}", i)
                                                         for i in range(3000)])
    seen = []
    io.read_edges(p, progress=lambda done, total: seen.append((done, total)))
    full = [i for i, (d, t) in enumerate(seen) if t is not None and d == t]
    assert full and seen[-1][1] is None and full[-1] < len(seen) - 1
