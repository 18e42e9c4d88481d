"""GeoJSON (RFC 7946) output: a forest's edges as LineStrings in [longitude, latitude].

Written only (``write_forest``), never read; planar coordinates are refused, as RFC 7946 asks
for WGS 84 degrees.
"""
from __future__ import annotations

import json
import math

import numpy as np

from fastmst.io import registry
from fastmst.io.atomic import atomic_write


def write_geojson(path, forest, edges, *, properties=None):
    """Write the forest's edges as a GeoJSON (RFC 7946) FeatureCollection of LineStrings.

    Coordinates are [longitude, latitude] in WGS 84 degrees, as RFC 7946 requires, rounded to
    7 decimals (about 1 cm); a link whose short way crosses the antimeridian becomes a
    MultiLineString cut at +-180 degrees.  Each feature's properties: tail, head, weight,
    position, plus the columns of ``properties`` (a dict of arrays indexed by forest edge).
    Non-finite weights are written as null (JSON has no infinity).  The file is written
    atomically.
    """
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
    return atomic_write(path, write)


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


def _json_values(arr) -> list:
    vals = arr.tolist()
    return [None if isinstance(v, float) and not math.isfinite(v) else v for v in vals]


registry.register(registry.Format("geojson", (".geojson", ".json"), 60,
                                  write_forest=write_geojson))
