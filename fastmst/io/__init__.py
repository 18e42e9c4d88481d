"""Edge lists in and out: files, tables, sparse matrices and networkx graphs, with node labels.

Readers return an :class:`EdgeList`: compact node ids ``0..n_nodes-1`` in ``tail``/``head``
(what the solvers want), the weights, and the user's node ``labels`` so that every output can
speak the user's ids again.  Writers replace a file only with a complete new one: they write a
temporary file beside the target and rename it, so a failure leaves the old file untouched.

Label rule: without a node table, compact id ``i`` is the ``i``-th smallest label (numeric order
for integer ids, code-point order for strings).  With a node table, compact id ``i`` is row ``i``
of the node table, so nodes without edges are kept as isolated nodes.
"""
from __future__ import annotations

import math
import os
import tempfile
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from fastmst import validation
from fastmst.geometry.geodesy import edge_lengths
from fastmst.validation import FileFormatError

FORMATS = ("csv", "tsv", "parquet", "npz", "mtx", "gr")
WRITE_FORMATS = ("csv", "tsv", "parquet", "npz", "geojson")
_COMPRESSIONS = {".gz": "gzip", ".gzip": "gzip", ".zst": "zstd", ".zstd": "zstd", ".bz2": "bz2"}
_SUFFIX_FORMATS = {".csv": "csv", ".tsv": "tsv", ".tab": "tsv", ".txt": "csv",
                   ".parquet": "parquet", ".pq": "parquet", ".npz": "npz", ".mtx": "mtx",
                   ".gr": "gr", ".geojson": "geojson", ".json": "geojson"}
_LONLAT = (("lon", "lat"), ("longitude", "latitude"), ("lng", "lat"), ("long", "lat"))
_XY = (("x", "y"), ("easting", "northing"))
# Cells read as missing in numeric columns.  "nan" is not among them: it reads as NaN and gets
# its own error.  Text labels are never turned into missing values ("NA" can be a label).
CSV_BLOCK_SIZE = 1 << 22   # bytes per parsing block: fewer, larger chunks than pyarrow's 1 MiB
_NULLS = ["", "NA", "N/A", "n/a", "NULL", "null", "None", "#N/A"]


@dataclass
class EdgeList:
    """An edge list with compact node ids and the user's node labels.

    Attributes
    ----------
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Compact node ids in ``[0, n_nodes)``; edge ``i`` is row ``i`` of the source.
    weight : ndarray of shape (E,)
        Edge weights (int64 or float64 as read; float64 when computed from geometry).
    n_nodes : int
    labels : ndarray of shape (n_nodes,) or None
        The user's label of every compact id; None means the labels are the ids themselves.
    coords : ndarray of shape (n_nodes, 2), dtype=float64, or None
        Node coordinates when a node table gave them.
    geographic : bool
        True when ``coords`` are (longitude, latitude) in degrees.
    source : str
        Where the edges came from (file name or a description), for messages.
    columns : tuple of str
        Names for the tail, head and weight columns of output files (the input's names).
    """
    tail: np.ndarray
    head: np.ndarray
    weight: np.ndarray
    n_nodes: int
    labels: np.ndarray | None = None
    coords: np.ndarray | None = None
    geographic: bool = False
    source: str = "<edges>"
    columns: tuple = ("tail", "head", "weight")

    @property
    def n_edges(self) -> int:
        return int(self.tail.shape[0])

    def label(self, ids) -> np.ndarray:
        """The user's labels of compact node ids (the ids themselves when there are no labels)."""
        ids = np.asarray(ids, dtype=np.int64)
        return ids.copy() if self.labels is None else self.labels[ids]

    def solve(self, **kwargs):
        """``minimum_spanning_forest`` of these edges; keyword arguments are passed on."""
        from fastmst.solve.solve import minimum_spanning_forest
        return minimum_spanning_forest(self.tail, self.head, self.weight, self.n_nodes, **kwargs)

    def __repr__(self) -> str:
        return (f"EdgeList({self.source!r}, n_nodes={self.n_nodes}, n_edges={self.n_edges}, "
                f"labelled={self.labels is not None}, coords={self.coords is not None})")


# --- formats and file names -------------------------------------------------------------------

def detect_format(path, format=None, *, valid=FORMATS, func="read_edges"):
    """(format, compression) from an explicit ``format`` or the file name's suffixes."""
    p = Path(path)
    suffixes = [s.lower() for s in p.suffixes]
    compression = None
    if suffixes and suffixes[-1] in _COMPRESSIONS:
        compression = _COMPRESSIONS[suffixes.pop()]
    if format is not None:
        return validation.check_choice(format, valid, "format", func), compression
    fmt = _SUFFIX_FORMATS.get(suffixes[-1]) if suffixes else None
    if fmt not in valid:
        raise ValueError(f"{func}: cannot tell the format of {str(path)!r} from its name; "
                         f"expected a suffix for one of {', '.join(valid)} (CSV/TSV may end in "
                         f".gz or .zst). Rename the file" + (" or pass format=... (CLI: --format)."
                                                          if func == "read_edges" else "."))
    if compression and fmt not in ("csv", "tsv"):
        raise ValueError(f"{func}: {str(path)!r} is a compressed {fmt} file; only CSV/TSV are "
                         f"read compressed. Decompress it first.")
    return fmt, compression


def _where_csv(i: int) -> str:
    return f"data row {i + 1} (line {i + 2})"


def _where_row(i: int) -> str:
    return f"row {i} (counting from 0)"


# --- label encoding ---------------------------------------------------------------------------

def _id_dtype(n: int):
    return np.int32 if n < validation.INT32_LIMIT else np.int64


def _is_int(arr) -> bool:
    return getattr(arr, "dtype", None) is not None and np.dtype(arr.dtype).kind in "iu"


