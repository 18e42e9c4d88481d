# The distinct-label estimate of the label kernel (_labels.pyx): HyperLogLog registers raised
# by each row's hash in the counting pass, and the estimate read from them, which sizes the
# label tables ahead.
from libc.math cimport log
from libc.stdint cimport uint8_t, uint64_t

from fastmst._kernels.label_hash cimport ctz64


cdef enum:
    REGS = 4096     # registers of the distinct-label estimate (HyperLogLog, 2**12)
    REG_SHIFT = 44  # a hash's register: bits 44..55 (below the partition byte); its rank:
                    # the trailing zeros of bits 0..43, plus one


cdef inline void raise_register(uint8_t* reg, uint64_t h) noexcept nogil:
    """Raise the register of hash ``h`` in ``reg`` (REGS bytes) to the hash's rank."""
    cdef uint8_t rank = <uint8_t>(ctz64(h | ((<uint64_t>1) << REG_SHIFT)) + 1)
    if rank > reg[(h >> REG_SHIFT) & (REGS - 1)]:
        reg[(h >> REG_SHIFT) & (REGS - 1)] = rank


cdef inline double estimate(const uint8_t* reg) noexcept nogil:
    """Distinct hashes seen, from HyperLogLog registers (Flajolet, Fusy, Gandouet, Meunier,
    "HyperLogLog: the analysis of a near-optimal cardinality estimation algorithm", 2007),
    with linear counting for small counts as that paper advises; relative error about 1.6 %
    for 2**12 registers."""
    cdef double s = 0, m = REGS, e
    cdef Py_ssize_t j, zeros = 0
    for j in range(REGS):
        s += 1.0 / <double>((<uint64_t>1) << reg[j])
        if reg[j] == 0:
            zeros += 1
    e = 0.7213 / (1.0 + 1.079 / m) * m * m / s
    if e <= 2.5 * m and zeros:
        e = m * log(m / <double>zeros)
    return e
