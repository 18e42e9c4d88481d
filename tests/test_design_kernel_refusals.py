"""What the design tools' tree kernels refuse, and how (fastmst._kernels.halves and
fastmst._kernels.replacements, with their compiled _halves and _replacements).

The Python layer checks the values and allocates the work arrays; the compiled defs behind it
check that the arrays they receive have the lengths their kernels index, so that a wrong call
is a ValueError, never a read or write outside an array.  Input contract checks (common
practice, no source): the results on valid inputs are checked against outside references in
test_design_kernels.py.
"""
import re

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from fastmst._kernels import _halves, _replacements, halves, replacements

# a small valid forest: 0 is the top, 1 and 2 its children, 3 the child of 1
PNODE = np.array([-1, 0, 0, 1], dtype=np.int64)
DEPTH = np.array([0, 1, 1, 2], dtype=np.int64)
PEDGE = np.array([-1, 0, 1, 2], dtype=np.int64)
CALLS = {
    "common_ancestors": (halves.common_ancestors, _halves,
                         dict(pnode=PNODE, a=np.array([3, 2], dtype=np.int64),
                              b=np.array([2, 1], dtype=np.int64))),
    "cover_by_halves": (halves.cover_by_halves, _halves,
                        dict(pnode=PNODE, depth=DEPTH, starts=np.array([3, 2], dtype=np.int64),
                             top_depth=np.array([0, 0], dtype=np.int64),
                             cost=np.array([1.0, 2.0]), tie=np.array([0, 1], dtype=np.int64))),
    "first_covers": (replacements.first_covers, _replacements,
                     dict(pnode=PNODE, pedge=PEDGE, depth=DEPTH, n_links=3,
                          tail=np.array([1, 2, 3, 3], dtype=np.int64),
                          head=np.array([0, 0, 1, 2], dtype=np.int64),
                          ranked=np.array([3], dtype=np.int64))),
}
# the int64-only arguments of each function (first_covers' link ends may also be int32)
INT64_ARGS = [("common_ancestors", x) for x in ("pnode", "a", "b")] + \
             [("cover_by_halves", x) for x in ("pnode", "depth", "starts", "top_depth")] + \
             [("first_covers", x) for x in ("pnode", "pedge", "depth", "ranked")]
# what the compiled defs return on the valid inputs above: -1 (done) for the two that report
# a failing pair or link, the number of nodes reached for cover_by_halves
CALLS_OK = {"common_ancestors": lambda args: -1, "first_covers": lambda args: -1,
            "cover_by_halves": lambda args: args[0].shape[0]}


def compiled_args(monkeypatch, name):
    """The arguments the Python layer passes to the compiled def of the same name, on the
    valid inputs above."""
    func, compiled, kwargs = CALLS[name]
    real = getattr(compiled, name)
    seen = []
    monkeypatch.setattr(compiled, name, lambda *a: seen.append(a) or real(*a))
    func(**kwargs)
    assert len(seen) == 1
    return real, seen[0]


@pytest.mark.parametrize("name", sorted(CALLS))
def test_the_compiled_defs_refuse_every_array_one_entry_short(monkeypatch, name):
    """Every array the compiled def indexes, one entry (row) short, is refused before the
    kernel runs; ``ranked`` is the one array whose length is free (the links to try)."""
    real, args = compiled_args(monkeypatch, name)
    assert real(*args) == CALLS_OK[name](args)
    arrays = [i for i, x in enumerate(args) if isinstance(x, np.ndarray)]
    if name == "first_covers":
        arrays.remove(4)                    # ranked
    assert len(arrays) == {"common_ancestors": 15, "cover_by_halves": 30,
                           "first_covers": 5}[name]
    for i in arrays:
        short = list(args)
        short[i] = args[i][:-1].copy()
        before = [x.copy() for x in args if isinstance(x, np.ndarray)]
        with pytest.raises(ValueError, match=rf"_(halves|replacements)\.{name}: arrays of the "
                                             r"wrong lengths"):
            real(*short)
        after = [x for x in args if isinstance(x, np.ndarray)]
        assert [x.tobytes() for x in before] == [x.tobytes() for x in after]   # NaN garbage too



@settings(max_examples=120, deadline=None)
@given(st.sampled_from(INT64_ARGS),
       st.sampled_from([np.int32, np.uint64, np.int16, np.float64, np.bool_, "2d"]))
def test_integer_arguments_other_than_int64_vectors_are_refused(which, kind):
    """An int64-only argument of another dtype, or with two dimensions, is a ValueError that
    names the argument and what it received, before any work array is allocated; the inputs
    are left unchanged."""
    name, arg = which
    func, _, kwargs = CALLS[name]
    kwargs = {k: (v.copy() if isinstance(v, np.ndarray) else v) for k, v in kwargs.items()}
    x = kwargs[arg]
    kwargs[arg] = np.stack([x, x]) if kind == "2d" else x.astype(kind)
    received = re.escape("2 dimension(s) of int64" if kind == "2d" else f"of {np.dtype(kind)}")
    keep = {k: (v.copy() if isinstance(v, np.ndarray) else v) for k, v in kwargs.items()}
    with pytest.raises(ValueError, match=rf"{name}: {arg} must be a one-dimensional int64 "
                                         rf"array, received .*{received}"):
        func(**kwargs)
    for k, v in keep.items():
        assert np.array_equal(kwargs[k], v) if isinstance(v, np.ndarray) else kwargs[k] == v


@pytest.mark.parametrize("name", sorted(CALLS))
def test_the_python_layer_accepts_the_valid_inputs_unchanged(name):
    """The valid inputs above go through (a check that can fail: the refusal tests above
    start from them) and are not modified."""
    func, _, kwargs = CALLS[name]
    keep = {k: (v.copy() if isinstance(v, np.ndarray) else v) for k, v in kwargs.items()}
    func(**kwargs)
    for k, v in keep.items():
        assert np.array_equal(kwargs[k], v) if isinstance(v, np.ndarray) else kwargs[k] == v
