"""Stubs for fastmst._kernels._replacements (the compiled kernel behind
fastmst._kernels.replacements: first covering links)."""
import numpy as np
from numpy.typing import NDArray

def first_covers(pnode: NDArray[np.int64], depth: NDArray[np.int64],
                 tail: NDArray[np.int32] | NDArray[np.int64],
                 head: NDArray[np.int32] | NDArray[np.int64], ranked: NDArray[np.int64],
                 records: NDArray[np.int32], /) -> int: ...
