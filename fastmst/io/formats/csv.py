"""CSV and TSV: comma- or tab-separated text with a header line, optionally compressed.

Read with pyarrow's multi-threaded parser in blocks of :data:`CSV_BLOCK_SIZE` bytes; ``.gz``,
``.zst`` and ``.bz2`` files are read directly.  When pyarrow rejects a file, the error path
scans it line by line to name the first bad line (a wrong field count or a number that does not
parse).  Cells in :data:`NULLS` read as missing in numeric columns ("nan" is not among them: it
reads as NaN and gets its own error).  Label columns (endpoints, node ids, the label pairs of
lists of links) are read as text, exactly as written, never guessed: ``007`` stays ``007``,
``true`` stays ``true``, ``NA`` is a label (:mod:`fastmst.io.labels` turns them into integers
only when ``ids="integer"`` asks for it).  Endpoint labels numbered by first appearance (no
node table, ``ids="text"``) are parsed as bytes and checked for UTF-8 once mapped, on the
distinct labels rather than on every cell; a label that is not UTF-8 is refused naming its row.

Writing: labels are written verbatim (quoted), so every label reads back unchanged, also those
beginning with ``=``, ``+``, ``-`` or ``@`` that spreadsheets take for formulas (see
``spreadsheet_safe`` in :func:`fastmst.io.write_table`).  Labels with a line break are refused:
the fast multi-threaded parser splits records at line ends, so they would not read back.
"""
from __future__ import annotations

import csv as _csv
import io as _io
import os
import re

import numpy as np

from fastmst.io import registry
from fastmst.io.checks import FileFormatError, csv_row
from fastmst.io.columns import (NULLS, carried_columns, choose_edge_columns, guessed_roles,
                                typed_text_column)
from fastmst.io.edgelist import edges_from_table
from fastmst.io.numbers import exact_numbers, needs_text

CSV_BLOCK_SIZE = 1 << 22   # bytes per parsing block: fewer, larger chunks than pyarrow's 1 MiB


# the first bytes of files that are not CSV/TSV text, and what they are
_MAGIC = ((b"PAR1", "a Parquet file (name it .parquet)"),
          (b"PK\x03\x04", "a zip archive (.npz, or a spreadsheet: export it as CSV)"),
          (b"\x1f\x8b", "gzip-compressed (name it .csv.gz or .tsv.gz)"),
          (b"\x28\xb5\x2f\xfd", "zstd-compressed (name it .csv.zst or .tsv.zst)"),
          (b"BZh", "bzip2-compressed (name it .csv.bz2 or .tsv.bz2)"),
          (b"SQLite format 3\x00", "an SQLite database or GeoPackage (name it .gpkg)"),
          (b"\x93NUMPY", "a NumPy .npy array"),
          (b"\xff\xfe", "UTF-16 text (save it as UTF-8)"),
          (b"\xfe\xff", "UTF-16 text (save it as UTF-8)"))


def _check_text(path, head: bytes) -> None:
    """The first bytes of a CSV/TSV file must be text: binary files (another format under a
    text name) are a FileFormatError that says what they look like.  A NUL byte in the header
    line says binary too (labels further down may hold one: they read back as written)."""
    what = next((w for magic, w in _MAGIC if head.startswith(magic)), None)
    nul = head.split(b"\n", 1)[0].find(b"\x00")
    if what is None and nul < 0:
        return
    found = f"it looks like {what}" if what else f"it holds a NUL byte at byte {nul}"
    raise FileFormatError(f"{path}: is not CSV/TSV text ({found}); expected UTF-8 text with a "
                          f"header line. Give the file the suffix of its format, or pass "
                          f"format=... (CLI --format).")


def _header(path, delimiter, compression):
    """The column names: the first line that is not empty, as pyarrow's parser takes it (a
    line ends at ``\n`` or ``\r`` only, not at the other Unicode line breaks that
    ``str.splitlines`` knows), read in blocks until that line is complete."""
    import pyarrow as pa
    head = b""
    with pa.input_stream(str(path), compression=compression) as s:
        while True:
            block = s.read(1 << 16)
            head += block
            lines = re.split(rb"\r\n|\r|\n", head.lstrip(b"\r\n"))
            if not block or len(lines) > 1:
                break
    _check_text(path, head[:1 << 16])
    text = head.decode("utf-8-sig", errors="replace")
    if not text.strip():
        raise FileFormatError(f"{path}: the file is empty; expected a header line naming the "
                              f"columns and one line per edge.")
    first = re.split(r"\r\n|\r|\n", text.lstrip("\r\n"))[0]
    return next(_csv.reader([first], delimiter=delimiter), [])


