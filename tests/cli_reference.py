"""Shared fixtures and helpers of the command-line tests (test_cli_inputs.py,
test_cli_outputs.py, test_cli_demo.py, test_cli_design_files.py): a small invented network of
links, its minimum spanning tree (networkx ``minimum_spanning_edges`` gives the same), random
networks with text labels, and a runner that returns (exit code, stdout, stderr).
"""
from __future__ import annotations

import networkx as nx
import pytest
from hypothesis import HealthCheck, settings
from hypothesis import strategies as st

from fastmst import cli
from conftest import write_csv

LINKS = [("depot", "north", 4.0), ("north", "east", 1.5), ("east", "depot", 2.0),
         ("east", "south", 3.0), ("south", "depot", 3.5), ("west", "depot", 6.0),
         ("west", "south", 5.0), ("north", "west", 9.0)]
_SITES = ["depot", "north", "east", "south", "west"]     # the sites of LINKS


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
