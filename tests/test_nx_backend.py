"""fastmst as a networkx backend (fastmst/nxbackend): ``nx.minimum_spanning_tree(G, backend="fastmst")``.

Reference for every check here: networkx itself (3.4 to 3.6, its Kruskal in
``networkx.algorithms.tree.mst.kruskal_mst_edges``): each result of the backend is compared with
networkx's result for the same call, edge for edge and in order, and each error with networkx's
exception (type and message).  ``test_networkx_mst_tests`` runs networkx's own MST tests
(``networkx/algorithms/tree/tests/test_mst.py``) with networkx's backend test mechanism
(``NETWORKX_TEST_BACKEND``), which also compares every returned tree with networkx's.
"""
import json
import math
import os
import subprocess
import sys
import tempfile
from decimal import Decimal
from fractions import Fraction
from importlib.metadata import entry_points
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

nx = pytest.importorskip("networkx", minversion="3.4")

from fastmst.nxbackend import graph as nxgraph  # noqa: E402
from fastmst.nxbackend import spanning  # noqa: E402
from fastmst.nxbackend.interface import FUNCTIONS, can_run, convert_to_nx  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
REGISTERED = any(ep.name == "fastmst" for ep in entry_points(group="networkx.backends"))
needs_backend = pytest.mark.skipif(
    not REGISTERED, reason="the fastmst networkx backend is not registered: install the package "
    "(pip install -e .) so that its entry points exist")

MIN_MAX = [nx.minimum_spanning_edges, nx.maximum_spanning_edges]
TREES = [nx.minimum_spanning_tree, nx.maximum_spanning_tree]


@pytest.fixture(autouse=True)
def _no_conversion_cache():
    """Convert at every call (the cache is tested on its own below)."""
    before = nx.config.cache_converted_graphs
    nx.config.cache_converted_graphs = False
    yield
    nx.config.cache_converted_graphs = before


def outcome(call):
    """What a call gives: ("ok", value) or ("raises", exception type, message)."""
    try:
        return ("ok", call())
    except Exception as exc:            # noqa: BLE001 -- the exception is the result compared
        return ("raises", type(exc), str(exc))


def tree_view(T):
    """Everything of a tree networkx's equality leaves out too: class, insertion orders."""
    edges = T.edges(keys=True, data=True) if T.is_multigraph() else T.edges(data=True)
    return type(T), T.graph, list(T.nodes(data=True)), list(edges)


def same_edges(got, want):
    """Equal edge lists, the attribute dicts being the graph's own objects (as networkx's)."""
    assert got == want
    for a, b in zip(got, want):
        if a and isinstance(a[-1], dict):
            assert a[-1] is b[-1]


# ---------------------------------------------------------------------------------------------
# random graphs

WEIGHTS = {
    "int": st.integers(-4, 4),
    "float": st.floats(allow_nan=False, width=64),
    "ties": st.sampled_from([0.0, -0.0, 1.0, 1, True, False, 2.5, np.float32(2.5), np.int64(1)]),
    "nan": st.sampled_from([1.0, 2.0, math.inf, -math.inf, math.nan]),
    # not plain numbers: networkx's own code runs (big ints beside floats, Decimal, Fraction)
    "exact": st.sampled_from([2**60, 2**60 + 1, float(2**60), 2**70, -2**63, Decimal("0.1"),
                              Fraction(1, 3), 0.1]),
}


