"""Stubs for fastmst._kernels.paths (merge tree, path maxima, path cover)."""
import numpy as np
from numpy.typing import NDArray

def kruskal_tree(ftail: NDArray[np.integer], fhead: NDArray[np.integer], n_nodes: int
                 ) -> tuple[NDArray[np.int64], NDArray[np.int64], NDArray[np.int64],
                            NDArray[np.int64], int]: ...
class PathMaxIndex:
    # int32 while node and edge counts fit (n_nodes + n_forest_edges < 2**31 - 1), int64 beyond
    pos: NDArray[np.int32] | NDArray[np.int64]
    gap: NDArray[np.int32] | NDArray[np.int64]
    def __init__(self, kparent: NDArray[np.int64], left: NDArray[np.int64],
                 right: NDArray[np.int64], size: NDArray[np.int64], n_nodes: int) -> None: ...
    def query(self, qa: NDArray[np.integer], qb: NDArray[np.integer], threads: int = 1
              ) -> NDArray[np.int64]: ...
def root_forest(ftail: NDArray[np.integer], fhead: NDArray[np.integer], n_nodes: int
                ) -> tuple[NDArray[np.int64], NDArray[np.int64], NDArray[np.int64]]: ...
def cover_paths(pnode: NDArray[np.int64], pedge: NDArray[np.int64], depth: NDArray[np.int64],
                n_forest_edges: int, qa: NDArray[np.integer], qb: NDArray[np.integer]
                ) -> tuple[NDArray[np.int64], int]: ...
def union_parent(ftail: NDArray[np.integer], fhead: NDArray[np.integer], n_nodes: int
                 ) -> NDArray[np.int64]: ...
