"""Edge-list reading: fastmst.io.read_edges against a bare pyarrow read of the same file.

Writes a random edge list (default 10M edges over 1M nodes, float weights) as CSV (or Parquet
with ``--format parquet``), then times, alternating and best of ``--repeat``:

* ``pyarrow.csv.read_csv(path)`` / ``pyarrow.parquet.read_table(path)``: parsing only, the
  floor for any reader built on pyarrow;
* ``fastmst.io.read_edges(path)``: parsing plus everything a solver needs (columns chosen,
  nulls and NaN checked, node labels mapped to compact ids, NumPy arrays out).  Labels are read
  as text (the default); ``--ids integer`` passes ``ids="integer"``.

Goal: read_edges within 1.5x of the bare read for text labels.  Speed is a ratio measured side
by side in one process; the machines are shared and noisy, so compare ratios, not seconds.  The
ratio of the best times is printed, and the median of the paired runs' ratios (each read_edges
over the bare read of the same round), which one slow run moves less.

    python bench/bench_io.py --labels str          # 10M edges, text labels ("n123456")
    python bench/bench_io.py --labels str --format parquet
    python bench/bench_io.py --labels int --ids integer
    python bench/bench_io.py --edges 1000000 --json
    python bench/bench_io.py --labels str --fresh 7   # one read per new process

``--fresh N`` also times N reads each in a new Python process (alternating bare and
read_edges; imports done before the clock starts): what a command-line user pays once per
run, including the first touch of every freshly allocated page, which best-of-N timings in one
process partly hide.  Medians are printed.
"""
from __future__ import annotations

import argparse
import json
import os
import sys
import tempfile
import time

import numpy as np


def make_csv(path, n_edges, n_nodes, labels, seed=0, fmt="csv"):
    import pyarrow as pa
    import pyarrow.csv as pcsv
    rng = np.random.default_rng(seed)
    t = rng.integers(0, n_nodes, n_edges)
    h = rng.integers(0, n_nodes, n_edges)
    w = np.round(rng.random(n_edges) * 1000, 3)
    if labels == "sparse":   # map-style 64-bit ids, far apart
        ids = np.int64(2**40) + np.arange(n_nodes, dtype=np.int64) * 1_000_003
        cols = {"tail": pa.array(ids[t]), "head": pa.array(ids[h])}
    elif labels == "str":
        names = np.char.add("n", np.arange(n_nodes).astype(str))
        cols = {"tail": pa.array(names[t]), "head": pa.array(names[h])}
    else:
        cols = {"tail": pa.array(t), "head": pa.array(h)}
    cols["weight"] = pa.array(w)
    if fmt == "parquet":
        import pyarrow.parquet as pq
        pq.write_table(pa.table(cols), path)
    else:
        pcsv.write_csv(pa.table(cols), path)


_CHILD = """
import sys, time
import pyarrow.csv as pcsv, pyarrow.parquet as pq
from fastmst import io
kind, path, ids = sys.argv[1:4]
c0, t0 = time.process_time(), time.perf_counter()
if kind == "bare":
    pq.read_table(path) if path.endswith(".parquet") else pcsv.read_csv(path)
else:
    io.read_edges(path, ids=ids)
print(time.perf_counter() - t0, time.process_time() - c0)
"""


def fresh_runs(path, ids, repeat):
    """(bare, read_edges) lists of (wall, CPU) seconds, each read in a new process."""
    import subprocess
    out = {"bare": [], "ours": []}
    for _ in range(repeat):
        for kind in ("bare", "ours"):
            r = subprocess.run([sys.executable, "-c", _CHILD, kind, path, ids],
                               capture_output=True, text=True, check=True)
            out[kind].append(tuple(float(x) for x in r.stdout.split()))
    return out["bare"], out["ours"]


