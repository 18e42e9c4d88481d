"""Stubs for fastmst._kernels.radix (radix sort of edge records under the tie rule; the Python
half of split_records is fastmst._kernels.records)."""
import numpy as np
import numpy.typing as npt

RECORD_DTYPE: np.dtype
MAX_RECORDS: int
MIN_EDGES_PER_THREAD: int

def split_buckets32(bits: npt.NDArray[np.uint32], kind: int, maximize: bool, kmin: int,
                    top_bits: int, raw: npt.NDArray[np.uint8], hist: npt.NDArray[np.intp],
                    bounds: npt.NDArray[np.intp], threads: int) -> int: ...
def split_buckets64(bits: npt.NDArray[np.uint64], kind: int, maximize: bool, kmin: int,
                    top_bits: int, raw: npt.NDArray[np.uint8], hist: npt.NDArray[np.intp],
                    bounds: npt.NDArray[np.intp], threads: int) -> int: ...
def sort_buckets(raw: npt.NDArray[np.uint8], bounds: npt.NDArray[np.intp], next_shift: int,
                 first: int, last: int, threads: int = ...) -> None: ...
def openmp_max_threads() -> int: ...
