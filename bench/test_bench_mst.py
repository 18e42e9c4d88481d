"""pytest-benchmark suite for regression tracking (no timing is asserted).

    pytest bench/ --benchmark-only                        # every case
    pytest bench/ --benchmark-only -m smoke               # the small CI subset (seconds)
    pytest bench/ --benchmark-only --benchmark-json=out.json

Each benchmark checks that the forest has the expected number of edges, so a benchmark of a
broken kernel fails instead of timing garbage.
"""
import numpy as np
import pytest

import fastmst
import generators as gen

pytest.importorskip("pytest_benchmark")

SMOKE = [
    ("random-10K-100K", gen.random_graph, dict(n=10_000, m=100_000)),
    ("grid-100x100", gen.grid_graph, dict(rows=100, cols=100)),
]
LARGE = [
    ("random-100K-1M", gen.random_graph, dict(n=100_000, m=1_000_000)),
    ("random-1M-10M", gen.random_graph, dict(n=1_000_000, m=10_000_000)),
    ("grid-1000x1000", gen.grid_graph, dict(rows=1000, cols=1000)),
    ("road-500x500", gen.road_grid, dict(rows=500, cols=500)),
    ("power-law-100K-1M", gen.power_law_graph, dict(n=100_000, m=1_000_000)),
    ("complete-1000", gen.complete_graph, dict(n=1000)),
]
METHODS = ["auto", "kruskal", "filter-kruskal", "boruvka"]
_CACHE = {}


def _graph(name, fn, kw):
    if name not in _CACHE:
        _CACHE.clear()
        _CACHE[name] = fn(**kw)
    return _CACHE[name]


def _expected_size(tail, head, n):
    from scipy import sparse
    from scipy.sparse.csgraph import connected_components
    k, _ = connected_components(sparse.coo_array((np.ones(len(tail)), (tail, head)),
                                                 shape=(n, n)), directed=False)
    return n - k


def _run(benchmark, graph, method):
    tail, head, weight, n = graph
    f = benchmark(fastmst.minimum_spanning_forest, tail, head, weight, n, method=method)
    assert len(f) == _expected_size(tail, head, n)


@pytest.mark.smoke
@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("case", SMOKE, ids=[c[0] for c in SMOKE])
def test_smoke(benchmark, case, method):
    """Small graphs for CI: every method runs and returns a spanning forest."""
    _run(benchmark, _graph(*case), method)


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("case", LARGE, ids=[c[0] for c in LARGE])
def test_large(benchmark, case, method):
    """Regression tracking on the larger families."""
    benchmark.group = case[0]
    _run(benchmark, _graph(*case), method)


@pytest.mark.smoke
def test_scipy_reference_smoke(benchmark):
    """The SciPy route on the smoke graph, for a same-run ratio."""
    from compare import scipy_mst
    tail, head, weight, n = _graph(*SMOKE[0])
    benchmark(scipy_mst, tail, head, weight, n)
