"""Stubs for fastmst._kernels.radix (radix sort of edge records under the tie rule)."""
import numpy as np
import numpy.typing as npt

RECORD_DTYPE: np.dtype
MAX_RECORDS: int
MIN_EDGES_PER_THREAD: int

def split_records(bits: npt.NDArray[np.uint32] | npt.NDArray[np.uint64], kind: int,
                  maximize: bool, kmin: int, top_bits: int, threads: int = ...
                  ) -> tuple[npt.NDArray[np.uint8], npt.NDArray[np.intp], int]: ...
def sort_buckets(raw: npt.NDArray[np.uint8], bounds: npt.NDArray[np.intp], next_shift: int,
                 first: int, last: int, threads: int = ...) -> None: ...
def openmp_max_threads() -> int: ...
