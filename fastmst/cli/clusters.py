"""``fastmst clusters``: single-linkage clusters of a graph's nodes, cut from its minimum
spanning forest (the k-1 heaviest edges, or every edge above a threshold)."""
from __future__ import annotations

import argparse
import json

import numpy as np

import fastmst
from fastmst import io
from fastmst.cli import common
from fastmst.cli.common import CAUTION, EXIT_OK, UsageError, fmt_num
from fastmst.plot import plot_forest

EPILOG = """examples:
  fastmst clusters sensors.csv -k 5 -o clusters.csv
  fastmst clusters sensors.csv --threshold 250 -o clusters.parquet
  fastmst clusters links.csv -k 8 --required must.csv -o clusters.csv   # never cut must.csv
"""


def add_parser(sub):
    p = sub.add_parser("clusters", help="single-linkage clusters: k clusters or a threshold",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Cut the minimum spanning forest into clusters (single "
                                   "linkage): the k-1 heaviest edges, or every edge above a "
                                   "threshold.")
    common.add_input_options(p)
    cut = p.add_mutually_exclusive_group(required=True)
    cut.add_argument("-k", type=int, metavar="K", help="number of clusters")
    cut.add_argument("--threshold", type=float, metavar="W",
                     help="cut every forest edge heavier than W")
    common.add_constraint_options(p.add_argument_group("links (required links are never cut)"))
    common.add_output_options(p, layers=True)
    p.set_defaults(run=run)


def run(args) -> int:
    common.check_outputs(args, geojson=False, layers=True)
    if args.k is not None and args.k < 1:
        raise UsageError(f"-k {args.k}: the number of clusters must be at least 1.")
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        common.check_coordinates(args, edges.coords is not None)
        common.check_geojson_coordinates(args, edges)
        constraints, links = common.read_constraints(args, edges, rep)
        with rep.phase("solving"):
            forest = fastmst.minimum_spanning_forest(edges.tail, edges.head, edges.weight,
                                                     edges.n_nodes, **constraints)
        with rep.phase("clustering"):
            try:
                labels = np.asarray(forest.clusters(k=args.k, threshold=args.threshold))
            except ValueError as exc:   # said in the command's terms, not the API's
                opt = f"-k {args.k}" if args.k is not None else f"--threshold {args.threshold}"
                raise ValueError(f"{opt}: {str(exc).split(': ', 1)[-1]}") from None
        table = io.node_table(edges, cluster=labels.astype(np.int64))
        # outputs under temporary names, renamed onto their targets only when all succeeded
        with io.StagedOutputs() as staged:
            with rep.phase("writing"):
                for out in args.output:
                    fmt = io.detect_format(out, None, valid=io.WRITE_FORMATS)[0]
                    if fmt == "gpkg":   # forest, sites and clusters layers
                        io.write_geopackage(staged.path(out), forest, edges, clusters=labels)
                        continue
                    if fmt == "geojson":   # links and sites with their cluster numbers
                        io.write_geojson(staged.path(out), forest, edges, clusters=labels)
                        continue
                    io.write_table(staged.path(out), table,
                                   spreadsheet_safe=args.spreadsheet_safe)
            if args.plot:
                n_clusters = int(labels.max()) + 1 if labels.size else 0
                with rep.phase("plotting"):
                    plot_forest(staged.path(args.plot), edges, forest, clusters=labels,
                                title="Single-linkage clusters",
                                subtitle=f"{edges.source}: {n_clusters:,} clusters (forest edges "
                                         f"coloured by cluster; cut edges black)")
            staged.commit()
    sizes = np.bincount(labels) if labels.size else np.zeros(0, np.int64)
    top = np.argsort(-sizes, kind="stable")[:10]
    out = {"source": edges.source, "nodes": edges.n_nodes, "clusters": int(sizes.size),
           "k": args.k, "threshold": args.threshold,
           "largest": [{"cluster": int(c), "size": int(sizes[c])} for c in top],
           "written": list(args.output) + ([args.plot] if args.plot else []),
           "seconds": common.seconds(rep.times), "caution": CAUTION}
    if links:
        out["links"] = links
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        rows = [("nodes", fmt_num(edges.n_nodes)), ("clusters", fmt_num(sizes.size)),
                ("largest", ", ".join(f"#{c}: {sizes[c]:,}" for c in top)),
                ("time", common.times_text(rep.times))] + common.constraint_rows(links)
        if out["written"]:
            rows.append(("wrote", ", ".join(out["written"])))
        common.print_block(f"fastmst clusters: {edges.source}", rows)
    common.print_caution(args)
    return EXIT_OK

