"""Stubs for fastmst._kernels.boruvka (parallel Borůvka)."""
import numpy as np
import numpy.typing as npt

MIN_EDGES_PER_THREAD: int

def boruvka(tail: npt.NDArray, head: npt.NDArray, weight: npt.NDArray, n_nodes: int,
            maximize: bool = ..., threads: int = ...
            ) -> tuple[npt.NDArray[np.int64], npt.NDArray[np.int64], int]: ...
