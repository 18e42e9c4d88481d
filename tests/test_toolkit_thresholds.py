"""Where a threshold or a bound meets weights, the comparison is exact in the weights' own dtype
(integer weights near 2**53 and beyond, uint64, float32 against a float64 or integer
threshold), and a forest without edges still gives a valid linkage matrix.

References: the partition is recomputed with ``scipy.sparse.csgraph.connected_components`` on
the forest edges kept by an exact comparison of Python numbers (Python compares int and float
values exactly: the language reference, "Value comparisons"), and linkage
matrices are checked with ``scipy.cluster.hierarchy.is_valid_linkage`` and ``fcluster``.
"""
import numpy as np
import pytest
from hypothesis import given, strategies as st
from scipy.cluster.hierarchy import fcluster, is_valid_linkage
from scipy.sparse import coo_array
from scipy.sparse.csgraph import connected_components

import fastmst
from toolkit_reference import canonical

_DTYPES = {
    np.int64: (-(2**63), 2**63 - 1),
    np.uint64: (0, 2**64 - 1),
    np.int32: (-(2**31), 2**31 - 1),
    np.uint32: (0, 2**32 - 1),
}


def _reference_clusters(f, threshold):
    """Partition after cutting every forest edge heavier than ``threshold`` (lighter when
    maximizing), the comparison done on exact Python numbers; components by SciPy."""
    t = threshold.item() if isinstance(threshold, np.generic) else threshold
    keep = [(w >= t) if f.maximize else (w <= t) for w in f.weights.tolist()]
    keep = np.array(keep, dtype=bool)
    n = f.n_nodes
    a = coo_array((np.ones(int(keep.sum())),
                   (f.tail[keep].astype(np.int64), f.head[keep].astype(np.int64))), shape=(n, n))
    return canonical(connected_components(a, directed=False)[1])


def test_int64_weights_near_2_53_hand_solved():
    """Path 0-1-2-3 with weights 2**53, 2**53 + 1, 2**53 + 2 (all distinct as int64, but equal
    after a float64 cast): threshold 2**53 cuts the two heavier edges."""
    w = np.array([2**53, 2**53 + 1, 2**53 + 2], dtype=np.int64)
    f = fastmst.minimum_spanning_forest([0, 1, 2], [1, 2, 3], w)
    assert f.clusters(threshold=2**53).tolist() == [0, 0, 1, 2]
    assert f.clusters(threshold=2**53 + 1).tolist() == [0, 0, 0, 1]
    # A float threshold meets int64 weights exactly: 2.0**53 is 2**53, 9007199254740993.5
    # rounds to a float64 of 2**53 + 2, which keeps every edge.
    assert f.clusters(threshold=2.0**53).tolist() == [0, 0, 1, 2]
    assert f.clusters(threshold=float(2**53 + 2)).tolist() == [0, 0, 0, 0]
    g = fastmst.minimum_spanning_forest([0, 1, 2], [1, 2, 3], w, maximize=True)
    assert g.clusters(threshold=2**53 + 1).tolist() == [0, 1, 1, 1]


def test_float32_weights_against_float64_and_int_thresholds():
    """float32 weights compared with thresholds that float32 cannot hold: 0.1 (float64) lies
    between float32(0.1) and the next float32 below; 2**24 + 1 is not a float32."""
    w = np.array([np.float32(0.1), np.float32(2**24), np.float32(2**24 + 2)], dtype=np.float32)
    f = fastmst.minimum_spanning_forest([0, 1, 2], [1, 2, 3], w)
    # float32(0.1) = 0.100000001490116... > 0.1, so the edge is cut.
    assert f.clusters(threshold=0.1).tolist() == [0, 1, 2, 3]
    assert f.clusters(threshold=2**24 + 1).tolist() == [0, 0, 0, 1]
    g = fastmst.minimum_spanning_forest([0, 1, 2], [1, 2, 3], w, maximize=True)
    assert g.clusters(threshold=2**24 + 1).tolist() == [0, 1, 2, 2]


