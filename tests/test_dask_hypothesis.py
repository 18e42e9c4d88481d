"""fastmst.dask against the in-memory solve over generated graphs and partitionings.

Hypothesis draws small multigraphs (ties, -0.0 and +0.0, infinities, negative weights, parallel
edges, self-loops, isolated nodes, several components) and cuts them into partitions of very
different sizes, empty ones included.  Every plan must return the *identical* forest (edges,
endpoints, weights and their dtypes, labels) to ``fastmst.minimum_spanning_forest`` on the
concatenated arrays, whose own correctness is pinned against SciPy and networkx in the core
tests; the total weight is also checked here against networkx (``minimum_spanning_tree`` /
``maximum_spanning_tree`` of a MultiGraph, which keeps parallel edges).  Dask's synchronous
scheduler runs the tasks: the cluster adds nothing to what is checked here (tests/test_dask.py
runs the same plans on a LocalCluster, a worker killed mid-run included).
"""
from __future__ import annotations

import contextlib

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

pd = pytest.importorskip("pandas")
dask = pytest.importorskip("dask")
pytest.importorskip("distributed")

import networkx as nx  # noqa: E402

import fastmst  # noqa: E402
import fastmst.dask as fdask  # noqa: E402
from fastmst.dask import chunks as fchunks  # noqa: E402
from fastmst.dask import filter_kruskal  # noqa: E402

WEIGHT_DTYPES = [np.int32, np.int64, np.float32, np.float64]


@st.composite
def partitioned_graphs(draw):
    n = draw(st.integers(1, 60))
    m = draw(st.integers(0, 300))
    rng = np.random.default_rng(draw(st.integers(0, 2**32 - 1)))
    hub = draw(st.integers(1, n))  # endpoints drawn from few nodes: many parallel edges
    t = rng.integers(0, hub, m)
    h = rng.integers(0, n, m)
    dtype = np.dtype(draw(st.sampled_from(WEIGHT_DTYPES)))
    if dtype.kind == "f":
        pool = np.array([-2.5, -0.0, 0.0, 0.5, 1.0, 1.0, 3.0, np.inf, -np.inf], dtype)
        w = rng.choice(pool, m) if draw(st.booleans()) else rng.standard_normal(m).astype(dtype)
    else:
        w = rng.integers(-3, 4, m).astype(dtype)
    n_parts = draw(st.integers(1, 9))
    # cut points drawn with repeats and skew: partitions of very different sizes, empty ones
    cuts = sorted(draw(st.lists(st.integers(0, m), min_size=n_parts - 1,
                                max_size=n_parts - 1)))
    extra = draw(st.integers(0, 5))  # isolated nodes beyond the largest id
    maximize = draw(st.booleans())
    as_frame = draw(st.booleans())
    return t, h, w, cuts, n + extra, maximize, as_frame


@contextlib.contextmanager
def thin(light_per_node):
    """Few light edges per level and a thin sample (several levels, thresholds inside runs of
    tied weights, a sample that runs out before the edges do)."""
    saved = filter_kruskal.LIGHT_PER_NODE, fchunks.SAMPLE_ROWS, fchunks.MIN_SAMPLE_PER_PARTITION
    filter_kruskal.LIGHT_PER_NODE = light_per_node
    fchunks.SAMPLE_ROWS, fchunks.MIN_SAMPLE_PER_PARTITION = 64, 4
    try:
        yield
    finally:
        (filter_kruskal.LIGHT_PER_NODE, fchunks.SAMPLE_ROWS,
         fchunks.MIN_SAMPLE_PER_PARTITION) = saved


def delayed_chunks(t, h, w, cuts, as_frame):
    pieces = zip(np.split(t, cuts), np.split(h, cuts), np.split(w, cuts))
    if as_frame:
        return [dask.delayed(pd.DataFrame)({"tail": a, "head": b, "weight": c})
                for a, b, c in pieces]
    return [dask.delayed(tuple)([a, b, c]) for a, b, c in pieces]


def networkx_weight(t, h, w, n, maximize):
    """Total forest weight by networkx (Kruskal on a MultiGraph, parallel edges kept)."""
    g = nx.MultiGraph()
    g.add_nodes_from(range(n))
    g.add_weighted_edges_from(zip(t.tolist(), h.tolist(), w.tolist()))
    tree = (nx.maximum_spanning_tree if maximize else nx.minimum_spanning_tree)(g)
    return tree.size(weight="weight")


def assert_identical(got, want):
    for name in ("edges", "tail", "head", "weights", "labels"):
        a, b = getattr(got, name), getattr(want, name)
        np.testing.assert_array_equal(a, b, err_msg=name)
        assert a.dtype == b.dtype, name
    assert (got.n_components, got.n_nodes, got.n_edges, got.maximize) == (
        want.n_components, want.n_nodes, want.n_edges, want.maximize)


@settings(max_examples=30)
@given(partitioned_graphs())
def test_every_plan_identical_to_in_memory(graph):
    """Default plan, Filter-Kruskal forced into several levels, the filter tree and Borůvka
    rounds: all identical to the in-memory solve; weight equal to networkx's."""
    t, h, w, cuts, n, maximize, as_frame = graph
    want = fastmst.minimum_spanning_forest(t, h, w, n, maximize=maximize)
    parts = delayed_chunks(t, h, w, cuts, as_frame)
    runs = []
    with dask.config.set(scheduler="sync"):
        runs.append(fdask.minimum_spanning_forest(parts, n, maximize=maximize, client=False))
        with thin(0.2):
            runs.append(fdask.minimum_spanning_forest(parts, n, maximize=maximize,
                                                      plan="filter-kruskal", client=False))
        runs.append(fdask.minimum_spanning_forest(parts, n, maximize=maximize, plan="filter",
                                                  max_task_edges=40, split_every=2,
                                                  client=False))
        runs.append(fdask.minimum_spanning_forest(parts, n, maximize=maximize, plan="boruvka",
                                                  max_task_edges=30, client=False))
    for got in runs:
        assert_identical(got, want)
    if np.isfinite(w).all():
        # Reference: networkx minimum/maximum_spanning_tree on the same multigraph.
        assert runs[0].weight == pytest.approx(networkx_weight(t, h, w, n, maximize))
    passes = runs[1].dask_plan["passes"]
    assert passes[0]["kind"] == "validate" and passes[0]["rows_read"] == t.shape[0]
    assert sum(p.get("forest_edges", 0) for p in passes) == len(want)
    if len(want) > 1:
        assert runs[1].dask_plan["summary"].startswith("filter-kruskal: ")


def test_levels_are_taken_when_light_edges_are_few():
    """The forced-levels setting of the test above does run several levels (so the test above
    covers thresholds, bands and relabelling, not only the single final level)."""
    rng = np.random.default_rng(3)
    t, h = rng.integers(0, 200, 3000), rng.integers(0, 200, 3000)
    w = rng.integers(0, 5, 3000).astype(np.float64)  # heavy ties: thresholds inside a run
    parts = delayed_chunks(t, h, w, [10, 10, 2000], False)
    with dask.config.set(scheduler="sync"), thin(0.2):
        got = fdask.minimum_spanning_forest(parts, client=False)
    levels = [p for p in got.dask_plan["passes"] if p["kind"] == "level"]
    assert len(levels) >= 2, got.dask_plan["summary"]
    assert all(p["edges_kept"] <= p["edges_in_band"] for p in levels)
    assert_identical(got, fastmst.minimum_spanning_forest(t, h, w))
