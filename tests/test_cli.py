"""The ``fastmst`` command line, run through subprocess from fresh temporary directories.

Malformed-input cases also run in-process through ``fastmst.cli.main`` (same code, returns the
exit code) to keep the module fast.  References are named beside each check.
"""
from __future__ import annotations

import csv
import json
import math
import os
import subprocess
import sys
from pathlib import Path

import networkx as nx
import numpy as np
import pytest

import fastmst
from fastmst import cli

# The package directory that this test run imports (the worktree or the installed package).
_ROOT = str(Path(fastmst.__file__).resolve().parent.parent)

LINKS = [("depot", "north", 4.0), ("north", "east", 1.5), ("east", "depot", 2.0),
         ("east", "south", 3.0), ("south", "depot", 3.5), ("west", "depot", 6.0),
         ("west", "south", 5.0), ("north", "west", 9.0)]
SITES = [("depot", 10.00, 50.00), ("north", 10.01, 50.02), ("east", 10.03, 50.00),
         ("south", 10.01, 49.98), ("west", 9.97, 50.00)]


def run(args, cwd, check_rc=None):
    """Run ``python -m fastmst ARGS`` in ``cwd``; returns the CompletedProcess."""
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join([_ROOT] + [p for p in
                                                   env.get("PYTHONPATH", "").split(os.pathsep)
                                                   if p])
    env.pop("COLUMNS", None)
    p = subprocess.run([sys.executable, "-m", "fastmst", *args], cwd=cwd, env=env,
                       capture_output=True, text=True, timeout=120)
    if check_rc is not None:
        assert p.returncode == check_rc, (p.returncode, p.stdout, p.stderr)
    return p