def encode_labels(tail, head, source: str, names=("tail", "head")):
    """Compact ids for two label arrays (NumPy); returns (tail_ids, head_ids, labels).

    ``labels`` is None when the labels already are the compact ids 0..n-1.
    """
    t, h = np.asarray(tail), np.asarray(head)
    for arr, name in ((t, names[0]), (h, names[1])):
        if arr.dtype.kind == "f":
            raise FileFormatError(f"{source}: node ids in column {name!r} are decimal numbers "
                                  f"(dtype {arr.dtype}); expected integers or text labels. "
                                  f"Write the ids without a decimal point.")
        if arr.dtype.kind == "b":
            raise FileFormatError(f"{source}: node ids in column {name!r} are true/false; "
                                  f"expected integers or text labels.")
    if t.size == 0:
        return t.astype(np.int32), h.astype(np.int32), np.empty(0, dtype=t.dtype)
    if _is_int(t) and _is_int(h):
        lo = min(int(t.min()), int(h.min()))
        hi = max(int(t.max()), int(h.max()))
        span = hi - lo + 1
        if span <= 4 * (t.size + h.size) + 1024:
            present = np.zeros(span, dtype=bool)
            present[t - lo if lo else t] = True
            present[h - lo if lo else h] = True
            if lo == 0 and present.all():
                dt = _id_dtype(span)
                return t.astype(dt, copy=False), h.astype(dt, copy=False), None
            n = int(np.count_nonzero(present))
            remap = np.cumsum(present, dtype=np.int64) - 1
            remap = remap.astype(_id_dtype(n))
            labels = (np.flatnonzero(present) + lo).astype(np.result_type(t.dtype, h.dtype))
            return remap[t - lo], remap[h - lo], labels
    both = np.concatenate([t, h]) if t.dtype == h.dtype else \
        np.concatenate([t.astype(str), h.astype(str)])
    labels, inverse = np.unique(both, return_inverse=True)
    inverse = inverse.astype(_id_dtype(labels.size))
    return inverse[:t.size], inverse[t.size:], labels


def _arrow_labels(tail, head, source, where, names):
    """Compact ids for two pyarrow label columns of any type; returns (tail, head, labels)."""
    import pyarrow as pa
    import pyarrow.compute as pc
    t, h = _plain(tail), _plain(head)
    for col, name in ((t, names[0]), (h, names[1])):
        if col.null_count:
            missing = col.is_null().to_numpy(zero_copy_only=False)
            validation.check_no_missing(missing, name, source, where, "read_edges")
    if pa.types.is_integer(t.type) and pa.types.is_integer(h.type):
        if t.type != h.type:
            t, h = pc.cast(t, pa.int64()), pc.cast(h, pa.int64())
        fast = _arrow_int_labels(t, h)
        if fast is not None:
            return fast
    if pa.types.is_floating(t.type) or pa.types.is_floating(h.type):
        return encode_labels(_np(t), _np(h), source, names)  # raises the decimal-ids error
    if t.type != h.type:
        t, h = pc.cast(t, pa.string()), pc.cast(h, pa.string())
    # Dictionary-encode each column in its own thread (one hash pass per column; pyarrow
    # releases the GIL), merge and sort the two small dictionaries, then turn each column's
    # codes into compact ids with one NumPy gather.
    from concurrent.futures import ThreadPoolExecutor
    with ThreadPoolExecutor(2) as ex:
        (dt_, ct), (dh_, ch) = ex.map(_dictionary_codes, (t, h))
        uniq = pc.unique(pa.chunked_array([dt_, dh_], type=t.type))
        uniq = uniq.take(pc.array_sort_indices(uniq))
        dt = _id_dtype(len(uniq))
        rt = _np(pc.index_in(dt_, value_set=uniq)).astype(dt)
        rh = _np(pc.index_in(dh_, value_set=uniq)).astype(dt)
        ti, hi = ex.map(lambda a: a[0][a[1]], ((rt, ct), (rh, ch)))
    if pa.types.is_string(t.type) or pa.types.is_large_string(t.type):
        if len(uniq) and uniq[0].as_py() == "":   # sorted, so an empty label comes first
            for col, name in ((t, names[0]), (h, names[1])):
                empty = _np(pc.equal(col, ""))
                validation.check_no_missing(empty, name, source, where, "read_edges")
    return ti, hi, _np(uniq)


def _plain(col):
    """Dictionary-encoded columns (pandas categoricals) decoded to their values."""
    import pyarrow as pa
    if pa.types.is_dictionary(col.type):
        return col.cast(col.type.value_type)
    return col


def _chunks(col):
    """The chunks of a pyarrow column as zero-copy NumPy views (the column has no nulls)."""
    return [c.to_numpy(zero_copy_only=True) for c in getattr(col, "chunks", [col])]


