"""Node labels: the user's ids mapped to compact ids ``0..n-1`` and back.

This is the one place where labels are encoded and looked up; readers, adapters, the node
table and the command line's lists of links all use it.

**Labels are text unless the ids are declared integers.**  Text files (CSV/TSV) hand their
endpoint columns over as text, exactly as written: ``007`` and ``7`` are two nodes, ``0x1`` and
``true`` stay text.  ``ids="integer"`` (CLI ``--integer-ids``) reads them as integers instead
(``007`` is node 7).  Typed sources (Parquet, ``.npz``, in-memory tables) keep their columns'
types: integer columns are integer ids; when the two endpoint columns differ in type, both are
compared as text.

**Order.**  Text labels: compact id ``i`` is the ``i``-th distinct label in order of first
appearance, reading down the tail column and then down the head column.  Integer ids: numeric
order, and ids that already are ``0..n-1`` stay as they are (``labels`` is then None).  With a
node table, compact id ``i`` is row ``i`` of the table.

Text labels are mapped by :func:`fastmst._kernels.labels.text_ids`, which reads the Arrow
string buffers in place and numbers labels by first appearance (exact byte comparison; the
same ids for every thread count).  Integer ids that need hashing, and text columns beyond the
kernel's int32 id range, go through pyarrow's dictionary encoding.

Lookup rule (:func:`lookup`): integer columns are compared as int64 (as exact decimal text
when one is uint64), text looked up among
integer ids is read as integers, columns of one type are compared as they are, anything else as
text.

>>> import numpy as np
>>> t, h, labels = encode_labels(np.array(["b", "a"]), np.array(["c", "b"]), "<example>")
>>> t.tolist(), h.tolist(), labels.tolist()
([0, 1], [2, 0], ['b', 'a', 'c'])
"""
from __future__ import annotations

from concurrent.futures import ThreadPoolExecutor

import numpy as np

from fastmst import validation
from fastmst._kernels import labels as label_kernel
from fastmst.io.checks import FileFormatError, check_no_missing
from fastmst.io.columns import chunks, null_mask, plain, to_numpy

#: Values of the ``ids`` option: how endpoint labels are read.
IDS = ("text", "integer")

_INTEGER = r"^[+-]?[0-9]+$"


def id_dtype(n: int):
    """int32 for fewer than 2**31 nodes, else int64."""
    return np.int32 if n < validation.INT32_LIMIT else np.int64


def check_ids(ids, func: str) -> str:
    """The ``ids`` option: "text" (default) or "integer"."""
    return validation.check_choice(ids, IDS, "ids", func)


def encode_labels(tail, head, source: str, names=("tail", "head"), ids="text"):
    """Compact ids for two NumPy label arrays; returns (tail_ids, head_ids, labels).

    The label rule of this module applies (text: first appearance; integers: numeric order).
    ``labels`` is None when the labels already are the compact ids 0..n-1.
    """
    import pyarrow as pa

    return encode_label_columns(label_array(np.asarray(tail)), label_array(np.asarray(head)),
                                source, lambda i: f"entry {i}", names, ids)


