"""The default thread setting against ``threads=1``, on a quiet machine and a busy one.

Usage::

    python bench/bench_threads.py                  # busy levels 0, 1 and 2, five repetitions
    python bench/bench_threads.py --busy 2 --reps 9
    python bench/bench_threads.py --only grid

For each busy level N, N other processes (``python -c "while True: pass"``) keep N cores busy
while every case runs ``threads=None`` (the default) and ``threads=1`` alternately, ``--reps``
times each; the table shows the medians and their ratio default / threads=1 (below 1: the
threads pay; the goal on a busy machine is at most 1.1).  Both settings are checked to return
the same edges.  The default takes the cores that other runnable tasks leave free when the
call starts (``fastmst._kernels.threads.default_threads``).  The busy processes are started by this script and stopped by it (their own
process handles), before the next level.
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

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

import fastmst  # noqa: E402
import generators as gen  # noqa: E402
from fastmst._kernels import threads as thread_policy  # noqa: E402

CASES = (
    ("random 100K/1M", "random", dict(n=100_000, m=1_000_000)),
    ("random 1M/10M", "random", dict(n=1_000_000, m=10_000_000)),
    ("grid 1000x1000", "grid", dict(rows=1000, cols=1000)),
)


def _busy(n: int) -> list[subprocess.Popen]:
    procs = [subprocess.Popen([sys.executable, "-c", "while True: pass"]) for _ in range(n)]
    time.sleep(0.5 if n else 0.0)
    return procs


def _stop(procs: list[subprocess.Popen]) -> None:
    for p in procs:
        p.terminate()
    for p in procs:
        p.wait()


def run_level(busy: int, graphs, reps: int, method: str):
    rows = []
    procs = _busy(busy)
    try:
        with open("/proc/loadavg") as fh:
            queue = fh.read().split()[3]
        print(f"busy {busy}: run queue {queue} (runnable/total), the default takes "
              f"{thread_policy.default_threads()} thread(s) now", flush=True)
        for name, (tail, head, weight, n) in graphs.items():
            times = {"default": [], "threads=1": []}
            edges = {}
            used = []
            pair = (("default", None), ("threads=1", 1))
            for rep in range(reps):   # the order alternates, so neither side always runs first
                for key, thr in (pair if rep % 2 == 0 else pair[::-1]):
                    if thr is None:   # what the call will take (the reading is cached 0.1 s)
                        used.append(thread_policy.default_threads())
                    t0 = time.perf_counter()
                    f = fastmst.minimum_spanning_forest(tail, head, weight, n, method=method,
                                                        threads=thr)
                    times[key].append(time.perf_counter() - t0)
                    edges.setdefault(key, f.edges)
            if not np.array_equal(edges["default"], edges["threads=1"]):
                raise AssertionError(f"{name}: the default and threads=1 differ")
            td = statistics.median(times["default"])
            t1 = statistics.median(times["threads=1"])
            rows.append((busy, name, td, t1, td / t1))
            print(f"  busy {busy}  {name:<16} default {td * 1e3:8.1f} ms   threads=1 "
                  f"{t1 * 1e3:8.1f} ms   default/threads=1 {td / t1:5.2f}   default took "
                  f"{'/'.join(map(str, used))} threads", flush=True)
    finally:
        _stop(procs)
    return rows


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    p.add_argument("--busy", default="0,1,2",
                   help="comma-separated numbers of cores kept busy by other processes")
    p.add_argument("--reps", type=int, default=5)
    p.add_argument("--method", default="auto")
    p.add_argument("--only", default=None, help="run only cases whose name contains this")
    a = p.parse_args(argv)
    levels = [int(x) for x in a.busy.split(",")]
    print(f"fastmst {fastmst.__version__}, numpy {np.__version__}, python "
          f"{platform.python_version()}, {os.cpu_count()} cpus, team limit "
          f"{thread_policy.team_limit()}, wait policy "
          f"{os.environ.get('OMP_WAIT_POLICY', thread_policy.wait_policy())}, load average "
          f"{os.getloadavg()[0]:.2f}, {time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())}")
    graphs = {name: gen.FAMILIES[fam](**kw) for name, fam, kw in CASES
              if a.only is None or a.only in name}
    rows = []
    for busy in levels:
        rows += run_level(busy, graphs, a.reps, a.method)
    print("\nratio default / threads=1 (goal on a busy machine: <= 1.1)")
    print(f"  {'case':<16}" + "".join(f"{'busy ' + str(b):>10}" for b in levels))
    for name in graphs:
        cells = {r[0]: r[4] for r in rows if r[1] == name}
        print(f"  {name:<16}" + "".join(f"{cells[b]:>10.2f}" for b in levels))


if __name__ == "__main__":
    main()
