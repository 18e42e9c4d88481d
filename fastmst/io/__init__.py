"""Edge lists in and out: files, tables, sparse matrices and networkx graphs, with node labels.

Readers return an :class:`EdgeList`: compact node ids ``0..n_nodes-1`` in ``tail``/``head``
(what the solvers want), the weights, and the user's node ``labels`` so that every output can
speak the user's ids again.  Writers replace a file only with a complete new one: they write a
temporary file beside the target and rename it, so a failure leaves the old file untouched.

Label rule (:mod:`fastmst.io.labels`): labels in text files are text, exactly as written, unless
``ids="integer"`` says the ids are integers.  Without a node table, compact id ``i`` is the
``i``-th distinct text label in order of first appearance (tail column, then head column), or
the ``i``-th smallest integer id.  With a node table, compact id ``i`` is row ``i`` of the node
table, so nodes without edges are kept as isolated nodes.

This module is the public face; the work is done in its modules:

=================  ==============================================================================
``edgelist``       the EdgeList type and its construction from table columns
``labels``         labels to compact ids and back (one module for every lookup)
``nodes``          node tables (labels with coordinates)
``registry``       the file formats and format detection; ``formats/`` has one module per format
``files``          ``read_edges``, ``write_table``, ``write_forest`` through the registry
``layers``         GIS line and point layers (pyogrio), ``snapping`` joins line end points
``positions``      edges named in a file by position or by label pairs
``links``          lists of links named by link id, position or site pair (``read_links``)
``adapters``       pandas/pyarrow, SciPy and networkx in; tables and graphs out
``atomic``         atomic file writing
``checks``         file and table checks, ``FileFormatError``
``numbers``        numbers read from text exactly (no silent rounding or overflow)
=================  ==============================================================================
"""
from fastmst.io import formats as _formats  # noqa: F401  (registers every format)
from fastmst.io import registry as _registry
from fastmst.io.adapters import (edge_table, forest_table, from_networkx, from_scipy, from_table,
                                 node_table, to_networkx)
from fastmst.io.atomic import StagedOutputs, atomic_write
from fastmst.io.checks import (FileFormatError, check_column, check_no_missing,
                               check_unique_labels)
from fastmst.io.edgelist import EdgeList
from fastmst.io.files import read_edges, write_forest, write_table
from fastmst.io.formats.csv import CSV_BLOCK_SIZE
from fastmst.io.formats.geojson import write_geojson
from fastmst.io.formats.gpkg import write_geopackage
from fastmst.io.labels import encode_labels, label_array
from fastmst.io.links import LinkList, read_links
from fastmst.io.layers import read_line_layer, read_point_layer
from fastmst.io.nodes import NodeTable, read_nodes
from fastmst.io.positions import read_forest_positions, read_positions
from fastmst.io.registry import Format, detect_format, register
from fastmst.io.tables import load_table

#: Formats that ``read_edges`` reads, in registry order.
FORMATS = _registry.names("read")
#: Formats that ``write_forest`` writes.
WRITE_FORMATS = _registry.names("write")

__all__ = ["EdgeList", "NodeTable", "FileFormatError", "FORMATS", "WRITE_FORMATS",
           "read_edges", "read_nodes", "write_forest", "write_table", "write_geojson",
           "read_line_layer", "read_point_layer", "write_geopackage",
           "from_table", "from_scipy", "from_networkx", "to_networkx", "forest_table",
           "node_table", "read_positions", "read_forest_positions", "load_table",
           "read_links", "LinkList", "edge_table",
           "atomic_write", "StagedOutputs", "label_array", "encode_labels", "detect_format", "Format", "register",
           "check_column", "check_no_missing", "check_unique_labels", "CSV_BLOCK_SIZE"]