def _arrow_int_labels(t, h):
    """Integer label columns with a dense range: compact ids in one pass per column.

    Returns None when the labels are too spread out for a lookup table (the caller then hashes
    them).  The two columns are converted in two threads (NumPy releases the GIL).
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    from concurrent.futures import ThreadPoolExecutor
    if pa.types.is_uint64(t.type) or pa.types.is_uint64(h.type):
        return None
    n = len(t)
    if n == 0:
        return None
    mt, mh = pc.min_max(t).as_py(), pc.min_max(h).as_py()
    lo, hi = min(mt["min"], mh["min"]), max(mt["max"], mh["max"])
    span = hi - lo + 1
    if span > 4 * 2 * n + 1024:
        return None
    tc, hc = _chunks(t), _chunks(h)
    present = np.zeros(span, dtype=bool)
    for a in tc + hc:
        present[a - lo if lo else a] = True
    dense = lo == 0 and bool(present.all())
    if dense:
        remap, n_nodes, labels = None, span, None
    else:
        n_nodes = int(np.count_nonzero(present))
        remap = (np.cumsum(present, dtype=np.int64) - 1).astype(_id_dtype(n_nodes))
        labels = np.flatnonzero(present) + lo
    dt = _id_dtype(n_nodes)

    def fill(chunks):
        out = np.empty(n, dtype=dt)
        off = 0
        for a in chunks:
            k = a.shape[0]
            if remap is None:
                out[off:off + k] = a
            else:
                np.take(remap, a - lo if lo else a, out=out[off:off + k])
            off += k
        return out
    with ThreadPoolExecutor(2) as ex:
        ft, fh = ex.submit(fill, tc), ex.submit(fill, hc)
        return ft.result(), fh.result(), labels


def _dictionary_codes(col):
    """(distinct values, int codes) of a pyarrow column in one hash pass."""
    import pyarrow as pa
    d = col.dictionary_encode()
    chunks = d.chunks if isinstance(d, pa.ChunkedArray) else [d]
    dic = chunks[-1].dictionary
    if any(len(c.dictionary) != len(dic) for c in chunks):  # not one shared dictionary
        import pyarrow.compute as pc
        dic = pc.unique(col)
        return dic, _np(pc.index_in(col, value_set=dic))
    codes = np.concatenate([c.indices.to_numpy(zero_copy_only=False) for c in chunks])
    return dic, codes


def _np(col) -> np.ndarray:
    """A pyarrow array/column as NumPy (object arrays for text)."""
    return col.to_numpy(zero_copy_only=False) if hasattr(col, "to_numpy") else np.asarray(col)


def _arrow_weights(col, name, source, where, what="weight") -> np.ndarray:
    import pyarrow as pa
    import pyarrow.compute as pc
    col = _plain(col)
    if col.null_count:
        validation.check_no_missing(col.is_null().to_numpy(zero_copy_only=False), name, source,
                                    where, "read_edges")
    if pa.types.is_integer(col.type):
        return _np(pc.cast(col, pa.int64()))
    if pa.types.is_floating(col.type):
        w = _np(pc.cast(col, pa.float64()))
    elif pa.types.is_decimal(col.type):
        w = _np(pc.cast(col, pa.float64()))
    elif pa.types.is_string(col.type) or pa.types.is_large_string(col.type):
        vals = _np(col)
        for i, v in enumerate(vals):
            try:
                float(v)
            except (TypeError, ValueError):
                raise FileFormatError(f"{source}: {where(i)}: {what} {v!r} in column {name!r} is "
                                      f"not a number; expected a number such as 12.5. Fix or "
                                      f"drop that row.") from None
        w = vals.astype(np.float64)
    else:
        raise FileFormatError(f"{source}: column {name!r} holds {col.type} values; expected "
                              f"numeric values. Pick another column (CLI: --weight, --x, --y).")
    return _check_nan(w, name, source, where)


def _check_nan(w, name, source, where):
    if w.dtype.kind == "f" and w.size and np.isnan(w.min()):
        bad = np.isnan(w)
        first = int(np.flatnonzero(bad)[0])
        raise FileFormatError(f"{source}: {where(first)}: weight in column {name!r} is NaN "
                              f"({int(bad.sum())} NaN weights in all); every edge needs a "
                              f"comparable weight. Fill or drop those rows.")
    return w


# --- nodes (coordinates) ----------------------------------------------------------------------

@dataclass
class NodeTable:
    """Node labels with coordinates, row ``i`` is compact id ``i``."""
    labels: np.ndarray
    coords: np.ndarray
    geographic: bool
    source: str
    columns: tuple
    arrow_labels: object = None


def _pick_coord_columns(names, x, y, geographic, source):
    lower = {n.lower(): n for n in names}
    if x is not None or y is not None:
        if x is None or y is None:
            raise ValueError(f"{source}: give both coordinate columns (x= and y=), received "
                             f"x={x!r}, y={y!r}.")
        for c, role in ((x, "x"), (y, "y")):
            validation.check_column(c, names, source, role, "read_nodes")
        geo = geographic if geographic is not None else \
            (x.lower(), y.lower()) in _LONLAT
        return x, y, geo
    if geographic is not False:
        for a, b in _LONLAT:
            if a in lower and b in lower:
                return lower[a], lower[b], True
    if geographic is not True:
        for a, b in _XY:
            if a in lower and b in lower:
                return lower[a], lower[b], bool(geographic)
    raise FileFormatError(f"{source}: cannot find coordinate columns; expected lon/lat "
                          f"(longitude/latitude) or x/y, the columns present are "
                          f"{', '.join(map(repr, names))}. Name them with x=/y= "
                          f"(CLI: --x COLUMN --y COLUMN).")


def read_nodes(path_or_table, *, id=None, x=None, y=None, geographic=None,
               format=None) -> NodeTable:  # noqa: A002 (``id`` names the column)
    """Read a node table: one row per node with its label and coordinates.

    Parameters
    ----------
    path_or_table : str, Path, pandas.DataFrame or pyarrow.Table
        CSV/TSV (optionally .gz/.zst) or Parquet file, or a table.
    id : str, optional
        Label column; default a column named ``id``, else the first column.
    x, y : str, optional
        Coordinate columns; default ``lon``/``lat`` (or ``longitude``/``latitude``, ``lng``),
        which are read as geographic degrees, else ``x``/``y`` (planar).
    geographic : bool, optional
        Force the coordinates to be read as (longitude, latitude) degrees (True) or planar (False).
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    table, source, where = _load_table(path_or_table, format, "read_nodes")
    names = table.column_names
    if id is None:
        id = "id" if "id" in names else (names[0] if names else None)
    if id is None:
        raise FileFormatError(f"{source}: the node table has no columns; expected an id column "
                              f"and two coordinate columns.")
    validation.check_column(id, names, source, "node id", "read_nodes")
    xc, yc, geo = _pick_coord_columns([n for n in names if n != id], x, y, geographic, source)
    idcol = _plain(table.column(id))
    if idcol.null_count:
        validation.check_no_missing(idcol.is_null().to_numpy(zero_copy_only=False), id, source,
                                    where, "read_nodes")
    if pa.types.is_floating(idcol.type):
        raise FileFormatError(f"{source}: node ids in column {id!r} are decimal numbers; "
                              f"expected integers or text labels.")
    labels = _np(idcol)
    if len(pc.unique(idcol)) != len(idcol):   # hash check; sort only to name the rows
        validation.check_unique_labels(labels, id, source, where)
    coords = np.empty((len(labels), 2), dtype=np.float64)
    for j, c in enumerate((xc, yc)):
        col = table.column(c)
        vals = np.asarray(_arrow_weights(col, c, source, where, "coordinate"), np.float64)
        bad = ~np.isfinite(vals)
        if bad.any():
            i = int(np.flatnonzero(bad)[0])
            raise FileFormatError(f"{source}: {where(i)}: coordinate {c!r} is {vals[i]}; "
                                  f"expected a finite number.")
        coords[:, j] = vals
    if geo:
        badlat = np.abs(coords[:, 1]) > 90
        if badlat.any():
            i = int(np.flatnonzero(badlat)[0])
            raise FileFormatError(f"{source}: {where(i)}: latitude {coords[i, 1]} in column "
                                  f"{yc!r} is outside [-90, 90]; are longitude and latitude "
                                  f"swapped? Name them with x=/y= (CLI: --x/--y).")
    return NodeTable(labels, coords, geo, source, (id, xc, yc), idcol)


