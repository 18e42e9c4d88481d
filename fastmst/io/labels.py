"""Node labels: the user's ids mapped to compact ids ``0..n-1`` and back.

This is the one place where labels are encoded and looked up; readers, adapters, the node
table and the command line's lists of links all use it.

Label rule: without a node table, compact id ``i`` is the ``i``-th smallest label (numeric order
for integer ids, code-point order for strings); labels that already are ``0..n-1`` stay as they
are (``labels`` is then None).  With a node table, compact id ``i`` is row ``i`` of the table.

Lookup rule (:func:`lookup`): integer columns are compared as int64, columns of the same type as
they are, anything else as text.

>>> import numpy as np
>>> t, h, labels = encode_labels(np.array(["b", "a"]), np.array(["c", "b"]), "<example>")
>>> t.tolist(), h.tolist(), labels.tolist()
([1, 0], [2, 1], ['a', 'b', 'c'])
"""
from __future__ import annotations

from concurrent.futures import ThreadPoolExecutor

import numpy as np

from fastmst import validation
from fastmst.io.checks import FileFormatError, check_no_missing
from fastmst.io.columns import chunks, null_mask, plain, to_numpy


def id_dtype(n: int):
    """int32 for fewer than 2**31 nodes, else int64."""
    return np.int32 if n < validation.INT32_LIMIT else np.int64


def _is_int(arr) -> bool:
    return getattr(arr, "dtype", None) is not None and np.dtype(arr.dtype).kind in "iu"


def encode_labels(tail, head, source: str, names=("tail", "head")):
    """Compact ids for two NumPy label arrays; returns (tail_ids, head_ids, labels).

    ``labels`` is None when the labels already are the compact ids 0..n-1.
    """
    t, h = np.asarray(tail), np.asarray(head)
    for arr, name in ((t, names[0]), (h, names[1])):
        if arr.dtype.kind == "f":
            raise FileFormatError(f"{source}: node ids in column {name!r} are decimal numbers "
                                  f"(dtype {arr.dtype}); expected integers or text labels. "
                                  f"Write the ids without a decimal point.")
        if arr.dtype.kind == "b":
            raise FileFormatError(f"{source}: node ids in column {name!r} are true/false; "
                                  f"expected integers or text labels.")
    if t.size == 0:
        return t.astype(np.int32), h.astype(np.int32), np.empty(0, dtype=t.dtype)
    if _is_int(t) and _is_int(h):
        lo = min(int(t.min()), int(h.min()))
        hi = max(int(t.max()), int(h.max()))
        span = hi - lo + 1
        if span <= 4 * (t.size + h.size) + 1024:
            present = np.zeros(span, dtype=bool)
            present[t - lo if lo else t] = True
            present[h - lo if lo else h] = True
            if lo == 0 and present.all():
                dt = id_dtype(span)
                return t.astype(dt, copy=False), h.astype(dt, copy=False), None
            n = int(np.count_nonzero(present))
            remap = np.cumsum(present, dtype=np.int64) - 1
            remap = remap.astype(id_dtype(n))
            labels = (np.flatnonzero(present) + lo).astype(np.result_type(t.dtype, h.dtype))
            return remap[t - lo], remap[h - lo], labels
    both = np.concatenate([t, h]) if t.dtype == h.dtype else \
        np.concatenate([t.astype(str), h.astype(str)])
    labels, inverse = np.unique(both, return_inverse=True)
    inverse = inverse.astype(id_dtype(labels.size))
    return inverse[:t.size], inverse[t.size:], labels


