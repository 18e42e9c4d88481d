"""GeoJSON (RFC 7946) output: a forest's edges as LineStrings in [longitude, latitude], with
feature ids, optional site points and cluster numbers.

Written only (``write_forest``), never read.  RFC 7946 asks for WGS 84 degrees: longitude/
latitude node tables are written as they are; edges read from a GIS layer
(:func:`fastmst.io.layers.read_line_layer`) are transformed from the layer's CRS to WGS 84 with
pyproj; planar coordinates of unknown CRS are refused.
"""
from __future__ import annotations

import json
import math

import numpy as np

from fastmst.io import registry
from fastmst.io.adapters import forest_table
from fastmst.io.atomic import atomic_write
from fastmst.io.checks import check_not_input
from fastmst.io.labels import all_labels

WGS84 = "EPSG:4326"


def write_geojson(path, forest, edges, *, properties=None, sites=False, clusters=None):
    """Write the forest as a GeoJSON (RFC 7946) FeatureCollection.

    Features:

    * one per forest edge: a LineString ([longitude, latitude], WGS 84, rounded to 7 decimals,
      about 1 cm; longitudes given beyond +-180 degrees, as lon + 360 k, are written in
      [-180, 180]) with ``"id"`` the edge's ``position`` (its row in the input) and as
      properties every column of the forest table, named as in CSV output (tail, head, weight
      as named in the input, ``position``, the input's carried columns), then the columns of
      ``properties`` (a dict of arrays indexed by forest edge), then ``cluster`` when
      ``clusters`` is given (null for an edge between two clusters).  The geometry is the input
      line for edges read from a line layer, else the straight segment; a segment whose short
      way crosses the antimeridian becomes a MultiLineString cut at +-180 degrees.
    * with ``sites=True`` (implied by ``clusters``), one Point per node with ``"id"``
      ``"site/<label>"`` and properties ``node``, ``component``, ``degree`` (forest edges at
      the site), ``isolated`` (no forest edge) and ``cluster``.

    ``clusters`` is a cluster number per node (e.g. ``forest.clusters(k=5)``).  Non-finite
    numbers are written as null (JSON has no infinity); values JSON lacks (dates) as text.
    The file is written atomically; a ``path`` that is the file ``edges`` were read from is a
    ValueError.
    """
    check_not_input(path, edges, "write_geojson")
    if edges.coords is None:
        raise ValueError(f"write_geojson: {edges.source} has no node coordinates; give a node "
                         f"table with lon/lat columns (CLI: --nodes FILE).")
    info = getattr(edges, "crs", None)
    if not edges.geographic and info is None:
        raise ValueError(f"write_geojson: the coordinates of {edges.source} are planar (x/y); "
                         f"GeoJSON (RFC 7946) needs longitude/latitude in WGS 84. Convert the "
                         f"node table to lon/lat, or write CSV/Parquet instead.")
    if clusters is not None:
        clusters = np.asarray(clusters)
        if clusters.shape != (edges.n_nodes,) or clusters.dtype.kind not in "iu":
            raise ValueError(f"write_geojson: clusters must hold one integer per node, shape "
                             f"({edges.n_nodes},); received dtype {clusters.dtype} and shape "
                             f"{clusters.shape}.")
        sites = True
    to_wgs84 = _transformer(info)
    xy = edges.coords if to_wgs84 is None else np.column_stack(
        to_wgs84(edges.coords[:, 0], edges.coords[:, 1]))
    xy = np.round(_wrapped(xy), 7)
    t = np.asarray(forest.tail, dtype=np.int64)
    h = np.asarray(forest.head, dtype=np.int64)
    table = forest_table(forest, edges)
    cols = {name: _json_values(table.column(name).to_pylist()) for name in table.column_names}
    for k, v in _checked_properties(properties, len(t), cols).items():
        cols[k] = _json_values(v.tolist())
    if clusters is not None:
        same = clusters[t] == clusters[h]
        cols["cluster"] = [int(c) if s else None for c, s in zip(clusters[t].tolist(),
                                                                 same.tolist())]
    pos = np.asarray(forest.edges, dtype=np.int64).tolist()
    geoms = _input_lines(edges, forest, to_wgs84)
    if geoms is None:
        a, b = xy[t].tolist(), xy[h].tolist()
        geoms = [_line(a[i], b[i]) for i in range(len(pos))]
    names = list(cols)
    values = list(cols.values())
    feats = [{"type": "Feature", "id": pos[i], "geometry": geoms[i],
              "properties": {n: v[i] for n, v in zip(names, values)}} for i in range(len(pos))]
    if sites:
        feats += _site_features(edges, forest, xy, t, h, clusters)
    doc = {"type": "FeatureCollection", "features": feats}

    def write(tmp):
        with open(tmp, "w", encoding="utf-8") as fh:
            json.dump(doc, fh, separators=(",", ":"), allow_nan=False, default=str)
    return atomic_write(path, write)


