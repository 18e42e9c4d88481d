"""``fastmst check``: is a given forest a minimum spanning forest of the graph, under the
required/excluded links it was designed with?  Ranks the profitable swaps by saving, one per
link removed; exit code 3 when the forest is not minimum (or not a spanning forest, or breaks a
constraint)."""
from __future__ import annotations

import argparse
import json

import fastmst
from fastmst import io
from fastmst.cli import common, forests
from fastmst.cli.common import (CAUTION, EXIT_NOT_MINIMUM, EXIT_OK, UsageError, fmt_num,
                                plural, yes)

EPILOG = """examples:
  fastmst check links.csv forest.csv
  fastmst check links.csv design.csv --json      # exit code 3 when not minimum
  fastmst check links.csv design.csv --link-id link_id --required must.csv --excluded banned.csv
  fastmst check links.csv design.csv --swaps-output swaps.csv
"""


def add_parser(sub):
    p = sub.add_parser("check", help="is a given forest minimum? ranks profitable swaps",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Check a forest against its graph with the cycle condition, "
                                   "under the same required/excluded links it was designed "
                                   "with; rank the profitable swaps by saving, one per link "
                                   "removed (exit code 3 if not minimum).")
    common.add_input_options(p, forest_file=True)
    g = p.add_argument_group("design")
    g.add_argument("--maximize", action="store_true", help="check a maximum spanning forest")
    common.add_constraint_options(g)
    g.add_argument("--limit", type=int, default=20, metavar="N",
                   help="swaps listed on screen (default 20; --json and --swaps-output list "
                        "all)")
    g.add_argument("--swaps-output", metavar="FILE",
                   help="write the ranked swaps (CSV, TSV, Parquet): the link to add, the link "
                        "to remove, the saving")
    common.add_output_options(p, outputs=False)
    p.set_defaults(run=run)


def run(args) -> int:
    if args.limit < 0:
        raise UsageError(f"--limit {args.limit}: expected 0 or more swaps to list.")
    common.check_not_inputs(args)
    if args.swaps_output:
        try:
            io.detect_format(args.swaps_output, None, valid=io.registry.names("write_table"),
                             func="fastmst")
        except ValueError as exc:
            raise UsageError(f"--swaps-output {args.swaps_output}: {exc}") from None
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        constraints, links = common.read_constraints(args, edges, rep)
        with rep.phase("reading forest"):
            pos = forests.read_forest(args.forest, edges, "FOREST")
        with rep.phase("checking"):
            res = fastmst.check_forest(edges.tail, edges.head, edges.weight, pos,
                                       n_nodes=edges.n_nodes, maximize=args.maximize,
                                       **constraints)
        add, remove, saving = res.best_swaps()
        swaps = [{"add": common.edge_json(edges, a), "remove": common.edge_json(edges, b),
                  "saving": common.derived(s)}
                 for a, b, s in zip(add.tolist(), remove.tolist(), saving.tolist())]
        if edges.link_id is not None:
            ids = edges.attributes.column(edges.link_id)
            for s in swaps:
                s["add"][edges.link_id] = ids[s["add"]["position"]].as_py()
                s["remove"][edges.link_id] = ids[s["remove"]["position"]].as_py()
        if args.swaps_output:
            with io.StagedOutputs() as staged:
                with rep.phase("writing"):
                    io.write_table(staged.path(args.swaps_output), _swap_table(swaps),
                                   spreadsheet_safe=getattr(args, "spreadsheet_safe", False))
                staged.commit()
    excess = float(res.excess)  # how much worse than the optimum, >= 0
    out = {"source": edges.source, "forest": args.forest, "forest_edges": int(pos.size),
           "is_forest": bool(res.is_forest), "is_spanning": bool(res.is_spanning),
           "is_minimum": bool(res.is_minimum), "excess": common.derived(excess),
           "missing_required": [common.edge_json(edges, p) for p in res.missing_required],
           "used_excluded": [common.edge_json(edges, p) for p in res.used_excluded],
           "profitable_swaps": int(res.violations.size), "links_to_swap_out": len(swaps),
           **forests.faults_json(edges, res),
           "swaps": swaps, "seconds": common.seconds(rep.times), "caution": CAUTION}
    if links:
        out["links"] = links
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        kind = "maximum" if args.maximize else "minimum"
        under = " under the constraints" if constraints else ""
        rows = [("forest edges", fmt_num(pos.size)), ("is a forest", yes(res.is_forest)),
                ("spans every component", yes(res.is_spanning))]
        if constraints:
            rows += [("keeps every required link", yes(res.missing_required.size == 0)),
                     ("uses no excluded link", yes(res.used_excluded.size == 0))]
        rows += forests.faults(edges, res)
        rows += [(f"is {kind}{under}", yes(res.is_minimum)),
                 ("excess over the optimum",
                  fmt_num(excess) if excess == excess else
                  "not defined: not a spanning forest that keeps the constraints"),
                 ("profitable swaps", f"{plural(res.violations.size, 'swap')}; "
                                      f"{plural(len(swaps), 'forest link')} to swap out, "
                                      f"ranked by saving")]
        rows += common.constraint_rows(links)
        common.print_block(f"fastmst check: {args.forest} against {edges.source}", rows)
        for p in res.missing_required[:args.limit].tolist():
            e = common.edge_json(edges, p)
            print(f"  missing required link: {e['tail']} -- {e['head']} (position {p})")
        for p in res.used_excluded[:args.limit].tolist():
            e = common.edge_json(edges, p)
            print(f"  uses excluded link: {e['tail']} -- {e['head']} (position {p})")
        for s in swaps[:args.limit]:
            a, r = s["add"], s["remove"]
            print(f"  save {fmt_num(s['saving'])}: remove {_name(r, edges)}, add "
                  f"{_name(a, edges)}")
        if len(swaps) > args.limit:
            print(f"  ... {plural(len(swaps) - args.limit, 'more swap')} (see --json or "
                  f"--swaps-output)")
    common.print_caution(args)
    return EXIT_OK if res.is_minimum and res.is_forest and res.is_spanning else EXIT_NOT_MINIMUM


def _name(e, edges) -> str:
    """A link for the screen: its id when there is one, its sites, weight and position."""
    ident = f"{e[edges.link_id]} " if edges.link_id is not None else ""
    return (f"{ident}{e['tail']} -- {e['head']} (weight {fmt_num(e['weight'])}, position "
            f"{e['position']})")


def _swap_table(swaps):
    """The ranked swaps as a table: rank, saving, then add_* and remove_* columns."""
    import pyarrow as pa
    cols = {"rank": list(range(1, len(swaps) + 1)), "saving": [s["saving"] for s in swaps]}
    keys = list(swaps[0]["add"]) if swaps else ["tail", "head", "weight", "position"]
    for side in ("remove", "add"):
        for k in keys:
            cols[f"{side}_{k}"] = [s[side][k] for s in swaps]
    return pa.table(cols)
