"""Stubs for fastmst._kernels.labels (text labels to ids by first appearance)."""
from collections.abc import Sequence

import numpy as np
import numpy.typing as npt

PIECE_ROWS: int

def text_ids(chunks: Sequence[object], n_tail: int, threads: int = ...
             ) -> tuple[npt.NDArray[np.int32], npt.NDArray[np.int32], npt.NDArray[np.int64],
                        npt.NDArray[np.uint8]]: ...
