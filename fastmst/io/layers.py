"""GIS layers in: a line layer of candidate links and a point layer of sites, read with pyogrio.

Any vector file GDAL reads through pyogrio works (GeoPackage, the OGC standard, is the one
fastmst also writes; see :mod:`fastmst.io.formats.gpkg`).  What the coordinates mean comes from
the layer's coordinate reference system (CRS), read with pyproj:

* a **projected** CRS (x/y in metres, feet, ...): snapping tolerances are in the CRS's unit and
  lengths from the geometry are planar lengths in that unit;
* a **geographic** CRS (longitude/latitude degrees): snapping tolerances are in degrees
  (1e-5 degrees of latitude is about 1.1 m) and lengths from the geometry are great-circle
  metres (haversine over the line's vertices on the IUGG mean Earth radius, as
  :func:`fastmst.geometry.geodesy.haversine_m`).

A layer without a CRS is refused unless ``crs=`` states one.  Lines must be single-part
(a MultiLineString of one part is read as that part); null or empty geometries, multi-part lines
and other geometry types are errors that name the feature id (fid) and say how to fix them.
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np

from fastmst.geometry.geodesy import haversine_m
from fastmst.io.checks import FileFormatError, check_column, existing_file
from fastmst.io.columns import carried_columns, numeric_column
from fastmst.io.edgelist import EdgeList, check_unique_link_ids
from fastmst.io.nodes import NodeTable, read_nodes
from fastmst.io.snapping import check_tolerance, snap_points, snap_to_sites

_LINES = {1: "LineString", 5: "MultiLineString"}
_POINTS = {0: "Point", 4: "MultiPoint"}
_SHAPELY_TYPES = {0: "Point", 1: "LineString", 2: "LinearRing", 3: "Polygon", 4: "MultiPoint",
                  5: "MultiLineString", 6: "MultiPolygon", 7: "GeometryCollection"}


_PLURALS = {"metre": "metres", "foot": "feet", "US survey foot": "US survey feet",
            "kilometre": "kilometres"}


@dataclass(frozen=True)
class CRSInfo:
    """What a layer's coordinates mean.

    Attributes
    ----------
    crs : str
        The CRS as the file states it ("EPSG:3857" or WKT), written back unchanged.
    name : str
        Its name ("WGS 84 / Pseudo-Mercator").
    geographic : bool
        True for longitude/latitude degrees.
    unit : str
        The unit of the coordinates ("metre", "US survey foot", "degree").
    """
    crs: str
    name: str
    geographic: bool
    unit: str

    def describe(self) -> str:
        """One sentence on what tolerances and lengths from the geometry mean."""
        if self.geographic:
            return (f"geographic CRS {self.name} (longitude/latitude): snap tolerance in degrees "
                    f"(1e-5 degrees of latitude is about 1.1 m), lengths from the geometry in "
                    f"great-circle metres")
        units = _PLURALS.get(self.unit, self.unit)
        return (f"projected CRS {self.name}: snap tolerance and lengths from the geometry in "
                f"{units}")


def crs_info(crs, source: str) -> CRSInfo:
    """A :class:`CRSInfo` of a CRS string (EPSG code, WKT or PROJ), through pyproj."""
    import pyproj
    try:
        c = pyproj.CRS.from_user_input(crs)
    except pyproj.exceptions.CRSError as exc:
        raise ValueError(f"{source}: the CRS {crs!r} is not one pyproj knows ({exc}); give an "
                         f"EPSG code such as 'EPSG:25833'.") from None
    geographic = bool(c.is_geographic)
    unit = c.axis_info[0].unit_name if c.axis_info else ("degree" if geographic else "unknown")
    return CRSInfo(str(crs), c.name, geographic, unit)


@dataclass(repr=False)
class LayerEdgeList(EdgeList):
    """An :class:`~fastmst.io.EdgeList` read from a line layer.

    Besides the EdgeList fields: ``crs`` (:class:`CRSInfo`), ``lines`` (the WKB of each edge's
    input line, written back as the forest's geometry), ``snap_tolerance`` and ``max_shift``
    (the largest distance an end point moved onto its node), in the CRS's units.
    """
    crs: CRSInfo | None = None
    lines: np.ndarray | None = field(default=None, repr=False)
    snap_tolerance: float = 0.0
    max_shift: float = 0.0


@dataclass(repr=False)
class LayerNodeTable(NodeTable):
    """A :class:`~fastmst.io.NodeTable` read from a point layer; ``crs`` is its :class:`CRSInfo`."""
    crs: CRSInfo | None = None


def _pyogrio(func):
    try:
        import pyogrio
        import shapely
    except ImportError:
        raise ImportError(f"{func}: reading GIS layers needs pyogrio and shapely; install them "
                          f"with pip install 'fastmst[gis]'.") from None
    return pyogrio, shapely


def _kind(geometry_type: str) -> str:
    g = (geometry_type or "").lower()
    return "line" if "line" in g else "point" if "point" in g else \
        "any" if g in ("", "unknown", "geometry", "geometrycollection") else "other"


def _choose_layer(path, layer, want: str, func: str) -> str:
    pyogrio, _ = _pyogrio(func)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", RuntimeWarning)
            found = [(str(n), str(t) if t is not None else "") for n, t in
                     pyogrio.list_layers(str(path))]
    except Exception as exc:   # pyogrio raises DataSourceError and friends
        raise FileFormatError(f"{path}: not a vector file GDAL can read ({exc}).") from None
    listed = ", ".join(f"{n!r} ({t or 'no geometry'})" for n, t in found) or "none"
    what = "line (LineString)" if want == "line" else "point (Point)"
    flag = "--layer" if want == "line" else "--nodes-layer"
    if layer is not None:
        if not isinstance(layer, str):
            raise TypeError(f"{func}: layer must be a layer name (str), received "
                            f"{type(layer).__name__}.")
        types = dict(found)
        if layer not in types:
            raise FileFormatError(f"{path}: has no layer {layer!r}; its layers are {listed}. "
                                  f"Name one of them with layer= (CLI: {flag}).")
        if _kind(types[layer]) not in (want, "any"):
            raise FileFormatError(f"{path}: layer {layer!r} holds {types[layer] or 'no'} "
                                  f"geometries; expected a {what} layer. Its layers are "
                                  f"{listed}.")
        return layer
    fits = [n for n, t in found if _kind(t) == want] or \
        [n for n, t in found if _kind(t) == "any"]   # generic layers: checked per feature
    if len(fits) == 1:
        return fits[0]
    if not fits:
        raise FileFormatError(f"{path}: has no {what} layer; its layers are {listed}. Give a "
                              f"file with one, or name a layer with layer= (CLI: {flag}).")
    raise FileFormatError(f"{path}: has {len(fits)} {what} layers ({', '.join(map(repr, fits))}); "
                          f"name one with layer= (CLI: {flag}).")


def _read_layer(path, layer, want, crs, func):
    """(attribute table with a ``fid`` column first, shapely geometries, CRSInfo, source)."""
    pyogrio, shapely = _pyogrio(func)
    p = existing_file(path, func)
    name = _choose_layer(p, layer, want, func)
    source = f"{p} (layer {name!r})"
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        meta, table = pyogrio.read_arrow(str(p), layer=name, return_fids=True)
    geom_col = meta.get("geometry_name") or "wkb_geometry"
    fid_col = meta.get("fid_column") or "OGC_FID"
    if geom_col not in table.column_names:
        raise FileFormatError(f"{source}: the layer has no geometry column; expected a {want} "
                              f"layer.")
    wkb = table.column(geom_col).to_numpy(zero_copy_only=False)
    attrs = table.drop_columns([geom_col])
    if fid_col in attrs.column_names and fid_col != "fid":
        if "fid" in attrs.column_names:
            attrs = attrs.drop_columns([fid_col])
        else:
            attrs = attrs.rename_columns(["fid" if c == fid_col else c
                                          for c in attrs.column_names])
    if "fid" in attrs.column_names:
        attrs = attrs.select(["fid"] + [c for c in attrs.column_names if c != "fid"])
    fids = (attrs.column("fid").to_numpy(zero_copy_only=False) if "fid" in attrs.column_names
            else np.arange(attrs.num_rows))
    if attrs.num_rows == 0:
        raise FileFormatError(f"{source}: the layer has no features; expected one feature per "
                              f"{'link' if want == 'line' else 'site'}.")
    stated = meta.get("crs")
    if stated is None:
        if crs is None:
            raise FileFormatError(
                f"{source}: the layer has no coordinate reference system (CRS), so fastmst "
                f"cannot tell degrees from metres. Assign one in your GIS (e.g. geopandas "
                f"GeoDataFrame.set_crs('EPSG:...').to_file(...)), or state it with "
                f"crs='EPSG:...' when calling {func}.")
        stated = crs
    info = crs_info(stated, source)
    missing = np.array([g is None for g in wkb], dtype=bool)
    geoms = np.empty(len(wkb), dtype=object)
    if (~missing).any():
        geoms[~missing] = shapely.from_wkb(wkb[~missing])
    empty = missing.copy()
    empty[~missing] = shapely.is_empty(geoms[~missing])
    if empty.any():
        i = int(np.flatnonzero(empty)[0])
        what = "no" if missing[i] else "an empty"
        raise FileFormatError(f"{source}: feature fid {fids[i]} has {what} "
                              f"geometry ({int(empty.sum())} such features in all); every "
                              f"{'link needs a line' if want == 'line' else 'site needs a point'}."
                              f" Delete those features or draw their geometry.")
    return attrs, geoms, info, source, fids


def _single_part(geoms, fids, allowed, source, want):
    """Geometries of the wanted kind as single parts (a one-part Multi* is its part)."""
    import shapely
    types = shapely.get_type_id(geoms)
    bad = np.flatnonzero(~np.isin(types, list(allowed)))
    if bad.size:
        i = int(bad[0])
        got = _SHAPELY_TYPES.get(int(types[i]), str(types[i]))
        raise FileFormatError(f"{source}: feature fid {fids[i]} is a {got}; expected "
                              f"{' or '.join(allowed.values())} ({bad.size} features of other "
                              f"types in all). Choose the {want} layer (layer=, CLI --layer) or "
                              f"convert the geometries.")
    multi = np.flatnonzero(types == max(allowed))
    if multi.size:
        parts = shapely.get_num_geometries(geoms[multi])
        many = multi[parts != 1]
        if many.size:
            i = int(many[0])
            raise FileFormatError(
                f"{source}: feature fid {fids[i]} is a {allowed[max(allowed)]} of "
                f"{int(shapely.get_num_geometries(geoms[i]))} parts ({many.size} multi-part "
                f"features in all); expected one {allowed[min(allowed)]} per feature. Split them "
                f"into single parts (geopandas: GeoDataFrame.explode()) or, for lines that join "
                f"end to end, merge the parts (shapely.line_merge).")
        geoms = geoms.copy()
        geoms[multi] = shapely.get_geometry(geoms[multi], 0)
    return geoms


def line_lengths(lines, geographic: bool) -> np.ndarray:
    """Lengths of shapely lines: planar in the CRS's unit, or great-circle metres over the
    vertices of longitude/latitude lines."""
    import shapely
    if not geographic:
        return np.asarray(shapely.length(lines), dtype=np.float64)
    xy, index = shapely.get_coordinates(lines, return_index=True)
    same = index[1:] == index[:-1]
    seg = np.zeros(len(index) - 1 if len(index) else 0)
    if seg.size:
        seg[same] = haversine_m(xy[:-1][same, 0], xy[:-1][same, 1], xy[1:][same, 0],
                                xy[1:][same, 1])
    out = np.zeros(len(lines))
    if seg.size:
        np.add.at(out, index[1:][same], seg[same])
    return out


def read_line_layer(path, *, layer=None, snap_tolerance=0.0, weight=None, nodes=None,
                    keep_columns="all", link_id=None, crs=None) -> LayerEdgeList:
    """Read a line layer of candidate links as an edge list.

    Each feature is one link between the nodes its two end points snap into.

    Parameters
    ----------
    path : str or Path
        A vector file GDAL reads (GeoPackage ``.gpkg``, Shapefile ``.shp``, ...).
    layer : str, optional
        The layer; default the file's only line layer.
    snap_tolerance : float, default 0
        End points within this distance share a node (:func:`fastmst.io.snapping.snap_points`;
        0 joins identical coordinates only), in the CRS's unit (degrees for longitude/latitude,
        see the module docstring).  With ``nodes``, each end point goes to its nearest site
        within this distance instead, and an end point with none is an error.
    weight : str, optional
        An attribute column holding the weight; default (or ``"length"`` when the layer has no
        such column) the length of each line's geometry.
    nodes : NodeTable, optional
        Sites (for example from :func:`read_point_layer`, in the same CRS): compact ids follow
        its rows and sites without links stay as isolated nodes.  Without it, nodes are the
        snapped end points, numbered 0.. in order of first appearance (start, then end point of
        each feature in turn) and placed at their first end point.
    keep_columns : "all" or list of str
        Attribute columns carried to every output (always with ``fid``, the feature id).
    link_id : str, optional
        An attribute column naming each link (unique, no missing values).
    crs : str, optional
        The CRS to assume when the layer states none (for example "EPSG:25833").

    Returns
    -------
    LayerEdgeList
        An EdgeList (``columns`` ("tail", "head", weight)) that also carries the CRS and the
        input lines, which GeoPackage and GeoJSON output write back as the forest's geometry.

    Raises
    ------
    TypeError
        ``snap_tolerance`` is not a number, ``layer`` not a string.
    FileFormatError (a ValueError)
        Missing layer, a layer of another geometry type, null or empty geometries, multi-part
        lines, no CRS, an end point with no site within the tolerance, a bad weight column.
    """
    func = "read_line_layer"
    tol = check_tolerance(snap_tolerance, func)
    if nodes is not None and not isinstance(nodes, NodeTable):
        raise TypeError(f"{func}: nodes must be a NodeTable (read_nodes or read_point_layer), "
                        f"received {type(nodes).__name__}.")
    attrs, geoms, info, source, fids = _read_layer(path, layer, "line", crs, func)
    lines = _single_part(geoms, fids, _LINES, source, "line")
    import shapely
    start = shapely.get_coordinates(shapely.get_point(lines, 0))
    end = shapely.get_coordinates(shapely.get_point(lines, -1))
    m = len(lines)
    if nodes is not None:
        ncrs = getattr(nodes, "crs", None)
        if ncrs is not None and not _same_crs(ncrs.crs, info.crs):
            raise FileFormatError(f"{source}: the links are in {info.name} but the sites "
                                  f"{nodes.source} in {ncrs.name}; reproject one layer to the "
                                  f"other's CRS first.")
        if nodes.geographic != info.geographic:
            raise FileFormatError(f"{source}: the links are in {info.describe()}, but the "
                                  f"sites {nodes.source} are "
                                  f"{'longitude/latitude' if nodes.geographic else 'planar'}; "
                                  f"give both in one CRS.")
        idx, shift = snap_to_sites(np.concatenate([start, end]), nodes.coords, tol,
                                   where=lambda i: f"{'start' if i < m else 'end'} point of "
                                                   f"feature fid {fids[i % m]}",
                                   func=func)
        labels, coords, n = nodes.labels, nodes.coords, int(len(nodes.labels))
    else:
        snapped = snap_points(np.stack([start, end], 1).reshape(-1, 2), tol,
                              func=func)
        idx = np.concatenate([snapped.node[0::2], snapped.node[1::2]])
        shift, coords, labels = snapped.max_shift, snapped.coords, None
        n = int(coords.shape[0])
    dt = np.int32 if n < 2**31 else np.int64
    tail, head = idx[:m].astype(dt), idx[m:].astype(dt)
    names = attrs.column_names
    if weight is None or (weight == "length" and "length" not in names):
        # GeoPackage field names are unique regardless of case: keep clear of "Length"
        lower = {c.lower() for c in names}
        wname = "length" if "length" not in lower else \
            "geometry_length" if "geometry_length" not in lower else "fastmst_length"
        w = line_lengths(lines, info.geographic)
    else:
        check_column(weight, names, source, "weight", func)
        wname = weight
        w = numeric_column(attrs.column(weight), weight, source, _feature(fids))
    keep = carried_columns(names, ("tail", "head", wname), keep_columns, link_id, source, func)
    if "fid" in names:
        keep = ["fid"] + [c for c in keep if c != "fid"]
    attributes = attrs.select(keep) if keep else None
    if link_id is not None:
        check_unique_link_ids(attributes.column(link_id), link_id, source, _feature(fids))
    return LayerEdgeList(tail, head, w, n, labels, coords, info.geographic, source,
                         ("tail", "head", wname), attributes, link_id, (), crs=info,
                         lines=shapely.to_wkb(lines), snap_tolerance=tol, max_shift=shift)


def _feature(fids):
    return lambda i: f"feature fid {fids[i]}"


def _same_crs(a, b) -> bool:
    import pyproj
    return pyproj.CRS.from_user_input(a) == pyproj.CRS.from_user_input(b)


def read_point_layer(path, *, layer=None, id=None, crs=None) -> LayerNodeTable:  # noqa: A002
    """Read a point layer of sites as a node table.

    Parameters
    ----------
    path : str or Path
        A vector file GDAL reads (GeoPackage ``.gpkg``, Shapefile ``.shp``, ...).
    layer : str, optional
        The layer; default the file's only point layer.
    id : str, optional
        The column of site ids; default ``id`` when present, else the feature id (``fid``).
    crs : str, optional
        The CRS to assume when the layer states none.

    Returns
    -------
    LayerNodeTable
        Row ``i`` is feature ``i``; ``coords`` are the points in the layer's CRS and
        ``geographic`` is True for a longitude/latitude CRS.

    Raises
    ------
    FileFormatError (a ValueError)
        Missing layer, non-point or multi-part geometries, null or empty geometries, no CRS,
        missing or repeated ids.
    """
    func = "read_point_layer"
    attrs, geoms, info, source, fids = _read_layer(path, layer, "point", crs, func)
    points = _single_part(geoms, fids, _POINTS, source, "point")
    import pyarrow as pa
    import shapely
    xy = shapely.get_coordinates(points)
    names = attrs.column_names
    idc = id if id is not None else ("id" if "id" in names else "fid")
    check_column(idc, names, source, "site id", func)
    xn, yn = ("lon", "lat") if info.geographic else ("x", "y")
    table = pa.table({idc: attrs.column(idc), xn: pa.array(xy[:, 0]), yn: pa.array(xy[:, 1])})
    base = read_nodes(table, id=idc, x=xn, y=yn, geographic=info.geographic)
    return LayerNodeTable(base.labels, base.coords, base.geographic, source, base.columns,
                          base.arrow_labels, crs=info)


__all__ = ["CRSInfo", "LayerEdgeList", "LayerNodeTable", "crs_info", "line_lengths",
           "read_line_layer", "read_point_layer"]
