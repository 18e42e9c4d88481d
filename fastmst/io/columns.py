"""pyarrow columns as NumPy: decoding, numeric columns, and the choice of edge columns.

Used by every reader that goes through a pyarrow table (CSV/TSV, Parquet, .npz, in-memory
tables) and by the node-table reader.  pyarrow is imported inside the functions: it is an
optional dependency (the ``cli`` extra).
"""
from __future__ import annotations

import numpy as np

from fastmst.io.checks import FileFormatError, check_column, check_no_missing, check_no_nan

#: Cells read as missing in numeric columns of text files ("nan" is not among them: it reads
#: as NaN and gets its own error).
NULLS = ["", "NA", "N/A", "n/a", "NULL", "null", "None", "#N/A"]


def plain(col):
    """Dictionary-encoded columns (pandas categoricals) decoded to their values."""
    import pyarrow as pa
    if pa.types.is_dictionary(col.type):
        return col.cast(col.type.value_type)
    return col


def numeric_view(c, dtype) -> np.ndarray:
    """A zero-copy NumPy view of one pyarrow array of fixed-width numbers without nulls, read
    from its data buffer.  (``Array.to_numpy`` gives the same view but passes through
    pyarrow's pandas shim, which imports pandas when it is installed: 0.35 s on the first read
    of a process.)"""
    dtype = np.dtype(dtype)
    if len(c) == 0:
        return np.empty(0, dtype=dtype)
    return np.frombuffer(c.buffers()[1], dtype=dtype, count=len(c),
                         offset=c.offset * dtype.itemsize)


def _fixed_width(col) -> bool:
    import pyarrow as pa
    return (pa.types.is_integer(col.type) or pa.types.is_floating(col.type)) and \
        not col.null_count


def to_numpy(col) -> np.ndarray:
    """A pyarrow array/column as NumPy (object arrays for text).

    A column of several chunks of integers or floats without nulls is copied into memory from
    pyarrow's pool, which keeps freed memory for the next read (a fresh NumPy array of a large
    column costs page faults on every read)."""
    import pyarrow as pa
    if isinstance(col, pa.ChunkedArray) and col.num_chunks > 1 and _fixed_width(col):
        dtype = np.dtype(col.type.to_pandas_dtype())
        out = np.frombuffer(pa.allocate_buffer(max(1, len(col)) * dtype.itemsize),
                            dtype=dtype)[:len(col)]
        at = 0
        for c in col.chunks:
            out[at:at + len(c)] = numeric_view(c, dtype)
            at += len(c)
        return out
    if isinstance(col, pa.ChunkedArray) and col.num_chunks == 1:
        col = col.chunk(0)
    if isinstance(col, pa.Array) and _fixed_width(col):
        return numeric_view(col, col.type.to_pandas_dtype())
    return col.to_numpy(zero_copy_only=False) if hasattr(col, "to_numpy") else np.asarray(col)


def chunks(col) -> list:
    """The chunks of a pyarrow column as zero-copy NumPy views (the column has no nulls)."""
    return [numeric_view(c, c.type.to_pandas_dtype()) if _fixed_width(c)
            else c.to_numpy(zero_copy_only=True) for c in getattr(col, "chunks", [col])]


def null_mask(col) -> np.ndarray:
    """Boolean NumPy mask of the null cells of a pyarrow column."""
    return col.is_null().to_numpy(zero_copy_only=False)