def _first_bad_line(path, delimiter, compression, numeric, decimal_comma=False):
    """Error path only: find the first line whose field count or number is wrong."""
    import pyarrow as pa
    with pa.input_stream(str(path), compression=compression) as s:
        text = _io.TextIOWrapper(s, encoding="utf-8-sig", errors="replace", newline="")
        reader = _csv.reader(text, delimiter=delimiter)
        header = next(reader, [])
        idx = {n: i for i, n in enumerate(header)}
        for lineno, row in enumerate(reader, start=2):
            if not row:
                continue
            if len(row) != len(header):
                return (f"line {lineno} has {len(row)} fields, the header has {len(header)} "
                        f"({delimiter!r}-separated); fix that line (a stray or missing "
                        f"separator, or an unquoted separator inside a label)")
            for name in numeric:
                v = row[idx[name]]
                try:
                    float(v.replace(",", ".") if decimal_comma else v)
                except ValueError:
                    return (f"{csv_row(lineno - 2)}: value {v!r} in column {name!r} is "
                            f"not a number; expected a number such as 12.5. Fix or drop that row")
    return None


def read_csv(path, delimiter, compression, columns, numeric, progress=None, text=(),
             decimal_comma=False, record="edge", raw=()):
    """(table, header, chosen columns) of a CSV/TSV file.

    ``columns(header)`` picks the columns to read; ``numeric(cols)`` names those that must be
    numbers (for the error scan); ``text`` names columns read as text, as written;
    ``progress(done_bytes, total_bytes)`` is called while reading; ``decimal_comma`` reads
    ``12,5`` as 12.5 in number columns; ``record`` names what one data row is ("edge") for the
    message about a file with a header and no rows.  ``raw(header)`` (or a list) names text
    columns read as bytes, not checked for UTF-8 while parsing: the caller checks what it keeps.
    """
    try:
        return _read_unchecked(path, delimiter, compression, columns, numeric, progress, text,
                               decimal_comma, record, raw)
    except OSError as exc:   # pyarrow reports corrupt or truncated compressed data this way
        how = (f"is it complete and really {compression}-compressed?" if compression else
               "is it a complete text file?")
        raise FileFormatError(f"{path}: could not be read ({exc}); {how}") from None


def _read_unchecked(path, delimiter, compression, columns, numeric, progress=None, text=(),
                    decimal_comma=False, record="edge", raw=()):
    import pyarrow as pa
    import pyarrow.csv as pcsv
    header = _header(path, delimiter, compression)
    read = pcsv.ReadOptions(use_threads=True, block_size=CSV_BLOCK_SIZE)
    parse = pcsv.ParseOptions(delimiter=delimiter)
    cols = columns(header)
    texts = text(header) if callable(text) else text
    as_bytes = set(raw(header) if callable(raw) else raw)
    convert = pcsv.ConvertOptions(include_columns=list(dict.fromkeys(cols)), null_values=NULLS,
                                  column_types={c: pa.binary() if c in as_bytes else pa.string()
                                                for c in texts if c in cols},
                                  strings_can_be_null=False,
                                  decimal_point="," if decimal_comma else ".")
    try:
        if progress is not None:
            src = _CountingFile(path, progress)
            stream = pa.PythonFile(src, mode="r")
            if compression:
                stream = pa.CompressedInputStream(stream, compression)
            with stream:
                table = pcsv.read_csv(stream, read_options=read, parse_options=parse,
                                      convert_options=convert)
        else:
            source = (pa.input_stream(str(path), compression=compression) if compression
                      else str(path))
            table = pcsv.read_csv(source, read_options=read, parse_options=parse,
                                  convert_options=convert)
    except pa.ArrowInvalid as exc:
        where = _first_bad_line(path, delimiter, compression, [c for c in numeric(cols) if c],
                                decimal_comma)
        msg = where or f"the file could not be parsed ({exc})"
        if where is None and "invalid UTF8" in str(exc):
            msg = (f"is not UTF-8 text ({exc}); save it as UTF-8 (spreadsheets: 'CSV UTF-8'), "
                   f"or convert it, e.g. iconv -f latin1 -t utf-8")
        raise FileFormatError(f"{path}: {msg}.") from None
    if table.num_rows == 0:
        raise FileFormatError(f"{path}: the file has a header ({', '.join(header)}) but no "
                              f"{record}s; expected one line per {record} after the header.")
    return table, header, cols