# --- tables from files ------------------------------------------------------------------------

def _csv_header(path, delimiter, compression):
    import pyarrow as pa
    import csv as _csv
    with pa.input_stream(str(path), compression=compression) as s:
        head = s.read(1 << 16)
    text = head.decode("utf-8-sig", errors="replace")
    if not text.strip():
        raise FileFormatError(f"{path}: the file is empty; expected a header line naming the "
                              f"columns and one line per edge.")
    first = text.splitlines()[0]
    return next(_csv.reader([first], delimiter=delimiter))


def _scan_csv(path, delimiter, compression, numeric):
    """Error path only: find the first line whose field count or number is wrong."""
    import csv as _csv
    import io as _io
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
                    float(v)
                except ValueError:
                    return (f"{_where_csv(lineno - 2)}: value {v!r} in column {name!r} is "
                            f"not a number; expected a number such as 12.5. Fix or drop that row")
    return None


def _read_csv(path, delimiter, compression, columns, numeric, progress=None):
    try:
        return _read_csv_unchecked(path, delimiter, compression, columns, numeric, progress)
    except OSError as exc:   # pyarrow reports corrupt or truncated compressed data this way
        how = (f"is it complete and really {compression}-compressed?" if compression else
               "is it a complete text file?")
        raise FileFormatError(f"{path}: could not be read ({exc}); {how}") from None


def _read_csv_unchecked(path, delimiter, compression, columns, numeric, progress=None):
    import pyarrow as pa
    import pyarrow.csv as pcsv
    header = _csv_header(path, delimiter, compression)
    read = pcsv.ReadOptions(use_threads=True, block_size=CSV_BLOCK_SIZE)
    parse = pcsv.ParseOptions(delimiter=delimiter)
    cols = columns(header)
    convert = pcsv.ConvertOptions(include_columns=list(dict.fromkeys(cols)),
                                  null_values=_NULLS)
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
        where = _scan_csv(path, delimiter, compression, [c for c in numeric(cols) if c])
        msg = where or f"the file could not be parsed ({exc})"
        raise FileFormatError(f"{path}: {msg}.") from None
    if table.num_rows == 0:
        raise FileFormatError(f"{path}: the file has a header ({', '.join(header)}) but no "
                              f"edges; expected one line per edge after the header.")
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


def _load_table(obj, format, func):
    """(pyarrow table, source name, row wording) from a file path or an in-memory table."""
    import pyarrow as pa
    if isinstance(obj, pa.Table):
        return obj, "<pyarrow table>", _where_row
    if _is_pandas(obj):
        return _pandas_to_arrow(obj), "<pandas DataFrame>", _where_row
    if not isinstance(obj, (str, os.PathLike)):
        raise TypeError(f"{func}: expected a file path, a pandas DataFrame or a pyarrow Table, "
                        f"received {type(obj).__name__}.")
    path = _existing(obj, func)
    fmt, comp = detect_format(path, format, valid=("csv", "tsv", "parquet"), func=func)
    if fmt == "parquet":
        return _read_parquet(path, None), str(path), _where_row
    delim = "\t" if fmt == "tsv" else ","
    table, _, _ = _read_csv(path, delim, comp, lambda header: header, lambda cols: [])
    return table, str(path), _where_csv


def _existing(path, func) -> Path:
    p = Path(path)
    if not p.exists():
        raise FileNotFoundError(f"{func}: no such file {str(p)!r}; check the path (the current "
                                f"directory is {os.getcwd()!r}).")
    if p.is_dir():
        raise FileFormatError(f"{p}: is a directory; expected an edge-list file.")
    if p.stat().st_size == 0:
        raise FileFormatError(f"{p}: the file is empty; expected a header line and one line "
                              f"per edge.")
    return p


def _read_parquet(path, columns):
    import pyarrow as pa
    import pyarrow.parquet as pq
    try:
        return pq.read_table(str(path), columns=columns)
    except (pa.ArrowInvalid, OSError) as exc:
        raise FileFormatError(f"{path}: not a readable Parquet file ({exc}).") from None


def _is_pandas(obj) -> bool:
    return type(obj).__module__.startswith("pandas") and hasattr(obj, "columns")


def _pandas_to_arrow(df):
    import pyarrow as pa
    try:
        return pa.Table.from_pandas(df, preserve_index=False)
    except (pa.ArrowInvalid, pa.ArrowTypeError) as exc:
        raise TypeError(f"from_table: the DataFrame could not be converted ({exc}); give each "
                        f"column one type (numbers, or text labels).") from None


# --- edge columns to an EdgeList ----------------------------------------------------------------

def _default_columns(names, tail, head, weight, source, geometry):
    if len(names) < 2 and (tail is None or head is None):
        raise FileFormatError(f"{source}: found {len(names)} column(s) "
                              f"({', '.join(map(repr, names)) or 'none'}); expected at least "
                              f"tail and head columns and a weight. Is the separator right "
                              f"(CSV ',' or TSV tab)?")
    tail = names[0] if tail is None else tail
    head = names[1] if head is None else head
    validation.check_column(tail, names, source, "tail", "read_edges")
    validation.check_column(head, names, source, "head", "read_edges")
    if weight is None:
        rest = [n for n in names if n not in (tail, head)]
        if "weight" in names:
            weight = "weight"
        elif rest:
            weight = rest[0]
        else:
            raise FileFormatError(f"{source}: no weight column; the columns present are "
                                  f"{', '.join(map(repr, names))}. Add a weight column, or give "
                                  f"a node table with coordinates and weight='length' (CLI: "
                                  f"--nodes FILE --weight length).")
    if weight == "length" and "length" not in names and not geometry:
        raise FileFormatError(f"{source}: no column 'length'; to compute lengths from "
                              f"coordinates give a node table (nodes=..., CLI: --nodes FILE), "
                              f"or pick a weight column from {', '.join(map(repr, names))}.")
    if not (geometry and weight == "length" and "length" not in names):
        validation.check_column(weight, names, source, "weight", "read_edges")
    return tail, head, weight


