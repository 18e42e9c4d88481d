"""``fastmst solve``: read an edge list, solve its minimum (or maximum) spanning forest, print a
summary, write the forest and optionally a map."""
from __future__ import annotations

import argparse
import json
import sys

import fastmst
from fastmst import io
from fastmst.cli import common, summaries
from fastmst.cli.common import CAUTION, EXIT_OK, fmt_num, jsonable
from fastmst.plot import plot_forest

EPILOG = """examples:
  fastmst solve links.csv -o forest.csv
  fastmst solve links.csv --nodes sites.csv -o forest.csv -o forest.geojson --plot forest.png
  fastmst solve roads.gr -o forest.parquet --json
  fastmst solve links.gpkg --layer links --snap-tolerance 0.5 -o plan.gpkg --plot plan.png
  fastmst solve links.csv --tail from --head to --weight cost --maximize -o best.csv
  fastmst solve links.csv --nodes sites.csv --weight length -o forest.csv
"""


def add_parser(sub):
    p = sub.add_parser("solve", help="minimum spanning forest of a file", epilog=EPILOG,
                       formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Read an edge list, compute its minimum (or maximum) spanning "
                                   "forest, print a summary and write the forest.")
    common.add_input_options(p)
    common.add_solver_options(p)
    common.add_output_options(p, layers=True)
    summaries.add_summary_options(p.add_argument_group("summaries"))
    p.set_defaults(run=run)


def run(args) -> int:
    common.check_outputs(args)
    summaries.check_summary_options(args)
    threads = common.threads_option(args)
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        common.check_coordinates(args, edges.coords is not None)
        common.check_geojson_coordinates(args, edges)
        kwargs = dict(method=args.method, maximize=args.maximize, threads=threads)
        constraints, links = common.read_constraints(args, edges, rep)
        kwargs.update(constraints)
        with rep.phase("solving"):
            forest = fastmst.minimum_spanning_forest(edges.tail, edges.head, edges.weight,
                                                     edges.n_nodes, **kwargs)
        summary = _summary(args, edges, forest, rep)
        if links:
            summary["links"] = links
        groups = None
        if args.group_by:
            sums = [c.strip() for c in args.sum.split(",")] if args.sum else []
            groups = summaries.group_sums(io.forest_table(forest, edges), args.group_by, sums,
                                          _weight_name(edges))
            summary["groups"] = groups
        lost_table, lost = summaries.unconnected(edges, forest)
        summary["unconnected"] = lost
        # outputs under temporary names, renamed onto their targets only when all succeeded
        with io.StagedOutputs() as staged:
            with rep.phase("writing"):
                for out in args.output:
                    io.write_forest(staged.path(out), forest, edges,
                                    spreadsheet_safe=args.spreadsheet_safe)
                if args.unconnected:
                    io.write_table(staged.path(args.unconnected), lost_table if lost_table
                                   is not None else io.node_table(edges).slice(0, 0),
                                   spreadsheet_safe=args.spreadsheet_safe)
            if args.plot:
                with rep.phase("plotting"):
                    plot_forest(staged.path(args.plot), edges, forest,
                                subtitle=f"{edges.source}: {len(forest):,} of "
                                         f"{edges.n_edges:,} edges, total weight "
                                         f"{fmt_num(forest.weight)}")
            staged.commit()
    summary["seconds"] = common.seconds(rep.times)
    if args.json:
        print(json.dumps(summary, indent=2))
    elif not args.quiet:
        rows = []
        note = common.guessed_note(edges)
        if note:
            rows.append(("columns", note))
        if common.layer_note(edges):
            rows.append(("layer", common.layer_note(edges)))
        rows += [("nodes", fmt_num(edges.n_nodes)), ("edges", fmt_num(edges.n_edges)),
                ("components", fmt_num(forest.n_components)),
                ("forest edges", fmt_num(len(forest))),
                ("total weight", fmt_num(forest.weight))]
        if len(forest):
            i = len(forest) - 1
            a, b = edges.label([forest.tail[i], forest.head[i]]).tolist()
            rows.append(("lightest edge" if forest.maximize else "heaviest edge",
                         f"{a} -- {b}, weight {fmt_num(forest.weights[i])} (edge position "
                         f"{forest.edges[i]})"))
        rows.append(summaries.unconnected_row(lost))
        rows += common.constraint_rows(links)
        if "requirement_cost" in summary:
            rows.append(("requirement cost", fmt_num(summary["requirement_cost"])))
        rows += [("method", forest.method), ("time", common.times_text(rep.times))]
        if summary["written"]:
            rows.append(("wrote", ", ".join(summary["written"])))
        common.print_block(f"fastmst solve: {edges.source}", rows)
        for line in summaries.group_lines(groups or [], args.group_by, _weight_name(edges)):
            print(line)
    if not args.json:
        print(CAUTION, file=sys.stdout if not args.quiet else sys.stderr)
    return EXIT_OK


def _summary(args, edges, forest, rep) -> dict:
    heaviest = None
    if len(forest):
        # forest edges are in tie-rule order, so the last one is the heaviest (the lightest of
        # a maximum forest)
        i = len(forest) - 1
        a, b = edges.label([forest.tail[i], forest.head[i]]).tolist()
        heaviest = {"tail": jsonable(a), "head": jsonable(b),
                    "weight": jsonable(forest.weights[i]), "position": int(forest.edges[i])}
    d = {"source": edges.source, "nodes": edges.n_nodes, "edges": edges.n_edges,
         "components": forest.n_components, "forest_edges": len(forest),
         "total_weight": common.derived(forest.weight), "maximize": forest.maximize,
         "method": forest.method, "heaviest_edge" if not forest.maximize else "lightest_edge":
         heaviest, "seconds": common.seconds(rep.times)}
    if args.required:
        d["requirement_cost"] = common.derived(forest.required_excess)
    d["written"] = list(args.output) + ([args.plot] if args.plot else []) + \
        ([args.unconnected] if args.unconnected else [])
    d["caution"] = CAUTION
    return d


def _weight_name(edges) -> str:
    """The weight column's name in the forest table (as ``io.forest_table`` names it)."""
    t, h, w = edges.columns
    return "weight" if w in (t, h) else w
