"""Reading and writing files: ``read_edges``, ``write_table`` and ``write_forest``.

Each picks its format through the registry (:mod:`fastmst.io.registry`) from ``format=`` or the
file name, then calls that format's reader or writer.  Writers go through
:func:`fastmst.io.atomic.atomic_write`: a failure leaves no partial file and an existing file
untouched.
"""
from __future__ import annotations

import dataclasses

import numpy as np

from fastmst import validation
from fastmst._kernels import threads as kernel_threads
from fastmst.io import registry
from fastmst.io.adapters import chosen_attributes, forest_table, from_table
from fastmst.io.atomic import atomic_write
from fastmst.io.checks import check_not_input, existing_file, shown
from fastmst.io.edgelist import EdgeList
from fastmst.io.labels import check_ids
from fastmst.io.nodes import NodeTable, read_nodes
from fastmst.io.tables import is_pandas


def read_edges(path, *, tail=None, head=None, weight=None, format=None, nodes=None,
               progress=None, ids="text", declared_nodes=None, keep_columns="all",
               link_id=None, delimiter=None, decimal_comma=False) -> EdgeList:
    """Read an edge list from a file.

    Parameters
    ----------
    path : str, Path, pandas.DataFrame or pyarrow.Table
        The file (a table in memory is read by :func:`fastmst.io.from_table`).  The format comes from the suffix unless ``format`` is given:
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
        Any format of ``fastmst.io.FORMATS``.
    nodes : str, Path, DataFrame, pyarrow Table or NodeTable, optional
        A node table (see :func:`read_nodes`, read with the same ``ids``): compact ids follow
        its rows, every edge endpoint must appear in it, and its coordinates are kept for
        lengths, GeoJSON and plots.
    progress : callable(done_bytes, total_bytes), optional
        Called while an uncompressed or compressed CSV/TSV file is read (for progress bars).
        Once the last byte is parsed, the checks and the label mapping still run: the reader
        then calls ``progress(done_bytes, None)`` (no total: show a spinner, not a full bar).
    ids : {"text", "integer"}, default "text"
        How endpoint labels are read (:mod:`fastmst.io.labels`).  "text": as written, so
        ``007`` and ``7`` are two nodes and ``true`` stays ``true``; compact ids in order of
        first appearance (tail column, then head column).  Typed columns (Parquet, .npz) keep
        their type: integer columns are integer ids.  "integer": every label must be an
        integer (``007`` is node 7; CLI ``--integer-ids``); compact ids in numeric order.
    declared_nodes : int, optional
        For formats whose header declares the node count (.gr, .mtx): a header may declare at
        most ``2 * edges + 2**20`` nodes, since every declared node costs memory; a larger
        count is refused unless confirmed by passing it here (CLI ``--declared-nodes N``).
    keep_columns : "all" or list of str, default "all"
        The input's other columns carried to every output under their own names (CSV/TSV,
        Parquet, .npz and tables; CLI ``--keep-columns``): "all", or the names to keep (``[]`` for
        none).  In CSV/TSV they are read as text, then as numbers where every cell is a number
        as written (``007`` keeps its text).  A column named ``position`` is not carried (the
        outputs' own column of that name is the edge's row in the input).
    link_id : str, optional
        A column naming each link by a unique id (CLI ``--link-id``): carried as text, and
        lists of required or excluded links may name links by it (:func:`read_links`).
    delimiter : str, optional
        CSV/TSV field separator when it is not the format's own (``";"``; CLI ``--delimiter``).
    decimal_comma : bool, default False
        CSV/TSV numbers written with a decimal comma (``12,5``; CLI ``--decimal-comma``).

    Returns
    -------
    EdgeList

    Raises
    ------
    FileNotFoundError
        No such file.
    TypeError
        ``progress`` is not callable, or a column is not given by name.
    FileFormatError (a ValueError)
        A malformed file: the message names the file and the line or row.

    Notes
    -----
    Great-circle lengths use the haversine formula on a sphere of the IUGG mean Earth radius
    (6 371 008.8 m); they approximate ellipsoidal distances to within about 0.5 %.
    """
    func = "read_edges"
    if is_pandas(path) or _is_arrow_table(path):   # a table in memory: from_table reads it
        if format is not None or progress is not None or declared_nodes is not None or \
                delimiter is not None or decimal_comma:
            raise ValueError("read_edges: format, progress, declared_nodes, delimiter and "
                             "decimal_comma apply to files; a table in memory takes the column "
                             "options only (fastmst.io.from_table). Drop those options.")
        return from_table(path, tail=tail, head=head, weight=weight, nodes=nodes, ids=ids,
                          keep_columns=keep_columns, link_id=link_id)
    if progress is not None and not callable(progress):
        raise TypeError(f"{func}: progress must be a function progress(done_bytes, total_bytes) "
                        f"or None, received {type(progress).__name__}.")
    p = existing_file(path, func)
    name, compression = registry.detect_format(p, format, func=func)
    ids = check_ids(ids, func)
    if declared_nodes is not None:
        if isinstance(declared_nodes, bool) or not isinstance(declared_nodes, (int, np.integer)):
            raise TypeError(f"{func}: declared_nodes must be an integer node count or None, "
                            f"received {type(declared_nodes).__name__} {shown(declared_nodes)}.")
        declared_nodes = int(declared_nodes)
        if not registry.get(name).declares_nodes:
            with_count = [n for n in registry.names("read") if registry.get(n).declares_nodes]
            raise ValueError(f"{func}: declared_nodes={declared_nodes} applies to formats whose "
                             f"header declares a node count ({', '.join(with_count)}); "
                             f"{str(p)!r} is {name}. Drop the option.")
    if nodes is not None and not isinstance(nodes, NodeTable):
        nodes = read_nodes(nodes, ids=ids)
    fmt = registry.get(name)
    decimal_comma = validation.check_bool(decimal_comma, "decimal_comma", func)
    if delimiter is not None:
        if not isinstance(delimiter, str):
            raise TypeError(f"{func}: delimiter must be one character such as ';', received "
                            f"{type(delimiter).__name__} {shown(delimiter)}.")
        if len(delimiter) != 1 or delimiter in "\r\n\"":
            raise ValueError(f"{func}: delimiter must be one character other than a quote or a "
                             f"line break, received {delimiter!r}; for tabs pass '\\t'.")
        if not registry.get(name).options.get("delimiter"):
            raise ValueError(f"{func}: delimiter={delimiter!r} applies to CSV/TSV files; "
                             f"{str(p)!r} is {name}. Drop the option.")
    if link_id is not None and not isinstance(link_id, str):
        raise TypeError(f"{func}: link_id must be a column name, received "
                        f"{type(link_id).__name__} {shown(link_id)}.")
    request = registry.ReadRequest(tail, head, weight, nodes, progress, ids, declared_nodes,
                                   keep_columns, link_id, delimiter, decimal_comma)
    # The label mapping's threads follow the cores free when the read began: right after
    # Arrow's threaded read its own pool threads would count as other load.
    with kernel_threads.cores_at_start():
        return fmt.read_edges(p, compression, request, **fmt.options)