def _edge_list_from_arrow(table, cols, source, where, nodes, metric_hint=None) -> EdgeList:
    tname, hname, wname = cols
    tcol, hcol = table.column(tname), table.column(hname)
    geometry = nodes is not None and wname == "length" and "length" not in table.column_names
    if nodes is None:
        t, h, labels = _arrow_labels(tcol, hcol, source, where, (tname, hname))
        n = int(labels.size) if labels is not None else \
            (max(int(t.max()), int(h.max())) + 1 if t.size else 0)
        coords, geo = None, False
    else:
        t, h = _node_index(tcol, hcol, nodes, source, where, (tname, hname))
        labels, n, coords, geo = nodes.labels, int(nodes.labels.size), nodes.coords, \
            nodes.geographic
    if geometry:
        w = edge_lengths(coords, t, h, metric="great-circle" if geo else "euclidean")
    else:
        w = _arrow_weights(table.column(wname), wname, source, where)
    return EdgeList(t, h, w, n, labels, coords, geo, source, (tname, hname, wname))


def _node_index(tcol, hcol, nodes: NodeTable, source, where, names):
    import pyarrow as pa
    import pyarrow.compute as pc
    value_set = nodes.arrow_labels
    if isinstance(value_set, pa.ChunkedArray):
        value_set = value_set.combine_chunks()
    out = []
    for col, name in ((_plain(tcol), names[0]), (_plain(hcol), names[1])):
        if col.null_count:
            validation.check_no_missing(col.is_null().to_numpy(zero_copy_only=False), name,
                                        source, where, "read_edges")
        vs = value_set
        if col.type != vs.type:
            if pa.types.is_integer(col.type) and pa.types.is_integer(vs.type):
                col, vs = pc.cast(col, pa.int64()), pc.cast(vs, pa.int64())
            else:
                col, vs = pc.cast(col, pa.string()), pc.cast(vs, pa.string())
        idx = pc.index_in(col, value_set=vs)
        if idx.null_count:
            missing = idx.is_null().to_numpy(zero_copy_only=False)
            i = int(np.flatnonzero(missing)[0])
            raise FileFormatError(f"{source}: {where(i)}: node {col[i].as_py()!r} in column "
                                  f"{name!r} is not in the node table {nodes.source} "
                                  f"({int(missing.sum())} such rows in all); add the node to "
                                  f"the node table or drop the edge.")
        out.append(_np(idx).astype(_id_dtype(len(vs))))
    return out[0], out[1]


def read_edges(path, *, tail=None, head=None, weight=None, format=None, nodes=None,
               progress=None) -> EdgeList:
    """Read an edge list from a file.

    Parameters
    ----------
    path : str or Path
        The file.  The format comes from the suffix unless ``format`` is given:
        ``.csv``/``.txt`` (comma), ``.tsv``/``.tab`` (tab), each optionally compressed
        (``.gz``, ``.zst``); ``.parquet``; ``.npz`` (arrays ``tail``, ``head``, ``weight``);
        ``.mtx`` (Matrix Market, through ``scipy.io``; every stored entry is an edge, explicit
        zeros kept, one triangle of a symmetric matrix); ``.gr`` (DIMACS shortest-path format,
        ``p sp n m`` and ``a u v w`` lines, 1-based ids).
    tail, head : str, optional
        Endpoint columns (CSV/TSV/Parquet/npz); default the first two columns.
    weight : str, optional
        Weight column; default the column named ``weight``, else the third column.  With a node
        table (``nodes``) and no column of that name, ``weight="length"`` computes each edge's
        length from the coordinates: Euclidean for x/y, great-circle metres for lon/lat.
    format : {"csv", "tsv", "parquet", "npz", "mtx", "gr"}, optional
    nodes : str, Path, DataFrame, pyarrow Table or NodeTable, optional
        A node table (see :func:`read_nodes`): compact ids follow its rows, every edge endpoint
        must appear in it, and its coordinates are kept for lengths, GeoJSON and plots.
    progress : callable(done_bytes, total_bytes), optional
        Called while an uncompressed or compressed CSV/TSV file is read (for progress bars).

    Returns
    -------
    EdgeList

    Raises
    ------
    FileNotFoundError
        No such file.
    FileFormatError (a ValueError)
        A malformed file: the message names the file and the line or row.

    Notes
    -----
    Great-circle lengths use the haversine formula on a sphere of the IUGG mean Earth radius
    (6 371 008.8 m); they approximate ellipsoidal distances to within about 0.5 %.
    """
    func = "read_edges"
    p = _existing(path, func)
    fmt, comp = detect_format(p, format, func=func)
    if nodes is not None and not isinstance(nodes, NodeTable):
        nodes = read_nodes(nodes)
    if fmt in ("csv", "tsv"):
        delim = "\t" if fmt == "tsv" else ","
        geometry = nodes is not None
        chosen = {}

        def columns(header):
            chosen["cols"] = _default_columns(header, tail, head, weight, str(p), geometry)
            c = chosen["cols"]
            return [x for x in c if x in header]

        table, header, cols = _read_csv(p, delim, comp, columns,
                                        lambda cols: [chosen["cols"][2]]
                                        if chosen["cols"][2] in cols else [], progress)
        return _edge_list_from_arrow(table, chosen["cols"], str(p), _where_csv, nodes)
    if fmt == "parquet":
        import pyarrow.parquet as pq
        try:
            names = pq.read_schema(str(p)).names
        except Exception as exc:  # pyarrow raises several types for non-Parquet bytes
            raise FileFormatError(f"{p}: not a readable Parquet file ({exc}).") from None
        cols = _default_columns(names, tail, head, weight, str(p), nodes is not None)
        table = _read_parquet(p, [c for c in dict.fromkeys(cols) if c in names])
        if table.num_rows == 0:
            raise FileFormatError(f"{p}: the file has no rows; expected one row per edge.")
        return _edge_list_from_arrow(table, cols, str(p), _where_row, nodes)
    if fmt == "npz":
        return _read_npz(p, tail, head, weight, nodes)
    if fmt == "mtx":
        return _read_mtx(p)
    return _read_gr(p)


