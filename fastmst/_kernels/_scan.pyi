"""Stubs for fastmst._kernels._scan (plain Kruskal scan, union pass, endpoint count)."""
import numpy as np
import numpy.typing as npt

def kruskal_scan(order: npt.NDArray[np.int64], tail: npt.NDArray, head: npt.NDArray,
                 parent: npt.NDArray, rank: npt.NDArray[np.uint8], target: int,
                 out: npt.NDArray[np.int64]) -> int: ...
def count_merges(tail: npt.NDArray, head: npt.NDArray, parent: npt.NDArray,
                 rank: npt.NDArray[np.uint8]) -> int: ...
def count_touched(tail: npt.NDArray, head: npt.NDArray, seen: npt.NDArray[np.uint64], nw: int,
                  threads: int) -> int: ...
