"""Shared test configuration: a deterministic hypothesis profile, the `slow` marks of tests in
other modules, and small graph helpers."""
import csv

import numpy as np
import pytest
from hypothesis import HealthCheck, settings

# Deterministic profile: the same examples on every run and machine, no wall-clock deadline
# (the machines are shared and noisy; speed is measured in bench/, never asserted here).
settings.register_profile(
    "fastmst",
    deadline=None,
    derandomize=True,
    max_examples=60,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large],
    print_blob=True,
)
settings.load_profile("fastmst")

# Tests that took over about 3 s on the project's 2-core machine (`pytest --durations=25`),
# marked `slow` so that `pytest -m "not slow"` gives a quick local run; CI runs every test.
# "file::function" marks every parametrisation, "file::function[id]" one of them. A test module
# may instead put @pytest.mark.slow on the test itself; then its entry here goes.
SLOW = {
    "test_performance_methods.py::test_filter_kruskal_streamed_chunks",
    "test_performance_methods.py::test_hypothesis_methods_equal_networkx",
    "test_cli.py::test_demo_default_folder",
    "test_cli.py::test_solve_end_to_end",
}


def pytest_collection_modifyitems(config, items):
    """Mark the SLOW tests; a SLOW entry whose module no longer defines the test is an error."""
    modules = {}
    for item in items:
        if item.path.name.startswith("test_") and hasattr(item, "module"):
            modules[item.path.name] = item.module
            if (f"{item.path.name}::{item.name}" in SLOW
                    or f"{item.path.name}::{item.originalname}" in SLOW):
                item.add_marker(pytest.mark.slow)
    for entry in sorted(SLOW):
        file, test = entry.split("::")
        if file in modules and not hasattr(modules[file], test.split("[")[0]):
            raise pytest.UsageError(f"tests/conftest.py SLOW lists {entry!r}, but tests/{file} "
                                    "defines no such test; rename or remove the entry.")


def list_find(parent, x):
    """Root of x in a plain-list union-find, halving the path on the way."""
    while parent[x] != x:
        parent[x] = parent[parent[x]]
        x = parent[x]
    return x


def reference_kruskal(tail, head, weight, n_nodes, maximize=False):
    """The tie rule written out directly: scan edges by (weight, position) with a plain-list union-find.

    Used only to state the tie rule in the simplest possible code; outside references (SciPy,
    networkx) check the optimality itself.
    """
    parent = list(range(n_nodes))
    sign = -1 if maximize else 1
    order = sorted(range(len(weight)), key=lambda i: (sign * weight[i], i))
    chosen = []
    for i in order:
        a, b = list_find(parent, int(tail[i])), list_find(parent, int(head[i]))
        if a != b:
            parent[a] = b
            chosen.append(i)
    return chosen


def assert_is_spanning_forest(f, tail, head, n_nodes):
    """Invariants of every result: acyclic, n_nodes - n_components edges, labels match SciPy."""
    from scipy.sparse import coo_array
    from scipy.sparse.csgraph import connected_components

    tail = np.asarray(tail, dtype=np.int64)
    head = np.asarray(head, dtype=np.int64)
    edges = f.edges
    assert edges.dtype == np.int64
    assert len(set(edges.tolist())) == len(edges)
    assert len(edges) == n_nodes - f.n_components
    # Acyclic: adding the forest edges one by one never closes a cycle.
    parent = list(range(n_nodes))
    for e in edges.tolist():
        a, b = list_find(parent, int(tail[e])), list_find(parent, int(head[e]))
        assert a != b, f"forest edge {e} closes a cycle"
        parent[a] = b
    # Components: scipy.sparse.csgraph.connected_components on the whole graph (reference).
    if n_nodes:
        g = coo_array((np.ones(len(tail)), (tail, head)), shape=(n_nodes, n_nodes))
        k, ref = connected_components(g, directed=False)
        assert f.n_components == k
        # Same partition up to relabelling: labels map one-to-one onto SciPy's.
        pairs = set(zip(f.labels.tolist(), ref.tolist()))
        assert len(pairs) == k
        # Ours are numbered by first appearance.
        first = np.unique(f.labels, return_index=True)[1]
        assert np.all(np.diff(first) > 0)


def write_csv(path, header, rows) -> str:
    """A CSV file of ``header`` and ``rows`` (the csv module's quoting); returns its path."""
    with open(path, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(header)
        w.writerows(rows)
    return str(path)
