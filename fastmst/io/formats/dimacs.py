"""DIMACS shortest-path graphs (``.gr``): ``c`` comments, one ``p sp NODES ARCS`` line and
``a TAIL HEAD WEIGHT`` lines with 1-based ids; both directions of a road are two parallel edges.

Fields are separated by any run of whitespace (spaces, tabs, leading or trailing blanks, CRLF
line ends).  pyarrow reads the lines and splits them: on its threads when the comments all come
first (the usual layout: 0.63 s against 0.74 s on the calling thread for 5M arcs, best of 5),
otherwise on the calling thread with a row handler that skips comments; when anything is off,
the error path reads the file line by line and words the first problem.  The node count of
the header is checked against the arcs the file holds before anything node-sized is
allocated (:func:`fastmst.io.checks.check_declared_nodes`).  Column and node-table options do
not apply.
"""
from __future__ import annotations

import math

import numpy as np

from fastmst.io import registry
from fastmst.io.checks import FileFormatError, check_declared_nodes
from fastmst.io.columns import to_numpy
from fastmst.io.edgelist import EdgeList
from fastmst.io.labels import id_dtype
from fastmst.io.numbers import exact_numbers, needs_text


def _read(path, delimiter, handler, skip=0):
    """The lines of ``path`` as string columns.  With a ``handler`` (Python, called for lines
    of another field count) the parse runs on the calling thread: Arrow's parse threads calling
    into it were seen to crash the interpreter (a segmentation fault in one CI run out of
    several, while tracemalloc traced allocations).  Without one it runs on Arrow's threads and
    a line of another field count raises ArrowInvalid.  ``skip``: leading lines left out."""
    import pyarrow as pa
    import pyarrow.csv as pcsv
    names = ["k", "u", "v", "w"] if delimiter == " " else ["line"]
    return pcsv.read_csv(
        str(path), read_options=pcsv.ReadOptions(column_names=names, block_size=1 << 22,
                                                  use_threads=handler is None,
                                                  skip_rows=skip),
        parse_options=pcsv.ParseOptions(delimiter=delimiter, quote_char=False,
                                        invalid_row_handler=handler),
        convert_options=pcsv.ConvertOptions(column_types={c: pa.string() for c in names},
                                            strings_can_be_null=False))


def _leading_comments(path):
    """How many lines at the start of the file are comments ('c' lines, no blank line among
    them), read from its first MiB; None when that MiB holds nothing else (or no full line)."""
    import pyarrow as pa
    with pa.input_stream(str(path), compression="detect") as s:
        head = s.read(1 << 20)
    lines = head.split(b"\n")[:-1]             # the last piece may be a cut line
    for k, line in enumerate(lines):
        if not (line.startswith(b"c") and line[1:2] in (b" ", b"\t", b"\r", b"")):
            return k
    return None


def _single_spaced(path):
    """Fast path for files with one space between fields: (kinds, u, v, w) string columns, or
    None when a line is laid out otherwise (then :func:`_any_whitespace` reads it)."""
    import pyarrow as pa
    skip = _leading_comments(path)
    if skip is not None:            # comments only at the top (the usual layout): no handler,
        try:                        # so Arrow's threads parse the rest
            table = _read(path, " ", None, skip)
            return tuple(table.column(c) for c in "kuvw")
        except pa.ArrowInvalid:
            pass                    # a later line of another field count: read as below
    irregular = []

    def handler(row):
        text = (row.text or "").strip()
        if text and not text.startswith("c"):
            irregular.append(row.number)
        return "skip"
    table = _read(path, " ", handler)
    if irregular:
        return None
    return tuple(table.column(c) for c in "kuvw")


def _any_whitespace(path):
    """Every line split at runs of whitespace: (kinds, u, v, w) string columns; lines with
    other than four fields give empty or null fields, which the checks then refuse."""
    import pyarrow.compute as pc
    lines = pc.utf8_trim_whitespace(_read(path, "\x1f", lambda row: "error").column("line"))
    parts = pc.utf8_split_whitespace(lines.filter(pc.not_equal(lines, "")))
    parts = parts.filter(pc.not_equal(pc.list_element(parts, 0), "c"))   # comments: any length
    four = pc.equal(pc.list_value_length(parts), 4)
    if not pc.all(four).as_py():
        return None
    return tuple(pc.list_element(parts, i) for i in range(4))


