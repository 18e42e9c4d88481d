"""Numbers read from text exactly as written: no silent rounding, no silent overflow.

Text parsers read an integer beyond 2**63 - 1 as a 64-bit float, which rounds those beyond
2**53 (18446744073709551615 becomes 18446744073709551616.0), and read a number beyond the
float range (``1e400``) as infinity.  :func:`exact_numbers` looks at the text of such a column
again: integers that fit in uint64 become uint64 (as Parquet keeps them); an integer a float
cannot hold exactly, or a finite number read as infinity, is a FileFormatError naming its row.
"""
from __future__ import annotations

import numpy as np

from fastmst.io.checks import FileFormatError
from fastmst.io.columns import chunks

_INTEGER = r"^[-+]?[0-9]+$"
_INFINITY = r"^[-+]?(?i:inf|infinity)$"


def needs_text(col) -> bool:
    """Whether the float column ``col`` holds magnitudes where parsing may have rounded an
    integer or overflowed (>= 2**53, or infinite): only then is the text needed.  One pass, no
    copy of the column (it runs on every read of a text file)."""
    import pyarrow as pa
    import pyarrow.compute as pc
    if not pa.types.is_floating(col.type) or len(col) == col.null_count:
        return False
    if not col.null_count:   # NumPy over zero-copy views: 5x pyarrow's min_max (10M: 8 ms)
        views = [v for v in chunks(col) if v.size]
        lo, hi = min(v.min() for v in views), max(v.max() for v in views)
        if not (np.isnan(lo) or np.isnan(hi)):
            return max(-float(lo), float(hi)) >= 2.0**53
    lo, hi = pc.min_max(col).values()   # skips NaN and missing cells
    return max(-lo.as_py(), hi.as_py()) >= 2.0**53


def exact_numbers(text, col, name: str, source: str, where, what: str = "weight"):
    """The float column ``col`` parsed from the text column ``text`` (same rows), made exact.

    Returns ``col`` as it is, or a uint64 column when every cell is an integer that fits;
    raises FileFormatError (``where(i)`` words row ``i``) for an integer a float cannot hold
    exactly and for a finite number that overflowed to infinity.  Only the cells of magnitude
    >= 2**53 are looked at, and those written as decimals or as ``inf`` are cleared without a
    Python loop.
    """
    import pyarrow as pa
    import pyarrow.compute as pc
    integer = pc.match_substring_regex(text, _INTEGER)
    if pc.all(pc.or_kleene(integer, pc.is_null(text))).as_py():
        try:
            return pc.cast(pc.replace_substring_regex(text, r"^\+", ""), pa.uint64())
        except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
            pass   # negative with some beyond int64, or beyond uint64: floats if exact
    huge = pc.fill_null(pc.greater_equal(pc.abs(col), 2.0**53), False)
    rows = pa.array(np.flatnonzero(huge.to_numpy(zero_copy_only=False)), pa.int64())
    values, floats = text.take(rows), col.take(rows)
    is_inf = pc.is_inf(floats)
    overflow = pc.and_(is_inf, pc.invert(pc.match_substring_regex(values, _INFINITY)))
    if pc.any(overflow).as_py():
        k = int(np.flatnonzero(overflow.to_numpy(zero_copy_only=False))[0])
        raise FileFormatError(
            f"{source}: {where(rows[k].as_py())}: {what} {values[k].as_py()} in column "
            f"{name!r} is beyond the range of 64-bit floats (about 1.8e308) and would be read "
            f"as infinity; write it as 'inf' if infinity is meant, or scale the values down.")
    # integers written out in full: the float must be that very integer
    whole = pc.and_(pc.invert(is_inf), pc.match_substring_regex(values, _INTEGER))
    # within int64 compared as columns (the text without sign '+' and leading zeros against
    # the float as an integer); the few beyond one by one in Python integers
    inside = pc.less(pc.abs(floats), 2.0**63)
    near = pc.and_(whole, inside)
    if pc.any(near).as_py():
        digits = pc.replace_substring_regex(pc.filter(values, near), r"^\+?(-?)0*([0-9])",
                                            r"\1\2")
        exact = pc.equal(digits, pc.cast(pc.cast(pc.filter(floats, near), pa.int64()),
                                         pa.string()))
        if not pc.all(exact).as_py():
            whole = near   # report the first that differs, below
        else:
            whole = pc.and_(whole, pc.invert(inside))
    for k in np.flatnonzero(whole.to_numpy(zero_copy_only=False)).tolist():
        v, f = values[k].as_py(), floats[k].as_py()
        if int(v) != int(f):
            raise FileFormatError(
                f"{source}: {where(rows[k].as_py())}: {what} {v} in column {name!r} is an "
                f"integer that a 64-bit float cannot hold exactly (it would be read as "
                f"{int(f)}), and the column cannot be read as 64-bit integers (decimals, or "
                f"integers below 0 and beyond 2**63 - 1, or beyond 2**64 - 1). Write every "
                f"{what} as an integer from 0 to 2**64 - 1 or from -2**63 to 2**63 - 1, or scale "
                f"the values down.")
    return col
