"""Defects a demanding user of the ``fastmst`` command line met, each tested as a class.

Runs in-process through ``fastmst.cli.main`` (the same code as the ``fastmst`` command; it
returns the exit code).  Minimum spanning forests are compared with networkx's
``minimum_spanning_edges`` where a check depends on which links are optimal.
"""
from __future__ import annotations

import csv
import json
import re
from pathlib import Path

import networkx as nx
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from fastmst import cli
from fastmst.cli import common, paths, solve
from conftest import write_csv
from fastmst.cli.common import CAUTION

LINKS = [("depot", "north", 4.0), ("north", "east", 1.5), ("east", "depot", 2.0),
         ("east", "south", 3.0), ("south", "depot", 3.5), ("west", "depot", 6.0),
         ("west", "south", 5.0), ("north", "west", 9.0)]


_write = write_csv


@pytest.fixture
def files(tmp_path):
    links = _write(tmp_path / "links.csv", ["from", "to", "cost", "surface"],
                   [(a, b, w, "road" if k % 2 else "verge") for k, (a, b, w) in
                    enumerate(LINKS)])
    # the minimum spanning tree of LINKS (networkx minimum_spanning_edges gives the same:
    # north-east 1.5, east-depot 2, east-south 3, west-south 5)
    forest = _write(tmp_path / "forest.csv", ["from", "to"],
                    [("north", "east"), ("east", "depot"), ("east", "south"),
                     ("west", "south")])
    return {"links": links, "forest": forest, "dir": tmp_path}


# every command whose output can feed the design of a network, with its own arguments
DESIGN_COMMANDS = {
    "solve": lambda f: ["solve", f["links"]],
    "check": lambda f: ["check", f["links"], f["forest"]],
    "clusters": lambda f: ["clusters", f["links"], "-k", "2"],
    "margins": lambda f: ["margins", f["links"]],
    "path": lambda f: ["path", f["links"], "west", "north"],
    "what-if": lambda f: ["what-if", f["links"], "--by", "surface", "--scale", "road=2"],
    "failures": lambda f: ["failures", f["links"]],
    "backup": lambda f: ["backup", f["links"]],
    "feeders": lambda f: ["feeders", f["links"], "--root", "depot", "--capacity", "3"],
    "shallow": lambda f: ["shallow", f["links"], "--root", "depot"],
}
COLUMNS = ["--tail", "from", "--head", "to", "--weight", "cost"]


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

@st.composite
def _network(draw):
    """A connected simple graph on 3-12 sites (a random spanning tree plus extra links) with
    text labels and integer or decimal weights."""
    n = draw(st.integers(3, 12))
    labels = [f"S{draw(st.integers(0, 9))}{k:02d}" for k in range(n)]
    pairs = {(draw(st.integers(0, k - 1)), k) for k in range(1, n)}
    extra = draw(st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)),
                          min_size=1, max_size=2 * n))
    pairs |= {(min(a, b), max(a, b)) for a, b in extra if a != b}
    pairs = sorted(pairs)
    decimal = draw(st.booleans())
    weights = [draw(st.integers(1, 30)) / (4 if decimal else 1) for _ in pairs]
    return [(labels[a], labels[b], w) for (a, b), w in zip(pairs, weights)]


def _mst_positions(links):
    """Positions of a minimum spanning tree (networkx minimum_spanning_edges, Kruskal)."""
    g = nx.Graph()
    for p, (a, b, w) in enumerate(links):
        g.add_edge(a, b, weight=w, position=p)
    return sorted(d["position"] for _, _, d in
                  nx.minimum_spanning_edges(g, algorithm="kruskal", data=True))


def _write_forest(path, links, positions, by):
    if by == "position":
        return _write(path, ["position"], [(p,) for p in positions])
    return _write(path, ["from", "to"], [links[p][:2] for p in positions])


def _run(argv, capsys):
    rc = cli.main(argv)
    out, err = capsys.readouterr()
    return rc, out, err


