"""Bad input gets a clear TypeError (wrong type) or ValueError (wrong value) that names what was
received, what was expected and the first offending position."""
import numpy as np
import pytest

import fastmst

MSF = fastmst.minimum_spanning_forest


@pytest.mark.parametrize("args,kwargs,exc,match", [
    (([0, 1], [1, 2], [1.0, np.nan]), {}, ValueError, r"weight\[1\] is NaN"),
    (([0, 1], [1, 5], [1.0, 2.0], 4), {}, ValueError,
     r"head\[1\] = 5 is out of range; expected ids in \[0, 4\).*n_nodes >= 6"),
    (([0, -1], [1, 2], [1.0, 2.0]), {}, ValueError, r"tail\[1\] = -1 is negative"),
    (([0.0, 1.0], [1, 2], [1.0, 2.0]), {}, TypeError, r"tail has dtype float64.*astype"),
    ((["a", "b"], [1, 2], [1.0, 2.0]), {}, TypeError, r"tail has dtype <U1.*np.unique"),
    (([0, 1], [1, 2], [1.0]), {}, ValueError, r"lengths 2, 2 and 1"),
    ((np.zeros((2, 2), int), [1, 2], [1.0, 2.0]), {}, ValueError, r"tail must be 1-D.*\(2, 2\)"),
    (([0, 1], [1, 2], [1.0, 2.0], 2), {}, ValueError, r"head\[1\] = 2 is out of range"),
    (([0, 1], [1, 2], [1.0, 2.0]), {"method": "prim"}, ValueError,
     r"unknown method 'prim'; expected one of 'auto', 'kruskal'"),
    (([0, 1], [1, 2], [1.0, 2.0]), {"method": 3}, TypeError, r"method must be a string"),
    (([0, 1], [1, 2], [True, False]), {}, TypeError, r"weight has dtype bool"),
    (([0, 1], [1, 2], ["x", "y"]), {}, TypeError, r"weight has dtype <U1"),
    (([0, 1], [1, 2], np.array([1 + 1j, 2])), {}, TypeError, r"weight has dtype complex128"),
    (([True, False], [1, 2], [1.0, 2.0]), {}, TypeError, r"tail has dtype bool"),
    (([0, 1], [1, 2], [1.0, 2.0], -1), {}, ValueError, r"n_nodes must be >= 0, received -1"),
    (([0, 1], [1, 2], [1.0, 2.0], 2.5), {}, TypeError, r"n_nodes must be an integer"),
    (([0, 1], [1, 2], [1.0, 2.0]), {"maximize": "yes"}, TypeError, r"maximize must be True"),
    (([0, 1], [1, 2], [1.0, 2.0]), {"threads": 1.5}, TypeError, r"threads must be an integer"),
    ((None, [1, 2], [1.0, 2.0]), {}, TypeError, r"tail is None"),
])
def test_bad_input_messages(args, kwargs, exc, match):
    """Each malformed call raises the right exception type with an actionable message."""
    with pytest.raises(exc, match=match):
        MSF(*args, **kwargs)


def test_first_nan_position_is_named_for_float32():
    """The first NaN is named even when several are present and the dtype is float32."""
    w = np.ones(10, np.float32)
    w[[7, 3]] = np.nan
    with pytest.raises(ValueError, match=r"weight\[3\] is NaN"):
        MSF(np.arange(10), np.arange(1, 11), w)


def test_uint64_ids_too_large_are_out_of_range_not_wrapped():
    """Huge unsigned ids are reported, never reinterpreted as negative numbers."""
    with pytest.raises(ValueError, match=r"tail\[0\] = 18446744073709551615 is out of range"):
        MSF(np.array([2**64 - 1], np.uint64), np.array([0], np.uint64), [1.0], 10)


def test_infinite_weights_are_ordinary():
    """+inf and -inf are valid weights, ordered as usual."""
    f = MSF([0, 0, 1], [1, 2, 2], [np.inf, -np.inf, 1.0])
    assert f.edges.tolist() == [1, 2]