def numeric_column(col, name, source, where, what="weight") -> np.ndarray:
    """A numeric pyarrow column as int64, uint64 (kept: its values may pass 2**63) or float64
    NumPy, checked for missing cells, text that is not a number and NaN; ``what`` ("weight",
    "coordinate") words the messages."""
    import pyarrow as pa
    import pyarrow.compute as pc
    col = plain(col)
    if col.null_count:
        check_no_missing(null_mask(col), name, source, where, "read_edges",
                         "every node needs coordinates" if what == "coordinate" else
                         "every edge needs a value there")
    if pa.types.is_uint64(col.type):
        return to_numpy(col).astype(np.uint64, copy=False)
    if pa.types.is_integer(col.type):
        return to_numpy(pc.cast(col, pa.int64()))
    if pa.types.is_floating(col.type) or pa.types.is_decimal(col.type):
        values = to_numpy(pc.cast(col, pa.float64()))
    elif pa.types.is_string(col.type) or pa.types.is_large_string(col.type):
        values = to_numpy(col)
        for i, v in enumerate(values):
            try:
                float(v)
            except (TypeError, ValueError):
                raise FileFormatError(f"{source}: {where(i)}: {what} {v!r} in column {name!r} is "
                                      f"not a number; expected a number such as 12.5. Fix or "
                                      f"drop that row.") from None
        values = values.astype(np.float64)
    else:
        raise FileFormatError(f"{source}: column {name!r} holds {col.type} values; expected "
                              f"numeric values. Pick another column (CLI: --weight, --x, --y).")
    return check_no_nan(values, name, source, where, what)


def choose_edge_columns(names, tail, head, weight, source, geometry):
    """(tail, head, weight) column names: the given ones, checked, or the defaults.

    Defaults: the first two columns, and the column named ``weight``, else the first other one.
    ``geometry`` says whether a node table with coordinates is there, so that ``"length"`` may
    name lengths computed from coordinates rather than a column.
    """
    if len(names) < 2 and (tail is None or head is None):
        raise FileFormatError(f"{source}: found {len(names)} "
                              f"{'column' if len(names) == 1 else 'columns'} "
                              f"({', '.join(map(repr, names)) or 'none'}); expected at least "
                              f"tail and head columns and a weight. Is the separator right "
                              f"(CSV ',' or TSV tab)?")
    tail = names[0] if tail is None else tail
    head = names[1] if head is None else head
    check_column(tail, names, source, "tail", "read_edges")
    check_column(head, names, source, "head", "read_edges")
    if weight is None:
        rest = [n for n in names if n not in (tail, head)]
        if "weight" in names:
            weight = "weight"
        elif rest:
            weight = rest[0]
        else:
            raise FileFormatError(f"{source}: no weight column; the columns present are "
                                  f"{', '.join(map(repr, names))}. Add a weight column, or give "
                                  f"a node table with coordinates and weight='length' (CLI: "
                                  f"--nodes FILE --weight length).")
    if weight == "length" and "length" not in names and not geometry:
        raise FileFormatError(f"{source}: no column 'length'; to compute lengths from "
                              f"coordinates give a node table (nodes=..., CLI: --nodes FILE), "
                              f"or pick a weight column from {', '.join(map(repr, names))}.")
    if not (geometry and weight == "length" and "length" not in names):
        check_column(weight, names, source, "weight", "read_edges")
    check_distinct_columns(names, {"tail": tail, "head": head, "weight": weight}, source)
    return tail, head, weight


def check_distinct_columns(names, roles, source) -> None:
    """Each role (``{role: column name}``) names a column that occurs once in ``names``, and
    tail and head are two different columns (one column for both makes every edge a self-loop).
    """
    for role, col in roles.items():
        _check_named_once(names, col, source, f"the {role} column is ambiguous: rename "
                                              f"them so that each name is unique")
    if roles.get("tail") is not None and roles.get("tail") == roles.get("head"):
        raise FileFormatError(f"{source}: tail and head are both column {roles['tail']!r}; "
                              f"an edge needs two endpoint columns. Name the head column "
                              f"(CLI: --head NAME).")


