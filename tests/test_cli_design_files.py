"""Design and forest files given to the command line: every design command carries the
caution, and a file with a fault (a link listed twice, a forest that is not one, a design that
uses an excluded link or a link both required and excluded) is explained in the file's terms.
Minimum spanning forests are compared with networkx's ``minimum_spanning_edges``.
"""
from __future__ import annotations

import csv
import json

import networkx as nx
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from fastmst import cli
from fastmst.cli.common import CAUTION
from cli_reference import (  # noqa: F401  (files: a fixture)
    _write, files, DESIGN_COMMANDS, COLUMNS, _network, _mst_positions, _write_forest, _run,
    _no_internals, FAULTY)


@pytest.mark.parametrize("mode", ["plain", "--quiet", "--json"])
@pytest.mark.parametrize("command", sorted(DESIGN_COMMANDS))
def test_every_design_command_carries_the_caution(files, command, mode, capsys):
    """The caution (a spanning tree has no redundancy; licensed engineers and local codes)
    comes with every command's output: on stdout after the summary, on stderr with --quiet
    (--help: "errors and the caution still print"), in the JSON summary with --json.  check,
    margins, path and what-if dropped it with --quiet; clusters never printed it."""
    argv = DESIGN_COMMANDS[command](files) + COLUMNS + ([] if mode == "plain" else [mode])
    rc = cli.main(argv)
    out, err = capsys.readouterr()
    assert rc == 0, (rc, out, err)
    if mode == "--json":
        assert CAUTION in json.loads(out)["caution"]
        assert CAUTION not in err
    elif mode == "--quiet":
        assert CAUTION in err
        assert out.strip() == "", out
    else:
        assert CAUTION in out
# --- a forest or design file with a fault: told in the file's terms -------------------------------


@FAULTY
@given(links=_network(), by=st.sampled_from(["position", "pair"]),
       command=st.sampled_from(["check", "failures", "backup"]), data=st.data())
def test_a_link_listed_twice_names_both_rows(tmp_path, capsys, links, by, command, data):
    """A forest or --design file naming one link on two rows: exit 1 and a message naming both
    data rows and the link by its labels (it was the library's 'edges[1] = 0 repeats
    edges[0] ... np.unique(edges)')."""
    tree = _mst_positions(links)
    i = data.draw(st.integers(0, len(tree) - 1), label="repeated row")
    at = data.draw(st.integers(0, len(tree)), label="inserted at")
    rows = tree[:at] + [tree[i]] + tree[at:]
    edges = _write(tmp_path / "links.csv", ["from", "to", "cost"], links)
    forest = _write_forest(tmp_path / "forest.csv", links, rows, by)
    argv = ([command, edges, forest] if command == "check" else
            [command, edges, "--design", forest]) + COLUMNS
    rc, out, err = _run(argv, capsys)
    assert rc == 1, (rc, out, err)
    first, second = sorted(k for k, p in enumerate(rows) if p == tree[i])
    assert f"data rows {first + 1} and {second + 1} both name the link" in err, err
    a, b, _ = links[tree[i]]
    assert f"{a} -- {b}" in err and f"position {tree[i]}" in err, err
    _no_internals(err)


@FAULTY
@given(links=_network(), by=st.sampled_from(["position", "pair"]),
       fault=st.sampled_from(["cycle", "gap"]), data=st.data())
def test_a_faulty_forest_is_explained_in_labels(tmp_path, capsys, links, by, fault, data):
    """A forest that closes a cycle or leaves two of its trees joinable: ``check`` exits 3 and
    names the link that shows it, in labels (the excess read 'nan' with no reason);
    ``failures --design`` and ``backup --design`` exit 1 naming it in labels (they said
    'the link at position 1 (1-2)', compact node ids).  The named link is checked with
    networkx: its ends are joined by the other given links (cycle) or not (gap)."""
    tree = _mst_positions(links)
    others = sorted(set(range(len(links))) - set(tree))
    if fault == "cycle":
        assume(others)
        given_ = sorted(tree + [data.draw(st.sampled_from(others), label="added")])
    else:
        drop = data.draw(st.sampled_from(tree), label="dropped")
        given_ = [p for p in tree if p != drop]
    edges = _write(tmp_path / "links.csv", ["from", "to", "cost"], links)
    forest = _write_forest(tmp_path / "forest.csv", links, given_, by)

    rc, out, err = _run(["check", edges, forest, "--json"] + COLUMNS, capsys)
    assert rc == 3, (rc, out, err)
    report = json.loads(out)
    key = "closes a cycle" if fault == "cycle" else "joins two of the forest's trees"
    if fault == "cycle":
        named = report["closes_a_cycle"]
        assert named is not None and named["position"] in given_
    else:
        assert report["closes_a_cycle"] is None and report["joins_trees"]["links"] >= 1
        named = report["joins_trees"]["first"][0]
        assert named["position"] not in given_
    assert (named["tail"], named["head"]) == links[named["position"]][:2]
    g = nx.Graph()
    g.add_nodes_from({x for a, b, _ in links for x in (a, b)})
    g.add_edges_from(links[p][:2] for p in given_ if p != named["position"])
    assert nx.has_path(g, named["tail"], named["head"]) == (fault == "cycle")

    rc, out, err = _run(["check", edges, forest] + COLUMNS, capsys)
    assert rc == 3 and key in out and "nan" not in out, out
    assert f"{named['tail']} -- {named['head']}" in out, out

    for command in ("failures", "backup"):
        rc, out, err = _run([command, edges, "--design", forest] + COLUMNS, capsys)
        assert rc == 1, (command, rc, out, err)
        assert "not a spanning forest" in err and key in err, err
        assert f"{named['tail']} -- {named['head']}" in err, err
        _no_internals(err)

