"""fastmst side by side with SciPy, in one process.

Usage::

    python bench/compare.py                   # the quick set (about a minute)
    python bench/compare.py --sizes full      # up to 100M edges (needs ~8 GB, ~15 minutes)
    python bench/compare.py --plot times.png  # also draw time against edges (log-log)

For every case each runner (SciPy, then fastmst with each method) runs once per repetition,
interleaved, so that a noisy shared machine slows all of them alike; the table shows medians,
the ratio SciPy time / fastmst time, and the peak extra resident memory of the call (VmHWM
after a reset, minus the resident size before it; Linux only, "-" elsewhere).  The SciPy route
is the usual one from edge arrays: ``coo_array -> tocsr -> minimum_spanning_tree``.  Every
fastmst method is checked to return the same edges.
"""
from __future__ import annotations

import argparse
import gc
import json
import os
import platform
import statistics
import sys
import time

import numpy as np

# The sibling generators module; fastmst itself comes from the installed package (or from
# PYTHONPATH when benchmarking an in-place build).
sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

import fastmst  # noqa: E402
import generators as gen  # noqa: E402


# ----------------------------------------------------------------------------- memory probes
def _status_kb(field: str):
    try:
        with open("/proc/self/status") as fh:
            for line in fh:
                if line.startswith(field + ":"):
                    return int(line.split()[1])
    except OSError:
        return None
    return None


def _reset_peak() -> bool:
    try:
        with open("/proc/self/clear_refs", "w") as fh:
            fh.write("5")
        return True
    except OSError:
        return False


def measure(fn):
    """Run ``fn()`` once; return (seconds, peak extra MB or None, result)."""
    gc.collect()
    base = _status_kb("VmRSS")
    ok = _reset_peak()
    t0 = time.perf_counter()
    out = fn()
    dt = time.perf_counter() - t0
    peak = _status_kb("VmHWM")
    extra = (peak - base) / 1024 if ok and base is not None and peak is not None else None
    return dt, extra, out


# ----------------------------------------------------------------------------- runners
def scipy_mst(tail, head, weight, n):
    from scipy import sparse
    from scipy.sparse.csgraph import minimum_spanning_tree
    g = sparse.coo_array((weight, (tail, head)), shape=(n, n)).tocsr()
    return minimum_spanning_tree(g)


def runners(threads):
    def fm(method, thr):
        return lambda t, h, w, n, pre: fastmst.minimum_spanning_forest(
            t, h, w, n, method=method, presorted=pre, threads=thr)
    return {
        "scipy": lambda t, h, w, n, pre: scipy_mst(t, h, w, n),
        "auto": fm("auto", threads),
        "kruskal": fm("kruskal", threads),
        "filter-kruskal": fm("filter-kruskal", threads),
        "boruvka": fm("boruvka", threads),
        "boruvka-1t": fm("boruvka", 1),
    }


# ----------------------------------------------------------------------------- cases
def cases(sizes: str):
    """(name, family, kwargs, presorted, reps)."""
    if sizes == "quick":
        return [
            ("random 100K/1M", "random", dict(n=100_000, m=1_000_000), False, 3),
            ("grid 500x500", "grid", dict(rows=500, cols=500), False, 3),
            ("road 500x500", "road", dict(rows=500, cols=500), False, 3),
            ("knn 100K k=6", "knn", dict(n=100_000, k=6), False, 3),
            ("power-law 100K/1M", "power-law", dict(n=100_000, m=1_000_000), False, 3),
            ("complete 1000", "complete", dict(n=1000), False, 3),
            ("presorted 100K/1M", "presorted", dict(n=100_000, m=1_000_000), True, 3),
            ("components 100K/1M x1000", "components",
             dict(n=100_000, m=1_000_000, parts=1000), False, 3),
        ]
    return [
        ("random 100K/1M", "random", dict(n=100_000, m=1_000_000), False, 5),
        ("random 1M/10M", "random", dict(n=1_000_000, m=10_000_000), False, 5),
        ("grid 1000x1000", "grid", dict(rows=1000, cols=1000), False, 5),
        ("road 1000x1000", "road", dict(rows=1000, cols=1000), False, 5),
        ("knn 1M k=6", "knn", dict(n=1_000_000, k=6), False, 3),
        ("power-law 1M/10M", "power-law", dict(n=1_000_000, m=10_000_000), False, 3),
        ("complete 3000", "complete", dict(n=3000), False, 3),
        ("presorted 1M/10M", "presorted", dict(n=1_000_000, m=10_000_000), True, 3),
        ("components 1M/10M x10000", "components",
         dict(n=1_000_000, m=10_000_000, parts=10_000), False, 3),
        ("random 10M/100M", "random", dict(n=10_000_000, m=100_000_000), False, 1),
    ]


