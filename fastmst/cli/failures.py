"""``fastmst failures``: for every link of a tree design, what its failure costs: the cheapest
replacement link and the cost increase, or that it is a bridge and the sites it cuts off."""
from __future__ import annotations

import argparse

import numpy as np

from fastmst.cli import common, design_options
from fastmst.cli.common import fmt_num
from fastmst.design import link_failures

EPILOG = """examples:
  fastmst failures links.csv -o failures.csv
  fastmst failures links.csv --root CO --design forest.csv -o failures.parquet
  fastmst failures links.csv --nodes sites.csv --root CO --plot failures.png
"""


def add_parser(sub):
    p = sub.add_parser("failures", help="single-link failure analysis of a tree design",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="For every link of the design (default: the minimum spanning "
                                   "forest): the cheapest replacement link and the cost increase "
                                   "if it fails, or that no link can replace it and how many "
                                   "sites it cuts off.")
    common.add_input_options(p)
    design_options.add_design_options(p, root="optional", design=True)
    common.add_output_options(p)
    p.set_defaults(run=run)


def run(args) -> int:
    design_options.check_outputs(args)
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        required, excluded, design = design_options.read_links(args, edges, rep)
        root = design_options.find_node(edges, args.root, "--root") if args.root else None
        design = design_options.design_or_forest(edges, required, excluded, design, rep)
        with rep.phase("failure analysis"):
            r = link_failures(edges.tail, edges.head, edges.weight, design,
                              n_nodes=edges.n_nodes, root=root, excluded=excluded)
        rt = np.where(r.bridge, -1, edges.tail[np.maximum(r.replacement, 0)])
        rh = np.where(r.bridge, -1, edges.head[np.maximum(r.replacement, 0)])
        why = np.where(r.bridge, "single point", "tree")
        table = design_options.link_table(
            edges, r.position, np.full(len(r), "tree"), bridge=r.bridge,
            sites_cut_off=r.sites_cut_off, sites_beyond=r.sites_beyond,
            replacement_position=r.replacement,
            replacement_tail=design_options.nullable_labels(edges, rt),
            replacement_head=design_options.nullable_labels(edges, rh),
            cost_increase=r.cost_increase)
        design_options.write_outputs(
            args, edges, table, r.position, why, rep, title="Single-link failures",
            subtitle=f"{edges.source}: {len(r):,} links, {r.n_bridges:,} without a "
                     f"replacement (black)")
    worst = int(np.argmax(r.sites_cut_off)) if len(r) else -1
    finite = np.flatnonzero(~r.bridge)
    dearest = int(finite[np.argmax(r.cost_increase[finite])]) if finite.size else -1
    summary = {"source": edges.source, "nodes": edges.n_nodes, "edges": edges.n_edges,
               "design_links": len(r), "bridges": r.n_bridges,
               "sites_cut_off_total": int(r.sites_cut_off.sum()),
               "root": args.root}
    rows = [("nodes", fmt_num(edges.n_nodes)), ("edges", fmt_num(edges.n_edges)),
            ("design links", fmt_num(len(r))),
            ("without replacement", fmt_num(r.n_bridges))]
    if worst >= 0 and r.sites_cut_off[worst] > 0:
        e = common.edge_json(edges, r.position[worst])
        summary["worst_bridge"] = dict(e, sites_cut_off=int(r.sites_cut_off[worst]))
        rows.append(("worst bridge", f"{e['tail']} -- {e['head']} cuts off "
                                     f"{fmt_num(int(r.sites_cut_off[worst]))} sites"))
    if dearest >= 0:
        e = common.edge_json(edges, r.position[dearest])
        summary["dearest_failure"] = dict(e, cost_increase=float(r.cost_increase[dearest]),
                                          replacement=int(r.replacement[dearest]))
        rows.append(("dearest repair", f"{e['tail']} -- {e['head']}: +"
                                       f"{fmt_num(float(r.cost_increase[dearest]))}"))
    return design_options.finish(args, f"fastmst failures: {edges.source}", rows, summary, rep)
