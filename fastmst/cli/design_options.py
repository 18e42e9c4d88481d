"""What the network-design subcommands share (``failures``, ``backup``, ``feeders``,
``shallow``): their options, reading the root, design and demands, writing link tables with a
``why`` column, maps, and the caution they print."""
from __future__ import annotations

import json
import sys

import numpy as np

import fastmst
from fastmst import io
from fastmst.cli import common, forests
from fastmst.cli.common import CAUTION, UsageError, plural
from fastmst.demo_design import DESIGN_CAUTION, plot_links
from fastmst.io.adapters import output_names
from fastmst.io.labels import all_labels, label_array, lookup

def add_design_options(p, *, root: str | None, design: bool):
    """--required/--excluded (and --design, --root: "required", "optional" or None)."""
    g = p.add_argument_group("design")
    if root is not None:
        g.add_argument("--root", metavar="LABEL", required=root == "required",
                       help="the central site (central office, plant, substation), by its label"
                            + ("" if root == "required" else "; sides of each link are "
                                                            "counted from it"))
    if design:
        g.add_argument("--design", metavar="FILE",
                       help="the tree design to analyse: a file with a 'position' column (as "
                            "written by 'fastmst solve') or tail/head label columns; default "
                            "the minimum spanning forest")
    g.add_argument("--required", metavar="FILE",
                   help="links the minimum spanning forest must use: a file with a 'position' "
                        "column or tail/head label columns")
    g.add_argument("--excluded", metavar="FILE",
                   help="links that may not be used (every parallel link of a listed pair)")


def check_outputs(args):
    """Outputs: tables only (CSV/TSV/Parquet/.npz), a .png map, none naming an input."""
    common.check_not_inputs(args)
    outs = [o for o in getattr(args, "output", [])]
    for extra, opt in ((getattr(args, "design", None), "--design"),
                       (getattr(args, "demand", None), "--demand")):
        for out in outs + ([args.plot] if getattr(args, "plot", None) else []):
            if extra and common._same_file(out, extra):
                raise UsageError(f"{out}: is an input ({opt} {extra}); choose another name.")
    for out in outs:
        try:
            io.detect_format(out, None, valid=io.registry.names("write_table"), func="fastmst")
        except ValueError as exc:
            raise UsageError(f"-o {out}: {exc} (design tables are written as CSV, TSV, "
                             f"Parquet or .npz).") from None
    plot = getattr(args, "plot", None)
    if plot and not plot.lower().endswith(".png"):
        raise UsageError(f"--plot {plot}: expected a file name ending in .png.")
    if plot and not args.nodes:
        raise UsageError("--plot needs node coordinates: give a node table with --nodes.")


def find_node(edges, label: str, option: str) -> int:
    """The compact id of the node labelled ``label`` (:func:`fastmst.cli.common.node_id`'s
    rule)."""
    try:
        return common.node_id(edges, label, option)
    except ValueError:
        raise ValueError(f"{option} {label}: no node has this label in {edges.source}; give "
                         f"the label as it is written in the edge file (with --integer-ids, "
                         f"as an integer).") from None


def read_links(args, edges, rep):
    """(required, excluded, design) positions from the options (None where not given)."""
    required = excluded = design = None
    with rep.phase("reading links"):
        if args.required:
            required = io.read_positions(args.required, edges, func="--required")
        if args.excluded:
            excluded = io.read_positions(args.excluded, edges, all_parallel=True,
                                         func="--excluded")
        common.check_disjoint(edges, required, excluded, args)
        if getattr(args, "design", None):
            if args.required:
                raise UsageError("--design gives the whole design; --required applies to the "
                                 "minimum spanning forest only. Give one of them.")
            design = forests.read_forest(args.design, edges, "--design")
            forests.require_spanning_forest(edges, design, excluded, "--design", args.design)
    return required, excluded, design


def design_or_forest(edges, required, excluded, design, rep):
    """The design given with --design, or else the minimum spanning forest under --required
    and --excluded."""
    if design is not None:
        return design
    with rep.phase("solving"):
        return fastmst.minimum_spanning_forest(edges.tail, edges.head, edges.weight,
                                               edges.n_nodes, required=required,
                                               excluded=excluded)


