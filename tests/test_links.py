"""Lists of links (fastmst.io.read_links) by link id, by position and by site pair, against a
plain scan of the edge rows; several-link pairs are reported; bad names are clear errors."""
import numpy as np
import pyarrow as pa
import pytest
from hypothesis import given, settings, strategies as st

import fastmst
from fastmst import io


def _edges(rows):
    t = pa.table({"id": [f"L{i}" for i in range(len(rows))], "u": [r[0] for r in rows],
                  "v": [r[1] for r in rows], "w": [float(r[2]) for r in rows]})
    return io.from_table(t, tail="u", head="v", weight="w", link_id="id")


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(st.sampled_from("abcde"), st.sampled_from("abcde"),
                          st.integers(0, 5)), min_size=1, max_size=25), st.data())
def test_pairs_positions_and_ids_match_a_scan(rows, data):
    """A pair names every link between its two sites (either direction) with
    parallel='all', the lightest (earliest among equal) with 'lightest'; ids and positions
    name exactly their row."""
    edges = _edges(rows)
    k = data.draw(st.integers(0, len(rows) - 1))
    a, b, _ = rows[k]
    scan = [i for i, (u, v, _) in enumerate(rows) if {u, v} == {a, b}]
    got = io.read_links(pa.table({"x": [b], "y": [a]}), edges, parallel="all")
    assert sorted(got.positions.tolist()) == scan and got.named_by == "pair"
    assert got.several == ([(b, a, len(scan))] if len(scan) > 1 else [])
    light = min(scan, key=lambda i: (rows[i][2], i))
    assert io.read_links(pa.table({"x": [a], "y": [b]}), edges,
                         parallel="lightest").positions.tolist() == [light]
    assert io.read_links(pa.table({"id": [f"L{k}"]}), edges).positions.tolist() == [k]
    assert io.read_links(pa.table({"position": [k]}), edges).positions.tolist() == [k]


def test_bad_names_are_clear_errors(tmp_path):
    edges = _edges([("a", "b", 1), ("b", "c", 2)])
    with pytest.raises(io.FileFormatError, match="link id 'L9' is not in column 'id'"):
        io.read_links(pa.table({"id": ["L9"]}), edges)
    with pytest.raises(io.FileFormatError, match="node 'z' is not a node"):
        io.read_links(pa.table({"x": ["a"], "y": ["z"]}), edges)
    with pytest.raises(io.FileFormatError, match="no link joins 'a' and 'c'"):
        io.read_links(pa.table({"x": ["a"], "y": ["c"]}), edges)
    with pytest.raises(io.FileFormatError, match="position 5 is not an edge"):
        io.read_links(pa.table({"position": [5]}), edges)
    with pytest.raises(ValueError, match="parallel must be 'all' or 'lightest'"):
        io.read_links(pa.table({"position": [0]}), edges, parallel="some")


def test_edge_table_layout_matches_forest_table():
    """io.edge_table of the forest's positions is io.forest_table of the forest."""
    edges = _edges([("a", "b", 3), ("b", "c", 2), ("c", "a", 1), ("c", "d", 5)])
    f = edges.solve()
    assert io.edge_table(edges, f.edges).equals(io.forest_table(f, edges))
    assert io.edge_table(edges).num_rows == 4
    assert io.edge_table(edges, [3], columns=[]).column_names == ["u", "v", "w", "position"]
