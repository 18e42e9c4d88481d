"""No valid input makes a total weight raise, and every total is the exact sum rounded once.

Valid weights include +inf and -inf together (the total is then NaN), finite values whose sum
overflows float64 (the total is then +-inf, or finite when later terms bring it back), int64
and uint64 extremes (summed exactly, then rounded once).  The reference is exact rational
arithmetic (``fractions.Fraction``; ``float(Fraction)`` is correctly rounded and raises
OverflowError beyond the float64 range, Python docs of ``fractions``), with IEEE 754's rules
for infinities.  Every place that sums weights is checked: ``SpanningForest.weight`` and its
``repr``, ``required_excess`` (``required=``), ``check_forest``'s ``excess``,
``steiner_tree``'s ``weight`` and the design tools' totals (``backup_links``,
``capacitated_tree``, ``light_shallow_tree``).
"""
import math
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import given, strategies as st

import fastmst

MAX = float(np.finfo(np.float64).max)


def exact_total(values) -> float:
    """The reference: the exact sum of Python numbers, rounded once; NaN for +inf with -inf."""
    values = list(values)
    pos = any(v == math.inf for v in values)
    neg = any(v == -math.inf for v in values)
    if pos and neg:
        return math.nan
    if pos or neg:
        return math.inf if pos else -math.inf
    s = sum((Fraction(v) for v in values), Fraction(0))
    try:
        return float(s)
    except OverflowError:
        return math.inf if s > 0 else -math.inf


def same(a: float, b: float) -> bool:
    return (math.isnan(a) and math.isnan(b)) or a == b


_float_values = st.one_of(
    st.sampled_from([math.inf, -math.inf, MAX, -MAX, MAX / 2, -MAX / 2, 5e-324, -0.0, 0.0]),
    st.floats(allow_nan=False, allow_infinity=True),
    st.floats(min_value=1e307, max_value=MAX), st.floats(min_value=-MAX, max_value=-1e307))
_int64_values = st.one_of(st.sampled_from([-(2**63), 2**63 - 1, 2**53 + 1, -(2**53) - 1]),
                          st.integers(-(2**63), 2**63 - 1))
_uint64_values = st.one_of(st.sampled_from([0, 2**64 - 1, 2**63, 2**53 + 1]),
                           st.integers(0, 2**64 - 1))


def _path_forest(weights, dtype):
    """A path over len(weights) + 1 nodes: every edge is in the forest."""
    w = np.array(weights, dtype=dtype)
    m = w.shape[0]
    return fastmst.minimum_spanning_forest(np.arange(m), np.arange(1, m + 1), w, m + 1), w


@given(st.lists(_float_values, max_size=40))
def test_float64_totals_never_raise(values):
    """Mixtures of +-inf and huge finite float64 values: weight and repr never raise, and the
    weight is the exact sum rounded once (NaN for +inf with -inf)."""
    f, _ = _path_forest(values, np.float64)
    assert same(f.weight, exact_total(values))
    assert "weight=" in repr(f)


@given(st.lists(st.floats(width=32, allow_nan=False), max_size=40))
def test_float32_totals(values):
    """float32 weights are summed exactly too (they widen to float64 without rounding)."""
    f, w = _path_forest(values, np.float32)
    assert same(f.weight, exact_total(w.tolist()))


@pytest.mark.parametrize("dtype,strategy", [(np.int64, _int64_values),
                                            (np.uint64, _uint64_values)])
@given(data=st.data())
def test_integer_totals_exact(dtype, strategy, data):
    """int64 and uint64 extremes: summed as integers (no intermediate rounding to float64),
    rounded once at the end."""
    values = data.draw(st.lists(strategy, max_size=40))
    f, _ = _path_forest(values, dtype)
    assert f.weight == float(sum(values))


def test_hand_solved_totals():
    """+inf with -inf is NaN; 1e308 + 1e308 is inf; 1e308 + 1e308 - 1e308 is 1e308 (the
    intermediate overflow does not stick); 2**53 + 1 twice is 2**54 + 2 exactly."""
    assert math.isnan(_path_forest([math.inf, -math.inf], np.float64)[0].weight)
    assert _path_forest([1e308, 1e308], np.float64)[0].weight == math.inf
    assert _path_forest([-1e308, -1e308], np.float64)[0].weight == -math.inf
    assert _path_forest([1e308, 1e308, -1e308], np.float64)[0].weight == 1e308
    assert _path_forest([2**53 + 1, 2**53 + 1], np.int64)[0].weight == float(2**54 + 2)
    assert "weight=nan" in repr(_path_forest([math.inf, -math.inf], np.float64)[0])


