"""What every ``fastmst`` subcommand shares: options, exit codes, the caution, output helpers.

Exit codes: :data:`EXIT_OK` 0 success; :data:`EXIT_DATA` 1 bad data (unreadable or malformed
files, invalid values); :data:`EXIT_USAGE` 2 bad usage (:class:`UsageError`: unknown options,
conflicting or missing arguments, unknown output formats); :data:`EXIT_NOT_MINIMUM` 3 (``check``
ran and the forest is not a minimum spanning forest).
"""
from __future__ import annotations

import argparse
import math
import os
import sys

import numpy as np

import fastmst
from fastmst import io
from fastmst.cli.paths import check_writable
from fastmst.cli.progress import Reporter
from fastmst.io.labels import all_labels, lookup

CAUTION = ("Caution: a spanning tree has no redundancy - one failed link disconnects every site "
           "beyond it. Designs for utilities or roads need review by licensed engineers under "
           "the local codes.")

EXIT_OK, EXIT_DATA, EXIT_USAGE, EXIT_NOT_MINIMUM = 0, 1, 2, 3


class UsageError(Exception):
    """A command line that cannot work (exit code 2)."""


# --- shared options -------------------------------------------------------------------------------

def add_input_options(p, forest_file=False):
    """EDGES (and FOREST), the column options and the node-table options."""
    p.add_argument("edges", metavar="EDGES", help="edge-list file: " + _suffix_help())
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
    g.add_argument("--format", choices=io.FORMATS,
                   help="input format (default: from the file suffix)")
    g.add_argument("--layer", metavar="NAME",
                   help="GeoPackage EDGES: the line layer of links (default: the only one)")
    g.add_argument("--snap-tolerance", type=float, default=0.0, metavar="D",
                   help="GeoPackage EDGES: line ends within D share a node (or, with --nodes, go "
                        "to the nearest site within D); in the layer's CRS units, degrees for "
                        "lon/lat (default 0: identical ends only)")
    g.add_argument("--nodes-layer", metavar="NAME",
                   help="GeoPackage --nodes: the point layer of sites (default: the only one)")
    g.add_argument("--link-id", metavar="COLUMN",
                   help="column naming each link by a unique id; lists of links (--required, "
                        "--excluded, a forest to check) may then name links by it")
    g.add_argument("--keep-columns", metavar="LIST", default="all",
                   help="input columns carried to every output under their own names: 'all' "
                        "(default), 'none', or names separated by commas")
    g.add_argument("--delimiter", metavar="CHAR",
                   help="field separator of the CSV/TSV inputs (edges, nodes, lists of links) "
                        "when it is not the suffix's own, e.g. ';' (write '\\t' for a tab)")
    g.add_argument("--decimal-comma", action="store_true",
                   help="numbers in the CSV/TSV inputs use a decimal comma (12,5)")
    g.add_argument("--nodes", metavar="FILE",
                   help="node table (CSV/Parquet): id, lon/lat or x/y columns; needed for "
                        "lengths, GeoJSON and --plot")
    g.add_argument("--node-id", metavar="COLUMN", help="node id column (default: 'id', else the "
                                                        "first)")
    g.add_argument("--x", metavar="COLUMN", help="x or longitude column of the node table")
    g.add_argument("--y", metavar="COLUMN", help="y or latitude column of the node table")
    g.add_argument("--integer-ids", dest="ids", action="store_const", const="integer",
                   default="text",
                   help="read node ids as integers (007 is node 7); by default ids are text, "
                        "exactly as written")
    g.add_argument("--declared-nodes", type=int, metavar="N",
                   help="confirm the node count a .gr/.mtx header declares when it is far more "
                        "than the file's edges name (each declared node costs memory)")
    geo = g.add_mutually_exclusive_group()
    geo.add_argument("--geographic", dest="geographic", action="store_const", const=True,
                     help="read --x/--y as longitude/latitude degrees (great-circle metres)")
    geo.add_argument("--planar", dest="geographic", action="store_const", const=False,
                     help="read --x/--y as planar coordinates (Euclidean lengths)")


def _suffix_help() -> str:
    """The readable suffixes from the format registry: ".csv/.tsv (optionally .gz/.zst), ..."."""
    fmts = [io.registry.get(n) for n in io.FORMATS]
    packed = "/".join(f.suffixes[0] for f in fmts if f.compressed)
    rest = [f.suffixes[0] for f in fmts if not f.compressed]
    return ", ".join(([f"{packed} (optionally .gz/.zst)"] if packed else []) + rest)


