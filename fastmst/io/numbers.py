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

_INTEGER = r"^[-+]?[0-9]+$"
_INFINITY = r"^[-+]?(?i:inf|infinity)$"


def needs_text(col) -> bool:
    """Whether the float column ``col`` holds magnitudes where parsing may have rounded an
    integer or overflowed (>= 2**53, or infinite): only then is the text needed."""
    import pyarrow as pa
    import pyarrow.compute as pc
    if not pa.types.is_floating(col.type) or len(col) == col.null_count:
        return False
    return pc.max(pc.abs(col)).as_py() >= 2.0**53


def exact_numbers(text, col, name: str, source: str, where, what: str = "weight"):
    """The float column ``col`` parsed from the text column ``text`` (same rows), made exact.

    Returns ``col`` as it is, or a uint64 column when every cell is an integer that fits;
    raises FileFormatError (``where(i)`` words row ``i``) for an integer a float cannot hold
    exactly and for a finite number that overflowed to infinity.
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
    rows = np.flatnonzero(huge.to_numpy(zero_copy_only=False))
    values = text.take(pa.array(rows, pa.int64())).to_pylist()
    floats = col.take(pa.array(rows, pa.int64())).to_pylist()
    spelled_inf = pc.match_substring_regex(pa.array(values, pa.string()), _INFINITY) \
        .to_pylist() if values else []
    for i, v, f, inf in zip(rows.tolist(), values, floats, spelled_inf):
        if np.isinf(f) and not inf:
            raise FileFormatError(
                f"{source}: {where(i)}: {what} {v} in column {name!r} is beyond the range of "
                f"64-bit floats (about 1.8e308) and would be read as infinity; write it as "
                f"'inf' if infinity is meant, or scale the values down.")
        if not np.isinf(f) and pc.match_substring_regex(pa.scalar(v), _INTEGER).as_py() \
                and int(v) != int(f):
            raise FileFormatError(
                f"{source}: {where(i)}: {what} {v} in column {name!r} is an integer that a "
                f"64-bit float cannot hold exactly (it would be read as {int(f)}), and the "
                f"column cannot be read as 64-bit integers (decimals, or integers below 0 and "
                f"beyond 2**63 - 1, or beyond 2**64 - 1). Write every {what} as an integer "
                f"from 0 to 2**64 - 1 or from -2**63 to 2**63 - 1, or scale the values down.")
    return col
