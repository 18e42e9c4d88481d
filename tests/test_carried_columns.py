"""The input's other columns travel to every output under their own names (CSV, TSV, Parquet,
.npz, tables), chosen with keep_columns / columns=; link ids; delimiters and decimal commas;
read_edges of a table in memory.  Expected tables are built from the input rows at the forest's
positions, and the forest itself is checked against scipy.sparse.csgraph."""
import numpy as np
import pyarrow as pa
import pyarrow.parquet as pq
import pytest
from hypothesis import given, settings, strategies as st
from scipy.sparse import coo_array
from scipy.sparse.csgraph import minimum_spanning_tree

import fastmst
from fastmst import io

LINKS = ("link_id,from,to,cost,route_type,length_m,zone\n"
         "L1,A,B,4,duct,10.5,007\nL2,B,C,1.5,aerial,3,008\nL3,C,A,2,duct,4,009\n"
         "L4,C,D,3,aerial,5,010\n")


def _links(tmp_path, text=LINKS, name="links.csv"):
    p = tmp_path / name
    p.write_text(text)
    return p


def _read_back(path):
    if path.suffix == ".parquet":
        return pq.read_table(path)
    if path.suffix == ".npz":
        z = np.load(path)
        return pa.table({k: z[k] for k in z.files})
    return io.load_table(path, text=lambda h: [c for c in h if c not in ("cost", "position",
                                                                      "length_m")])[0]


@pytest.mark.parametrize("suffix", [".csv", ".tsv", ".parquet", ".npz"])
def test_every_format_carries_the_same_columns(tmp_path, suffix):
    """Every table format writes tail, head, weight, position and the carried columns under
    the input's names; values are the input rows at the forest's positions."""
    edges = fastmst.read_edges(_links(tmp_path), tail="from", head="to", weight="cost",
                               link_id="link_id")
    forest = edges.solve()
    out = tmp_path / f"forest{suffix}"
    fastmst.write_forest(out, forest, edges)
    got = _read_back(out)
    assert got.column_names == ["from", "to", "cost", "position", "link_id", "route_type",
                                "length_m", "zone"]
    rows = [r.split(",") for r in LINKS.splitlines()[1:]]
    pos = got.column("position").to_pylist()
    assert sorted(pos) == sorted(forest.edges.tolist())
    assert [str(x) for x in got.column("link_id").to_pylist()] == [rows[p][0] for p in pos]
    assert [str(x) for x in got.column("route_type").to_pylist()] == [rows[p][4] for p in pos]
    assert [float(x) for x in got.column("length_m").to_pylist()] == \
        [float(rows[p][5]) for p in pos]
    assert [str(x) for x in got.column("zone").to_pylist()] == [rows[p][6] for p in pos]


def test_leading_zeros_stay_text_and_numbers_become_numbers(tmp_path):
    """A column of numbers as written is numeric (so it can be summed); 007 keeps its text."""
    edges = fastmst.read_edges(_links(tmp_path), tail="from", head="to", weight="cost")
    a = edges.attributes
    assert a.column("length_m").type == pa.float64()
    assert a.column("zone").to_pylist() == ["007", "008", "009", "010"]
    assert a.column("link_id").type == pa.string()


def test_keep_columns_and_write_columns_choose(tmp_path):
    """keep_columns at reading and columns= at writing choose the carried columns; an unknown
    name is a ValueError listing those carried."""
    edges = fastmst.read_edges(_links(tmp_path), tail="from", head="to", weight="cost",
                               keep_columns=["route_type"])
    assert edges.attributes.column_names == ["route_type"]
    forest = edges.solve()
    assert io.forest_table(forest, edges).column_names[-1] == "route_type"
    fastmst.write_forest(tmp_path / "f.parquet", forest, edges, columns=[])
    assert pq.read_table(tmp_path / "f.parquet").column_names == ["from", "to", "cost",
                                                                  "position"]
    with pytest.raises(ValueError, match="'zone' is not carried.*'route_type'"):
        fastmst.write_forest(tmp_path / "g.csv", forest, edges, columns=["zone"])
    none = fastmst.read_edges(_links(tmp_path), tail="from", head="to", weight="cost",
                              keep_columns=[])
    assert none.attributes is None
    with pytest.raises(ValueError, match="keep_columns must be 'all'"):
        fastmst.read_edges(_links(tmp_path), tail="from", head="to", keep_columns="some")


def test_repeated_link_id_is_refused(tmp_path):
    """A link id names exactly one link: a repeated id is a FileFormatError naming both rows."""
    p = _links(tmp_path, LINKS.replace("L3", "L1"))
    with pytest.raises(io.FileFormatError, match=r"link id 'L1'.*names 2 links.*line 2.*line 4"):
        fastmst.read_edges(p, tail="from", head="to", weight="cost", link_id="link_id")


def test_position_column_of_the_input_is_not_carried(tmp_path):
    """Outputs' 'position' is the row in this input; an input 'position' column (a forest
    read again) is not carried under that name."""
    p = _links(tmp_path, "a,b,weight,position\nx,y,1,5\ny,z,2,9\n")
    edges = fastmst.read_edges(p)
    t = io.forest_table(edges.solve(), edges)
    assert t.column("position").to_pylist() == [0, 1]


def test_guessed_columns_are_named_in_errors(tmp_path):
    """An id column first: the error says which columns were taken and how to choose."""
    with pytest.raises(io.FileFormatError, match=r"tail 'link_id', head 'from', weight 'to' "
                                                 r"were taken by default.*--tail/--head"):
        fastmst.read_edges(_links(tmp_path))
    with pytest.raises(io.FileFormatError, match=r"The column weight 'link_id' was taken by "
                                                 r"default.*--weight COLUMN"):
        fastmst.read_edges(_links(tmp_path), tail="from", head="to")
    edges = fastmst.read_edges(_links(tmp_path), tail="from", head="to", weight="cost")
    assert edges.guessed == () and edges.columns[2] == "cost"


