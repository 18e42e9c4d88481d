"""Stubs for fastmst._kernels.replacements (first covering links)."""
import numpy as np
from numpy.typing import NDArray

def first_covers(pnode: NDArray[np.int64], pedge: NDArray[np.int64], depth: NDArray[np.int64],
                 n_links: int, tail: NDArray[np.int32] | NDArray[np.int64],
                 head: NDArray[np.int32] | NDArray[np.int64], ranked: NDArray[np.int64]
                 ) -> NDArray[np.int64]: ...
