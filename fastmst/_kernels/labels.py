"""Text labels to compact ids by first appearance: the Python half of ``_labels.pyx``.

``text_ids`` checks the Arrow string chunks, cuts their rows into pieces of ``PIECE_ROWS``,
allocates every array and hands each piece to the compiled ``_labels.count_piece`` (the first
piece, and any piece that does not fit its plan) or ``_labels.plan_piece``, then (when the
estimate of distinct labels, or the new labels of the last piece, call for more room than the
tables have) ``_labels.reserve``, then ``_labels.map_piece`` (the passes, the hashing and the
tables are there, with the method's notes).  ``integer_values`` parses integer labels
through ``_labels.integer_labels``.  Nothing here loops over rows.
"""
import numpy as np
import pyarrow as pa

from fastmst._kernels import _labels

#: Rows handed to one round of the passes (tests lower it to run several rounds).
PIECE_ROWS = 1 << 22
#: Distinct labels (estimated) from which the tables are reserved ahead (``_reserve``).
RESERVE_FROM = 1 << 15
#: Pieces after the first are planned from the last piece counted (``_labels.plan_piece``)
#: instead of counted; False counts every piece.
PLAN = True


def _empty(n, dtype):
    """An uninitialised writable NumPy array from pyarrow's memory pool, which keeps freed
    memory for the next call (a fresh NumPy array of this size costs page faults and zeroing
    by the kernel on every call)."""
    dtype = np.dtype(dtype)
    return np.frombuffer(pa.allocate_buffer(max(n, 1) * dtype.itemsize), dtype=dtype)[:n]


def _pieces(chunk):
    """(offsets as NumPy, data as NumPy bytes) of one Arrow string chunk, checked."""
    if not isinstance(chunk, pa.Array):
        raise TypeError(f"text_ids: expected pyarrow arrays (chunks), received "
                        f"{type(chunk).__name__}; pass a ChunkedArray's .chunks.")
    if pa.types.is_string(chunk.type):
        width = np.int32
    elif pa.types.is_large_string(chunk.type):
        width = np.int64
    else:
        raise TypeError(f"text_ids: expected string or large_string chunks, received "
                        f"{chunk.type}; cast the column to text first.")
    if chunk.null_count:
        raise ValueError(f"text_ids: a chunk holds {chunk.null_count} missing labels; expected "
                         f"none. Refuse or drop the missing rows first.")
    bufs = chunk.buffers()
    n = len(chunk)
    offs = np.frombuffer(bufs[1], dtype=width, count=chunk.offset + n + 1)[chunk.offset:] \
        if n else np.zeros(1, dtype=width)
    if offs.size and int(offs[n]) - int(offs[0]) >= 2**32:
        raise ValueError("text_ids: a chunk holds 4 GiB of label bytes or more; expected less. "
                         "Split the column into smaller chunks.")
    data = np.frombuffer(bufs[2], dtype=np.uint8) if bufs[2] is not None and bufs[2].size \
        else np.zeros(1, dtype=np.uint8)
    return offs, data


def _segments(pieces, size):
    """Rounds of at most ``size`` rows: lists of (chunk index, lo, hi)."""
    rounds, cur, room = [], [], size
    for c, (offs, _) in enumerate(pieces):
        n = int(offs.shape[0]) - 1
        lo = 0
        while lo < n:
            hi = min(n, lo + room)
            cur.append((c, lo, hi))
            room -= hi - lo
            lo = hi
            if room == 0:
                rounds.append(cur)
                cur, room = [], size
    if cur:
        rounds.append(cur)
    return rounds


def _segment_table(pieces, segs):
    """The segment words of one round (see ``_labels.map_piece``) and its row count."""
    table = np.zeros((len(segs), 6), dtype=np.intp)
    at = 0
    for r, (c, lo, hi) in enumerate(segs):
        offs, data = pieces[c]
        table[r] = (offs.ctypes.data + lo * offs.itemsize, data.ctypes.data, data.size,
                    at, hi - lo, offs.itemsize == 8)
        at += hi - lo
    return table, at


def _per_partition(estimate):
    """Labels one partition should have room for when ``estimate`` distinct labels are
    expected in all: the mean share plus slack for the estimate's error (about 1.6 %, see
    ``label_estimate.pxd``) and for the spread of a binomial count (three standard deviations)."""
    mean = estimate / _labels.N_PARTS
    return int(1.1 * mean + 3.0 * mean ** 0.5) + 16