def add_solver_options(p):
    """--maximize, --method, --threads, --required, --excluded."""
    g = p.add_argument_group("solver")
    g.add_argument("--maximize", action="store_true", help="maximum spanning forest")
    g.add_argument("--method", default="auto", choices=tuple(fastmst.METHODS),
                   help="algorithm (default auto); every method gives the same forest")
    add_threads_option(g)
    add_constraint_options(g)


def add_threads_option(g):
    """--threads (solve, bench)."""
    g.add_argument("--threads", type=int, metavar="N",
                   help="worker threads, 1 or more; 0 or left out: every core")


def threads_option(args):
    """--threads for the solver: None (every core) for 0 or none; a negative count is refused
    (it meant every core without a word)."""
    n = getattr(args, "threads", None)
    if n is not None and n < 0:
        raise ValueError(f"--threads {n}: expected a number of worker threads, 1 or more (0 or "
                         f"leave it out for every core).")
    return n or None


def add_constraint_options(g):
    """--required and --excluded (same meaning in every command)."""
    g.add_argument("--required", metavar="FILE",
                   help="links that must be in the forest: a file naming them by link id "
                        "(--link-id), by 'position', or by site pair (tail/head labels; a pair "
                        "with several links takes its lightest)")
    g.add_argument("--excluded", metavar="FILE",
                   help="links that may not be used, named the same way; a site pair excludes "
                        "every link between its two sites")


def read_constraints(args, edges, rep):
    """(keyword arguments required=/excluded= for the toolkit calls, summary dict) of
    --required/--excluded; the summary counts the links and names pairs that matched several
    links."""
    kwargs, info = {}, {}
    if not (getattr(args, "required", None) or getattr(args, "excluded", None)):
        return kwargs, info
    with rep.phase("reading links"):
        for opt, parallel in (("required", "lightest"), ("excluded", "all")):
            path = getattr(args, opt, None)
            if not path:
                continue
            links = io.read_links(path, edges, parallel=parallel, func=f"--{opt}",
                                  delimiter=delimiter_option(args),
                                  decimal_comma=bool(getattr(args, "decimal_comma", False)))
            kwargs[opt] = links.positions
            d = {"file": path, "rows": links.rows, "links": int(np.unique(links.positions).size),
                 "named_by": links.named_by}
            if links.named_by == "pair":
                d["pairs_with_several_links"] = [
                    {"tail": jsonable(a), "head": jsonable(b), "links": c}
                    for a, b, c in links.several]
            info[opt] = d
    check_disjoint(edges, kwargs.get("required"), kwargs.get("excluded"), args)
    return kwargs, info


def check_disjoint(edges, required, excluded, args) -> None:
    """A link both required and excluded is refused naming it in labels and both files."""
    if required is None or excluded is None:
        return
    both = np.intersect1d(required, excluded)
    if both.size:
        d = link_json(edges, int(both[0]))
        more = f" ({plural(both.size, 'such link')} in all)" if both.size > 1 else ""
        raise ValueError(f"{link_text(d, edges)} is both required and excluded (--required "
                         f"{args.required}, --excluded {args.excluded}){more}; a link can be "
                         f"only one of them. Remove it from one list.")


def constraint_rows(info) -> list:
    """Summary rows for --required/--excluded: counts, how links were named, several-link
    pairs."""
    rows = []
    for opt in ("required", "excluded"):
        d = info.get(opt)
        if not d:
            continue
        text = f"{plural(d['links'], 'link')} from {plural(d['rows'], 'row')} of {d['file']}, " \
               f"named by {d['named_by']}"
        several = d.get("pairs_with_several_links", [])
        if d["named_by"] == "pair":
            text += ("; a pair excludes every link between its sites" if opt == "excluded" else
                     "; a pair with several links takes its lightest")
        if several:
            shown_ = ", ".join(f"{s['tail']} -- {s['head']} ({s['links']} links)"
                               for s in several[:5])
            more = f", ... {len(several) - 5} more" if len(several) > 5 else ""
            text += f"; {plural(len(several), 'pair')} matched several links: {shown_}{more}"
        rows.append((f"{opt} links", text))
    return rows