def _read_npz(p, tail, head, weight, nodes):
    import pyarrow as pa
    try:
        z = np.load(str(p), allow_pickle=False)
    except (ValueError, OSError) as exc:
        raise FileFormatError(f"{p}: not a readable .npz file ({exc}).") from None
    with z:
        names = list(z.files)
        if {"tail", "head"} <= set(names):  # the conventional names come first
            names = ["tail", "head"] + [x for x in names if x not in ("tail", "head")]
        cols = _default_columns(names, tail, head, weight, str(p), nodes is not None)
        try:
            arrays = {c: z[c] for c in cols if c in names}
        except ValueError as exc:
            raise FileFormatError(f"{p}: an array needs pickle to load ({exc}); save labels as "
                                  f"NumPy text (dtype 'U') or integers instead.") from None
    lengths = {a.shape[0] for a in arrays.values()}
    if any(a.ndim != 1 for a in arrays.values()) or len(lengths) != 1:
        shapes = {c: a.shape for c, a in arrays.items()}
        raise FileFormatError(f"{p}: arrays {shapes} must be 1-D and of one length (one entry "
                              f"per edge).")
    if lengths == {0}:
        raise FileFormatError(f"{p}: the arrays are empty; expected one entry per edge.")
    table = pa.table({c: pa.array(a) for c, a in arrays.items()})
    return _edge_list_from_arrow(table, cols, str(p), lambda i: f"entry {i}", nodes)


def _read_mtx(p):
    import scipy.io
    try:
        rows, cols_, entries, fmt, field_, symmetry = scipy.io.mminfo(str(p))
        m = scipy.io.mmread(str(p))
    except Exception as exc:  # scipy raises ValueError, OSError, RuntimeError for bad files
        raise FileFormatError(f"{p}: not a readable Matrix Market file ({exc}).") from None
    if fmt != "coordinate":
        raise FileFormatError(f"{p}: a dense ('array') Matrix Market file; expected a sparse "
                              f"'coordinate' file where each stored entry is an edge.")
    if rows != cols_:
        raise FileFormatError(f"{p}: the matrix is {rows} x {cols_}; an adjacency matrix must "
                              f"be square (node i is row i and column i).")
    if field_ == "complex":
        raise FileFormatError(f"{p}: complex entries cannot be edge weights; expected real, "
                              f"integer or pattern entries.")
    m = m.tocoo()
    r, c, w = m.row.astype(np.int64), m.col.astype(np.int64), m.data
    if symmetry != "general":
        keep = r >= c
        r, c, w = r[keep], c[keep], w[keep]
    if field_ == "pattern":
        w = np.ones(r.shape[0], dtype=np.int64)
    w = w.astype(np.int64 if w.dtype.kind in "iu" else np.float64)
    _check_nan(w, "value", str(p), lambda i: f"stored entry {i + 1}")
    dt = _id_dtype(rows)
    return EdgeList(r.astype(dt), c.astype(dt), w, int(rows),
                    np.arange(1, rows + 1, dtype=np.int64), source=str(p))


def _read_gr(p):
    """DIMACS shortest-path graph: ``c`` comments, one ``p sp n m`` line, ``m`` lines ``a u v w``."""
    import pyarrow as pa
    import pyarrow.csv as pcsv
    src = str(p)

    def skip(row):
        return "skip"

    try:
        table = pcsv.read_csv(
            src, read_options=pcsv.ReadOptions(column_names=["k", "u", "v", "w"],
                                               block_size=1 << 22),
            parse_options=pcsv.ParseOptions(delimiter=" ", invalid_row_handler=skip),
            convert_options=pcsv.ConvertOptions(column_types={c: pa.string() for c in "kuvw"}))
    except pa.ArrowInvalid:
        table = None
    if table is not None:
        import pyarrow.compute as pc
        kinds = table.column("k")
        is_a = _np(pc.equal(kinds, "a"))
        is_p = _np(pc.equal(kinds, "p"))
        n_lines_ok = int(is_a.sum())
        if int(is_p.sum()) == 1 and n_lines_ok:
            prow = int(np.flatnonzero(is_p)[0])
            try:
                n = int(table.column("v")[prow].as_py())
                m = int(table.column("w")[prow].as_py())
                arcs = table.filter(pa.array(is_a))
                u = _np(pc.cast(arcs.column("u"), pa.int64()))
                v = _np(pc.cast(arcs.column("v"), pa.int64()))
                wcol = arcs.column("w")
                try:
                    w = _np(pc.cast(wcol, pa.int64()))
                except pa.ArrowInvalid:
                    w = _np(pc.cast(wcol, pa.float64()))
                first_a = int(np.flatnonzero(is_a)[0])
                ok = (table.column("u")[prow].as_py() == "sp" and m == u.size and prow < first_a
                      and u.size and min(u.min(), v.min()) >= 1 and max(u.max(), v.max()) <= n
                      and not (w.dtype.kind == "f" and np.isnan(w).any()))
            except (pa.ArrowInvalid, ValueError, TypeError):
                ok = False
            if ok:
                dt = _id_dtype(n)
                return EdgeList((u - 1).astype(dt), (v - 1).astype(dt), w, n,
                                np.arange(1, n + 1, dtype=np.int64), source=src,
                                columns=("tail", "head", "weight"))
    raise _diagnose_gr(p)


def _diagnose_gr(p) -> FileFormatError:
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


# --- adapters -----------------------------------------------------------------------------------

def from_table(table, *, tail=None, head=None, weight=None, nodes=None) -> EdgeList:
    """An EdgeList from a pandas DataFrame or pyarrow Table (one row per edge).

    Columns are chosen as in :func:`read_edges`; labels of any type are mapped to compact ids.
    """
    import pyarrow as pa
    if isinstance(table, pa.Table):
        t, source = table, "<pyarrow table>"
    elif _is_pandas(table):
        t, source = _pandas_to_arrow(table), "<pandas DataFrame>"
    else:
        raise TypeError(f"from_table: expected a pandas DataFrame or a pyarrow Table, received "
                        f"{type(table).__name__}; for files use read_edges(path).")
    if nodes is not None and not isinstance(nodes, NodeTable):
        nodes = read_nodes(nodes)
    cols = _default_columns(t.column_names, tail, head, weight, source, nodes is not None)
    if t.num_rows == 0:
        raise FileFormatError(f"{source}: the table has no rows; expected one row per edge.")
    return _edge_list_from_arrow(t, cols, source, _where_row, nodes)


