"""The format registry: every file format fastmst reads or writes, and format detection.

Each module in :mod:`fastmst.io.formats` describes its format with a :class:`Format` and calls
:func:`register` when imported; the readers and writers of :mod:`fastmst.io`, the format lists
``FORMATS``/``WRITE_FORMATS`` and the command line's ``--format`` choices all come from here.
Adding a format means adding one file to ``fastmst/io/formats/`` (see ``formats/mtx.py`` for a
small one).

A format may provide any of four functions (``None`` where it cannot):

``read_edges(path, compression, request, **options) -> EdgeList``
    An edge list; ``request`` is a :class:`ReadRequest` (columns, node table, progress).
``read_table(path, compression, text, **options) -> (pyarrow.Table, where)``
    A whole table (node tables, lists of links); ``where(i)`` words row ``i`` for messages.
    ``text(header)`` names the columns that hold labels: formats that guess column types
    (CSV/TSV) read those as text; typed formats ignore it.
``write_table(table, tmp_path, compression, **options) -> None``
    A pyarrow Table written to a temporary path (the caller renames it atomically).
``write_forest(path, forest, edges) -> Path``
    A forest in a form of its own (GeoJSON); formats without it get :func:`write_table` of the
    forest's table.

``options`` are fixed keyword arguments for those functions, so that one module can register
variants (CSV and TSV differ only in the delimiter).
"""
from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

from fastmst import validation

COMPRESSIONS = {".gz": "gzip", ".gzip": "gzip", ".zst": "zstd", ".zstd": "zstd", ".bz2": "bz2"}


@dataclass(frozen=True)
class ReadRequest:
    """What the caller of ``read_edges`` asked for; formats without columns ignore it."""
    tail: str | None = None
    head: str | None = None
    weight: str | None = None
    nodes: object = None          # a NodeTable or None
    progress: Callable | None = None
    ids: str = "text"             # endpoint labels: "text" or "integer" (fastmst.io.labels)
    declared_nodes: int | None = None   # confirms a header's node count (.gr, .mtx)
    keep_columns: object = "all"  # other columns carried to outputs: "all" or a tuple of names
    link_id: str | None = None    # column naming each link (carried, read as text)
    delimiter: str | None = None  # CSV/TSV: a field separator other than the format's own
    decimal_comma: bool = False   # CSV/TSV: numbers written with a decimal comma (12,5)


@dataclass(frozen=True)
class Format:
    """One file format.

    Attributes
    ----------
    name : str
        The name users pass as ``format=`` (CLI ``--format``).
    suffixes : tuple of str
        File-name suffixes, lower case with the dot (``(".csv", ".txt")``).
    order : int
        Position in listings and messages (smaller first).
    compressed : bool
        Whether files may carry a compression suffix (``.gz``, ``.zst``, ``.bz2``).
    read_edges, read_table, write_table, write_forest : callable or None
        See the module docstring.
    options : dict
        Fixed keyword arguments passed to the functions above.
    spreadsheet : bool
        Whether spreadsheets open the format as text cells (CSV/TSV); ``spreadsheet_safe``
        writing applies to these formats only.
    declares_nodes : bool
        Whether a header declares the node count (``declared_nodes`` applies).
    """
    name: str
    suffixes: tuple
    order: int
    compressed: bool = False
    read_edges: Callable | None = None
    read_table: Callable | None = None
    write_table: Callable | None = None
    write_forest: Callable | None = None
    options: dict = field(default_factory=dict)
    spreadsheet: bool = False
    declares_nodes: bool = False


_REGISTRY: dict[str, Format] = {}

# the functions each kind of use needs
_KINDS = {"read": ("read_edges",), "table": ("read_table",), "write_table": ("write_table",),
          "write": ("write_table", "write_forest")}


def register(fmt: Format) -> Format:
    """Add ``fmt`` to the registry; its name and suffixes must be new."""
    if fmt.name in _REGISTRY:
        raise ValueError(f"register: a format named {fmt.name!r} is already registered.")
    for other in _REGISTRY.values():
        shared = set(fmt.suffixes) & set(other.suffixes)
        if shared:
            raise ValueError(f"register: suffix {sorted(shared)[0]!r} of {fmt.name!r} already "
                             f"belongs to {other.name!r}.")
    _REGISTRY[fmt.name] = fmt
    return fmt


def get(name: str) -> Format:
    """The registered format called ``name``."""
    return _REGISTRY[name]


def names(kind: str = "read") -> tuple:
    """Names of the formats usable for ``kind``: "read" (edge lists), "table" (whole tables),
    "write_table" (tables), "write" (forests), in registry order."""
    need = _KINDS[kind]
    found = [f for f in _REGISTRY.values() if any(getattr(f, a) is not None for a in need)]
    return tuple(f.name for f in sorted(found, key=lambda f: f.order))


def detect_format(path, format=None, *, valid=None, func="read_edges"):
    """(format name, compression) from an explicit ``format`` or the file name's suffixes.

    ``valid`` lists the acceptable format names (default: every format that reads edge lists);
    ``compression`` is None or a pyarrow codec name ("gzip", "zstd", "bz2").
    """
    valid = names("read") if valid is None else tuple(valid)
    suffixes = [s.lower() for s in Path(path).suffixes]
    compression = None
    if suffixes and suffixes[-1] in COMPRESSIONS:
        compression = COMPRESSIONS[suffixes.pop()]
    if format is not None:
        return validation.check_choice(format, valid, "format", func), compression
    fmt = _by_suffix(suffixes[-1]) if suffixes else None
    if fmt not in valid:
        raise ValueError(f"{func}: cannot tell the format of {str(path)!r} from its name; "
                         f"expected a suffix for one of {', '.join(valid)} ({_compressed()} may "
                         f"end in .gz or .zst). Rename the file" + (" or pass format=... (CLI: --format)."
                                                          if func == "read_edges" else "."))
    if compression and not _REGISTRY[fmt].compressed:
        if func.startswith("write"):
            raise ValueError(f"{func}: {str(path)!r} names a compressed {fmt} file; only "
                             f"{_compressed()} are written compressed. Drop the "
                             f"{Path(path).suffixes[-1]!r} suffix.")
        raise ValueError(f"{func}: {str(path)!r} is a compressed {fmt} file; only "
                         f"{_compressed()} are read compressed. Decompress it first.")
    return fmt, compression


def _compressed() -> str:
    """The formats read compressed, for messages ("CSV/TSV")."""
    return "/".join(n.upper() for n in names("read") if _REGISTRY[n].compressed)


def _by_suffix(suffix: str):
    for f in _REGISTRY.values():
        if suffix in f.suffixes:
            return f.name
    return None
