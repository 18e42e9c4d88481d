"""``fastmst bench``: time ``minimum_spanning_forest`` on the user's file side by side with
``scipy.sparse.csgraph.minimum_spanning_tree`` (including building its CSR matrix), best of
``--repeat`` runs, and print the ratio.  Uses only public API of both libraries."""
from __future__ import annotations

import argparse
import json
import math
import time

import numpy as np

import fastmst
from fastmst.cli import common
from fastmst.cli.common import EXIT_OK, UsageError, fmt_num, jsonable

EPILOG = """examples:
  fastmst bench links.csv
  fastmst bench roads.gr --repeat 5 --json > bench.json
"""


MAX_REPEAT = 1000   # each run solves twice; more only makes the command seem to hang


def add_parser(sub):
    p = sub.add_parser("bench", help="time your file against the SciPy route",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Time fastmst on your file side by side with "
                                   "scipy.sparse.csgraph.minimum_spanning_tree and print ratios.")
    common.add_input_options(p)
    p.add_argument("--repeat", type=int, default=3, metavar="N",
                   help=f"runs each, 1 to {MAX_REPEAT} (default 3; the best counts)")
    p.add_argument("--method", default="auto", choices=tuple(fastmst.METHODS),
                   help="fastmst method (default auto)")
    common.add_threads_option(p)
    common.add_output_options(p, outputs=False)
    p.set_defaults(run=run)


def run(args) -> int:
    from scipy.sparse import coo_array
    from scipy.sparse.csgraph import minimum_spanning_tree
    if not 1 <= args.repeat <= MAX_REPEAT:
        raise UsageError(f"--repeat {args.repeat}: expected 1 to {MAX_REPEAT} runs.")
    threads = common.threads_option(args)
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        t, h, w = edges.tail, edges.head, edges.weight
        n = edges.n_nodes
        best_f, best_s = math.inf, math.inf
        forest = tree = None
        for r in range(args.repeat):
            with rep.phase(f"fastmst run {r + 1}/{args.repeat}"):
                t0 = time.perf_counter()
                forest = fastmst.minimum_spanning_forest(t, h, w, n, method=args.method,
                                                         threads=threads)
                best_f = min(best_f, time.perf_counter() - t0)
            with rep.phase(f"scipy run {r + 1}/{args.repeat}"):
                t0 = time.perf_counter()
                m = coo_array((w.astype(np.float64), (t, h)), shape=(n, n)).tocsr()
                tree = minimum_spanning_tree(m)
                best_s = min(best_s, time.perf_counter() - t0)
    zeros = int(np.count_nonzero(w == 0))
    scipy_total = float(tree.sum())
    out = {"source": edges.source, "nodes": n, "edges": edges.n_edges, "repeat": args.repeat,
           "fastmst_seconds": best_f, "scipy_seconds": best_s,
           "speedup": best_s / best_f if best_f > 0 else None,
           "fastmst_method": forest.method, "fastmst_total_weight": jsonable(forest.weight),
           "scipy_total_weight": scipy_total, "zero_weight_edges": zeros,
           "read_seconds": round(rep.times.get("reading edges", 0.0), 6),
           "note": "scipy route: coo -> csr (sums parallel edges, drops zero weights) -> "
                   "scipy.sparse.csgraph.minimum_spanning_tree; best of --repeat runs"}
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        rows = [("nodes", fmt_num(n)), ("edges", fmt_num(edges.n_edges)),
                ("read", f"{out['read_seconds']:.3f} s"),
                (f"fastmst ({forest.method})", f"{best_f:.4f} s"),
                ("scipy csgraph", f"{best_s:.4f} s (incl. building the CSR matrix)"),
                ("speedup", f"{out['speedup']:.2f}x" if out["speedup"] else "n/a"),
                ("total weights", f"fastmst {fmt_num(forest.weight)}, scipy "
                                  f"{fmt_num(scipy_total)}")]
        common.print_block(f"fastmst bench: {edges.source} (best of {args.repeat})", rows)
        if zeros:
            print(f"  note: {zeros:,} zero-weight edges; the SciPy route drops them, so its "
                  f"forest may differ.")
    return EXIT_OK
