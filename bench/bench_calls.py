"""Per-call time of a minimum spanning forest on small and medium graphs, side by side.

What an embedding tool pays for each call (inside optimisation loops, per-district batches):
graphs of 50 nodes / 120 edges, 1,000 nodes / 5,000 edges, and a batch of mixed sizes (20 to
2,000 nodes, about 2.5 edges per node), each random (uniform endpoints, uniform float64
weights; invented data).  Every library gets the same three NumPy arrays:

* fastmst, default threads and ``threads=1``: end to end from the arrays;
* rustworkx: its MST call on a graph built beforehand (``minimum_spanning_edges`` on a
  prebuilt ``PyGraph``), and end to end from the arrays (graph built in the call);
* igraph: ``Graph(n, edges)`` + ``spanning_tree(weights, return_tree=False)`` from the arrays;
* SciPy: ``coo_array`` + ``csgraph.minimum_spanning_tree`` from the arrays.

Calls are interleaved: each round runs a block of calls of every contender in turn (the order
rotated each round), so a busy spell hits all of them; the figure is the median over rounds
of the time per call.  ``--busy`` repeats the run with one core kept busy by a spinning
process started (and stopped, by its pid) by this script.  rustworkx and igraph are benchmark
peers only (``pip install -e .[bench]``); a missing one is skipped.

    python bench/bench_calls.py            # quiet, then --busy for the loaded figures
    python bench/bench_calls.py --busy
"""
from __future__ import annotations

import argparse
import os
import platform
import statistics
import subprocess
import sys
import time

import numpy as np
from scipy.sparse import coo_array
from scipy.sparse.csgraph import minimum_spanning_tree

import fastmst

try:
    import rustworkx as rx
except ImportError:          # benchmark peer only
    rx = None
try:
    import igraph as ig
except ImportError:          # benchmark peer only
    ig = None


def random_graph(rng, n, m):
    return (rng.integers(0, n, m).astype(np.int64), rng.integers(0, n, m).astype(np.int64),
            rng.random(m))


def contenders(graphs):
    """name -> callable running one call on each graph of ``graphs`` (a list of (n, t, h, w))."""
    out = {
        "fastmst": lambda: [fastmst.minimum_spanning_forest(t, h, w, n) for n, t, h, w in graphs],
        "fastmst threads=1": lambda: [fastmst.minimum_spanning_forest(t, h, w, n, threads=1)
                                      for n, t, h, w in graphs],
        "scipy": lambda: [minimum_spanning_tree(coo_array((w, (t, h)), shape=(n, n)))
                          for n, t, h, w in graphs],
    }
    if rx is not None:
        built = []
        for n, t, h, w in graphs:
            g = rx.PyGraph()
            g.add_nodes_from(range(n))
            g.add_edges_from(list(zip(t.tolist(), h.tolist(), w.tolist())))
            built.append(g)

        def rx_arrays():
            res = []
            for n, t, h, w in graphs:
                g = rx.PyGraph()
                g.add_nodes_from(range(n))
                g.add_edges_from(list(zip(t.tolist(), h.tolist(), w.tolist())))
                res.append(rx.minimum_spanning_edges(g, weight_fn=float))
            return res

        out["rustworkx prebuilt"] = lambda: [rx.minimum_spanning_edges(g, weight_fn=float)
                                             for g in built]
        out["rustworkx arrays"] = rx_arrays
    if ig is not None:
        out["igraph arrays"] = lambda: [
            ig.Graph(n=n, edges=np.column_stack([t, h]).tolist()).spanning_tree(
                weights=w.tolist(), return_tree=False) for n, t, h, w in graphs]
    return out


def measure(graphs, rounds, budget):
    """Median over ``rounds`` of the seconds per graph of each contender (interleaved)."""
    runs = contenders(graphs)
    names = list(runs)
    for fn in runs.values():                 # warm up (imports, caches, thread pools)
        fn()
    reps = {}
    for name, fn in runs.items():            # calls per block: about ``budget`` seconds
        t0 = time.perf_counter()
        fn()
        reps[name] = max(1, int(budget / max(time.perf_counter() - t0, 1e-9)))
    times = {name: [] for name in names}
    for r in range(rounds):
        for name in names[r % len(names):] + names[:r % len(names)]:
            fn, k = runs[name], reps[name]
            t0 = time.perf_counter()
            for _ in range(k):
                fn()
            times[name].append((time.perf_counter() - t0) / (k * len(graphs)))
    return {name: statistics.median(v) for name, v in times.items()}


def cases(rng):
    mixed = []
    for _ in range(200):
        n = int(rng.integers(20, 2001))
        mixed.append((n, *random_graph(rng, n, int(2.5 * n))))
    return {
        "50 nodes / 120 edges": [(50, *random_graph(rng, 50, 120))],
        "1,000 nodes / 5,000 edges": [(1000, *random_graph(rng, 1000, 5000))],
        "mixed batch (200 graphs, 20-2,000 nodes)": mixed,
    }


def report(title, rounds, budget):
    rng = np.random.default_rng(2024)
    print(f"\n## {title}")
    for case, graphs in cases(rng).items():
        res = measure(graphs, rounds, budget)
        base = res["fastmst"]
        print(f"\n{case}  (median of {rounds} interleaved rounds, time per graph)")
        print(f"  {'contender':22s} {'us/call':>10s} {'vs fastmst':>11s}")
        for name, sec in res.items():
            print(f"  {name:22s} {sec * 1e6:10.1f} {sec / base:10.2f}x")


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--busy", action="store_true",
                   help="also measure with one core kept busy by a spinning process")
    p.add_argument("--rounds", type=int, default=15)
    p.add_argument("--budget", type=float, default=0.02,
                   help="seconds per block of calls (default 0.02)")
    args = p.parse_args(argv)
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(f"# bench_calls: {time.strftime('%Y-%m-%d %H:%M')}, {platform.processor() or platform.machine()}, "
          f"{os.cpu_count()} logical cores, load average {load:.2f}; Python "
          f"{platform.python_version()}, numpy {np.__version__}, fastmst {fastmst.__version__}"
          + (f", rustworkx {rx.__version__}" if rx else "")
          + (f", igraph {ig.__version__}" if ig else ""))
    report("as found (quiet unless other work runs)", args.rounds, args.budget)
    if args.busy:
        spin = subprocess.Popen([sys.executable, "-c", "while True: pass"])
        try:
            time.sleep(0.5)
            report("one core kept busy (a spinning process)", args.rounds, args.budget)
        finally:
            spin.kill()
            spin.wait()


if __name__ == "__main__":
    main()