def _checked_properties(properties, n_edges: int, taken) -> dict:
    """``properties`` of :func:`write_geojson` as NumPy arrays of one entry per forest edge,
    checked: a dict of arrays keyed by new column names (a name of the forest table would
    replace its values)."""
    func = "write_geojson"
    if properties is None:
        return {}
    if not isinstance(properties, dict):
        raise TypeError(f"{func}: properties must be a dict of arrays (one value per forest "
                        f"edge), received {type(properties).__name__}.")
    out = {}
    for k, v in properties.items():
        if not isinstance(k, str):
            raise TypeError(f"{func}: property names must be strings, received "
                            f"{type(k).__name__} {k!r}.")
        if k in taken or k == "cluster":
            raise ValueError(f"{func}: property {k!r} would replace the forest's own column of "
                             f"that name (columns: {', '.join(map(repr, taken))}); rename it.")
        a = np.asarray(v)
        if a.ndim == 0 or a.shape[0] != n_edges:
            raise ValueError(f"{func}: property {k!r} must hold one value per forest edge "
                             f"({n_edges}, in the forest's order), received "
                             f"{'a single value' if a.ndim == 0 else f'{a.shape[0]} values'}.")
        out[k] = a
    return out


def _wrapped(xy):
    """(longitude, latitude) rows with longitudes brought into [-180, 180] (RFC 7946, section
    4, wants them there; node tables may give them as lon + 360 k).  Exact: ``fmod`` by 360
    and one step of 360 change no bit of the position on the sphere."""
    lon = np.fmod(xy[:, 0], 360.0)
    lon = np.where(lon > 180.0, lon - 360.0, np.where(lon < -180.0, lon + 360.0, lon))
    if np.array_equal(lon, xy[:, 0]):
        return xy
    return np.column_stack([lon, xy[:, 1]])


def _transformer(info):
    """A function (x, y) -> (lon, lat) in WGS 84 for a layer's CRS, or None when the
    coordinates are already WGS 84 longitude/latitude (or of no stated CRS)."""
    if info is None:
        return None
    import pyproj
    src = pyproj.CRS.from_user_input(info.crs)
    dst = pyproj.CRS.from_user_input(WGS84)
    if src == dst:
        return None
    tr = pyproj.Transformer.from_crs(src, dst, always_xy=True)
    return lambda x, y: tr.transform(np.asarray(x), np.asarray(y))


def _input_lines(edges, forest, to_wgs84):
    """The input lines of the forest's edges as GeoJSON geometries, or None without them."""
    lines = getattr(edges, "lines", None)
    if lines is None:
        return None
    import shapely
    geoms = shapely.from_wkb(np.asarray(lines, dtype=object)[np.asarray(forest.edges, np.int64)])
    if to_wgs84 is not None:
        geoms = shapely.transform(geoms, lambda c: np.column_stack(to_wgs84(c[:, 0], c[:, 1])))
    out = []
    for g in geoms:
        c = np.round(shapely.get_coordinates(g), 7).tolist()
        out.append({"type": "LineString", "coordinates": c})
    return out


def _site_features(edges, forest, xy, t, h, clusters):
    labels = all_labels(edges).to_pylist()
    comp = np.asarray(forest.labels).tolist()
    degree = np.bincount(np.concatenate([t, h]), minlength=edges.n_nodes).tolist()
    pts = xy.tolist()
    cl = clusters.tolist() if clusters is not None else None
    feats = []
    for i in range(edges.n_nodes):
        props = {"node": labels[i], "component": comp[i], "degree": degree[i],
                 "isolated": degree[i] == 0}
        if cl is not None:
            props["cluster"] = cl[i]
        feats.append({"type": "Feature", "id": f"site/{labels[i]}",
                      "geometry": {"type": "Point", "coordinates": pts[i]},
                      "properties": props})
    return feats


def _line(p, q) -> dict:
    """A LineString from p to q, or, when the short way crosses the antimeridian, a
    MultiLineString cut at +-180 degrees as RFC 7946 (section 3.1.9) asks.

    >>> _line([179.0, 0.0], [-179.0, 0.0])["coordinates"]
    [[[179.0, 0.0], [180.0, 0.0]], [[-180.0, 0.0], [-179.0, 0.0]]]
    """
    (x1, y1), (x2, y2) = p, q
    if abs(x2 - x1) <= 180.0:
        return {"type": "LineString", "coordinates": [p, q]}
    x2u = x2 - 360.0 if x2 > x1 else x2 + 360.0      # q unwrapped next to p
    edge = 180.0 if x2u > x1 else -180.0
    y = round(y1 + (y2 - y1) * (edge - x1) / (x2u - x1), 7)
    return {"type": "MultiLineString",
            "coordinates": [[p, [edge, y]], [[-edge, y], q]]}


def _json_values(vals) -> list:
    return [None if isinstance(v, float) and not math.isfinite(v) else v for v in vals]


registry.register(registry.Format("geojson", (".geojson", ".json"), 60,
                                  write_forest=write_geojson))
