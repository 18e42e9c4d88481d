"""Whole tables from files or memory: a pyarrow Table, its source name and its row wording.

:func:`load_table` is how node tables and lists of links are read: a CSV/TSV or Parquet file
(any format of the registry that reads whole tables), a pandas DataFrame or a pyarrow Table.
"""
from __future__ import annotations

import os

from fastmst.io import registry
from fastmst.io.checks import existing_file, table_row


def is_pandas(obj) -> bool:
    """Whether ``obj`` is a pandas DataFrame (without importing pandas)."""
    return type(obj).__module__.startswith("pandas") and hasattr(obj, "columns")


def pandas_to_arrow(df):
    """A pandas DataFrame as a pyarrow Table (the index dropped)."""
    import pyarrow as pa
    try:
        return pa.Table.from_pandas(df, preserve_index=False)
    except (pa.ArrowInvalid, pa.ArrowTypeError) as exc:
        raise TypeError(f"from_table: the DataFrame could not be converted ({exc}); give each "
                        f"column one type (numbers, or text labels).") from None


def load_table(obj, format=None, func="load_table", text=(), delimiter=None,
               decimal_comma=False):
    """(pyarrow Table, source name, row wording) from a file path or an in-memory table.

    ``where(i)`` of the returned row wording names row ``i`` as a message should (a line number
    for text files).  ``func`` names the caller in messages.  ``text(header)`` (or a list)
    names label columns: text files read them as text, as written, never as guessed numbers.
    ``delimiter`` and ``decimal_comma`` apply to CSV/TSV files (other formats ignore them).
    """
    import pyarrow as pa
    if isinstance(obj, pa.Table):
        return obj, "<pyarrow table>", table_row
    if is_pandas(obj):
        return pandas_to_arrow(obj), "<pandas DataFrame>", table_row
    if not isinstance(obj, (str, os.PathLike)):
        raise TypeError(f"{func}: expected a file path, a pandas DataFrame or a pyarrow Table, "
                        f"received {type(obj).__name__}.")
    path = existing_file(obj, func)
    name, compression = registry.detect_format(path, format, valid=registry.names("table"),
                                               func=func)
    fmt = registry.get(name)
    if delimiter is not None:
        if not isinstance(delimiter, str):
            raise TypeError(f"{func}: delimiter must be one character such as ';', received "
                            f"{type(delimiter).__name__}.")
        if len(delimiter) != 1 or delimiter in "\r\n\"":
            raise ValueError(f"{func}: delimiter must be one character other than a quote or a "
                             f"line break, received {delimiter!r}; for tabs pass '\\t'.")
    options = dict(fmt.options)
    if "delimiter" in options:          # CSV/TSV
        if delimiter is not None:
            options["delimiter"] = delimiter
        if decimal_comma:
            options["decimal_comma"] = True
    table, where = fmt.read_table(path, compression, text, **options)
    return table, str(path), where
