"""Stubs for fastmst._kernels._treewalk (the compiled kernels of sides beyond tree edges, the
light shallow tree walk, tree distances and adjacency; the public functions are in
fastmst._kernels.treewalk)."""
import numpy as np
from numpy.typing import NDArray

def sides_beyond(pnode: NDArray[np.int64], depth: NDArray[np.int64], root: int,
                 start: NDArray[np.int64], order: NDArray[np.int64], size: NDArray[np.int64],
                 top: NDArray[np.int64], beyond: NDArray[np.int64], /) -> None: ...
def light_shallow_walk(indptr: NDArray[np.int64], adj: NDArray[np.int64],
                       adjw: NDArray[np.float64], adjpos: NDArray[np.int64], root: int,
                       dist: NDArray[np.float64], spt_parent: NDArray[np.int64],
                       spt_pos: NDArray[np.int64], alpha: float, d: NDArray[np.float64],
                       parent: NDArray[np.int64], ppos: NDArray[np.int64],
                       tparent: NDArray[np.int64], stack: NDArray[np.int64],
                       cursor: NDArray[np.int64], /) -> None: ...
def tree_distances(parent: NDArray[np.int64], pw: NDArray[np.float64], root: int,
                   start: NDArray[np.int64], child: NDArray[np.int64], queue: NDArray[np.int64],
                   dist: NDArray[np.float64], /) -> None: ...
def adjacency(a: NDArray[np.int64], b: NDArray[np.int64], indptr: NDArray[np.int64],
              nbr: NDArray[np.int64], link: NDArray[np.int64], /) -> None: ...
def parent_links(indptr: NDArray[np.int64], nbr: NDArray[np.int64], link: NDArray[np.int64],
                 w: NDArray[np.float64], pred: NDArray[np.int64], out: NDArray[np.int64], /
                 ) -> None: ...
