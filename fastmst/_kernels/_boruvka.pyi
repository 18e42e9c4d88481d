"""Stubs for fastmst._kernels._boruvka (the parallel Borůvka kernel)."""
import numpy as np
import numpy.typing as npt

def boruvka_rounds(tail: npt.NDArray, head: npt.NDArray, bits: npt.NDArray[np.uint8], width: int,
                   kind: int, maximize: bool, threads: int, hint: npt.NDArray[np.uint8],
                   out: npt.NDArray[np.int64], final_label: npt.NDArray,
                   n_final: npt.NDArray[np.intp]) -> int: ...
def first_appearance(ids: npt.NDArray, table: npt.NDArray[np.int64],
                     out: npt.NDArray[np.int64]) -> int: ...
