"""Stub of the compiled dense Prim kernel (fastmst/_kernels/_points.pyx; the Python half is
fastmst/_kernels/points.py)."""
import numpy as np
from numpy.typing import NDArray

def prim(Xs: NDArray[np.float64], metric: int, p: float, n_threads: int, block: int,
         ids: NDArray[np.int64], bd: NDArray[np.float64], thr: NDArray[np.float64],
         bu: NDArray[np.int64], xu: NDArray[np.float64], added: NDArray[np.int64],
         out_u: NDArray[np.int64], out_d: NDArray[np.float64], blk_pos: NDArray[np.int64],
         blk_nan: NDArray[np.uint8], par_min: int) -> int: ...
