"""Stub of the compiled Steiner tree kernels (fastmst/_kernels/steiner.pyx)."""
import numpy as np
from numpy.typing import NDArray

def voronoi(indptr: NDArray[np.int64], nbr: NDArray[np.int64], length: NDArray[np.float64],
            arc_edge: NDArray[np.int64], sources: NDArray[np.int64]
            ) -> tuple[NDArray[np.float64], NDArray[np.int64], NDArray[np.int64],
                       NDArray[np.int64]]: ...
def mark_paths(starts: NDArray[np.int64], pred_edge: NDArray[np.int64],
               pred_node: NDArray[np.int64], n_edges: int) -> NDArray[np.bool_]: ...
def prune_leaves(indptr: NDArray[np.int64], nbr: NDArray[np.int64], arc_edge: NDArray[np.int64],
                 keep_node: NDArray[np.uint8], n_edges: int) -> NDArray[np.bool_]: ...
