"""The distributed path (fastmst.dask) on a real dask.distributed LocalCluster.

Every graph is written to Parquet files in ``tmp_path`` and read back with ``dd.read_parquet``
(or as delayed chunks).  The distributed answer must be *identical* (edges, labels) to
``fastmst.minimum_spanning_forest`` on the concatenated arrays, whose own correctness is pinned
against SciPy and networkx in the core tests; the total weights are also checked here against
networkx (``networkx.minimum_spanning_tree`` on a MultiGraph, which keeps parallel edges).
"""
from __future__ import annotations

import contextlib
import math
import os
import signal

import numpy as np
import pytest

pd = pytest.importorskip("pandas")
dd = pytest.importorskip("dask.dataframe")
distributed = pytest.importorskip("distributed")
pytest.importorskip("pyarrow")

import dask  # noqa: E402
import dask.bag as db  # noqa: E402
import networkx as nx  # noqa: E402

import fastmst  # noqa: E402
import fastmst.dask as fdask  # noqa: E402
from fastmst.dask import chunks as fchunks  # noqa: E402
from fastmst.dask import filter_kruskal  # noqa: E402
from fastmst.validation import FileFormatError  # noqa: E402


@pytest.fixture(scope="module")
def client():
    """One LocalCluster of two worker processes with one thread each, for the whole module."""
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None, memory_limit="2GiB") as cluster, \
            distributed.Client(cluster) as c:
        yield c


def random_graph(seed, n, m, ties=True):
    rng = np.random.default_rng(seed)
    t = rng.integers(0, n, m)
    h = rng.integers(0, n, m)
    w = (rng.integers(-5, 30, m).astype(np.float64) if ties else rng.random(m))
    return t, h, w


def grid_graph(rows, cols, seed):
    """A rows x cols grid with small integer weights (many ties)."""
    idx = np.arange(rows * cols).reshape(rows, cols)
    t = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel()])
    h = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel()])
    rng = np.random.default_rng(seed)
    perm = rng.permutation(t.shape[0])
    return t[perm], h[perm], rng.integers(0, 4, t.shape[0]).astype(np.int64)


def write_parquet(path, t, h, w, cuts):
    """Split the edges at ``cuts`` into one Parquet file per piece; return the directory."""
    path.mkdir()
    pieces = zip(np.split(t, cuts), np.split(h, cuts), np.split(w, cuts))
    for i, (a, b, c) in enumerate(pieces):
        pd.DataFrame({"tail": a, "head": b, "weight": c}).to_parquet(
            path / f"part-{i:03d}.parquet", index=False)
    return str(path)


def random_cuts(m, n_parts, seed):
    rng = np.random.default_rng(seed)
    return np.sort(rng.integers(0, m + 1, n_parts - 1))


def networkx_weight(t, h, w, maximize=False):
    """Total forest weight by networkx (Kruskal on a MultiGraph, parallel edges kept)."""
    g = nx.MultiGraph()
    g.add_weighted_edges_from(zip(t.tolist(), h.tolist(), w.tolist()))
    tree = (nx.maximum_spanning_tree if maximize else nx.minimum_spanning_tree)(g)
    return tree.size(weight="weight")


def assert_identical(got, want):
    np.testing.assert_array_equal(got.edges, want.edges)
    np.testing.assert_array_equal(got.tail, want.tail)
    np.testing.assert_array_equal(got.head, want.head)
    np.testing.assert_array_equal(got.weights, want.weights)
    np.testing.assert_array_equal(got.labels, want.labels)
    assert got.n_components == want.n_components
    assert got.n_nodes == want.n_nodes and got.n_edges == want.n_edges
    assert got.weights.dtype == want.weights.dtype and got.tail.dtype == want.tail.dtype


@contextlib.contextmanager
def many_levels():
    """Filter-Kruskal with few light edges per level and a thin sample, so that small graphs
    take several levels (thresholds inside runs of tied weights, a sample that runs out)."""
    saved = (filter_kruskal.LIGHT_PER_NODE, fchunks.SAMPLE_ROWS,
             fchunks.MIN_SAMPLE_PER_PARTITION, filter_kruskal.MIN_PIECE_EDGES,
             filter_kruskal.SPLIT_SAMPLE, filter_kruskal.SPLIT_BLOCK)
    filter_kruskal.LIGHT_PER_NODE, fchunks.SAMPLE_ROWS = 0.25, 256
    fchunks.MIN_SAMPLE_PER_PARTITION = 8
    filter_kruskal.MIN_PIECE_EDGES = 20  # the client solves each level in up to 8 pieces
    filter_kruskal.SPLIT_SAMPLE, filter_kruskal.SPLIT_BLOCK = 16, 100  # strided, in blocks
    try:
        yield
    finally:
        (filter_kruskal.LIGHT_PER_NODE, fchunks.SAMPLE_ROWS,
         fchunks.MIN_SAMPLE_PER_PARTITION, filter_kruskal.MIN_PIECE_EDGES,
         filter_kruskal.SPLIT_SAMPLE, filter_kruskal.SPLIT_BLOCK) = saved