def from_scipy(matrix, *, symmetric=None) -> EdgeList:
    """An EdgeList from a SciPy sparse matrix or array: every stored entry is an edge.

    Explicit zeros are kept as zero-weight edges.  Edges are ordered by (row, column), entries
    with the same (row, column) in storage order.

    Parameters
    ----------
    matrix : scipy.sparse matrix or array of shape (n, n)
    symmetric : bool, optional
        True: the matrix is symmetric and only the upper triangle (row <= column) is read, one
        edge per pair; an asymmetric matrix is then a ValueError.  False: every stored entry is
        an edge.  None (default): True when the matrix equals its transpose exactly (stored
        entries, explicit zeros included), else False.
    """
    from scipy import sparse
    f = "from_scipy"
    if not sparse.issparse(matrix):
        raise TypeError(f"{f}: expected a scipy.sparse matrix or array, received "
                        f"{type(matrix).__name__}; convert with scipy.sparse.csr_array(a).")
    if matrix.ndim != 2 or matrix.shape[0] != matrix.shape[1]:
        raise ValueError(f"{f}: an adjacency matrix must be square, received shape "
                         f"{matrix.shape}.")
    if symmetric is not None:
        symmetric = validation.check_bool(symmetric, "symmetric", f)
    coo = sparse.coo_array(matrix)
    r, c, w = coo.row.astype(np.int64), coo.col.astype(np.int64), coo.data
    order = np.lexsort((c, r))
    r, c, w = r[order], c[order], w[order]
    is_sym = _is_symmetric(r, c, w)
    if symmetric is None:
        symmetric = is_sym
    elif symmetric and not is_sym:
        raise ValueError(f"{f}: symmetric=True but the matrix differs from its transpose (stored "
                         f"entries compared exactly); pass symmetric=False to read every stored "
                         f"entry as an edge.")
    if symmetric:
        keep = r <= c
        r, c, w = r[keep], c[keep], w[keep]
    n = int(matrix.shape[0])
    w = validation.check_weights(np.asarray(w), f)
    dt = _id_dtype(n)
    return EdgeList(r.astype(dt), c.astype(dt), w, n, source="<scipy sparse>")


def _is_symmetric(r, c, w) -> bool:
    o2 = np.lexsort((r, c))
    return bool(np.array_equal(r, c[o2]) and np.array_equal(c, r[o2])
                and np.array_equal(w, w[o2]))


def from_networkx(graph, *, weight="weight", default=None, pos=None) -> EdgeList:
    """An EdgeList from an undirected networkx Graph or MultiGraph.

    Compact id ``i`` is the ``i``-th node of ``graph.nodes`` (isolated nodes kept); edges come in
    ``graph.edges`` order.  ``weight`` names the edge attribute; an edge without it is an error
    unless ``default`` is given.  ``pos`` names a node attribute holding (x, y) coordinates.
    """
    import networkx as nx
    f = "from_networkx"
    if not isinstance(graph, nx.Graph):
        raise TypeError(f"{f}: expected a networkx Graph, received {type(graph).__name__}.")
    if graph.is_directed():
        raise ValueError(f"{f}: received a directed graph; spanning forests are undirected. "
                         f"Pass graph.to_undirected() if the direction does not matter.")
    nodes = list(graph.nodes)
    index = {v: i for i, v in enumerate(nodes)}
    tail, head, w = [], [], []
    for k, (u, v, data) in enumerate(graph.edges(data=True)):
        if weight not in data and default is None:
            raise ValueError(f"{f}: edge {k} ({u!r}, {v!r}) has no {weight!r} attribute; set it "
                             f"on every edge or pass default=1.0.")
        tail.append(index[u])
        head.append(index[v])
        w.append(data.get(weight, default))
    n = len(nodes)
    dt = _id_dtype(n)
    warr = np.asarray(w) if w else np.empty(0, dtype=np.float64)
    if warr.dtype.kind not in "iuf":
        try:
            warr = warr.astype(np.float64)
        except (TypeError, ValueError):
            raise TypeError(f"{f}: edge attribute {weight!r} holds non-numeric values; expected "
                            f"numbers.") from None
    warr = validation.check_weights(warr, f)
    labels = np.empty(n, dtype=object)
    labels[:] = nodes
    if n and all(isinstance(x, (int, np.integer)) and not isinstance(x, bool) for x in nodes):
        labels = np.asarray(nodes, dtype=np.int64)
    coords = None
    if pos is not None:
        missing = [v for v in nodes if pos not in graph.nodes[v]]
        if missing:
            raise ValueError(f"{f}: node {missing[0]!r} has no {pos!r} attribute; every node "
                             f"needs coordinates when pos= is given.")
        coords = np.asarray([graph.nodes[v][pos] for v in nodes], dtype=np.float64).reshape(n, 2)
    return EdgeList(np.asarray(tail, dtype=dt), np.asarray(head, dtype=dt), warr, n, labels,
                    coords, False, "<networkx graph>")


def to_networkx(forest, edges: EdgeList | None = None):
    """The forest as a networkx Graph in the user's labels.

    Every node is present (isolated ones included); edges carry ``weight`` and ``position``.
    """
    import networkx as nx
    g = nx.Graph()
    if edges is None:
        return forest.to_networkx()
    g.add_nodes_from(edges.label(np.arange(edges.n_nodes)).tolist())
    t = edges.label(forest.tail).tolist()
    h = edges.label(forest.head).tolist()
    g.add_edges_from((u, v, {"weight": w, "position": p}) for u, v, w, p in
                     zip(t, h, forest.weights.tolist(), forest.edges.tolist()))
    return g


# --- writers --------------------------------------------------------------------------------------

def forest_table(forest, edges: EdgeList):
    """The forest as a pyarrow Table: tail, head (user labels), weight, position (input row)."""
    import pyarrow as pa
    tn, hn, wn = edges.columns
    if wn in (tn, hn):
        wn = "weight"
    cols = {tn: _label_array(edges.label(forest.tail)),
            hn: _label_array(edges.label(forest.head)),
            wn: pa.array(np.asarray(forest.weights)),
            "position": pa.array(np.asarray(forest.edges, dtype=np.int64))}
    return pa.table(cols)


def _label_array(labels):
    import pyarrow as pa
    if labels.dtype == object:
        return pa.array(labels.tolist())
    return pa.array(labels)


