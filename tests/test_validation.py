"""Bad input gets a clear TypeError (wrong type) or ValueError (wrong value) that names what was
received, what was expected and the first offending position."""
import re

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

import fastmst
from fastmst import design

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


# --- every public function: wrong type -> TypeError, wrong value -> ValueError ----------------

_G = ([0, 1, 2], [1, 2, 3], [1.0, 2.0, 3.0])


def _forest(maximize=False):
    return fastmst.minimum_spanning_forest(*_G, maximize=maximize)


def _mapped():
    """The edges of _G with node coordinates (for maps and GIS output)."""
    return fastmst.EdgeList(*map(np.asarray, _G), 4, coords=np.arange(8.0).reshape(4, 2))


def _geodesy():
    from fastmst.geometry import geodesy
    return geodesy


# (call, exception, argument named in the message, what was received, as the message says it)
_API = {
    "minimum_spanning_forest": [
        (lambda: MSF(*_G, n_nodes="4"), TypeError, "n_nodes", "str '4'"),
        (lambda: MSF(*_G, method="x"), ValueError, "method", "'x'"),
        (lambda: MSF(*_G, required=[9]), ValueError, "required", "= 9"),
    ],
    "check_forest": [
        (lambda: fastmst.check_forest(*_G, edges=["a"]), TypeError, "edges", "dtype <U1"),
        (lambda: fastmst.check_forest(*_G, edges=[7]), ValueError, "edges", "= 7"),
        (lambda: fastmst.check_forest(*_G, edges=[0], required=["a"]), TypeError, "required",
         "dtype <U1"),
        (lambda: fastmst.check_forest(*_G, edges=[0], excluded=[9]), ValueError, "excluded",
         "= 9"),
    ],
    "sensitivity": [
        (lambda: fastmst.sensitivity(*_G, forest=_forest(), return_partner="yes"), TypeError,
         "return_partner", "str 'yes'"),
        (lambda: fastmst.sensitivity(*_G, forest=_forest(), maximize=True), ValueError,
         "maximize", "maximize=True"),
        (lambda: fastmst.sensitivity(*_G, forest=_forest(), required=[0.5]), TypeError,
         "required", "dtype float64"),
        (lambda: fastmst.sensitivity(*_G, forest=_forest(), excluded=[9]), ValueError,
         "excluded", "= 9"),
    ],
    "single_linkage": [
        (lambda: fastmst.single_linkage("f"), TypeError, "SpanningForest", "received str"),
        (lambda: fastmst.single_linkage(_forest(maximize=True)), ValueError, "single_linkage",
         "received a maximum spanning forest"),
    ],
    "point_spanning_tree": [
        (lambda: fastmst.point_spanning_tree([[0, 0], [1, 1]], max_length="1"), TypeError,
         "max_length", "str '1'"),
        (lambda: fastmst.point_spanning_tree([[0, 0], [1, 1]], max_length=-1), ValueError,
         "max_length", "-1"),
        (lambda: fastmst.point_spanning_tree([[0, 0], [1, 1]], metric=3), TypeError, "metric",
         "int 3"),
        (lambda: fastmst.point_spanning_tree([[0, 0]], metric="great-circle",
                                             metric_kwargs={"radius": "big"}), TypeError,
         "radius", "str 'big'"),
        (lambda: fastmst.point_spanning_tree([[0, 0]], metric="great-circle",
                                             metric_kwargs={"radius": -1.0}), ValueError,
         "radius", "-1.0"),
        (lambda: fastmst.point_spanning_tree([[0, np.nan]]), ValueError, "points[0, 1]", "nan"),
    ],
    "steiner_tree": [
        (lambda: fastmst.steiner_tree(*_G, terminals=[0.5, 1.5]), TypeError, "terminals",
         "dtype float64"),
        (lambda: fastmst.steiner_tree(*_G, terminals=[0, 9]), ValueError, "terminals[1]", "= 9"),
    ],
    "SpanningForest.bottleneck": [
        (lambda: _forest().bottleneck([0.5], [1]), TypeError, "a", "dtype float64"),
        (lambda: _forest().bottleneck([0], [9]), ValueError, "b", "node id 9"),
    ],
    "SpanningForest.clusters": [
        (lambda: _forest().clusters(k="2"), TypeError, "k", "str '2'"),
        (lambda: _forest().clusters(k=np.int64(9)), ValueError, "k", "k = 9"),
        (lambda: _forest().clusters(threshold="a"), TypeError, "threshold", "str 'a'"),
    ],
    "SpanningForest.path": [
        (lambda: _forest().path(0.5, 1), TypeError, "a", "dtype float64"),
        (lambda: _forest().path(0, 9), ValueError, "b", "node id 9"),
        (lambda: _forest().path([0, 1], [1, 2]), ValueError, "single node ids", "shapes (2,)"),
    ],
    "SpanningForest.add_edges": [
        (lambda: _forest().add_edges([0], [1], [1.0], required=[0.5]), TypeError, "required",
         "dtype float64"),
        (lambda: _forest().add_edges([0], [1], [1.0], excluded=[3]), ValueError, "excluded",
         "= 3"),
        (lambda: _forest().add_edges([0.5], [1], [1.0]), TypeError, "tail", "dtype float64"),
        (lambda: _forest().add_edges([0], [1], [np.nan]), ValueError, "weight[0]", "NaN"),
    ],
    "DisjointSet": [
        (lambda: fastmst.DisjointSet("3"), TypeError, "n", "str '3'"),
        (lambda: fastmst.DisjointSet(-1), ValueError, "n", "-1"),
    ],
    "haversine_m": [
        (lambda: _geodesy().haversine_m("a", 0, 0, 0), TypeError, "lon1", "dtype <U1"),
        (lambda: _geodesy().haversine_m(0, 91, 0, 0), ValueError, "lat1", "91.0"),
    ],
    "edge_lengths": [
        (lambda: _geodesy().edge_lengths([[0, 0]], [0], [0], metric=3), TypeError, "metric",
         "int 3"),
        (lambda: _geodesy().edge_lengths([[0, 0]], [0], [0], metric="x"), ValueError, "metric",
         "'x'"),
    ],
    "read_nodes": [
        (lambda: fastmst.read_nodes(3), TypeError, "read_nodes", "received int"),
    ],
    "plot_forest": [
        (lambda: fastmst.plot_forest(None, _mapped(), _forest(), required=[0.5]), TypeError,
         "required", "dtype float64"),
        (lambda: fastmst.plot_forest(None, _mapped(), _forest(), excluded=[9]), ValueError,
         "excluded[0]", "= 9"),
    ],
    "read_line_layer": [
        (lambda: fastmst.io.read_line_layer("links.gpkg", snap_tolerance="1"), TypeError,
         "snap_tolerance", "str '1'"),
        (lambda: fastmst.io.read_line_layer("links.gpkg", snap_tolerance=-1), ValueError,
         "snap_tolerance", "-1.0"),
    ],
    "write_geopackage": [
        (lambda: fastmst.io.write_geopackage("f.gpkg", _forest(), "edges"), TypeError,
         "edges", "received str"),
        (lambda: fastmst.io.write_geopackage("f.gpkg", _forest(), _mapped(), clusters=[0, 1]),
         ValueError, "clusters", "shape (2,)"),
    ],
    "design.link_failures": [
        (lambda: design.link_failures(*_G, root="a"), TypeError, "root", "str 'a'"),
        (lambda: design.link_failures(*_G, root=9), ValueError, "root", "= 9"),
    ],
    "design.backup_links": [
        (lambda: design.backup_links(*_G, exact="yes"), TypeError, "exact", "str 'yes'"),
        (lambda: design.backup_links(*_G, excluded=[9]), ValueError, "excluded", "= 9"),
    ],
    "design.capacitated_tree": [
        (lambda: design.capacitated_tree(*_G, 0, "3"), TypeError, "capacity", "str '3'"),
        (lambda: design.capacitated_tree(*_G, 0, -1), ValueError, "capacity", "-1"),
    ],
    "design.light_shallow_tree": [
        (lambda: design.light_shallow_tree(*_G, 0, alpha="2"), TypeError, "alpha", "str '2'"),
        (lambda: design.light_shallow_tree(*_G, 0, alpha=0.5), ValueError, "alpha", "0.5"),
    ],
}