def plural(n, word: str, words: str | None = None) -> str:
    """``n`` and the word in the singular or plural: ``1 link``, ``2 links``, ``1,234 links``.

    >>> plural(1, "link"), plural(2, "arc"), plural(3, "pair", "pairs")
    ('1 link', '2 arcs', '3 pairs')
    """
    words = words or word + "s"
    return f"{fmt_num(n)} {word if n == 1 else words}"


TABLES = ".csv, .tsv, .csv.gz, .parquet, .npz"


def add_output_options(p, outputs=True, *, layers=False, plot=True):
    """-o/--output and --plot (when ``outputs``), --json, --quiet, --debug.  The help lists
    what the command writes: tables, and with ``layers`` GeoJSON and GeoPackage too; without
    ``plot`` the command draws no map and --plot is hidden (it still says so when given)."""
    g = p.add_argument_group("output")
    if outputs:
        kinds = TABLES + ("; with node coordinates also .geojson and .gpkg" if layers else "")
        g.add_argument("-o", "--output", action="append", default=[], metavar="OUT",
                       help=f"write the result; the format follows the suffix ({kinds}); "
                            f"repeat for several files")
        g.add_argument("--plot", metavar="FILE.png",
                       help="draw a map over the nodes (needs node coordinates)" if plot else
                       argparse.SUPPRESS)
        g.add_argument("--spreadsheet-safe", action="store_true",
                       help="in CSV/TSV outputs, put an apostrophe before text cells beginning "
                            "with = + - @ (spreadsheet formulas); by default labels are "
                            "written verbatim")
    g.add_argument("--json", action="store_true", help="print the summary as JSON")
    g.add_argument("--quiet", "-q", action="store_true",
                   help="no progress bars and no summary (errors and the caution still print)")
    g.add_argument("--debug", action="store_true", help="show tracebacks on errors")


# --- usage checks and input -----------------------------------------------------------------------

def check_outputs(args, *, geojson=True, layers=False):
    """Reject unknown output suffixes (and GeoJSON where it has no meaning; ``layers``: the
    command writes GeoPackage/GeoJSON layers of its own), outputs that name an input file or
    another output (also through links or relative paths), before any work."""
    check_not_inputs(args)
    for out in getattr(args, "output", []):
        try:
            name, _ = io.detect_format(out, None, valid=io.WRITE_FORMATS, func="fastmst")
        except ValueError as exc:
            raise UsageError(f"-o {out}: {exc}") from None
        if not geojson and io.registry.get(name).write_table is None and \
                not (layers and name in ("gpkg", "geojson")):
            raise UsageError(f"-o {out}: this command writes tables: CSV, TSV, Parquet or .npz"
                             + (", or GeoPackage layers (.gpkg) or GeoJSON" if layers else "")
                             + ".")
    plot = getattr(args, "plot", None)
    if plot and not plot.lower().endswith(".png"):
        raise UsageError(f"--plot {plot}: expected a file name ending in .png.")
    check_coordinates(args, bool(getattr(args, "nodes", None)) or is_layer(args))


def is_layer(args) -> bool:
    """Whether EDGES is a GeoPackage line layer (its lines give the node coordinates)."""
    try:
        return io.detect_format(args.edges, getattr(args, "format", None))[0] == "gpkg"
    except ValueError:
        return False


def _same_file(a: str, b: str) -> bool:
    if os.path.realpath(a) == os.path.realpath(b):
        return True
    try:
        return os.path.samefile(a, b)   # hard links
    except OSError:
        return False


def check_not_inputs(args) -> None:
    """Every output (-o, --plot) must differ from every input and from the other outputs."""
    inputs = [(opt, getattr(args, dest, None)) for opt, dest in
              (("EDGES", "edges"), ("FOREST", "forest"), ("--nodes", "nodes"),
               ("--required", "required"), ("--excluded", "excluded"))]
    inputs = [(opt, path) for opt, path in inputs if path]
    outputs = [("-o", out) for out in getattr(args, "output", [])]
    if getattr(args, "plot", None):
        outputs.append(("--plot", args.plot))
    for opt in ("unconnected", "swaps_output"):
        if getattr(args, opt, None):
            outputs.append(("--" + opt.replace("_", "-"), getattr(args, opt)))
    for k, (opt, out) in enumerate(outputs):
        check_writable(opt, out)
        for src_opt, src in inputs:
            if _same_file(out, src):
                raise UsageError(f"{opt} {out}: is an input ({src_opt} {src}); writing there "
                                 f"would overwrite it. Choose another output name.")
        for opt2, other in outputs[:k]:
            if _same_file(out, other):
                raise UsageError(f"{opt} {out}: named twice (also {opt2} {other}); give each "
                                 f"output its own file name.")