def run(sizes: str, threads, reps_override=None, only=None):
    rows = []
    run_fns = runners(threads)
    for name, family, kw, pre, reps in cases(sizes):
        if only and not any(part.strip() in name for part in only.split(",")):
            continue
        reps = reps_override or reps
        tail, head, weight, n = gen.FAMILIES[family](**kw)
        m = tail.shape[0]
        times = {k: [] for k in run_fns}
        peaks = {k: 0.0 for k in run_fns}
        edges = {}
        for _ in range(reps):
            for key, fn in run_fns.items():
                dt, extra, out = measure(lambda: fn(tail, head, weight, n, pre))
                times[key].append(dt)
                if extra is not None:
                    peaks[key] = max(peaks[key], extra)
                if key != "scipy":
                    edges.setdefault(key, out.edges)
                del out
        ref = edges["kruskal"]
        for key, e in edges.items():
            if not np.array_equal(e, ref):
                raise AssertionError(f"{name}: method {key} returned different edges")
        t_sp = statistics.median(times["scipy"])
        input_mb = (tail.nbytes + head.nbytes + weight.nbytes) / 2**20
        for key in run_fns:
            t = statistics.median(times[key])
            rows.append(dict(case=name, family=family, n_nodes=n, n_edges=m, runner=key,
                             seconds=t, ratio=t_sp / t, peak_mb=peaks[key], input_mb=input_mb,
                             reps=reps))
        _print_case(rows[-len(run_fns):])
        del tail, head, weight, edges
        gc.collect()
    return rows


def _print_case(rows):
    r0 = rows[0]
    print(f"\n{r0['case']}: {r0['n_nodes']:,} nodes, {r0['n_edges']:,} edges, input "
          f"{r0['input_mb']:.0f} MB, median of {r0['reps']}")
    print(f"  {'runner':<15}{'seconds':>10}{'scipy/this':>12}{'peak MB':>10}")
    for r in rows:
        print(f"  {r['runner']:<15}{r['seconds']:>10.3f}{r['ratio']:>11.1f}x{r['peak_mb']:>10.0f}")
    sys.stdout.flush()


def goals(rows):
    """Print the issue's goals against the measured rows."""
    by = {(r["case"], r["runner"]): r for r in rows}

    def get(case, runner):
        return by.get((case, runner))

    print("\nGoals (ratio = SciPy time / fastmst 'auto' time, same run):")
    for case, want in (("random 1M/10M", 10), ("grid 1000x1000", 5), ("random 10M/100M", 10)):
        r = get(case, "auto")
        if r:
            print(f"  {case:<18} ratio {r['ratio']:5.1f}x  goal >= {want}x  "
                  f"{'met' if r['ratio'] >= want else 'MISSED'}")
    r, s = get("random 10M/100M", "auto"), get("random 10M/100M", "scipy")
    if r and s and s["peak_mb"]:
        print(f"  100M peak memory: fastmst {r['peak_mb']:.0f} MB, scipy {s['peak_mb']:.0f} MB, "
              f"input {r['input_mb']:.0f} MB  (goal: <= half of scipy, <= input)")
    small, big = get("random 100K/1M", "auto"), get("random 10M/100M", "auto")
    ss, sb = get("random 100K/1M", "scipy"), get("random 10M/100M", "scipy")
    if small and big:
        g = (big["seconds"] / big["n_edges"]) / (small["seconds"] / small["n_edges"])
        gs = (sb["seconds"] / sb["n_edges"]) / (ss["seconds"] / ss["n_edges"])
        print(f"  time per edge 1M -> 100M: fastmst x{g:.2f} (goal <= 1.5), scipy x{gs:.2f}")
    b1, b2 = get("random 10M/100M", "boruvka-1t"), get("random 10M/100M", "boruvka")
    if b1 and b2:
        print(f"  boruvka 1 thread / all threads at 100M: {b1['seconds'] / b2['seconds']:.2f}x "
              f"(goal >= 1.6 with 2 threads)")


