"""Stubs for fastmst._kernels.radix_kruskal (cache-aware Kruskal over radix records)."""
import numpy as np
import numpy.typing as npt

MIN_EDGES_PIPELINE: int

def check_record_inputs(m: int, n_head: int, weight: npt.NDArray, n_nodes: int, target: int,
                        func: str) -> tuple[npt.NDArray, int, int]: ...

def kruskal_radix(tail: npt.NDArray, head: npt.NDArray, weight: npt.NDArray, n_nodes: int,
                  maximize: bool = ..., target: int = ..., threads: int = ...,
                  presorted: bool = ...
                  ) -> tuple[npt.NDArray[np.int64],
                             npt.NDArray[np.int32] | npt.NDArray[np.int64]]: ...
