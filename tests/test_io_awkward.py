"""Awkward files and the words of messages: headers declaring huge node counts, odd
whitespace, replacing outputs (permissions, errors naming the file, spreadsheet formulas),
plain numbers in messages, nullable and uint64 columns, duplicate column names.
"""
import os

import numpy as np
import pyarrow as pa
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import fastmst.io as fio


# --- hostile and awkward files ---------------------------------------------------------------------

def test_header_declaring_huge_node_counts_is_refused(tmp_path):
    """A tiny .gr or .mtx whose header declares hundreds of millions of nodes is refused before
    anything node-sized is allocated; declared_nodes= confirms a genuinely large count."""
    import tracemalloc
    gr = tmp_path / "h.gr"
    gr.write_text("p sp 400000000 1\na 1 2 3\n")
    mtx = tmp_path / "h.mtx"
    mtx.write_text("%%MatrixMarket matrix coordinate real general\n400000000 400000000 1\n1 2 3\n")
    for path in (gr, mtx):
        tracemalloc.start()
        try:
            with pytest.raises(fio.FileFormatError, match=r"declares 400,000,000 nodes.*"
                                                      r"declared_nodes=400000000"):
                fio.read_edges(path)
            peak = tracemalloc.get_traced_memory()[1]
        finally:
            tracemalloc.stop()
        assert peak < 64 * 2**20, peak     # nothing node-sized (3.2 GB) was allocated
        with pytest.raises(fio.FileFormatError, match="declared_nodes=5 does not match"):
            fio.read_edges(path, declared_nodes=5)
    ok = tmp_path / "ok.gr"
    ok.write_text("p sp 3000000 1\na 1 2 3\n")
    with pytest.raises(fio.FileFormatError, match="declares 3,000,000 nodes"):
        fio.read_edges(ok)
    el = fio.read_edges(ok, declared_nodes=3_000_000)
    assert el.n_nodes == 3_000_000 and el.solve().n_components == 3_000_000 - 1


def test_gr_lines_split_on_any_whitespace(tmp_path):
    """.gr fields are whitespace-separated: tabs, repeated, leading and trailing spaces, CRLF."""
    p = tmp_path / "w.gr"
    p.write_bytes(b"c  comment\r\np sp  3\t2 \r\n  a 1\t2   5  \r\na\t2 3\t1\t\r\n")
    el = fio.read_edges(p)
    assert el.n_nodes == 3 and el.tail.tolist() == [0, 1] and el.weight.tolist() == [5, 1]
    bad = tmp_path / "bad.gr"
    bad.write_text("p sp 3 2\na 1 2 5\na 2 x 1\n")
    with pytest.raises(fio.FileFormatError, match="line 3: node ids"):
        fio.read_edges(bad)


# --- writing -----------------------------------------------------------------------------------------

def test_replacing_a_file_keeps_its_permissions(tmp_path):
    """Replacing an output keeps the target's mode (0600 stays 0600); a new file gets the
    usual mode of a new file."""
    el = fio.from_table(pa.table({"a": ["x"], "b": ["y"], "w": [1.0]}))
    out = tmp_path / "f.csv"
    out.write_text("old\n")
    os.chmod(out, 0o600)
    fio.write_forest(out, el.solve(), el)
    assert (os.stat(out).st_mode & 0o777) == 0o600 and out.read_text() != "old\n"
    umask = os.umask(0)
    os.umask(umask)
    new = fio.write_forest(tmp_path / "g.parquet", el.solve(), el)
    assert (os.stat(new).st_mode & 0o777) == 0o666 & ~umask


def test_write_errors_name_the_file(tmp_path):
    """A write that fails names the target file, not a temporary one."""
    el = fio.from_table(pa.table({"a": ["x"], "b": ["y"], "w": [1.0]}))
    target = tmp_path / "adir.csv"
    target.mkdir()
    with pytest.raises(OSError, match=f"cannot write {str(target)!r}"):
        fio.write_forest(target, el.solve(), el)
    assert sorted(os.listdir(tmp_path)) == ["adir.csv"]


def test_spreadsheet_formulas_verbatim_by_default(tmp_path):
    """Labels starting with = + - @ are written verbatim (they round-trip); spreadsheet_safe
    prefixes them with an apostrophe in CSV/TSV text cells only (numbers untouched)."""
    el = fio.from_table(pa.table({"a": ["=1+2", "@x", "-y"], "b": ["+3", "ok", "=z"],
                                 "w": [-1.0, 2.0, 3.0]}))
    f = el.solve()
    plain_ = fio.write_forest(tmp_path / "p.csv", f, el)
    assert set(fio.read_edges(plain_).labels.tolist()) == {"=1+2", "@x", "-y", "+3", "ok", "=z"}
    safe = fio.write_forest(tmp_path / "s.csv", f, el, spreadsheet_safe=True)
    rows = safe.read_text().splitlines()[1:]
    assert rows[0].startswith('"\'=1+2","\'+3","-1.0",')   # floats read back as floats
    assert all(not c.strip('"').startswith(("=", "+", "-", "@"))
               for r in rows for c in r.split(",")[:2])
    pq = fio.write_forest(tmp_path / "s.parquet", f, el, spreadsheet_safe=True)
    assert "=1+2" in fio.read_edges(pq).labels.tolist()   # only text formats are changed