def _write(path, header, rows):
    with open(path, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(header)
        w.writerows(rows)
    return path


@pytest.fixture
def workdir(tmp_path):
    _write(tmp_path / "links.csv", ["from", "to", "cost"], LINKS)
    _write(tmp_path / "sites.csv", ["id", "lon", "lat"], SITES)
    return tmp_path


def _nx_forest_weight(links):
    """Reference: networkx minimum spanning tree weight."""
    g = nx.Graph()
    g.add_weighted_edges_from(links)
    return nx.minimum_spanning_tree(g).size(weight="weight")


def test_help_lists_commands_and_examples(tmp_path, capsys):
    """--help works for the program (subprocess) and every subcommand, with examples."""
    p = run(["--help"], tmp_path, check_rc=0)
    for cmd in ("solve", "check", "clusters", "bench", "demo"):
        assert cmd in p.stdout
    for cmd in ("solve", "check", "clusters", "bench", "demo"):
        assert cli.main([cmd, "--help"]) == 0
        out = capsys.readouterr().out
        assert "examples:" in out and f"fastmst {cmd}" in out


def test_solve_end_to_end(workdir):
    """One command turns a labelled CSV into a forest CSV, a GeoJSON and a PNG; the forest
    matches networkx.minimum_spanning_tree (reference library)."""
    p = run(["solve", "links.csv", "--nodes", "sites.csv", "-o", "forest.csv", "-o",
             "forest.geojson", "--plot", "forest.png"], workdir, check_rc=0)
    rows = list(csv.DictReader(open(workdir / "forest.csv")))
    assert [r["from"] for r in rows][:1] == ["north"]  # lightest edge first, user labels
    assert math.fsum(float(r["cost"]) for r in rows) == pytest.approx(_nx_forest_weight(LINKS))
    ref = nx.minimum_spanning_tree(nx.Graph([(a, b, {"weight": w}) for a, b, w in LINKS]))
    assert {frozenset((r["from"], r["to"])) for r in rows} == \
        {frozenset(e) for e in ref.edges}
    doc = json.loads((workdir / "forest.geojson").read_text())
    assert doc["type"] == "FeatureCollection" and len(doc["features"]) == 4
    import matplotlib.image
    img = matplotlib.image.imread(workdir / "forest.png")
    assert img.shape[0] > 500 and img.shape[1] > 500
    for text in ("nodes", "components", "total weight", "heaviest edge", "west -- south",
                 "no redundancy", "licensed engineers"):
        assert text in p.stdout, text
    assert p.stdout.rstrip().endswith("local codes.")
    assert p.stderr == ""  # no progress bars when the output is not a terminal


def test_solve_json(workdir):
    """--json prints a machine-readable summary matching networkx (reference library)."""
    p = run(["solve", "links.csv", "--json"], workdir, check_rc=0)
    d = json.loads(p.stdout)
    assert d["total_weight"] == pytest.approx(_nx_forest_weight(LINKS))
    assert d["components"] == 1 and d["forest_edges"] == 4
    assert d["heaviest_edge"]["tail"] == "west" and "no redundancy" in d["caution"]

def test_quiet_and_maximize_in_process(workdir, capsys, monkeypatch):
    """--quiet prints no summary (the caution still goes to stderr); --maximize with Parquet
    output matches networkx.maximum_spanning_tree (reference library)."""
    monkeypatch.chdir(workdir)
    assert cli.main(["solve", "links.csv", "--quiet", "-o", "f.parquet", "--maximize"]) == 0
    q = capsys.readouterr()
    assert q.out == "" and "no redundancy" in q.err
    import pyarrow.parquet as pq
    t = pq.read_table(workdir / "f.parquet")
    # maximum spanning tree reference: networkx.maximum_spanning_tree
    g = nx.Graph([(a, b, {"weight": w}) for a, b, w in LINKS])
    assert sum(t.column("cost").to_pylist()) == nx.maximum_spanning_tree(g).size(weight="weight")


def test_solve_other_formats_in_process(tmp_path, capsys):
    """DIMACS .gr and Matrix Market files solve from the command line with user ids kept."""
    (tmp_path / "r.gr").write_text("c test\np sp 3 3\na 1 2 5\na 2 3 1\na 3 1 2\n")
    assert cli.main(["solve", str(tmp_path / "r.gr"), "-o", str(tmp_path / "r.csv"),
                     "--quiet"]) == 0
    rows = list(csv.DictReader(open(tmp_path / "r.csv")))
    assert [(r["tail"], r["head"], r["weight"]) for r in rows] == [("2", "3", "1"),
                                                                   ("3", "1", "2")]
    (tmp_path / "m.mtx").write_text("%%MatrixMarket matrix coordinate real general\n3 3 2\n"
                                    "1 2 0\n2 3 4\n")
    assert cli.main(["solve", str(tmp_path / "m.mtx"), "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["total_weight"] == 4.0 and d["forest_edges"] == 2  # explicit zero kept
    _write(tmp_path / "alt.csv", ["a", "b", "c", "d"], [(1, 2, 9, 1), (2, 3, 9, 1), (1, 3, 1, 9)])
    assert cli.main(["solve", str(tmp_path / "alt.csv"), "--weight", "d", "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["total_weight"] == 2


CASES = {
    # name: (file name, content, fragment of the message)
    "missing column": ("a.csv", "x,y\n1,2\n", "no weight column; the columns present are"),
    "unparsable number": ("b.csv", "a,b,weight\n1,2,3\n2,3,four\n", "line 3): weight 'four'"),
    "nan weight": ("c.csv", "a,b,weight\n1,2,NaN\n", "is NaN"),
    "empty file": ("d.csv", "", "the file is empty"),
    "header only": ("e.csv", "a,b,weight\n", "no edges"),
    "field count": ("f.csv", "a,b,weight\n1,2\n", "line 2 has 2 fields"),
    "wrong gr count": ("g.gr", "p sp 2 5\na 1 2 3\n", "says 5 arcs but the file has 1"),
    "node not in table": ("h.csv", "a,b,weight\ndepot,nowhere,1\n", "'nowhere'"),
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_malformed_exit_1_nothing_written(workdir, capsys, name):
    """Each malformed input exits 1 with a message naming the file, no traceback, and no
    output file written (an existing one is left as it was)."""
    fname, content, frag = CASES[name]
    (workdir / fname).write_text(content)
    (workdir / "old.csv").write_text("keep me\n")
    args = ["solve", str(workdir / fname), "-o", str(workdir / "new.csv"), "-o",
            str(workdir / "old.csv")]
    if name == "node not in table":
        args += ["--nodes", str(workdir / "sites.csv")]
    assert cli.main(args) == 1
    err = capsys.readouterr().err
    assert str(workdir / fname) in err and frag in err and "Traceback" not in err
    assert not (workdir / "new.csv").exists()
    assert (workdir / "old.csv").read_text() == "keep me\n"
    assert sorted(os.listdir(workdir)) == sorted(["links.csv", "sites.csv", fname, "old.csv"])


def test_malformed_subprocess_and_debug(workdir):
    """Through the real command: exit 1 and one clean message; --debug shows the traceback."""
    (workdir / "bad.csv").write_text("a,b,weight\n1,2,x\n")
    p = run(["solve", "bad.csv", "-o", "out.csv"], workdir, check_rc=1)
    assert "bad.csv" in p.stderr and "Traceback" not in p.stderr
    assert not (workdir / "out.csv").exists()
    p = run(["solve", "bad.csv", "--debug"], workdir, check_rc=1)
    assert "Traceback" in p.stderr and "FileFormatError" in p.stderr


def test_missing_file_exit_1(workdir, capsys):
    """A missing input file exits 1 with the path in the message."""
    assert cli.main(["solve", str(workdir / "missing.csv")]) == 1
    assert "no such file" in capsys.readouterr().err


def test_usage_errors_exit_2(workdir, capsys):
    """Bad usage exits 2 before any work: unknown options, unknown output suffixes, a plot or
    GeoJSON without coordinates, clusters without a cut."""
    p = run(["solve", "links.csv", "--no-such-option"], workdir, check_rc=2)
    assert "unrecognized arguments" in p.stderr
    for args in (["solve", "links.csv", "-o", "forest.xyz"],
                 ["solve", "links.csv", "--plot", "forest.png"],
                 ["solve", "links.csv", "-o", "forest.geojson"],
                 ["solve", "links.csv", "--plot", "forest.jpg"],
                 ["clusters", "links.csv"],
                 ["demo", "--sites", "3"]):
        assert cli.main([a if not a.endswith(".csv") else str(workdir / a) for a in args]) == 2
        err = capsys.readouterr().err
        assert "Traceback" not in err and err.strip()
    assert sorted(os.listdir(workdir)) == ["links.csv", "sites.csv"]
    assert cli.main([]) == 2


def test_usage_checked_before_any_file_is_read(tmp_path, capsys):
    """Usage errors exit 2 even when the edge file does not exist: they are found before any
    file is read (docs/files-and-cli.md, exit codes)."""
    missing = str(tmp_path / "missing.csv")
    for args in (["solve", missing, "--plot", "f.png"],
                 ["solve", missing, "-o", str(tmp_path / "f.geojson")],
                 ["solve", missing, "--x", "lon"],
                 ["clusters", missing, "-k", "2", "-o", str(tmp_path / "c.geojson")],
                 ["clusters", missing, "-k", "0"]):
        assert cli.main(args) == 2, args
        err = capsys.readouterr().err
        assert "usage error" in err and "no such file" not in err
    assert os.listdir(tmp_path) == []


def test_progress_only_on_a_terminal(monkeypatch, capsys):
    """Progress bars are on for a terminal and off for pipes or with --quiet."""
    from fastmst.cli.progress import Reporter
    monkeypatch.setattr(sys.stderr, "isatty", lambda: True, raising=False)
    assert Reporter.for_terminal(quiet=False).enabled
    assert not Reporter.for_terminal(quiet=True).enabled
    monkeypatch.setattr(sys.stderr, "isatty", lambda: False, raising=False)
    assert not Reporter.for_terminal(quiet=False).enabled
    rep = Reporter(True)
    with rep:
        with rep.phase("reading", total=10) as update:
            update(5, 10)
    assert rep.times["reading"] >= 0.0


def test_demo_default_folder(tmp_path):
    """`fastmst demo` writes its invented scenario to ./fastmst-demo-output with the cautions;
    the backbone cost equals scipy.sparse.csgraph.minimum_spanning_tree's on the written
    candidate trenches (reference library)."""
    p = run(["demo", "--sites", "1500"], tmp_path, check_rc=0)
    out = tmp_path / "fastmst-demo-output"
    for f in ("sites.csv", "trenches.csv", "backbone.csv", "backbone.geojson", "backbone.png",
              "summary.json", "README.txt"):
        assert (out / f).exists(), f
    for text in ("Invented scenario", "invented", "no redundancy", "licensed engineers",
                 "backbone cost"):
        assert text in p.stdout, text
    summary = json.loads((out / "summary.json").read_text())
    assert summary["invented"] is True and summary["sites"] == 1500
    from scipy.sparse import coo_array
    from scipy.sparse.csgraph import minimum_spanning_tree
    ids = {r["id"]: i for i, r in enumerate(csv.DictReader(open(out / "sites.csv")))}
    tr = list(csv.DictReader(open(out / "trenches.csv")))
    t = np.array([ids[r["from"]] for r in tr])
    h = np.array([ids[r["to"]] for r in tr])
    w = np.array([float(r["cost"]) for r in tr])
    assert (w > 0).all()  # the SciPy route drops zeros; the demo has none
    ref = minimum_spanning_tree(coo_array((w, (t, h)), shape=(1500, 1500)).tocsr()).sum()
    assert summary["backbone_cost"] == pytest.approx(ref, rel=1e-12)
    back = list(csv.DictReader(open(out / "backbone.csv")))
    assert len(back) == summary["backbone_trenches"] == 1500 - summary["components"]
    doc = json.loads((out / "backbone.geojson").read_text())
    assert len(doc["features"]) == len(back)
    assert summary["sensitivity"] == "computed" and len(summary["nearly_tied_cost_choices"]) == 10
    assert "margin" in back[0]
    # the design part: a map per tool, and the feeders within their invented capacity
    for f in ("resilience.csv", "resilience.png", "failures.png", "feeders.png", "shallow.png"):
        assert (out / f).exists(), f
    r = summary["resilience"]
    assert 0 < r["feeder_largest_load"] <= r["feeder_capacity_sites"] == 150
    assert r["feeders"] >= r["backup_sites"] / 150
    # every site with a trench route to the exchange can have its own cable, so exactly the
    # sites outside the exchange's component are unserved (scipy.sparse.csgraph components)
    from scipy.sparse.csgraph import connected_components
    _, comp = connected_components(coo_array((w, (t, h)), shape=(1500, 1500)), directed=False)
    assert r["backup_sites"] == 1500
    assert r["feeder_unserved"] == int((comp != comp[ids[r["exchange"]]]).sum())
    assert "feeder cables of at most 150 sites" in p.stdout


@pytest.mark.parametrize("sites,seed", [(10, 1), (20, 1), (50, 2)])
def test_demo_small_districts(tmp_path, sites, seed):
    """Small invented districts (the exchange may have no trench, sites may be cut off) run
    through every design step and map: exit code 0 and the design summary written."""
    run(["demo", "--sites", str(sites), "--seed", str(seed), "--out", "d", "--quiet"], tmp_path,
        check_rc=0)
    r = json.loads((tmp_path / "d" / "summary.json").read_text())["resilience"]
    assert r["backup_sites"] == sites and r["feeder_largest_load"] <= 150
    for f in ("failures.png", "feeders.png", "shallow.png"):
        assert (tmp_path / "d" / f).exists(), f


def test_bench_json(workdir, capsys):
    """`fastmst bench --json` times both routes; on a graph without zero weights or parallel
    edges both totals agree (scipy.sparse.csgraph as the reference)."""
    assert cli.main(["bench", str(workdir / "links.csv"), "--repeat", "1", "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["edges"] == len(LINKS) and d["fastmst_seconds"] > 0 and d["scipy_seconds"] > 0
    assert d["fastmst_total_weight"] == pytest.approx(d["scipy_total_weight"])
    assert d["speedup"] == pytest.approx(d["scipy_seconds"] / d["fastmst_seconds"])


# --- commands that use the network-design toolkit -------------------------------------------------

def test_check_optimal_and_suboptimal(workdir, capsys):
    """`check` accepts solve's output (exit 0) and lists a profitable swap for a worse tree
    (exit 3); the excess equals the weight above networkx's minimum (reference library)."""
    links, forest = str(workdir / "links.csv"), str(workdir / "forest.csv")
    assert cli.main(["solve", links, "-o", forest, "--quiet"]) == 0
    capsys.readouterr()
    assert cli.main(["check", links, forest, "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["is_minimum"] and d["swaps"] == [] and d["excess"] == 0
    worse = [("depot", "north"), ("north", "east"), ("east", "south"), ("west", "south")]
    _write(workdir / "design.csv", ["from", "to"], worse)
    assert cli.main(["check", links, str(workdir / "design.csv"), "--json"]) == 3
    d = json.loads(capsys.readouterr().out)
    assert not d["is_minimum"] and d["is_forest"] and d["is_spanning"]
    given = sum(w for a, b, w in LINKS if (a, b) in worse)
    assert d["excess"] == pytest.approx(given - _nx_forest_weight(LINKS))
    # east--depot (position 2) closes a cycle whose heaviest tree edge is depot--north (0)
    assert any(s["add"]["position"] == 2 and s["remove"]["position"] == 0 for s in d["swaps"])
    assert all(s["add"]["weight"] < s["remove"]["weight"] for s in d["swaps"])
    # a maximum spanning tree passes the maximize check (networkx.maximum_spanning_tree)
    assert cli.main(["solve", links, "--maximize", "-o", forest, "--quiet"]) == 0
    assert cli.main(["check", links, forest, "--maximize", "--json"]) == 0
    capsys.readouterr()
    assert cli.main(["check", links, forest, "--json"]) == 3


def test_clusters_match_scipy_single_linkage(tmp_path, capsys):
    """`clusters -k` equals scipy.cluster.hierarchy single linkage + fcluster (maxclust) on the
    complete graph of random points with distinct distances, up to relabelling."""
    from scipy.cluster.hierarchy import fcluster, linkage
    from scipy.spatial.distance import pdist
    rng = np.random.default_rng(5)
    pts = rng.random((40, 2))
    i, j = np.triu_indices(40, 1)
    d = np.hypot(*(pts[i] - pts[j]).T)
    _write(tmp_path / "e.csv", ["a", "b", "weight"], zip(i.tolist(), j.tolist(), d.tolist()))
    assert cli.main(["clusters", str(tmp_path / "e.csv"), "-k", "4", "-o",
                     str(tmp_path / "c.csv"), "--quiet"]) == 0
    rows = list(csv.DictReader(open(tmp_path / "c.csv")))
    ours = {int(r["node"]): int(r["cluster"]) for r in rows}
    ref = fcluster(linkage(pdist(pts), method="single"), t=4, criterion="maxclust")
    pairs = {(ours[k], int(ref[k])) for k in range(40)}
    assert len(pairs) == len(set(ours.values())) == len(set(ref.tolist())) == 4


def test_required_and_excluded_links(workdir, capsys):
    """--excluded matches networkx on the graph without the excluded links; --required puts the
    link in the forest at the least extra cost (networkx with the link contracted)."""
    links = str(workdir / "links.csv")
    _write(workdir / "ex.csv", ["from", "to"], [("north", "east")])
    assert cli.main(["solve", links, "--excluded", str(workdir / "ex.csv"), "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    rest = [x for x in LINKS if (x[0], x[1]) != ("north", "east")]
    assert d["total_weight"] == pytest.approx(_nx_forest_weight(rest))
    _write(workdir / "req.csv", ["from", "to"], [("north", "west")])
    assert cli.main(["solve", links, "--required", str(workdir / "req.csv"), "-o",
                     str(workdir / "f.csv"), "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    g = nx.MultiGraph([(a, b, {"weight": w}) for a, b, w in LINKS])
    g = nx.contracted_nodes(g, "north", "west", self_loops=False)
    expect = 9.0 + nx.minimum_spanning_tree(g).size(weight="weight")
    assert d["total_weight"] == pytest.approx(expect)
    assert d["requirement_cost"] == pytest.approx(expect - _nx_forest_weight(LINKS))
    rows = list(csv.DictReader(open(workdir / "f.csv")))
    assert ("north", "west") in {(r["from"], r["to"]) for r in rows}


# --- never a traceback, nothing left behind -----------------------------------------------------------

def _bad_inputs(d):
    """Files for the battery below (test fixtures, not demo data)."""
    np.savez(d / "complex.npz", tail=np.array([0, 1]), head=np.array([1, 2]),
             weight=np.array([1 + 2j, 3 + 0j]))
    _write(d / "huge.csv", ["a", "b", "w"], [("x", "y", "1e308"), ("y", "z", "1e308"),
                                             ("z", "q", "1e308")])
    _write(d / "ints.csv", ["a", "b", "w"], [("007", "7", 1), ("8", "0x1", 2)])
    (d / "hostile.gr").write_text("p sp 400000000 1\na 1 2 3\n")
    (d / "hostile.mtx").write_text("%%MatrixMarket matrix coordinate real general\n"
                                   "400000000 400000000 1\n1 2 3\n")
    (d / "tabs.gr").write_text("p sp 3 2\na\t1 2  5 \na 2\t3 1\n")


# (arguments, expected exit code): 1 bad data, 2 bad usage (docs/files-and-cli.md)
BATTERY = [
    (["solve", "complex.npz"], 1),
    (["solve", "links.csv", "--threads", "99999999999"], 1),
    (["solve", "links.csv", "--threads", "x"], 2),
    (["solve", "hostile.gr", "-o", "out.csv"], 1),
    (["solve", "hostile.mtx", "-o", "out.csv"], 1),
    (["solve", "hostile.gr", "--declared-nodes", "12"], 1),
    (["solve", "ints.csv", "--integer-ids"], 1),
    (["solve", "links.csv", "-o", "links.csv"], 2),
    (["solve", "links.csv", "-o", "./sub/../links.csv"], 2),
    (["solve", "links.csv", "--nodes", "sites.csv", "-o", "sites.csv"], 2),
    (["solve", "links.csv", "-o", "a.csv", "-o", "a.csv"], 2),
    (["check", "links.csv", "links.csv", "--limit", "-1"], 2),
    (["clusters", "links.csv", "-k", "2", "-o", "links.csv"], 2),
    (["bench", "complex.npz"], 1),
    (["solve", "nowhere/links.csv"], 1),
    (["solve", "links.csv", "-o", "nodir/out.csv"], 1),
]


@pytest.mark.parametrize("args,code", BATTERY, ids=[" ".join(a) for a, _ in BATTERY])
def test_bad_invocations_never_print_a_traceback(workdir, capsys, args, code):
    """Every bad invocation prints one message without a traceback, exits with the documented
    code, and leaves no output file and no temporary file behind."""
    _bad_inputs(workdir)
    (workdir / "sub").mkdir()
    before = sorted(os.listdir(workdir))
    links = (workdir / "links.csv").read_bytes()
    cwd = os.getcwd()
    os.chdir(workdir)
    try:
        rc = cli.main(args)
    finally:
        os.chdir(cwd)
    err = capsys.readouterr().err
    assert rc == code, (rc, err)
    assert "Traceback" not in err and err.strip()
    assert sorted(os.listdir(workdir)) == before
    assert (workdir / "links.csv").read_bytes() == links


def test_battery_through_the_real_command(workdir):
    """The same through the installed command: no traceback on stderr for any case."""
    _bad_inputs(workdir)
    for args in (["solve", "complex.npz"], ["solve", "links.csv", "--threads", "99999999999"],
                 ["solve", "huge.csv", "-o", "out.csv"], ["solve", "hostile.gr"]):
        p = run(args, workdir)
        assert p.returncode in (0, 1, 2) and "Traceback" not in p.stderr, (args, p.stderr)


def test_failure_after_solving_leaves_no_output(workdir, capsys, monkeypatch):
    """A failure after the forest is computed (here: the plot) leaves neither the new outputs
    nor changes to existing ones: outputs are committed only once everything succeeded."""
    from fastmst.cli import solve as solve_cmd

    def broken_plot(*a, **k):
        raise ValueError("plotting failed (simulated)")
    monkeypatch.setattr(solve_cmd, "plot_forest", broken_plot)
    (workdir / "old.csv").write_text("keep me\n")
    args = ["solve", str(workdir / "links.csv"), "--nodes", str(workdir / "sites.csv"),
            "-o", str(workdir / "new.csv"), "-o", str(workdir / "old.csv"),
            "--plot", str(workdir / "map.png")]
    assert cli.main(args) == 1
    assert "plotting failed" in capsys.readouterr().err
    assert (workdir / "old.csv").read_text() == "keep me\n"
    assert sorted(os.listdir(workdir)) == ["links.csv", "old.csv", "sites.csv"]


def test_huge_weights_total_is_inf_or_refused_cleanly(workdir, capsys):
    """Weights of 1e308 whose sum overflows: the run either succeeds (total inf) or fails with
    one message; either way no traceback and no output left behind on failure."""
    _bad_inputs(workdir)
    rc = cli.main(["solve", str(workdir / "huge.csv"), "-o", str(workdir / "out.csv"),
                   "--json"])
    out, err = capsys.readouterr()
    assert "Traceback" not in err
    if rc == 0:
        assert json.loads(out)["total_weight"] == "inf"
        assert (workdir / "out.csv").exists()
    else:
        assert rc == 1 and not (workdir / "out.csv").exists()


def test_output_via_symlink_to_input_refused(workdir, capsys):
    """-o naming the input through a symbolic link is refused (exit 2), the input untouched."""
    os.symlink(workdir / "links.csv", workdir / "alias.csv")
    before = (workdir / "links.csv").read_bytes()
    assert cli.main(["solve", str(workdir / "links.csv"), "-o", str(workdir / "alias.csv")]) == 2
    assert "is an input" in capsys.readouterr().err
    assert (workdir / "links.csv").read_bytes() == before


def test_integer_ids_and_declared_nodes_options(workdir, capsys):
    """--integer-ids reads '007' as node 7; --declared-nodes confirms a header's node count."""
    _write(workdir / "i.csv", ["a", "b", "w"], [("007", "7", 1), ("7", "8", 2)])
    assert cli.main(["solve", str(workdir / "i.csv"), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["nodes"] == 3       # '007', '7', '8'
    assert cli.main(["solve", str(workdir / "i.csv"), "--json", "--integer-ids"]) == 0
    assert json.loads(capsys.readouterr().out)["nodes"] == 2       # 7, 8
    (workdir / "big.gr").write_text("p sp 2000000 1\na 1 2 3\n")
    assert cli.main(["solve", str(workdir / "big.gr"), "--json"]) == 1
    assert "--declared-nodes 2000000" in capsys.readouterr().err
    assert cli.main(["solve", str(workdir / "big.gr"), "--json",
                     "--declared-nodes", "2000000"]) == 0
    assert json.loads(capsys.readouterr().out)["components"] == 1_999_999


def test_spreadsheet_safe_option(workdir, capsys):
    """--spreadsheet-safe prefixes text cells starting with = + - @ in CSV output."""
    _write(workdir / "f.csv", ["a", "b", "w"], [("=cmd", "b", 1), ("b", "@c", 2)])
    assert cli.main(["solve", str(workdir / "f.csv"), "-q", "-o", str(workdir / "plain.csv"),
                     "-o", str(workdir / "safe.csv"), "--spreadsheet-safe"]) == 0
    # the option applies to every CSV/TSV output of the run
    assert "\"'=cmd\"" in (workdir / "safe.csv").read_text()
    assert "\"'=cmd\"" in (workdir / "plain.csv").read_text()
    assert cli.main(["solve", str(workdir / "f.csv"), "-q", "-o", str(workdir / "v.csv")]) == 0
    assert '"=cmd"' in (workdir / "v.csv").read_text()


def test_reading_phase_turns_into_a_spinner(monkeypatch):
    """The reading bar does not stay at 100 % while labels are mapped: a total of None turns
    the phase into a spinner with its own description."""
    from fastmst.cli.progress import Reporter
    rep = Reporter(True)
    if rep._progress is None:
        pytest.skip("rich not installed")
    with rep:
        with rep.phase("reading edges") as update:
            update(10, 10)
            update(10, None)
            task = rep._progress.tasks[-1]
            assert task.total is None and "labels" in task.description