@given(st.lists(_float_values, min_size=2, max_size=12), st.data())
def test_required_excess_never_raises(values, data):
    """A cycle of huge and infinite weights with one required edge: ``required_excess`` is the
    exact difference of the two forests' totals over the edges they do not share (shared
    edges cancel, infinite ones included), rounded once, and never raises."""
    m = len(values)
    tail, head = np.arange(m), (np.arange(m) + 1) % m          # one cycle over m nodes
    w = np.array(values, dtype=np.float64)
    req = data.draw(st.integers(0, m - 1))
    f = fastmst.minimum_spanning_forest(tail, head, w, m, required=[req])
    free = fastmst.minimum_spanning_forest(tail, head, w, m)
    mine, theirs = set(f.edges.tolist()), set(free.edges.tolist())
    want = exact_total([w[p].item() for p in mine - theirs]
                       + [-w[p].item() for p in theirs - mine])
    assert same(f.required_excess, want)
    assert not want < 0


@given(st.lists(_float_values, min_size=3, max_size=10), st.data())
def test_check_forest_excess_never_raises(values, data):
    """``check_forest`` on a non-optimal spanning tree of a cycle with huge or infinite weights:
    ``excess`` is the exact difference over the edges the two trees do not share."""
    m = len(values)
    tail, head = np.arange(m), (np.arange(m) + 1) % m
    w = np.array(values, dtype=np.float64)
    drop = data.draw(st.integers(0, m - 1))
    given_edges = [p for p in range(m) if p != drop]
    c = fastmst.check_forest(tail, head, w, given_edges, m)
    best = fastmst.minimum_spanning_forest(tail, head, w, m)
    mine, theirs = set(given_edges), set(best.edges.tolist())
    want = exact_total([w[p].item() for p in mine - theirs]
                       + [-w[p].item() for p in theirs - mine])
    if c.is_minimum:
        assert c.excess == 0.0
    else:
        assert same(c.excess, want)


@given(st.lists(st.sampled_from([MAX, MAX / 2, MAX / 8, 1e307, 1.0, 0.0]), min_size=1,
                max_size=8), st.sampled_from([np.float64, np.float32, np.int64, np.uint64]))
def test_steiner_total_never_raises(values, dtype):
    """A path of finite, non-negative weights: the Steiner tree between the two ends is the
    whole path and its weight the exact sum rounded once.  Weights whose total could overflow
    a float64 path length (above MAX / 2) are refused with a ValueError that says so, never a
    wrong tree."""
    m = len(values)
    if dtype is not np.float64:
        values = [min(v, 1e18) for v in values]
        if dtype is not np.float32:
            values = [int(v) for v in values]
    w = np.array(values, dtype=dtype)
    args = (np.arange(m), np.arange(1, m + 1), w)
    if exact_total(w.tolist()) > MAX / 2:
        with pytest.raises(ValueError, match="add up to .* scale the weights down"):
            fastmst.steiner_tree(*args, terminals=[0, m])
        return
    s = fastmst.steiner_tree(*args, terminals=[0, m])
    assert sorted(s.edges.tolist()) == list(range(m))
    assert s.weight == exact_total(w.tolist())
    assert "weight=" in repr(s)


_nonnegative_values = st.one_of(
    st.sampled_from([1e16, 1.0, 3.0, 0.0, 1e-3, 5e-324, MAX / 2, 2.0**53]),
    st.floats(min_value=0.0, max_value=MAX))


@given(st.lists(_nonnegative_values, min_size=1, max_size=12))
def test_design_totals_exact(values):
    """On a path every link is in the shallow and the capacitated tree, and each link's parallel
    twin is the only backup for it: each total is the exact sum of those links, rounded once
    (a plain float sum loses the 1.0 in 1e16 + 1.0 + 1.0)."""
    from fastmst import design
    w = np.array(values, dtype=np.float64)
    m = w.shape[0]
    path_t, path_h = np.arange(m), np.arange(1, m + 1)
    if np.isinf(np.cumsum(w)).any():
        # a site's distance from the root (a float64 sum, as scipy's dijkstra adds) overflows:
        # refused, not reported unreached
        with pytest.raises(ValueError, match="exceeds the float64 range"):
            design.light_shallow_tree(path_t, path_h, w, 0, alpha=2.0)
    else:
        shallow = design.light_shallow_tree(path_t, path_h, w, 0, alpha=2.0)
        assert shallow.unreached == 0
        assert same(shallow.weight, exact_total(values))
        assert same(shallow.mst_weight, exact_total(values))
    cap = design.capacitated_tree(path_t, path_h, w, 0, m)
    np.testing.assert_array_equal(cap.position, np.arange(m))
    assert same(cap.weight, exact_total(values))
    # the path at cost 0 is the design; twin i (position m + i) parallels link i
    t2, h2 = np.concatenate([path_t, path_t]), np.concatenate([path_h, path_h])
    backup = design.backup_links(t2, h2, np.concatenate([np.zeros(m), w]), np.arange(m),
                                 lower_bound=False)
    np.testing.assert_array_equal(backup.position, np.arange(m, 2 * m))
    assert same(backup.weight, exact_total(values))
