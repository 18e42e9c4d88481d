"""Stubs for fastmst._kruskal (Kruskal scans and Filter-Kruskal)."""
import numpy as np
import numpy.typing as npt

MIN_EDGES_PIPELINE: int

def forest_size(tail: npt.NDArray, head: npt.NDArray, n_nodes: int
                ) -> tuple[int, npt.NDArray]: ...
def forest_bound(tail: npt.NDArray, head: npt.NDArray, n_nodes: int, threads: int = ...) -> int: ...
def kruskal(order: npt.NDArray[np.int64], tail: npt.NDArray, head: npt.NDArray, n_nodes: int,
            target: int) -> tuple[npt.NDArray[np.int64], npt.NDArray]: ...
def kruskal_radix(tail: npt.NDArray, head: npt.NDArray, weight: npt.NDArray, n_nodes: int,
                  maximize: bool = ..., target: int = ..., threads: int = ...,
                  presorted: bool = ...) -> tuple[npt.NDArray[np.int64], npt.NDArray]: ...
def filter_kruskal(tail: npt.NDArray, head: npt.NDArray, weight: npt.NDArray, n_nodes: int,
                   maximize: bool = ..., target: int = ..., threads: int = ...,
                   threshold: int = ...) -> tuple[npt.NDArray[np.int64], npt.NDArray]: ...
