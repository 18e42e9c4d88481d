"""``fastmst check``: is a given forest a minimum spanning forest of the graph?  Lists every
profitable swap; exit code 3 when the forest is not minimum (or not a spanning forest)."""
from __future__ import annotations

import argparse
import json

import numpy as np

import fastmst
from fastmst import io
from fastmst.cli import common
from fastmst.cli.common import (CAUTION, EXIT_NOT_MINIMUM, EXIT_OK, UsageError, fmt_num,
                                jsonable, yes)

EPILOG = """examples:
  fastmst check links.csv forest.csv
  fastmst check links.csv design.csv --json      # exit code 3 when not minimum
"""


def add_parser(sub):
    p = sub.add_parser("check", help="is a given forest minimum? lists profitable swaps",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Check a forest against its graph with the cycle condition; "
                                   "list every profitable swap (exit code 3 if not minimum).")
    common.add_input_options(p, forest_file=True)
    p.add_argument("--maximize", action="store_true", help="check a maximum spanning forest")
    p.add_argument("--limit", type=int, default=20, metavar="N",
                   help="swaps listed on screen (default 20; --json lists all)")
    common.add_output_options(p, outputs=False)
    p.set_defaults(run=run)


def run(args) -> int:
    if args.limit < 0:
        raise UsageError(f"--limit {args.limit}: expected 0 or more swaps to list.")
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        with rep.phase("reading forest"):
            pos = io.read_forest_positions(args.forest, edges, func="check")
        with rep.phase("checking"):
            res = fastmst.check_forest(edges.tail, edges.head, edges.weight, pos,
                                       n_nodes=edges.n_nodes, maximize=args.maximize)
    viol = np.asarray(res.violations, dtype=np.int64)
    repl = np.asarray(res.replaces, dtype=np.int64)
    excess = float(res.excess)  # how much worse than the optimum, >= 0
    swaps = [{"add": common.edge_json(edges, a), "remove": common.edge_json(edges, b)}
             for a, b in zip(viol.tolist(), repl.tolist())]
    out = {"source": edges.source, "forest": args.forest, "forest_edges": int(pos.size),
           "is_forest": bool(res.is_forest), "is_spanning": bool(res.is_spanning),
           "is_minimum": bool(res.is_minimum), "excess": jsonable(excess),
           "swaps": swaps, "seconds": common.seconds(rep.times), "caution": CAUTION}
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        kind = "maximum" if args.maximize else "minimum"
        rows = [("forest edges", fmt_num(pos.size)), ("is a forest", yes(res.is_forest)),
                ("spans every component", yes(res.is_spanning)),
                (f"is {kind}", yes(res.is_minimum)),
                ("excess over the optimum", fmt_num(excess)),
                ("profitable swaps", fmt_num(len(swaps)))]
        common.print_block(f"fastmst check: {args.forest} against {edges.source}", rows)
        for s in swaps[:args.limit]:
            a, r = s["add"], s["remove"]
            print(f"  swap: add {a['tail']} -- {a['head']} (weight {fmt_num(a['weight'])}, "
                  f"position {a['position']}), remove {r['tail']} -- {r['head']} (weight "
                  f"{fmt_num(r['weight'])}, position {r['position']})")
        if len(swaps) > args.limit:
            print(f"  ... {len(swaps) - args.limit} more (see --json)")
        print(CAUTION)
    return EXIT_OK if res.is_minimum and res.is_forest and res.is_spanning else EXIT_NOT_MINIMUM
