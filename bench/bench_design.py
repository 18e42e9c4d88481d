"""Time the network-design tools (fastmst.design) on a road-like graph, side by side with one
solve of the same graph, and print the light-shallow-tree trade-off and the Esau-Williams gap.

    PYTHONPATH=$PWD python bench/bench_design.py                     # 1M-node grid
    PYTHONPATH=$PWD python bench/bench_design.py --side 300 --quick  # smoke run

The road-like graph: a ``--side`` x ``--side`` grid of sites, each moved by up to 0.35 of the
spacing (jitter), joined to its right and lower neighbours, 8 % of those links dropped at
random (dead ends, blocks), plus a diagonal in 5 % of the cells; a link's weight is its
Euclidean length.  Each step runs ``--repeat`` times, interleaved with the solve, and the best
time is kept; the ratio to the solve's best time in the same run is printed.  Backup links
with their LP bound (Python path walks + HiGHS) are timed on a ``--backup-side`` grid, without
it (the 2-approximation alone) on the full grid; Esau-Williams on
``--sites`` sites with a feeder link from a central root to every site at 1.5 x its length.
"""
from __future__ import annotations

import argparse
import os
import sys
import time

import numpy as np


def road_grid(side, seed):
    """(tail, head, length, xy) of the jittered, thinned grid."""
    rng = np.random.default_rng(seed)
    n = side * side
    idx = np.arange(n, dtype=np.int64).reshape(side, side)
    xy = np.stack(np.meshgrid(np.arange(side), np.arange(side), indexing="ij"), -1)
    xy = xy.reshape(-1, 2).astype(float) + rng.uniform(-0.35, 0.35, (n, 2))
    t = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel(), idx[:-1, :-1].ravel()])
    h = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel(), idx[1:, 1:].ravel()])
    n_straight = 2 * side * (side - 1)
    keep = np.concatenate([rng.random(n_straight) > 0.08,
                           rng.random(t.size - n_straight) < 0.05])
    t, h = t[keep], h[keep]
    w = np.hypot(*(xy[t] - xy[h]).T)
    return t, h, w, xy


def timed(fn):
    t0 = time.perf_counter()
    out = fn()
    return time.perf_counter() - t0, out


