"""pytest-benchmark suite for the toolkit, for regression tracking (not part of ``tests/``).

    PYTHONPATH=$PWD python -m pytest bench/test_bench_toolkit.py --benchmark-only
    FASTMST_BENCH_EDGES=10000000 PYTHONPATH=$PWD python -m pytest bench/test_bench_toolkit.py

The graph is the one of bench_toolkit.py (uniform random, float64 weights, fixed seed), 1M edges
by default.  Each benchmark also checks its result, so a fast wrong answer cannot pass.
"""
import os

import numpy as np
import pytest

import fastmst

EDGES = int(os.environ.get("FASTMST_BENCH_EDGES", "1000000"))


@pytest.fixture(scope="module")
def graph():
    rng = np.random.default_rng(2026)
    n = max(2, EDGES // 10)
    tail = rng.integers(0, n, EDGES, dtype=np.int32)
    head = rng.integers(0, n, EDGES, dtype=np.int32)
    weight = rng.random(EDGES)
    forest = fastmst.minimum_spanning_forest(tail, head, weight, n)
    return tail, head, weight, n, forest, rng


def test_check_forest(benchmark, graph):
    """check_forest certifies the solver's forest."""
    tail, head, weight, n, forest, _ = graph
    assert benchmark(fastmst.check_forest, tail, head, weight, forest).is_minimum


def test_sensitivity(benchmark, graph):
    """sensitivity: all margins are >= 0."""
    tail, head, weight, n, forest, _ = graph
    assert (benchmark(fastmst.sensitivity, tail, head, weight, forest) >= 0).all()


def test_bottleneck(benchmark, graph):
    """bottleneck of 1M pairs: values are the weights of the returned positions."""
    tail, head, weight, n, forest, rng = graph
    a, b = rng.integers(0, n, 1_000_000), rng.integers(0, n, 1_000_000)
    w, p = benchmark(forest.bottleneck, a, b)
    ok = p >= 0
    assert np.array_equal(w[ok], weight[p[ok]])


def test_add_edges(benchmark, graph):
    """add_edges of 1% new edges equals the full re-solve."""
    tail, head, weight, n, forest, rng = graph
    k = max(1, EDGES // 100)
    nt, nh, nw = rng.integers(0, n, k), rng.integers(0, n, k), rng.random(k)
    got = benchmark(forest.add_edges, nt, nh, nw)
    full = fastmst.minimum_spanning_forest(np.concatenate([tail, nt]), np.concatenate([head, nh]),
                                           np.concatenate([weight, nw]), n)
    assert np.array_equal(got.edges, full.edges)