@given(st.sampled_from(sorted(_DTYPES, key=str)), st.data(), st.booleans())
def test_integer_thresholds_exact_against_python_numbers(dtype, data, maximize):
    """Random integer weights at the dtype's extremes and thresholds given as ints, floats
    (with fractions and out of the dtype's range) and +-inf: the partition equals the one of
    an exact rational comparison."""
    lo, hi = _DTYPES[dtype]
    near = st.one_of(st.integers(lo, lo + 8), st.integers(hi - 8, hi),
                     st.integers(2**53 - 4, 2**53 + 4).filter(lambda v: lo <= v <= hi),
                     st.integers(-4, 4).filter(lambda v: lo <= v <= hi))
    n = data.draw(st.integers(2, 12))
    m = data.draw(st.integers(0, 20))
    tail = data.draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    head = data.draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    weight = np.array(data.draw(st.lists(near, min_size=m, max_size=m)), dtype=dtype)
    f = fastmst.minimum_spanning_forest(np.array(tail, np.int64), np.array(head, np.int64),
                                        weight, n, maximize=maximize)
    thresholds = [w.item() for w in f.weights] + [
        data.draw(near), data.draw(near) + data.draw(st.sampled_from([-1, 1])),
        float(data.draw(near)), data.draw(st.floats(allow_nan=False)),
        lo - 1, hi + 1, -2.0**70, 2.0**70, np.inf, -np.inf, 2**100, -(2**100)]
    for t in thresholds:
        got = canonical(f.clusters(threshold=t))
        assert got == _reference_clusters(f, t), (t, weight.tolist())


@given(st.sampled_from([np.float32, np.float64]), st.data(), st.booleans())
def test_float_thresholds_exact_against_python_numbers(dtype, data, maximize):
    """Float weights with thresholds of another width or given as large integers."""
    n = data.draw(st.integers(2, 10))
    m = data.draw(st.integers(0, 16))
    width = 32 if dtype is np.float32 else 64
    floats = st.floats(width=width, allow_nan=False)
    tail = data.draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    head = data.draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    weight = np.array(data.draw(st.lists(floats, min_size=m, max_size=m)), dtype=dtype)
    f = fastmst.minimum_spanning_forest(np.array(tail, np.int64), np.array(head, np.int64),
                                        weight, n, maximize=maximize)
    thresholds = [data.draw(st.floats(allow_nan=False)), data.draw(st.integers(-(2**64), 2**64)),
                  2**2000, -(2**2000), 2**53 + 1]
    with np.errstate(over="ignore"):         # the neighbour of the float64 maximum is inf
        for w in f.weights.tolist():
            thresholds += [w, np.nextafter(w, np.inf), np.nextafter(w, -np.inf)]
    for t in thresholds:
        assert canonical(f.clusters(threshold=t)) == _reference_clusters(f, t), t


def test_threshold_numpy_scalars_and_bad_values():
    """NumPy scalar thresholds are read exactly (np.uint64 beyond 2**63); NaN and non-numbers
    are refused."""
    w = np.array([2**64 - 2, 2**64 - 1], dtype=np.uint64)
    f = fastmst.minimum_spanning_forest([0, 1], [1, 2], w)
    assert f.clusters(threshold=np.uint64(2**64 - 2)).tolist() == [0, 0, 1]
    assert f.clusters(threshold=np.float16(1.0)).tolist() == [0, 1, 2]
    with pytest.raises(ValueError, match="threshold is NaN"):
        f.clusters(threshold=np.float32("nan"))
    with pytest.raises(TypeError, match="threshold must be a real number"):
        f.clusters(threshold="1")


