"""The design subcommands (failures, backup, feeders, shallow) on files: text labels, node
tables, excluded links, a why column in every output, the cautions printed, and the written
tables equal to the API's results (which the test_design_* modules check against networkx and
scipy.optimize.milp)."""
import json

import numpy as np
import pyarrow.csv as pv
import pytest

from fastmst.cli import main
from fastmst.cli.design_options import DESIGN_CAUTION
from fastmst.design import backup_links, capacitated_tree, light_shallow_tree, link_failures


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    """A 6 x 6 grid with a dead-end spur, text labels S0..S36, coordinates; root S14."""
    d = tmp_path_factory.mktemp("design")
    rng = np.random.default_rng(5)
    k = 6
    idx = np.arange(k * k).reshape(k, k)
    t = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel(), [35]])
    h = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel(), [36]])
    xy = np.vstack([np.stack(np.meshgrid(np.arange(k), np.arange(k), indexing="ij"), -1)
                    .reshape(-1, 2), [[6, 6]]]).astype(float)
    w = np.round(np.hypot(*(xy[t] - xy[h]).T) * rng.uniform(1, 2, t.size), 3)
    lines = ["from,to,cost"] + [f"S{a},S{b},{c}" for a, b, c in zip(t, h, w)]
    (d / "links.csv").write_text("\n".join(lines) + "\n")
    nodes = ["id,x,y"] + [f"S{i},{x},{y}" for i, (x, y) in enumerate(xy)]
    (d / "sites.csv").write_text("\n".join(nodes) + "\n")
    (d / "excluded.csv").write_text("from,to\nS0,S1\n")
    (d / "demand.csv").write_text("node,demand\n" + "".join(f"S{i},{1 + i % 3}\n"
                                                            for i in range(37)))
    return d, t, h, w


def _run(args, capsys):
    code = main(args)
    out = capsys.readouterr().out
    assert code == 0, out
    assert DESIGN_CAUTION in out and "licensed engineers" in out
    return out


def _read(path):
    return pv.read_csv(path, convert_options=pv.ConvertOptions(
        column_types={"from": "string", "to": "string"})).to_pydict()


def test_failures(files, capsys):
    d, t, h, w = files
    _run(["failures", str(d / "links.csv"), "--tail", "from", "--head", "to", "--weight",
          "cost", "--root", "S14", "--excluded", str(d / "excluded.csv"), "--nodes",
          str(d / "sites.csv"), "-o", str(d / "f.csv"), "--plot", str(d / "f.png")], capsys)
    tab = _read(d / "f.csv")
    ex = [0]        # S0-S1 is the first link
    ref = link_failures(t, h, w, root=14, excluded=ex)
    assert tab["position"] == ref.position.tolist()
    assert set(tab["why"]) == {"tree"}
    assert tab["bridge"] == ref.bridge.tolist()
    assert tab["sites_cut_off"] == ref.sites_cut_off.tolist()
    assert tab["replacement_position"] == ref.replacement.tolist()
    assert (d / "f.png").stat().st_size > 10_000


def test_backup(files, capsys):
    d, t, h, w = files
    out = _run(["backup", str(d / "links.csv"), "--weight", "cost", "-o", str(d / "b.csv"),
                "--json"], capsys)
    summary = json.loads(out[:out.rindex("}") + 1])
    ref = backup_links(t, h, w)
    tab = _read(d / "b.csv")
    assert sorted(p for p, y in zip(tab["position"], tab["why"]) if y == "backup") == \
        ref.position.tolist()
    assert summary["backup_weight"] == pytest.approx(ref.weight)
    assert summary["single_points"] == 1        # the spur S35-S36
    assert sum(tab["single_point"]) == 1
    out = _run(["backup", str(d / "links.csv"), "--weight", "cost", "--no-bound", "--json"],
               capsys)
    assert json.loads(out[:out.rindex("}") + 1])["lower_bound"] is None


def test_feeders(files, capsys):
    d, t, h, w = files
    _run(["feeders", str(d / "links.csv"), "--weight", "cost", "--root", "S14", "--capacity",
          "12", "--demand", str(d / "demand.csv"), "-o", str(d / "c.csv")], capsys)
    ref = capacitated_tree(t, h, w, 14, 12, demand=[1 + i % 3 for i in range(37)])
    tab = _read(d / "c.csv")
    assert tab["position"] == ref.position.tolist()
    assert tab["why"] == ref.reason.tolist()
    assert max(tab["subtree_load"]) <= 12


def test_shallow(files, capsys):
    d, t, h, w = files
    _run(["shallow", str(d / "links.csv"), "--weight", "cost", "--root", "S14", "--alpha",
          "1.2", "-o", str(d / "s.csv")], capsys)
    ref = light_shallow_tree(t, h, w, 14, alpha=1.2)
    tab = _read(d / "s.csv")
    assert tab["position"] == ref.position.tolist()
    assert set(tab["why"]) <= {"tree", "shortcut"}
    assert max(tab["stretch"]) <= 1.2 + 1e-12


def test_errors(files, capsys):
    d, *_ = files
    assert main(["shallow", str(d / "links.csv"), "--root", "nowhere"]) == 1
    assert "--root nowhere: no node has this label" in capsys.readouterr().err
    assert main(["shallow", str(d / "links.csv"), "--root", "S1", "--alpha", "1"]) == 1
    assert "alpha = 1.0" in capsys.readouterr().err
    assert main(["feeders", str(d / "links.csv"), "--root", "S1", "--capacity", "2",
                 "-o", str(d / "x.geojson")]) == 2
    assert main(["backup", str(d / "links.csv"), "--plot", str(d / "x.png")]) == 2
