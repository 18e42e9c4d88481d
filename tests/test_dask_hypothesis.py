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
    saved = (filter_kruskal.LIGHT_PER_NODE, fchunks.SAMPLE_ROWS,
             fchunks.MIN_SAMPLE_PER_PARTITION, filter_kruskal.MIN_PIECE_EDGES,
             filter_kruskal.SPLIT_SAMPLE, filter_kruskal.SPLIT_BLOCK)
    filter_kruskal.LIGHT_PER_NODE = light_per_node
    fchunks.SAMPLE_ROWS, fchunks.MIN_SAMPLE_PER_PARTITION = 64, 4
    filter_kruskal.MIN_PIECE_EDGES = 3  # each level's light edges solved in up to 8 pieces
    # split points from a strided sample of the keys, pieces mapped in blocks of 5 rows
    filter_kruskal.SPLIT_SAMPLE, filter_kruskal.SPLIT_BLOCK = 4, 5
    try:
        yield
    finally:
        (filter_kruskal.LIGHT_PER_NODE, fchunks.SAMPLE_ROWS,
         fchunks.MIN_SAMPLE_PER_PARTITION, filter_kruskal.MIN_PIECE_EDGES,
         filter_kruskal.SPLIT_SAMPLE, filter_kruskal.SPLIT_BLOCK) = saved


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


# Weight dtypes mixed across partitions: the concatenation's dtype (np.result_type) is the one
# the rule compares in; int64 with float64 rounds large integers to ties in float64.
MIXED_DTYPES = [(np.int32, np.int64), (np.float32, np.float64), (np.int64, np.float64),
                (np.uint32, np.int32)]


@st.composite
def folded_cases(draw):
    """Graphs cut into partitions (empty ones, one much larger than the rest), weights from a
    pool of very few values (ties at the folded threshold t1 within and across partitions) or
    all equal, weight dtypes mixed across partitions, and quotas from one row per partition to
    more than every partition holds (all rows light)."""
    n = draw(st.integers(2, 40))
    m = draw(st.integers(0, 250))
    rng = np.random.default_rng(draw(st.integers(0, 2**32 - 1)))
    t, h = rng.integers(0, n, m), rng.integers(0, n, m)
    pool = draw(st.sampled_from([1, 2, 3, 50]))  # distinct weights: 1 = every weight tied
    base = draw(st.sampled_from([0, 2**53]))  # 2**53 + k: int64 values float64 cannot tell apart
    values = base + rng.integers(0, pool, m)
    n_parts = draw(st.integers(1, 7))
    cuts = sorted(draw(st.lists(st.integers(0, m), min_size=n_parts - 1,
                                max_size=n_parts - 1)))
    dtypes = draw(st.sampled_from(MIXED_DTYPES))
    pieces = []
    for i, v in enumerate(np.split(values, cuts)):
        dt = np.dtype(dtypes[draw(st.integers(0, 1))])
        if base and dt.itemsize < 8:
            dt = np.dtype(np.int64)  # 2**53 needs 64 bits
        pieces.append(v.astype(dt))
    safety = draw(st.sampled_from([1e-9, 0.3, 1.0, 1e9]))  # 1e-9: one row per partition
    light_per_node = draw(st.sampled_from([0.2, 1.5]))
    return (t, h, pieces, cuts, n + draw(st.integers(0, 3)), draw(st.booleans()), safety,
            light_per_node, draw(st.booleans()))


