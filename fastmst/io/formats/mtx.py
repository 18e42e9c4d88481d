"""Matrix Market coordinate files, read through ``scipy.io``.

Every stored entry is an edge (explicit zeros kept as zero-weight edges); of a symmetric file
only one triangle is read; ids are the 1-based row/column numbers; ``pattern`` files get
weight 1.  The header (size and entry count) is read first and checked before anything
node-sized is allocated (:func:`fastmst.io.checks.check_declared_nodes`).  Column and
node-table options do not apply and are ignored.
"""
from __future__ import annotations

import numpy as np

from fastmst.io import registry
from fastmst.io.checks import FileFormatError, check_declared_nodes, check_no_nan
from fastmst.io.edgelist import EdgeList
from fastmst.io.labels import id_dtype


def read_edges(path, compression, request):
    """An EdgeList of the stored entries of a square Matrix Market coordinate file."""
    import scipy.io
    try:
        rows, cols_, entries, fmt, field_, symmetry = scipy.io.mminfo(str(path))
    except Exception as exc:  # scipy raises ValueError, OSError, RuntimeError for bad files
        raise FileFormatError(f"{path}: not a readable Matrix Market file ({exc}).") from None
    if fmt != "coordinate":
        raise FileFormatError(f"{path}: a dense ('array') Matrix Market file; expected a sparse "
                              f"'coordinate' file where each stored entry is an edge.")
    if rows != cols_:
        raise FileFormatError(f"{path}: the matrix is {rows} x {cols_}; an adjacency matrix "
                              f"must be square (node i is row i and column i).")
    if field_ == "complex":
        raise FileFormatError(f"{path}: complex entries cannot be edge weights; expected real, "
                              f"integer or pattern entries.")
    rows = check_declared_nodes(int(rows), int(entries), request.declared_nodes, str(path),
                                "stored entries")
    try:
        m = scipy.io.mmread(str(path))
    except Exception as exc:
        raise FileFormatError(f"{path}: not a readable Matrix Market file ({exc}).") from None
    m = m.tocoo()
    r, c, w = m.row.astype(np.int64), m.col.astype(np.int64), m.data
    if symmetry != "general":
        keep = r >= c
        r, c, w = r[keep], c[keep], w[keep]
    if field_ == "pattern":
        w = np.ones(r.shape[0], dtype=np.int64)
    w = w.astype(np.int64 if w.dtype.kind in "iu" else np.float64)
    check_no_nan(w, "value", str(path), lambda i: f"stored entry {i + 1}")
    dt = id_dtype(rows)
    return EdgeList(r.astype(dt), c.astype(dt), w, int(rows),
                    np.arange(1, rows + 1, dtype=np.int64), source=str(path))


registry.register(registry.Format("mtx", (".mtx",), 40, read_edges=read_edges,
                                  declares_nodes=True))
