"""Checks of the distributed solve: columns of a partition, chunk arrays.

The scalar arguments (``n_nodes``, ``plan``, ``split_every``, column names) go through
``fastmst.validation`` like everywhere else.  A missing column raises ``FileFormatError`` (a
ValueError), worded like the file readers' message: the source, the missing column and its
role, and the columns that are present.
"""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst.validation import FileFormatError


def check_columns(present, wanted: dict, func: str, where: str) -> None:
    """Every wanted column (role -> name) must be among ``present``, the columns of ``where``."""
    present = [str(c) for c in present]
    missing = [f"no column {col!r} for the {role} ({role}={col!r})"
               for role, col in wanted.items() if col not in present]
    if missing:
        listed = ", ".join(map(repr, present)) or "none"
        raise FileFormatError(f"{func}: {where}: {'; '.join(missing)}; the columns present are "
                              f"{listed}. Pass the right names, e.g. "
                              f"minimum_spanning_forest(edges, tail='src', head='dst', "
                              f"weight='cost').")


def check_chunk_no_missing(values, name: str, func: str, where: str = "") -> None:
    """A column read from a table must not hold missing values (NA/None)."""
    import pandas as pd
    mask = pd.isna(values)
    if mask.any():
        first = int(np.flatnonzero(np.asarray(mask))[0])
        at = f" of {where}" if where else ""
        raise ValueError(f"{func}: {name}[{first}]{at} is missing (NA); every edge needs two "
                         f"endpoints and a weight. Drop the incomplete rows first, e.g. "
                         f"edges.dropna(subset=[...]).")


def check_chunk_ids(arr: np.ndarray, name: str, n_nodes, func: str, where: str,
                    code: str | None = None) -> None:
    """Ids of one chunk of a distributed edge list: integers in [0, n_nodes).  ``code``: how
    the user's code names the column (for the suggested fixes)."""
    validation.check_ids(arr, f"{name} of {where}", func, code=code)
    if arr.size == 0:
        return
    if arr.dtype.kind == "i" and int(arr.min()) < 0:
        first = int(np.flatnonzero(arr < 0)[0])
        raise ValueError(f"{func}: {name}[{first}] = {arr[first].item()} of {where} is "
                         f"negative; node ids must be global integers in [0, n_nodes). Map "
                         f"labels to compact ids first.")
    if n_nodes is not None and int(arr.max()) >= n_nodes:
        first = int(np.flatnonzero(arr >= n_nodes)[0])
        raise ValueError(f"{func}: {name}[{first}] = {arr[first].item()} of {where} is out of "
                         f"range; expected ids in [0, {n_nodes}) for n_nodes={n_nodes}; pass "
                         f"n_nodes >= {int(arr.max()) + 1} or fix the id.")
