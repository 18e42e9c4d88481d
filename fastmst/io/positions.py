"""Edges named in a file: a ``position`` column, or pairs of node labels.

Lists of required or excluded links, and forests to check, name edges of an edge list either by
position (the edge's row in the input, from 0, as ``write_forest`` writes it) or by their two
endpoint labels.  These functions turn such a file into edge positions.
"""
from __future__ import annotations

import numpy as np

from fastmst.io.checks import FileFormatError, shown
from fastmst.io.labels import all_labels, lookup
from fastmst.io.tables import load_table


def read_positions(path, edges, *, all_parallel=False, func="read_positions") -> np.ndarray:
    """Positions in ``edges`` of the edges listed in ``path``.

    Parameters
    ----------
    path : str, Path, pandas.DataFrame or pyarrow.Table
        A table with a ``position`` column, or with two label columns (the first two columns)
        naming each edge by its endpoints, in either direction.
    edges : EdgeList
        The edge list the positions refer to.
    all_parallel : bool
        For label pairs: every parallel edge joining the pair (True), or only the lightest one,
        the first in input order among equal weights (False).
    func : str
        The caller's name for messages (the CLI passes its option, e.g. ``"--required"``).

    Returns
    -------
    ndarray of int64
        Edge positions, in the order of the file (parallel edges of one pair together).

    Raises
    ------
    FileFormatError (a ValueError)
        Positions that are not integers or not edges of ``edges``, labels that are not nodes of
        ``edges``, pairs that no edge joins.
    """
    table, source, where = load_table(path, None, func, _label_columns)
    return _positions(table, source, where, edges, all_parallel)


def _label_columns(header):
    """Columns of a list of links read as text labels: all but ``position``."""
    return [c for c in header if c != "position"]


def _positions(table, source, where, edges, all_parallel):
    names = table.column_names
    if "position" in names:
        return position_column(table, edges, source, where)
    if len(names) < 2:
        raise FileFormatError(f"{source}: expected a 'position' column or two label columns "
                              f"(tail, head); found {', '.join(map(repr, names)) or 'none'}.")
    return _pair_positions(table.column(names[0]), table.column(names[1]), edges, source, where,
                           all_parallel)


def position_column(table, edges, source, where) -> np.ndarray:
    """The ``position`` column of a list of links as int64 edge positions, each checked to be
    an edge of ``edges`` (a FileFormatError naming the row otherwise)."""
    pos = table.column("position").to_numpy(zero_copy_only=False)
    if pos.dtype.kind not in "iu":
        raise FileFormatError(f"{source}: column 'position' must hold integer edge "
                              f"positions, found {table.column('position').type}.")
    bad = np.flatnonzero((pos < 0) | (pos >= edges.n_edges))
    if bad.size:
        raise FileFormatError(f"{source}: {where(int(bad[0]))}: position {pos[bad[0]]} is not "
                              f"an edge of {edges.source} (positions 0..{edges.n_edges - 1}).")
    return pos.astype(np.int64)


def _pair_positions(tcol, hcol, edges, source, where, all_parallel):
    """Positions of the edges joining listed label pairs (either direction)."""
    order, lo, hi, _ = pair_ranges(tcol, hcol, edges, source, where, "edge")
    if not all_parallel:
        return order[lo]
    return np.concatenate([order[x:y] for x, y in zip(lo, hi)]) if lo.size else \
        np.empty(0, np.int64)


def pair_ranges(tcol, hcol, edges, source, where, noun="edge"):
    """Where the edges joining each listed label pair (either direction) lie in a rule order.

    Returns ``(order, lo, hi, ids)``: the edges of pair ``i`` are ``order[lo[i]:hi[i]]``,
    lightest first (ties by position); ``ids`` are the pairs' node ids.  A label that is no node,
    or a pair that no edge joins, is a :class:`FileFormatError` naming the row (``noun`` is the
    message's word for an edge).
    """
    n = edges.n_nodes
    labels = all_labels(edges)
    ids = []
    for col in (tcol, hcol):
        found, missing, compared = lookup(col, labels)
        if missing.any():
            i = int(np.flatnonzero(missing)[0])
            raise FileFormatError(f"{source}: {where(i)}: node {compared[i].as_py()!r} is not a "
                                  f"node of {edges.source}.")
        ids.append(found.astype(np.int64))
    a, b = np.minimum(ids[0], ids[1]), np.maximum(ids[0], ids[1])
    et = edges.tail.astype(np.int64)
    eh = edges.head.astype(np.int64)
    ekey = np.minimum(et, eh) * n + np.maximum(et, eh)
    order = np.lexsort((np.arange(edges.n_edges), edges.weight, ekey))
    skey = ekey[order]
    want = a * n + b
    lo = np.searchsorted(skey, want, "left")
    hi = np.searchsorted(skey, want, "right")
    missing = np.flatnonzero(lo == hi)
    if missing.size:
        i = int(missing[0])
        raise FileFormatError(f"{source}: {where(i)}: no {noun} joins "
                              f"{shown(edges.label([ids[0][i]])[0])} and "
                              f"{shown(edges.label([ids[1][i]])[0])} in {edges.source}.")
    return order, lo, hi, ids


def read_forest_positions(path, edges, *, func="read_forest_positions") -> np.ndarray:
    """Positions in ``edges`` of the forest listed in ``path`` (as ``write_forest`` writes it).

    Like :func:`read_positions` (a label pair names its lightest edge); when the file has both a
    ``position`` column and label columns, the labels must be the endpoints of the edge at each
    position (in either direction), which catches a forest computed from another edge file.
    """
    table, source, where = load_table(path, None, func, _label_columns)
    pos = _positions(table, source, where, edges, False)
    names = [n for n in table.column_names if n != "position"]
    if "position" in table.column_names and len(names) >= 2:
        et, eh = edges.tail[pos], edges.head[pos]
        labels = all_labels(edges)
        lt = lookup(table.column(names[0]), labels)[0]
        lh = lookup(table.column(names[1]), labels)[0]
        bad = np.flatnonzero(~(((lt == et) & (lh == eh)) | ((lt == eh) & (lh == et))))
        if bad.size:
            i = int(bad[0])
            raise FileFormatError(f"{source}: {where(i)}: position {pos[i]} is the edge "
                                  f"{shown(edges.label([et[i]])[0])} -- "
                                  f"{shown(edges.label([eh[i]])[0])} in {edges.source}, not "
                                  f"the one listed; was the forest "
                                  f"computed from another edge file?")
    return pos