# --- messages ----------------------------------------------------------------------------------------

def test_messages_show_plain_numbers(tmp_path):
    """No NumPy scalar reprs (np.int64(7)) in messages about integer labels."""
    el = fio.from_table(pa.table({"a": [7, 8], "b": [8, 9], "w": [1, 2]}))
    pairs = tmp_path / "p.parquet"
    fio.write_table(pairs, pa.table({"u": [7], "v": [9]}))
    with pytest.raises(fio.FileFormatError) as e:
        fio.read_positions(pairs, el)
    assert "np." not in str(e.value) and "no edge joins 7 and 9" in str(e.value)
    with pytest.raises(fio.FileFormatError) as e:
        fio.read_nodes(pa.table({"id": [5, 5], "x": [0.0, 1.0], "y": [0.0, 1.0]}))
    assert "np." not in str(e.value) and "node 5 in column 'id' appears twice" in str(e.value)


def test_nullable_int_column_reported_as_missing():
    """A pandas Int64 column with NA is reported as missing values, not as a float dtype."""
    import pandas as pd
    df = pd.DataFrame({"a": pd.array([1, None], dtype="Int64"), "b": [2, 3],
                       "w": pd.array([1, None], dtype="Int64")})
    with pytest.raises(fio.FileFormatError, match=r"row 1 .*column 'a' is empty or missing"):
        fio.from_table(df)
    df["a"] = [1, 2]
    with pytest.raises(fio.FileFormatError, match=r"row 1 .*column 'w' is empty or missing"):
        fio.from_table(df)


def test_uint64_weights_read_and_odd_dtypes_refused(tmp_path):
    """uint64 weights beyond 2**63 are read as uint64 from Parquet and .npz; complex weights
    are refused with a message naming the file and the column."""
    big = np.array([2**64 - 1, 2**63, 5], dtype=np.uint64)
    t, h = np.array([0, 1, 2]), np.array([1, 2, 0])
    pq_ = tmp_path / "u.parquet"
    fio.write_table(pq_, pa.table({"tail": t, "head": h, "weight": big}))
    np.savez(tmp_path / "u.npz", tail=t, head=h, weight=big)
    for p in (pq_, tmp_path / "u.npz"):
        el = fio.read_edges(p)
        assert el.weight.dtype == np.uint64 and el.weight.tolist() == big.tolist()
        assert el.solve().edges.tolist() == [2, 1]    # the two lightest of a triangle
    np.savez(tmp_path / "c.npz", tail=t, head=h, weight=big.astype(complex))
    with pytest.raises(fio.FileFormatError, match=r"c\.npz: column 'weight' holds complex"):
        fio.read_edges(tmp_path / "c.npz")


# A header that names two columns alike: reading by name would take one and drop the other
# unseen (one column for both endpoints: every edge a self-loop, an empty forest; a carried
# column: its twin's values lost).  Every such file or table is refused, naming the columns.
@settings(max_examples=25, deadline=None)
@given(role=st.sampled_from(["tail", "head", "weight", "carried"]),
       fmt=st.sampled_from(["csv", "tsv", "parquet", "table"]))
def test_duplicate_column_names_are_refused(tmp_path_factory, role, fmt):
    import pyarrow as pa
    import pyarrow.parquet as pq
    names = ["tail", "head", "weight", "note"]
    twin = {"tail": 0, "head": 1, "weight": 2, "carried": 3}[role]
    names.append(names[twin])
    cols = [pa.array(["a", "b"]), pa.array(["b", "c"]), pa.array([1.0, 2.0]),
            pa.array(["p", "q"]), pa.array(["r", "s"])]
    if twin < 2:
        cols[4] = pa.array(["c", "a"])
    elif twin == 2:
        cols[4] = pa.array([5.0, 6.0])
    table = pa.Table.from_arrays(cols, names=names)
    path = tmp_path_factory.mktemp("dup") / f"edges.{ 'txt' if fmt == 'table' else fmt}"
    if fmt == "table":
        read = lambda: fio.from_table(table)  # noqa: E731
    else:
        if fmt == "parquet":
            pq.write_table(table, path)
        else:
            sep = "," if fmt == "csv" else "\t"
            path.write_text(sep.join(names) + "\n" + "\n".join(
                sep.join(str(c[i].as_py()) for c in cols) for i in range(2)) + "\n")
        read = lambda: fio.read_edges(path)  # noqa: E731
    with pytest.raises(fio.FileFormatError, match=rf"names 2 columns '{names[twin]}' "
                                                  rf"\(columns {twin + 1}, 5\)"):
        read()
    if role == "carried" and fmt != "table":
        # leaving the twin out of the carried columns reads the edges
        assert fio.read_edges(path, keep_columns=[]).n_edges == 2


def test_tail_and_head_one_column_is_refused(tmp_path):
    path = tmp_path / "edges.csv"
    path.write_text("a,b,w\n1,2,3\n")
    with pytest.raises(fio.FileFormatError, match="tail and head are both column 'a'"):
        fio.read_edges(path, tail="a", head="a")