@pytest.mark.parametrize("case", [pytest.param(c, id=f"{name}-{i}")
                                  for name, cases in _API.items() for i, c in enumerate(cases)])
def test_public_api_wrong_type_and_value(case):
    """Every public function: a wrong type is a TypeError and a wrong value a ValueError, and
    the message names the argument and what was received (NumPy scalars shown as plain
    numbers, never as ``np.int64(9)``)."""
    call, exc, argument, received = case
    with pytest.raises(exc) as info:
        call()
    assert type(info.value) is exc or (exc is ValueError and isinstance(info.value, ValueError))
    msg = str(info.value)
    assert argument in msg and received in msg, msg
    assert not re.search(r"np\.(?:u?int|float|bool|str_|complex)\w*\(|np\.(?:True|False)_",
                         msg), msg


def test_public_api_sweep_covers_the_package():
    """The sweep above lists every public callable of ``fastmst`` (so a new one gets cases)."""
    public = {n for n in fastmst.__all__ if callable(getattr(fastmst, n))
              and not isinstance(getattr(fastmst, n), type) or n == "DisjointSet"}
    covered = set(_API) | {"SpanningForest", "ForestCheck", "SteinerTree", "EdgeList"}
    io_functions = {"read_edges", "write_forest"}   # file arguments: tests/test_io.py
    assert public - covered - io_functions == set()