def solve(edges, plan, budget=None, **kwargs):
    """The distributed solve; plan "levels" is "filter-kruskal" under ``many_levels``."""
    if plan == "levels":
        with many_levels():
            got = fdask.minimum_spanning_forest(edges, plan="filter-kruskal", **kwargs)
        assert len(got.dask_plan["passes"]) >= 4, got.dask_plan["summary"]
        return got
    return fdask.minimum_spanning_forest(edges, plan=plan, max_task_edges=budget, **kwargs)


# plan, max_task_edges: the default (filter-kruskal, two levels here), filter-kruskal with many
# levels, the filter tree, Borůvka rounds to a final solve.
PLANS = [("auto", None), ("levels", None), ("filter", 300), ("boruvka", 200)]


@pytest.mark.parametrize("n_parts,plan,budget", [
    (2, "auto", None), (7, "filter", 300), (7, "boruvka", 200), (20, "levels", None)])
def test_random_graph_matches_in_memory(client, tmp_path, n_parts, plan, budget):
    """Random multigraphs with tied weights, 2 to 50 Parquet partitions, every plan: identical
    edges and labels to the in-memory solve; total weight equal to networkx's."""
    t, h, w = random_graph(n_parts, n=700, m=4000)
    path = write_parquet(tmp_path / "g", t, h, w, random_cuts(t.shape[0], n_parts, n_parts))
    ddf = dd.read_parquet(path)
    assert ddf.npartitions == n_parts
    got = solve(ddf, plan, budget, split_every=3)
    want = fastmst.minimum_spanning_forest(t, h, w)
    assert_identical(got, want)
    # Reference: networkx.minimum_spanning_tree (Kruskal) on the same multigraph.
    assert got.weight == pytest.approx(networkx_weight(t, h, w))
    if plan == "boruvka":
        assert got.dask_plan["rounds"], "expected at least one Borůvka round"


@pytest.mark.parametrize("n_parts,plan,budget", [(3, "auto", None), (11, "levels", None)])
def test_grid_graph_matches_in_memory(client, tmp_path, n_parts, plan, budget):
    """A 30 x 40 grid with integer weights 0..3 (heavy ties): identical to the in-memory
    solve; a connected grid's spanning tree has rows*cols - 1 edges (recalled from memory:
    any spanning tree of a connected graph on V nodes has V - 1 edges)."""
    t, h, w = grid_graph(30, 40, seed=n_parts)
    path = write_parquet(tmp_path / "g", t, h, w, random_cuts(t.shape[0], n_parts, 5))
    got = solve(dd.read_parquet(path), plan, budget, split_every=4)
    assert_identical(got, fastmst.minimum_spanning_forest(t, h, w))
    assert len(got) == 30 * 40 - 1 and got.n_components == 1
    assert got.weight == pytest.approx(networkx_weight(t, h, w))


@pytest.mark.parametrize("plan,budget", [("filter", 300), ("boruvka", 400), ("levels", None)])
def test_maximize(client, tmp_path, plan, budget, monkeypatch):
    """maximize=True: identical to the in-memory maximum spanning forest; weight as networkx's
    maximum_spanning_tree.  Borůvka candidates are min-reduced in several component ranges
    (ranges of at least 100 components here instead of 65536, to have more than one)."""
    monkeypatch.setattr(fdask.boruvka, "MIN_RANGE", 100)
    t, h, w = random_graph(3, n=500, m=3000)
    path = write_parquet(tmp_path / "g", t, h, w, random_cuts(t.shape[0], 6, 1))
    got = solve(dd.read_parquet(path), plan, budget, maximize=True)
    assert got.maximize
    if plan == "boruvka":
        assert got.dask_plan["rounds"][0]["component_ranges"] == 5  # ceil(500 / 100)
    assert_identical(got, fastmst.minimum_spanning_forest(t, h, w, maximize=True))
    assert got.weight == pytest.approx(networkx_weight(t, h, w, maximize=True))


