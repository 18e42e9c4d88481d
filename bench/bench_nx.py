"""networkx's own Kruskal against ``backend="fastmst"``, side by side, on a 1M-edge graph.

Usage::

    python bench/bench_nx.py                          # 250k nodes, 1M edges, 3 repetitions
    python bench/bench_nx.py --nodes 100000 --edges 300000 --reps 5

One random graph (``--edges`` distinct node pairs among ``--nodes`` nodes, uniform float
weights, built with numpy and handed to networkx once) is solved by:

* ``minimum_spanning_tree`` and ``list(minimum_spanning_edges(..., data=False))`` with networkx's
  default implementation and with ``backend="fastmst"``, alternately, ``--reps`` times each;
  the backend converts the graph at every call (``nx.config.cache_converted_graphs = False``), so
  its times include the conversion;
* the backend's tree again with networkx's conversion cache on (the second and later calls on
  an unchanged graph skip the conversion; weights are still read at each call);
* networkx's tree with Python's cyclic garbage collector paused (context: the backend pauses
  it while it builds containers, see ``fastmst/nxbackend/gcpause.py``; networkx does not).

Reported: medians, the ratio networkx / fastmst for each, the backend's time by phase, and
``uptime`` before and after (the machine may be shared).  Every run checks that both return the
same edges in the same order.
"""
from __future__ import annotations

import argparse
import gc
import os
import platform
import statistics
import subprocess
import time

import networkx as nx
import numpy as np

from fastmst.nxbackend import graph as nxgraph
from fastmst.nxbackend import spanning


def uptime() -> str:
    try:
        return subprocess.run(["uptime"], capture_output=True, text=True).stdout.strip()
    except OSError:
        return "load " + " ".join(f"{x:.2f}" for x in os.getloadavg())


def random_graph(n: int, m: int, seed: int) -> nx.Graph:
    """``m`` distinct node pairs (no self-loops) among ``n`` nodes, weights uniform in [0, 1)."""
    rng = np.random.default_rng(seed)
    pairs = np.empty((0, 2), dtype=np.int64)
    while pairs.shape[0] < m:
        more = rng.integers(0, n, size=(2 * (m - pairs.shape[0]) + 16, 2))
        more = np.sort(more[more[:, 0] != more[:, 1]], axis=1)
        pairs = np.unique(np.concatenate([pairs, more]), axis=0)
    pairs = pairs[rng.permutation(pairs.shape[0])[:m]]
    G = nx.Graph()
    G.add_nodes_from(range(n))
    G.add_weighted_edges_from(zip(pairs[:, 0].tolist(), pairs[:, 1].tolist(),
                                  rng.random(m).tolist()))
    return G


def timed(call):
    t = time.perf_counter()
    out = call()
    return time.perf_counter() - t, out


def nx_tree_gc_paused(G):
    was = gc.isenabled()
    gc.disable()
    try:
        return nx.minimum_spanning_tree(G)
    finally:
        if was:
            gc.enable()


def phases(G) -> dict[str, float]:
    """The backend's tree by phase (its internal steps, called one after the other)."""
    out = {}
    t, g = timed(lambda: nxgraph.from_networkx(G))
    out["conversion"] = t
    t, pos = timed(lambda: spanning.forest_positions(g, "weight", False, False))
    out["weights + solve"] = t
    t, edges = timed(lambda: spanning.edge_tuples(g, pos, True, True))
    out["edge tuples"] = t

    def build():                    # the backend's own tree step (spanning._tree)
        with spanning.paused():
            T = G.__class__()
            T.graph.update(G.graph)
            spanning._fill_graph(T, G, edges)
        return T
    out["tree"] = timed(build)[0]
    return out


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--nodes", type=int, default=250_000)
    ap.add_argument("--edges", type=int, default=1_000_000)
    ap.add_argument("--reps", type=int, default=3)
    ap.add_argument("--seed", type=int, default=1)
    args = ap.parse_args()

    print(f"python {platform.python_version()}, networkx {nx.__version__}, "
          f"{os.cpu_count()} CPUs")
    print("before:", uptime())
    t, G = timed(lambda: random_graph(args.nodes, args.edges, args.seed))
    print(f"graph: {G.number_of_nodes():,} nodes, {G.number_of_edges():,} edges "
          f"(built in {t:.1f} s)")

    nx.config.warnings_to_ignore.add("cache")
    cases = {
        "tree": (lambda: nx.minimum_spanning_tree(G),
                 lambda: nx.minimum_spanning_tree(G, backend="fastmst")),
        "edges": (lambda: list(nx.minimum_spanning_edges(G, data=False)),
                  lambda: list(nx.minimum_spanning_edges(G, data=False, backend="fastmst"))),
    }
    times = {(case, who): [] for case in cases for who in ("networkx", "fastmst")}
    times.update({("tree, conversion cached", "fastmst"): [],
                  ("tree, networkx with GC paused", "networkx"): []})
    phase_times: dict[str, list[float]] = {}
    for _ in range(args.reps):
        nx.config.cache_converted_graphs = False
        for case, (ref, ours) in cases.items():
            t_ref, want = timed(ref)
            t_ours, got = timed(ours)
            if case == "tree":
                want, got = list(want.edges(data=True)), list(got.edges(data=True))
            assert got == want, f"{case}: fastmst differs from networkx"
            times[(case, "networkx")].append(t_ref)
            times[(case, "fastmst")].append(t_ours)
            del want, got
        times[("tree, networkx with GC paused", "networkx")].append(
            timed(lambda: nx_tree_gc_paused(G))[0])
        nx.config.cache_converted_graphs = True
        G.__networkx_cache__.clear()
        nx.minimum_spanning_tree(G, backend="fastmst")            # converts and caches
        times[("tree, conversion cached", "fastmst")].append(
            timed(lambda: nx.minimum_spanning_tree(G, backend="fastmst"))[0])
        G.__networkx_cache__.clear()
        for k, v in phases(G).items():
            phase_times.setdefault(k, []).append(v)

    med = {k: statistics.median(v) for k, v in times.items()}
    print(f"\nmedian of {args.reps} (seconds; ratio = networkx default / fastmst backend)")
    print(f"{'call':<34}{'networkx':>10}{'fastmst':>10}{'ratio':>8}")
    for case in cases:
        a, b = med[(case, "networkx")], med[(case, "fastmst")]
        print(f"{case + ' (conversion included)':<34}{a:>10.2f}{b:>10.2f}{a / b:>7.1f}x")
    a, b = med[("tree", "networkx")], med[("tree, conversion cached", "fastmst")]
    print(f"{'tree (conversion cached)':<34}{a:>10.2f}{b:>10.2f}{a / b:>7.1f}x")
    a, b = med[("tree, networkx with GC paused", "networkx")], med[("tree", "fastmst")]
    print(f"{'tree, networkx with GC paused':<34}{a:>10.2f}{b:>10.2f}{a / b:>7.1f}x")
    print("\nfastmst tree by phase (median seconds):",
          ", ".join(f"{k} {statistics.median(v):.2f}" for k, v in phase_times.items()))
    print("after:", uptime())


if __name__ == "__main__":
    main()