def check_coordinates(args, have_coords: bool):
    """--plot and GeoJSON outputs need node coordinates; ``have_coords`` says whether there
    are some (before reading: whether --nodes was given; after: whether the edges carry them)."""
    if have_coords:
        return
    if getattr(args, "plot", None):
        raise UsageError("--plot needs node coordinates: give a node table with --nodes.")
    for out in getattr(args, "output", []):
        if io.registry.get(io.detect_format(out, None, valid=io.WRITE_FORMATS)[0]).write_forest:
            raise UsageError(f"-o {out}: GeoJSON and GeoPackage outputs need node "
                             f"coordinates: give a node table with --nodes.")


def check_geojson_coordinates(args, edges) -> None:
    """GeoJSON (RFC 7946) holds longitude/latitude only: a -o .geojson with planar
    coordinates of no known CRS is refused once the edges are read, before the solve (the
    writer refused it only after all the work)."""
    for out in getattr(args, "output", []):
        if io.detect_format(out, None, valid=io.WRITE_FORMATS)[0] != "geojson":
            continue
        if edges.coords is not None and not edges.geographic and \
                getattr(edges, "crs", None) is None:
            raise ValueError(f"-o {out}: the coordinates of {edges.source} are planar (x/y); "
                             f"GeoJSON (RFC 7946) needs longitude/latitude in WGS 84. Give "
                             f"the node table in lon/lat, or write .gpkg, CSV or Parquet "
                             f"instead.")


def reporter(args) -> Reporter:
    """Progress bars on a terminal unless --quiet or --json."""
    return Reporter.for_terminal(args.quiet or args.json)


def load_edges(args, rep) -> io.EdgeList:
    """The EdgeList of EDGES with the column and node-table options."""
    nodes = None
    layer = is_layer(args)
    if not layer and (args.layer or args.snap_tolerance):
        raise UsageError("--layer/--snap-tolerance apply to a GeoPackage (.gpkg) line layer of "
                         "links as EDGES; drop them.")
    if args.nodes_layer and not (args.nodes or "").lower().endswith(".gpkg"):
        raise UsageError("--nodes-layer applies to a GeoPackage (.gpkg) of sites as --nodes; "
                         "drop it.")
    if args.nodes and args.nodes.lower().endswith(".gpkg"):
        with rep.phase("reading nodes"):
            nodes = io.read_point_layer(args.nodes, layer=args.nodes_layer, id=args.node_id)
    elif args.nodes:
        with rep.phase("reading nodes"):
            nodes = io.read_nodes(args.nodes, id=args.node_id, x=args.x, y=args.y,
                                  geographic=args.geographic, ids=args.ids,
                                  delimiter=delimiter_option(args),
                                  decimal_comma=args.decimal_comma)
    elif args.x or args.y or args.node_id:
        raise UsageError("--node-id/--x/--y describe the node table; give it with --nodes FILE.")
    delimiter = delimiter_option(args)
    if layer:
        if args.tail or args.head:
            raise UsageError("--tail/--head do not apply to a line layer: each link's ends come "
                             "from its geometry; drop them.")
        with rep.phase("reading edges"):
            return io.read_line_layer(args.edges, layer=args.layer,
                                      snap_tolerance=args.snap_tolerance, weight=args.weight,
                                      nodes=nodes, keep_columns=keep_columns(args.keep_columns),
                                      link_id=args.link_id)
    with rep.phase("reading edges") as update:
        edges = io.read_edges(args.edges, tail=args.tail, head=args.head, weight=args.weight,
                              format=args.format, nodes=nodes,
                              progress=update if rep.enabled else None, ids=args.ids,
                              declared_nodes=args.declared_nodes,
                              keep_columns=keep_columns(args.keep_columns),
                              link_id=args.link_id, delimiter=delimiter,
                              decimal_comma=args.decimal_comma)
    return edges


def layer_note(edges) -> str | None:
    """What a line layer's coordinates, tolerance and lengths meant, and how far snapping moved
    line ends; None for edges not read from a layer."""
    crs = getattr(edges, "crs", None)
    if crs is None or not hasattr(edges, "max_shift"):
        return None
    return (f"{crs.describe()}; line ends joined within {edges.snap_tolerance:g}, largest "
            f"move {edges.max_shift:.3g}")


