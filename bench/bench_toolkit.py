"""Time the network-design toolkit on a large random graph, side by side with the solve itself
and with scipy.sparse.csgraph.minimum_spanning_tree (the yardstick for ratios).

    PYTHONPATH=$PWD python bench/bench_toolkit.py                 # 10M edges, 1M nodes
    PYTHONPATH=$PWD python bench/bench_toolkit.py --edges 200000   # quick smoke run

The graph: ``--nodes`` nodes, ``--edges`` edges with endpoints drawn uniformly at random
(self-loops and parallel edges included) and float64 weights uniform in [0, 1), from a fixed
seed.  Each step runs ``--repeat`` times; the best time is printed.  Wall-clock times on a shared
machine are noisy: compare the ratios printed in the last column, measured in this one run.
"""
from __future__ import annotations

import argparse
import time

import numpy as np


def best_of(repeat, fn):
    best, out = np.inf, None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--edges", type=int, default=10_000_000)
    ap.add_argument("--nodes", type=int, default=None, help="default: edges // 10")
    ap.add_argument("--queries", type=int, default=1_000_000)
    ap.add_argument("--new-fraction", type=float, default=0.01)
    ap.add_argument("--repeat", type=int, default=2)
    ap.add_argument("--seed", type=int, default=2026)
    ap.add_argument("--no-scipy", action="store_true")
    args = ap.parse_args(argv)

    import fastmst
    m = args.edges
    n = args.nodes or max(2, m // 10)
    rng = np.random.default_rng(args.seed)
    tail = rng.integers(0, n, m, dtype=np.int32)
    head = rng.integers(0, n, m, dtype=np.int32)
    weight = rng.random(m)
    k = max(1, int(round(args.new_fraction * m)))
    nt = rng.integers(0, n, k, dtype=np.int32)
    nh = rng.integers(0, n, k, dtype=np.int32)
    nw = rng.random(k)
    qa = rng.integers(0, n, args.queries)
    qb = rng.integers(0, n, args.queries)
    print(f"graph: {n:,} nodes, {m:,} edges (uniform random, float64 weights, seed "
          f"{args.seed}); {args.queries:,} bottleneck queries; {k:,} new edges")

    rows = []
    t_solve, f = best_of(args.repeat, lambda: fastmst.minimum_spanning_forest(tail, head, weight, n))
    rows.append(("minimum_spanning_forest", t_solve))
    if not args.no_scipy:
        from scipy.sparse import coo_array
        from scipy.sparse.csgraph import minimum_spanning_tree

        def scipy_solve():
            a = coo_array((weight, (tail, head)), shape=(n, n)).tocsr()
            return minimum_spanning_tree(a)
        t_scipy, _ = best_of(args.repeat, scipy_solve)
        rows.append(("scipy minimum_spanning_tree (csr build incl.)", t_scipy))
    t_check, c = best_of(args.repeat, lambda: fastmst.check_forest(tail, head, weight, f))
    assert c.is_minimum, "check_forest must certify the solver's forest"
    rows.append(("check_forest", t_check))
    t_sens, s = best_of(args.repeat, lambda: fastmst.sensitivity(tail, head, weight, f))
    assert s.shape == (m,) and (s >= 0).all()
    rows.append(("sensitivity", t_sens))
    f._cache.pop("merge_tree", None)    # time the first build of the merge tree
    t0 = time.perf_counter()
    f.bottleneck(qa[:1], qb[:1])
    t_tree = time.perf_counter() - t0
    rows.append(("bottleneck merge tree (first call, cached)", t_tree))
    t_bn, (bw, bp) = best_of(args.repeat, lambda: f.bottleneck(qa, qb))
    rows.append((f"bottleneck, {args.queries:,} pairs", t_bn))
    t_add, g = best_of(args.repeat, lambda: f.add_edges(nt, nh, nw))
    rows.append((f"add_edges, {k:,} new edges", t_add))
    T, H, W = np.concatenate([tail, nt]), np.concatenate([head, nh]), np.concatenate([weight, nw])
    t_full, full = best_of(args.repeat, lambda: fastmst.minimum_spanning_forest(T, H, W, n))
    assert np.array_equal(g.edges, full.edges), "add_edges must equal the full re-solve"
    rows.append(("full re-solve of the grown graph", t_full))

    ref = dict(rows).get("scipy minimum_spanning_tree (csr build incl.)")
    print(f"{'step':48s} {'seconds':>9s} {'x fastmst solve':>16s}"
          + (f" {'x scipy solve':>14s}" if ref else ""))
    for name, t in rows:
        line = f"{name:48s} {t:9.3f} {t / t_solve:16.2f}"
        if ref:
            line += f" {t / ref:14.2f}"
        print(line)
    print(f"add_edges speed-up over the full re-solve: {t_full / t_add:.1f}x")


if __name__ == "__main__":
    main()
