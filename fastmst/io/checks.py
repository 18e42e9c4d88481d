"""Checks of files and tables: the file-format error and the column, cell and label checks.

Every message names the source (file or table), the row or line when there is one, what was
found and how to fix it.  A wrong type (a column given by something other than its name) is a
TypeError; everything wrong with a file's contents is a ``FileFormatError``, a ValueError (the
class lives in :mod:`fastmst.validation`, shared with the Dask path; re-exported here and from
:mod:`fastmst.io`).
"""
from __future__ import annotations

import os
from pathlib import Path

import numpy as np

# One exception class for malformed files and tables everywhere: it is defined in the core
# checks so that the Dask path (which does not import fastmst.io) raises the same class.
from fastmst.validation import FileFormatError, shown

__all__ = ["FileFormatError", "csv_row", "table_row", "existing_file", "check_column",
           "check_no_missing", "check_no_nan", "check_unique_labels", "check_declared_nodes",
           "check_not_input", "shown"]

#: A header may declare this many nodes beyond twice its edges (isolated nodes) unasked.
SPARE_NODES = 1 << 20


def csv_row(i: int) -> str:
    """Wording of data row ``i`` (from 0) of a text file with a header line."""
    return f"data row {i + 1} (line {i + 2})"


def table_row(i: int) -> str:
    """Wording of row ``i`` of a table or a binary file."""
    return f"row {i} (counting from 0)"


def existing_file(path, func: str) -> Path:
    """``path`` as a Path, checked to be an existing, non-empty file."""
    p = Path(path)
    if not p.exists():
        raise FileNotFoundError(f"{func}: no such file {str(p)!r}; check the path (the current "
                                f"directory is {os.getcwd()!r}).")
    if p.is_dir():
        raise FileFormatError(f"{p}: is a directory; expected an edge-list file.")
    if p.stat().st_size == 0:
        raise FileFormatError(f"{p}: the file is empty; expected a header line and one line "
                              f"per edge.")
    return p


def _source_file(source: str):
    """The file an EdgeList's ``source`` names ("links.gpkg (layer 'roads')" names
    links.gpkg), or None when it names no existing file (a table in memory)."""
    for candidate in (source, source.split(" (layer ")[0]):
        if candidate and os.path.isfile(candidate):
            return candidate
    return None


def check_not_input(path, edges, func: str) -> None:
    """Writing ``path`` must not replace the file ``edges`` were read from (the input would be
    lost): a ValueError when both name one file (also through links)."""
    source = _source_file(str(getattr(edges, "source", "") or ""))
    if source is None or not os.path.exists(path):
        return
    same = os.path.realpath(path) == os.path.realpath(source)
    if not same:
        try:
            same = os.path.samefile(path, source)   # hard links
        except OSError:
            same = False
    if same:
        raise ValueError(f"{func}: the output {str(path)!r} is the input the edges were read "
                         f"from ({source!r}); writing there would replace the input. Choose "
                         f"another output name.")


def check_column(name, present, source: str, role: str, func: str) -> str:
    """``name`` must be one of the ``present`` column names of ``source``."""
    if not isinstance(name, str):
        raise TypeError(f"{func}: the {role} column must be given by name (a string), received "
                        f"{type(name).__name__} {name!r}.")
    if name not in present:
        listed = ", ".join(map(repr, present)) or "none"
        option = role.replace("_", "-")
        raise FileFormatError(f"{source}: no column {name!r} for the {role}; the columns present "
                              f"are {listed}. Pick one of them (CLI: --{option} COLUMN).")
    return name


def check_no_missing(missing: np.ndarray, column: str, source: str, where, func: str,
                     needs: str = "every edge needs a value there") -> None:
    """Raise naming the first True entry of the boolean ``missing`` (``where(i)`` words it);
    ``needs`` says why the value is needed."""
    if missing.size and missing.any():
        first = int(np.flatnonzero(missing)[0])
        raise FileFormatError(f"{source}: {where(first)}: column {column!r} is empty or missing "
                              f"({int(missing.sum())} such rows in all); {needs}. Fill or "
                              f"drop those rows.")


# What each kind of numeric column is for, as the NaN message words it.
_NEEDS = {"weight": "every edge needs a comparable weight",
          "coordinate": "every node needs finite coordinates"}


def check_no_nan(values: np.ndarray, column: str, source: str, where, what: str = "weight"):
    """Floating ``values`` of ``column`` must hold no NaN; ``what`` names them ("weight",
    "coordinate").  Returns ``values``."""
    if values.dtype.kind == "f" and values.size and np.isnan(values.min()):
        bad = np.isnan(values)
        first = int(np.flatnonzero(bad)[0])
        raise FileFormatError(f"{source}: {where(first)}: {what} in column {column!r} is NaN "
                              f"({int(bad.sum())} NaN {what}s in all); "
                              f"{_NEEDS.get(what, 'every row needs a number')}. Fill or drop "
                              f"those rows.")
    return values


def check_unique_labels(labels: np.ndarray, column: str, source: str, where) -> None:
    """Node labels of a node table must be unique."""
    order = np.argsort(labels, kind="stable")
    s = labels[order]
    dup = np.flatnonzero(s[1:] == s[:-1])
    if dup.size:
        a, b = sorted((int(order[dup[0]]), int(order[dup[0] + 1])))
        raise FileFormatError(f"{source}: node {shown(s[dup[0]])} in column {column!r} appears "
                              f"twice "
                              f"({where(a)} and {where(b)}); node ids must be unique. Remove the "
                              f"duplicate rows.")


# singular of the words ``check_declared_nodes`` counts with ("holds 1 arc", not "1 arcs")
_SINGULAR = {"arcs": "arc", "stored entries": "stored entry", "edges": "edge"}


def check_declared_nodes(n: int, n_edges: int, declared, source: str, what: str) -> int:
    """The node count ``n`` a file's header declares, checked against what the file holds.

    Every declared node costs memory (labels, the solver's arrays), so a header may declare at
    most ``2 * n_edges + SPARE_NODES`` nodes (each edge names two; the rest are isolated nodes)
    unless the caller confirms the count: ``declared`` must then equal ``n``.  Checked before
    anything node-sized is allocated.  ``what`` names the edges ("arcs", "stored entries").
    """
    limit = 2 * n_edges + SPARE_NODES
    if declared is not None:
        if declared != n:
            raise FileFormatError(f"{source}: declared_nodes={shown(declared)} does not match "
                                  f"the header, which declares {n:,} nodes; pass the header's "
                                  f"count (CLI: --declared-nodes {n}) or fix the file.")
        return n
    if n > limit:
        gib = n * 8 / 2**30
        what = _SINGULAR.get(what, what) if n_edges == 1 else what
        raise FileFormatError(f"{source}: the header declares {n:,} nodes but the file holds "
                              f"{n_edges:,} {what}; every declared node costs memory (8 bytes "
                              f"for its label alone, {gib:,.1f} GiB here, several times that "
                              f"to solve), so more than {limit:,} nodes for this file are "
                              f"refused. Fix the header, or if the graph really has {n:,} nodes "
                              f"(most of them isolated), confirm the count: "
                              f"declared_nodes={n} (CLI: --declared-nodes {n}).")
    return n
