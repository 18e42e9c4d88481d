"""Benchmark of the distributed path (fastmst.dask) against the in-memory solve.

Sub-commands (each prints one JSON line per measurement):

    generate   write a random multigraph as Parquet files, one file (one chunk) at a time
    dask       solve the files on a LocalCluster with a memory limit per worker; report the
               wall time, the peak resident memory of every worker process and of the client
    inmemory   load the first files into one process and run fastmst.minimum_spanning_forest;
               report load and solve time (peak memory: run under /usr/bin/time -v)
    compare    inmemory, then dask, each in a fresh process, with the load average and the
               ratio (``--both``: dask with and without the first level folded into the
               validation pass, side by side in the same run)
    smoke      a small end-to-end check for CI: generate, solve both ways, compare the edges

Example (the figures in docs/dask.md)::

    python bench/bench_dask.py generate --out /tmp/fastmst-200m --edges 200_000_000 \\
        --nodes 25_000_000 --files 100
    python bench/bench_dask.py dask --data /tmp/fastmst-200m --workers 2 --memory-limit 3GiB
    /usr/bin/time -v python bench/bench_dask.py inmemory --data /tmp/fastmst-200m --files 50

The data are random (uniform endpoints, uniform float64 weights in [0, 1)), generated for the
benchmark only.
"""
from __future__ import annotations

import argparse
import json
import os
import resource
import sys
import tempfile
import time

import numpy as np


def _peak_rss_self():
    """Peak resident set size of this process in bytes (VmHWM)."""
    with open("/proc/self/status") as fh:
        for line in fh:
            if line.startswith("VmHWM:"):
                return int(line.split()[1]) * 1024
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024


def _files(path, limit=None):
    names = sorted(f for f in os.listdir(path) if f.endswith(".parquet"))
    return [os.path.join(path, f) for f in names[:limit]]