@pytest.mark.parametrize("min_piece", [1, 1 << 22])
@settings(max_examples=40, deadline=None)
@given(folded_cases())
def test_folded_first_level_identical_to_in_memory(min_piece, case):
    """The validation pass's lightest rows as the first level (threshold t1 = the smallest
    partition bound): identical forest to the in-memory solve on the concatenation, also with
    ties at t1 across partitions, partitions smaller than their quota, empty partitions, mixed
    weight dtypes and every row light; the same forest with the first level as its own pass.
    ``min_piece`` 1: every level's light edges solved on the client in up to 8 pieces of
    consecutive key ranges (ties never split across pieces); 2**22: in one piece."""
    t, h, pieces, cuts, n, maximize, safety, light_per_node, as_frame = case
    # The distributed path takes the weight dtype from the partitions that hold rows (an empty
    # partition's column dtype does not count), so the reference concatenates those.
    w = np.concatenate([p for p in pieces if p.size] or pieces)
    want = fastmst.minimum_spanning_forest(t, h, w, n, maximize=maximize)
    tp, hp = np.split(t, cuts), np.split(h, cuts)
    if as_frame:
        parts = [dask.delayed(pd.DataFrame)({"tail": a, "head": b, "weight": c})
                 for a, b, c in zip(tp, hp, pieces)]
    else:
        parts = [dask.delayed(tuple)([a, b, c]) for a, b, c in zip(tp, hp, pieces)]
    saved = (filter_kruskal.FOLD_SAFETY, filter_kruskal.LIGHT_PER_NODE,
             filter_kruskal.FOLD_FIRST_LEVEL, filter_kruskal.MIN_PIECE_EDGES)
    try:
        filter_kruskal.FOLD_SAFETY, filter_kruskal.LIGHT_PER_NODE = safety, light_per_node
        filter_kruskal.MIN_PIECE_EDGES = min_piece
        with dask.config.set(scheduler="sync"):
            got = fdask.minimum_spanning_forest(parts, n, maximize=maximize, client=False)
            filter_kruskal.FOLD_FIRST_LEVEL = False
            unfolded = fdask.minimum_spanning_forest(parts, n, maximize=maximize, client=False)
    finally:
        (filter_kruskal.FOLD_SAFETY, filter_kruskal.LIGHT_PER_NODE,
         filter_kruskal.FOLD_FIRST_LEVEL, filter_kruskal.MIN_PIECE_EDGES) = saved
    assert_identical(got, want)
    assert_identical(unfolded, want)
    first = got.dask_plan["passes"][0]
    assert first["kind"] == "validate" and "light_rows_returned" in first
    assert "light_rows_returned" not in unfolded.dask_plan["passes"][0]
    assert first["edges_kept"] <= first["edges_in_band"] <= first["light_rows_returned"]
    assert first["light_rows_returned"] <= t.shape[0]
    assert sum(p.get("forest_edges", 0) for p in got.dask_plan["passes"]) == len(want)
    if safety == 1e9:  # quotas beyond every partition: all rows light, no pass after validation
        assert not first["threshold_found"] and len(got.dask_plan["passes"]) == 1
        assert first["edges_in_band"] == int(np.count_nonzero(t != h))
    if safety == 1e-9 and t.shape[0] > len(cuts) + 1:  # one row per partition: a bound exists
        assert first["threshold_found"]


def test_folded_bound_is_exact_at_a_tie_across_partitions():
    """Every weight equal: the quotas end inside one run of ties in every partition, so t1 is
    decided by edge id alone; the forest is the in-memory one (the earliest ids win)."""
    rng = np.random.default_rng(11)
    t, h = rng.integers(0, 30, 400), rng.integers(0, 30, 400)
    w = np.ones(400)
    cuts = [0, 50, 50, 300]
    parts = delayed_chunks(t, h, w, cuts, False)
    saved = filter_kruskal.FOLD_SAFETY
    try:
        filter_kruskal.FOLD_SAFETY = 0.5
        with dask.config.set(scheduler="sync"):
            got = fdask.minimum_spanning_forest(parts, 30, client=False)
    finally:
        filter_kruskal.FOLD_SAFETY = saved
    first = got.dask_plan["passes"][0]
    # quotas: ceil(0.5 * 1.5 * 30 / 5) = 5 rows per partition; partition 1 is empty
    assert first["light_quota"] == 25 and first["threshold_found"]
    assert first["light_rows_returned"] <= 15  # 3 non-empty partitions x 5, self-loops dropped
    assert_identical(got, fastmst.minimum_spanning_forest(t, h, w, 30))


@settings(max_examples=25, deadline=None)
@given(partitioned_graphs(), st.sampled_from([0.05, 0.3, 1.0, 1e6]))
def test_light_per_node_changes_passes_not_the_forest(graph, light):
    """``light_per_node=`` (the client's light edges per node per level): any positive value
    gives the forest of the in-memory solve; with more light edges per node than the graph has
    edges, the validation pass brings every row and is the only pass."""
    t, h, w, cuts, n, maximize, as_frame = graph
    want = fastmst.minimum_spanning_forest(t, h, w, n, maximize=maximize)
    parts = delayed_chunks(t, h, w, cuts, as_frame)
    with dask.config.set(scheduler="sync"):
        got = fdask.minimum_spanning_forest(parts, n, maximize=maximize, client=False,
                                            light_per_node=light)
        default = fdask.minimum_spanning_forest(parts, n, maximize=maximize, client=False)
    assert_identical(got, want)
    assert got.dask_plan["light_per_node"] == light
    assert_identical(default, want)
    if light == 1e6:
        assert len(got.dask_plan["passes"]) == 1


@pytest.mark.parametrize("value,error", [
    (0, ValueError), (-1.0, ValueError), (float("inf"), ValueError), (float("nan"), ValueError),
    ("1.5", TypeError), (True, TypeError), ([1.0], TypeError)])
def test_light_per_node_bad_values(value, error):
    """A bad ``light_per_node`` is refused before any task runs, naming what was received."""
    parts = delayed_chunks(np.array([0]), np.array([1]), np.array([1.0]), [], False)
    with pytest.raises(error, match="light_per_node"):
        fdask.minimum_spanning_forest(parts, 2, client=False, light_per_node=value)
