"""Stubs for fastmst._kernels.treewalk (sides beyond tree edges; the light shallow tree walk;
tree distances and adjacency)."""
import numpy as np
from numpy.typing import NDArray

def sides_beyond(pnode: NDArray[np.int64], depth: NDArray[np.int64], root: int
                 ) -> tuple[NDArray[np.int64], NDArray[np.int64], NDArray[np.int64]]: ...
def light_shallow_walk(indptr: NDArray[np.int64], adj: NDArray[np.int64],
                       adjw: NDArray[np.float64], adjpos: NDArray[np.int64], root: int,
                       dist: NDArray[np.float64], spt_parent: NDArray[np.int64],
                       spt_pos: NDArray[np.int64], alpha: float
                       ) -> tuple[NDArray[np.int64], NDArray[np.int64], NDArray[np.float64]]: ...
def tree_distances(parent: NDArray[np.int64], pw: NDArray[np.float64], root: int
                   ) -> NDArray[np.float64]: ...
def adjacency(a: NDArray[np.int64], b: NDArray[np.int64], n_nodes: int
              ) -> tuple[NDArray[np.int64], NDArray[np.int64], NDArray[np.int64]]: ...
def parent_links(indptr: NDArray[np.int64], nbr: NDArray[np.int64], link: NDArray[np.int64],
                 w: NDArray[np.float64], pred: NDArray[np.int64]) -> NDArray[np.int64]: ...
