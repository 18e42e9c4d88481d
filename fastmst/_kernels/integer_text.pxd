# Text written as integers, parsed exactly for ``ids="integer"`` (_labels.integer_labels):
# ``[+-]?[0-9]+`` within int64, any number of leading zeros.
from libc.stdint cimport int64_t, uint8_t, uint64_t

from fastmst._kernels.label_hash cimport offset_t


cdef inline bint integer_span(const offset_t* offs, const uint8_t* data, Py_ssize_t n,
                              int64_t* out) noexcept nogil:
    """``out[i]``: the integer written in row i (``[+-]?[0-9]+``, any number of leading
    zeros, within int64).  False, at the first row that is anything else."""
    cdef Py_ssize_t i, a, b
    cdef uint64_t v, d, limit
    cdef bint neg
    for i in range(n):
        a = offs[i]
        b = offs[i + 1]
        neg = False
        if a < b and (data[a] == 43 or data[a] == 45):      # '+' or '-'
            neg = data[a] == 45
            a += 1
        if a >= b:
            return False
        v = 0
        if b - a <= 18:             # at most 18 digits: below 10**18, no overflow to check
            while a < b:
                d = <uint64_t>data[a] - 48
                if d > 9:
                    return False
                v = v * 10 + d
                a += 1
        else:
            limit = (<uint64_t>1) << 63 if neg else ((<uint64_t>1) << 63) - 1
            while a < b:
                d = <uint64_t>data[a] - 48
                if d > 9 or v > (limit - d) // 10:
                    return False
                v = v * 10 + d
                a += 1
        out[i] = <int64_t>(0 - v) if neg else <int64_t>v
    return True