class _CountingFile:
    """A binary file that reports how many bytes were read (for progress bars)."""

    def __init__(self, path, progress):
        self._f = open(path, "rb")
        self._total = os.fstat(self._f.fileno()).st_size
        self._done = 0
        self._progress = progress
        self.closed = False

    def read(self, n=-1):
        b = self._f.read(n)
        self._done += len(b)
        self._progress(self._done, self._total)
        return b

    def readable(self):
        return True

    def seekable(self):
        return False

    def close(self):
        self._f.close()
        self.closed = True


def read_edges(path, compression, request, *, delimiter):
    """An EdgeList from a CSV/TSV file (columns as chosen by ``request``; the other columns
    it keeps are read as text, then as numbers where every cell is one, see
    :func:`fastmst.io.columns.typed_text_column`)."""
    chosen = {}
    delimiter = request.delimiter or delimiter

    def columns(header):
        chosen["cols"] = choose_edge_columns(header, request.tail, request.head, request.weight,
                                             str(path), request.nodes is not None)
        chosen["carry"] = carried_columns(header, chosen["cols"], request.keep_columns,
                                          request.link_id, str(path))
        return [x for x in chosen["cols"] if x in header] + chosen["carry"]

    def numeric(cols):
        return [chosen["cols"][2]] if chosen["cols"][2] in cols else []

    def labels(header):
        return list(chosen["cols"][:2]) + chosen["carry"]

    # text labels numbered by first appearance: parsed as bytes (no UTF-8 check of every cell
    # while parsing), the distinct labels checked once mapped (_utf8_labels)
    by_bytes = request.nodes is None and request.ids == "text"

    def as_bytes(header=None):
        return list(chosen["cols"][:2]) if by_bytes else []

    import pyarrow as pa
    table, _, _ = read_csv(path, delimiter, compression, columns, numeric, request.progress,
                           labels, request.decimal_comma, raw=as_bytes)
    raw = as_bytes()
    for name in raw:   # the bytes as text, unchecked until _utf8_labels
        i = table.column_names.index(name)
        table = table.set_column(i, name, pa.chunked_array(
            [c.view(pa.string()) for c in table.column(i).chunks], type=pa.string()))
    if request.progress is not None:   # parsed; checks and labels follow: no total known
        size = os.path.getsize(path)
        request.progress(size, None)
    wname = chosen["cols"][2]
    if wname in table.column_names:
        i = table.column_names.index(wname)
        table = table.set_column(i, wname, _exact_weights(
            table.column(i), path, delimiter, compression, wname, request.decimal_comma))
    for name in chosen["carry"]:
        if name != request.link_id:
            i = table.column_names.index(name)
            table = table.set_column(i, name, typed_text_column(table.column(name),
                                                                request.decimal_comma))
    edges = edges_from_table(table, chosen["cols"], str(path), csv_row, request.nodes,
                             request.ids, chosen["carry"], request.link_id,
                             guessed_roles(request.tail, request.head, request.weight))
    if raw:
        _utf8_labels(edges, raw, path)
    return edges


def _utf8_labels(edges, names, path):
    """The distinct labels of ``edges`` (a pyarrow text array, mapped from label columns read
    as bytes) must be UTF-8: every cell is one of them.  Otherwise a FileFormatError naming
    the first row that holds a bad label."""
    import pyarrow as pa
    labels = edges.__dict__.get("_labels")
    if labels is None or isinstance(labels, np.ndarray):
        return
    try:
        labels.validate(full=True)
        return
    except pa.ArrowInvalid:
        pass
    raw = labels.view(pa.large_binary() if pa.types.is_large_string(labels.type)
                      else pa.binary())
    bad = np.array([i for i, b in enumerate(raw.to_pylist()) if not _decodes(b)])
    in_tail, in_head = np.isin(edges.tail, bad), np.isin(edges.head, bad)
    row = int(np.flatnonzero(in_tail | in_head)[0])
    name, ids = (names[0], edges.tail) if in_tail[row] else (names[1], edges.head)
    raise FileFormatError(f"{path}: {csv_row(row)}: the label in column {name!r} is not UTF-8 "
                          f"text ({raw[int(ids[row])].as_py()[:40]!r}; {bad.size} such labels "
                          f"in all); save the file as UTF-8 (spreadsheets: 'CSV UTF-8'), or "
                          f"convert it, e.g. iconv -f latin1 -t utf-8.")


