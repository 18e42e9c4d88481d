"""The planner's workflow on the command line, in-process through ``fastmst.cli.main``: links
named by id or pair, required/excluded links in every command, carried columns, group sums,
unconnected sites, ranked swaps, margins, paths and what-if scaling.  Each answer is checked
against the API (itself tested against SciPy) and against networkx or pandas as named."""
from __future__ import annotations

import csv
import io as _io
import json
import math

import networkx as nx
import numpy as np
import pytest

import fastmst
from fastmst import cli
from conftest import write_csv

# link id, from, to, cost (decimals on purpose), route type, length
LINKS = [("L01", "a", "b", 45.3, "duct", 120.5), ("L02", "b", "c", 33.0, "aerial", 80.25),
         ("L03", "c", "a", 12.7, "duct", 40.0), ("L04", "c", "d", 21.1, "aerial", 60.0),
         ("L05", "d", "e", 8.4, "duct", 20.0), ("L06", "e", "c", 19.9, "aerial", 55.5),
         ("L07", "a", "b", 30.2, "aerial", 118.0), ("L08", "b", "d", 27.6, "duct", 75.0),
         ("L09", "f", "g", 5.0, "duct", 10.0), ("L10", "a", "b", 50.0, "duct", 121.0)]
SITES = ["a", "b", "c", "d", "e", "f", "g", "h"]


_write = write_csv


@pytest.fixture
def files(tmp_path):
    d = {"links": _write(tmp_path / "links.csv",
                         ["link_id", "from", "to", "cost", "route_type", "length_m"], LINKS),
         "sites": _write(tmp_path / "sites.csv", ["id", "lon", "lat"],
                         [(s, 10 + i / 100, 50 + (i % 3) / 100) for i, s in enumerate(SITES)]),
         "must": _write(tmp_path / "must.csv", ["link_id"], [("L01",)]),
         "banned": _write(tmp_path / "banned.csv", ["from", "to"], [("b", "a"), ("d", "e")]),
         "dir": tmp_path}
    return d


COLS = ["--tail", "from", "--head", "to", "--weight", "cost", "--link-id", "link_id"]


def _json(capsys, argv, rc=0):
    got = cli.main(argv + ["--json"])
    out = capsys.readouterr().out
    assert got == rc, out
    return json.loads(out)


def _api(required=(), excluded=()):
    t = np.array([SITES.index(r[1]) for r in LINKS])
    h = np.array([SITES.index(r[2]) for r in LINKS])
    w = np.array([r[3] for r in LINKS])
    return t, h, w, fastmst.minimum_spanning_forest(t, h, w, len(SITES), required=list(required),
                                                    excluded=list(excluded))


def test_solve_names_links_by_id_and_pair(files, capsys):
    """--required by link id, --excluded by pair: the pair a-b excludes its three parallel
    links (L01 is required, so the run is refused: both required and excluded); d-e one link;
    the summary counts links and names the pair that matched several."""
    argv = ["solve", files["links"], *COLS, "--nodes", files["sites"],
            "--excluded", files["banned"]]
    d = _json(capsys, argv)
    ex = d["links"]["excluded"]
    assert ex["links"] == 4 and ex["rows"] == 2 and ex["named_by"] == "pair"
    assert ex["pairs_with_several_links"] == [{"tail": "b", "head": "a", "links": 3}]
    _, _, _, ref = _api(excluded=[0, 6, 9, 4])
    assert d["total_weight"] == pytest.approx(ref.weight) and d["forest_edges"] == len(ref)
    assert cli.main(argv + ["--required", files["must"], "--json"]) == 1
    assert "both required and excluded" in capsys.readouterr().err


def test_constrained_design_checks_and_swaps(files, capsys):
    """A design with the required L01 checks as optimal under the same constraints (exit 0)
    and not without them (exit 3), where the ranked swaps never remove L01 when it is given,
    carry their saving without float noise and name each removed link once."""
    out = str(files["dir"] / "design.csv")
    d = _json(capsys, ["solve", files["links"], *COLS, "--required", files["must"], "-o", out])
    assert d["links"]["required"] == {"file": files["must"], "rows": 1, "links": 1,
                                      "named_by": "link id"}
    rows = list(csv.DictReader(open(out)))
    assert {r["link_id"] for r in rows} >= {"L01"}
    assert list(rows[0]) == ["from", "to", "cost", "position", "link_id", "route_type",
                             "length_m"]
    ok = _json(capsys, ["check", files["links"], out, *COLS, "--required", files["must"]])
    assert ok["is_minimum"] and ok["swaps"] == [] and ok["excess"] == 0
    bad = _json(capsys, ["check", files["links"], out, *COLS], rc=3)
    t, h, w, free = _api()
    assert bad["excess"] == pytest.approx(sum(w[int(r["position"])] for r in rows) - free.weight)
    assert repr(bad["excess"]) == repr(float(f"{bad['excess']:.15g}"))
    savings = [s["saving"] for s in bad["swaps"]]
    assert savings == sorted(savings, reverse=True)
    removed = [s["remove"]["position"] for s in bad["swaps"]]
    assert len(removed) == len(set(removed)) and 0 in removed    # L01 costs most
    for s in bad["swaps"]:
        assert s["saving"] == pytest.approx(s["remove"]["weight"] - s["add"]["weight"])
        assert len(repr(s["saving"])) <= 17 and "e" not in repr(s["saving"])
    top = bad["swaps"][0]
    # L01 (45.3) on the path of L08 b-d (27.6) b-a-c-e-d: the best of its swaps (L07 saves
    # 15.1, L02 12.3); 45.3 - 27.6 is 17.699999999999996 in float64, written as 17.7
    assert top["remove"]["link_id"] == "L01" and top["add"]["link_id"] == "L08"
    assert top["saving"] == 17.7


