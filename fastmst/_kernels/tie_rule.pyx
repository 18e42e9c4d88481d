"""The tie rule: the one total order of edges that every method, kernel and tool follows.

The rule
--------
Edges are ordered by weight ascending (descending for a maximum forest, ``maximize=True``),
and edges of equal weight by input position, earlier first.  ``-0.0`` and ``+0.0`` are equal
weights (IEEE 754), so they tie and fall back to position order.  NaN is not a weight
(validation rejects it).  Every edge has a distinct (weight, position) pair, so the order is
total and the minimum spanning forest under it is unique.

Keys
----
The kernels compare weights through an order-preserving unsigned key of the weight's bits,
for each kernel dtype (float32/float64, int32/int64, uint32/uint64):

* unsigned integers are their own key;
* signed integers flip the sign bit (two's complement order becomes unsigned order);
* IEEE floats: ``-0.0`` is first replaced by ``+0.0``; a non-negative float sets the sign bit,
  a negative one has all bits complemented, which orders negative floats (and ``-inf``) below
  positive ones.

A maximum forest complements every key within its width (descending weight becomes ascending
key) instead of negating a copy of the weights; the position order of ties is unchanged.  The
map is inverted exactly by ``rule_order.weights_from_keys`` (and ``bits_of`` in
``tie_rule.pxd``), except that ``-0.0`` comes back as ``+0.0``: both have one key.

Where each part lives
---------------------
The rule is defined here and in ``tie_rule.pxd``, whose inline ``key_of``/``rank_key`` (the key
map) and ``bits_of``/``keys_to_bits`` (its inverse) every kernel cimports.  This compiled module
keeps only thin typed defs over them: ``fill_keys32/64`` (keys of weight bits),
``first_unsorted32/64`` (first break of the key order) and ``keys_to_weight_bits`` (the inverse,
in place).  Its Python face -- ``KERNEL_DTYPES``, ``key_kind``, ``weight_bits`` (the
precondition check of every kernel that reads weights as bits), ``weight_keys``,
``weights_from_keys``, ``key_range``, ``first_unsorted`` and the rule order (``edge_order``,
``sort_positions``) -- is ``fastmst/_kernels/rule_order.py``, which does the dtype choices,
NumPy checks and allocations and calls these defs.
"""
from libc.stdint cimport uint32_t, uint64_t

#: The key kind code (the enum of tie_rule.pxd) of each NumPy dtype kind of a kernel dtype.
KEY_KINDS = {"u": KIND_UNSIGNED, "i": KIND_SIGNED, "f": KIND_FLOAT}


cdef void _fill_keys(const ukey_t[::1] bits, int kind, bint complement,
                     uint64_t[::1] out) noexcept nogil:
    cdef Py_ssize_t i
    for i in range(bits.shape[0]):
        out[i] = rank_key(bits[i], kind, complement)


cdef Py_ssize_t _first_unsorted(const ukey_t[::1] bits, int kind, bint descending) noexcept nogil:
    cdef Py_ssize_t i
    cdef uint64_t k, prev = rank_key(bits[0], kind, descending)
    for i in range(1, bits.shape[0]):
        k = rank_key(bits[i], kind, descending)
        if k < prev:
            return i
        prev = k
    return -1


cdef int _check_kind(int kind) except -1:
    if kind != KIND_UNSIGNED and kind != KIND_SIGNED and kind != KIND_FLOAT:
        raise ValueError(f"tie_rule: key kind must be 0, 1 or 2 (unsigned, signed, float), "
                         f"received {kind}; take it from rule_order.key_kind.")
    return 0


cdef int _check_out(Py_ssize_t n_bits, Py_ssize_t n_out) except -1:
    if n_out != n_bits:
        raise ValueError(f"fill_keys: out has {n_out} entries for {n_bits} weights; pass "
                         f"np.empty(len(bits), dtype=np.uint64).")
    return 0


cdef int _fill_checked(const ukey_t[::1] bits, int kind, bint complement,
                       uint64_t[::1] out) except -1:
    """``fill_keys32/64``: the kind and length checks, then ``_fill_keys`` without the GIL."""
    _check_kind(kind)
    _check_out(bits.shape[0], out.shape[0])
    with nogil:
        _fill_keys(bits, kind, complement, out)
    return 0


cdef Py_ssize_t _first_unsorted_checked(const ukey_t[::1] bits, int kind,
                                        bint descending) except -2:
    """``first_unsorted32/64``: the kind check, then ``_first_unsorted`` without the GIL."""
    cdef Py_ssize_t i = -1
    _check_kind(kind)
    if bits.shape[0] >= 2:
        with nogil:
            i = _first_unsorted(bits, kind, descending)
    return i


def fill_keys32(const uint32_t[::1] bits, int kind, bint complement, uint64_t[::1] out):
    """OUT: ``out[i]``, the rule key of the 4-byte weight bits ``bits[i]`` (complemented when
    ``complement``); ``out`` has the length of ``bits``."""
    _fill_checked(bits, kind, complement, out)


def fill_keys64(const uint64_t[::1] bits, int kind, bint complement, uint64_t[::1] out):
    """As ``fill_keys32`` for 8-byte weight bits."""
    _fill_checked(bits, kind, complement, out)


def first_unsorted32(const uint32_t[::1] bits, int kind, bint descending):
    """Position of the first 4-byte weight whose key is below the one before, or -1."""
    return _first_unsorted_checked(bits, kind, descending)


def first_unsorted64(const uint64_t[::1] bits, int kind, bint descending):
    """As ``first_unsorted32`` for 8-byte weight bits."""
    return _first_unsorted_checked(bits, kind, descending)


def keys_to_weight_bits(uint64_t[::1] keys, int kind, bint complement, uint64_t kmin,
                        int width):
    """In place: the shifted keys ``keys[i] - kmin`` back to ``width``-bit weight bits
    (``bits_of``; ``width`` 32 or 64)."""
    _check_kind(kind)
    if width != 32 and width != 64:
        raise ValueError(f"keys_to_weight_bits: width must be 32 or 64, received {width}.")
    cdef Py_ssize_t n = keys.shape[0]
    if n:
        with nogil:
            keys_to_bits(&keys[0], n, kind, complement, kmin, width)