@st.composite
def nx_graphs(draw, multigraph=None):
    multigraph = draw(st.booleans()) if multigraph is None else multigraph
    n = draw(st.integers(0, 10))
    kind = draw(st.sampled_from(["range", "shuffled", "str", "tuple"]))
    ids = list(range(n)) if kind == "range" else draw(st.permutations(range(n)))
    nodes = {"str": [f"n{i}" for i in ids], "tuple": [(i, "x") for i in ids]}.get(kind, ids)
    G = nx.MultiGraph() if multigraph else nx.Graph()
    G.graph["name"] = "drawn"
    G.add_nodes_from((v, {"tag": i}) for i, v in enumerate(nodes))
    weights = WEIGHTS[draw(st.sampled_from(sorted(WEIGHTS)))]
    if n:
        for j in range(draw(st.integers(0, 30))):
            u, v = draw(st.sampled_from(nodes)), draw(st.sampled_from(nodes))
            attrs = {"id": j}
            if draw(st.integers(0, 5)):                 # else the weight attribute is missing
                attrs["weight"] = draw(weights)
            if multigraph:
                G.add_edge(u, v, key=draw(st.sampled_from([None, 0, 1, "a"])), **attrs)
            else:
                G.add_edge(u, v, **attrs)
        if draw(st.booleans()) and len(G):                # a node removed and re-added
            v = draw(st.sampled_from(list(G)))
            G.remove_node(v)
            G.add_node(v, tag=-1)
    return G


@needs_backend
@given(G=nx_graphs(), ignore_nan=st.booleans())
def test_edges_equal_networkx(G, ignore_nan):
    """Reference: networkx's minimum/maximum_spanning_edges (Kruskal) on the same graph, for
    every keys/data combination: the same tuples in the same order, or the same exception."""
    for func in MIN_MAX:
        for keys in (True, False):
            for data in (True, False):
                args = dict(keys=keys, data=data, ignore_nan=ignore_nan)
                want = outcome(lambda: list(func(G, **args)))
                got = outcome(lambda: list(func(G, backend="fastmst", **args)))
                assert got[0] == want[0], (got, want)
                if want[0] == "ok":
                    same_edges(got[1], want[1])
                else:
                    assert got == want


@needs_backend
@given(G=nx_graphs(), ignore_nan=st.booleans())
def test_trees_equal_networkx(G, ignore_nan):
    """Reference: networkx's minimum/maximum_spanning_tree: the same class, graph attributes,
    nodes with attributes and edges with attributes, in networkx's insertion order."""
    for func in TREES:
        want = outcome(lambda: tree_view(func(G, ignore_nan=ignore_nan)))
        got = outcome(lambda: tree_view(func(G, ignore_nan=ignore_nan, backend="fastmst")))
        assert got == want


@needs_backend
@settings(max_examples=20)
@given(seed=st.integers(0, 2**32 - 1))
def test_dense_ties_equal_networkx(seed):
    """Reference: networkx, on denser graphs with many ties (weights 0..3, ``weight="cost"``)."""
    rng = np.random.default_rng(seed)
    H = nx.gnm_random_graph(60, 400, seed=seed)
    for u, v, d in H.edges(data=True):
        d["cost"] = int(rng.integers(0, 4))
    for func in MIN_MAX:
        want = list(func(H, weight="cost"))
        same_edges(list(func(H, weight="cost", backend="fastmst")), want)
    for func in TREES:
        assert tree_view(func(H, weight="cost", backend="fastmst")) == tree_view(
            func(H, weight="cost"))


@needs_backend
@pytest.mark.parametrize("values,compiled", [
    ([3, 1, 2, 1], True), ([3.5, 1.0, -0.0, 0.0], True), ([True, False, True, 1], True),
    ([1, 2.5, np.float32(0.5), np.int64(7)], True), ([2**62, 2**62 + 1, 1, 0], True),
    ([2**60 + 1, float(2**60), 1.0, 2.0], False), ([Decimal(1), Decimal(2), 3, 4], False),
    ([Fraction(1, 3), Fraction(1, 2), 0, 1], False), ([2**70, 1, 2, 3], False),
])
def test_compiled_route_only_for_exact_numbers(monkeypatch, values, compiled):
    """Plain numbers NumPy holds exactly run the compiled solve; others run networkx's code
    (reference: networkx's result, equal either way)."""
    calls = []
    solve = spanning.minimum_spanning_forest
    monkeypatch.setattr(spanning, "minimum_spanning_forest",
                        lambda *a, **k: calls.append(1) or solve(*a, **k))
    G = nx.cycle_graph(4)
    for (u, v), w in zip(G.edges(), values):
        G[u][v]["weight"] = w
    for func in MIN_MAX:
        same_edges(list(func(G, backend="fastmst")), list(func(G)))
    assert bool(calls) is compiled