def _no_internals(text):
    """Messages speak of the file and its labels, not of the Python API."""
    for word in ("np.unique", "check_forest", "link_failures", "backup_links",
                 "minimum_spanning_forest(", "forest[", "edges["):
        assert word not in text, text


FAULTY = settings(max_examples=25, deadline=None,
                  suppress_health_check=[HealthCheck.function_scoped_fixture])


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


# --- demo: its folder never holds the user's files; its numbers are checked first ------------------

@pytest.fixture(scope="module")
def demo_files(tmp_path_factory):
    """The names of the files a small demo writes (from a real run's folder)."""
    out = tmp_path_factory.mktemp("demo") / "d"
    assert cli.main(["demo", "--out", str(out), "--sites", "20", "--no-plot", "--quiet"]) == 0
    return sorted(p.name for p in out.iterdir())


_NAME = st.text(st.characters(whitelist_categories=("Ll", "Lu", "Nd"), whitelist_characters="_-"),
                min_size=1, max_size=12)


@settings(max_examples=30, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(data=st.data(), content=st.binary(max_size=200))
def test_demo_never_replaces_the_users_files(tmp_path_factory, demo_files, capsys, data,
                                             content):
    """``demo --out DIR`` on a folder holding files the demo did not write (any name: one the
    demo writes, such as sites.csv, or another) is refused with exit 2 before anything is
    written, and every file stays byte for byte; it replaced sites.csv and the rest."""
    folder = tmp_path_factory.mktemp("user")
    names = data.draw(st.lists(st.one_of(st.sampled_from(demo_files),
                                         _NAME.map(lambda s: s + ".csv")),
                               min_size=1, max_size=4, unique=True), label="user files")
    for k, name in enumerate(names):
        (folder / name).write_bytes(content + bytes([k]))
    rc, out, err = _run(["demo", "--out", str(folder), "--sites", "20", "--no-plot"], capsys)
    assert rc == 2, (rc, out, err)
    assert f"--out {folder}" in err and "did not write" in err, err
    assert sorted(p.name for p in folder.iterdir()) == sorted(names)
    for k, name in enumerate(names):
        assert (folder / name).read_bytes() == content + bytes([k])


def test_demo_out_is_a_file_or_cannot_be_made(tmp_path, capsys):
    """--out naming a file is refused and the file kept ('[Errno 17] File exists' before); a
    folder that cannot be made is one message naming --out; exit 1 (a wrong path)."""
    f = tmp_path / "notes.csv"
    f.write_text("mine\n")
    rc, out, err = _run(["demo", "--out", str(f), "--sites", "20", "--no-plot"], capsys)
    assert rc == 1 and f"--out {f}: is a file" in err and "Errno" not in err and f.read_text() == "mine\n", (rc, err)
    rc, out, err = _run(["demo", "--out", str(f / "sub"), "--sites", "20", "--no-plot"], capsys)
    assert rc == 1 and f"--out {f / 'sub'}: cannot create the folder" in err, (rc, err)
    assert "Errno" not in err and f.read_text() == "mine\n"


def test_demo_rerun_into_its_own_folder(tmp_path, capsys):
    """A folder an earlier demo wrote may be written again (its files are replaced)."""
    out = str(tmp_path / "d")
    for seed in ("1", "2"):
        rc, _, err = _run(["demo", "--out", out, "--sites", "20", "--seed", seed,
                           "--no-plot", "--quiet"], capsys)
        assert rc == 0, err
    assert "--seed 2" in (tmp_path / "d" / "README.txt").read_text()


@pytest.mark.parametrize("option, value", [
    ("--sites", -5), ("--sites", 0), ("--sites", 9), ("--sites", 1_000_001),
    ("--sites", 10**11), ("--sites", 10**30), ("--seed", -1), ("--seed", -2**70)])
def test_demo_numbers_checked_before_any_work(tmp_path, capsys, option, value):
    """Out-of-range --sites and --seed: exit 2 with a message naming the option and its value,
    before any folder is made or array allocated (10**11 sites tried to allocate 559 GiB; a
    negative seed said only 'expected non-negative integer')."""
    argv = ["demo", "--out", str(tmp_path / "d"), "--no-plot", option, str(value)]
    rc, out, err = _run(argv, capsys)
    assert rc == 2, (rc, out, err)
    assert f"{option} {value:,}" in err or f"{option} {value}" in err, err
    assert not (tmp_path / "d").exists()


# --- output paths that cannot be written: refused before any work ---------------------------------

# every output option of every command, with the rest of a command line that works
OUTPUTS = [
    ("solve", "-o", ".csv", lambda f: ["solve", f["links"]]),
    ("solve", "--unconnected", ".csv", lambda f: ["solve", f["links"]]),
    ("check", "--swaps-output", ".csv", lambda f: ["check", f["links"], f["forest"]]),
    ("clusters", "-o", ".csv", lambda f: ["clusters", f["links"], "-k", "2"]),
    ("margins", "-o", ".parquet", lambda f: ["margins", f["links"]]),
    ("path", "-o", ".csv", lambda f: ["path", f["links"], "west", "north"]),
    ("what-if", "-o", ".tsv", lambda f: ["what-if", f["links"], "--by", "surface",
                                         "--scale", "road=2"]),
    ("failures", "-o", ".csv", lambda f: ["failures", f["links"]]),
    ("backup", "-o", ".npz", lambda f: ["backup", f["links"]]),
    ("feeders", "-o", ".csv", lambda f: ["feeders", f["links"], "--root", "depot",
                                         "--capacity", "3"]),
    ("shallow", "-o", ".csv", lambda f: ["shallow", f["links"], "--root", "depot"]),
    ("solve", "--plot", ".png", lambda f: ["solve", f["links"], "--nodes", f["sites"]]),
    ("failures", "--plot", ".png", lambda f: ["failures", f["links"], "--nodes", f["sites"]]),
]


@pytest.mark.parametrize("kind", ["folder", "missing folder", "file as folder"])
@pytest.mark.parametrize("command, option, suffix, line", OUTPUTS,
                         ids=[f"{c}{o}" for c, o, _, _ in OUTPUTS])
def test_an_output_that_cannot_be_written_is_refused_first(files, capsys, command, option,
                                                           suffix, line, kind):
    """An output naming a folder, a file in a folder that does not exist, or a file under a
    file: exit 1 (a missing or wrong file, docs/files-and-cli.md) with a message naming the
    option and the path, before the edges are read; nothing written.  (It read and solved
    first, then failed with '[Errno 21] cannot write 'x.csv': cannot write 'x.csv': it is a
    folder'.)"""
    d = files["dir"]
    files["sites"] = _write(d / "sites.csv", ["id", "x", "y"],
                            [(s, k, k * k % 5) for k, s in
                             enumerate(["depot", "north", "east", "south", "west"])])
    (d / ("taken" + suffix)).mkdir()
    target = {"folder": d / ("taken" + suffix),
              "missing folder": d / "no" / "such" / ("out" + suffix),
              "file as folder": Path(files["links"]) / ("out" + suffix)}[kind]
    before = sorted(p.name for p in d.rglob("*"))
    argv = line(files) + COLUMNS + [option, str(target)]
    rc, out, err = _run(argv, capsys)
    assert rc == 1, (rc, out, err)
    assert err.startswith(f"fastmst {command}: error: {option} {target}:"), err
    assert "Errno" not in err and "Traceback" not in err
    assert "reading" not in out + err
    assert sorted(p.name for p in d.rglob("*")) == before


@given(cls=st.sampled_from([OSError, PermissionError, FileNotFoundError, IsADirectoryError,
                            NotADirectoryError]),
       errno_=st.integers(1, 130), words=st.text(min_size=1, max_size=30),
       name=st.one_of(st.none(), st.text(min_size=1, max_size=20)))
def test_os_errors_print_without_errno_prefix(cls, errno_, words, name):
    """Operating-system errors reach the screen in their own words with the file name, never as
    '[Errno N] ...' (common practice, no source: the number means nothing to users)."""
    exc = cls(errno_, words) if name is None else cls(errno_, words, name)
    text = paths.os_error_text(exc)
    assert "[Errno" not in text and words in text
    if name is not None:
        assert name in words or repr(name) in text


def test_an_os_error_at_write_time_is_one_message(files, capsys, monkeypatch):
    """A write that fails after all checks (a full disk, a permission): exit 1, one line with
    the operating system's words and no '[Errno N]'."""
    def fail(*a, **k):
        raise PermissionError(13, "Permission denied", "out.csv")
    monkeypatch.setattr(solve, "run", fail)
    rc, out, err = _run(["solve", files["links"]] + COLUMNS, capsys)
    assert rc == 1 and err == "fastmst solve: error: Permission denied: 'out.csv'\n", err


# --- what-if: scaled weights exact, unscaled ones untouched, overflow refused ----------------------

@st.composite
def _scenario(draw):
    """A connected graph with integer weights of any size (beyond 2**53 too) in two or three
    categories, and factors for some of them (whole numbers or not)."""
    n = draw(st.integers(3, 9))
    pairs = {(draw(st.integers(0, k - 1)), k) for k in range(1, n)}
    extra = draw(st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)),
                          max_size=2 * n))
    pairs = sorted(pairs | {(min(a, b), max(a, b)) for a, b in extra if a != b})
    big = draw(st.sampled_from([2 ** 20, 2 ** 53, 2 ** 62]))
    weights = [draw(st.integers(-big, big)) for _ in pairs]
    cats = [draw(st.sampled_from("xyz")) for _ in pairs]
    scaled = draw(st.lists(st.sampled_from(sorted(set(cats))), min_size=1, unique=True))
    factors = {c: draw(st.one_of(st.integers(0, 3), st.sampled_from([0.5, 1.25, 2.5])))
               for c in scaled}
    return n, pairs, weights, cats, factors