def delimiter_option(args):
    """--delimiter, with '\\t' and 'tab' meaning a tab."""
    d = getattr(args, "delimiter", None)
    d = "\t" if d in ("\\t", "tab") else d
    if d is not None and (len(d) != 1 or d in "\"\r\n"):
        raise UsageError(f"--delimiter {d!r}: expected one character other than a quote or a "
                         f"line break, such as ';' or '|'; for tabs pass 'tab'.")
    return d


def keep_columns(text: str):
    """--keep-columns: "all", "none" or names separated by commas."""
    if text == "all":
        return "all"
    if text == "none":
        return ()
    names = [n.strip() for n in text.split(",")]
    if not all(names):
        raise UsageError(f"--keep-columns {text!r}: expected 'all', 'none' or column names "
                         f"separated by commas (route_type,length_m).")
    return tuple(names)


def guessed_note(edges) -> str | None:
    """A note naming the columns the default rule took, and how to choose others; None when
    every column was given."""
    if not edges.guessed:
        return None
    roles = dict(zip(("tail", "head", "weight"), edges.columns))
    taken = ", ".join(f"{r} {roles[r]!r}" for r in edges.guessed)
    note = f"took {taken} by default; choose with " + \
        "/".join(f"--{r}" for r in edges.guessed) + " COLUMN"
    if "tail" in edges.guessed and edges.n_edges > 2 and \
            np.unique(edges.tail).size == edges.n_edges:
        note += (f"; column {roles['tail']!r} holds a different value on every row, as an id "
                 f"column does: if it names links, pass --link-id {roles['tail']} and the "
                 f"endpoint columns with --tail/--head")
    return note


# --- printing -------------------------------------------------------------------------------------

def fmt_num(x) -> str:
    """A number for the screen: thousands separators, no trailing zeros.

    >>> fmt_num(1234567), fmt_num(11.5), fmt_num(2.0), fmt_num(float("inf"))
    ('1,234,567', '11.5', '2', 'inf')
    >>> fmt_num(12876312.4), fmt_num(0.30000000000000004), fmt_num(2.5e-7)
    ('12,876,312.4', '0.3', '2.5e-07')
    >>> fmt_num(1e308), fmt_num(2.0 ** 54 + 4), fmt_num(999999999999999.9)
    ('1e+308', '1.8014398509481988e+16', '999,999,999,999,999.9')
    """
    if isinstance(x, (int, np.integer)):
        return f"{int(x):,}"
    x = float(x)
    if not math.isfinite(x):
        return str(x)
    if x == int(x) and abs(x) <= 2 ** 53:     # every such integer is exact in float64
        return f"{int(x):,}"
    if abs(x) >= 1e13:
        # two decimals would pass 15 significant digits: the shortest text that reads back
        # as x instead, never the binary value's spurious digits (1e308 is not 1000...01097...)
        text = repr(x)
        if "e" in text:
            return text
        whole, _, frac = text.partition(".")
        return f"{int(whole):,}" + (f".{frac}" if frac.strip("0") else "")
    if abs(x) < 1e-3:
        return f"{x:.6g}"
    text = f"{x:,.2f}" if abs(x) >= 1e6 else f"{x:,.4f}"
    return text.rstrip("0").rstrip(".")


def print_block(title, rows, out=None):
    """A title line, then ``key  value`` rows aligned."""
    out = sys.stdout if out is None else out
    width = max((len(k) for k, _ in rows), default=0)
    print(title, file=out)
    for k, v in rows:
        print(f"  {k:<{width}}  {v}", file=out)


def times_text(times) -> str:
    """Phase timings for the summary: ``reading edges 0.002 s | solving 0.000 s``."""
    return " | ".join(f"{k} {v:.3f} s" for k, v in times.items())


def seconds(times) -> dict:
    """Phase timings for JSON, rounded to microseconds."""
    return {k: round(v, 6) for k, v in times.items()}


def jsonable(x):
    """NumPy scalars as Python numbers, non-finite floats as text (JSON has no infinity)."""
    if isinstance(x, np.generic):
        x = x.item()
    if isinstance(x, float) and not math.isfinite(x):
        return str(x)
    return x


