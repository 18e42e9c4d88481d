"""Lists of links (required, excluded) named by link id, by position or by site pair.

A list of links is a table (a file, a DataFrame or a pyarrow Table).  It names links in one of
three ways, tried in this order:

1. **by link id** when the edge list has a link-id column (``read_edges(link_id=...)``, CLI
   ``--link-id``) and the list has a column of that name: each id names exactly one link;
2. **by position**, a ``position`` column: the link's row in the edge list, from 0, as every
   forest output writes it;
3. **by site pair**, the first two columns: the two endpoint labels, in either direction.  A
   pair names *every* link between the two sites when ``parallel="all"`` (what excluding a
   pair means: no link between them may be used) and the lightest of them (the earliest among
   equal weights) when ``parallel="lightest"`` (what requiring a pair means: a forest holds at
   most one link between two sites).  Pairs that matched several links are reported, so that a
   summary can name them; to name one of several parallel links, use its id or position.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from fastmst.io.checks import FileFormatError, shown
from fastmst.io.labels import lookup
from fastmst.io.positions import pair_ranges, position_column
from fastmst.io.tables import load_table

PARALLEL = ("all", "lightest")


@dataclass(frozen=True)
class LinkList:
    """Links named in a list, as positions in an edge list.

    Attributes
    ----------
    positions : ndarray of int64
        Positions in the edge list, in the order of the list (the links of one pair together).
    named_by : str
        "link id", "position" or "pair".
    rows : int
        Rows of the list.
    several : list of (tail label, head label, number of links)
        Pairs that matched more than one link (with ``parallel="all"`` every one was taken,
        with "lightest" only the lightest).
    source : str
        The list's file name or a description.
    """
    positions: np.ndarray
    named_by: str
    rows: int
    several: list = field(default_factory=list)
    source: str = "<links>"

    def __len__(self) -> int:
        return int(self.positions.shape[0])


def read_links(path, edges, *, parallel="all", func="read_links", delimiter=None,
               decimal_comma=False) -> LinkList:
    """The links of ``edges`` that the list ``path`` names (see the module docstring).

    Parameters
    ----------
    path : str, Path, pandas.DataFrame or pyarrow.Table
        The list: a column named like ``edges.link_id``, a ``position`` column, or two label
        columns (the first two) naming each link by its sites.
    edges : EdgeList
    parallel : {"all", "lightest"}
        What a site pair with several links names: all of them, or the lightest.
    func : str
        The caller's name for messages (the CLI passes its option, e.g. ``"--excluded"``).
    delimiter, decimal_comma : optional
        For CSV/TSV files, as in :func:`fastmst.io.read_edges`.

    Returns
    -------
    LinkList

    Raises
    ------
    FileFormatError (a ValueError)
        Ids, positions or labels that name no link of ``edges``, pairs that no link joins.
    """
    if parallel not in PARALLEL:
        raise ValueError(f"{func}: parallel must be 'all' or 'lightest', received "
                         f"{shown(parallel)}.")
    link_id = getattr(edges, "link_id", None)
    table, source, where = load_table(path, None, func, lambda header: [
        c for c in header if c != "position"], delimiter, decimal_comma)
    names = table.column_names
    if link_id is not None and link_id in names:
        pos = _by_id(table.column(link_id), edges, link_id, source, where)
        return LinkList(pos, "link id", table.num_rows, [], source)
    if "position" in names:
        return LinkList(position_column(table, edges, source, where), "position", table.num_rows,
                        [], source)
    if len(names) < 2:
        hint = f", a {link_id!r} column" if link_id else ""
        raise FileFormatError(f"{source}: expected a 'position' column{hint} or two label "
                              f"columns (tail, head); found "
                              f"{', '.join(map(repr, names)) or 'none'}.")
    pos, several = _by_pair(table.column(names[0]), table.column(names[1]), edges, source,
                            where, parallel)
    return LinkList(pos, "pair", table.num_rows, several, source)


def _by_id(col, edges, name, source, where) -> np.ndarray:
    import pyarrow as pa
    ids = edges.attributes.column(name)
    found, missing, compared = lookup(col.cast(pa.string()) if col.type != pa.string() else col,
                                      ids.combine_chunks())
    if missing.any():
        i = int(np.flatnonzero(missing)[0])
        raise FileFormatError(f"{source}: {where(i)}: link id {compared[i].as_py()!r} is not in "
                              f"column {name!r} of {edges.source}.")
    return found.astype(np.int64)


def _by_pair(tcol, hcol, edges, source, where, parallel):
    order, lo, hi, ids = pair_ranges(tcol, hcol, edges, source, where, "link")
    count = hi - lo
    several = [(edges.label([ids[0][i]])[0], edges.label([ids[1][i]])[0], int(count[i]))
               for i in np.flatnonzero(count > 1).tolist()]
    several = [(_plain(x), _plain(y), c) for x, y, c in several]
    if parallel == "lightest":
        return order[lo].astype(np.int64), several
    pos = (np.concatenate([order[x:y] for x, y in zip(lo, hi)]) if lo.size
           else np.empty(0, np.int64))
    return pos.astype(np.int64), several


def _plain(x):
    return x.item() if isinstance(x, np.generic) else x
