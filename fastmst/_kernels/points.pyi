"""Stub of the compiled dense Prim kernel (fastmst/_kernels/points.pyx)."""
import numpy as np
from numpy.typing import NDArray

METRIC_CODES: dict[str, int]
DEF_BLOCK: int

def dense_prim(X: NDArray[np.float64], metric: int, p: float = ..., n_threads: int = ...,
               block: int = ..., par_min: int = ...
               ) -> tuple[NDArray[np.int64], NDArray[np.int64], NDArray[np.float64]]: ...
