"""Stubs for fastmst._kernels.tie_rule (the tie rule: thin typed defs of the key map and its
inverse; the Python face is fastmst._kernels.rule_order, whose names are importable here too)."""
import numpy as np
import numpy.typing as npt

from fastmst._kernels.rule_order import (edge_order as edge_order,
                                         first_unsorted as first_unsorted,
                                         key_kind as key_kind, key_range as key_range,
                                         sort_positions as sort_positions,
                                         weight_bits as weight_bits,
                                         weight_keys as weight_keys,
                                         weights_from_keys as weights_from_keys)

KERNEL_DTYPES: frozenset[np.dtype]
KEY_KINDS: dict[str, int]

def fill_keys32(bits: npt.NDArray[np.uint32], kind: int, complement: bool,
                out: npt.NDArray[np.uint64]) -> None: ...
def fill_keys64(bits: npt.NDArray[np.uint64], kind: int, complement: bool,
                out: npt.NDArray[np.uint64]) -> None: ...
def first_unsorted32(bits: npt.NDArray[np.uint32], kind: int, descending: bool) -> int: ...
def first_unsorted64(bits: npt.NDArray[np.uint64], kind: int, descending: bool) -> int: ...
def keys_to_weight_bits(keys: npt.NDArray[np.uint64], kind: int, complement: bool, kmin: int,
                        width: int) -> None: ...