def carried_columns(names, cols, keep, link_id, source, func="read_edges") -> list:
    """The input columns carried to every output besides (tail, head, weight) ``cols``.

    ``keep`` is "all" (every other column) or a sequence of names (an empty one carries none);
    ``link_id`` names the column that names each link, always carried.  A column named
    ``position`` is never carried: outputs use that name for the edge's row in the input.
    """
    if isinstance(keep, str):
        if keep != "all":
            raise ValueError(f"{func}: keep_columns must be 'all' or a list of column names, "
                             f"received {keep!r}. Pass ['{keep}'] to keep that one column.")
        chosen = [n for n in names if n not in cols]
    else:
        try:
            chosen = list(keep)
        except TypeError:
            raise TypeError(f"{func}: keep_columns must be 'all' or a list of column names, "
                            f"received {type(keep).__name__}.") from None
        for c in chosen:
            check_column(c, names, source, "keep_columns", func)
            if c in cols:   # would be dropped below without a word
                raise ValueError(f"{func}: keep_columns names {c!r}, which is the edges' "
                                 f"tail, head or weight column; outputs write it anyway. "
                                 f"Leave it out of keep_columns.")
            if c == "position":
                raise ValueError(f"{func}: keep_columns names 'position', the name outputs "
                                 f"give each link's row in the input, so that column cannot "
                                 f"be carried; rename it in the file to carry it.")
    if link_id is not None:
        check_column(link_id, names, source, "link_id", func)
        if link_id in cols:
            raise FileFormatError(f"{source}: the link-id column {link_id!r} is also an "
                                  f"endpoint or weight column; name links by another column "
                                  f"(--link-id) or choose --tail/--head/--weight.")
        chosen = [link_id] + [c for c in chosen if c != link_id]
    carried = [c for c in dict.fromkeys(chosen) if c not in cols and c != "position"]
    for c in carried:   # carrying one of two alike would drop the other's values unseen
        _check_named_once(names, c, source, f"rename them so that each name is unique, or "
                                            f"leave {c!r} out of keep_columns (CLI: "
                                            f"--keep-columns)")
    return carried


def _check_named_once(names, col, source, fix: str) -> None:
    """A FileFormatError when the header ``names`` holds ``col`` more than once (``fix`` says
    what to do)."""
    at = [i + 1 for i, n in enumerate(names) if n == col]
    if len(at) > 1:
        raise FileFormatError(f"{source}: the header names {len(at)} columns {col!r} (columns "
                              f"{', '.join(map(str, at))}); {fix}.")


# a number as written in a file: no leading zeros (007 stays text), optional fraction/exponent
_NUMBER = r"^[-+]?(0|[1-9][0-9]*)([.,][0-9]+)?([eE][-+]?[0-9]+)?$"


def typed_text_column(col, decimal_comma=False):
    """A text column of a CSV/TSV file as numbers when every cell is a number as written (no
    leading zeros, so ``007`` keeps its text), else unchanged.  Empty cells and the null
    markers stay missing in numbers.  Integers become int64, others float64; with
    ``decimal_comma`` a ``,`` is the decimal separator (``12,5``)."""
    import pyarrow as pa
    import pyarrow.compute as pc
    col = plain(col)
    if not (pa.types.is_string(col.type) or pa.types.is_large_string(col.type)):
        return col
    pattern = _NUMBER if decimal_comma else _NUMBER.replace("[.,]", "[.]")
    head = col.slice(0, 1000)            # a text column usually shows itself in its first rows
    head = pc.filter(head, pc.invert(pc.is_in(head, value_set=pa.array(NULLS))))
    if len(head) and not pc.all(pc.match_substring_regex(head, pattern)).as_py():
        return col
    missing = pc.is_in(col, value_set=pa.array(NULLS))
    present = pc.filter(col, pc.invert(missing))
    if len(present) == 0:
        return col
    if not pc.all(pc.match_substring_regex(present, pattern)).as_py():
        return col
    values = pc.if_else(missing, pa.scalar(None, col.type), col)
    if decimal_comma:
        values = pc.replace_substring(values, ",", ".")
    integer = pc.all(pc.match_substring_regex(present, r"^[-+]?[0-9]+$")).as_py()
    try:
        return pc.cast(values, pa.int64() if integer else pa.float64())
    except (pa.ArrowInvalid, pa.ArrowNotImplementedError):   # e.g. beyond int64
        return col


def guessed_roles(tail, head, weight) -> tuple:
    """Which of the column roles were not given (so taken by the default rule)."""
    return tuple(r for r, v in (("tail", tail), ("head", head), ("weight", weight)) if v is None)
