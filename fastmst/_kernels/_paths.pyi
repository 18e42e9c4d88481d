"""Stubs for fastmst._kernels._paths (the compiled kernels of merge trees, path maxima and path
covers; the public functions are in fastmst._kernels.paths)."""
import numpy as np
from numpy.typing import NDArray

BLOCK: int
def kruskal_tree(ftail: NDArray[np.integer], fhead: NDArray[np.integer], dsu: NDArray[np.int64],
                 rank: NDArray[np.uint8], top: NDArray[np.int64], kparent: NDArray[np.int64],
                 left: NDArray[np.int64], right: NDArray[np.int64], size: NDArray[np.int64], /
                 ) -> int: ...
def root_forest(ftail: NDArray[np.integer], fhead: NDArray[np.integer], start: NDArray[np.int64],
                adj: NDArray[np.int64], nbr: NDArray[np.int64], pnode: NDArray[np.int64],
                pedge: NDArray[np.int64], depth: NDArray[np.int64], queue: NDArray[np.int64], /
                ) -> None: ...
def cover_paths(pnode: NDArray[np.int64], pedge: NDArray[np.int64], depth: NDArray[np.int64],
                qa: NDArray[np.integer], qb: NDArray[np.integer], dsu: NDArray[np.int64],
                rank: NDArray[np.uint8], top: NDArray[np.int64], cover: NDArray[np.int64], /
                ) -> int: ...
def union_parent(ftail: NDArray[np.integer], fhead: NDArray[np.integer],
                 parent: NDArray[np.int64], rank: NDArray[np.uint8], /) -> None: ...
def leaf_tables(kparent: NDArray[np.int64], left: NDArray[np.int64], right: NDArray[np.int64],
                size: NDArray[np.int64], offset: NDArray[np.int64], gap: NDArray[np.int64],
                pre: NDArray[np.int64], suf: NDArray[np.int64], table: NDArray[np.int64], /
                ) -> None: ...
def path_max32(pos: NDArray[np.int32], gap: NDArray[np.int32], pre: NDArray[np.int32],
               suf: NDArray[np.int32], table: NDArray[np.int32], n_forest_edges: int,
               qa: NDArray[np.integer], qb: NDArray[np.integer], out: NDArray[np.int64],
               threads: int, /) -> None: ...
def path_max64(pos: NDArray[np.int64], gap: NDArray[np.int64], pre: NDArray[np.int64],
               suf: NDArray[np.int64], table: NDArray[np.int64], n_forest_edges: int,
               qa: NDArray[np.integer], qb: NDArray[np.integer], out: NDArray[np.int64],
               threads: int, /) -> None: ...
