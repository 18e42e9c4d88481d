"""The ``fastmst`` command: solve, check, clusters, bench and demo.

Exit codes: 0 success; 1 bad data (unreadable or malformed files, invalid values); 2 bad usage
(unknown options, conflicting or missing arguments, unknown output formats); 3 ``check`` ran and
the given forest is not a minimum spanning forest.  Errors print one message without a traceback;
``--debug`` shows the traceback.
"""
from __future__ import annotations

import argparse
import json
import math
import sys
import time

import numpy as np

CAUTION = ("Caution: a spanning tree has no redundancy - one failed link disconnects every site "
           "beyond it. Designs for utilities or roads need review by licensed engineers under "
           "the local codes.")

EXIT_OK, EXIT_DATA, EXIT_USAGE, EXIT_NOT_MINIMUM = 0, 1, 2, 3


class UsageError(Exception):
    """A command line that cannot work (exit code 2)."""


def _methods():
    from fastmst.solve.solve import METHODS
    return tuple(METHODS)


# --- shared options -----------------------------------------------------------------------------

def _add_input(p, forest_file=False):
    p.add_argument("edges", metavar="EDGES",
                   help="edge-list file: .csv/.tsv (optionally .gz/.zst), .parquet, .npz, .mtx, "
                        ".gr")
    if forest_file:
        p.add_argument("forest", metavar="FOREST",
                       help="the forest to check: a file with a 'position' column (as written by "
                            "'fastmst solve'), or with tail/head label columns")
    g = p.add_argument_group("columns and nodes")
    g.add_argument("--tail", metavar="COLUMN", help="tail column (default: the first column)")
    g.add_argument("--head", metavar="COLUMN", help="head column (default: the second column)")
    g.add_argument("--weight", metavar="COLUMN",
                   help="weight column (default: 'weight', else the third column); 'length' "
                        "with --nodes computes lengths from the coordinates")
    g.add_argument("--format", choices=("csv", "tsv", "parquet", "npz", "mtx", "gr"),
                   help="input format (default: from the file suffix)")
    g.add_argument("--nodes", metavar="FILE",
                   help="node table (CSV/Parquet): id, lon/lat or x/y columns; needed for "
                        "lengths, GeoJSON and --plot")
    g.add_argument("--node-id", metavar="COLUMN", help="node id column (default: 'id', else the "
                                                        "first)")
    g.add_argument("--x", metavar="COLUMN", help="x or longitude column of the node table")
    g.add_argument("--y", metavar="COLUMN", help="y or latitude column of the node table")
    geo = g.add_mutually_exclusive_group()
    geo.add_argument("--geographic", dest="geographic", action="store_const", const=True,
                     help="read --x/--y as longitude/latitude degrees (great-circle metres)")
    geo.add_argument("--planar", dest="geographic", action="store_const", const=False,
                     help="read --x/--y as planar coordinates (Euclidean lengths)")


def _add_solver(p):
    g = p.add_argument_group("solver")
    g.add_argument("--maximize", action="store_true", help="maximum spanning forest")
    g.add_argument("--method", default="auto", choices=_methods(),
                   help="algorithm (default auto); every method gives the same forest")
    g.add_argument("--threads", type=int, metavar="N", help="worker threads (default: all cores)")
    g.add_argument("--required", metavar="FILE",
                   help="links that must be in the forest: a file with a 'position' column or "
                        "tail/head label columns")
    g.add_argument("--excluded", metavar="FILE",
                   help="links that may not be used (every parallel link of a listed pair)")


def _add_output(p, outputs=True):
    g = p.add_argument_group("output")
    if outputs:
        g.add_argument("-o", "--output", action="append", default=[], metavar="OUT",
                       help="write the result; the format follows the suffix (.csv, .tsv, "
                            ".csv.gz, .parquet, .npz, .geojson); repeat for several files")
        g.add_argument("--plot", metavar="FILE.png", help="draw the forest over the nodes")
    g.add_argument("--json", action="store_true", help="print the summary as JSON")
    g.add_argument("--quiet", "-q", action="store_true",
                   help="no progress bars and no summary (errors and the caution still print)")
    g.add_argument("--debug", action="store_true", help="show tracebacks on errors")