def _is_arrow_table(obj) -> bool:
    return type(obj).__module__.startswith("pyarrow") and hasattr(obj, "column_names")


def write_table(path, table, *, format=None, compression=None, spreadsheet_safe=False):
    """Write a pyarrow Table to CSV/TSV (optionally .gz/.zst), Parquet or .npz, atomically.

    ``compression`` ("gzip", "zstd", "bz2") overrides the one the file name implies; formats
    other than CSV/TSV ignore it.  Returns the written Path.

    Text cells are written verbatim, so every label reads back unchanged, also those that
    begin with ``=``, ``+``, ``-`` or ``@``, which spreadsheets may run as formulas.
    ``spreadsheet_safe=True`` (CLI ``--spreadsheet-safe``) prefixes such text cells (and those
    beginning with a tab or carriage return) with an apostrophe in CSV/TSV output, the usual
    defence (common practice, no source); numbers are not changed, and the labels then no
    longer read back as they were.  A replaced file keeps its permissions.
    """
    name, comp = registry.detect_format(path, format, valid=registry.names("write_table"),
                                        func="write_table")
    fmt = registry.get(name)
    if compression is not None:
        codecs = sorted(set(registry.COMPRESSIONS.values()))
        if not isinstance(compression, str):
            raise TypeError(f"write_table: compression must be one of {', '.join(codecs)} or "
                            f"None, received {type(compression).__name__} "
                            f"{shown(compression)}.")
        if compression not in codecs:
            raise ValueError(f"write_table: compression must be one of {', '.join(codecs)} or "
                             f"None, received {compression!r}; or name the file with a "
                             f".gz, .zst or .bz2 suffix.")
    comp = compression or comp
    if validation.check_bool(spreadsheet_safe, "spreadsheet_safe", "write_table") and \
            fmt.spreadsheet:
        table = _formulas_neutralised(table)

    def write(tmp):
        try:
            fmt.write_table(table, tmp, comp, **fmt.options)
        except ValueError as exc:   # contents the format cannot carry: name the target
            raise ValueError(f"cannot write {str(path)!r}: {exc}") from None
    return atomic_write(path, write)