def encode_label_columns(tail, head, source, where, names, ids="text", text_as_arrow=False):
    """Compact ids for two pyarrow label columns; returns (tail, head, labels).

    Missing or empty labels are a FileFormatError naming the row (``where(i)`` words it); with
    ``ids="integer"`` so is text that is not an integer.  ``text_as_arrow``: text labels are
    returned as the pyarrow array they were mapped into (no Python strings made); otherwise
    labels are NumPy (text as an object array).
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    t, h = plain(tail), plain(head)
    for col, name in ((t, names[0]), (h, names[1])):
        if col.null_count:
            check_no_missing(null_mask(col), name, source, where, "read_edges")
        _check_label_type(col, name, source)
    if ids == "integer":
        t = as_integers(t, names[0], source, where)
        h = as_integers(h, names[1], source, where)
    if len(t) == 0:
        return np.empty(0, np.int32), np.empty(0, np.int32), np.empty(0, dtype=object)
    if pa.types.is_integer(t.type) and pa.types.is_integer(h.type):
        if t.type != h.type:
            t, h = pc.cast(t, pa.int64()), pc.cast(h, pa.int64())
        fast = _dense_int_ids(t, h)
        if fast is not None:
            return fast
        ti, hi, uniq = _hashed_ids(t, h, numeric=True)
        return ti, hi, to_numpy(uniq)
    if t.type != h.type:
        t, h = pc.cast(t, pa.string()), pc.cast(h, pa.string())
    fast = _text_ids(t, h)
    if fast is not None:
        ti, hi, uniq = fast
    else:
        ti, hi, uniq = _hashed_ids(t, h, numeric=False)
    text = pa.types.is_string(uniq.type) or pa.types.is_large_string(uniq.type)
    if text:
        # empty labels: the shortest label has length 0 (no Python scalar in the comparison:
        # pyarrow converts one through its pandas shim, which imports pandas, 0.35 s)
        if len(uniq) and pc.min(pc.binary_length(uniq)).as_py() == 0:
            for col, name in ((t, names[0]), (h, names[1])):
                check_no_missing(to_numpy(pc.equal(col, "")), name, source, where, "read_edges")
    return ti, hi, uniq if text and text_as_arrow else to_numpy(uniq)


def _check_label_type(col, name, source):
    import pyarrow as pa
    if pa.types.is_floating(col.type) or pa.types.is_decimal(col.type):
        raise FileFormatError(f"{source}: node ids in column {name!r} are decimal numbers "
                              f"({col.type}); expected integers or text labels. Write the ids "
                              f"without a decimal point, or as text.")
    if pa.types.is_boolean(col.type):
        raise FileFormatError(f"{source}: node ids in column {name!r} are true/false values; "
                              f"expected integers or text labels. Store them as text.")


def as_integers(col, name, source, where):
    """A text column of integer ids as int64 (``+7`` and ``007`` are 7); integer columns as
    they are.  Text that is not a 64-bit integer is a FileFormatError naming the row."""
    import pyarrow as pa
    import pyarrow.compute as pc
    if pa.types.is_integer(col.type):
        return col
    if not (pa.types.is_string(col.type) or pa.types.is_large_string(col.type)):
        raise FileFormatError(f"{source}: node ids in column {name!r} are {col.type} values; "
                              f"ids='integer' expects integers.")
    if not col.null_count:   # one exact pass in the label kernel; anything else is reported
        values = label_kernel.integer_values(list(getattr(col, "chunks", [col])),
                                             validation.check_threads(None, "read_edges"))
        if values is not None:
            return pa.array(values, type=pa.int64())
    ok = pc.match_substring_regex(col, _INTEGER)
    if not pc.all(ok).as_py():
        bad = ~to_numpy(ok)
        i = int(np.flatnonzero(bad)[0])
        raise FileFormatError(f"{source}: {where(i)}: node id {col[i].as_py()!r} in column "
                              f"{name!r} is not an integer ({int(bad.sum())} such rows in all); "
                              f"integer ids were asked for (ids='integer', CLI --integer-ids). "
                              f"Drop that option to read the ids as text labels.")
    try:
        return pc.cast(pc.replace_substring_regex(col, r"^\+", ""), pa.int64())
    except pa.ArrowInvalid:
        raise FileFormatError(f"{source}: node ids in column {name!r} do not fit in 64 bits; "
                              f"read them as text labels (drop ids='integer' / "
                              f"--integer-ids).") from None


def _hashed_ids(t, h, numeric):
    """Compact ids through pyarrow's hash kernels; returns (tail ids, head ids, labels).

    Each column is dictionary-encoded in its own thread.  The union of the two dictionaries
    in first-appearance order starts with the tail's dictionary, so the tail's codes already
    are compact ids; the head's codes go through one small lookup.  ``numeric`` sorts the
    labels (integer ids are numbered in numeric order).
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    with ThreadPoolExecutor(2) as ex:
        (dt_, ct), (dh_, ch) = ex.map(_dictionary_codes, (t, h))
    uniq = pc.unique(pa.chunked_array([dt_, dh_], type=dt_.type))
    if isinstance(uniq, pa.ChunkedArray):
        uniq = uniq.combine_chunks()
    dt = id_dtype(len(uniq))
    if numeric:
        uniq = uniq.take(pc.array_sort_indices(uniq))
        ti = to_numpy(pc.index_in(dt_, value_set=uniq)).astype(dt)[ct]
    else:
        ti = ct.astype(dt, copy=False)
    rh = to_numpy(pc.index_in(dh_, value_set=uniq)).astype(dt)
    return ti, rh[ch], uniq