def test_group_sums_and_unconnected_sites(files, capsys):
    """--group-by route_type --sum length_m equals a pandas groupby of the written forest;
    --unconnected lists the sites outside the largest part (networkx connected_components)."""
    pd = pytest.importorskip("pandas")
    out, lost = str(files["dir"] / "f.parquet"), str(files["dir"] / "lost.csv")
    d = _json(capsys, ["solve", files["links"], *COLS, "--nodes", files["sites"], "--group-by",
                       "route_type", "--sum", "length_m", "-o", out, "--unconnected", lost])
    f = pd.read_parquet(out)
    ref = f.groupby("route_type").agg(links=("cost", "size"), cost=("cost", "sum"),
                                      length_m=("length_m", "sum"))
    got = {g["route_type"]: g for g in d["groups"]}
    assert set(got) == set(ref.index)
    for k, row in ref.iterrows():
        assert got[k]["links"] == row["links"]
        assert got[k]["cost"] == pytest.approx(row["cost"])
        assert got[k]["length_m"] == pytest.approx(row["length_m"])
    g = nx.Graph()
    g.add_nodes_from(SITES)
    g.add_edges_from((r[1], r[2]) for r in LINKS)
    largest = max(nx.connected_components(g), key=len)
    outside = sorted(set(SITES) - largest)
    assert sorted(d["unconnected"]["listed"]) == outside
    assert sorted(r["node"] for r in csv.DictReader(open(lost))) == outside
    assert d["unconnected"]["isolated"] == sum(1 for c in nx.connected_components(g)
                                               if len(c) == 1)
    cli.main(["solve", files["links"], *COLS, "--nodes", files["sites"], "--group-by",
              "route_type", "--sum", "length_m"])
    text = capsys.readouterr().out
    assert "by route_type:" in text and "unconnected sites" in text and "f, g, h" in text


def test_clusters_keep_required_links(files, capsys):
    """clusters --required: the required link's sites share a cluster for every k, and k
    beyond what the other links allow is refused."""
    out = str(files["dir"] / "c.csv")
    for k in (3, 4, 5, 6):
        assert cli.main(["clusters", files["links"], *COLS, "--nodes", files["sites"], "-k",
                         str(k), "--required", files["must"], "-o", out, "-q"]) == 0
        lab = {r["node"]: r["cluster"] for r in csv.DictReader(open(out))}
        assert lab["a"] == lab["b"] and len(set(lab.values())) == k
    assert cli.main(["clusters", files["links"], *COLS, "--nodes", files["sites"], "-k", "8",
                     "--required", files["must"], "-q"]) == 1
    assert "required forest edge is never cut" in capsys.readouterr().err


def test_margins_bridges_and_near_ties(files, capsys):
    """margins: every link's margin as fastmst.sensitivity gives it; the bridges are the
    forest links networkx.bridges finds in the graph (parallel links made one edge with
    their multiplicity kept out: a pair with parallel links is never a bridge)."""
    out = str(files["dir"] / "m.csv")
    d = _json(capsys, ["margins", files["links"], *COLS, "-o", out, "--limit", "3"])
    t, h, w, f = _api()
    ref = fastmst.sensitivity(t, h, w, f)
    rows = list(csv.DictReader(open(out)))
    assert [float(r["margin"]) for r in rows] == pytest.approx(ref.tolist())
    g = nx.MultiGraph()
    g.add_edges_from((r[1], r[2]) for r in LINKS)
    simple = nx.Graph()
    for u, v in g.edges():
        if g.number_of_edges(u, v) == 1:
            simple.add_edge(u, v)
        else:
            simple.add_edge(u, v, multi=True)
    br = {frozenset(e) for e in nx.bridges(simple) if not simple.edges[e].get("multi")}
    assert d["bridges"] == len(br)
    assert {frozenset((r["from"], r["to"])) for r in rows if r["bridge"] == "true"} == br
    pct = [x["margin_percent"] for x in d["nearly_tied_cost_choices"]]
    assert pct == sorted(pct) and len(pct) == 3
    cli.main(["margins", files["links"], *COLS])
    assert "nearly tied cost choices" in capsys.readouterr().out