def _decodes(b: bytes) -> bool:
    try:
        b.decode("utf-8")
        return True
    except UnicodeDecodeError:
        return False


def _exact_weights(col, path, delimiter, compression, name, decimal_comma):
    """The weight column ``col`` as parsed, made exact by :func:`fastmst.io.numbers.
    exact_numbers` (integers beyond 2**63 - 1 as uint64 rather than rounded floats, no silent
    overflow to infinity); the column's text is read again only when its magnitudes need it."""
    import pyarrow as pa
    import pyarrow.csv as pcsv
    if not needs_text(col):
        return col
    source = pa.input_stream(str(path), compression=compression) if compression else str(path)
    text = pcsv.read_csv(source, read_options=pcsv.ReadOptions(block_size=CSV_BLOCK_SIZE),
                         parse_options=pcsv.ParseOptions(delimiter=delimiter),
                         convert_options=pcsv.ConvertOptions(
                             include_columns=[name], column_types={name: pa.string()},
                             null_values=NULLS, strings_can_be_null=True)).column(0)
    return exact_numbers(text, col, name, str(path), csv_row)


def read_table(path, compression, text=(), *, delimiter, decimal_comma=False):
    """Every column of a CSV/TSV file, with its row wording; ``text(header)`` (or a list)
    names the columns read as text; ``decimal_comma`` reads ``12,5`` as 12.5."""
    table, _, _ = read_csv(path, delimiter, compression, lambda header: header, lambda cols: [],
                           text=text, decimal_comma=decimal_comma, record="data row")
    return table, csv_row


def write_table(table, tmp, compression, *, delimiter):
    """A pyarrow Table as CSV/TSV (compressed when ``compression`` names a codec).

    Text cells with a line break are refused (a ValueError naming the first), since the reader
    splits records at line ends.  Floating columns are written as text that reads back as the
    same floats (:func:`_float_text`); being text, they are quoted (``"1.0"``), which CSV
    readers still read as numbers.
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    import pyarrow.csv as pcsv
    for i, col in enumerate(table.columns):
        if pa.types.is_floating(col.type):
            table = table.set_column(i, table.column_names[i], _float_text(col))
    for name in table.column_names:
        col = table.column(name)
        if pa.types.is_string(col.type) or pa.types.is_large_string(col.type):
            broken = pc.match_substring_regex(col, "[\r\n]")
            if pc.any(broken).as_py():
                i = int(np.flatnonzero(broken.to_numpy(zero_copy_only=False))[0])
                raise ValueError(f"column {name!r}: label {col[i].as_py()!r} has a line break; "
                                 f"CSV/TSV output cannot carry it (records end at line ends). "
                                 f"Write Parquet (.parquet) or .npz, which keep every label, "
                                 f"or remove the line breaks.")
    opts = pcsv.WriteOptions(delimiter=delimiter)
    with pa.OSFile(tmp, "wb") as raw:
        sink = pa.CompressedOutputStream(raw, compression) if compression else raw
        pcsv.write_csv(table, sink, write_options=opts)
        if compression:
            sink.close()


def _float_text(col):
    """A floating column as text that reads back as the same floats: pyarrow's shortest
    round-trip form (``0.1``, ``1e+16``, ``inf``) with ``.0`` after a whole number (pyarrow's
    writer puts 1.0 as ``1`` and -0.0 as ``-0``, which read back as the integers 1 and 0)."""
    import pyarrow as pa
    import pyarrow.compute as pc
    text = pc.cast(col, pa.string())
    whole = pc.match_substring_regex(text, r"^[-+]?[0-9]+$")
    return pc.if_else(whole, pc.binary_join_element_wise(text, ".0", ""), text)


for _name, _suffixes, _order, _delimiter in (("csv", (".csv", ".txt"), 10, ","),
                                             ("tsv", (".tsv", ".tab"), 11, "\t")):
    registry.register(registry.Format(
        _name, _suffixes, _order, compressed=True, read_edges=read_edges, read_table=read_table,
        write_table=write_table, options={"delimiter": _delimiter}, spreadsheet=True))