@pytest.mark.parametrize("plan,budget", [("auto", None), ("boruvka", 200), ("levels", None)])
def test_empty_partitions_and_isolated_nodes(client, tmp_path, plan, budget):
    """Empty Parquet files first, in the middle and last, and nodes with no edge at all
    (n_nodes above the largest id, and unused ids below it): identical forest and labels."""
    t, h, w = random_graph(4, n=400, m=1500)
    keep = (t % 7 != 3) & (h % 7 != 3)  # ids = 3 mod 7 become isolated nodes
    t, h, w = t[keep], h[keep], w[keep]
    m = t.shape[0]
    cuts = [0, 0, 300, 300, 300, 900, m, m]
    path = write_parquet(tmp_path / "g", t, h, w, cuts)
    ddf = dd.read_parquet(path)
    assert ddf.npartitions == 9
    got = solve(ddf, plan, budget, n_nodes=450)
    want = fastmst.minimum_spanning_forest(t, h, w, n_nodes=450)
    assert_identical(got, want)
    assert got.n_components >= 450 - 400 + 400 // 7


def test_single_partition(client, tmp_path):
    """One Parquet file is one partition: identical to the in-memory solve."""
    t, h, w = random_graph(5, n=300, m=2000)
    path = write_parquet(tmp_path / "g", t, h, w, [])
    ddf = dd.read_parquet(path)
    assert ddf.npartitions == 1
    for plan, budget in PLANS:
        got = solve(ddf, plan, budget)
        assert_identical(got, fastmst.minimum_spanning_forest(t, h, w))


def test_duplicate_edges_across_partitions(client, tmp_path):
    """The same edges repeated in several partitions: the tie rule picks the earliest copy,
    as in the in-memory solve on the concatenation."""
    t, h, w = random_graph(6, n=200, m=600)
    t3, h3, w3 = (np.concatenate([t, h[::-1], t]), np.concatenate([h, t[::-1], h]),
                  np.concatenate([w, w[::-1], w]))
    path = write_parquet(tmp_path / "g", t3, h3, w3, [600, 1200])
    for plan, budget in PLANS[:2]:
        got = solve(dd.read_parquet(path), plan, budget)
        want = fastmst.minimum_spanning_forest(t3, h3, w3)
        assert_identical(got, want)
        assert got.edges.max() < 600  # every winner is a first copy
        # Reference: the forest of one copy (networkx) has the same weight.
        assert got.weight == pytest.approx(networkx_weight(t, h, w))


def test_delayed_chunks_and_bag(client, tmp_path):
    """A list of delayed pandas chunks, a Bag of such chunks, and a Bag of (tail, head, weight)
    rows give the identical forest; mixed int32/int64 weights combine like np.concatenate."""
    t, h, w = random_graph(7, n=300, m=1800)
    w = w.astype(np.int64)
    path = write_parquet(tmp_path / "g", t, h, w, [500, 900, 900, 1500])
    files = sorted(os.listdir(path))
    chunks = [dask.delayed(pd.read_parquet)(os.path.join(path, f)) for f in files]
    chunks[1] = dask.delayed(lambda df: df.astype({"weight": np.int32}))(chunks[1])
    want = fastmst.minimum_spanning_forest(t, h, w)  # int64 = result type of int32 and int64
    assert_identical(fdask.minimum_spanning_forest(chunks, plan="boruvka",
                                                   max_task_edges=300), want)
    bag = db.from_delayed([dask.delayed(lambda c: [c])(c) for c in chunks])
    assert_identical(fdask.minimum_spanning_forest(bag), want)
    rows = db.from_sequence(list(zip(t.tolist(), h.tolist(), w.tolist())), npartitions=5)
    assert_identical(fdask.minimum_spanning_forest(rows, plan="filter", max_task_edges=400),
                     want)


def test_local_scheduler_without_client(tmp_path):
    """client=False: the local threaded scheduler runs the same tasks, same answer."""
    t, h, w = random_graph(8, n=200, m=900)
    path = write_parquet(tmp_path / "g", t, h, w, [100, 500])
    want = fastmst.minimum_spanning_forest(t, h, w)
    with dask.config.set(scheduler="threads"):
        got = fdask.minimum_spanning_forest(dd.read_parquet(path), plan="boruvka",
                                            max_task_edges=100, client=False)
        assert_identical(got, want)
        assert_identical(solve(dd.read_parquet(path), "levels", client=False), want)