def encode_label_columns(tail, head, source, where, names):
    """Compact ids for two pyarrow label columns of any type; returns (tail, head, labels).

    Missing or empty labels are a FileFormatError naming the row (``where(i)`` words it).
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    t, h = plain(tail), plain(head)
    for col, name in ((t, names[0]), (h, names[1])):
        if col.null_count:
            check_no_missing(null_mask(col), name, source, where, "read_edges")
    if pa.types.is_integer(t.type) and pa.types.is_integer(h.type):
        if t.type != h.type:
            t, h = pc.cast(t, pa.int64()), pc.cast(h, pa.int64())
        fast = _dense_int_ids(t, h)
        if fast is not None:
            return fast
    if pa.types.is_floating(t.type) or pa.types.is_floating(h.type):
        return encode_labels(to_numpy(t), to_numpy(h), source, names)  # the decimal-ids error
    if t.type != h.type:
        t, h = pc.cast(t, pa.string()), pc.cast(h, pa.string())
    # Dictionary-encode each column in its own thread (one hash pass per column; pyarrow
    # releases the GIL), merge and sort the two small dictionaries, then turn each column's
    # codes into compact ids with one NumPy gather.
    with ThreadPoolExecutor(2) as ex:
        (dt_, ct), (dh_, ch) = ex.map(_dictionary_codes, (t, h))
        uniq = pc.unique(pa.chunked_array([dt_, dh_], type=t.type))
        uniq = uniq.take(pc.array_sort_indices(uniq))
        dt = id_dtype(len(uniq))
        rt = to_numpy(pc.index_in(dt_, value_set=uniq)).astype(dt)
        rh = to_numpy(pc.index_in(dh_, value_set=uniq)).astype(dt)
        ti, hi = ex.map(lambda a: a[0][a[1]], ((rt, ct), (rh, ch)))
    if pa.types.is_string(t.type) or pa.types.is_large_string(t.type):
        if len(uniq) and uniq[0].as_py() == "":   # sorted, so an empty label comes first
            for col, name in ((t, names[0]), (h, names[1])):
                empty = to_numpy(pc.equal(col, ""))
                check_no_missing(empty, name, source, where, "read_edges")
    return ti, hi, to_numpy(uniq)


def _dense_int_ids(t, h):
    """Integer label columns with a dense range: compact ids in one pass per column.

    Returns None when the labels are too spread out for a lookup table (the caller then hashes
    them).  The two columns are converted in two threads (NumPy releases the GIL).
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    if pa.types.is_uint64(t.type) or pa.types.is_uint64(h.type):
        return None
    n = len(t)
    if n == 0:
        return None
    mt, mh = pc.min_max(t).as_py(), pc.min_max(h).as_py()
    lo, hi = min(mt["min"], mh["min"]), max(mt["max"], mh["max"])
    span = hi - lo + 1
    if span > 4 * 2 * n + 1024:
        return None
    tc, hc = chunks(t), chunks(h)
    present = np.zeros(span, dtype=bool)
    for a in tc + hc:
        present[a - lo if lo else a] = True
    dense = lo == 0 and bool(present.all())
    if dense:
        remap, n_nodes, labels = None, span, None
    else:
        n_nodes = int(np.count_nonzero(present))
        remap = (np.cumsum(present, dtype=np.int64) - 1).astype(id_dtype(n_nodes))
        labels = np.flatnonzero(present) + lo
    dt = id_dtype(n_nodes)

    def fill(parts):
        out = np.empty(n, dtype=dt)
        off = 0
        for a in parts:
            k = a.shape[0]
            if remap is None:
                out[off:off + k] = a
            else:
                np.take(remap, a - lo if lo else a, out=out[off:off + k])
            off += k
        return out
    with ThreadPoolExecutor(2) as ex:
        ft, fh = ex.submit(fill, tc), ex.submit(fill, hc)
        return ft.result(), fh.result(), labels


def _dictionary_codes(col):
    """(distinct values, int codes) of a pyarrow column in one hash pass."""
    import pyarrow as pa
    import pyarrow.compute as pc
    d = col.dictionary_encode()
    parts = d.chunks if isinstance(d, pa.ChunkedArray) else [d]
    dic = parts[-1].dictionary
    if any(len(c.dictionary) != len(dic) for c in parts):  # not one shared dictionary
        dic = pc.unique(col)
        return dic, to_numpy(pc.index_in(col, value_set=dic))
    codes = np.concatenate([c.indices.to_numpy(zero_copy_only=False) for c in parts])
    return dic, codes


def label_array(labels):
    """NumPy labels (text as object arrays included) as a pyarrow array."""
    import pyarrow as pa
    if labels.dtype == object:
        return pa.array(labels.tolist())
    return pa.array(labels)


def all_labels(edges):
    """The labels of compact ids ``0..n_nodes-1`` of an EdgeList, as a pyarrow array."""
    return label_array(edges.label(np.arange(edges.n_nodes)))


def lookup(col, value_set):
    """Positions of the cells of pyarrow column ``col`` in ``value_set`` (a pyarrow array).

    Returns (ids, missing, compared): NumPy positions (int32; -1 where missing), the boolean
    mask of cells not in ``value_set``, and ``col`` as compared (for messages).  Integer columns
    are compared as int64, columns of one type as they are, other combinations as text.
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    col = plain(col)
    if isinstance(value_set, pa.ChunkedArray):
        value_set = value_set.combine_chunks()
    if col.type != value_set.type:
        if pa.types.is_integer(col.type) and pa.types.is_integer(value_set.type):
            col, value_set = pc.cast(col, pa.int64()), pc.cast(value_set, pa.int64())
        else:
            col, value_set = pc.cast(col, pa.string()), pc.cast(value_set, pa.string())
    idx = pc.index_in(col, value_set=value_set)
    if not idx.null_count:
        return to_numpy(idx), np.zeros(len(idx), dtype=bool), col
    return to_numpy(pc.fill_null(idx, -1)), null_mask(idx), col