def test_column_name_empty_is_a_value_error():
    """An empty column name is a wrong value (ValueError); a non-string a wrong type."""
    from fastmst import validation
    with pytest.raises(ValueError, match="tail is the empty string"):
        validation.check_column_name("", "tail", "f")
    with pytest.raises(TypeError, match=r"tail must be a column name \(a string\), received "
                                        r"int 0"):
        validation.check_column_name(0, "tail", "f")


# --- scales: threads, node counts and ids beyond what any machine holds -----------------------

def _peak_bytes(call):
    """Peak bytes NumPy and Python allocated during ``call`` (tracemalloc sees NumPy's
    buffers), and the exception it raised."""
    import tracemalloc
    tracemalloc.start()
    try:
        call()
    except (TypeError, ValueError) as exc:
        raised = exc
    else:
        raised = None
    finally:
        peak = tracemalloc.get_traced_memory()[1]
        tracemalloc.stop()
    return peak, raised


_SCALE_CALLS = {
    "minimum_spanning_forest": lambda **kw: MSF(*_G, **kw),
    "check_forest": lambda **kw: fastmst.check_forest(*_G, [0, 1], **kw),
    "sensitivity": lambda **kw: fastmst.sensitivity(*_G, _forest(), **kw),
    "bottleneck": lambda **kw: _forest().bottleneck(0, 1, **kw),
}


@pytest.mark.parametrize("func", sorted(_SCALE_CALLS))
@given(threads=st.one_of(st.integers(4097, 2**70), st.sampled_from([2**31, 2**40, 2**63])))
def test_threads_beyond_any_machine_is_a_value_error(func, threads):
    """``threads`` far beyond any machine: a ValueError naming the argument, the value received
    and the fix (None for every core), not an OverflowError from a C int."""
    with pytest.raises(ValueError) as info:
        _SCALE_CALLS[func](threads=threads)
    msg = str(info.value)
    assert "threads" in msg and str(threads) in msg and "threads=None" in msg, msg


@given(n_nodes=st.one_of(st.integers(2**40, 2**70),
                         st.sampled_from([10**12, 2**63 - 1, 2**63, 2**64, 10**30])))
def test_n_nodes_beyond_memory_refused_before_allocating(n_nodes):
    """``n_nodes`` whose per-node arrays exceed this machine's memory: a ValueError that names
    n_nodes, the value, the memory it needs, and how to fix it -- raised before anything large
    is allocated (peak under 1 MiB, measured with tracemalloc)."""
    for call in (lambda: MSF(*_G, n_nodes=n_nodes),
                 lambda: fastmst.check_forest(*_G, [0, 1], n_nodes=n_nodes),
                 lambda: fastmst.steiner_tree(*_G, terminals=[0, 3], n_nodes=n_nodes),
                 lambda: _forest().add_edges([0], [1], [1.0], n_nodes=n_nodes)):
        peak, exc = _peak_bytes(call)
        assert isinstance(exc, ValueError), exc
        msg = str(exc)
        assert "n_nodes" in msg and str(n_nodes) in msg and "GiB" in msg, msg
        assert peak < 2**20, peak


@given(big=st.one_of(st.integers(2**40, 2**63 - 1), st.sampled_from([2**40, 2**62])),
       dtype=st.sampled_from([np.int64, np.uint64]), where=st.sampled_from(["tail", "head"]))
