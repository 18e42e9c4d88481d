"""fastmst: fast, exact, deterministic minimum spanning forests of large graphs.

The public API is re-exported here; see ``minimum_spanning_forest`` for the semantics and the
tie rule shared by every function.
"""
from fastmst._kernels.disjoint_set import DisjointSet
from fastmst.solve import METHODS, SpanningForest, minimum_spanning_forest
from fastmst.io import EdgeList, read_edges, read_nodes, write_forest
from fastmst.toolkit.certify import ForestCheck, check_forest
from fastmst.toolkit.sensitivity import sensitivity
from fastmst.toolkit.linkage import single_linkage
from fastmst.geometry.points import point_spanning_tree
from fastmst.geometry.steiner import SteinerTree, steiner_tree
from fastmst.plot import plot_forest

__version__ = "0.1.0"

__all__ = ["DisjointSet", "METHODS", "SpanningForest", "minimum_spanning_forest", "__version__"]
__all__ += ["EdgeList", "read_edges", "read_nodes", "write_forest"]
__all__ += ["ForestCheck", "check_forest", "sensitivity", "single_linkage"]
__all__ += ["point_spanning_tree", "SteinerTree", "steiner_tree"]
__all__ += ["plot_forest"]
