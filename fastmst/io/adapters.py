"""Edge lists from in-memory objects, and forests back to tables and graphs.

``from_table`` (pandas/pyarrow), ``from_scipy`` (sparse matrices), ``from_networkx``; the way
back: ``to_networkx``, ``forest_table`` (the forest as a pyarrow Table in the user's labels),
``edge_table`` (any links in the same layout) and
``node_table`` (one row per node with values such as cluster numbers).
"""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst.io.checks import FileFormatError, table_row
from fastmst.io.columns import carried_columns, choose_edge_columns, guessed_roles
from fastmst.io.edgelist import EdgeList, edges_from_table
from fastmst.io.labels import all_labels, check_ids, id_dtype, label_array
from fastmst.io.nodes import NodeTable, read_nodes
from fastmst.io.tables import is_pandas, pandas_to_arrow


def from_table(table, *, tail=None, head=None, weight=None, nodes=None,
               ids="text", keep_columns="all", link_id=None) -> EdgeList:
    """An EdgeList from a pandas DataFrame or pyarrow Table (one row per edge).

    Columns are chosen as in :func:`fastmst.io.read_edges`, and labels follow its rule
    (``ids``: the columns' own types, or "integer" to read text ids as integers);
    ``keep_columns`` and ``link_id`` as there (the other columns keep their own types).
    """
    import pyarrow as pa
    if isinstance(table, pa.Table):
        t, source = table, "<pyarrow table>"
    elif is_pandas(table):
        t, source = pandas_to_arrow(table), "<pandas DataFrame>"
    else:
        raise TypeError(f"from_table: expected a pandas DataFrame or a pyarrow Table, received "
                        f"{type(table).__name__}; for files use read_edges(path).")
    ids = check_ids(ids, "from_table")
    if nodes is not None and not isinstance(nodes, NodeTable):
        nodes = read_nodes(nodes, ids=ids)
    cols = choose_edge_columns(t.column_names, tail, head, weight, source, nodes is not None)
    carry = carried_columns(t.column_names, cols, keep_columns, link_id, source, "from_table")
    if t.num_rows == 0:
        raise FileFormatError(f"{source}: the table has no rows; expected one row per edge.")
    if link_id is not None:   # link ids are names: compared as text, as in files
        import pyarrow as pa
        i = t.column_names.index(link_id)
        t = t.set_column(i, link_id, t.column(i).cast(pa.string()))
    return edges_from_table(t, cols, source, table_row, nodes, ids, carry, link_id,
                            guessed_roles(tail, head, weight))


def from_scipy(matrix, *, symmetric=None) -> EdgeList:
    """An EdgeList from a SciPy sparse matrix or array: every stored entry is an edge.

    Explicit zeros are kept as zero-weight edges.  Edges are ordered by (row, column), entries
    with the same (row, column) in storage order.

    Parameters
    ----------
    matrix : scipy.sparse matrix or array of shape (n, n)
    symmetric : bool, optional
        True: the matrix is symmetric and only the upper triangle (row <= column) is read, one
        edge per pair; an asymmetric matrix is then a ValueError.  False: every stored entry is
        an edge.  None (default): True when the matrix equals its transpose exactly (stored
        entries, explicit zeros included), else False.

    Examples
    --------
    >>> from scipy import sparse
    >>> m = sparse.csr_array(([2.0, 2.0], ([0, 1], [1, 0])), shape=(3, 3))
    >>> el = from_scipy(m)
    >>> el.n_nodes, el.tail.tolist(), el.head.tolist(), el.weight.tolist()
    (3, [0], [1], [2.0])
    """
    from scipy import sparse
    f = "from_scipy"
    if not sparse.issparse(matrix):
        raise TypeError(f"{f}: expected a scipy.sparse matrix or array, received "
                        f"{type(matrix).__name__}; convert with scipy.sparse.csr_array(a).")
    if matrix.ndim != 2 or matrix.shape[0] != matrix.shape[1]:
        raise ValueError(f"{f}: an adjacency matrix must be square, received shape "
                         f"{matrix.shape}.")
    if symmetric is not None:
        symmetric = validation.check_bool(symmetric, "symmetric", f)
    coo = sparse.coo_array(matrix)
    r, c, w = coo.row.astype(np.int64), coo.col.astype(np.int64), coo.data
    order = np.lexsort((c, r))
    r, c, w = r[order], c[order], w[order]
    is_sym = _is_symmetric(r, c, w)
    if symmetric is None:
        symmetric = is_sym
    elif symmetric and not is_sym:
        raise ValueError(f"{f}: symmetric=True but the matrix differs from its transpose (stored "
                         f"entries compared exactly); pass symmetric=False to read every stored "
                         f"entry as an edge.")
    if symmetric:
        keep = r <= c
        r, c, w = r[keep], c[keep], w[keep]
    n = int(matrix.shape[0])
    w = validation.check_weights(np.asarray(w), f)
    dt = id_dtype(n)
    return EdgeList(r.astype(dt), c.astype(dt), w, n, source="<scipy sparse>")


