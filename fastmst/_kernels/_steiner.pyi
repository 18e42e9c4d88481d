"""Stub of the compiled Steiner tree kernels (fastmst/_kernels/_steiner.pyx; the Python half is
fastmst/_kernels/steiner.py)."""
import numpy as np
from numpy.typing import NDArray

def voronoi_regions(indptr: NDArray[np.int64], nbr: NDArray[np.int64],
                    length: NDArray[np.float64], arc_edge: NDArray[np.int64],
                    sources: NDArray[np.int64], dist: NDArray[np.float64],
                    region: NDArray[np.int64], pred_edge: NDArray[np.int64],
                    pred_node: NDArray[np.int64], done: NDArray[np.uint8],
                    hkey: NDArray[np.float64], hnode: NDArray[np.int64]) -> None: ...
def mark_path_edges(starts: NDArray[np.int64], pred_edge: NDArray[np.int64],
                    pred_node: NDArray[np.int64], node_seen: NDArray[np.uint8],
                    edge_mark: NDArray[np.uint8]) -> None: ...
def prune_forest(indptr: NDArray[np.int64], nbr: NDArray[np.int64], arc_edge: NDArray[np.int64],
                 keep_node: NDArray[np.uint8], degree: NDArray[np.int64],
                 edge_alive: NDArray[np.uint8], stack: NDArray[np.int64]) -> int: ...
