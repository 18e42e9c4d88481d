"""Stubs for fastmst._kernels.halves (lowest common ancestors; the cheapest cover by halves)."""
import numpy as np
from numpy.typing import NDArray

def common_ancestors(pnode: NDArray[np.int64], a: NDArray[np.int64], b: NDArray[np.int64]
                     ) -> NDArray[np.int64]: ...
def cover_by_halves(pnode: NDArray[np.int64], depth: NDArray[np.int64],
                    starts: NDArray[np.int64], top_depth: NDArray[np.int64],
                    cost: NDArray[np.float64], tie: NDArray[np.int64]
                    ) -> tuple[NDArray[np.int64], NDArray[np.float64], NDArray[np.bool_]]: ...