def _nx_total(n, pairs, weights):
    """Minimum spanning tree weight by networkx (exact on Python ints and floats alike)."""
    g = nx.Graph()
    g.add_nodes_from(range(n))
    for (a, b), w in zip(pairs, weights):
        g.add_edge(a, b, weight=w)
    return sum(d["weight"] for _, _, d in nx.minimum_spanning_edges(g, data=True))


@settings(max_examples=60, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(sc=_scenario())
def test_what_if_scales_exactly_or_refuses(tmp_path_factory, capsys, sc):
    """what-if multiplies the chosen categories' weights and leaves every other weight as read:
    integer weights under whole-number factors stay exact integers (they went through float64:
    weights beyond 2**53 were rounded and '--scale x=1' reported a saving of 16); a factor that
    is not whole on integers beyond 2**53, and a product beyond int64, are refused naming the
    option (an overflow ended in "unsupported operand type(s) for -: 'str' and 'float'").
    Totals are checked with networkx minimum_spanning_edges on exact Python numbers."""
    n, pairs, weights, cats, factors = sc
    d = tmp_path_factory.mktemp("whatif")
    links = _write(d / "links.csv", ["from", "to", "cost", "surface"],
                   [(f"n{a}", f"n{b}", w, c) for (a, b), w, c in zip(pairs, weights, cats)])
    argv = ["what-if", links, "--by", "surface", "--json"] + COLUMNS
    for c, f in factors.items():
        argv += ["--scale", f"{c}={f}"]
    rc, out, err = _run(argv, capsys)
    whole = all(float(f).is_integer() for f in factors.values())
    new = [w * int(factors[c]) if whole and c in factors else
           (w * factors[c] if c in factors else w) for w, c in zip(weights, cats)]
    if whole and any(abs(v) > 2 ** 63 - 1 for v in new):
        assert rc == 1 and "--scale" in err and "beyond the int64" in err, (rc, err)
        return
    if not whole and max(abs(w) for w in weights) > 2 ** 53:
        assert rc == 1 and "2**53" in err, (rc, err)
        return
    assert rc == 0, (rc, err)
    if not whole:
        new = [float(w) * factors[c] if c in factors else float(w)
               for w, c in zip(weights, cats)]
    r = json.loads(out)
    before, after = _nx_total(n, pairs, weights), _nx_total(n, pairs, new)
    assert r["total_before"] == pytest.approx(float(before), rel=1e-14, abs=1e-9)
    assert r["total_after"] == pytest.approx(float(after), rel=1e-14, abs=1e-9)
    assert r["saving_from_redesign"] >= 0
    if all(f == 1 for f in factors.values()):   # nothing changes, to the last digit
        assert r["saving_from_redesign"] == 0
        assert r["links_entering"] == r["links_leaving"] == 0
        assert r["total_after"] == r["total_before"]


def test_what_if_one_category_scaled_twice_is_refused(files, capsys):
    """--scale naming one category twice: exit 2 naming both (the last factor won silently)."""
    rc, out, err = _run(["what-if", files["links"], "--by", "surface", "--scale", "road=2",
                         "--scale", "road=3"] + COLUMNS, capsys)
    assert rc == 2 and "'road=3'" in err and "'road=2'" in err, (rc, err)


# --- numbers on the screen: never digits the value does not have ----------------------------------

def _significant(text: str) -> int:
    mantissa = text.replace(",", "").lstrip("-").split("e")[0].replace(".", "")
    return len(mantissa.lstrip("0").rstrip("0")) if "." in text or "e" in text else \
        len(mantissa.lstrip("0"))


@given(x=st.one_of(st.floats(allow_nan=False, allow_infinity=False),
                   st.floats(min_value=1e12, max_value=1e17),
                   st.integers(-2 ** 53, 2 ** 53).map(float)))
def test_screen_numbers_read_back_without_spurious_digits(x):
    """fmt_num: from 1e13 up the text reads back as exactly the value (shortest round trip,
    as Python's repr; common practice, no source), so 1e308 prints '1e+308', not 309 digits
    of its binary expansion; an integer up to 2**53 prints exactly; no text has more than 17
    significant digits (float64 carries at most 17)."""
    text = common.fmt_num(x)
    if abs(x) >= 1e13 or (x == int(x) and abs(x) <= 2 ** 53):
        assert float(text.replace(",", "")) == x, (x, text)
    if x == int(x) and abs(x) <= 2 ** 53:
        assert text.replace(",", "") == str(int(x))
    assert _significant(text) <= 17, (x, text)


def test_huge_weights_print_as_written(tmp_path, capsys):
    """A weight of 1e308 in the summary reads 1e+308."""
    links = _write(tmp_path / "l.csv", ["from", "to", "cost"], [("a", "b", "1e308"),
                                                                 ("b", "c", "2")])
    rc, out, err = _run(["solve", links] + COLUMNS, capsys)
    assert rc == 0 and "total weight       1e+308" in out and "weight 1e+308" in out, out


# --- feeders --demand: a bad demand is named by its row and site ----------------------------------

_SITES = ["depot", "north", "east", "south", "west"]
_BAD = {"empty": None, "negative": -2.5, "nan": float("nan"), "inf": float("inf"),
        "-inf": float("-inf")}


@settings(max_examples=40, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(rows=st.lists(st.tuples(st.sampled_from(_SITES[1:]),
                               st.one_of(st.floats(0, 3), st.sampled_from(sorted(_BAD)))),
                     min_size=1, max_size=6),
       fmt=st.sampled_from(["csv", "parquet"]))
def test_a_bad_demand_names_its_row_and_site(tmp_path_factory, capsys, rows, fmt):
    """A demand that is empty, negative, NaN or infinite: exit 1 naming the file, the data row
    and the site's label (it was 'capacitated_tree: demand[1] = nan', a compact node id);
    valid demands solve (exit 0).  CSV and Parquet."""
    import pyarrow as pa
    import pyarrow.parquet as pq
    d = tmp_path_factory.mktemp("demand")
    links = _write(d / "links.csv", ["from", "to", "cost"], LINKS)
    values = [_BAD[v] if isinstance(v, str) else v for _, v in rows]
    path = d / f"demand.{fmt}"
    if fmt == "csv":
        _write(path, ["site", "demand"],
               [(s, "" if v is None else repr(v)) for (s, _), v in zip(rows, values)])
    else:
        pq.write_table(pa.table({"site": [s for s, _ in rows],
                                 "demand": pa.array(values, pa.float64())}), path)
    rc, out, err = _run(["feeders", links, "--root", "depot", "--capacity", "100",
                         "--demand", str(path)] + COLUMNS, capsys)
    bad = [k for k, (_, v) in enumerate(rows) if isinstance(v, str)]
    if not bad:
        assert rc == 0, (rc, err)
        return
    assert rc == 1, (rc, out, err)
    k = bad[0]
    where = f"data row {k + 1}" if fmt == "csv" else f"row {k} (counting from 0)"
    assert where in err and f"site {rows[k][0]!r}" in err, err
    assert "demand[" not in err and "capacitated_tree" not in err, err


# --- a site named on the command line: one rule for FROM/TO and --root ----------------------------

@settings(max_examples=30, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(numbers=st.lists(st.integers(0, 999), min_size=3, max_size=6, unique=True),
       pad=st.integers(1, 4), integer_ids=st.booleans(), data=st.data())
def test_site_names_match_alike_in_every_command(tmp_path_factory, capsys, numbers, pad,
                                                  integer_ids, data):
    """A site given on the command line is matched by one rule in path (FROM/TO) and in
    --root (failures, shallow): as written, or with --integer-ids as an integer ('007 is node
    7', --help).  path compared text only, so 'path links.csv 01 4 --integer-ids' failed where
    '--root 01' found the site."""
    d = tmp_path_factory.mktemp("names")
    labels = [str(k).zfill(pad) for k in numbers]
    chain = [(labels[i], labels[i + 1], i + 1) for i in range(len(labels) - 1)]
    links = _write(d / "links.csv", ["from", "to", "cost"], chain)
    k = data.draw(st.integers(0, len(numbers) - 1), label="site")
    spelling = data.draw(st.sampled_from([labels[k], str(numbers[k]), "+" + str(numbers[k]),
                                          str(numbers[k]).zfill(pad + 1)]), label="spelling")
    other = labels[-1] if k != len(labels) - 1 else labels[0]
    ids = ["--integer-ids"] if integer_ids else []
    expect = spelling == labels[k] or integer_ids
    results = {}
    for name, argv in (("path", ["path", links, spelling, other]),
                       ("path TO", ["path", links, other, spelling]),
                       ("failures", ["failures", links, "--root", spelling]),
                       ("shallow", ["shallow", links, "--root", spelling])):
        rc, out, err = _run(argv + COLUMNS + ids + ["--json"], capsys)
        results[name] = rc
        if rc == 0 and name.startswith("path"):
            route = json.loads(out)["links"]
            hops = len(labels) - 1 - k if other == labels[-1] else k   # along the chain
            assert len(route) == hops, (route, k, labels)
        if rc:
            assert "Traceback" not in err and spelling in err, err
    assert set(results.values()) == {0 if expect else 1}, (results, spelling, labels[k])


# --- counts on the command line: refused out of range, before any work -----------------------------

@pytest.mark.parametrize("command", ["solve", "bench"])
@given(n=st.integers(-2 ** 70, -1))
def test_a_negative_thread_count_is_refused(tmp_path_factory, command, n):
    """--threads below 0: exit 1 naming the option (a negative count meant every core
    without a word); checked before the edges are read (the file named does not exist)."""
    import io as _io
    import contextlib
    missing = str(tmp_path_factory.getbasetemp() / "not-there.csv")
    err = _io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(_io.StringIO()):
        rc = cli.main([command, missing, "--threads", str(n)])
    assert rc == 1 and err.getvalue().startswith(f"fastmst {command}: error: --threads {n}:"), \
        err.getvalue()


@pytest.mark.parametrize("threads", ["0", "1", "2"])
def test_thread_counts_give_one_forest(files, capsys, threads):
    """0 (every core), 1 and 2 threads: the same total as networkx minimum_spanning_edges."""
    rc, out, err = _run(["solve", files["links"], "--threads", threads, "--json"] + COLUMNS,
                        capsys)
    assert rc == 0, err
    assert json.loads(out)["total_weight"] == _nx_total(
        5, [(a, b) for a, b, _ in LINKS], [w for _, _, w in LINKS])


@pytest.mark.parametrize("repeat", [-1, 0, 1001, 10 ** 12])
def test_bench_repeat_is_bounded(files, capsys, repeat):
    """bench --repeat outside 1..1000: exit 2 before reading (10**12 runs ran for ever)."""
    rc, out, err = _run(["bench", files["links"], "--repeat", str(repeat)] + COLUMNS, capsys)
    assert rc == 2 and f"--repeat {repeat}: expected 1 to 1000" in err, (rc, err)


# --- --help promises only what the command does -----------------------------------------------------

_LONLAT = [("depot", 10.00, 50.00), ("north", 10.01, 50.02), ("east", 10.03, 50.00),
           ("south", 10.01, 49.98), ("west", 9.97, 50.00)]


def _help(command):
    parser = cli.build_parser()
    sub = next(a for a in parser._actions if a.dest == "command")
    return sub.choices[command].format_help()


def _promised(help_text):
    """(suffixes the -o help names, whether --plot is offered)."""
    flat = " ".join(help_text.split())
    o = re.search(r"-o OUT, --output OUT (.*?) repeat for several files", flat)
    suffixes = re.findall(r"\.(csv\.gz|csv|tsv|parquet|npz|geojson|gpkg)\b", o.group(1)) \
        if o else []
    return suffixes, "--plot FILE.png" in flat


@pytest.mark.parametrize("command", sorted(DESIGN_COMMANDS))
def test_every_output_the_help_offers_is_written(files, capsys, command):
    """Each suffix that a command's -o help lists, and --plot when the help offers it, is
    written (with a node table of longitude/latitude); margins and path offered --plot and
    .geojson in their help and refused both."""
    suffixes, plot = _promised(_help(command))
    if command == "check":
        assert not suffixes and not plot
        return
    assert suffixes, command
    sites = _write(files["dir"] / "sites.csv", ["id", "lon", "lat"], _LONLAT)
    for k, suffix in enumerate(suffixes):
        target = files["dir"] / f"out{k}.{suffix}"
        rc, out, err = _run(DESIGN_COMMANDS[command](files) + COLUMNS +
                            ["--nodes", sites, "-o", str(target), "-q"], capsys)
        assert rc == 0 and target.is_file() and target.stat().st_size, (suffix, rc, err)
    if plot:
        target = files["dir"] / "map.png"
        rc, out, err = _run(DESIGN_COMMANDS[command](files) + COLUMNS +
                            ["--nodes", sites, "--plot", str(target), "-q"], capsys)
        assert rc == 0 and target.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n", (rc, err)
    else:   # not offered: refused with a pointer to the command that draws maps
        rc, out, err = _run(DESIGN_COMMANDS[command](files) + COLUMNS +
                            ["--plot", str(files["dir"] / "m.png")], capsys)
        assert rc == 2 and "draws no map" in err, (rc, err)


# --- GeoJSON from planar coordinates: refused before the solve -------------------------------------

@pytest.mark.parametrize("command", ["solve", "clusters", "what-if"])
def test_geojson_from_planar_coordinates_is_refused_before_solving(files, capsys, monkeypatch,
                                                                   command):
    """-o .geojson with a node table of planar x/y: exit 1 naming -o, before any solve (the
    writer refused it only after the whole run)."""
    import fastmst

    def no_solve(*a, **k):
        raise AssertionError("solved before refusing the output")
    monkeypatch.setattr(fastmst, "minimum_spanning_forest", no_solve)
    sites = _write(files["dir"] / "xy.csv", ["id", "x", "y"],
                   [(s, 1000.0 * k, 500.0 * k * k) for k, s in enumerate(_SITES)])
    target = files["dir"] / "plan.geojson"
    rc, out, err = _run(DESIGN_COMMANDS[command](files) + COLUMNS +
                        ["--nodes", sites, "--planar", "-o", str(target)], capsys)
    assert rc == 1 and f"-o {target}: the coordinates" in err and "planar" in err, (rc, err)
    assert not target.exists()


# --- a reader that stops early ----------------------------------------------------------------------

@pytest.mark.parametrize("command", ["path", "what-if"])
def test_a_closed_pipe_ends_quietly(tmp_path, command):
    """'fastmst ... | head': when the reader closes stdout the run ends without a message
    (it printed 'error: Broken pipe'); exit code 1.  Runs the real command in a subprocess
    importing fastmst from where this test imported it."""
    import os
    import subprocess
    import sys
    from pathlib import Path
    import fastmst
    n = 6000
    links = _write(tmp_path / "chain.csv", ["from", "to", "cost", "surface"],
                   [(f"s{i}", f"s{i + 1}", i % 7 + 1, "road") for i in range(n)] +
                   [(f"s{i}", f"s{i + 2}", 9, "verge") for i in range(n - 1)])
    argv = {"path": ["path", links, "s0", f"s{n}"],
            "what-if": ["what-if", links, "--by", "surface", "--scale", "road=100",
                        "--limit", str(2 * n)]}[command] + COLUMNS
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(
        [str(Path(fastmst.__file__).resolve().parent.parent)] +
        [p for p in env.get("PYTHONPATH", "").split(os.pathsep) if p])
    proc = subprocess.Popen([sys.executable, "-m", "fastmst", *argv], cwd=tmp_path, env=env,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    first = proc.stdout.readline()
    proc.stdout.close()                      # the reader stops after one line
    err = proc.stderr.read().decode()
    rc = proc.wait(timeout=120)
    assert first.startswith(f"fastmst {command}:".encode()), first
    assert rc == 1 and err == "", (rc, err)


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


@pytest.mark.parametrize("delimiter", [";;", "", '"', "ab"])
def test_bad_delimiter_is_a_usage_error_in_cli_terms(tmp_path, capsys, delimiter):
    src = _write(tmp_path / "e.csv", ["tail", "head", "weight"], [["a", "b", "1"]])
    rc, _, err = _run(["solve", src, "--delimiter", delimiter, "-q"], capsys)
    assert rc == common.EXIT_USAGE
    assert f"--delimiter {delimiter!r}: expected one character" in err
    assert "read_edges" not in err


@pytest.mark.parametrize("option,code", [(["-k", "100"], "EXIT_DATA"), (["-k", "0"], "EXIT_USAGE"),
                                         (["--threshold", "nan"], "EXIT_DATA")])
def test_cluster_option_out_of_range_in_cli_terms(tmp_path, capsys, option, code):
    """More clusters than sites is a value the data refuses (exit 1), k = 0 bad usage (exit 2);
    either is worded with the option as typed."""
    src = _write(tmp_path / "e.csv", ["tail", "head", "weight"],
                 [["a", "b", "1"], ["b", "c", "2"], ["c", "d", "3"]])
    rc, _, err = _run(["clusters", src, *option, "-q"], capsys)
    assert rc == getattr(common, code)
    assert f"error: {' '.join(option)}: " in err
    assert "SpanningForest" not in err and "Traceback" not in err