def test_delimiter_and_decimal_comma(tmp_path):
    """Semicolon-separated files with decimal commas read as the comma/point file does."""
    p = _links(tmp_path, "from;to;cost;len\nA;B;4,5;1,25\nB;C;1,25;2\nA;C;3;0,5\n", "l.csv")
    edges = fastmst.read_edges(p, delimiter=";", decimal_comma=True)
    assert edges.weight.tolist() == [4.5, 1.25, 3.0]
    assert edges.attributes.column("len").to_pylist() == [1.25, 2.0, 0.5]
    with pytest.raises(ValueError, match="delimiter must be one character"):
        fastmst.read_edges(p, delimiter=";;")
    with pytest.raises(TypeError, match="decimal_comma must be"):
        fastmst.read_edges(p, delimiter=";", decimal_comma="yes")


def test_read_edges_of_a_dataframe(tmp_path):
    """read_edges(DataFrame) reads it as from_table does, carried columns included."""
    pd = pytest.importorskip("pandas")
    df = pd.read_csv(_links(tmp_path), dtype={"zone": str})
    edges = fastmst.read_edges(df, tail="from", head="to", weight="cost", link_id="link_id")
    ref = io.from_table(df, tail="from", head="to", weight="cost", link_id="link_id")
    assert edges.solve().edges.tolist() == ref.solve().edges.tolist()
    assert io.forest_table(edges.solve(), edges).column_names[4:] == \
        ["link_id", "route_type", "length_m", "zone"]
    with pytest.raises(ValueError, match="apply to files"):
        fastmst.read_edges(df, delimiter=";")


@settings(max_examples=25, deadline=None)
@given(st.integers(2, 12).flatmap(lambda n: st.lists(
    st.tuples(st.integers(0, n - 1), st.integers(0, n - 1), st.integers(0, 20)),
    min_size=1, max_size=30)))
def test_carried_rows_follow_the_forest(tmp_path_factory, rows):
    """Over random graphs: each written row's carried id is the id of the input row at its
    position, and the forest's weight equals SciPy's (scipy.sparse.csgraph; weights shifted by
    one so that zero weights are not dropped, no parallel edges kept)."""
    tmp = tmp_path_factory.mktemp("c")
    text = "id,u,v,w\n" + "".join(f"e{i},n{a},n{b},{w}\n" for i, (a, b, w) in enumerate(rows))
    p = tmp / "g.csv"
    p.write_text(text)
    edges = fastmst.read_edges(p, tail="u", head="v", weight="w", link_id="id")
    forest = edges.solve()
    t = io.forest_table(forest, edges)
    assert t.column("id").to_pylist() == [f"e{p}" for p in forest.edges.tolist()]
    best = {}
    for a, b, w in rows:
        key = tuple(sorted((f"n{a}", f"n{b}")))
        if a != b:
            best[key] = min(best.get(key, w), w)
    names = sorted({x for k in best for x in k})
    idx = {v: i for i, v in enumerate(names)}
    if best:
        m = coo_array(([w + 1 for w in best.values()],
                       ([idx[k[0]] for k in best], [idx[k[1]] for k in best])),
                      shape=(len(names), len(names)))
        ref = minimum_spanning_tree(m)
        assert forest.weight + len(forest) == pytest.approx(ref.sum())
    else:
        assert len(forest) == 0


def test_delimiter_and_decimal_comma_for_nodes_and_lists(tmp_path):
    """The node table and lists of links read with ';' and decimal commas give what the
    comma/point files give."""
    (tmp_path / "n1.csv").write_text("id,lon,lat\nA,0.5,1.25\nB,1,1\nC,2.5,0\n")
    (tmp_path / "n2.csv").write_text("id;lon;lat\nA;0,5;1,25\nB;1;1\nC;2,5;0\n")
    a = fastmst.read_nodes(tmp_path / "n1.csv")
    b = fastmst.read_nodes(tmp_path / "n2.csv", delimiter=";", decimal_comma=True)
    assert a.labels.tolist() == b.labels.tolist() and np.array_equal(a.coords, b.coords)
    (tmp_path / "e.csv").write_text("from,to,cost\nA,B,4.5\nB,C,1.25\nA,C,3\n")
    edges = fastmst.read_edges(tmp_path / "e.csv", nodes=a)
    (tmp_path / "x.csv").write_text("from;to\nC;A\n")
    links = io.read_links(tmp_path / "x.csv", edges, delimiter=";")
    assert links.positions.tolist() == [2] and links.named_by == "pair"


@pytest.mark.parametrize("fmt", ["csv", "parquet"])
@pytest.mark.parametrize("name", ["tail", "head", "weight", "position"])
def test_keep_columns_naming_a_column_that_cannot_be_carried(tmp_path, fmt, name):
    """keep_columns asking for the edges' own columns or 'position' is refused, not ignored."""
    import pyarrow.csv as pcsv
    table = pa.table({"tail": ["a", "b"], "head": ["b", "c"], "weight": [1.0, 2.0],
                      "position": [7, 8], "note": ["p", "q"]})
    path = tmp_path / f"e.{fmt}"
    if fmt == "csv":
        pcsv.write_csv(table, path)
    else:
        pq.write_table(table, path)
    with pytest.raises(ValueError, match=rf"keep_columns names '{name}'"):
        io.read_edges(path, keep_columns=[name])
    assert io.read_edges(path, keep_columns=["note"]).attributes.column_names == ["note"]
