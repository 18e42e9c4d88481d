"""Instructions executed by the solver's compiled kernels, revisions side by side (callgrind).

Wall time on a shared virtual machine swings by 10-20 % between runs; instruction counts do
not.  For each revision this builds a clean clone (as ``bench_build.py`` does), then runs one
solve per method under ``valgrind --tool=callgrind`` on a random graph, after a warm-up that
does every import, and sums the instructions by where they ran:

* ``kernels``: the compiled ``cdef`` functions (Cython's ``__pyx_f_*``: the ``noexcept nogil``
  kernels and their helpers), the work a change of the ``def`` layers must leave alone;
* ``def layer``: the rest of the compiled modules' code (argument parsing, memoryviews).

Both are differences against a run without the measured solve.  The interpreter's and NumPy's
share is left out: it moved by 10-20 million instructions between runs of one build (garbage
collection and allocation paths), more than the solve's Python-level work.

    python bench/bench_instructions.py 1894da5 HEAD       # 200,000 edges, ~5 minutes
    python bench/bench_instructions.py HEAD --edges 50000 --methods auto

Needs valgrind (``callgrind_annotate``).  Times nothing; prints counts in millions.
"""
import argparse
import os
import re
import shutil
import subprocess
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

from bench_build import HERE, clean_build  # noqa: E402

_SOLVE = """
import sys, numpy as np
import fastmst
n_edges, method = int(sys.argv[1]), sys.argv[2]
rng = np.random.default_rng(1)
n = max(2, n_edges // 10)
t = rng.integers(0, n, n_edges); h = rng.integers(0, n, n_edges); w = rng.random(n_edges)
for m in ("auto", "kruskal", "filter-kruskal", "boruvka"):   # warm-up: every import done
    for k in (50, 5000):
        fastmst.minimum_spanning_forest(t[:k], h[:k], w[:k], n, method=m, threads=1)
if method != "none":
    fastmst.minimum_spanning_forest(t, h, w, n, method=method, threads=1)
"""

_LINE = re.compile(r"\s*([\d,]+)\s+\(\s*[\d.]+%\)\s+(.*)")


def counted(folder, n_edges, method):
    """{kernels, def layer} instructions of one run of the solve script."""
    out = os.path.join(folder, f"callgrind.{method}.out")
    script = os.path.join(folder, "solve_once.py")
    with open(script, "w") as fh:
        fh.write(_SOLVE)
    env = dict(os.environ, PYTHONPATH=folder, PYTHONHASHSEED="0")
    subprocess.run(["valgrind", "--tool=callgrind", f"--callgrind-out-file={out}",
                    sys.executable, script, str(n_edges), method], env=env, check=True,
                   capture_output=True)
    text = subprocess.run(["callgrind_annotate", "--threshold=100", out], check=True,
                          capture_output=True, text=True).stdout
    tot = {"kernels": 0, "def layer": 0}
    for line in text.splitlines():
        m = _LINE.match(line)
        if not m:
            continue
        n, name = int(m.group(1).replace(",", "")), m.group(2)
        if "PROGRAM TOTALS" in name:
            continue
        if "__pyx_f_" in name:
            tot["kernels"] += n
        elif "__pyx_" in name:
            tot["def layer"] += n
    return tot


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("revs", nargs="*", default=["HEAD"])
    ap.add_argument("--edges", type=int, default=200_000)
    ap.add_argument("--methods", default="auto,kruskal,filter-kruskal,boruvka")
    args = ap.parse_args(argv)
    if shutil.which("valgrind") is None or shutil.which("callgrind_annotate") is None:
        sys.exit("bench_instructions: needs valgrind and callgrind_annotate on PATH.")
    revs = [subprocess.run(["git", "-C", HERE, "rev-parse", "--short", r], check=True,
                           capture_output=True, text=True).stdout.strip() for r in args.revs]
    methods = args.methods.split(",")
    print(f"instructions (millions) of one solve, threads=1, random graph of {args.edges:,} "
          f"edges; callgrind")
    print(f"  {'revision':10s} {'method':15s} {'kernels':>10s} {'def layer':>10s}")
    for rev in revs:
        folder = clean_build(rev, 2)[2]
        try:
            base = counted(folder, args.edges, "none")
            for m in methods:
                c = counted(folder, args.edges, m)
                print(f"  {rev:10s} {m:15s} {(c['kernels'] - base['kernels']) / 1e6:10.1f} "
                      f"{(c['def layer'] - base['def layer']) / 1e6:10.1f}", flush=True)
        finally:
            shutil.rmtree(folder, ignore_errors=True)


if __name__ == "__main__":
    main()
