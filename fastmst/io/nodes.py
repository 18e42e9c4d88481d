"""Node tables: one row per node with its label and coordinates.

With a node table, compact id ``i`` is row ``i`` of the table, so nodes without edges are kept
as isolated nodes, and the coordinates give edge lengths, GeoJSON and maps.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fastmst import validation
from fastmst.io.checks import (FileFormatError, check_column, check_no_missing,
                               check_unique_labels)
from fastmst.io.columns import null_mask, numeric_column, plain, to_numpy
from fastmst.io.labels import as_integers, check_ids, id_dtype, lookup
from fastmst.io.tables import load_table

_LONLAT = (("lon", "lat"), ("longitude", "latitude"), ("lng", "lat"), ("long", "lat"))
_XY = (("x", "y"), ("easting", "northing"))


@dataclass
class NodeTable:
    """Node labels with coordinates; row ``i`` is compact id ``i``.

    Attributes
    ----------
    labels : ndarray of shape (n_nodes,)
    coords : ndarray of shape (n_nodes, 2), dtype=float64
    geographic : bool
        True when ``coords`` are (longitude, latitude) degrees.
    source : str
    columns : tuple of str
        The id, x and y column names.
    arrow_labels : pyarrow array or None
        The labels as read, for looking up edge endpoints.
    """
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
            check_column(c, names, source, role, "read_nodes")
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
               format=None, ids="text", delimiter=None,
               decimal_comma=False) -> NodeTable:  # noqa: A002 (``id`` names the column)
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
    format : {"csv", "tsv", "parquet"}, optional
        Overrides the file suffix.
    ids : {"text", "integer"}, default "text"
        The label rule of :func:`fastmst.io.read_edges`: the id column of a text file is read
        as text, exactly as written (``007`` and ``7`` are two nodes); "integer" reads it as
        integers.  Typed tables keep their column's type.
    delimiter, decimal_comma : optional
        For CSV/TSV files, as in :func:`fastmst.io.read_edges`.

    Returns
    -------
    NodeTable

    Raises
    ------
    TypeError
        ``path_or_table`` is not a path or a table, a column is not given by name, or
        ``geographic`` is not a bool.
    FileFormatError (a ValueError)
        Missing columns, missing or duplicate ids, coordinates that are not finite numbers,
        latitudes outside [-90, 90].
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    if geographic is not None:
        geographic = validation.check_bool(geographic, "geographic", "read_nodes")
    ids = check_ids(ids, "read_nodes")

    def id_column(header):
        return [id if id is not None else ("id" if "id" in header else header[0])] \
            if header else []
    table, source, where = load_table(path_or_table, format, "read_nodes", id_column,
                                      delimiter, decimal_comma)
    names = table.column_names
    if id is None:
        id = "id" if "id" in names else (names[0] if names else None)
    if id is None:
        raise FileFormatError(f"{source}: the node table has no columns; expected an id column "
                              f"and two coordinate columns.")
    check_column(id, names, source, "node id", "read_nodes")
    xc, yc, geo = _pick_coord_columns([n for n in names if n != id], x, y, geographic, source)
    idcol = plain(table.column(id))
    if idcol.null_count:
        check_no_missing(null_mask(idcol), id, source, where, "read_nodes")
    if pa.types.is_floating(idcol.type):
        raise FileFormatError(f"{source}: node ids in column {id!r} are decimal numbers; "
                              f"expected integers or text labels.")
    if ids == "integer":
        idcol = as_integers(idcol, id, source, where)
    elif (pa.types.is_string(idcol.type) or pa.types.is_large_string(idcol.type)) and \
            pc.any(pc.equal(idcol, "")).as_py():
        check_no_missing(to_numpy(pc.equal(idcol, "")), id, source, where, "read_nodes")
    labels = to_numpy(idcol)
    if len(pc.unique(idcol)) != len(idcol):   # hash check; sort only to name the rows
        check_unique_labels(labels, id, source, where)
    coords = np.empty((len(labels), 2), dtype=np.float64)
    for j, c in enumerate((xc, yc)):
        vals = np.asarray(numeric_column(table.column(c), c, source, where, "coordinate"),
                          np.float64)
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


def node_index(tcol, hcol, nodes: NodeTable, source, where, names, ids="text"):
    """Compact ids (rows of ``nodes``) of two pyarrow endpoint columns; every endpoint must be
    in the node table.  ``ids="integer"`` reads text endpoints as integers first."""
    out = []
    for col, name in ((plain(tcol), names[0]), (plain(hcol), names[1])):
        if col.null_count:
            check_no_missing(null_mask(col), name, source, where, "read_edges")
        if ids == "integer":
            col = as_integers(col, name, source, where)
        found, missing, compared = lookup(col, nodes.arrow_labels)
        if missing.any():
            i = int(np.flatnonzero(missing)[0])
            raise FileFormatError(f"{source}: {where(i)}: node {compared[i].as_py()!r} in column "
                                  f"{name!r} is not in the node table {nodes.source} "
                                  f"({int(missing.sum())} such rows in all); add the node to "
                                  f"the node table or drop the edge.")
        out.append(found.astype(id_dtype(len(nodes.labels))))
    return out[0], out[1]
