"""The tie rule (defined in fastmst._kernels.tie_rule; Python face fastmst._kernels.rule_order)
against NumPy as the reference.

The rule: weight ascending (descending with maximize), equal weights by input position, and
-0.0 == +0.0 (IEEE 754 equality, which NumPy's comparisons and sorts follow).  Each property is
checked per kernel dtype over hypothesis-drawn weights that include +-0.0, +-inf, subnormals and
the integer extremes.
"""
import numpy as np
import pytest
from hypothesis import given, strategies as st

from fastmst._kernels.rule_order import (edge_order, first_unsorted, key_range, sort_positions,
                                         weight_bits, weight_keys, weights_from_keys)

UINT = {4: np.uint32, 8: np.uint64}


def _values(dtype):
    dt = np.dtype(dtype)
    if dt.kind == "f":
        # allow_subnormal is on by default; +-0.0 and +-inf are drawn by st.floats too, and
        # sampled explicitly so every run meets them
        return st.one_of(st.floats(width=8 * dt.itemsize, allow_nan=False),
                         st.sampled_from([0.0, -0.0, np.inf, -np.inf,
                                          float(np.finfo(dt).smallest_subnormal),
                                          -float(np.finfo(dt).smallest_subnormal)]))
    info = np.iinfo(dt)
    return st.one_of(st.integers(int(info.min), int(info.max)),
                     st.sampled_from([int(info.min), int(info.max), 0]))


def _weights(dtype):
    return st.lists(_values(dtype), min_size=1, max_size=60).map(
        lambda v: np.array(v, dtype=dtype))


def _rule_rank(w):
    """Rank of each distinct weight value in ascending numeric order (NumPy's np.unique, whose
    equality makes -0.0 and +0.0 one value)."""
    return np.unique(w, return_inverse=True)[1].reshape(-1)


DTYPES = [np.int32, np.int64, np.uint32, np.uint64, np.float32, np.float64]


def _check_round_trip(w):
    m = w.shape[0]
    pos = np.arange(m)
    rank = _rule_rank(w)
    for maximize in (False, True):
        keys = weight_keys(w, maximize)
        assert keys.dtype == np.uint64
        # key order equals numeric order (reversed for maximize), ties included
        lt = rank[:, None] < rank[None, :]
        gt = rank[:, None] > rank[None, :]
        np.testing.assert_array_equal(keys[:, None] < keys[None, :], gt if maximize else lt)
        np.testing.assert_array_equal(keys[:, None] == keys[None, :],
                                      rank[:, None] == rank[None, :])
        # keys fit the weight width (the complement stays within it)
        assert int(keys.max()) < 2 ** (8 * w.dtype.itemsize)
        # inverse: the weight bits back, except -0.0, which comes back as +0.0 (one key) ...
        back = weights_from_keys(keys.copy(), w.dtype, maximize)
        want = w + w.dtype.type(0) if w.dtype.kind == "f" else w   # -0.0 + 0 is +0.0
        assert back.dtype == w.dtype
        np.testing.assert_array_equal(back.view(UINT[w.dtype.itemsize]),
                                      want.view(UINT[w.dtype.itemsize]))
        # ... unless the source weights are given: then -0.0 keeps its sign
        kmin, top_bits = key_range(w, maximize)
        assert kmin == int(keys.min())
        span = int(keys.max()) - kmin
        assert top_bits == (32 + span.bit_length() if span else max(1, (m - 1).bit_length()))
        exact = weights_from_keys(keys - np.uint64(kmin), w.dtype, maximize, kmin, w, pos)
        np.testing.assert_array_equal(exact.view(UINT[w.dtype.itemsize]),
                                      w.view(UINT[w.dtype.itemsize]))
        # rule order: numpy.lexsort over (position, weight rank) is the reference
        ref = np.lexsort((pos, -rank if maximize else rank))
        np.testing.assert_array_equal(edge_order(w, maximize), ref)
        np.testing.assert_array_equal(edge_order(w, maximize, 3), ref)
        # "is rule-sorted": first position whose weight comes before its predecessor's
        nxt = rank[1:] > rank[:-1] if maximize else rank[1:] < rank[:-1]
        bad = np.flatnonzero(nxt)
        assert first_unsorted(w, maximize) == (int(bad[0]) + 1 if bad.size else -1)
        assert first_unsorted(np.ascontiguousarray(w[ref]), maximize) == -1
        # rule order of a subset of positions, given in any order
        sub = pos[::2][::-1].copy()
        want_sub = sub[np.lexsort((sub, -rank[sub] if maximize else rank[sub]))]
        np.testing.assert_array_equal(sort_positions(sub, w, maximize), want_sub)
        np.testing.assert_array_equal(sort_positions(want_sub, w, maximize), want_sub)


@pytest.mark.parametrize("dtype", DTYPES)
def test_key_map_round_trip_and_rule_order(dtype):
    """Per dtype: key order is numeric order, the inverse gives the weight bits back, and
    edge_order / first_unsorted / sort_positions agree with NumPy (lexsort, comparisons)."""
    given(_weights(dtype))(_check_round_trip)()


def test_signed_zeros_tie_and_keep_position_order():
    """-0.0 and +0.0 are equal weights (IEEE 754): one key, position order between them, and
    an ascending run that mixes them is rule-sorted."""
    for dtype in (np.float32, np.float64):
        w = np.array([0.0, -0.0, 0.0, -0.0], dtype=dtype)
        assert len(set(weight_keys(w).tolist())) == 1
        assert edge_order(w).tolist() == [0, 1, 2, 3]
        assert edge_order(w, True).tolist() == [0, 1, 2, 3]
        assert first_unsorted(w) == -1 and first_unsorted(w, True) == -1


def test_weight_bits_refuses_what_would_change_the_keys():
    """A byte-swapped, strided, 2-D or wrongly sized weight array would be read as other keys;
    weight_bits refuses it (ValueError), and a non-kernel dtype or a list is a TypeError."""
    w = np.arange(6, dtype=np.float64)
    bits, kind = weight_bits(w, 6)
    assert bits.dtype == np.uint64 and np.shares_memory(bits, w)
    with pytest.raises(ValueError, match="byte order"):
        weight_bits(w.astype(">f8"))
    with pytest.raises(ValueError, match="contiguous"):
        weight_bits(w[::2])
    with pytest.raises(ValueError, match="1-D"):
        weight_bits(w.reshape(2, 3))
    with pytest.raises(ValueError, match="one weight per edge"):
        weight_bits(w, 5)
    with pytest.raises(TypeError, match="not a kernel dtype"):
        weight_bits(w.astype(np.float16))
    with pytest.raises(TypeError, match="NumPy array"):
        weight_bits([1.0, 2.0])
