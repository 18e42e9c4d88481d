"""Parquet: columnar files read with pyarrow; only the chosen columns (the edge columns and
those carried to outputs) are read, in their own types."""
from __future__ import annotations

from fastmst.io import registry
from fastmst.io.checks import FileFormatError, table_row
from fastmst.io.columns import carried_columns, choose_edge_columns, guessed_roles
from fastmst.io.edgelist import edges_from_table


def _read(path, columns):
    import pyarrow as pa
    import pyarrow.parquet as pq
    try:
        return pq.read_table(str(path), columns=columns)
    except (pa.ArrowInvalid, OSError) as exc:
        raise FileFormatError(f"{path}: not a readable Parquet file ({exc}).") from None


def read_edges(path, compression, request):
    """An EdgeList from a Parquet file (columns as chosen by ``request``)."""
    import pyarrow.parquet as pq
    try:
        names = pq.read_schema(str(path)).names
    except Exception as exc:  # pyarrow raises several types for non-Parquet bytes
        raise FileFormatError(f"{path}: not a readable Parquet file ({exc}).") from None
    cols = choose_edge_columns(names, request.tail, request.head, request.weight, str(path),
                               request.nodes is not None)
    carry = carried_columns(names, cols, request.keep_columns, request.link_id, str(path))
    table = _read(path, [c for c in dict.fromkeys(cols) if c in names] + carry)
    if table.num_rows == 0:
        raise FileFormatError(f"{path}: the file has no rows; expected one row per edge.")
    return edges_from_table(table, cols, str(path), table_row, request.nodes, request.ids,
                            carry, request.link_id,
                            guessed_roles(request.tail, request.head, request.weight))


def read_table(path, compression, text=()):
    """Every column of a Parquet file, with its row wording (the file's own column types:
    ``text`` is not needed)."""
    return _read(path, None), table_row


def write_table(table, tmp, compression):
    """A pyarrow Table as Parquet."""
    import pyarrow.parquet as pq
    pq.write_table(table, tmp)


registry.register(registry.Format("parquet", (".parquet", ".pq"), 20, read_edges=read_edges,
                                  read_table=read_table, write_table=write_table))