def side_by_side(repeat, solve, step):
    """Best times of solve and step, interleaved."""
    ts, tx, out = np.inf, np.inf, None
    for _ in range(repeat):
        ts = min(ts, timed(solve)[0])
        t, out = timed(step)
        tx = min(tx, t)
    return ts, tx, out


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--side", type=int, default=1000)
    ap.add_argument("--backup-side", type=int, default=100)
    ap.add_argument("--sites", type=int, default=10_000)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--seed", type=int, default=2026)
    ap.add_argument("--quick", action="store_true", help="skip the Esau-Williams gap table")
    args = ap.parse_args(argv)

    import fastmst
    from fastmst.design import (backup_links, capacitated_tree, light_shallow_tree,
                                link_failures)
    print(f"load: {os.getloadavg()[0]:.2f} {os.getloadavg()[1]:.2f} "
          f"{os.getloadavg()[2]:.2f} (1/5/15 min), {os.cpu_count()} cores")
    t, h, w, xy = road_grid(args.side, args.seed)
    n = args.side ** 2
    root = int(np.argmin(np.hypot(*(xy - xy.mean(0)).T)))
    print(f"road-like grid: {n:,} sites, {t.size:,} links (seed {args.seed}); root {root}")

    def solve():
        return fastmst.minimum_spanning_forest(t, h, w, n)

    rows = []
    ts, tx, fail = side_by_side(args.repeat, solve, lambda: link_failures(t, h, w, n_nodes=n,
                                                                          root=root))
    rows.append(("link_failures (MST inside)", ts, tx,
                 f"{fail.n_bridges:,} bridges of {len(fail):,} links"))
    f = solve()
    ts, tx, _ = side_by_side(args.repeat, solve, lambda: link_failures(t, h, w, f, root=root))
    rows.append(("link_failures (given forest)", ts, tx, ""))
    ts, tx, last = side_by_side(args.repeat, solve,
                                lambda: light_shallow_tree(t, h, w, root, alpha=2.0, n_nodes=n))
    rows.append(("light_shallow_tree alpha=2", ts, tx,
                 f"weight {last.weight / last.mst_weight:.3f} x MST, worst stretch "
                 f"{np.nanmax(last.stretch):.3f}"))
    bt, bh, bw, _ = road_grid(args.backup_side, args.seed)
    bn = args.backup_side ** 2

    def bsolve():
        return fastmst.minimum_spanning_forest(bt, bh, bw, bn)
    ts, tx, bk = side_by_side(args.repeat, bsolve, lambda: backup_links(bt, bh, bw, n_nodes=bn))
    rows.append((f"backup_links ({bn:,} sites, LP bound)", ts, tx,
                 f"cost {bk.weight:,.1f}, LP bound {bk.lower_bound:,.1f} (ratio "
                 f"{bk.weight / bk.lower_bound:.3f}), {bk.single_points.size} single points"))
    ts, tx, bk = side_by_side(args.repeat, solve, lambda: backup_links(t, h, w, n_nodes=n,
                                                                       lower_bound=False))
    rows.append((f"backup_links ({n:,} sites, no bound)", ts, tx,
                 f"{len(bk):,} backup links, cost {bk.weight:,.1f} "
                 f"({bk.weight / f.weight:.3f} x the tree), {bk.single_points.size:,} single "
                 f"points"))
    # Esau-Williams: sites on a jittered grid, a feeder link from the central root to each
    es = int(round(np.sqrt(args.sites)))
    et, eh, ew, exy = road_grid(es, args.seed)
    en = es * es
    eroot = en
    centre = exy.mean(0)
    ft = np.full(en, eroot)
    fh = np.arange(en)
    fw = 1.5 * np.hypot(*(exy - centre).T)
    et, eh, ew = np.concatenate([et, ft]), np.concatenate([eh, fh]), np.concatenate([ew, fw])

    def esolve():
        return fastmst.minimum_spanning_forest(et, eh, ew, en + 1)
    ts, tx, cap = side_by_side(args.repeat, esolve,
                               lambda: capacitated_tree(et, eh, ew, eroot, 32))
    rows.append((f"capacitated_tree ({en:,} sites, cap 32)", ts, tx,
                 f"{cap.load.size} subtrees, max load {cap.load.max():.0f}, "
                 f"{cap.unserved.size} unserved, {tx:.2f} s"))
    print(f"\n{'step':<40} {'solve s':>9} {'step s':>9} {'ratio':>7}  note")
    for name, a, b, note in rows:
        print(f"{name:<40} {a:9.3f} {b:9.3f} {b / a:7.2f}  {note}")

    print("\nlight_shallow_tree trade-off on the same grid (root at the centre):")
    print(f"{'alpha':>6} {'weight/MST':>11} {'bound':>8} {'worst stretch':>14} "
          f"{'mean stretch':>13} {'shortcuts':>10}")
    for alpha in (1.05, 1.1, 1.25, 1.5, 2.0, 3.0, 5.0, 10.0):
        r = light_shallow_tree(t, h, w, root, alpha=alpha, n_nodes=n)
        s = r.stretch
        print(f"{alpha:6.2f} {r.weight / r.mst_weight:11.3f} {1 + 2 / (alpha - 1):8.2f} "
              f"{np.nanmax(s):14.3f} {np.nanmean(s):13.3f} "
              f"{int((r.reason == 'shortcut').sum()):10,}")
    if not args.quick:
        sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..",
                                        "tests"))
        from design_reference import capacitated_optimum, complete_instance
        print("\nEsau-Williams against the exact optimum (scipy.optimize.milp, single-commodity "
              "flow), complete graphs of random points, unit demands:")
        print(f"{'sites':>6} {'capacity':>9} {'instances':>10} {'mean gap %':>11} "
              f"{'max gap %':>10} {'optimal':>8}")
        for nodes, capacity in ((8, 3), (10, 3), (10, 5), (12, 4)):
            gaps = []
            for seed in range(20):
                a, b, c, _ = complete_instance(nodes, 1000 + seed)
                ones = np.ones(nodes)
                ew_ = capacitated_tree(a, b, c, 0, capacity).weight
                opt = capacitated_optimum(a, b, c, nodes, 0, capacity, ones)
                gaps.append(100 * (ew_ - opt) / opt)
            g = np.array(gaps)
            print(f"{nodes - 1:6d} {capacity:9d} {g.size:10d} {g.mean():11.2f} {g.max():10.2f} "
                  f"{int((g < 1e-7).sum()):8d}")
    print(f"\nload after: {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