def test_huge_id_without_n_nodes_refused_with_relabel_hint(big, dtype, where):
    """One typo id of 2**40 (or up to 2**63 - 1, or beyond in uint64) without ``n_nodes``
    implies a node array no machine holds: a ValueError naming the array, the position, the
    value and the fix (relabel compactly), before anything large is allocated."""
    ids = {"tail": np.array([0, 1, 2], dtype=dtype), "head": np.array([1, 2, 3], dtype=dtype)}
    ids[where][1] = big
    peak, exc = _peak_bytes(lambda: MSF(ids["tail"], ids["head"], [1.0, 2.0, 3.0]))
    assert isinstance(exc, ValueError), exc
    msg = str(exc)
    assert f"{where}[1] = {big}" in msg and "np.unique" in msg and "GiB" in msg, msg
    assert peak < 2**20, peak
    ids[where] = ids[where].astype(np.uint64)
    ids[where][1] = 2**63 + 5
    with pytest.raises(ValueError, match=rf"{where}\[1\] = {2**63 + 5}"):
        MSF(ids["tail"].astype(np.uint64), ids["head"].astype(np.uint64), [1.0, 2.0, 3.0])


def test_large_but_feasible_node_counts_still_solve():
    """A million isolated nodes and sparse ids are legal: only what memory cannot hold is
    refused."""
    f = MSF([0, 999_999], [1, 5], [1.0, 2.0], n_nodes=1_000_000)
    assert f.n_components == 1_000_000 - 2
    assert MSF(np.array([0]), np.array([2_000_000]), [1.0]).n_nodes == 2_000_001
    assert MSF(*_G, threads=64).edges.tolist() == [0, 1, 2]


@settings(max_examples=60, deadline=None)
@given(shape=st.lists(st.integers(0, 40), min_size=1, max_size=3),
       dtype=st.sampled_from(["float64", "int32", "uint8", "bool", "complex128", "object"]))
def test_messages_show_large_arrays_by_shape(shape, dtype):
    """A wrong argument that is a large array is named by its shape and dtype, so the message
    stays a line or two whatever the array's size (common practice, no source)."""
    value = np.zeros(shape, dtype=dtype)
    with pytest.raises(TypeError) as e:
        fastmst.minimum_spanning_forest([0], [1], [1.0], n_nodes=value)
    message = str(e.value)
    assert len(message) < 300, message
    if value.size > 8:
        assert f"shape {value.shape}" in message and str(value.dtype) in message


# A masked entry of a NumPy masked array is a missing value.  np.asarray drops the mask and
# would hand the hidden data to the solver (a wrong answer, not an error), so every array entry
# point refuses masked entries and accepts a masked array whose mask is all False.
def _masked_calls():
    t = np.array([0, 1, 2, 0, 3])
    h = np.array([1, 2, 3, 3, 4])
    w = np.array([4.0, 1.0, 2.0, 3.0, 5.0])
    pts = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 2.0], [4.0, 1.0]])
    f = MSF(t, h, w)
    return {
        "tail": (lambda a: MSF(a, h, w).edges, t),
        "head": (lambda a: MSF(t, a, w).edges, h),
        "weight": (lambda a: MSF(t, h, a).edges, w),
        "edges": (lambda a: fastmst.check_forest(t, h, w, a).is_minimum, f.edges),
        "terminals": (lambda a: fastmst.steiner_tree(t, h, w, a).edges, np.array([0, 2, 4])),
        "points": (lambda a: fastmst.point_spanning_tree(a).edges, pts),
        "required": (lambda a: MSF(t, h, w, required=a).edges, np.array([4])),
    }


@pytest.mark.parametrize("name", sorted(_masked_calls()))
@settings(max_examples=15, deadline=None)
@given(data=st.data())
def test_masked_entries_are_refused(name, data):
    call, arr = _masked_calls()[name]
    mask = np.zeros(arr.shape, dtype=bool)
    flat = data.draw(st.integers(0, arr.size - 1), label="masked position")
    mask.flat[flat] = True
    hidden = arr.copy()
    hidden.flat[flat] = data.draw(st.sampled_from([0, 1, 3]), label="hidden value")
    with pytest.raises(ValueError, match=rf"{name} is a masked array with 1 masked entry.*"
                                         r"missing value"):
        call(np.ma.array(hidden, mask=mask))
    # an all-False mask is the plain array
    np.testing.assert_array_equal(call(np.ma.array(arr, mask=np.zeros(arr.shape, bool))),
                                  call(arr))
