"""Defects a demanding user of the ``fastmst`` command line met, each tested as a class.

Runs in-process through ``fastmst.cli.main`` (the same code as the ``fastmst`` command; it
returns the exit code).  Minimum spanning forests are compared with networkx's
``minimum_spanning_edges`` where a check depends on which links are optimal.
"""
from __future__ import annotations

import csv
import json

import pytest

from fastmst import cli
from fastmst.cli.common import CAUTION

LINKS = [("depot", "north", 4.0), ("north", "east", 1.5), ("east", "depot", 2.0),
         ("east", "south", 3.0), ("south", "depot", 3.5), ("west", "depot", 6.0),
         ("west", "south", 5.0), ("north", "west", 9.0)]


def _write(path, header, rows):
    with open(path, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(header)
        w.writerows(rows)
    return str(path)


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
