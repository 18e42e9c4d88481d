"""Command-line outputs: paths that cannot be written are refused before any work, OS errors
print as one message, --help offers only outputs the command writes, GeoJSON from planar
coordinates is refused before the solve, and a reader that stops early ends the run quietly."""
from __future__ import annotations

import re
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from fastmst import cli
from fastmst.cli import paths, solve
from cli_reference import (  # noqa: F401  (files: a fixture)
    _SITES, _write, files, DESIGN_COMMANDS, COLUMNS, _run)


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