def timed(fn):
    """(wall seconds, CPU seconds of this process, all threads) of one call."""
    c0, t0 = time.process_time(), time.perf_counter()
    fn()
    return time.perf_counter() - t0, time.process_time() - c0


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--edges", type=int, default=10_000_000)
    ap.add_argument("--nodes", type=int, default=1_000_000)
    ap.add_argument("--labels", choices=("int", "sparse", "str"), default="int")
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--format", choices=("csv", "parquet"), default="csv")
    ap.add_argument("--ids", choices=("text", "integer"), default="text",
                    help="read_edges(ids=...): text (default) or integer")
    ap.add_argument("--file", help="use (or create) this CSV instead of a temporary one")
    ap.add_argument("--json", action="store_true")
    ap.add_argument("--fresh", type=int, default=0, metavar="N",
                    help="also time N reads each in a new process (medians)")
    args = ap.parse_args(argv)

    import pyarrow as pa
    import pyarrow.csv as pcsv

    from fastmst import io

    tmpdir = None
    path = args.file
    if path is None:
        tmpdir = tempfile.mkdtemp(prefix="fastmst-bench-io-")
        path = os.path.join(tmpdir, f"edges.{args.format}")
    try:
        if not os.path.exists(path):
            t0 = time.perf_counter()
            make_csv(path, args.edges, args.nodes, args.labels, fmt=args.format)
            print(f"wrote {path} ({os.path.getsize(path) / 1e6:.0f} MB) in "
                  f"{time.perf_counter() - t0:.1f} s", file=sys.stderr)
        same = pcsv.ReadOptions(block_size=io.CSV_BLOCK_SIZE)
        if args.format == "parquet":
            import pyarrow.parquet as pq

            def bare_read():
                return pq.read_table(path)
            same_read = bare_read
        else:
            def bare_read():
                return pcsv.read_csv(path)

            def same_read():
                return pcsv.read_csv(path, read_options=same)
        runs = {"bare": [], "same": [], "ours": []}
        for _ in range(args.repeat):   # alternate the reads so drift hits all alike
            runs["bare"].append(timed(bare_read))
            # Parquet has no other options to compare: the bare read is not run twice (what
            # ran just before moves read_edges' time: see docs/files-and-cli.md)
            runs["same"].append(timed(same_read) if same_read is not bare_read
                                else runs["bare"][-1])
            runs["ours"].append(timed(lambda: io.read_edges(path, ids=args.ids)))
        bare, tuned, ours = ([w for w, _ in runs[k]] for k in ("bare", "same", "ours"))
        cbare, cours = ([c for _, c in runs[k]] for k in ("bare", "ours"))
        el = io.read_edges(path, ids=args.ids)
        res = {"file": path, "bytes": os.path.getsize(path), "edges": el.n_edges,
               "nodes": el.n_nodes, "labels": args.labels, "ids": args.ids,
               "format": args.format, "repeat": args.repeat,
               "pyarrow_read_csv_s": min(bare), "read_edges_s": min(ours),
               "pyarrow_read_csv_same_block_size_s": min(tuned),
               "ratio": min(ours) / min(bare),
               "median_ratio": float(np.median(np.array(ours) / np.array(bare))),
               "median_cpu_ratio": float(np.median(np.array(cours) / np.array(cbare))),
               "ratio_same_block_size": min(ours) / min(tuned), "goal_ratio": 1.5,
               "cpu_pyarrow_read_csv_s": min(cbare), "cpu_read_edges_s": min(cours),
               "cpu_ratio": min(cours) / min(cbare),
               "loadavg_1min": os.getloadavg()[0],
               "pyarrow": pa.__version__, "cpus": len(os.sched_getaffinity(0))
               if hasattr(os, "sched_getaffinity") else os.cpu_count(),
               "all_pyarrow_s": bare, "all_pyarrow_same_block_size_s": tuned,
               "all_read_edges_s": ours}
        if args.fresh:
            fb, fo = fresh_runs(path, args.ids, args.fresh)
            res.update({"fresh_repeat": args.fresh,
                        "fresh_pyarrow_s": float(np.median([w for w, _ in fb])),
                        "fresh_read_edges_s": float(np.median([w for w, _ in fo])),
                        "fresh_cpu_pyarrow_s": float(np.median([c for _, c in fb])),
                        "fresh_cpu_read_edges_s": float(np.median([c for _, c in fo])),
                        "all_fresh_pyarrow_s": [w for w, _ in fb],
                        "all_fresh_read_edges_s": [w for w, _ in fo]})
            res["fresh_ratio"] = res["fresh_read_edges_s"] / res["fresh_pyarrow_s"]
    finally:
        if tmpdir is not None:
            for f in os.listdir(tmpdir):
                os.unlink(os.path.join(tmpdir, f))
            os.rmdir(tmpdir)
    if args.json:
        print(json.dumps(res, indent=2))
    else:
        bare_name = "pyarrow.parquet.read_table" if args.format == "parquet" else \
            "pyarrow.csv.read_csv"
        print(f"{res['edges']:,} edges, {res['nodes']:,} nodes, {args.labels} labels read as "
              f"{args.ids}, {args.format}, {res['bytes'] / 1e6:.0f} MB, best of {args.repeat}")
        print(f"  {bare_name:<26} {res['pyarrow_read_csv_s']:.3f} s")
        if args.format == "csv":
            print(f"  pyarrow, same blocks       {res['pyarrow_read_csv_same_block_size_s']:.3f} "
                  f"s (block_size={io.CSV_BLOCK_SIZE >> 20} MiB, as read_edges uses)")
        print(f"  fastmst.io.read_edges      {res['read_edges_s']:.3f} s")
        same_note = (f", {res['ratio_same_block_size']:.2f}x vs the same block size"
                     if args.format == "csv" else "")
        print(f"  ratio                      {res['ratio']:.2f}x vs the bare default read "
              f"(goal <= 1.5x){same_note}")
        print(f"  median of the {args.repeat} paired runs' ratios: {res['median_ratio']:.2f}x wall, "
              f"{res['median_cpu_ratio']:.2f}x CPU (each read_edges over the bare read of "
              f"the same round)")
        print(f"  CPU time (all threads) {res['cpu_read_edges_s']:.3f} s vs "
              f"{res['cpu_pyarrow_read_csv_s']:.3f} s: {res['cpu_ratio']:.2f}x "
              f"(load average {res['loadavg_1min']:.1f} on {res['cpus']} cores)")
        if args.fresh:
            print(f"  one read per new process, median of {args.fresh}: {bare_name} "
                  f"{res['fresh_pyarrow_s']:.3f} s, read_edges {res['fresh_read_edges_s']:.3f} s, "
                  f"ratio {res['fresh_ratio']:.2f}x (CPU {res['fresh_cpu_read_edges_s']:.3f} s "
                  f"vs {res['fresh_cpu_pyarrow_s']:.3f} s)")
    return res


if __name__ == "__main__":
    main()
