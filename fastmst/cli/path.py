"""``fastmst path``: the route between two sites in the design, its links, its total and its
costliest link."""
from __future__ import annotations

import argparse
import json

from fastmst import io
from fastmst.cli import common
from fastmst.cli.common import CAUTION, EXIT_OK, derived, fmt_num, plural

EPILOG = """examples:
  fastmst path links.csv S00012 S04711
  fastmst path links.csv S00012 S04711 --link-id link_id --required must.csv -o route.csv
"""


def add_parser(sub):
    p = sub.add_parser("path", help="route between two sites in the design, costliest link",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Solve the design (under --required/--excluded) and list "
                                   "the links joining two sites in it, in order, with their "
                                   "total and the costliest link on the way (the minimax "
                                   "value between the two sites when nothing is required).")
    common.add_input_options(p)
    p.add_argument("site_a", metavar="FROM", help="a site name, as written in the files")
    p.add_argument("site_b", metavar="TO", help="another site name")
    g = p.add_argument_group("design")
    g.add_argument("--maximize", action="store_true", help="maximum spanning forest")
    common.add_constraint_options(g)
    common.add_output_options(p, plot=False)
    p.set_defaults(run=run)


def run(args) -> int:
    if args.plot:   # before the output checks, which would ask for --nodes first
        raise common.UsageError("--plot: path draws no map; use 'fastmst solve --plot'.")
    common.check_outputs(args, geojson=False)
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        a = common.node_id(edges, args.site_a, "FROM")
        b = common.node_id(edges, args.site_b, "TO")
        forest, links = common.solve_design(args, edges, rep)
        route = forest.path(a, b)
        if route is not None and args.output:
            with io.StagedOutputs() as staged:
                with rep.phase("writing"):
                    for out in args.output:
                        io.write_table(staged.path(out), io.edge_table(edges, route),
                                       spreadsheet_safe=args.spreadsheet_safe)
                staged.commit()
    out = {"source": edges.source, "from": args.site_a, "to": args.site_b,
           "connected": route is not None, "caution": CAUTION}
    if route is not None:
        hops = [common.link_json(edges, p) for p in route.tolist()]
        out["links"] = hops
        out["total_weight"] = derived(sum(float(edges.weight[p]) for p in route.tolist()))
        if hops:
            _, pos = forest.bottleneck(a, b)
            out["costliest_link" if not forest.maximize else "cheapest_link"] = \
                common.link_json(edges, int(pos))
        out["written"] = list(args.output)
    if links:
        out["links_named"] = links
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        title = f"fastmst path: {args.site_a} to {args.site_b} in {edges.source}"
        if route is None:
            common.print_block(title, [("connected", "NO: the two sites are in different "
                                                     "parts of the network")])
        else:
            rows = [("links", plural(len(route), "link")),
                    ("total weight", fmt_num(out["total_weight"]))]
            key = "costliest_link" if not forest.maximize else "cheapest_link"
            if key in out:
                rows.append((key.replace("_", " "), common.link_text(out[key], edges)))
            rows += common.constraint_rows(links)
            if args.output:
                rows.append(("wrote", ", ".join(args.output)))
            common.print_block(title, rows)
            for i, d in enumerate(out["links"], 1):
                print(f"  {i:>4}. {common.link_text(d, edges)}")
    common.print_caution(args)
    return EXIT_OK
