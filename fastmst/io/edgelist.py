"""The EdgeList type: compact node ids for the solvers, the user's labels for every output.

:func:`edges_from_table` builds one from the columns of a pyarrow table; every reader of a
tabular format (CSV/TSV, Parquet, .npz) and :func:`fastmst.io.from_table` go through it.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fastmst.geometry.geodesy import edge_lengths
from fastmst.io.checks import FileFormatError
from fastmst.io.columns import numeric_column
from fastmst.io.labels import encode_label_columns
from fastmst.io.nodes import NodeTable, node_index
from fastmst.solve import minimum_spanning_forest


class _Labels:
    """``EdgeList.labels``: NumPy or None as given, or a pyarrow text array kept as read and
    turned into a NumPy object array on first use (readers of large files then make no Python
    strings unless the labels are asked for)."""

    def __get__(self, obj, owner=None):
        if obj is None:
            return None                       # the dataclass default
        v = obj.__dict__.get("_labels")
        if v is not None and not isinstance(v, np.ndarray):
            v = v.to_numpy(zero_copy_only=False)
            obj.__dict__["_labels"] = v
        return v

    def __set__(self, obj, value):
        obj.__dict__["_labels"] = value


@dataclass
class EdgeList:
    """An edge list with compact node ids and the user's node labels.

    Attributes
    ----------
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Compact node ids in ``[0, n_nodes)``; edge ``i`` is row ``i`` of the source.
    weight : ndarray of shape (E,)
        Edge weights (int64, uint64 or float64 as read; float64 when computed from geometry).
    n_nodes : int
    labels : ndarray of shape (n_nodes,) or None
        The user's label of every compact id; None means the labels are the ids themselves.
        Text labels read from a file are kept as the reader's pyarrow array and made into this
        NumPy object array on first use (``label(ids)`` does not need them all).
    coords : ndarray of shape (n_nodes, 2), dtype=float64, or None
        Node coordinates when a node table gave them.
    geographic : bool
        True when ``coords`` are (longitude, latitude) in degrees.
    source : str
        Where the edges came from (file name or a description), for messages.
    columns : tuple of str
        Names for the tail, head and weight columns of output files (the input's names).
    attributes : pyarrow.Table or None
        The input's other columns, one row per edge, carried to every output under their own
        names (``keep_columns`` of the readers chooses them); None when there are none.
    link_id : str or None
        The column of ``attributes`` that names each link (``link_id=`` of the readers, CLI
        ``--link-id``), so that lists of links may name them by id.
    guessed : tuple of str
        Which of "tail", "head", "weight" were not given and were taken by the default rule
        (the first two columns; ``weight``, else the third), for messages.

    Examples
    --------
    >>> import numpy as np
    >>> el = EdgeList(np.array([0, 1]), np.array([1, 2]), np.array([2.0, 1.0]), 3,
    ...               labels=np.array(["a", "b", "c"]))
    >>> el.label([2, 0]).tolist()
    ['c', 'a']
    >>> float(el.solve().weight)
    3.0
    """
    tail: np.ndarray
    head: np.ndarray
    weight: np.ndarray
    n_nodes: int
    labels: np.ndarray | None = _Labels()
    coords: np.ndarray | None = None
    geographic: bool = False
    source: str = "<edges>"
    columns: tuple = ("tail", "head", "weight")
    attributes: object = None
    link_id: str | None = None
    guessed: tuple = ()

    @property
    def n_edges(self) -> int:
        return int(self.tail.shape[0])

    def label(self, ids) -> np.ndarray:
        """The user's labels of compact node ids (the ids themselves when there are no labels)."""
        ids = np.asarray(ids, dtype=np.int64)
        stored = self.__dict__.get("_labels")
        if stored is None:
            return ids.copy()
        n = len(stored)
        if isinstance(stored, np.ndarray) or 4 * ids.size >= n:   # many: make them all once
            return self.labels[ids]
        if ids.size and (ids.min() < -n or ids.max() >= n):   # as NumPy indexing would
            raise IndexError(f"label: node ids must be in -{n}..{n - 1}, received "
                             f"{int(ids.min())}..{int(ids.max())}.")
        flat = np.where(ids < 0, ids + n, ids).ravel()
        return stored.take(flat).to_numpy(zero_copy_only=False).reshape(ids.shape)

    def solve(self, **kwargs):
        """``minimum_spanning_forest`` of these edges; keyword arguments are passed on."""
        return minimum_spanning_forest(self.tail, self.head, self.weight, self.n_nodes, **kwargs)

    def __repr__(self) -> str:
        return (f"EdgeList({self.source!r}, n_nodes={self.n_nodes}, n_edges={self.n_edges}, "
                f"labelled={self.__dict__.get('_labels') is not None}, "
                f"coords={self.coords is not None})")


def edges_from_table(table, cols, source, where, nodes: NodeTable | None,
                     ids: str = "text", carry=(), link_id=None, guessed=()) -> EdgeList:
    """An EdgeList from the (tail, head, weight) columns ``cols`` of a pyarrow table.

    ``carry`` names the table's other columns kept as ``attributes`` (``link_id`` among them);
    ``guessed`` is recorded as it is.

    Without a node table, labels are encoded by the label rule of :mod:`fastmst.io.labels`
    (``ids``: "text" or "integer"); with one, endpoints are looked up in it.  ``weight == "length"`` with a node table and no
    such column computes lengths from the coordinates (great-circle metres for lon/lat).
    """
    try:
        return _edges_from_table(table, cols, source, where, nodes, ids, carry, link_id, guessed)
    except FileFormatError as exc:
        if not guessed:
            raise
        roles = dict(zip(("tail", "head", "weight"), cols))
        taken = ", ".join(f"{r} {roles[r]!r}" for r in guessed)
        were = "columns" if len(guessed) > 1 else "column"
        raise FileFormatError(f"{exc} The {were} {taken} {'were' if len(guessed) > 1 else 'was'} "
                              f"taken by default (the first two "
                              f"columns; 'weight', else the third); choose others with "
                              f"{'/'.join(r + '=' for r in guessed)} (CLI "
                              f"{'/'.join('--' + r for r in guessed)} COLUMN).") from None


def _edges_from_table(table, cols, source, where, nodes, ids, carry, link_id, guessed):
    tname, hname, wname = cols
    tcol, hcol = table.column(tname), table.column(hname)
    geometry = nodes is not None and wname == "length" and "length" not in table.column_names
    if nodes is None:
        t, h, labels = encode_label_columns(tcol, hcol, source, where, (tname, hname), ids,
                                            text_as_arrow=True)
        n = len(labels) if labels is not None else \
            (max(int(t.max()), int(h.max())) + 1 if t.size else 0)
        coords, geo = None, False
    else:
        t, h = node_index(tcol, hcol, nodes, source, where, (tname, hname), ids)
        labels, n, coords, geo = nodes.labels, int(nodes.labels.size), nodes.coords, \
            nodes.geographic
    if geometry:
        w = edge_lengths(coords, t, h, metric="great-circle" if geo else "euclidean")
    else:
        w = numeric_column(table.column(wname), wname, source, where)
    attributes = table.select(list(carry)) if len(carry) else None
    if link_id is not None:
        check_unique_link_ids(attributes.column(link_id), link_id, source, where)
    return EdgeList(t, h, w, n, labels, coords, geo, source, (tname, hname, wname), attributes,
                    link_id, tuple(guessed))


def check_unique_link_ids(col, name, source, where) -> None:
    """Every link id must name one link: no missing and no repeated ids."""
    import pyarrow.compute as pc
    if col.null_count:
        i = int(np.flatnonzero(col.is_null().to_numpy(zero_copy_only=False))[0])
        raise FileFormatError(f"{source}: {where(i)}: the link-id column {name!r} is empty; "
                              f"every link needs an id to be named by it.")
    counts = pc.value_counts(col)
    dup = pc.filter(counts, pc.greater(counts.field("counts"), 1))
    if len(dup):
        v = dup[0]["values"].as_py()
        rows = np.flatnonzero(pc.equal(col, dup[0]["values"]).to_numpy(zero_copy_only=False))
        raise FileFormatError(f"{source}: link id {v!r} in column {name!r} names "
                              f"{len(rows)} links ({where(int(rows[0]))} and "
                              f"{where(int(rows[1]))}); a link id must name exactly one link. "
                              f"Make the ids unique or name links by another column.")