def _read_or_die(path, marker_dir, index, kill_on_read):
    """Read one Parquet file; the ``kill_on_read``-th read of partition ``index`` SIGKILLs the
    worker process that runs it (once per test run)."""
    reads = len([f for f in os.listdir(marker_dir) if f.startswith(f"read-{index}-")])
    open(os.path.join(marker_dir, f"read-{index}-{reads}"), "w").close()
    if reads + 1 == kill_on_read:
        try:
            fd = os.open(os.path.join(marker_dir, "killed"), os.O_CREAT | os.O_EXCL)
        except FileExistsError:
            pass
        else:
            os.close(fd)
            os.kill(os.getpid(), signal.SIGKILL)
    return pd.read_parquet(path)


def test_worker_killed_mid_run(client, tmp_path):
    """A worker process killed (SIGKILL) in the third pass (the second Filter-Kruskal level):
    Dask reruns its tasks on the surviving or restarted worker and the forest is still
    identical."""
    t, h, w = random_graph(9, n=500, m=3000)
    path = write_parquet(tmp_path / "g", t, h, w, random_cuts(t.shape[0], 8, 2))
    markers = tmp_path / "markers"
    markers.mkdir()
    files = sorted(os.listdir(path))
    chunks = [dask.delayed(_read_or_die)(os.path.join(path, f), str(markers), i, 3)
              for i, f in enumerate(files)]
    before = set(client.scheduler_info()["workers"])
    got = solve(chunks, "levels")
    assert (markers / "killed").exists(), "the worker was not killed; the test proved nothing"
    assert_identical(got, fastmst.minimum_spanning_forest(t, h, w))
    client.wait_for_workers(2, timeout=60)
    assert set(client.scheduler_info()["workers"]) != before  # a new worker replaced the dead


def test_missing_column_lists_present_ones(client, tmp_path):
    """A missing column names the wanted role and lists the columns that are present, with the
    exception class and wording of the file readers (FileFormatError, a ValueError)."""
    t, h, w = random_graph(10, n=50, m=100)
    path = write_parquet(tmp_path / "g", t, h, w, [50])
    with pytest.raises(FileFormatError, match=r"the Dask DataFrame: no column 'cost' for the "
                                              r"weight.*present are 'tail', 'head', 'weight'"):
        fdask.minimum_spanning_forest(dd.read_parquet(path), weight="cost")
    chunks = [dask.delayed(pd.DataFrame)({"src": t, "head": h, "weight": w})]
    with pytest.raises(FileFormatError, match=r"partition 0: no column 'tail' for the tail.*"
                                              r"present are 'src', 'head', 'weight'"):
        fdask.minimum_spanning_forest(chunks)
    # The file readers word it the same way (source, column, role, the columns present).
    frame = pd.DataFrame({"src": t, "head": h, "weight": w})
    frame.to_csv(tmp_path / "g.csv", index=False)
    with pytest.raises(FileFormatError, match=r"no column 'tail' for the tail.*'src', 'head'"):
        fastmst.read_edges(tmp_path / "g.csv", tail="tail", head="head", weight="weight")