def _atomic(path, write, binary=True):
    """Call ``write(tmp_path)``, then rename the temporary file onto ``path``."""
    target = Path(path)
    parent = target.parent if str(target.parent) else Path(".")
    if not parent.is_dir():
        raise FileNotFoundError(f"cannot write {str(target)!r}: the folder {str(parent)!r} does "
                                f"not exist; create it first.")
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=parent)
    os.close(fd)
    try:
        write(tmp)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
    return target


def write_table(path, table, *, format=None, compression=None):
    """Write a pyarrow Table to CSV/TSV (optionally .gz/.zst), Parquet or .npz, atomically."""
    import pyarrow as pa
    import pyarrow.csv as pcsv
    import pyarrow.parquet as pq
    fmt, comp = detect_format(path, format, valid=("csv", "tsv", "parquet", "npz"),
                              func="write_table")
    comp = compression or comp

    def write(tmp):
        if fmt in ("csv", "tsv"):
            opts = pcsv.WriteOptions(delimiter="\t" if fmt == "tsv" else ",")
            with pa.OSFile(tmp, "wb") as raw:
                sink = pa.CompressedOutputStream(raw, comp) if comp else raw
                pcsv.write_csv(table, sink, write_options=opts)
                if comp:
                    sink.close()
        elif fmt == "parquet":
            pq.write_table(table, tmp)
        else:
            arrays = {}
            for name in table.column_names:
                a = table.column(name).to_numpy(zero_copy_only=False)
                if a.dtype == object:
                    a = np.asarray(a.tolist(), dtype=str)
                arrays[name] = a
            with open(tmp, "wb") as fh:
                np.savez(fh, **arrays)
    return _atomic(path, write)


def write_forest(path, forest, edges: EdgeList | None = None, *, format=None, coords=None,
                 geographic=True):
    """Write the forest to ``path`` in the format of its suffix, atomically.

    CSV/TSV/Parquet/.npz get columns tail, head, weight (named as in the input, with the user's
    labels) and ``position`` (the edge's row in the input, from 0).  ``.geojson`` gets RFC 7946
    LineStrings and needs (longitude, latitude) node coordinates.

    ``edges`` is the EdgeList the forest was solved from.  Without one (for example the result
    of ``point_spanning_tree``), node ids are written as they are and ``coords`` of shape
    (n_nodes, 2) may give the node coordinates; ``geographic`` says whether they are
    (longitude, latitude) degrees.
    """
    fmt, _ = detect_format(path, format, valid=WRITE_FORMATS, func="write_forest")
    if edges is None:
        xy = None
        if coords is not None:
            xy = np.asarray(coords, dtype=np.float64)
            if xy.ndim != 2 or xy.shape != (forest.n_nodes, 2):
                raise ValueError(f"write_forest: coords must have shape ({forest.n_nodes}, 2), "
                                 f"one (x, y) or (longitude, latitude) row per node; received "
                                 f"shape {xy.shape}.")
        edges = EdgeList(forest.tail, forest.head, forest.weights, forest.n_nodes, coords=xy,
                         geographic=bool(geographic) and xy is not None, source="the forest")
    if fmt == "geojson":
        return write_geojson(path, forest, edges)
    return write_table(path, forest_table(forest, edges), format=fmt)


def write_geojson(path, forest, edges: EdgeList, *, properties=None):
    """Write the forest's edges as a GeoJSON (RFC 7946) FeatureCollection of LineStrings.

    Coordinates are [longitude, latitude] in WGS 84 degrees, as RFC 7946 requires, rounded to
    7 decimals (about 1 cm); a link whose short way crosses the antimeridian becomes a
    MultiLineString cut at +-180 degrees.  Each feature's properties: tail, head, weight, position, plus the
    columns of ``properties`` (a dict of arrays indexed by forest edge).  Non-finite weights are
    written as null (JSON has no infinity).
    """
    import json
    if edges.coords is None:
        raise ValueError(f"write_geojson: {edges.source} has no node coordinates; give a node "
                         f"table with lon/lat columns (CLI: --nodes FILE).")
    if not edges.geographic:
        raise ValueError(f"write_geojson: the coordinates of {edges.source} are planar (x/y); "
                         f"GeoJSON (RFC 7946) needs longitude/latitude in WGS 84. Convert the "
                         f"node table to lon/lat, or write CSV/Parquet instead.")
    xy = np.round(edges.coords, 7)
    t = forest.tail.astype(np.int64)
    h = forest.head.astype(np.int64)
    tl, hl = _json_values(edges.label(t)), _json_values(edges.label(h))
    w = [x if isinstance(x, int) or math.isfinite(x) else None for x in forest.weights.tolist()]
    pos = forest.edges.tolist()
    a, b = xy[t].tolist(), xy[h].tolist()
    extra = {k: _json_values(np.asarray(v)) for k, v in (properties or {}).items()}
    feats = []
    for i in range(len(pos)):
        props = {"tail": tl[i], "head": hl[i], "weight": w[i], "position": pos[i]}
        for k, v in extra.items():
            props[k] = v[i]
        feats.append({"type": "Feature", "geometry": _line(a[i], b[i]), "properties": props})
    doc = {"type": "FeatureCollection", "features": feats}

    def write(tmp):
        with open(tmp, "w", encoding="utf-8") as fh:
            json.dump(doc, fh, separators=(",", ":"), allow_nan=False)
    return _atomic(path, write)


def _line(p, q) -> dict:
    """A LineString from p to q, or, when the short way crosses the antimeridian, a
    MultiLineString cut at +-180 degrees as RFC 7946 (section 3.1.9) asks."""
    (x1, y1), (x2, y2) = p, q
    if abs(x2 - x1) <= 180.0:
        return {"type": "LineString", "coordinates": [p, q]}
    x2u = x2 - 360.0 if x2 > x1 else x2 + 360.0      # q unwrapped next to p
    edge = 180.0 if x2u > x1 else -180.0
    y = round(y1 + (y2 - y1) * (edge - x1) / (x2u - x1), 7)
    return {"type": "MultiLineString",
            "coordinates": [[p, [edge, y]], [[-edge, y], q]]}


def _json_values(arr) -> list:
    vals = arr.tolist()
    return [None if isinstance(v, float) and not math.isfinite(v) else v for v in vals]
