"""Stubs for fastmst._kernels.small (one-pass solve of small edge lists)."""
import numpy as np
import numpy.typing as npt

MAX_EDGES: int
MAX_NODES: int

def small_forest(tail: object, head: object, weight: object, n_nodes: int | None,
                 maximize: bool) -> tuple[npt.NDArray[np.int64], npt.NDArray[np.int64], int, int,
                                          int, npt.NDArray, npt.NDArray, npt.NDArray] | None: ...
