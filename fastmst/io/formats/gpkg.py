"""GeoPackage (OGC standard, ``.gpkg``): line layers of links and point layers of sites in, the
forest, its sites and clusters out as layers of one file, with the CRS kept (through pyogrio).

Reading goes through :mod:`fastmst.io.layers` (:func:`~fastmst.io.layers.read_line_layer` for
edges, the point layer as a node table); writing is :func:`write_geopackage`.  Through the
registry, ``read_edges("links.gpkg")`` reads the file's only line layer with end points joined
only where identical, and ``read_nodes("sites.gpkg")`` its only point layer; name layers and a
snapping tolerance with the functions of :mod:`fastmst.io.layers` (CLI: ``--layer``,
``--nodes-layer``, ``--snap-tolerance``).
"""
from __future__ import annotations

import warnings

import numpy as np

from fastmst.io import registry
from fastmst.io.adapters import forest_table
from fastmst.io.atomic import atomic_write
from fastmst.io.checks import check_not_input, table_row
from fastmst.io.edgelist import EdgeList
from fastmst.io.labels import all_labels
from fastmst.io.layers import read_line_layer, read_point_layer

#: The layers :func:`write_geopackage` writes, in this order.
LAYERS = ("forest", "sites", "clusters")


def read_edges(path, compression, request):
    """The file's only line layer as an EdgeList (registry reader; see module docstring)."""
    if request.tail is not None or request.head is not None:
        raise ValueError(f"read_edges: {path} is a line layer: each link's end points come from "
                         f"its geometry, so tail=/head= (CLI --tail/--head) do not apply. Drop "
                         f"them.")
    return read_line_layer(path, weight=request.weight, nodes=request.nodes,
                           keep_columns=getattr(request, "keep_columns", "all"),
                           link_id=getattr(request, "link_id", None))


def read_table(path, compression, text=()):
    """The file's only point layer as a table: ``fid`` (or ``id``) first, the attributes, and
    the point coordinates as ``lon``/``lat`` (geographic CRS) or ``x``/``y``."""
    import pyarrow as pa
    nodes = read_point_layer(path)
    idc = nodes.columns[0]
    xn, yn = nodes.columns[1:]
    table = pa.table({idc: nodes.arrow_labels, xn: pa.array(nodes.coords[:, 0]),
                      yn: pa.array(nodes.coords[:, 1])})
    return table, table_row


def _crs_of(edges, crs, func):
    if crs is not None:
        if not isinstance(crs, str):
            raise TypeError(f"{func}: crs must be a CRS string such as 'EPSG:25833', received "
                            f"{type(crs).__name__}.")
        return crs
    info = getattr(edges, "crs", None)
    if info is not None:
        return info.crs
    return "EPSG:4326" if edges.geographic else None


def _write_layer(tmp, table, wkb, name, geometry_type, crs):
    import pyarrow as pa
    import pyogrio
    seen = {}
    for c in table.column_names + ["geometry"]:
        if c.lower() in seen:
            raise ValueError(f"write_geopackage: columns {seen[c.lower()]!r} and {c!r} of the "
                             f"{name} layer differ only in case, and GeoPackage field names do "
                             f"not; rename one (or leave it out with write_forest(columns=...), "
                             f"CLI --keep-columns).")
        seen[c.lower()] = c
    table = _signed_integers(table)
    table = table.append_column("geometry", pa.array(list(wkb), type=pa.binary()))
    options = {}
    if "fid" in table.column_names:   # GeoPackage's own feature id column: only unique integers
        col = table.column("fid")
        if not pa.types.is_integer(col.type) or col.null_count or \
                len(col.unique()) != len(col):
            options["FID"] = "gpkg_fid"
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)   # the temporary name's suffix
        if crs is None:   # planar coordinates without a CRS: written so on purpose, and said
            warnings.filterwarnings("ignore", message=".*'crs' was not provided",
                                    category=UserWarning)
        pyogrio.write_arrow(table, tmp, layer=name, driver="GPKG", geometry_name="geometry",
                            geometry_type=geometry_type, crs=crs, layer_options=options or None)


def _signed_integers(table):
    """uint64 columns in a form GeoPackage keeps exactly: its integers are signed 64-bit, and
    GDAL writes uint64 as real numbers (18446744073709551615 became 1.8446744073709552e19).
    Columns whose values fit in int64 become int64, the others decimal text."""
    import pyarrow as pa
    import pyarrow.compute as pc
    for i, name in enumerate(table.column_names):
        col = table.column(i)
        if not pa.types.is_uint64(col.type):
            continue
        top = pc.max(col).as_py()
        col = pc.cast(col, pa.int64() if top is None or top < 2**63 else pa.string())
        table = table.set_column(i, name, col)
    return table