def test_path_and_costliest_link(files, capsys):
    """path: the links joining two sites in the design, as networkx.shortest_path finds them
    in the forest, and the costliest of them; sites in different parts are not connected."""
    d = _json(capsys, ["path", files["links"], "a", "e", *COLS])
    t, h, w, f = _api()
    g = nx.Graph()
    g.add_edges_from((SITES[t[p]], SITES[h[p]], {"p": int(p)}) for p in f.edges.tolist())
    nodes = nx.shortest_path(g, "a", "e")
    ref = [g.edges[u, v]["p"] for u, v in zip(nodes, nodes[1:])]
    assert [x["position"] for x in d["links"]] == ref
    assert d["costliest_link"]["weight"] == max(w[ref])
    assert d["total_weight"] == pytest.approx(sum(w[ref]))
    assert not _json(capsys, ["path", files["links"], "a", "g", *COLS])["connected"]
    assert cli.main(["path", files["links"], "a", "zz", *COLS]) == 1
    assert "no site of that name" in capsys.readouterr().err


def test_what_if_scaling(files, capsys):
    """what-if: the new design equals the API solve with the scaled weights; the entering and
    leaving links are the difference of the two designs."""
    out = str(files["dir"] / "new.csv")
    d = _json(capsys, ["what-if", files["links"], *COLS, "--by", "route_type", "--scale",
                       "aerial=3", "-o", out])
    t, h, w, before = _api()
    scale = np.array([3.0 if r[4] == "aerial" else 1.0 for r in LINKS])
    after = fastmst.minimum_spanning_forest(t, h, w * scale, len(SITES))
    assert d["total_after"] == pytest.approx(after.weight)
    assert d["total_before"] == pytest.approx(before.weight)
    assert {x["position"] for x in d["entering"]} == set(after.edges.tolist()) - \
        set(before.edges.tolist())
    assert {x["position"] for x in d["leaving"]} == set(before.edges.tolist()) - \
        set(after.edges.tolist())
    assert sorted(int(r["position"]) for r in csv.DictReader(open(out))) == \
        sorted(after.edges.tolist())
    assert cli.main(["what-if", files["links"], *COLS, "--by", "route_type", "--scale",
                     "tunnel=2"]) == 1
    assert cli.main(["what-if", files["links"], *COLS, "--by", "route_type", "--scale",
                     "aerial"]) == 2


def test_guessed_columns_and_delimiter_on_the_command_line(tmp_path, capsys):
    """The summary says which columns were taken by default and warns of an id column first;
    --delimiter/--decimal-comma read a semicolon file with decimal commas."""
    p = _write(tmp_path / "l.csv", ["a", "b", "w"], [("x", "y", 1), ("y", "z", 2),
                                                     ("z", "x", 3)])
    assert cli.main(["solve", p]) == 0
    out = capsys.readouterr().out
    assert "took tail 'a', head 'b', weight 'w' by default" in out
    assert "holds a different value on every row" in out
    q = tmp_path / "semi.csv"
    q.write_text("from;to;cost\nx;y;1,5\ny;z;2,25\nz;x;3\n")
    d = _json(capsys, ["solve", str(q), "--delimiter", ";", "--decimal-comma"])
    assert d["total_weight"] == 3.75


def test_progress_shows_no_unknown_totals():
    """A phase without measured progress shows a spinner and its time, never '0/? bytes';
    a measured phase shows its bytes (rendered through rich, as on a terminal)."""
    pytest.importorskip("rich")
    from rich.console import Console
    from fastmst.cli.progress import Reporter
    rep = Reporter(True)

    def shown():
        c = Console(file=_io.StringIO(), width=100)
        c.print(rep._progress.make_tasks_table(rep._progress.tasks))
        return c.file.getvalue()
    with rep.phase("solving"):
        text = shown()
        assert "solving" in text and "?" not in text and "bytes" not in text
    with rep.phase("reading edges") as update:
        update(1000, 5000)
        assert "1.0/5.0 kB" in shown()
        update(5000, None)
        assert "?" not in shown() and "checks and labels" in shown()


def test_numbers_on_screen_and_in_json():
    """Terminal totals carry thousands separators, never exponent notation; JSON values
    computed from decimal input read as decimals."""
    from fastmst.cli.common import derived, fmt_num
    for x in (12876312.37, 1.28763e7, 987654321.5, 1234.5):
        assert "e" not in fmt_num(x) and "," in fmt_num(x)
    assert derived(45.3 - 33.0) == 12.3 and derived(sum([0.1] * 3)) == 0.3
    assert derived(math.inf) == "inf" and derived(3) == 3
