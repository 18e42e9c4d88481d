"""Stubs for fastmst._kernels.filter_kruskal (streamed Filter-Kruskal)."""
import numpy as np
import numpy.typing as npt

FILTER_WINDOW: int

def filter_kruskal(tail: npt.NDArray, head: npt.NDArray, weight: npt.NDArray, n_nodes: int,
                   maximize: bool = ..., target: int = ..., threads: int = ...,
                   threshold: int = ..., chunk: int = ...
                   ) -> tuple[npt.NDArray[np.int64], npt.NDArray, npt.NDArray, npt.NDArray,
                              npt.NDArray]: ...