def derived(x):
    """A value computed from the input (a total, a difference, a saving) for JSON: rounded to
    15 significant digits, the precision float64 keeps for any decimal input, so that sums and
    differences of decimal costs read as decimals (12.3, not 12.299999999999997); integers,
    non-finite values and text as :func:`jsonable`.

    >>> derived(45.3 - 33.0), derived(0.1 + 0.2), derived(12876312.37), derived(7)
    (12.3, 0.3, 12876312.37, 7)
    """
    x = jsonable(x)
    if isinstance(x, float) and math.isfinite(x):
        return float(f"{x:.15g}")
    return x


def derived_array(x) -> np.ndarray:
    """:func:`derived` for a float64 array, vectorised (tables of margins and the like):
    finite values become the integer of their 15 leading digits divided by a power of ten,
    which IEEE division rounds once, so each is written with at most 15 significant digits.
    The integer comes from one rounded product, so about one value in 200 ends one unit
    away in the 15th digit from ``float(f"{v:.15g}")`` (a relative 1e-15)."""
    x = np.asarray(x, dtype=np.float64)
    out = x.copy()
    with np.errstate(divide="ignore", invalid="ignore"):
        e_all = 14 - np.floor(np.log10(np.abs(x)))
    # only where the power of ten is exact in float64 (|e| <= 22); others stay as they are
    ok = np.flatnonzero(np.isfinite(e_all) & (np.abs(e_all) <= 22))
    if ok.size:
        v = x[ok]
        e = e_all[ok].astype(np.int64)
        p = 10.0 ** np.abs(e)
        up = e >= 0
        r = np.empty_like(v)
        r[up] = np.round(v[up] * p[up]) / p[up]
        r[~up] = np.round(v[~up] / p[~up]) * p[~up]
        out[ok] = r
    return out


def edge_json(edges, p) -> dict:
    """Edge ``p`` of ``edges`` as a JSON object in the user's labels."""
    a, b = edges.label([edges.tail[p], edges.head[p]]).tolist()
    return {"tail": jsonable(a), "head": jsonable(b), "weight": jsonable(edges.weight[p]),
            "position": int(p)}


def print_caution(args, *texts) -> None:
    """The caution after a command's output (default :data:`CAUTION`): on stdout after the
    summary, on stderr with --quiet (it prints even then, as --help promises); nothing with
    --json, whose summary carries it under ``caution``."""
    if getattr(args, "json", False):
        return
    out = sys.stderr if getattr(args, "quiet", False) else sys.stdout
    for text in texts or (CAUTION,):
        print(text, file=out)


def yes(b) -> str:
    return "yes" if b else "NO"


# --- commands that analyse a design ----------------------------------------------------------------

def solve_design(args, edges, rep):
    """(forest, links summary): the optimal forest of ``edges`` under --required/--excluded
    (and --maximize when the command has it)."""
    constraints, links = read_constraints(args, edges, rep)
    with rep.phase("solving"):
        forest = fastmst.minimum_spanning_forest(
            edges.tail, edges.head, edges.weight, edges.n_nodes,
            maximize=bool(getattr(args, "maximize", False)), **constraints)
    return forest, links


def node_id(edges, label, opt: str) -> int:
    """The compact id of the site called ``label``, matched as the files' site names are
    (:func:`fastmst.io.labels.lookup`: as written; with --integer-ids as an integer, so 007 is
    site 7) - the same rule for FROM/TO, --root and the lists of links."""
    import pyarrow as pa
    ids, missing, _ = lookup(pa.array([str(label)]), all_labels(edges))
    if missing[0]:
        raise ValueError(f"{opt} {label!r}: no site of that name in {edges.source} "
                         f"({plural(edges.n_nodes, 'site')}); site names are compared as "
                         f"written (with --integer-ids, as integers).")
    return int(ids[0])


def link_json(edges, p, weight=None) -> dict:
    """Link ``p`` as JSON: :func:`edge_json` plus its link id when there is one."""
    d = edge_json(edges, p)
    if weight is not None:
        d["weight"] = jsonable(weight)
    if edges.link_id is not None:
        d[edges.link_id] = edges.attributes.column(edges.link_id)[int(p)].as_py()
    return d


def link_text(d, edges) -> str:
    """A link of :func:`link_json` for the screen."""
    ident = f"{d[edges.link_id]} " if edges.link_id is not None else ""
    return f"{ident}{d['tail']} -- {d['head']} (weight {fmt_num(d['weight'])}, position " \
           f"{d['position']})"
