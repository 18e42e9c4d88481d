"""Stubs for fastmst._kernels._halves (the compiled kernels behind fastmst._kernels.halves:
lowest common ancestors; the cheapest cover by halves)."""
import numpy as np
from numpy.typing import NDArray

def common_ancestors(pnode: NDArray[np.int64], a: NDArray[np.int64], b: NDArray[np.int64],
                     cptr: NDArray[np.int32], kids: NDArray[np.int32],
                     cursor: NDArray[np.int32], stack: NDArray[np.int32],
                     order: NDArray[np.int32], rank: NDArray[np.int32],
                     first: NDArray[np.int32], qptr: NDArray[np.int32],
                     qlist: NDArray[np.int32], dsu: NDArray[np.int32],
                     done: NDArray[np.uint8], out: NDArray[np.int64], /) -> int: ...
def cover_by_halves(pnode: NDArray[np.int64], depth: NDArray[np.int64],
                    starts: NDArray[np.int64], top_depth: NDArray[np.int64],
                    cost: NDArray[np.float64], tie: NDArray[np.int64],
                    order: NDArray[np.int32], rank: NDArray[np.int32],
                    prank: NDArray[np.int32], kids: NDArray[np.int32],
                    cursor: NDArray[np.int32], stack: NDArray[np.int32],
                    drank: NDArray[np.int32], hptr: NDArray[np.int32],
                    hstart: NDArray[np.int32], horig: NDArray[np.int32],
                    htop: NDArray[np.int32], val: NDArray[np.float64],
                    tag: NDArray[np.float64], arg: NDArray[np.int32], ties: NDArray[np.int64],
                    best_r: NDArray[np.int32], total_r: NDArray[np.float64],
                    alive: NDArray[np.int32], claimed: NDArray[np.uint8],
                    chosen_r: NDArray[np.uint8], best: NDArray[np.int64],
                    total: NDArray[np.float64], chosen: NDArray[np.uint8],
                    first: NDArray[np.int32], /) -> int: ...