@FAULTY
@given(links=_network(), command=st.sampled_from(["failures", "backup"]), data=st.data())
def test_a_design_using_an_excluded_link_names_it(tmp_path, capsys, links, command, data):
    """--design with --excluded that removes some of its links: exit 1 naming the first such
    link in labels (it said 'link_failures: forest holds the excluded link at position 0');
    excluding only links outside the design runs (exit 0).  The design is networkx's minimum
    spanning tree."""
    tree = _mst_positions(links)
    excluded = sorted(data.draw(st.sets(st.integers(0, len(links) - 1), min_size=1),
                                label="excluded"))
    edges = _write(tmp_path / "links.csv", ["from", "to", "cost"], links)
    design = _write_forest(tmp_path / "design.csv", links, tree, "position")
    banned = _write(tmp_path / "banned.csv", ["position"], [(p,) for p in excluded])
    rc, out, err = _run([command, edges, "--design", design, "--excluded", banned] + COLUMNS,
                        capsys)
    used = [p for p in excluded if p in tree]
    if not used:
        assert rc == 0, (rc, err)
        return
    assert rc == 1, (rc, out, err)
    a, b, _ = links[used[0]]
    assert f"the design uses {a} -- {b}" in err and f"position {used[0]}" in err, err
    _no_internals(err)


@FAULTY
@given(links=_network(), command=st.sampled_from(["solve", "check", "clusters", "margins",
                                                   "what-if", "failures", "backup"]),
       by=st.sampled_from(["position", "pair"]), data=st.data())
def test_a_link_both_required_and_excluded_names_it(tmp_path, capsys, links, command, by,
                                                    data):
    """--required and --excluded sharing a link: exit 1 naming the link in labels and both
    files (it was 'minimum_spanning_forest: positions [0] are both required and excluded')."""
    k = data.draw(st.integers(0, len(links) - 1), label="shared link")
    edges = _write(tmp_path / "links.csv", ["from", "to", "cost", "surface"],
                   [(a, b, w, "road") for a, b, w in links])
    must = _write_forest(tmp_path / "must.csv", links, [k], by)
    ban = _write_forest(tmp_path / "ban.csv", links, [k], by)
    forest = _write_forest(tmp_path / "forest.csv", links, _mst_positions(links), "position")
    line = {"solve": ["solve", edges], "check": ["check", edges, forest],
            "clusters": ["clusters", edges, "-k", "2"], "margins": ["margins", edges],
            "what-if": ["what-if", edges, "--by", "surface", "--scale", "road=2"],
            "failures": ["failures", edges], "backup": ["backup", edges]}[command]
    rc, out, err = _run(line + COLUMNS + ["--required", must, "--excluded", ban], capsys)
    assert rc == 1, (rc, out, err)
    a, b, _ = links[k]
    assert f"{a} -- {b}" in err and "is both required and excluded" in err, err
    assert f"--required {must}" in err and f"--excluded {ban}" in err, err
    _no_internals(err)


@pytest.mark.parametrize("command", ["backup", "failures", "shallow"])
@pytest.mark.parametrize("header", [["position", "why", "weight"], ["a", "b", "why"],
                                    ["why", "position", "w"]])
def test_design_link_tables_keep_every_value(tmp_path, capsys, command, header):
    """Input columns named like the link table's own columns (position, why) are renamed, not
    overwritten: the labels and weights written are those of the input rows."""
    rows = [["a", "b", "1"], ["b", "c", "2"], ["a", "c", "3"], ["c", "d", "4"], ["b", "d", "5"]]
    src = tmp_path / "e.csv"
    _write(src, header, rows)
    out = tmp_path / "o.csv"
    argv = [command, str(src), "-o", str(out), "-q"]
    if command == "shallow":
        argv += ["--root", "a"]
    _run(argv, capsys)
    with open(out, newline="") as fh:
        table = list(csv.DictReader(fh))
    names = list(table[0])
    assert names.count("position") == 1 and names.count("why") == 1
    tn, hn, wn = names[:3]
    for r in table:
        p = int(r["position"])
        assert (r[tn], r[hn], r[wn]) == tuple(rows[p])
