"""Summaries the commands share: sums by a category column, and the sites left unconnected.

Not a command: :mod:`fastmst.cli.solve` and the analysis commands call these over public
functions (``io.forest_table``, ``io.node_table``).
"""
from __future__ import annotations

import math

import numpy as np

from fastmst import io
from fastmst.cli.common import UsageError, derived, fmt_num, jsonable, plural


def add_summary_options(g):
    """--group-by, --sum and --unconnected."""
    g.add_argument("--group-by", metavar="COLUMN",
                   help="summarise the forest by a column of the input (a category such as "
                        "route_type): links and weight per value")
    g.add_argument("--sum", metavar="LIST",
                   help="with --group-by: also sum these input columns (names separated by "
                        "commas, e.g. length_m)")
    g.add_argument("--unconnected", metavar="FILE",
                   help="write the sites outside the largest connected part (isolated sites "
                        "and smaller parts) to FILE: node, component, component_size")


def check_summary_options(args):
    """Usage checks before any file is read."""
    if getattr(args, "sum", None) and not getattr(args, "group_by", None):
        raise UsageError("--sum needs --group-by COLUMN (the sums are per value of it).")
    if getattr(args, "unconnected", None):
        try:
            io.detect_format(args.unconnected, None, valid=io.registry.names("write_table"),
                             func="fastmst")
        except ValueError as exc:
            raise UsageError(f"--unconnected {args.unconnected}: {exc}") from None


def group_sums(table, by: str, sums, weight: str) -> list:
    """Rows {by: value, "links": count, weight: sum, each of ``sums``: sum} of the forest
    ``table`` (from ``io.forest_table``), largest weight first; sums exact (``math.fsum``
    rounded to 15 significant digits for JSON)."""
    names = table.column_names
    if by not in names:
        raise UsageError(f"--group-by {by}: not a column of the forest; its columns are "
                         f"{', '.join(names)} (input columns are carried unless "
                         f"--keep-columns leaves them out).")
    cols = [weight] + [c for c in (sums or []) if c != weight]
    for c in cols:
        if c not in names:
            raise UsageError(f"--sum {c}: not a column of the forest; its columns are "
                             f"{', '.join(names)}.")
        if not _numeric(table.column(c)):
            raise UsageError(f"--sum {c}: column {c!r} holds {table.column(c).type} values; "
                             f"only numbers can be summed.")
    keys = table.column(by).to_pylist()
    values = {c: np.asarray(table.column(c).to_numpy(zero_copy_only=False), dtype=np.float64)
              for c in cols}
    order = {}
    for i, k in enumerate(keys):
        order.setdefault(k, []).append(i)
    rows = []
    for k, idx in order.items():
        row = {by: jsonable(k), "links": len(idx)}
        for c in cols:
            row[c] = derived(_fsum(values[c][idx]))
        rows.append(row)
    rows.sort(key=lambda r: (-r[weight] if isinstance(r[weight], float) else 0, str(r[by])))
    return rows


def _fsum(a) -> float:
    a = a[~np.isnan(a)]
    return math.fsum(a.tolist())


def _numeric(col) -> bool:
    import pyarrow as pa
    return pa.types.is_integer(col.type) or pa.types.is_floating(col.type) or \
        pa.types.is_decimal(col.type)


def group_lines(rows, by: str, weight: str) -> list:
    """The --group-by table for the screen, thousands separators, columns aligned."""
    if not rows:
        return []
    cols = [c for c in rows[0] if c != by]
    cells = [[str(r[by])] + [fmt_num(r[c]) if not isinstance(r[c], str) else r[c] for c in cols]
             for r in rows]
    head = [by] + cols
    widths = [max(len(h), *(len(c[i]) for c in cells)) for i, h in enumerate(head)]
    fmt = lambda row: "    " + "  ".join(  # noqa: E731
        (v.ljust(w) if i == 0 else v.rjust(w)) for i, (v, w) in enumerate(zip(row, widths)))
    return [f"  by {by}:", fmt(head)] + [fmt(c) for c in cells]


def unconnected(edges, forest):
    """(table of the sites outside the largest component, summary dict).

    The table has node, component (the forest's component id), component_size; the summary
    the count, the number of other parts and up to 1,000 site labels (all in the file)."""
    labels = np.asarray(forest.labels, dtype=np.int64)
    if labels.size == 0:
        return None, {"sites": 0, "parts": 0, "listed": []}
    sizes = np.bincount(labels)
    main = int(np.argmax(sizes))          # the largest part (the first among equal sizes)
    out = np.flatnonzero(labels != main)
    table = io.node_table(edges, component=labels, component_size=sizes[labels]).take(out)
    names = table.column("node").to_pylist()
    info = {"sites": int(out.size), "parts": int(sizes.size - 1),
            "isolated": int(np.count_nonzero(sizes[labels[out]] == 1)),
            "largest_part_sites": int(sizes[main]),
            "listed": [jsonable(x) for x in names[:1000]]}
    return table, info


def unconnected_row(info) -> tuple:
    """The summary row for unconnected sites."""
    if not info["sites"]:
        return ("unconnected sites", "none (one connected part)")
    first = ", ".join(str(x) for x in info["listed"][:8])
    more = ", ..." if info["sites"] > 8 else ""
    return ("unconnected sites",
            f"{plural(info['sites'], 'site')} outside the largest part "
            f"({plural(info['isolated'], 'isolated site')}, "
            f"{plural(info['parts'], 'other part')}): {first}{more}")
