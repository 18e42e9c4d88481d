"""NumPy ``.npz`` archives: one 1-D array per column (``tail``, ``head``, ``weight`` or chosen
names); text labels as dtype ``U``, never pickled objects."""
from __future__ import annotations

import zipfile
import zlib

import numpy as np

from fastmst.io import registry
from fastmst.io.checks import FileFormatError
from fastmst.io.columns import carried_columns, choose_edge_columns, guessed_roles
from fastmst.io.edgelist import edges_from_table
from fastmst.io.labels import label_array


# NumPy dtype kinds an edge column may have: bool, integers, reals, text; and names of others
_KINDS = "biufUS"
_KIND_NAMES = {"c": "complex", "M": "date/time", "m": "time-span", "V": "structured",
               "O": "Python object"}


def _entry(i: int) -> str:
    return f"entry {i}"


def read_edges(path, compression, request):
    """An EdgeList from the arrays of an .npz file (columns as chosen by ``request``; the other
    arrays are carried to outputs as ``keep_columns`` and ``link_id`` say, in their own types)."""
    import pyarrow as pa
    try:
        z = np.load(str(path), allow_pickle=False)
    except (ValueError, OSError, EOFError, zipfile.BadZipFile) as exc:
        raise FileFormatError(f"{path}: not a readable .npz file ({exc}); is it complete and "
                              f"written by numpy.savez?") from None
    if not isinstance(z, np.lib.npyio.NpzFile):   # a single .npy array under an .npz name
        raise FileFormatError(f"{path}: holds one NumPy array, not an .npz archive of columns; "
                              f"save the columns with numpy.savez(path, tail=..., head=..., "
                              f"weight=...).")
    with z:
        names = list(z.files)
        if {"tail", "head"} <= set(names):  # the conventional names come first
            names = ["tail", "head"] + [x for x in names if x not in ("tail", "head")]
        cols = choose_edge_columns(names, request.tail, request.head, request.weight,
                                   str(path), request.nodes is not None)
        carry = carried_columns(names, cols, request.keep_columns, request.link_id, str(path))
        try:
            arrays = {c: z[c] for c in list(dict.fromkeys(cols)) + carry if c in names}
        except ValueError as exc:
            if "pickle" not in str(exc):
                raise FileFormatError(f"{path}: an array could not be read ({exc}); is the "
                                      f"file complete?") from None
            raise FileFormatError(f"{path}: an array needs pickle to load ({exc}); save labels "
                                  f"as NumPy text (dtype 'U') or integers instead.") from None
        except (OSError, EOFError, zipfile.BadZipFile, zlib.error) as exc:
            raise FileFormatError(f"{path}: an array could not be read ({exc}); is the file "
                                  f"complete and written by numpy.savez?") from None
    lengths = {a.shape[0] if a.ndim else -1 for a in arrays.values()}
    if any(a.ndim != 1 for a in arrays.values()) or len(lengths) != 1:
        shapes = {c: a.shape for c, a in arrays.items()}
        raise FileFormatError(f"{path}: arrays {shapes} must be 1-D and of one length (one "
                              f"entry per edge).")
    if lengths == {0}:
        raise FileFormatError(f"{path}: the arrays are empty; expected one entry per edge.")
    for c, a in arrays.items():
        if c in carry and c not in cols:
            if a.dtype.kind not in _KINDS + "Mm":
                raise FileFormatError(f"{path}: the carried array {c!r} holds "
                                      f"{_KIND_NAMES.get(a.dtype.kind, 'other')} values (dtype "
                                      f"{a.dtype}), which outputs cannot carry; leave it out "
                                      f"with keep_columns (CLI --keep-columns) or convert it.")
        elif a.dtype.kind not in _KINDS:
            kind = _KIND_NAMES.get(a.dtype.kind, "other")
            raise FileFormatError(f"{path}: column {c!r} holds {kind} values (dtype "
                                  f"{a.dtype}); expected integers or real numbers"
                                  f" (weights) and integers or text (labels). Convert it, e.g. "
                                  f"keep the real part of complex weights.")
    table = pa.table({c: label_array(a) for c, a in arrays.items()})
    return edges_from_table(table, cols, str(path), _entry, request.nodes, request.ids, carry,
                            request.link_id,
                            guessed_roles(request.tail, request.head, request.weight))


def write_table(table, tmp, compression):
    """A pyarrow Table as an .npz archive, text columns as dtype ``U``.

    NumPy's ``U`` dtype drops trailing NUL characters, so a text cell ending in one is refused
    (a ValueError naming it) rather than changed; so is a missing cell, which NumPy arrays
    cannot mark.
    """
    arrays = {}
    for name in table.column_names:
        col = table.column(name)
        if col.null_count:   # NumPy arrays have no missing cells: None would become "None"
            i = int(np.flatnonzero(col.is_null().to_numpy(zero_copy_only=False))[0])
            raise ValueError(f"column {name!r}: row {i} (counting from 0) is missing "
                             f"({col.null_count} missing cells in all), and .npz arrays cannot "
                             f"mark a cell missing (text would read back as 'None', integers as "
                             f"NaN floats); write Parquet (.parquet), which keeps missing cells, "
                             f"or leave the column out (write_forest(columns=...), CLI "
                             f"--keep-columns).")
        a = col.to_numpy(zero_copy_only=False)
        if a.dtype == object:
            values = a.tolist()
            a = np.asarray(values, dtype=str)
            bad = [v for v in values if isinstance(v, str) and v.endswith("\x00")]
            if bad:
                raise ValueError(f"column {name!r}: label {bad[0]!r} ends with a NUL character, "
                                 f"which NumPy text arrays (.npz) drop; write Parquet instead.")
        arrays[name] = a
    with open(tmp, "wb") as fh:
        np.savez(fh, **arrays)


registry.register(registry.Format("npz", (".npz",), 30, read_edges=read_edges,
                                  write_table=write_table))