def _text_ids(t, h):
    """Text label columns through the label kernel: (tail ids, head ids, labels as a pyarrow
    large_string array), or None when the columns are not text or too long for int32 ids."""
    import pyarrow as pa
    text = (pa.types.is_string, pa.types.is_large_string)
    if not any(f(t.type) for f in text) or not any(f(h.type) for f in text):
        return None
    if 2 * len(t) >= validation.INT32_LIMIT - 1:
        return None
    threads = validation.check_threads(None, "read_edges")
    parts = list(getattr(t, "chunks", [t])) + list(getattr(h, "chunks", [h]))
    ti, hi, offsets, data = label_kernel.text_ids(parts, len(t), threads)
    uniq = pa.LargeStringArray.from_buffers(offsets.size - 1, pa.py_buffer(offsets),
                                            pa.py_buffer(data))
    return ti, hi, uniq


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
    """(distinct values in first-appearance order, NumPy int32 codes) of a pyarrow column, in
    one hash pass.  The chunks of an encoded column share one growing memo table, so every
    chunk's codes index the last chunk's dictionary."""
    import pyarrow as pa
    d = col.dictionary_encode()
    parts = d.chunks if isinstance(d, pa.ChunkedArray) else [d]
    dic = parts[-1].dictionary
    idx = [c.indices.to_numpy(zero_copy_only=False) for c in parts]
    codes = idx[0] if len(idx) == 1 else np.concatenate(idx)
    return dic, codes


def label_array(labels):
    """NumPy labels (text as object arrays included) as a pyarrow array.

    NumPy text (dtype ``U``) holding a NUL character inside a label goes through Python
    strings: pyarrow's own conversion of such arrays ends each label at its first NUL
    (``"0\\x000"`` became ``"0"``).  An empty object array is text (labels of an empty
    forest: pyarrow's null type would be written as a column of no type)."""
    import pyarrow as pa
    if labels.dtype == object and labels.size == 0:   # no labels to tell the type: text
        return pa.array([], type=pa.string())         # (not pyarrow's null type)
    if labels.dtype == object or (labels.dtype.kind == "U" and _inner_nul(labels)):
        return pa.array(labels.tolist(), type=pa.string() if labels.dtype.kind == "U" else None)
    return pa.array(labels)


def _inner_nul(text: np.ndarray) -> bool:
    """Whether a NumPy ``U`` array holds a NUL character before the end of a label (NumPy
    pads labels with NULs, so only a NUL followed by another character is part of one)."""
    width = text.dtype.itemsize // 4
    if text.size == 0 or width < 2:
        return False
    codes = np.ascontiguousarray(text).reshape(-1).view(np.uint32).reshape(-1, width)
    present = codes != 0
    return bool((~present[:, :-1] & present[:, 1:]).any())


def all_labels(edges):
    """The labels of compact ids ``0..n_nodes-1`` of an EdgeList, as a pyarrow array."""
    return label_array(edges.label(np.arange(edges.n_nodes)))


def lookup(col, value_set):
    """Positions of the cells of pyarrow column ``col`` in ``value_set`` (a pyarrow array).

    Returns (ids, missing, compared): NumPy positions (int32; -1 where missing), the boolean
    mask of cells not in ``value_set``, and ``col`` as compared (for messages).  Integer columns
    are compared as int64 (as decimal text, which is exact, when one is uint64: its ids may pass
    2**63 - 1); text looked up among integer ids is read as integers when every cell
    is one; columns of one type are compared as they are; other combinations as text.
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    col = plain(col)
    if isinstance(value_set, pa.ChunkedArray):
        value_set = value_set.combine_chunks()
    if col.type != value_set.type:
        text = pa.types.is_string(col.type) or pa.types.is_large_string(col.type)
        if pa.types.is_integer(value_set.type) and text and \
                pc.all(pc.match_substring_regex(col, _INTEGER)).as_py() is not False:
            try:
                col = pc.cast(pc.replace_substring_regex(col, r"^\+", ""), pa.int64())
            except pa.ArrowInvalid:
                pass
        if col.type != value_set.type:
            both = (col.type, value_set.type)
            if all(pa.types.is_integer(t) for t in both) and \
                    not any(pa.types.is_uint64(t) for t in both):
                col, value_set = pc.cast(col, pa.int64()), pc.cast(value_set, pa.int64())
            else:
                col, value_set = pc.cast(col, pa.string()), pc.cast(value_set, pa.string())
    idx = pc.index_in(col, value_set=value_set)
    if not idx.null_count:
        return to_numpy(idx), np.zeros(len(idx), dtype=bool), col
    return to_numpy(pc.fill_null(idx, -1)), null_mask(idx), col