def _reserve(tables, need, count, threads):
    """Give ``tables`` buffers from the memory pool with room for at least ``need`` labels per
    partition (tables at load 2/3 or less: a power of two of slots, all of whose 2/3 is then
    room) and for as many distinct labels in all; returns the room per partition."""
    parts = _labels.N_PARTS
    cap = 1 << max(1, ((3 * need + 1) // 2 - 1).bit_length())
    room = (2 * cap) // 3
    labels = max(count, parts * room)
    _labels.reserve(tables, _empty(2 * parts * cap, np.uint64), _empty(parts * room, np.int64),
                    _empty(parts * room, np.uint64), _empty(parts * room, np.int32),
                    _empty(labels, np.uint64), _empty(labels, np.int64), threads)
    return room


def _raise_room(tables, expected, per_part, count, threads):
    """The room per partition after making room for ``expected`` distinct labels: the tables
    are reserved again (``_reserve``) when that calls for more than ``per_part``, by half as
    much again at least and never less than the largest partition holds; small tables grow as
    cheaply as they are reserved (``RESERVE_FROM``)."""
    need = _per_partition(expected)
    if need <= per_part or expected < RESERVE_FROM:
        return per_part
    need = max(need, per_part + per_part // 2, _labels.largest_partition(tables))
    return _reserve(tables, need, count, threads)


def text_ids(chunks, n_tail, threads=1):
    """Compact ids of Arrow string chunks by first appearance.

    ``chunks``: the tail column's chunks then the head column's (``string`` or
    ``large_string``, no nulls); ``n_tail`` rows belong to the tail.  Returns (tail ids, head
    ids) as int32, and the distinct labels as (int64 offsets, uint8 bytes) in id order.
    """
    if threads < 1:
        raise ValueError(f"text_ids: threads must be positive, received {threads}.")
    pieces = [_pieces(c) for c in chunks]
    total = sum([int(o.shape[0]) - 1 for o, _ in pieces])
    if n_tail < 0 or n_tail > total:
        raise ValueError(f"text_ids: n_tail={n_tail} is outside 0..{total} (the rows given).")
    if total >= 2**31 - 1:
        raise ValueError(f"text_ids: {total} rows need ids beyond int32; expected fewer than "
                         f"{2**31 - 1} rows.")
    ids = _empty(total, np.int32)
    size = max(1, min(int(PIECE_ROWS), total))
    nblk = 8 * threads if threads > 1 else 1
    words = (size + 63) // 64
    # entries, as many as plan_piece plans at most (its rounding up included)
    room = int(_labels.PLAN_SLACK * size) + nblk * _labels.N_PARTS * (_labels.PLAN_EXTRA + 1)
    # off, ent, part, eid, bits, below (map_piece's order)
    scratch = (np.empty(3 * nblk * _labels.N_PARTS, dtype=np.intp),
               _empty(room * _labels.ENTRY_BYTES, np.uint8), _empty(size, np.uint8),
               _empty(room, np.int32), _empty(words, np.uint64), _empty(words, np.intp))
    regs = _empty(nblk * _labels.REG_BYTES, np.uint8)
    tables = _labels.LabelTables()
    done = count = before = last = per_part = 0
    for segs in _segments(pieces, size):
        seg, rows = _segment_table(pieces, segs)
        # the segment holding the first row of each block of 2**SEG_ROWS_LOG2 rows
        segblk = np.searchsorted(seg[:, 3] + seg[:, 4],
                                 np.arange(0, rows, 1 << _labels.SEG_ROWS_LOG2),
                                 side="right").astype(np.intp)
        seg = seg.reshape(-1)
        pblock = (rows + nblk - 1) // nblk   # the last piece may be shorter
        off = scratch[0][:3 * ((rows + pblock - 1) // pblock) * _labels.N_PARTS]
        # labels still to come, reckoned from the last piece: its new labels times their share
        # of its rows (all new: as many again; mostly repeats: few), so that a file whose later
        # rows bring new nodes gets room reserved ahead, not grown table by table in the kernel
        if done:
            ahead = count + (count - before) * (count - before) // last
            per_part = _raise_room(tables, ahead, per_part, count, threads)
        before = count
        # after the first piece, the runs are planned from the last piece counted (no
        # counting pass); a piece whose rows do not fit its plan is counted and mapped again
        planned = (_labels.plan_piece(tables, seg, segblk, rows, pblock, room)
                   if done and PLAN else -1)
        mapped = -2 if planned < 0 else _labels.map_piece(tables, seg, segblk, rows, pblock,
                                                          off, *scratch[1:], ids[done:], threads)
        if mapped == -2:
            # tables sized once for the labels expected, not grown label by label
            estimate = _labels.count_piece(tables, seg, segblk, rows, pblock, regs, threads)
            per_part = _raise_room(tables, estimate, per_part, count, threads)
            mapped = _labels.map_piece(tables, seg, segblk, rows, pblock, off, *scratch[1:],
                                       ids[done:], threads)
        count, last = mapped, rows
        done += rows
    # the distinct labels in id order (the chunks, which hold their bytes, are alive here)
    offsets = _empty(count + 1, np.int64)
    data = _empty(_labels.label_offsets(tables, offsets), np.uint8)
    _labels.label_bytes(tables, offsets, data, threads)
    return ids[:n_tail], ids[n_tail:], offsets, data


def integer_values(chunks, threads=1):
    """The integers written in Arrow string chunks (``[+-]?[0-9]+``, leading zeros allowed,
    within int64) as one int64 array, or None when a row holds anything else (the caller
    then finds and reports it)."""
    if threads < 1:
        raise ValueError(f"integer_values: threads must be positive, received {threads}.")
    pieces = [_pieces(c) for c in chunks]
    total = sum([int(o.shape[0]) - 1 for o, _ in pieces])
    out = _empty(total, np.int64)
    if total == 0:
        return out
    segs = [(c, 0, int(o.shape[0]) - 1) for c, (o, _) in enumerate(pieces) if o.shape[0] > 1]
    seg, _ = _segment_table(pieces, segs)
    return out if _labels.integer_labels(seg.reshape(-1), out, threads) else None