def _is_symmetric(r, c, w) -> bool:
    o2 = np.lexsort((r, c))
    return bool(np.array_equal(r, c[o2]) and np.array_equal(c, r[o2])
                and np.array_equal(w, w[o2]))


def from_networkx(graph, *, weight="weight", default=None, pos=None) -> EdgeList:
    """An EdgeList from an undirected networkx Graph or MultiGraph.

    Compact id ``i`` is the ``i``-th node of ``graph.nodes`` (isolated nodes kept); edges come in
    ``graph.edges`` order.  ``weight`` names the edge attribute; an edge without it is an error
    unless ``default`` is given.  ``pos`` names a node attribute holding (x, y) coordinates.
    """
    import networkx as nx
    f = "from_networkx"
    if not isinstance(graph, nx.Graph):
        raise TypeError(f"{f}: expected a networkx Graph, received {type(graph).__name__}.")
    if graph.is_directed():
        raise ValueError(f"{f}: received a directed graph; spanning forests are undirected. "
                         f"Pass graph.to_undirected() if the direction does not matter.")
    nodes = list(graph.nodes)
    index = {v: i for i, v in enumerate(nodes)}
    tail, head, w = [], [], []
    for k, (u, v, data) in enumerate(graph.edges(data=True)):
        if weight not in data and default is None:
            raise ValueError(f"{f}: edge {k} ({u!r}, {v!r}) has no {weight!r} attribute; set it "
                             f"on every edge or pass default=1.0.")
        tail.append(index[u])
        head.append(index[v])
        w.append(data.get(weight, default))
    n = len(nodes)
    dt = id_dtype(n)
    warr = np.asarray(w) if w else np.empty(0, dtype=np.float64)
    if warr.dtype.kind not in "iuf":
        try:
            warr = warr.astype(np.float64)
        except (TypeError, ValueError):
            raise TypeError(f"{f}: edge attribute {weight!r} holds non-numeric values; expected "
                            f"numbers.") from None
    warr = validation.check_weights(warr, f)
    labels = np.empty(n, dtype=object)
    labels[:] = nodes
    if n and all(isinstance(x, (int, np.integer)) and not isinstance(x, bool) for x in nodes):
        labels = np.asarray(nodes, dtype=np.int64)
    coords = None
    if pos is not None:
        missing = [v for v in nodes if pos not in graph.nodes[v]]
        if missing:
            raise ValueError(f"{f}: node {missing[0]!r} has no {pos!r} attribute; every node "
                             f"needs coordinates when pos= is given.")
        coords = np.asarray([graph.nodes[v][pos] for v in nodes], dtype=np.float64).reshape(n, 2)
    return EdgeList(np.asarray(tail, dtype=dt), np.asarray(head, dtype=dt), warr, n, labels,
                    coords, False, "<networkx graph>")


def to_networkx(forest, edges: EdgeList | None = None):
    """The forest as a networkx Graph in the user's labels.

    Every node is present (isolated ones included); edges carry ``weight`` and ``position``.
    Without ``edges``, ``forest.to_networkx()`` (compact ids).
    """
    import networkx as nx
    if edges is None:
        return forest.to_networkx()
    g = nx.Graph()
    g.add_nodes_from(edges.label(np.arange(edges.n_nodes)).tolist())
    t = edges.label(forest.tail).tolist()
    h = edges.label(forest.head).tolist()
    g.add_edges_from((u, v, {"weight": w, "position": p}) for u, v, w, p in
                     zip(t, h, forest.weights.tolist(), forest.edges.tolist()))
    return g


def forest_table(forest, edges: EdgeList, columns=None):
    """The forest as a pyarrow Table, one row per forest edge in the forest's order: tail,
    head (user labels), weight, position (input row), then the input's carried columns.

    The first three are named as in the input (``edges.columns``; :func:`output_names` renames
    one that would meet another output column, such as an input column called ``position``);
    the carried columns (``edges.attributes``: a link id, a route type, a length, ...) keep
    their names and types, so every output format carries the same columns under the same
    names.
    ``columns`` chooses among the carried columns (None: all; ``[]``: none).
    """
    import pyarrow as pa
    check_forest_of(forest, edges, "forest_table")
    tn, hn, wn = output_names(edges)
    cols = {tn: label_array(edges.label(forest.tail)),
            hn: label_array(edges.label(forest.head)),
            wn: pa.array(np.asarray(forest.weights)),
            "position": pa.array(np.asarray(forest.edges, dtype=np.int64))}
    attrs = edges.attributes if columns is None else \
        chosen_attributes(edges, columns, "forest_table")
    if attrs is not None and attrs.num_columns:
        if attrs.num_rows != edges.n_edges:
            raise ValueError(f"forest_table: {edges.source} carries {attrs.num_rows} rows of "
                             f"columns for {edges.n_edges} edges; the EdgeList was modified.")
        taken = attrs.take(pa.array(np.asarray(forest.edges, dtype=np.int64)))
        for name in taken.column_names:
            if name not in cols:
                cols[name] = taken.column(name)
    return pa.table(cols)