def generate(out, edges, nodes, files, seed=0, family="random"):
    """Write ``files`` Parquet files of about edges/files rows each (int32 ids, float64
    weights); only one file's arrays are in memory at a time."""
    import pyarrow as pa
    import pyarrow.parquet as pq
    if family == "grid":
        return generate_grid(out, nodes, files, seed)
    os.makedirs(out, exist_ok=True)
    per = -(-edges // files)
    start = time.perf_counter()
    written = 0
    for i in range(files):
        m = min(per, edges - written)
        if m <= 0:
            break
        rng = np.random.default_rng([seed, i])
        id_type = np.int32 if nodes < 2**31 else np.int64
        table = pa.table({"tail": rng.integers(0, nodes, m, dtype=id_type),
                          "head": rng.integers(0, nodes, m, dtype=id_type),
                          "weight": rng.random(m)})
        pq.write_table(table, os.path.join(out, f"part-{i:04d}.parquet"),
                       row_group_size=1 << 20)
        written += m
        del table
    print(json.dumps({"step": "generate", "out": out, "edges": written, "nodes": nodes,
                      "files": files, "seconds": round(time.perf_counter() - start, 1)}),
          flush=True)


def _grid_points(row, cols, seed):
    """Jittered points of one grid row (x = column, y = row, each moved by up to 0.4)."""
    rng = np.random.default_rng([seed, 1 << 20, row])
    jitter = rng.uniform(-0.4, 0.4, (cols, 2))
    return np.arange(cols) + jitter[:, 0], row + jitter[:, 1]


def generate_grid(out, nodes, files, seed=0):
    """A road-like planar family: a jittered square grid of about ``nodes`` points, edges to
    the right and down neighbours and, with probability 1/2, one diagonal per cell (E ~ 2.5 V),
    weights the Euclidean lengths (float64); one band of grid rows per file, row-major order
    within a file (partitions are spatially coherent, as real networks often are)."""
    import pyarrow as pa
    import pyarrow.parquet as pq
    os.makedirs(out, exist_ok=True)
    cols = int(np.sqrt(nodes))
    rows = -(-nodes // cols)
    start = time.perf_counter()
    written = 0
    bands = np.linspace(0, rows, files + 1).round().astype(int)
    for i in range(files):
        parts = []
        for r in range(bands[i], bands[i + 1]):
            x, y = _grid_points(r, cols, seed)
            base = r * cols
            ids = base + np.arange(cols)
            t, h = [ids[:-1]], [ids[1:]]  # right
            if r + 1 < rows:
                x2, y2 = _grid_points(r + 1, cols, seed)
                t.append(ids)
                h.append(ids + cols)  # down
                diag = np.random.default_rng([seed, 2 << 20, r]).random(cols - 1) < 0.5
                t.append(ids[:-1][diag])
                h.append(ids[:-1][diag] + cols + 1)  # down-right
            else:
                x2 = y2 = None
            t, h = np.concatenate(t), np.concatenate(h)
            xs = np.concatenate([x, x2]) if x2 is not None else x
            ys = np.concatenate([y, y2]) if y2 is not None else y
            w = np.hypot(xs[t - base] - xs[h - base], ys[t - base] - ys[h - base])
            parts.append((t, h, w))
        id_type = np.int32 if rows * cols < 2**31 else np.int64
        table = pa.table({"tail": np.concatenate([p[0] for p in parts]).astype(id_type),
                          "head": np.concatenate([p[1] for p in parts]).astype(id_type),
                          "weight": np.concatenate([p[2] for p in parts])})
        pq.write_table(table, os.path.join(out, f"part-{i:04d}.parquet"),
                       row_group_size=1 << 20)
        written += table.num_rows
        del table, parts
    print(json.dumps({"step": "generate", "family": "grid", "out": out, "edges": written,
                      "nodes": rows * cols, "files": files,
                      "seconds": round(time.perf_counter() - start, 1)}), flush=True)


def _io_self():
    """Bytes this process has read through system calls (rchar) and from storage
    (read_bytes), from /proc/self/io."""
    out = {}
    with open("/proc/self/io") as fh:
        for line in fh:
            key, _, value = line.partition(":")
            out[key] = int(value)
    return out["rchar"], out["read_bytes"]


def solve_dask(data, workers, memory_limit, n_files=None, n_nodes=None, plan="auto",
               split_every=8, max_task_edges=None, progress=False, check=False,
               light_per_node=None, fold=True):
    import dask.dataframe as dd
    from distributed import Client, LocalCluster

    import fastmst.dask
    from fastmst.dask import filter_kruskal

    filter_kruskal.FOLD_FIRST_LEVEL = fold
    files = _files(data, n_files)
    with LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                      memory_limit=memory_limit, dashboard_address=None) as cluster, \
            Client(cluster) as client:
        ddf = dd.read_parquet(files)
        io_before = client.run(_io_self)
        start = time.perf_counter()
        forest = fastmst.dask.minimum_spanning_forest(
            ddf, n_nodes, plan=plan, split_every=split_every, max_task_edges=max_task_edges,
            light_per_node=light_per_node, progress=progress)
        seconds = time.perf_counter() - start
        io_after = client.run(_io_self)
        peaks = client.run(_peak_rss_self)
        restarts = len(client.scheduler_info()["workers"])
    info = forest.dask_plan
    rchar = sum(io_after[w][0] - io_before[w][0] for w in io_after if w in io_before)
    disk = sum(io_after[w][1] - io_before[w][1] for w in io_after if w in io_before)
    passes = info["passes"] if plan in ("auto", "filter-kruskal") else []
    n_passes = len(passes) or (1 + len(info["rounds"]) + bool(info["final"]))
    result = {"step": "dask", "plan": info["plan"], "files": len(files),
              "file_bytes": sum(os.path.getsize(f) for f in files),
              "edges": forest.n_edges, "nodes": forest.n_nodes, "workers": workers,
              "memory_limit": memory_limit, "seconds": round(seconds, 1),
              "peak_rss_per_worker_GiB": sorted(round(v / 2**30, 2) for v in peaks.values()),
              "peak_rss_client_GiB": round(_peak_rss_self() / 2**30, 2),
              "workers_at_end": restarts, "method": forest.method,
              "n_partitions": info["n_partitions"], "passes": n_passes, "fold": fold,
              "workers_rchar_bytes": rchar, "workers_storage_read_bytes": disk,
              "rchar_bytes_per_pass": round(rchar / n_passes),
              "per_pass": [{k: p.get(k) for k in ("pass", "kind", "seconds", "dask_seconds",
                                                  "client_seconds", "column_bytes_read",
                                                  "light_rows_returned", "edges_in_band",
                                                  "edges_kept", "components_after")}
                           for p in passes],
              "phases": info["phases"], "summary": info["summary"],
              "forest_edges": len(forest), "n_components": forest.n_components,
              "weight": forest.weight}
    if plan not in ("auto", "filter-kruskal"):
        result.update(max_task_edges=info["max_task_edges"], rounds=info["rounds"],
                      final=info["final"])
    if check:
        import fastmst
        t, h, w = _load(files)
        want = fastmst.minimum_spanning_forest(t, h, w, n_nodes)
        result["identical_to_in_memory"] = bool(np.array_equal(want.edges, forest.edges)
                                                and np.array_equal(want.labels, forest.labels))
    print(json.dumps(result), flush=True)
    return result


def compare(data, workers, memory_limit, n_files=None, plan="auto", light_per_node=None,
            fold=True, both=False):
    """The in-memory path (Parquet load + solve) and the Dask path on the same files, each in
    a fresh process, one after the other; prints each line, the load average, and the ratio.
    ``both``: the Dask path twice, with and without the first level folded into the
    validation pass (in that order), side by side in the same run."""
    import subprocess
    here = os.path.abspath(__file__)
    common = ["--data", data] + (["--files", str(n_files)] if n_files else [])
    dask_args = (["--workers", str(workers), "--memory-limit", memory_limit, "--plan", plan]
                 + (["--light-per-node", str(light_per_node)]
                    if light_per_node is not None else []))
    steps = [("inmemory", "inmemory", [])]
    if both:
        steps += [("dask", "dask", dask_args), ("dask_no_fold", "dask", dask_args + ["--no-fold"])]
    else:
        steps += [("dask", "dask", dask_args + ([] if fold else ["--no-fold"]))]
    lines = {}
    load = [os.getloadavg()[0]]
    for name, step, extra in steps:
        run = subprocess.run([sys.executable, here, step] + common + extra,
                             capture_output=True, text=True, check=True)
        lines[name] = json.loads(run.stdout.strip().splitlines()[-1])
        print(run.stdout.strip().splitlines()[-1], flush=True)
        load.append(os.getloadavg()[0])
    mem = lines["inmemory"]
    base = mem["load_seconds"] + mem["solve_seconds"]
    out = {"step": "compare", "edges": mem["edges"], "inmemory_seconds": base}
    for name, _, _ in steps[1:]:
        d = lines[name]
        out[f"{name}_seconds"] = d["seconds"]
        out[f"{name}_passes"] = d["passes"]
        out[f"ratio_{name}_over_inmemory"] = round(d["seconds"] / base, 2)
        out[f"{name}_same_size_components_weight"] = (
            mem["forest_edges"] == d["forest_edges"] and mem["n_components"] == d["n_components"]
            and mem["weight"] == d["weight"])
    out["load_average_1min"] = [round(x, 2) for x in load]
    print(json.dumps(out), flush=True)


def _load(files):
    import pyarrow.parquet as pq
    tables = [pq.read_table(f) for f in files]
    cols = [np.concatenate([tb.column(c).to_numpy() for tb in tables])
            for c in ("tail", "head", "weight")]
    return cols


def solve_in_memory(data, n_files=None, with_scipy=False):
    import fastmst
    files = _files(data, n_files)
    start = time.perf_counter()
    t, h, w = _load(files)
    load = time.perf_counter() - start
    start = time.perf_counter()
    forest = fastmst.minimum_spanning_forest(t, h, w)
    seconds = time.perf_counter() - start
    result = {"step": "inmemory", "files": len(files), "edges": int(t.shape[0]),
              "nodes": forest.n_nodes, "load_seconds": round(load, 1),
              "solve_seconds": round(seconds, 1), "forest_edges": len(forest),
              "n_components": forest.n_components, "weight": forest.weight,
              "peak_rss_GiB": round(_peak_rss_self() / 2**30, 2)}
    if with_scipy:
        from scipy.sparse import coo_array
        from scipy.sparse.csgraph import minimum_spanning_tree
        start = time.perf_counter()
        # SciPy sums parallel edges and drops zero weights; the random weights are in (0, 1)
        # almost surely, and the total is compared only when no (tail, head) pair repeats.
        g = coo_array((w, (t, h)), shape=(forest.n_nodes,) * 2).tocsr()
        tree = minimum_spanning_tree(g)
        result["scipy_seconds"] = round(time.perf_counter() - start, 1)
        result["scipy_weight"] = float(tree.sum())
        result["ratio_scipy_over_fastmst"] = round(result["scipy_seconds"] / seconds, 2)
    print(json.dumps(result), flush=True)
    return result


def smoke():
    """Small end-to-end run for CI: 2M edges in 8 files, both plans forced, identical edges."""
    with tempfile.TemporaryDirectory(dir="/tmp") as out:
        generate(out, 2_000_000, 300_000, 8)
        res = solve_dask(out, 2, "2GiB", max_task_edges=400_000, check=True)
        if not res["identical_to_in_memory"]:
            sys.exit("smoke: the distributed forest differs from the in-memory one")


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    sub = ap.add_subparsers(dest="cmd", required=True)
    g = sub.add_parser("generate")
    g.add_argument("--out", required=True)
    g.add_argument("--edges", type=lambda s: int(s.replace("_", "")), required=True)
    g.add_argument("--nodes", type=lambda s: int(s.replace("_", "")), required=True)
    g.add_argument("--files", type=int, required=True)
    g.add_argument("--seed", type=int, default=0)
    g.add_argument("--family", choices=["random", "grid"], default="random",
                   help="random: uniform endpoints and weights; grid: jittered planar grid, "
                        "E ~ 2.5 V, Euclidean lengths (--edges is then ignored)")
    d = sub.add_parser("dask")
    d.add_argument("--data", required=True)
    d.add_argument("--workers", type=int, default=2)
    d.add_argument("--memory-limit", default="3GiB")
    d.add_argument("--files", type=int, default=None, help="use only the first N files")
    d.add_argument("--plan", default="auto")
    d.add_argument("--split-every", type=int, default=8)
    d.add_argument("--max-task-edges", type=int, default=None)
    d.add_argument("--progress", action="store_true")
    d.add_argument("--check", action="store_true", help="compare with the in-memory solve")
    d.add_argument("--light-per-node", type=float, default=None)
    d.add_argument("--no-fold", action="store_true",
                   help="filter-kruskal: the first level as a pass of its own (the plan "
                        "before the validation pass brought it)")
    c = sub.add_parser("compare", help="inmemory, then dask, each in a fresh process")
    c.add_argument("--data", required=True)
    c.add_argument("--workers", type=int, default=2)
    c.add_argument("--memory-limit", default="3GiB")
    c.add_argument("--files", type=int, default=None)
    c.add_argument("--plan", default="auto")
    c.add_argument("--light-per-node", type=float, default=None)
    c.add_argument("--no-fold", action="store_true")
    c.add_argument("--both", action="store_true",
                   help="run the Dask path with and without the folded first level")
    m = sub.add_parser("inmemory")
    m.add_argument("--data", required=True)
    m.add_argument("--files", type=int, default=None)
    m.add_argument("--scipy", action="store_true")
    sub.add_parser("smoke")
    a = ap.parse_args(argv)
    if a.cmd == "generate":
        generate(a.out, a.edges, a.nodes, a.files, a.seed, a.family)
    elif a.cmd == "dask":
        solve_dask(a.data, a.workers, a.memory_limit, a.files, plan=a.plan,
                   split_every=a.split_every, max_task_edges=a.max_task_edges,
                   progress=a.progress, check=a.check, light_per_node=a.light_per_node,
                   fold=not a.no_fold)
    elif a.cmd == "compare":
        compare(a.data, a.workers, a.memory_limit, a.files, a.plan, a.light_per_node,
                not a.no_fold, a.both)
    elif a.cmd == "inmemory":
        solve_in_memory(a.data, a.files, a.scipy)
    else:
        smoke()


if __name__ == "__main__":
    main()