# ---------------------------------------------------------------------------------------------
# the conversion


class OrderedGraph(nx.Graph):
    """Dict factories other than dict (the general conversion route)."""
    from collections import OrderedDict
    node_dict_factory = adjlist_outer_dict_factory = OrderedDict
    adjlist_inner_dict_factory = edge_attr_dict_factory = OrderedDict


def _graphs_for_conversion():
    G = nx.gnm_random_graph(30, 80, seed=3)
    G.add_edge(5, 5, weight=2)
    G.remove_node(0)
    G.add_node(0)
    G.add_edge(0, 29)
    M = nx.MultiGraph(G)
    M.add_edge(1, 2, key="x")
    M.add_edge(2, 1)
    M.add_edge(7, 7)
    labelled = nx.relabel_nodes(G, {v: f"s{v}" for v in G})
    return {"graph": G, "multigraph": M, "labels": labelled,
            "subclass": OrderedGraph(G), "view": G.subgraph(range(3, 25)),
            "multi-view": M.subgraph(range(0, 20)), "empty": nx.Graph(),
            "isolated": nx.empty_graph(4)}


@pytest.mark.parametrize("name", sorted(_graphs_for_conversion()))
def test_conversion_follows_edge_order(name):
    """Reference: networkx's own ``G.edges`` iteration: position i of the arrays is its i-th
    edge (the order networkx's Kruskal sorts stably), with the graph's own dicts."""
    G = _graphs_for_conversion()[name]
    g = nxgraph.from_networkx(G)
    multi = G.is_multigraph()
    want = list(G.edges(keys=True, data=True) if multi else G.edges(data=True))
    got = [(g.nodes[t], g.nodes[h]) + ((g.keys[i],) if multi else ()) + (g.data[i],)
           for i, (t, h) in enumerate(zip(g.tail, g.head))]
    same_edges(got, want)
    assert list(g.nodes) == list(G)
    assert convert_to_nx(g) is G and g.is_multigraph() is multi and not g.is_directed()


@needs_backend
def test_cached_conversion_reads_weights_fresh():
    """A weight changed in place (which networkx's conversion cache does not notice) is read at
    the next call; reference: networkx on the changed graph."""
    nx.config.cache_converted_graphs = True
    G = nx.cycle_graph(5)
    nx.set_edge_attributes(G, 1, "weight")
    first = nx.minimum_spanning_tree(G, backend="fastmst")
    assert G.__networkx_cache__["backends"]["fastmst"]      # networkx cached the conversion
    G[0][1]["weight"] = 9                                   # in place: the cache stays
    with pytest.warns(UserWarning, match="cache"):
        again = nx.minimum_spanning_tree(G, backend="fastmst")
    assert tree_view(again) == tree_view(nx.minimum_spanning_tree(G))
    assert (0, 1) not in again.edges and (0, 1) in first.edges


# ---------------------------------------------------------------------------------------------
# arguments networkx refuses, and ours


@needs_backend
@pytest.mark.parametrize("func", MIN_MAX + TREES, ids=lambda f: f.__name__)
def test_unknown_algorithm_as_networkx(func):
    """Reference: networkx's ValueError "random is not a valid choice for an algorithm."."""
    G = nx.path_graph(3)
    call = (lambda **k: list(func(G, algorithm="random", **k))) if func in MIN_MAX else (
        lambda **k: func(G, algorithm="random", **k))
    want = outcome(call)
    assert want[:2] == ("raises", ValueError)
    assert outcome(lambda: call(backend="fastmst")) == want


