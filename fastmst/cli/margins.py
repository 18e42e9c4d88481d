"""``fastmst margins``: how far each link's cost may move before the design changes, the
bridges (links with no alternative route at any cost) and the nearly tied cost choices."""
from __future__ import annotations

import argparse
import json

import numpy as np

import fastmst
from fastmst import io
from fastmst.cli import common
from fastmst.cli.common import CAUTION, EXIT_OK, UsageError, derived, fmt_num, plural

EPILOG = """examples:
  fastmst margins links.csv --limit 10
  fastmst margins links.csv --link-id link_id --required must.csv -o margins.csv
  fastmst margins links.csv --nodes sites.csv --weight length --json
"""


def add_parser(sub):
    p = sub.add_parser("margins", help="cost margins, bridges and nearly tied cost choices",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Solve the design (under --required/--excluded), then give "
                                   "every link its cost margin: how far a chosen link's cost "
                                   "may rise, or an unchosen link's cost must fall, before the "
                                   "design changes (Tarjan 1982). Lists the nearly tied cost "
                                   "choices (smallest margins relative to cost) and counts the "
                                   "bridges, chosen links with no alternative at any cost.")
    common.add_input_options(p)
    g = p.add_argument_group("design")
    g.add_argument("--maximize", action="store_true", help="maximum spanning forest")
    common.add_constraint_options(g)
    g.add_argument("--limit", type=int, default=10, metavar="N",
                   help="nearly tied cost choices listed (default 10; -o and --json list "
                        "every link)")
    common.add_output_options(p, plot=False)
    p.set_defaults(run=run)


def run(args) -> int:
    if args.limit < 0:
        raise UsageError(f"--limit {args.limit}: expected 0 or more links to list.")
    if args.plot:   # before the output checks, which would ask for --nodes first
        raise UsageError("--plot: margins draws no map; use 'fastmst solve --plot'.")
    common.check_outputs(args, geojson=False)
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        forest, links = common.solve_design(args, edges, rep)
        with rep.phase("margins"):
            margin, partner = fastmst.sensitivity(edges.tail, edges.head, edges.weight, forest,
                                                  return_partner=True)
        in_forest = np.zeros(edges.n_edges, dtype=bool)
        in_forest[forest.edges] = True
        required = np.zeros(edges.n_edges, dtype=bool)
        required[forest.required] = True
        excluded = np.zeros(edges.n_edges, dtype=bool)
        excluded[forest.excluded] = True
        w = np.asarray(edges.weight, dtype=np.float64)
        with np.errstate(divide="ignore", invalid="ignore"):
            rel = np.where(w != 0, margin / np.abs(w), np.inf)
        bridge = in_forest & np.isinf(margin) & ~required
        table = _table(edges, margin, rel, partner, in_forest, bridge, required, excluded)
        with io.StagedOutputs() as staged:
            with rep.phase("writing"):
                for out in args.output:
                    io.write_table(staged.path(out), table,
                                   spreadsheet_safe=args.spreadsheet_safe)
            staged.commit()
    chosen = forest.edges[np.isfinite(rel[forest.edges])]
    near = chosen[np.lexsort((chosen, rel[chosen]))][:args.limit] if chosen.size else chosen
    ties = []
    for p in near.tolist():
        d = common.link_json(edges, p)
        d.update(margin=derived(margin[p]), margin_percent=derived(100 * rel[p]))
        if partner[p] >= 0:
            d["alternative"] = common.link_json(edges, int(partner[p]))
        ties.append(d)
    out = {"source": edges.source, "links": edges.n_edges, "forest_links": len(forest),
           "bridges": int(bridge.sum()), "required_links": int(required.sum()),
           "excluded_links": int(excluded.sum()),
           "nearly_tied_cost_choices": ties, "written": list(args.output),
           "seconds": common.seconds(rep.times), "caution": CAUTION}
    if links:
        out["links_named"] = links
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        rows = [("links", fmt_num(edges.n_edges)), ("chosen links", fmt_num(len(forest))),
                ("bridges", f"{plural(out['bridges'], 'chosen link')} with no alternative "
                            f"route at any cost")]
        rows += common.constraint_rows(links)
        rows.append(("time", common.times_text(rep.times)))
        if args.output:
            rows.append(("wrote", ", ".join(args.output)))
        common.print_block(f"fastmst margins: {edges.source}", rows)
        if ties:
            print("  nearly tied cost choices (smallest cost rise, in percent, that changes "
                  "the design):")
            for d in ties:
                alt = d.get("alternative")
                print(f"    {common.link_text(d, edges)} may rise {fmt_num(d['margin'])} "
                      f"({d['margin_percent']:.3g} %)" +
                      (f"; then {common.link_text(alt, edges)} takes its place" if alt else ""))
    common.print_caution(args)
    return EXIT_OK


def _table(edges, margin, rel, partner, in_forest, bridge, required, excluded):
    """Every link: tail, head, weight, position, the carried columns, then chosen, margin,
    margin_percent, alternative (position of the link it would swap with, -1 for none),
    bridge, required, excluded."""
    import pyarrow as pa
    t = io.edge_table(edges)
    for name, col in (("chosen", in_forest), ("margin", common.derived_array(margin)),
                      ("margin_percent", common.derived_array(
                          np.where(np.isfinite(rel), 100 * rel, np.inf))),
                      ("alternative", partner), ("bridge", bridge), ("required", required),
                      ("excluded", excluded)):
        if name in t.column_names:
            name = f"{name}_computed"
        t = t.append_column(name, pa.array(col))
    return t