def read_demand(path, edges) -> np.ndarray:
    """Demands from a table: node labels in the first column, demands in the second (or a
    column named ``demand``); sites not listed have demand 0, a site listed twice the sum."""
    import pyarrow.compute as pc
    table, source, where = io.load_table(path, None, "--demand",
                                         lambda header: header[:1])
    names = table.column_names
    if len(names) < 2:
        raise io.FileFormatError(f"{source}: expected two columns, node and demand; found "
                                 f"{names}.")
    col = "demand" if "demand" in names else names[1]
    ids, missing, shown_col = lookup(table.column(names[0]), all_labels(edges))
    if missing.any():
        i = int(np.flatnonzero(missing)[0])
        raise io.FileFormatError(f"{source}: {where(i)}: {shown_col[i].as_py()!r} is not a "
                                 f"node of {edges.source}.")
    values = table.column(col)
    try:
        values = np.asarray(pc.cast(values, "float64").to_numpy(zero_copy_only=False))
    except Exception:
        raise io.FileFormatError(f"{source}: column {col!r} must hold numbers (demands).") \
            from None
    empty = np.asarray(table.column(col).is_null().to_numpy(zero_copy_only=False), dtype=bool)
    bad = np.flatnonzero(empty | ~np.isfinite(values) | (values < 0))
    if bad.size:
        i = int(bad[0])
        what = "is empty" if empty[i] else f"is {float(values[i])!r}"
        raise io.FileFormatError(
            f"{source}: {where(i)}: the demand of site {shown_col[i].as_py()!r} {what}; "
            f"expected a finite number >= 0 ({plural(bad.size, 'such row')} in all). Fix or "
            f"drop those rows (a site not listed has demand 0).")
    demand = np.zeros(edges.n_nodes, dtype=np.float64)
    np.add.at(demand, ids.astype(np.int64), values)
    return demand


def nullable_labels(edges, ids):
    """Labels of compact ids as a pyarrow array, null where an id is -1."""
    import pyarrow as pa
    ids = np.asarray(ids, dtype=np.int64)
    ok = ids >= 0
    labels = edges.label(np.where(ok, ids, 0)).tolist()
    return pa.array([x if k else None for x, k in zip(labels, ok.tolist())])


def link_table(edges, positions, why, **columns):
    """A pyarrow table of links: tail, head (labels), weight, position, why, then ``columns``."""
    import pyarrow as pa
    pos = np.asarray(positions, dtype=np.int64)
    tn, hn, wn = output_names(edges, reserved=("why", *columns))
    cols = {tn: label_array(edges.label(edges.tail[pos])),
            hn: label_array(edges.label(edges.head[pos])),
            wn: pa.array(np.asarray(edges.weight[pos])),
            "position": pa.array(pos), "why": pa.array(np.asarray(why, dtype=str).tolist())}
    for name, values in columns.items():
        if not isinstance(values, (pa.Array, pa.ChunkedArray)):
            values = np.asarray(values)
            values = label_array(values) if values.dtype.kind in "OU" else pa.array(values)
        cols[name] = values
    return pa.table(cols)


def write_outputs(args, edges, table, positions, why, rep, *, title, subtitle):
    """Write every -o table and the --plot map (coloured by ``why``), staged."""
    with io.StagedOutputs() as staged:
        with rep.phase("writing"):
            for out in args.output:
                io.write_table(staged.path(out), table, spreadsheet_safe=args.spreadsheet_safe)
        if args.plot:
            with rep.phase("plotting"):
                plot_links(staged.path(args.plot), edges, positions, why, title=title,
                           subtitle=subtitle)
        staged.commit()


def finish(args, title, rows, summary, rep) -> int:
    """Print the summary (a block or JSON) and the cautions; exit code 0."""
    summary["seconds"] = common.seconds(rep.times)
    summary["written"] = list(args.output) + ([args.plot] if args.plot else [])
    summary["caution"] = CAUTION + " " + DESIGN_CAUTION
    if args.json:
        print(json.dumps(summary, indent=2, default=common.jsonable))
        return common.EXIT_OK
    if not args.quiet:
        rows = rows + [("time", common.times_text(rep.times))]
        if summary["written"]:
            rows.append(("wrote", ", ".join(summary["written"])))
        common.print_block(title, rows)
    out = sys.stderr if args.quiet else sys.stdout
    print(CAUTION, file=out)
    print(DESIGN_CAUTION, file=out)
    return common.EXIT_OK
