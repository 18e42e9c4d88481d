"""Stubs for fastmst._kernels.scan (plain Kruskal scan, forest size and bound)."""
import numpy as np
import numpy.typing as npt

def forest_size(tail: npt.NDArray, head: npt.NDArray, n_nodes: int
                ) -> tuple[int, npt.NDArray[np.int32] | npt.NDArray[np.int64]]: ...
def kruskal(order: npt.NDArray[np.int64], tail: npt.NDArray, head: npt.NDArray, n_nodes: int,
            target: int) -> tuple[npt.NDArray[np.int64],
                                  npt.NDArray[np.int32] | npt.NDArray[np.int64]]: ...
def forest_bound(tail: npt.NDArray, head: npt.NDArray, n_nodes: int, threads: int = ...) -> int: ...
