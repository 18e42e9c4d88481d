# The tie rule, as inline nogil primitives that the kernels cimport (see tie_rule.pyx for the
# rule itself and its Python face).
#
# Everything here is inline, so cimporting this file adds no import of the tie_rule module at
# run time: radix.pyx cimports it while tie_rule.pyx imports radix (for edge_order).
from libc.stdint cimport int64_t, uint32_t, uint64_t

# The weight bits the key map reads: uint32 for 4-byte weights, uint64 for 8-byte ones.
ctypedef fused ukey_t:
    uint32_t
    uint64_t

# Key kinds: how the bits of a weight dtype map to an order-preserving unsigned key.
cdef enum:
    KIND_UNSIGNED = 0
    KIND_SIGNED = 1
    KIND_FLOAT = 2


cdef inline uint64_t key_of(ukey_t bits, int kind) noexcept nogil:
    """The order-preserving key of weight bits (ascending weight = ascending key)."""
    cdef ukey_t top = (<ukey_t>1) << (sizeof(ukey_t) * 8 - 1)
    if kind == KIND_SIGNED:
        return <uint64_t>(bits ^ top)
    if kind == KIND_FLOAT:
        if bits == top:  # -0.0 ties with +0.0
            bits = 0
        if bits & top:
            return <uint64_t>(<ukey_t>~bits)
        return <uint64_t>(bits | top)
    return <uint64_t>bits


cdef inline uint64_t rank_key(ukey_t bits, int kind, bint complement) noexcept nogil:
    """The key, complemented within its width (that of ``ukey_t``) for a maximum forest."""
    cdef ukey_t k = <ukey_t>key_of(bits, kind)
    if complement:
        k = ~k
    return <uint64_t>k


cdef inline uint64_t bits_of(uint64_t key, int kind, bint complement, int width) noexcept nogil:
    """Inverse of ``rank_key`` for ``width``-bit weights: the key back to the weight bits.

    A ``-0.0`` weight has the key of ``+0.0``, so it comes back as ``+0.0``; callers that must
    return the input's bits restore the sign from the input (see filter_kruskal).
    """
    cdef uint64_t mask = (<uint64_t>0) - 1 if width == 64 else ((<uint64_t>1) << width) - 1
    cdef uint64_t top = (<uint64_t>1) << (width - 1)
    if complement:
        key = (~key) & mask
    if kind == KIND_SIGNED:
        return key ^ top
    if kind == KIND_FLOAT:
        if key & top:
            return key ^ top
        return (~key) & mask
    return key


cdef inline void keys_to_bits(uint64_t* k, Py_ssize_t n, int kind, bint complement,
                              uint64_t kmin, int width) noexcept nogil:
    """In place: shifted keys ``k[i] - kmin`` back to weight bits (``bits_of``)."""
    cdef Py_ssize_t i
    for i in range(n):
        k[i] = bits_of(k[i] + kmin, kind, complement, width)