def plot(rows, path):
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    fig, ax = plt.subplots(figsize=(7, 5))
    families = sorted({r["family"] for r in rows})
    colors = {f: plt.cm.tab10(i % 10) for i, f in enumerate(families)}
    for runner, style in (("scipy", "o--"), ("auto", "s-")):
        for fam in families:
            pts = sorted((r["n_edges"], r["seconds"]) for r in rows
                         if r["runner"] == runner and r["family"] == fam)
            if pts:
                x, y = zip(*pts)
                ax.plot(x, y, style, color=colors[fam],
                        label=f"{'SciPy' if runner == 'scipy' else 'fastmst'} {fam}")
    ax.set_xscale("log")
    ax.set_yscale("log")
    ax.set_xlabel("edges")
    ax.set_ylabel("seconds (median)")
    ax.set_title("Minimum spanning forest from edge arrays (circles SciPy, squares fastmst)")
    ax.legend(fontsize=7, ncol=2)
    ax.grid(True, which="both", alpha=0.3)
    fig.tight_layout()
    fig.savefig(path, dpi=120)
    print(f"plot written to {path}")


def _exec_with_exact_malloc():
    """Re-run under glibc settings that return every large block to the system at once, so
    the peak resident size of each call measures its own allocations (glibc otherwise keeps
    freed blocks of up to 32 MB resident and reuses them, hiding them from the probe)."""
    if os.environ.get("MALLOC_MMAP_THRESHOLD_") or not sys.platform.startswith("linux"):
        return
    # One OpenBLAS thread: its idle pool spins otherwise (neither side calls BLAS here).
    env = dict(os.environ, MALLOC_MMAP_THRESHOLD_="131072", MALLOC_TRIM_THRESHOLD_="131072",
               OPENBLAS_NUM_THREADS=os.environ.get("OPENBLAS_NUM_THREADS", "1"))
    os.execve(sys.executable, [sys.executable] + sys.argv, env)


def main(argv=None):
    if argv is None:
        _exec_with_exact_malloc()
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    p.add_argument("--sizes", choices=("quick", "full"), default="quick")
    p.add_argument("--reps", type=int, default=None, help="repetitions per case")
    p.add_argument("--threads", type=int, default=None, help="fastmst threads (default all)")
    p.add_argument("--only", default=None, help="run only cases whose name contains one of these comma-separated strings")
    p.add_argument("--plot", default=None, metavar="FILE.png")
    p.add_argument("--json", default=None, metavar="FILE.json")
    a = p.parse_args(argv)
    import scipy
    print(f"fastmst {fastmst.__version__}, numpy {np.__version__}, scipy {scipy.__version__}, "
          f"python {platform.python_version()}, {platform.machine()}, "
          f"{os.cpu_count()} cpus, {time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())}")
    rows = run(a.sizes, a.threads, a.reps, a.only)
    goals(rows)
    if a.json:
        with open(a.json, "w") as fh:
            json.dump(rows, fh, indent=1)
    if a.plot:
        plot(rows, a.plot)


if __name__ == "__main__":
    main()