def output_names(edges: EdgeList, reserved=()) -> tuple:
    """Names of the tail, head and weight columns of output tables: the input's names, except
    where one would meet another output column (``position``, the carried columns, the
    ``reserved`` names of the caller's own columns, or another of the three), which would
    replace its values; that one gets its role's name ("tail", "head", "weight"), numbered if
    that is taken too ("tail_2")."""
    carried = [] if edges.attributes is None else edges.attributes.column_names
    taken = {"position", *carried, *reserved}
    out = []
    for role, name in zip(("tail", "head", "weight"), edges.columns):
        if name in taken:
            name, k = role, 2
            while name in taken:
                name, k = f"{role}_{k}", k + 1
        taken.add(name)
        out.append(name)
    return tuple(out)


def check_forest_of(forest, edges: EdgeList, func: str) -> None:
    """``forest`` must have been solved from ``edges``: the same node count, and each forest
    edge the input row its ``position`` names (same end points, either way round).  A forest
    of other edges would be written with wrong labels and positions.  An EdgeList made of the
    forest's own arrays (``write_forest`` without edges) describes the forest itself."""
    if edges.tail is getattr(forest, "tail", None) and edges.head is forest.head:
        return
    n = getattr(forest, "n_nodes", None)
    if n != edges.n_nodes:
        raise ValueError(f"{func}: the forest has {n} nodes but {edges.source} has "
                         f"{edges.n_nodes}; pass the EdgeList the forest was solved from (or "
                         f"edges=None to write compact node ids).")
    pos = np.asarray(forest.edges, dtype=np.int64)
    if pos.size == 0:
        return
    t, h = np.asarray(forest.tail), np.asarray(forest.head)
    bad = (pos < 0) | (pos >= edges.n_edges)
    if not bad.any():
        et, eh = edges.tail[pos], edges.head[pos]
        bad = ~(((t == et) & (h == eh)) | ((t == eh) & (h == et)))
    if bad.any():
        k = int(np.flatnonzero(bad)[0])
        p = int(pos[k])
        row = (f"row {p} of {edges.source} joins {int(edges.tail[p])} and "
               f"{int(edges.head[p])}" if 0 <= p < edges.n_edges else
               f"{edges.source} has {edges.n_edges} rows")
        raise ValueError(f"{func}: the forest was not solved from {edges.source}: forest edge "
                         f"{k} joins nodes {int(t[k])} and {int(h[k])} at position {p}, but "
                         f"{row} ({int(bad.sum())} such forest edges); pass the EdgeList the "
                         f"forest was solved from (or edges=None to write compact node ids).")


def edge_table(edges: EdgeList, positions=None, columns=None):
    """Links of ``edges`` as a pyarrow Table, in the layout of :func:`forest_table`: tail,
    head (user labels), weight, position, then the carried columns (``columns`` chooses among
    them).  ``positions``: which links, in that order (default all, in input order)."""
    import pyarrow as pa
    pos = (np.arange(edges.n_edges, dtype=np.int64) if positions is None else
           validation.check_positions(positions, edges.n_edges, "positions", "edge_table"))
    tn, hn, wn = output_names(edges)
    cols = {tn: label_array(edges.label(edges.tail[pos])),
            hn: label_array(edges.label(edges.head[pos])),
            wn: pa.array(np.asarray(edges.weight)[pos]), "position": pa.array(pos)}
    attrs = edges.attributes if columns is None else \
        chosen_attributes(edges, columns, "edge_table")
    if attrs is not None and attrs.num_columns:
        taken = attrs.take(pa.array(pos))
        for name in taken.column_names:
            if name not in cols:
                cols[name] = taken.column(name)
    return pa.table(cols)


def chosen_attributes(edges: EdgeList, columns, func: str):
    """The carried columns of ``edges`` named in ``columns`` (a list of names), as a table or
    None; a name that is not carried is a ValueError listing those that are."""
    if isinstance(columns, str) or not hasattr(columns, "__iter__"):
        raise TypeError(f"{func}: columns must be a list of column names (or None for all), "
                        f"received {type(columns).__name__}.")
    names = list(columns)
    have = [] if edges.attributes is None else edges.attributes.column_names
    for c in names:
        if c not in have:
            raise ValueError(f"{func}: column {c!r} is not carried by {edges.source}; the "
                             f"carried columns are {', '.join(map(repr, have)) or 'none'} "
                             f"(read_edges(keep_columns=...) chooses them).")
    return edges.attributes.select(names) if names else None


def node_table(edges: EdgeList, **columns):
    """A pyarrow Table with one row per node: ``node`` (the user's label), then ``columns``
    (arrays of length ``n_nodes`` indexed by compact id)."""
    import pyarrow as pa
    cols = {"node": all_labels(edges)}
    for name, values in columns.items():
        cols[name] = pa.array(np.asarray(values))
    return pa.table(cols)