def test_bad_values_raise_clear_errors(client, tmp_path):
    """Float ids, NaN weights, negative or out-of-range ids, missing values, bad knobs and
    wrong input types raise TypeError/ValueError naming the partition and row."""
    t, h, w = random_graph(11, n=50, m=100)
    frame = pd.DataFrame({"tail": t, "head": h, "weight": w})
    # the fixes the messages suggest name the column as the user's code does (edges['tail'])
    with pytest.raises(TypeError, match=r"node ids must be integers.*convert with "
                                        r"edges\['tail'\]\.astype\(np\.int64\)"):
        fdask.minimum_spanning_forest(dd.from_pandas(frame.astype({"tail": float}),
                                                     npartitions=2))
    with pytest.raises(TypeError, match=r"head of partition 0 has dtype float64.*"
                                        r"edges\['head'\]\.astype"):
        fdask.minimum_spanning_forest([dask.delayed(frame.astype({"head": float}))])
    nan = frame.copy()
    nan.loc[70, "weight"] = np.nan
    with pytest.raises(ValueError, match=r"weight\[\d+\] of partition 1 is NaN.*"
                                         r"keep = ~np\.isnan\(edges\['weight'\]\)"):
        fdask.minimum_spanning_forest([dask.delayed(frame.iloc[:60]),
                                       dask.delayed(nan.iloc[60:].reset_index(drop=True))])
    neg = frame.copy()
    neg.loc[5, "head"] = -1
    with pytest.raises(ValueError, match=r"head\[5\] = -1 of partition 0 is negative"):
        fdask.minimum_spanning_forest([dask.delayed(neg)])
    with pytest.raises(ValueError, match=r"out of range.*n_nodes=10"):
        fdask.minimum_spanning_forest([dask.delayed(frame)], n_nodes=10)
    na = frame.astype({"tail": "Int64"})
    na.loc[3, "tail"] = pd.NA
    with pytest.raises(ValueError, match=r"tail\[3\] of partition 0 is missing"):
        fdask.minimum_spanning_forest([dask.delayed(na)])
    with pytest.raises(ValueError, match="unknown plan"):
        fdask.minimum_spanning_forest([dask.delayed(frame)], plan="fast")
    with pytest.raises(ValueError, match="split_every must be >= 2"):
        fdask.minimum_spanning_forest([dask.delayed(frame)], split_every=1)
    with pytest.raises(TypeError, match="expected a Dask DataFrame"):
        fdask.minimum_spanning_forest(frame)
    with pytest.raises(TypeError, match=r"edges\[1\] is a DataFrame"):
        fdask.minimum_spanning_forest([dask.delayed(frame), frame])
    with pytest.raises(TypeError, match="tail must be a column name"):
        fdask.minimum_spanning_forest([dask.delayed(frame)], tail=0)


def test_empty_input(client):
    """No partitions, or only empty ones: an empty forest of n_nodes isolated nodes."""
    got = fdask.minimum_spanning_forest([], n_nodes=5)
    assert len(got) == 0 and got.n_components == 5 and got.n_edges == 0
    empty = pd.DataFrame({"tail": np.empty(0, np.int64), "head": np.empty(0, np.int64),
                          "weight": np.empty(0)})
    got = fdask.minimum_spanning_forest([dask.delayed(empty)] * 3, n_nodes=4)
    assert_identical(got, fastmst.minimum_spanning_forest(empty["tail"], empty["head"],
                                                          empty["weight"], n_nodes=4))


def test_folded_first_level_from_parquet_metadata(client, tmp_path):
    """Parquet files of very different sizes, no n_nodes: the quotas come from the files'
    footers (row counts and the largest id), the validation pass brings the first level and
    one more pass finishes this connected graph (2 passes in all); identical to the in-memory
    solve and to the run with the first level as a pass of its own (3 passes)."""
    t, h, w = random_graph(12, n=600, m=5000, ties=False)
    path = write_parquet(tmp_path / "g", t, h, w, [100, 100, 4000, 4100])
    ddf = dd.read_parquet(path)
    lengths, top = fchunks.source_hints(ddf, ("tail", "head", "weight"), ddf.npartitions)
    assert lengths == [100, 0, 3900, 100, 900]
    assert top == max(int(t.max()), int(h.max()))
    assert fchunks.source_hints([dask.delayed(t)], ("tail", "head", "weight"), 1) == (None, None)
    got = fdask.minimum_spanning_forest(ddf)
    want = fastmst.minimum_spanning_forest(t, h, w)
    assert_identical(got, want)
    passes = got.dask_plan["passes"]
    first = passes[0]
    # quotas: the light target 1.5 * (largest id + 1) split by the row shares, at least 1 each
    target = 1.5 * (top + 1)
    assert first["light_quota"] == sum(max(1, math.ceil(target * m / 5000)) for m in lengths)
    assert first["threshold_found"] and 0 < first["edges_kept"] <= first["light_quota"]
    assert len(passes) == 2 and passes[1]["components_after"] == 1, got.dask_plan["summary"]
    assert "lightest rows" in got.dask_plan["summary"]
    saved = filter_kruskal.FOLD_FIRST_LEVEL
    try:
        filter_kruskal.FOLD_FIRST_LEVEL = False
        unfolded = fdask.minimum_spanning_forest(ddf)
    finally:
        filter_kruskal.FOLD_FIRST_LEVEL = saved
    assert_identical(unfolded, want)
    assert len(unfolded.dask_plan["passes"]) == 3, unfolded.dask_plan["summary"]
    # Reference: networkx.minimum_spanning_tree (Kruskal) on the same multigraph.
    assert got.weight == pytest.approx(networkx_weight(t, h, w))