def write_geopackage(path, forest, edges: EdgeList, *, clusters=None, crs=None):
    """Write the forest, its sites and (optionally) clusters as layers of one GeoPackage.

    Layers (written atomically into one file):

    ``forest``
        One LineString per forest edge with every column of the forest table (those of CSV
        output: tail, head, weight as named in the input, ``position``, and the input's carried
        columns).  The geometry is the input line when the edges came from a line layer
        (:func:`fastmst.io.layers.read_line_layer`), else the straight segment between the
        two nodes.
    ``sites``
        One Point per node: ``node`` (label), ``component``, ``degree`` (forest edges at the
        site), ``isolated`` (True for a site with no forest edge), and ``cluster`` when
        ``clusters`` is given.
    ``clusters`` (only with ``clusters``)
        One MultiPoint per cluster: ``cluster``, ``sites``, ``forest_edges`` (forest edges
        inside the cluster) and ``weight`` (their total).

    GeoPackage integers are signed 64-bit: a column of uint64 labels or weights is written as
    int64 when every value fits, else as decimal text (exact either way).

    Parameters
    ----------
    path : str or Path
        The ``.gpkg`` file; an existing file is replaced, except the file the edges were read
        from (a ValueError: the input would be lost).
    forest : SpanningForest
    edges : EdgeList
        The edges the forest was solved from; must carry node coordinates.
    clusters : array of int of shape (n_nodes,), optional
        A cluster number per node (e.g. ``forest.clusters(k=5)``).
    crs : str, optional
        The CRS to write.  Default: the input layer's CRS (edges read from a layer), else
        EPSG:4326 for longitude/latitude nodes, else none (planar coordinates of unknown CRS).

    Returns
    -------
    Path
    """
    func = "write_geopackage"
    import shapely
    if not isinstance(edges, EdgeList):
        raise TypeError(f"{func}: edges must be the EdgeList the forest was solved from, "
                        f"received {type(edges).__name__}.")
    check_not_input(path, edges, func)
    if edges.coords is None:
        raise ValueError(f"{func}: {edges.source} has no node coordinates; read the edges from "
                         f"a line layer, or give a node table (nodes=, CLI --nodes).")
    if getattr(forest, "n_nodes", None) != edges.n_nodes:
        raise ValueError(f"{func}: the forest has {getattr(forest, 'n_nodes', '?')} nodes but "
                         f"{edges.source} has {edges.n_nodes}; pass the EdgeList the forest was "
                         f"solved from.")
    target_crs = _crs_of(edges, crs, func)
    if clusters is not None:
        clusters = np.asarray(clusters)
        if clusters.dtype.kind not in "iu":
            raise TypeError(f"{func}: clusters must be integer cluster numbers, received dtype "
                            f"{clusters.dtype}.")
        if clusters.shape != (edges.n_nodes,):
            raise ValueError(f"{func}: clusters must hold one number per node, shape "
                             f"({edges.n_nodes},); received shape {clusters.shape}.")
        if clusters.size and clusters.min() < 0:
            raise ValueError(f"{func}: clusters must be >= 0, received {clusters.min()}.")
    import pyarrow as pa
    xy = edges.coords
    t = np.asarray(forest.tail, np.int64)
    h = np.asarray(forest.head, np.int64)
    lines = getattr(edges, "lines", None)
    if lines is not None:
        forest_wkb = np.asarray(lines, dtype=object)[np.asarray(forest.edges, np.int64)]
    else:
        seg = np.stack([xy[t], xy[h]], axis=1)
        forest_wkb = shapely.to_wkb(shapely.linestrings(seg)) if len(t) else np.empty(0, object)
    ftable = forest_table(forest, edges)
    degree = np.bincount(np.concatenate([t, h]), minlength=edges.n_nodes)
    scols = {"node": all_labels(edges), "component": pa.array(np.asarray(forest.labels)),
             "degree": pa.array(degree.astype(np.int64)), "isolated": pa.array(degree == 0)}
    if clusters is not None:
        scols["cluster"] = pa.array(clusters.astype(np.int64))
    site_wkb = shapely.to_wkb(shapely.points(xy))

    def write(tmp):
        _write_layer(tmp, ftable, forest_wkb, "forest", "LineString", target_crs)
        _write_layer(tmp, pa.table(scols), site_wkb, "sites", "Point", target_crs)
        if clusters is not None:
            ctable, cwkb = _cluster_layer(forest, clusters, xy, t, h)
            _write_layer(tmp, ctable, cwkb, "clusters", "MultiPoint", target_crs)
    return atomic_write(path, write)


def _cluster_layer(forest, clusters, xy, t, h):
    import pyarrow as pa
    import shapely
    k = int(clusters.max()) + 1 if clusters.size else 0
    inside = clusters[t] == clusters[h]
    w = np.asarray(forest.weights, dtype=np.float64)
    sizes = np.bincount(clusters, minlength=k)
    n_edges = np.bincount(clusters[t[inside]], minlength=k)
    weight = np.bincount(clusters[t[inside]], weights=w[inside], minlength=k)
    order = np.argsort(clusters, kind="stable")
    bounds = np.concatenate([[0], np.cumsum(sizes)])
    geoms = [shapely.multipoints(xy[order[bounds[c]:bounds[c + 1]]]) for c in range(k)]
    table = pa.table({"cluster": pa.array(np.arange(k, dtype=np.int64)),
                      "sites": pa.array(sizes.astype(np.int64)),
                      "forest_edges": pa.array(n_edges.astype(np.int64)),
                      "weight": pa.array(weight)})
    return table, shapely.to_wkb(np.asarray(geoms, dtype=object))


def write_forest(path, forest, edges):
    """Registry writer: the forest and sites layers of :func:`write_geopackage`."""
    return write_geopackage(path, forest, edges)


registry.register(registry.Format("gpkg", (".gpkg",), 70, read_edges=read_edges,
                                  read_table=read_table, write_forest=write_forest))
