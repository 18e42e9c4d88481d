"""Reading and writing files: ``read_edges``, ``write_table`` and ``write_forest``.

Each picks its format through the registry (:mod:`fastmst.io.registry`) from ``format=`` or the
file name, then calls that format's reader or writer.  Writers go through
:func:`fastmst.io.atomic.atomic_write`: a failure leaves no partial file and an existing file
untouched.
"""
from __future__ import annotations

import numpy as np

from fastmst.io import registry
from fastmst.io.adapters import forest_table
from fastmst.io.atomic import atomic_write
from fastmst.io.checks import existing_file
from fastmst.io.edgelist import EdgeList
from fastmst.io.nodes import NodeTable, read_nodes


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
        Any format of ``fastmst.io.FORMATS``.
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
    if progress is not None and not callable(progress):
        raise TypeError(f"{func}: progress must be a function progress(done_bytes, total_bytes) "
                        f"or None, received {type(progress).__name__}.")
    p = existing_file(path, func)
    name, compression = registry.detect_format(p, format, func=func)
    if nodes is not None and not isinstance(nodes, NodeTable):
        nodes = read_nodes(nodes)
    fmt = registry.get(name)
    request = registry.ReadRequest(tail, head, weight, nodes, progress)
    return fmt.read_edges(p, compression, request, **fmt.options)


def write_table(path, table, *, format=None, compression=None):
    """Write a pyarrow Table to CSV/TSV (optionally .gz/.zst), Parquet or .npz, atomically.

    ``compression`` ("gzip", "zstd", "bz2") overrides the one the file name implies; formats
    other than CSV/TSV ignore it.  Returns the written Path.
    """
    name, comp = registry.detect_format(path, format, valid=registry.names("write_table"),
                                        func="write_table")
    fmt = registry.get(name)
    comp = compression or comp
    return atomic_write(path, lambda tmp: fmt.write_table(table, tmp, comp, **fmt.options))


def write_forest(path, forest, edges: EdgeList | None = None, *, format=None, coords=None,
                 geographic=True):
    """Write the forest to ``path`` in the format of its suffix, atomically.

    CSV/TSV/Parquet/.npz get columns tail, head, weight (named as in the input, with the user's
    labels) and ``position`` (the edge's row in the input, from 0).  ``.geojson`` gets RFC 7946
    LineStrings and needs (longitude, latitude) node coordinates.

    ``edges`` is the EdgeList the forest was solved from.  Without one (for example the result
    of ``point_spanning_tree``), node ids are written as they are and ``coords`` of shape
    (n_nodes, 2) may give the node coordinates; ``geographic`` says whether they are
    (longitude, latitude) degrees.  Returns the written Path.
    """
    name, _ = registry.detect_format(path, format, valid=registry.names("write"),
                                     func="write_forest")
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
    if fmt.write_forest is not None:
        return fmt.write_forest(path, forest, edges)
    return write_table(path, forest_table(forest, edges), format=name)
