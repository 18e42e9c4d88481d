"""Stubs for fastmst._kernels._labels (the compiled passes of text labels to ids; the Python
half, ``text_ids``, is fastmst/_kernels/labels.py)."""
import numpy as np
import numpy.typing as npt

PLAN_SLACK: float
PLAN_EXTRA: int
REG_BYTES: int
N_PARTS: int
ENTRY_BYTES: int
SEG_ROWS_LOG2: int

class LabelTables:
    def __init__(self) -> None: ...

def count_piece(tables: LabelTables, seg: npt.NDArray[np.intp], segblk: npt.NDArray[np.intp],
                rows: int, block: int, regs: npt.NDArray[np.uint8],
                threads: int, /) -> int: ...
def reserve(tables: LabelTables, slots: npt.NDArray[np.uint64], first: npt.NDArray[np.int64],
            uptr: npt.NDArray[np.uint64], gid: npt.NDArray[np.int32],
            gptr: npt.NDArray[np.uint64], glen: npt.NDArray[np.int64],
            threads: int, /) -> None: ...
def largest_partition(tables: LabelTables, /) -> int: ...
def plan_piece(tables: LabelTables, seg: npt.NDArray[np.intp], segblk: npt.NDArray[np.intp],
               rows: int, block: int, room: int, /) -> int: ...
def map_piece(tables: LabelTables, seg: npt.NDArray[np.intp], segblk: npt.NDArray[np.intp],
              rows: int, block: int, off: npt.NDArray[np.intp], ent: npt.NDArray[np.uint8],
              part: npt.NDArray[np.uint8], eid: npt.NDArray[np.int32],
              bits: npt.NDArray[np.uint64], below: npt.NDArray[np.intp],
              out: npt.NDArray[np.int32], threads: int, /) -> int: ...
def label_offsets(tables: LabelTables, offsets: npt.NDArray[np.int64], /) -> int: ...
def label_bytes(tables: LabelTables, offsets: npt.NDArray[np.int64],
                out: npt.NDArray[np.uint8], threads: int, /) -> None: ...
def integer_labels(seg: npt.NDArray[np.intp], out: npt.NDArray[np.int64],
                   threads: int, /) -> bool: ...