def read_edges(path, compression, request):
    """An EdgeList of the arcs of a DIMACS .gr file; node ids are the file's 1-based ids."""
    import pyarrow as pa
    import pyarrow.compute as pc
    ok = False
    for reader in (_single_spaced, _any_whitespace):
        try:
            cols = reader(path)
            if cols is None:
                continue
            kinds = cols[0]
            is_p, is_a, is_c = (to_numpy(pc.equal(kinds, k)) for k in ("p", "a", "c"))
            if not (int(is_p.sum()) == 1 and is_a.any() and np.all(is_p | is_a | is_c)):
                continue
            row = int(np.flatnonzero(is_p)[0])
            head = [c[row].as_py() for c in cols]
            keep = pa.array(is_a)
            u, v, w = (c.filter(keep) for c in cols[1:])
            if not (head[1] == "sp" and head[2].isdigit() and head[3].isdigit()
                    and int(head[3]) == len(u) and row < int(np.flatnonzero(is_a)[0])):
                continue
            n = int(head[2])
            u = to_numpy(pc.cast(u, pa.int64()))
            v = to_numpy(pc.cast(v, pa.int64()))
            try:
                w = to_numpy(pc.cast(w, pa.int64()))
            except pa.ArrowInvalid:
                wf = pc.cast(w, pa.float64())
                if needs_text(wf):   # beyond 2**53: exact integers, no silent overflow
                    wf = exact_numbers(w, wf, "weight", str(path), lambda i: f"arc {i + 1}")
                w = to_numpy(wf)
            ok = (min(u.min(), v.min()) >= 1 and max(u.max(), v.max()) <= n
                  and not (w.dtype.kind == "f" and np.isnan(w).any()))
        except FileFormatError:
            raise
        except (pa.ArrowInvalid, ValueError, TypeError, IndexError):
            ok = False
        break
    if ok:
        n = check_declared_nodes(n, int(u.size), request.declared_nodes, str(path), "arcs")
        dt = id_dtype(n)
        return EdgeList((u - 1).astype(dt), (v - 1).astype(dt), w, n,
                        np.arange(1, n + 1, dtype=np.int64), source=str(path),
                        columns=("tail", "head", "weight"))
    raise _diagnose(path)


def _diagnose(p) -> FileFormatError:
    """Error path: scan the .gr file line by line and word the first problem."""
    header = None
    n_arcs = 0
    with open(p, "r", encoding="utf-8", errors="replace") as f:
        for lineno, line in enumerate(f, start=1):
            parts = line.split()
            if not parts or parts[0] == "c":
                continue
            if parts[0] == "p":
                if header is not None:
                    return FileFormatError(f"{p}: line {lineno}: a second 'p' line (the first is "
                                           f"on line {header[0]}); a .gr file has one.")
                if len(parts) != 4 or parts[1] != "sp" or not all(x.isdigit() for x in parts[2:]):
                    return FileFormatError(f"{p}: line {lineno}: {line.strip()!r} is not a "
                                           f"'p sp NODES ARCS' header line.")
                header = (lineno, int(parts[2]), int(parts[3]))
                continue
            if parts[0] == "a":
                if header is None:
                    return FileFormatError(f"{p}: line {lineno}: an arc before the 'p sp NODES "
                                           f"ARCS' header line; put the header first.")
                if len(parts) != 4:
                    return FileFormatError(f"{p}: line {lineno}: {line.strip()!r} should be "
                                           f"'a TAIL HEAD WEIGHT' (4 fields).")
                try:
                    u, v = int(parts[1]), int(parts[2])
                except ValueError:
                    return FileFormatError(f"{p}: line {lineno}: node ids {parts[1]!r}, "
                                           f"{parts[2]!r} are not integers.")
                try:
                    w = float(parts[3])
                except ValueError:
                    return FileFormatError(f"{p}: line {lineno}: weight {parts[3]!r} is not a "
                                           f"number.")
                if math.isnan(w):
                    return FileFormatError(f"{p}: line {lineno}: weight is NaN; every arc needs "
                                           f"a comparable weight.")
                for x in (u, v):
                    if not 1 <= x <= header[1]:
                        return FileFormatError(f"{p}: line {lineno}: node {x} is outside 1..."
                                               f"{header[1]} (the header on line {header[0]} "
                                               f"says {header[1]} nodes; ids are 1-based).")
                n_arcs += 1
                continue
            return FileFormatError(f"{p}: line {lineno}: unexpected line {line.strip()[:60]!r}; "
                                   f"expected 'c' comments, one 'p sp NODES ARCS' line and "
                                   f"'a TAIL HEAD WEIGHT' lines.")
    if header is None:
        return FileFormatError(f"{p}: no 'p sp NODES ARCS' header line; is this a DIMACS "
                               f"shortest-path .gr file?")
    if n_arcs != header[2]:
        arcs = "arc" if header[2] == 1 else "arcs"
        lines = "line" if n_arcs == 1 else "lines"
        return FileFormatError(f"{p}: the header on line {header[0]} says {header[2]} {arcs} but "
                               f"the file has {n_arcs} 'a' {lines}; fix the count or the file "
                               f"(was it cut short?).")
    return FileFormatError(f"{p}: the file could not be read as a DIMACS .gr file.")


registry.register(registry.Format("gr", (".gr",), 50, read_edges=read_edges,
                                  declares_nodes=True))