@needs_backend
@pytest.mark.parametrize("func", MIN_MAX + TREES, ids=lambda f: f.__name__)
@pytest.mark.parametrize("cls", [nx.DiGraph, nx.MultiDiGraph])
def test_directed_as_networkx(func, cls):
    """Reference: networkx's NetworkXNotImplemented "not implemented for directed type"."""
    G = cls([(0, 1), (1, 2)])
    call = (lambda **k: list(func(G, **k))) if func in MIN_MAX else (lambda **k: func(G, **k))
    want = outcome(call)
    assert want[:2] == ("raises", nx.NetworkXNotImplemented)
    assert outcome(lambda: call(backend="fastmst")) == want


@needs_backend
@pytest.mark.parametrize("value", ["3", None, 1j, [1], (1, 2), {"a": 1}, 2**1100])
@pytest.mark.parametrize("func", MIN_MAX, ids=lambda f: f.__name__)
def test_weights_networkx_refuses(func, value):
    """Weights that are not numbers: networkx's own exception (reference: networkx)."""
    G = nx.path_graph(4)
    G[1][2]["weight"] = value
    want = outcome(lambda: list(func(G)))
    assert want[0] == "raises"
    assert outcome(lambda: list(func(G, backend="fastmst"))) == want


@needs_backend
@pytest.mark.parametrize("func", MIN_MAX, ids=lambda f: f.__name__)
def test_nan_raises_when_consumed(func):
    """networkx's iterator raises on a NaN weight when consumed, not when created; the message
    names the edge (reference: networkx)."""
    G = nx.MultiGraph([(0, 1), (1, 2)])
    G.add_edge(2, 0, key="k", weight=math.nan)
    edges = func(G, backend="fastmst")                  # no error yet
    with pytest.raises(ValueError) as got:
        list(edges)
    with pytest.raises(ValueError) as want:
        list(func(G))
    assert str(got.value) == str(want.value) == (
        "NaN found as an edge weight. Edge (0, 2, 'k', {'weight': nan})")


@needs_backend
@pytest.mark.parametrize("algorithm", ["prim", "boruvka", "borůvka"])
def test_other_algorithms_declined(algorithm):
    """can_run declines Prim and Borůvka: forced onto the backend, networkx's dispatcher raises
    NotImplementedError with our reason logged; without ``backend=`` networkx runs them."""
    G = nx.path_graph(4)
    assert "kruskal" in can_run("minimum_spanning_tree", (G,), {"algorithm": algorithm})
    with pytest.raises(NotImplementedError, match="fastmst"):
        nx.minimum_spanning_tree(G, algorithm=algorithm, backend="fastmst")
    assert can_run("minimum_spanning_tree", (G,), {}) is True
    assert sorted(nx.minimum_spanning_tree(G, algorithm=algorithm).edges) == sorted(G.edges)


@needs_backend
@pytest.mark.parametrize("func", TREES, ids=lambda f: f.__name__)
@pytest.mark.parametrize("G", [[(0, 1)], None, "G", np.zeros((2, 2))], ids=repr)
def test_not_a_graph(func, G):
    """Not a graph: a TypeError that names what was received (networkx's own code fails with
    an AttributeError or its dispatcher's TypeError here)."""
    with pytest.raises(TypeError, match="networkx graph|graph argument"):
        func(G, backend="fastmst")


# ---------------------------------------------------------------------------------------------
# registration and networkx's own tests


def test_pyproject_declares_entry_points():
    """Both entry points are declared, so every install (pip install ".[test]") registers them."""
    tomllib = pytest.importorskip("tomllib")
    meta = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    eps = meta["project"]["entry-points"]
    assert eps["networkx.backends"] == {"fastmst": "fastmst.nxbackend.interface"}
    assert eps["networkx.backend_info"] == {"fastmst": "_fastmst_nx:get_info"}
    assert "_fastmst_nx" in meta["tool"]["setuptools"]["packages"]["find"]["include"]


