"""Side-by-side benchmark: point spanning trees and Steiner trees.

Each case times fastmst at full size, and fastmst against the brute-force route at a size where
that route fits in memory (pdist / a full distance matrix + scipy.sparse.csgraph's MST, which
needs n^2 memory; networkx's Mehlhorn for Steiner trees), on the same input in one process, and
prints the ratio.  Inputs are random (uniform points; a perturbed grid as a road-like network),
generated from a fixed seed.

    python bench/bench_points.py                  # every case at the sizes of the README
    python bench/bench_points.py --quick          # small sizes, a CI smoke test (~20 s)
    python bench/bench_points.py --case planar --n 1000000 --brute-n 10000

Each case runs in its own child process; "peak RSS" is that process's peak (ru_maxrss) right
after the full-size fastmst run: input, imports and fastmst, before the comparison runs.
"""
from __future__ import annotations

import argparse
import multiprocessing as mp
import resource
import time

import numpy as np

SEED = 20261201


def _peak_mib():
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def _timed(fn, *args, **kw):
    """Run once; return (result, wall seconds, CPU seconds of this process).  On a shared,
    loaded machine the CPU figure is the steadier one (for single-threaded code)."""
    t0, c0 = time.perf_counter(), time.process_time()
    out = fn(*args, **kw)
    return out, time.perf_counter() - t0, time.process_time() - c0


def _scipy_mst_dense(D):
    from scipy.sparse.csgraph import minimum_spanning_tree
    return float(minimum_spanning_tree(D).sum())


def _brute_euclid(X, metric="euclidean"):
    from scipy.spatial.distance import pdist, squareform
    return _scipy_mst_dense(squareform(pdist(X, metric)))


def _brute_sphere(LL):
    from fastmst.geometry.geodesy import haversine_m
    n = LL.shape[0]
    D = np.empty((n, n))
    for s in range(0, n, 1000):
        D[s:s + 1000] = haversine_m(LL[s:s + 1000, None, 0], LL[s:s + 1000, None, 1],
                                    LL[None, :, 0], LL[None, :, 1])
    return _scipy_mst_dense(D)


def _uniform_sphere(rng, n):
    lon = rng.uniform(-180, 180, n)
    lat = np.degrees(np.arcsin(rng.uniform(-1, 1, n)))
    return np.column_stack([lon, lat])


def case_planar(n, brute_n, threads):
    import fastmst
    rng = np.random.default_rng(SEED)
    X = rng.random((n, 2))
    t, secs, cpu = _timed(fastmst.point_spanning_tree, X)
    row = {"case": f"planar euclidean n={n}", "fastmst_s": secs, "cpu_s": cpu,
           "peak_rss_mib": _peak_mib(),
           "method": t.method,
           "weight": t.weight}
    Y = X[:brute_n]
    ours, a, ca = _timed(fastmst.point_spanning_tree, Y)
    ref, b, cb = _timed(_brute_euclid, Y)
    row.update(brute=f"n={brute_n}: fastmst {a:.3f} s, pdist+scipy {b:.3f} s, "
                     f"ratio {b / a:.1f}x (CPU {cb / ca:.1f}x), "
                     f"|dW|/W={abs(ours.weight - ref) / ref:.1e}")
    return row


def case_sphere(n, brute_n, threads):
    import fastmst
    rng = np.random.default_rng(SEED)
    LL = _uniform_sphere(rng, n)
    t, secs, cpu = _timed(fastmst.point_spanning_tree, LL, metric="great-circle")
    row = {"case": f"great-circle n={n}", "fastmst_s": secs, "cpu_s": cpu,
           "peak_rss_mib": _peak_mib(),
           "method": t.method,
           "weight": t.weight}
    Y = LL[:brute_n]
    ours, a, ca = _timed(fastmst.point_spanning_tree, Y, metric="great-circle")
    ref, b, cb = _timed(_brute_sphere, Y)
    row.update(brute=f"n={brute_n}: fastmst {a:.3f} s, haversine matrix+scipy {b:.3f} s, "
                     f"ratio {b / a:.1f}x (CPU {cb / ca:.1f}x), "
                     f"|dW|/W={abs(ours.weight - ref) / ref:.1e}")
    return row


def case_dense(n, brute_n, threads):
    import fastmst
    rng = np.random.default_rng(SEED)
    X = rng.random((n, 8))
    t, secs, cpu = _timed(fastmst.point_spanning_tree, X, threads=threads)
    row = {"case": f"8-D euclidean dense Prim n={n} threads={threads}", "fastmst_s": secs,
           "cpu_s": cpu, "peak_rss_mib": _peak_mib(),
           "method": t.method, "weight": t.weight}
    Y = X[:brute_n]
    ours, a, ca = _timed(fastmst.point_spanning_tree, Y, threads=threads)
    ref, b, cb = _timed(_brute_euclid, Y)
    row.update(brute=f"n={brute_n}: fastmst {a:.3f} s, pdist+scipy {b:.3f} s, "
                     f"ratio {b / a:.1f}x (CPU {cb / ca:.1f}x), "
                     f"|dW|/W={abs(ours.weight - ref) / ref:.1e}")
    return row


