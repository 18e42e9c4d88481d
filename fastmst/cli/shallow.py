"""``fastmst shallow``: a tree from a central site in which every site's route is at most
alpha times its shortest path, weighing little more than the minimum spanning tree."""
from __future__ import annotations

import argparse

import numpy as np

from fastmst.cli import common, design_options
from fastmst.cli.common import UsageError, fmt_num
from fastmst.design import light_shallow_tree

EPILOG = """examples:
  fastmst shallow links.csv --root CO --alpha 1.5 -o shallow.csv
  fastmst shallow links.csv --nodes sites.csv --root CO --alpha 2 --plot shallow.png
"""


def add_parser(sub):
    p = sub.add_parser("shallow", help="tree with routes within alpha x the shortest path",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="A light approximate shortest-path tree (Khuller, "
                                   "Raghavachari and Young 1995): every site's route to the "
                                   "root at most --alpha times its shortest path, total weight "
                                   "at most 1 + 2/(alpha - 1) times the minimum spanning tree.")
    common.add_input_options(p)
    design_options.add_design_options(p, root="required", design=False)
    g = p.add_argument_group("route limit")
    g.add_argument("--alpha", type=float, default=2.0, metavar="A",
                   help="allowed stretch, > 1 (default 2)")
    common.add_output_options(p)
    p.set_defaults(run=run)


def run(args) -> int:
    design_options.check_outputs(args)
    if args.required:
        raise UsageError("--required does not apply to shallow trees; use --excluded to "
                         "forbid links.")
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        _, excluded, _ = design_options.read_links(args, edges, rep)
        root = design_options.find_node(edges, args.root, "--root")
        with rep.phase("building the tree"):
            r = light_shallow_tree(edges.tail, edges.head, edges.weight, root,
                                   alpha=args.alpha, n_nodes=edges.n_nodes, excluded=excluded)
        # every link's far end from the root: its route length and stretch
        far = np.where(r.parent[edges.tail[r.position]] == edges.head[r.position],
                       edges.tail[r.position], edges.head[r.position])
        table = design_options.link_table(edges, r.position, r.reason,
                                          route=r.distance[far], shortest=r.shortest[far],
                                          stretch=r.stretch[far])
        design_options.write_outputs(
            args, edges, table, r.position, r.reason, rep, title="Light shallow tree",
            subtitle=f"{edges.source}: alpha {r.alpha:g}, weight "
                     f"{r.weight / r.mst_weight if r.mst_weight else 1:.3f} x MST, "
                     f"shortcuts green")
    s = r.stretch
    worst = float(np.nanmax(s)) if np.isfinite(s).any() else 1.0
    summary = {"source": edges.source, "nodes": edges.n_nodes, "edges": edges.n_edges,
               "root": args.root, "alpha": r.alpha, "links": len(r), "weight": r.weight,
               "mst_weight": r.mst_weight,
               "shortcuts": int(np.count_nonzero(r.reason == "shortcut")),
               "worst_stretch": worst, "unreached": r.unreached}
    rows = [("sites", fmt_num(edges.n_nodes)), ("links", fmt_num(len(r))),
            ("total weight", fmt_num(r.weight)), ("MST weight", fmt_num(r.mst_weight)),
            ("shortcut links", fmt_num(summary["shortcuts"])),
            ("worst stretch", f"{worst:.4f} (limit {r.alpha:g})"),
            ("unreached sites", fmt_num(r.unreached))]
    return design_options.finish(args, f"fastmst shallow: {edges.source}", rows, summary, rep)
