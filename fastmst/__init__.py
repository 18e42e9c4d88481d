"""fastmst: fast, exact, deterministic minimum spanning forests of large graphs.

The public API is re-exported here; see ``minimum_spanning_forest`` for the semantics and the
tie rule shared by every function.
"""
from fastmst._dsu import DisjointSet
from fastmst.forest import METHODS, SpanningForest, minimum_spanning_forest
from fastmst.io import EdgeList, read_edges, read_nodes, write_forest
from fastmst.certify import ForestCheck, check_forest
from fastmst.edge_sensitivity import sensitivity
from fastmst.linkage import single_linkage

__version__ = "0.1.0"

__all__ = ["DisjointSet", "METHODS", "SpanningForest", "minimum_spanning_forest", "__version__"]
__all__ += ["EdgeList", "read_edges", "read_nodes", "write_forest"]
__all__ += ["ForestCheck", "check_forest", "sensitivity", "single_linkage"]