@pytest.mark.parametrize("n", [2, 3, 7])
def test_single_linkage_of_forest_without_edges(n):
    """No edges: n - 1 merges, all at height inf, in node order; the matrix is valid for SciPy
    (is_valid_linkage) and fcluster cuts it into the n single nodes at any finite height."""
    f = fastmst.minimum_spanning_forest(np.empty(0, np.int64), np.empty(0, np.int64),
                                        np.empty(0), n)
    z = fastmst.single_linkage(f)
    assert z.shape == (n - 1, 4)
    assert is_valid_linkage(z)
    assert np.all(np.isinf(z[:, 2]))
    assert z[0, :2].tolist() == [0, 1]
    assert z[:, 3].tolist() == list(range(2, n + 1))
    assert fcluster(z, 1e300, "distance").tolist() == list(range(1, n + 1))
    assert canonical(f.clusters(k=n)) == canonical(np.arange(n))


def test_single_linkage_isolated_nodes_beside_edges():
    """Isolated nodes after a tree: the tree's merges first, then the isolated nodes join at
    inf in order of their first node; valid for SciPy."""
    f = fastmst.minimum_spanning_forest([1], [2], [0.5], 5)
    z = fastmst.single_linkage(f)
    assert is_valid_linkage(z)
    assert z.tolist() == [[1, 2, 0.5, 2], [0, 5, np.inf, 3], [3, 6, np.inf, 4],
                          [4, 7, np.inf, 5]]


@given(st.sampled_from([np.int64, np.uint64]), st.data(), st.booleans())
def test_sensitivity_margins_are_rounded_once(dtype, data, maximize):
    """Each margin is the exact difference of the two weights it compares (the edge's and its
    partner's), rounded once to float64: integer weights beyond 2**53 are not rounded first.
    The exact difference is taken on Python ints."""
    lo, hi = _DTYPES[dtype]
    near = st.one_of(st.integers(lo, lo + 4), st.integers(hi - 4, hi),
                     st.integers(2**53 - 3, 2**53 + 3))
    n = data.draw(st.integers(2, 8))
    m = data.draw(st.integers(1, 14))
    tail = np.array(data.draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m)))
    head = np.array(data.draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m)))
    weight = np.array(data.draw(st.lists(near, min_size=m, max_size=m)), dtype=dtype)
    f = fastmst.minimum_spanning_forest(tail, head, weight, n, maximize=maximize)
    margin, partner = fastmst.sensitivity(tail, head, weight, f, return_partner=True)
    w = weight.tolist()
    in_forest = set(f.edges.tolist())
    for e in range(m):
        p = int(partner[e])
        if p < 0:
            assert margin[e] == np.inf
            continue
        diff = w[e] - w[p] if (e in in_forest) == maximize else w[p] - w[e]
        assert diff >= 0
        assert margin[e] == float(diff), (e, p, w[e], w[p])


def test_sensitivity_margin_hand_solved_beyond_2_53():
    """Triangle with int64 weights 2**53 + 1, 2**53 + 2, 2**53 + 4: the heaviest (non-tree)
    edge must fall by exactly 2 to enter, the tree edge 2**53 + 2 may rise by exactly 2."""
    w = np.array([2**53 + 1, 2**53 + 2, 2**53 + 4], dtype=np.int64)
    t, h = [0, 1, 0], [1, 2, 2]
    f = fastmst.minimum_spanning_forest(t, h, w)
    assert fastmst.sensitivity(t, h, w, f).tolist() == [3.0, 2.0, 2.0]


@pytest.mark.parametrize("big", [2**53 + 1, -(2**53) - 1, 2**63 - 1])
def test_add_edges_refuses_integer_weights_float64_would_round(big):
    """Integer weights that float64 cannot hold (2**53 + 1 rounds to 2**53) cannot meet float
    weights exactly; the update refuses instead of rounding.  2**53 itself is exact."""
    f = fastmst.minimum_spanning_forest([0], [1], np.array([big], np.int64))
    with pytest.raises(ValueError, match="above 2\\*\\*53"):
        f.add_edges([1], [2], [0.5])
    g = fastmst.minimum_spanning_forest([0], [1], np.array([2**53], np.int64))
    assert g.add_edges([1], [2], [0.5]).edges.tolist() == [1, 0]