EPILOG_SOLVE = """examples:
  fastmst solve links.csv -o forest.csv
  fastmst solve links.csv --nodes sites.csv -o forest.csv -o forest.geojson --plot forest.png
  fastmst solve roads.gr -o forest.parquet --json
  fastmst solve links.csv --tail from --head to --weight cost --maximize -o best.csv
  fastmst solve links.csv --nodes sites.csv --weight length -o forest.csv
"""
EPILOG_CHECK = """examples:
  fastmst check links.csv forest.csv
  fastmst check links.csv design.csv --json      # exit code 3 when not minimum
"""
EPILOG_CLUSTERS = """examples:
  fastmst clusters sensors.csv -k 5 -o clusters.csv
  fastmst clusters sensors.csv --threshold 250 -o clusters.parquet
"""
EPILOG_BENCH = """examples:
  fastmst bench links.csv
  fastmst bench roads.gr --repeat 5 --json > bench.json
"""
EPILOG_DEMO = """examples:
  fastmst demo
  fastmst demo --out /tmp/vale --sites 50000 --seed 7
"""


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="fastmst",
        description="Minimum spanning forests of edge-list files: fast, exact, deterministic.",
        epilog="examples:\n  fastmst demo\n  fastmst solve links.csv -o forest.csv\n"
               "  fastmst solve --help\n\nexit codes: 0 success, 1 bad data, 2 bad usage, "
               "3 check: not minimum",
        formatter_class=argparse.RawDescriptionHelpFormatter)
    from fastmst import __version__
    parser.add_argument("--version", action="version", version=f"fastmst {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    fmt = argparse.RawDescriptionHelpFormatter

    p = sub.add_parser("solve", help="minimum spanning forest of a file", epilog=EPILOG_SOLVE,
                       formatter_class=fmt,
                       description="Read an edge list, compute its minimum (or maximum) spanning "
                                   "forest, print a summary and write the forest.")
    _add_input(p)
    _add_solver(p)
    _add_output(p)
    p.set_defaults(run=cmd_solve)

    p = sub.add_parser("check", help="is a given forest minimum? lists profitable swaps",
                       epilog=EPILOG_CHECK, formatter_class=fmt,
                       description="Check a forest against its graph with the cycle condition; "
                                   "list every profitable swap (exit code 3 if not minimum).")
    _add_input(p, forest_file=True)
    p.add_argument("--maximize", action="store_true", help="check a maximum spanning forest")
    p.add_argument("--limit", type=int, default=20, metavar="N",
                   help="swaps listed on screen (default 20; --json lists all)")
    _add_output(p, outputs=False)
    p.set_defaults(run=cmd_check)

    p = sub.add_parser("clusters", help="single-linkage clusters: k clusters or a threshold",
                       epilog=EPILOG_CLUSTERS, formatter_class=fmt,
                       description="Cut the minimum spanning forest into clusters (single "
                                   "linkage): the k-1 heaviest edges, or every edge above a "
                                   "threshold.")
    _add_input(p)
    cut = p.add_mutually_exclusive_group(required=True)
    cut.add_argument("-k", type=int, metavar="K", help="number of clusters")
    cut.add_argument("--threshold", type=float, metavar="W",
                     help="cut every forest edge heavier than W")
    _add_output(p)
    p.set_defaults(run=cmd_clusters)

    p = sub.add_parser("bench", help="time your file against the SciPy route",
                       epilog=EPILOG_BENCH, formatter_class=fmt,
                       description="Time fastmst on your file side by side with "
                                   "scipy.sparse.csgraph.minimum_spanning_tree and print ratios.")
    _add_input(p)
    p.add_argument("--repeat", type=int, default=3, metavar="N", help="runs each (best counts)")
    p.add_argument("--method", default="auto", choices=_methods(),
                   help="fastmst method (default auto)")
    p.add_argument("--threads", type=int, metavar="N")
    _add_output(p, outputs=False)
    p.set_defaults(run=cmd_bench)

    p = sub.add_parser("demo", help="invented fibre-backbone scenario, solved end to end",
                       epilog=EPILOG_DEMO, formatter_class=fmt,
                       description="Generate an invented rural district (sites, a road network, "
                                   "trench costs by surface), solve its cheapest fibre backbone "
                                   "and write CSV, GeoJSON and a PNG map to an output folder.")
    p.add_argument("--out", default="fastmst-demo-output", metavar="DIR",
                   help="output folder (default ./fastmst-demo-output)")
    p.add_argument("--sites", type=int, default=30_000, metavar="N",
                   help="number of sites (default 30000)")
    p.add_argument("--seed", type=int, default=2024, help="random seed (default 2024)")
    p.add_argument("--no-plot", action="store_true", help="skip the PNG map")
    _add_output(p, outputs=False)
    p.set_defaults(run=cmd_demo)
    return parser


# --- helpers --------------------------------------------------------------------------------------

def _reporter(args):
    from fastmst.cli.progress import Reporter
    return Reporter.for_terminal(args.quiet or args.json)


def _check_outputs(args):
    """Reject unknown output suffixes before any work is done."""
    from fastmst.io import WRITE_FORMATS, detect_format
    for out in getattr(args, "output", []):
        try:
            detect_format(out, None, valid=WRITE_FORMATS, func="fastmst")
        except ValueError as exc:
            raise UsageError(f"-o {out}: {exc}") from None
    plot = getattr(args, "plot", None)
    if plot and not plot.lower().endswith(".png"):
        raise UsageError(f"--plot {plot}: expected a file name ending in .png.")


def _load(args, rep):
    from fastmst import io
    nodes = None
    if args.nodes:
        with rep.phase("reading nodes"):
            nodes = io.read_nodes(args.nodes, id=args.node_id, x=args.x, y=args.y,
                                  geographic=args.geographic)
    elif args.x or args.y or args.node_id:
        raise UsageError("--node-id/--x/--y describe the node table; give it with --nodes FILE.")
    with rep.phase("reading edges") as update:
        edges = io.read_edges(args.edges, tail=args.tail, head=args.head, weight=args.weight,
                              format=args.format, nodes=nodes,
                              progress=update if rep.enabled else None)
    return edges


def _positions_from_file(path, edges, role, pick_all):
    """Edge positions listed in ``path``: a 'position' column, or tail/head label pairs."""
    from fastmst import io
    from fastmst.validation import FileFormatError
    table, source, where = io._load_table(path, None, f"--{role}")
    names = table.column_names
    if "position" in names:
        pos = table.column("position").to_numpy(zero_copy_only=False)
        if pos.dtype.kind not in "iu":
            raise FileFormatError(f"{source}: column 'position' must hold integer edge "
                                  f"positions, found {table.column('position').type}.")
        bad = np.flatnonzero((pos < 0) | (pos >= edges.n_edges))
        if bad.size:
            raise FileFormatError(f"{source}: {where(int(bad[0]))}: position {pos[bad[0]]} is not "
                                  f"an edge of {edges.source} (positions 0..{edges.n_edges - 1}).")
        return pos.astype(np.int64)
    if len(names) < 2:
        raise FileFormatError(f"{source}: expected a 'position' column or two label columns "
                              f"(tail, head); found {', '.join(map(repr, names)) or 'none'}.")
    return _pair_positions(table.column(names[0]), table.column(names[1]), edges, source, where,
                           pick_all)


def _pair_positions(tcol, hcol, edges, source, where, pick_all):
    """Positions of the edges joining listed label pairs (either direction)."""
    import pyarrow as pa
    import pyarrow.compute as pc
    from fastmst.validation import FileFormatError
    n = edges.n_nodes
    if edges.labels is None:
        labels = pa.array(np.arange(n))
    else:
        labels = pa.array(edges.labels.tolist()) if edges.labels.dtype == object else \
            pa.array(edges.labels)
    ids = []
    for col in (tcol, hcol):
        if col.type != labels.type:
            try:
                col = pc.cast(col, labels.type)
            except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
                col = pc.cast(col, pa.string())
                labels = pc.cast(labels, pa.string())
        idx = pc.index_in(col, value_set=labels)
        if idx.null_count:
            i = int(np.flatnonzero(idx.is_null().to_numpy(zero_copy_only=False))[0])
            raise FileFormatError(f"{source}: {where(i)}: node {col[i].as_py()!r} is not a node "
                                  f"of {edges.source}.")
        ids.append(idx.to_numpy(zero_copy_only=False).astype(np.int64))
    a, b = np.minimum(ids[0], ids[1]), np.maximum(ids[0], ids[1])
    et = edges.tail.astype(np.int64)
    eh = edges.head.astype(np.int64)
    ekey = np.minimum(et, eh) * n + np.maximum(et, eh)
    order = np.lexsort((np.arange(edges.n_edges), edges.weight, ekey))
    skey = ekey[order]
    want = a * n + b
    lo = np.searchsorted(skey, want, "left")
    hi = np.searchsorted(skey, want, "right")
    missing = np.flatnonzero(lo == hi)
    if missing.size:
        i = int(missing[0])
        raise FileFormatError(f"{source}: {where(i)}: no edge joins {edges.label([ids[0][i]])[0]!r}"
                              f" and {edges.label([ids[1][i]])[0]!r} in {edges.source}.")
    if not pick_all:
        return order[lo]
    return np.concatenate([order[x:y] for x, y in zip(lo, hi)]) if lo.size else \
        np.empty(0, np.int64)


def _fmt_num(x) -> str:
    if isinstance(x, (int, np.integer)):
        return f"{int(x):,}"
    x = float(x)
    if not math.isfinite(x):
        return str(x)
    if x == int(x) and abs(x) < 1e15:
        return f"{int(x):,}"
    return f"{x:,.6g}" if abs(x) >= 1e6 or abs(x) < 1e-3 else f"{x:,.4f}".rstrip("0")


def _print_block(title, rows, out=sys.stdout):
    width = max((len(k) for k, _ in rows), default=0)
    print(title, file=out)
    for k, v in rows:
        print(f"  {k:<{width}}  {v}", file=out)


def _times_text(times):
    return " | ".join(f"{k} {v:.3f} s" for k, v in times.items())


def _edge_text(edges, forest, i):
    a, b = edges.label([forest.tail[i], forest.head[i]]).tolist()
    return f"{a} -- {b}, weight {_fmt_num(forest.weights[i])} (edge position {forest.edges[i]})"


# --- subcommands -----------------------------------------------------------------------------------

def _solve(args, edges, rep):
    import fastmst
    kwargs = dict(method=args.method, maximize=args.maximize, threads=args.threads)
    if args.required or args.excluded:
        if not _has_required():
            raise UsageError("--required/--excluded need the network-design toolkit, which this "
                             "build of fastmst does not have.")
        with rep.phase("reading links"):
            if args.required:
                kwargs["required"] = _positions_from_file(args.required, edges, "required", False)
            if args.excluded:
                kwargs["excluded"] = _positions_from_file(args.excluded, edges, "excluded", True)
    with rep.phase("solving"):
        return fastmst.minimum_spanning_forest(edges.tail, edges.head, edges.weight,
                                               edges.n_nodes, **kwargs)


def _has_required() -> bool:
    import inspect
    from fastmst.solve.solve import minimum_spanning_forest
    return "required" in inspect.signature(minimum_spanning_forest).parameters


def _summary(edges, forest, rep):
    heaviest = None
    if len(forest):
        # forest edges are in tie-rule order, so the last one is the heaviest (the lightest of
        # a maximum forest)
        i = len(forest) - 1
        a, b = edges.label([forest.tail[i], forest.head[i]]).tolist()
        heaviest = {"tail": _jsonable(a), "head": _jsonable(b),
                    "weight": _jsonable(forest.weights[i]), "position": int(forest.edges[i])}
    d = {"source": edges.source, "nodes": edges.n_nodes, "edges": edges.n_edges,
         "components": forest.n_components, "forest_edges": len(forest),
         "total_weight": _jsonable(forest.weight), "maximize": forest.maximize,
         "method": forest.method, "heaviest_edge" if not forest.maximize else "lightest_edge":
         heaviest, "seconds": {k: round(v, 6) for k, v in rep.times.items()}}
    return d


def _jsonable(x):
    if isinstance(x, np.generic):
        x = x.item()
    if isinstance(x, float) and not math.isfinite(x):
        return str(x)
    return x


def cmd_solve(args):
    _check_outputs(args)
    rep = _reporter(args)
    from fastmst import io
    with rep:
        edges = _load(args, rep)
        if args.plot and edges.coords is None:
            raise UsageError("--plot needs node coordinates: give a node table with --nodes.")
        for out in args.output:
            if out.lower().endswith((".geojson", ".json")) and edges.coords is None:
                raise UsageError(f"-o {out}: GeoJSON needs node coordinates: give a node table "
                                 f"with --nodes.")
        forest = _solve(args, edges, rep)
        with rep.phase("writing"):
            for out in args.output:
                io.write_forest(out, forest, edges)
        if args.plot:
            from fastmst.plot import plot_forest
            with rep.phase("plotting"):
                plot_forest(args.plot, edges, forest,
                            subtitle=f"{edges.source}: {len(forest):,} of {edges.n_edges:,} "
                                     f"edges, total weight {_fmt_num(forest.weight)}")
    summary = _summary(edges, forest, rep)
    if args.required:
        summary["requirement_cost"] = _jsonable(getattr(forest, "required_excess", None))
    summary["written"] = list(args.output) + ([args.plot] if args.plot else [])
    summary["caution"] = CAUTION
    if args.json:
        print(json.dumps(summary, indent=2))
    elif not args.quiet:
        rows = [("nodes", _fmt_num(edges.n_nodes)), ("edges", _fmt_num(edges.n_edges)),
                ("components", _fmt_num(forest.n_components)),
                ("forest edges", _fmt_num(len(forest))),
                ("total weight", _fmt_num(forest.weight))]
        if len(forest):
            i = len(forest) - 1
            rows.append(("lightest edge" if forest.maximize else "heaviest edge",
                         _edge_text(edges, forest, i)))
        if "requirement_cost" in summary:
            rows.append(("requirement cost", _fmt_num(summary["requirement_cost"])))
        rows += [("method", forest.method), ("time", _times_text(rep.times))]
        if summary["written"]:
            rows.append(("wrote", ", ".join(summary["written"])))
        _print_block(f"fastmst solve: {edges.source}", rows)
    if not args.json:
        print(CAUTION, file=sys.stdout if not args.quiet else sys.stderr)
    return EXIT_OK


def _forest_positions(args, edges):
    from fastmst import io
    from fastmst.validation import FileFormatError
    table, source, where = io._load_table(args.forest, None, "check")
    if "position" in table.column_names:
        pos = _positions_from_file(args.forest, edges, "forest", False)
        names = [n for n in table.column_names if n != "position"]
        if len(names) >= 2:  # the endpoints must match the edge file at those positions
            et, eh = edges.tail[pos], edges.head[pos]
            lt = _label_ids(table.column(names[0]), edges)
            lh = _label_ids(table.column(names[1]), edges)
            bad = np.flatnonzero(~(((lt == et) & (lh == eh)) | ((lt == eh) & (lh == et))))
            if bad.size:
                i = int(bad[0])
                raise FileFormatError(f"{source}: {where(i)}: position {pos[i]} is the edge "
                                      f"{edges.label([et[i]])[0]!r} -- {edges.label([eh[i]])[0]!r}"
                                      f" in {edges.source}, not the one listed; was the forest "
                                      f"computed from another edge file?")
        return pos
    return _positions_from_file(args.forest, edges, "forest", False)


def _label_ids(col, edges):
    import pyarrow as pa
    import pyarrow.compute as pc
    labels = pa.array(np.arange(edges.n_nodes)) if edges.labels is None else \
        pa.array(edges.labels.tolist())
    if col.type != labels.type:
        col, labels = pc.cast(col, pa.string()), pc.cast(labels, pa.string())
    idx = pc.index_in(col, value_set=labels)
    return idx.to_numpy(zero_copy_only=False)


def cmd_check(args):
    import fastmst
    rep = _reporter(args)
    with rep:
        edges = _load(args, rep)
        with rep.phase("reading forest"):
            pos = _forest_positions(args, edges)
        with rep.phase("checking"):
            res = fastmst.check_forest(edges.tail, edges.head, edges.weight, pos,
                                       n_nodes=edges.n_nodes, maximize=args.maximize)
    viol = np.asarray(res.violations, dtype=np.int64)
    repl = np.asarray(res.replaces, dtype=np.int64)
    excess = float(res.excess)  # how much worse than the optimum, >= 0

    def edge(p):
        a, b = edges.label([edges.tail[p], edges.head[p]]).tolist()
        return {"tail": _jsonable(a), "head": _jsonable(b),
                "weight": _jsonable(edges.weight[p]), "position": int(p)}
    swaps = [{"add": edge(a), "remove": edge(b)} for a, b in zip(viol.tolist(), repl.tolist())]
    out = {"source": edges.source, "forest": args.forest, "forest_edges": int(pos.size),
           "is_forest": bool(res.is_forest), "is_spanning": bool(res.is_spanning),
           "is_minimum": bool(res.is_minimum), "excess": _jsonable(excess),
           "swaps": swaps, "seconds": {k: round(v, 6) for k, v in rep.times.items()},
           "caution": CAUTION}
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        kind = "maximum" if args.maximize else "minimum"
        rows = [("forest edges", _fmt_num(pos.size)), ("is a forest", _yes(res.is_forest)),
                ("spans every component", _yes(res.is_spanning)),
                (f"is {kind}", _yes(res.is_minimum)),
                ("excess over the optimum", _fmt_num(excess)),
                ("profitable swaps", _fmt_num(len(swaps)))]
        _print_block(f"fastmst check: {args.forest} against {edges.source}", rows)
        for s in swaps[:args.limit]:
            a, r = s["add"], s["remove"]
            print(f"  swap: add {a['tail']} -- {a['head']} (weight {_fmt_num(a['weight'])}, "
                  f"position {a['position']}), remove {r['tail']} -- {r['head']} (weight "
                  f"{_fmt_num(r['weight'])}, position {r['position']})")
        if len(swaps) > args.limit:
            print(f"  ... {len(swaps) - args.limit} more (see --json)")
        print(CAUTION)
    return EXIT_OK if res.is_minimum and res.is_forest and res.is_spanning else EXIT_NOT_MINIMUM


def _yes(b) -> str:
    return "yes" if b else "NO"


def cmd_clusters(args):
    _check_outputs(args)
    import fastmst
    from fastmst import io
    if args.k is not None and args.k < 1:
        raise UsageError(f"-k {args.k}: the number of clusters must be at least 1.")
    rep = _reporter(args)
    with rep:
        edges = _load(args, rep)
        if args.plot and edges.coords is None:
            raise UsageError("--plot needs node coordinates: give a node table with --nodes.")
        with rep.phase("solving"):
            forest = fastmst.minimum_spanning_forest(edges.tail, edges.head, edges.weight,
                                                     edges.n_nodes)
        with rep.phase("clustering"):
            labels = np.asarray(forest.clusters(k=args.k, threshold=args.threshold))
        import pyarrow as pa
        table = pa.table({"node": io._label_array(edges.label(np.arange(edges.n_nodes))),
                          "cluster": pa.array(labels.astype(np.int64))})
        with rep.phase("writing"):
            for out in args.output:
                if out.lower().endswith((".geojson", ".json")):
                    raise UsageError(f"-o {out}: clusters are written as CSV, TSV, Parquet or "
                                     f".npz (node, cluster).")
                io.write_table(out, table)
        if args.plot:
            from fastmst.plot import plot_forest
            with rep.phase("plotting"):
                plot_forest(args.plot, edges, forest, groups=_cluster_groups(forest, labels),
                            title="Single-linkage clusters",
                            subtitle=f"{edges.source}: {int(labels.max()) + 1 if labels.size else 0}"
                                     f" clusters (forest edges coloured by cluster; cut edges "
                                     f"black)")
    sizes = np.bincount(labels) if labels.size else np.zeros(0, np.int64)
    top = np.argsort(-sizes, kind="stable")[:10]
    out = {"source": edges.source, "nodes": edges.n_nodes, "clusters": int(sizes.size),
           "k": args.k, "threshold": args.threshold,
           "largest": [{"cluster": int(c), "size": int(sizes[c])} for c in top],
           "written": list(args.output) + ([args.plot] if args.plot else []),
           "seconds": {k: round(v, 6) for k, v in rep.times.items()}}
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        rows = [("nodes", _fmt_num(edges.n_nodes)), ("clusters", _fmt_num(sizes.size)),
                ("largest", ", ".join(f"#{c}: {sizes[c]:,}" for c in top)),
                ("time", _times_text(rep.times))]
        if out["written"]:
            rows.append(("wrote", ", ".join(out["written"])))
        _print_block(f"fastmst clusters: {edges.source}", rows)
    return EXIT_OK


def _cluster_groups(forest, labels):
    """Plot classes for the forest's edges: one colour per cluster (cycled after ten), the
    edges cut between clusters in black."""
    palette = ["#1f77b4", "#ff7f0e", "#2ca02c", "#d62728", "#9467bd", "#8c564b", "#e377c2",
               "#7f7f7f", "#bcbd22", "#17becf"]
    lt, lh = labels[forest.tail], labels[forest.head]
    n = int(labels.max()) + 1 if labels.size else 0
    k = min(n, len(palette))
    idx = np.where(lt == lh, lt % len(palette), len(palette))
    names = [f"cluster {c}" if n <= len(palette) else f"clusters {c}, {c + 10}, ..."
             for c in range(k)]
    names += [f"_unused{c}" for c in range(k, len(palette))] + ["cut between clusters"]
    return idx, names, palette + ["#000000"]


def cmd_bench(args):
    import fastmst
    from scipy.sparse import coo_array
    from scipy.sparse.csgraph import minimum_spanning_tree
    if args.repeat < 1:
        raise UsageError(f"--repeat {args.repeat}: expected at least 1.")
    rep = _reporter(args)
    with rep:
        edges = _load(args, rep)
        t, h, w = edges.tail, edges.head, edges.weight
        n = edges.n_nodes
        best_f, best_s = math.inf, math.inf
        forest = tree = None
        for r in range(args.repeat):
            with rep.phase(f"fastmst run {r + 1}/{args.repeat}"):
                t0 = time.perf_counter()
                forest = fastmst.minimum_spanning_forest(t, h, w, n, method=args.method,
                                                         threads=args.threads)
                best_f = min(best_f, time.perf_counter() - t0)
            with rep.phase(f"scipy run {r + 1}/{args.repeat}"):
                t0 = time.perf_counter()
                m = coo_array((w.astype(np.float64), (t, h)), shape=(n, n)).tocsr()
                tree = minimum_spanning_tree(m)
                best_s = min(best_s, time.perf_counter() - t0)
    zeros = int(np.count_nonzero(w == 0))
    scipy_total = float(tree.sum())
    out = {"source": edges.source, "nodes": n, "edges": edges.n_edges, "repeat": args.repeat,
           "fastmst_seconds": best_f, "scipy_seconds": best_s,
           "speedup": best_s / best_f if best_f > 0 else None,
           "fastmst_method": forest.method, "fastmst_total_weight": _jsonable(forest.weight),
           "scipy_total_weight": scipy_total, "zero_weight_edges": zeros,
           "read_seconds": round(rep.times.get("reading edges", 0.0), 6),
           "note": "scipy route: coo -> csr (sums parallel edges, drops zero weights) -> "
                   "scipy.sparse.csgraph.minimum_spanning_tree; best of --repeat runs"}
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        rows = [("nodes", _fmt_num(n)), ("edges", _fmt_num(edges.n_edges)),
                ("read", f"{out['read_seconds']:.3f} s"),
                (f"fastmst ({forest.method})", f"{best_f:.4f} s"),
                ("scipy csgraph", f"{best_s:.4f} s (incl. building the CSR matrix)"),
                ("speedup", f"{out['speedup']:.2f}x" if out["speedup"] else "n/a"),
                ("total weights", f"fastmst {_fmt_num(forest.weight)}, scipy "
                                  f"{_fmt_num(scipy_total)}")]
        _print_block(f"fastmst bench: {edges.source} (best of {args.repeat})", rows)
        if zeros:
            print(f"  note: {zeros:,} zero-weight edges; the SciPy route drops them, so its "
                  f"forest may differ.")
    return EXIT_OK


def cmd_demo(args):
    from fastmst import demo
    if args.sites < 10:
        raise UsageError(f"--sites {args.sites}: the demo needs at least 10 sites.")
    rep = _reporter(args)
    with rep:
        summary = demo.run(args.out, n_sites=args.sites, seed=args.seed, reporter=rep,
                           plot=not args.no_plot)
    if args.json:
        print(json.dumps(summary, indent=2))
    elif not args.quiet:
        print(demo.format_summary(summary))
    if not args.json:
        print(demo.CAUTIONS if not args.quiet else CAUTION,
              file=sys.stdout if not args.quiet else sys.stderr)
    return EXIT_OK


# --- entry point ----------------------------------------------------------------------------------

def main(argv=None) -> int:
    """Run the command line; returns the exit code (also the process's, via ``fastmst``)."""
    parser = build_parser()
    argv = sys.argv[1:] if argv is None else list(argv)
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: --help/--version exit 0, bad usage exits 2
        return int(exc.code or 0)
    if args.command is None:
        parser.print_help()
        return EXIT_USAGE
    debug = getattr(args, "debug", False)
    try:
        return args.run(args)
    except UsageError as exc:
        if debug:
            raise
        print(f"fastmst {args.command}: usage error: {exc}", file=sys.stderr)
        return EXIT_USAGE
    except ImportError as exc:
        if debug:
            raise
        print(f"fastmst {args.command}: error: {exc}; the command line needs its extras: "
              f"pip install \"fastmst[cli]\"", file=sys.stderr)
        return EXIT_DATA
    except (ValueError, TypeError, OSError, MemoryError) as exc:
        if debug:
            raise
        print(f"fastmst {args.command}: error: {exc}", file=sys.stderr)
        if isinstance(exc, MemoryError):
            print("  (out of memory; run again with --debug for the traceback)", file=sys.stderr)
        return EXIT_DATA
    except KeyboardInterrupt:
        print("fastmst: interrupted", file=sys.stderr)
        return 130


def run() -> None:
    """Console-script entry: exit with main()'s code."""
    sys.exit(main())