def test_backend_info_is_light_and_complete():
    """networkx calls get_info() while importing itself: it imports neither fastmst nor NumPy,
    and lists exactly the functions the backend implements."""
    code = ("import sys, _fastmst_nx; info = _fastmst_nx.get_info(); "
            "print(sorted(info['functions'])); "
            "print(sorted(m for m in sys.modules if m.split('.')[0] in ('fastmst', 'numpy')))")
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=ROOT, check=True)
    functions, loaded = run.stdout.splitlines()
    assert functions == str(sorted(FUNCTIONS)) and loaded == "[]"


@needs_backend
def test_registered_with_networkx():
    assert nx.utils.backends.backend_info["fastmst"]["backend_name"] == "fastmst"
    for name in FUNCTIONS:
        assert "fastmst" in getattr(nx, name).backends


_AUTOMATIC = """
import networkx as nx
from fastmst.nxbackend import interface
calls = []
for name in ("maximum_spanning_tree", "minimum_spanning_edges"):
    func = getattr(interface, name)
    setattr(interface, name, lambda *a, _f=func, _n=name, **k: calls.append(_n) or _f(*a, **k))
G = nx.cycle_graph(5)
T = nx.maximum_spanning_tree(G)
E = list(nx.minimum_spanning_edges(G))
print(sorted(calls), len(T.edges), len(E))
"""


@needs_backend
def test_automatic_dispatch_from_environment():
    """No code change: NETWORKX_BACKEND_PRIORITY sends the *_edges functions to the backend,
    NETWORKX_BACKEND_PRIORITY_GENERATORS the *_tree functions (networkx files functions that
    return graphs as generators)."""
    env = dict(os.environ, NETWORKX_BACKEND_PRIORITY="fastmst",
               NETWORKX_BACKEND_PRIORITY_GENERATORS="fastmst")
    run = subprocess.run([sys.executable, "-c", _AUTOMATIC], capture_output=True, text=True,
                         cwd=tempfile.gettempdir(), env=env)
    assert run.returncode == 0, run.stderr[-2000:]
    assert run.stdout.split() == ["['maximum_spanning_tree',", "'minimum_spanning_edges']",
                                  "4", "4"]


@needs_backend
@pytest.mark.slow
def test_networkx_mst_tests():
    """networkx's own MST tests with networkx's backend test mechanism: NETWORKX_TEST_BACKEND
    sends every call to the backend (tree results are compared with networkx's by networkx),
    NETWORKX_FALLBACK_TO_NX runs what the backend declines (Prim, Borůvka, other functions) in
    networkx.  Passes with no failure and no xfail, and the backend ran each of its functions."""
    with tempfile.TemporaryDirectory() as tmp:
        probe = Path(tmp) / "calls.json"
        env = dict(os.environ, NETWORKX_TEST_BACKEND="fastmst", NETWORKX_FALLBACK_TO_NX="True",
                   FASTMST_NX_PROBE=str(probe))
        paths = [str(Path(__file__).parent)] + [
            str(Path(p).resolve()) for p in env.get("PYTHONPATH", "").split(os.pathsep) if p]
        env["PYTHONPATH"] = os.pathsep.join(paths)
        run = subprocess.run(
            [sys.executable, "-m", "pytest", "--pyargs", "networkx.algorithms.tree.tests.test_mst",
             "-p", "nx_backend_probe", "-p", "no:cacheprovider", "-q", "-rfEsxX"],
            capture_output=True, text=True, cwd=tmp, env=env)
        summary = run.stdout.strip().splitlines()[-1] if run.stdout.strip() else run.stderr
        assert run.returncode == 0, run.stdout[-3000:] + run.stderr[-2000:]
        assert "passed" in summary and "failed" not in summary and "xfail" not in summary, summary
        calls = json.loads(probe.read_text(encoding="utf-8"))
    assert set(calls) == set(FUNCTIONS) and min(calls.values()) > 0, calls
