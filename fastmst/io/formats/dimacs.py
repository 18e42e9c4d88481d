"""DIMACS shortest-path graphs (``.gr``): ``c`` comments, one ``p sp NODES ARCS`` line and
``a TAIL HEAD WEIGHT`` lines with 1-based ids; both directions of a road are two parallel edges.

The fast path parses the file with pyarrow; when anything is off, the error path reads it line
by line and words the first problem.  Column and node-table options do not apply.
"""
from __future__ import annotations

import math

import numpy as np

from fastmst.io import registry
from fastmst.io.checks import FileFormatError
from fastmst.io.columns import to_numpy
from fastmst.io.edgelist import EdgeList
from fastmst.io.labels import id_dtype


def _skip(row):
    return "skip"


def read_edges(path, compression, request):
    """An EdgeList of the arcs of a DIMACS .gr file; node ids are the file's 1-based ids."""
    import pyarrow as pa
    import pyarrow.compute as pc
    import pyarrow.csv as pcsv
    src = str(path)
    try:
        table = pcsv.read_csv(
            src, read_options=pcsv.ReadOptions(column_names=["k", "u", "v", "w"],
                                               block_size=1 << 22),
            parse_options=pcsv.ParseOptions(delimiter=" ", invalid_row_handler=_skip),
            convert_options=pcsv.ConvertOptions(column_types={c: pa.string() for c in "kuvw"}))
    except pa.ArrowInvalid:
        table = None
    if table is not None:
        kinds = table.column("k")
        is_a = to_numpy(pc.equal(kinds, "a"))
        is_p = to_numpy(pc.equal(kinds, "p"))
        if int(is_p.sum()) == 1 and int(is_a.sum()):
            prow = int(np.flatnonzero(is_p)[0])
            try:
                n = int(table.column("v")[prow].as_py())
                m = int(table.column("w")[prow].as_py())
                arcs = table.filter(pa.array(is_a))
                u = to_numpy(pc.cast(arcs.column("u"), pa.int64()))
                v = to_numpy(pc.cast(arcs.column("v"), pa.int64()))
                wcol = arcs.column("w")
                try:
                    w = to_numpy(pc.cast(wcol, pa.int64()))
                except pa.ArrowInvalid:
                    w = to_numpy(pc.cast(wcol, pa.float64()))
                first_a = int(np.flatnonzero(is_a)[0])
                ok = (table.column("u")[prow].as_py() == "sp" and m == u.size and prow < first_a
                      and u.size and min(u.min(), v.min()) >= 1 and max(u.max(), v.max()) <= n
                      and not (w.dtype.kind == "f" and np.isnan(w).any()))
            except (pa.ArrowInvalid, ValueError, TypeError):
                ok = False
            if ok:
                dt = id_dtype(n)
                return EdgeList((u - 1).astype(dt), (v - 1).astype(dt), w, n,
                                np.arange(1, n + 1, dtype=np.int64), source=src,
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
        return FileFormatError(f"{p}: the header on line {header[0]} says {header[2]} arcs but "
                               f"the file has {n_arcs} 'a' lines; fix the count or the file "
                               f"(was it cut short?).")
    return FileFormatError(f"{p}: the file could not be read as a DIMACS .gr file.")


registry.register(registry.Format("gr", (".gr",), 50, read_edges=read_edges))
