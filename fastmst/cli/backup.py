"""``fastmst backup``: the cheapest extra links that keep a tree design connected after any
single link failure (2-approximation with a certified lower bound, or exact for small
instances), and the design links that stay single points of failure."""
from __future__ import annotations

import argparse

import numpy as np

from fastmst.cli import common, design_options
from fastmst.cli.common import fmt_num
from fastmst.design import backup_links

EPILOG = """examples:
  fastmst backup links.csv -o design.csv
  fastmst backup links.csv --design forest.csv --exact -o design.parquet
  fastmst backup links.csv --nodes sites.csv --plot backup.png
"""


def add_parser(sub):
    p = sub.add_parser("backup", help="cheapest backup links so one failure cuts off no site",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Choose extra links so that the design (default: the "
                                   "minimum spanning forest) stays connected after any single "
                                   "link failure: the 2-approximation of Frederickson and JaJa "
                                   "(1981) with a certified lower bound, or --exact for small "
                                   "instances.")
    common.add_input_options(p)
    design_options.add_design_options(p, root=None, design=True)
    g = p.add_argument_group("backup")
    g.add_argument("--exact", action="store_true",
                   help="the optimum by integer programming (small instances only)")
    g.add_argument("--no-bound", dest="bound", action="store_false",
                   help="skip the LP lower bound (its solve grows with the candidates' path "
                        "lengths; leave it out for hundreds of thousands of sites)")
    common.add_output_options(p)
    p.set_defaults(run=run)


def run(args) -> int:
    design_options.check_outputs(args)
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        required, excluded, design = design_options.read_links(args, edges, rep)
        design = design_options.design_or_forest(edges, required, excluded, design, rep)
        with rep.phase("choosing backup links"):
            r = backup_links(edges.tail, edges.head, edges.weight, design,
                             n_nodes=edges.n_nodes, excluded=excluded, exact=args.exact,
                             lower_bound=args.bound)
        single = np.isin(r.forest, r.single_points)
        pos = np.concatenate([r.forest, r.position])
        why = np.concatenate([np.where(single, "single point", "tree"),
                              np.full(len(r), "backup")])
        table = design_options.link_table(
            edges, pos, np.where(why == "single point", "tree", why),
            single_point=np.concatenate([single, np.zeros(len(r), dtype=bool)]))
        design_options.write_outputs(
            args, edges, table, pos, why, rep, title="Backup links",
            subtitle=f"{edges.source}: {r.forest.size:,} design links, {len(r):,} backup "
                     f"links (red), {r.single_points.size:,} single points (black)")
    design_w = float(edges.weight[r.forest].astype(np.float64).sum()) if r.forest.size else 0.0
    summary = {"source": edges.source, "nodes": edges.n_nodes, "edges": edges.n_edges,
               "design_links": int(r.forest.size), "design_weight": design_w,
               "backup_links": len(r), "backup_weight": r.weight,
               "lower_bound": r.lower_bound, "optimal": r.optimal, "method": r.method,
               "single_points": int(r.single_points.size)}
    rows = [("nodes", fmt_num(edges.n_nodes)), ("design links", fmt_num(r.forest.size)),
            ("design weight", fmt_num(design_w)), ("backup links", fmt_num(len(r))),
            ("backup weight", fmt_num(r.weight) + (" (optimal)" if r.optimal else ""))]
    if r.lower_bound is not None:
        ratio = r.weight / r.lower_bound if r.lower_bound > 0 else float("nan")
        rows.append(("lower bound", f"{fmt_num(r.lower_bound)} (within {ratio:.3f} x of it)"
                     if r.lower_bound > 0 else fmt_num(r.lower_bound)))
    rows += [("method", r.method),
             ("single points", f"{fmt_num(r.single_points.size)} design links no candidate "
                               f"can back up")]
    return design_options.finish(args, f"fastmst backup: {edges.source}", rows, summary, rep)
