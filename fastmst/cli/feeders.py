"""``fastmst feeders``: a tree from a central site in which every subtree hanging from it (a
feeder) carries at most a given demand, by the Esau-Williams heuristic."""
from __future__ import annotations

import argparse

import numpy as np

from fastmst.cli import common, design_options
from fastmst.cli.common import UsageError, fmt_num
from fastmst.design import capacitated_tree

EPILOG = """examples:
  fastmst feeders links.csv --root CO --capacity 32 -o feeders.csv
  fastmst feeders links.csv --root CO --capacity 400 --demand demand.csv -o feeders.parquet
  fastmst feeders links.csv --nodes sites.csv --root CO --capacity 32 --plot feeders.png
"""


def add_parser(sub):
    p = sub.add_parser("feeders", help="capacitated tree from a central site (Esau-Williams)",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Connect every site to the root so that each subtree "
                                   "hanging from the root carries at most --capacity of demand "
                                   "(the Esau-Williams heuristic, 1966). Links at the root are "
                                   "the possible feeders.")
    common.add_input_options(p)
    design_options.add_design_options(p, root="required", design=False)
    g = p.add_argument_group("capacity")
    g.add_argument("--capacity", type=float, required=True, metavar="C",
                   help="the most demand one feeder's subtree may carry")
    g.add_argument("--demand", metavar="FILE",
                   help="site demands: node labels and demands (first two columns, or a "
                        "'demand' column), finite and >= 0; a site the file does not list has "
                        "demand 0, a site listed twice the sum. Without it every site has "
                        "demand 1, so --capacity counts sites")
    common.add_output_options(p)
    p.set_defaults(run=run)


def run(args) -> int:
    design_options.check_outputs(args)
    if args.required:
        raise UsageError("--required does not apply to feeders (the tree is built by the "
                         "heuristic); use --excluded to forbid links.")
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        _, excluded, _ = design_options.read_links(args, edges, rep)
        root = design_options.find_node(edges, args.root, "--root")
        demand = None
        if args.demand:
            with rep.phase("reading demands"):
                demand = design_options.read_demand(args.demand, edges)
        with rep.phase("building feeders"):
            r = capacitated_tree(edges.tail, edges.head, edges.weight, root, args.capacity,
                                 demand=demand, n_nodes=edges.n_nodes, excluded=excluded)
        sub = r.subtree[np.where(edges.tail[r.position] == root, edges.head[r.position],
                                 edges.tail[r.position])]
        table = design_options.link_table(edges, r.position, r.reason, subtree=sub,
                                          subtree_load=r.load[sub])
        design_options.write_outputs(
            args, edges, table, r.position, r.reason, rep, title="Capacitated feeders",
            subtitle=f"{edges.source}: {r.load.size:,} feeders (orange) of capacity "
                     f"{fmt_num(r.capacity)}, {r.unserved.size:,} sites unserved")
    summary = {"source": edges.source, "nodes": edges.n_nodes, "edges": edges.n_edges,
               "root": args.root, "capacity": r.capacity, "feeders": int(r.load.size),
               "links": len(r), "weight": r.weight,
               "largest_load": float(r.load.max()) if r.load.size else 0.0,
               "unserved": int(r.unserved.size),
               "unserved_sites": [common.jsonable(x) for x in
                                  edges.label(r.unserved[:20]).tolist()]}
    rows = [("sites", fmt_num(edges.n_nodes - 1)), ("feeders", fmt_num(r.load.size)),
            ("links", fmt_num(len(r))), ("total weight", fmt_num(r.weight)),
            ("largest load", f"{fmt_num(summary['largest_load'])} of {fmt_num(r.capacity)}"),
            ("unserved sites", fmt_num(r.unserved.size))]
    return design_options.finish(args, f"fastmst feeders: {edges.source}", rows, summary, rep)