def road_grid(side, rng):
    """A perturbed side x side grid: 3 % of streets missing, 7 % of blocks with a diagonal
    shortcut, lengths from jittered coordinates (a road-like network; random, not real data)."""
    idx = np.arange(side * side).reshape(side, side)
    t = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel(), idx[:-1, :-1].ravel()])
    h = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel(), idx[1:, 1:].ravel()])
    n_grid = 2 * side * (side - 1)
    keep = np.r_[rng.random(n_grid) > 0.03, rng.random((side - 1) ** 2) < 0.07]
    t, h = t[keep], h[keep]
    xy = np.column_stack([(idx % side).ravel(), (idx // side).ravel()]) * 100.0
    xy += rng.normal(0, 15, xy.shape)
    w = np.hypot(*(xy[t] - xy[h]).T)
    return t, h, w, side * side


def case_steiner(side, brute_side, threads, k=1000):
    import fastmst
    rng = np.random.default_rng(SEED)
    t, h, w, n = road_grid(side, rng)
    term = rng.choice(n, k, replace=False)
    s, secs, cpu = _timed(fastmst.steiner_tree, t, h, w, term, n_nodes=n)
    row = {"case": f"Steiner k={k} on {side}x{side} grid, {t.shape[0]} edges",
           "fastmst_s": secs, "cpu_s": cpu, "peak_rss_mib": _peak_mib(), "method": s.method,
           "weight": s.weight, "ratio_bound": s.ratio_bound, "n_trees": s.n_trees}
    import networkx as nx
    from networkx.algorithms.approximation import steiner_tree as nx_steiner
    t2, h2, w2, n2 = road_grid(brute_side, np.random.default_rng(SEED + 1))
    term2 = np.random.default_rng(SEED + 2).choice(n2, k, replace=False)
    ours, a, ca = _timed(fastmst.steiner_tree, t2, h2, w2, term2, n_nodes=n2)
    g = nx.Graph()
    g.add_weighted_edges_from(zip(t2.tolist(), h2.tolist(), w2.tolist()))
    ref, b, cb = _timed(nx_steiner, g, term2.tolist(), weight="weight", method="mehlhorn")
    rw = ref.size(weight="weight")
    row.update(brute=f"{t2.shape[0]} edges: fastmst {a:.3f} s (W={ours.weight:.6g}), networkx "
                     f"mehlhorn {b:.3f} s (W={rw:.6g}, graph build excluded), "
                     f"ratio {b / a:.1f}x (CPU {cb / ca:.1f}x), "
                     f"W ours/nx={ours.weight / rw:.4f}")
    return row


CASES = {"planar": case_planar, "sphere": case_sphere, "dense": case_dense,
         "steiner": case_steiner}
FULL = {"planar": (1_000_000, 5_000), "sphere": (200_000, 5_000),
        "dense": (50_000, 5_000), "steiner": (1000, 300)}
QUICK = {"planar": (50_000, 2_000), "sphere": (20_000, 2_000), "dense": (3_000, 2_000),
         "steiner": (200, 60)}


def _child(name, n, brute_n, threads, q):
    q.put(CASES[name](n, brute_n, threads))


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--case", choices=sorted(CASES), action="append")
    ap.add_argument("--n", type=int, help="full size (grid side for steiner)")
    ap.add_argument("--brute-n", type=int, help="size of the side-by-side comparison")
    ap.add_argument("--threads", type=int, default=1, help="dense Prim threads (default 1)")
    ap.add_argument("--quick", action="store_true")
    args = ap.parse_args(argv)
    sizes = QUICK if args.quick else FULL
    threads = args.threads
    ctx = mp.get_context("spawn")
    for name in args.case or list(CASES):
        n, brute_n = sizes[name]
        n = args.n or n
        brute_n = args.brute_n or brute_n
        q = ctx.Queue()
        p = ctx.Process(target=_child, args=(name, n, brute_n, threads, q))
        p.start()
        row = q.get()
        p.join()
        print(f"{row.pop('case')}: fastmst {row.pop('fastmst_s'):.2f} s wall, "
              f"{row.pop('cpu_s'):.2f} s CPU "
              f"(peak RSS {row.pop('peak_rss_mib'):.0f} MiB), {row.pop('brute')}; "
              + ", ".join(f"{k}={v}" for k, v in row.items()), flush=True)


if __name__ == "__main__":
    main()