def _formulas_neutralised(table):
    """``table`` with an apostrophe before every text cell a spreadsheet could run."""
    import pyarrow as pa
    import pyarrow.compute as pc
    cols = []
    for col in table.columns:
        if pa.types.is_dictionary(col.type):   # categoricals: their text is written too
            col = col.cast(col.type.value_type)
        if pa.types.is_string(col.type) or pa.types.is_large_string(col.type):
            risky = pc.match_substring_regex(col, r"^[=+\-@\t\r]")
            quote, nothing = pa.scalar("'", col.type), pa.scalar("", col.type)
            col = pc.if_else(risky, pc.binary_join_element_wise(quote, col, nothing), col)
        cols.append(col)
    return pa.table(cols, names=table.column_names)


def write_forest(path, forest, edges: EdgeList | None = None, *, format=None, coords=None,
                 geographic=True, spreadsheet_safe=False, columns=None):
    """Write the forest to ``path`` in the format of its suffix, atomically.

    Every format gets the table of :func:`fastmst.io.forest_table`: columns tail, head, weight
    (named as in the input, with the user's labels), ``position`` (the edge's row in the
    input, from 0) and the input's carried columns (``edges.attributes``: link id, route type,
    ...) under their own names.  ``columns`` chooses which carried columns are written (None:
    all of them; ``[]``: none).  ``.geojson`` gets RFC 7946 LineStrings and needs (longitude,
    latitude) node coordinates.

    ``edges`` is the EdgeList the forest was solved from.  Without one (for example the result
    of ``point_spanning_tree``), node ids are written as they are and ``coords`` of shape
    (n_nodes, 2) may give the node coordinates; ``geographic`` says whether they are
    (longitude, latitude) degrees.  ``spreadsheet_safe`` is that of :func:`write_table`.
    Returns the written Path.  A ``path`` that is the file ``edges`` were read from is a
    ValueError (writing there would replace the input).
    """
    name, _ = registry.detect_format(path, format, valid=registry.names("write"),
                                     func="write_forest")
    check_not_input(path, edges, "write_forest")
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
    fmt = registry.get(name)
    if columns is not None:   # the writers carry every column of edges.attributes
        edges = dataclasses.replace(edges, attributes=chosen_attributes(edges, columns,
                                                                        "write_forest"))
    if fmt.write_forest is not None:
        return fmt.write_forest(path, forest, edges)
    return write_table(path, forest_table(forest, edges), format=name,
                       spreadsheet_safe=spreadsheet_safe)
