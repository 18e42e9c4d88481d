"""Stubs for fastmst._kernels._radix_kruskal (the scans of the radix-record Kruskal)."""
import numpy as np
import numpy.typing as npt

def scan_positions(tail: npt.NDArray, head: npt.NDArray, parent: npt.NDArray,
                   rank: npt.NDArray[np.uint8], target: int, out: npt.NDArray[np.int64]) -> int: ...
def kruskal_buckets(raw: npt.NDArray[np.uint8], bounds: npt.NDArray[np.intp], shift: int,
                    tail: npt.NDArray, head: npt.NDArray, parent: npt.NDArray,
                    rank: npt.NDArray[np.uint8], out: npt.NDArray[np.int64], target: int,
                    wave: int, threads: int) -> int: ...
