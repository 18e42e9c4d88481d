"""fastmst._kernels.labels.text_ids against two outside references, and the compiled
_labels defs' refusals of arrays that do not fit.

References: NumPy's ``np.unique(..., return_index=True)`` (distinct labels with the index of
their first occurrence, reordered by that index: first-appearance numbering), and pyarrow's
own ``dictionary_encode`` (whose dictionary is in first-appearance order) for the same rows.
"""
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

pa = pytest.importorskip("pyarrow")

from fastmst._kernels import labels as K  # noqa: E402
from fastmst.io import labels as L  # noqa: E402


@pytest.fixture(scope="module")
def monkeypatch_module():
    """A monkeypatch that hypothesis examples may share (undone after the module)."""
    mp = pytest.MonkeyPatch()
    yield mp
    mp.undo()


def reference(values):
    """(ids, labels) by first appearance, through np.unique (reference: NumPy)."""
    arr = np.array(values, dtype=object)
    uniq, first, inverse = np.unique(arr, return_index=True, return_inverse=True)
    order = np.argsort(first, kind="stable")
    rank = np.empty(order.size, dtype=np.int64)
    rank[order] = np.arange(order.size)
    return rank[inverse.ravel()], uniq[order]


def chunked(values, cuts, large, sliced):
    """``values`` as Arrow chunks split at ``cuts``; ``sliced`` makes each chunk a slice (offset
    > 0) of a longer array, so the kernel must honour the chunk offset."""
    typ = pa.large_string() if large else pa.string()
    bounds = [0] + sorted(c % (len(values) + 1) for c in cuts) + [len(values)]
    out = []
    for lo, hi in zip(bounds[:-1], bounds[1:]):
        part = values[lo:hi]
        if sliced:
            out.append(pa.array(["pad", "x" * 20] + part + ["tail"], type=typ)[2:2 + len(part)])
        else:
            out.append(pa.array(part, type=typ))
    return out


def label_arrays(offsets, data):
    return pa.LargeStringArray.from_buffers(offsets.size - 1, pa.py_buffer(offsets),
                                            pa.py_buffer(data)).to_pylist()


# short (packed into one word), exactly 8/9 bytes, long, empty, unicode, embedded NUL; and
# labels that share their zero-padded word with a shorter one ("abc", "abc\0\0\0\0\x03"):
# only the length tells them apart
label = st.one_of(st.sampled_from(["", "a", "b", "ab", "abcdefgh", "abcdefghi", "a\0", "\0",
                                   "é", "ключ", "节点-1", "x" * 40, "x" * 41, "abc",
                                   "abc\0\0\0\0\x03", "\0" * 8, "a" + "\0" * 6 + "\x01",
                                   "abcdefg", "abcdefg\x07", "abcdefg\x08"]),
                  st.text(max_size=3), st.text(min_size=7, max_size=30))


@settings(max_examples=150, deadline=None)
@given(tail=st.lists(label, min_size=0, max_size=60), head=st.lists(label, min_size=0, max_size=60),
       cuts=st.lists(st.integers(0, 200), max_size=4), large=st.booleans(), sliced=st.booleans(),
       threads=st.sampled_from([1, 2, 3, 4]), piece=st.sampled_from([1, 3, 7, 64, 1 << 22]))
def test_text_ids_match_numpy_first_appearance(tail, head, cuts, large, sliced, threads, piece,
                                               monkeypatch_module):
    """Every piece size (rounds of the partition passes that split chunks and span several)."""
    monkeypatch_module.setattr(K, "PIECE_ROWS", piece)
    n = min(len(tail), len(head))
    tail, head = tail[:n], head[:n]
    ids, labels = reference(tail + head)
    parts = chunked(tail, cuts, large, sliced) + chunked(head, cuts[::-1], not large, sliced)
    ti, hi, offsets, data = K.text_ids(parts, n, threads)
    assert ti.dtype == np.int32 and hi.dtype == np.int32
    assert ti.tolist() == ids[:n].tolist()
    assert hi.tolist() == ids[n:].tolist()
    assert label_arrays(offsets, data) == list(labels)


@pytest.mark.parametrize("piece", [50_000, 1 << 22])
@pytest.mark.parametrize("n_labels", [1, 1000, 70_000])
def test_text_ids_same_for_every_thread_count_and_match_arrow(n_labels, piece, monkeypatch):
    """Many rows in one or several rounds (``PIECE_ROWS``), tables that grow, labels new in
    later rounds; reference: pyarrow dictionary_encode (first-appearance dictionary)."""
    monkeypatch.setattr(K, "PIECE_ROWS", piece)
    rng = np.random.default_rng(n_labels)
    names = np.array([f"n{i}" if i % 3 else f"label-{i:09d}-long" for i in range(n_labels)])
    rows = names[rng.integers(0, n_labels, 150_000)].tolist()
    col = pa.chunked_array([pa.array(rows[:70_000]), pa.array(rows[70_000:])])
    enc = col.combine_chunks().dictionary_encode()
    want = enc.indices.to_numpy()
    reserved = []
    real = K._reserve
    monkeypatch.setattr(K, "_reserve", lambda *a: reserved.append(a[1]) or real(*a))
    results = [K.text_ids(col.chunks + col.chunks, len(col), t) for t in (1, 2, 3, 8)]
    assert bool(reserved) == (n_labels > K.RESERVE_FROM)   # tables sized ahead when large
    for ti, hi, offsets, data in results:
        assert np.array_equal(ti, want)
        assert np.array_equal(hi, want)
        assert label_arrays(offsets, data) == enc.dictionary.to_pylist()


def test_encode_label_columns_uses_first_appearance_order():
    tail = pa.chunked_array([pa.array(["b", "a"]), pa.array(["b"])])
    head = pa.chunked_array([pa.array(["c", "a", "d"], type=pa.large_string())])
    t, h, labels = L.encode_label_columns(tail, head, "<t>", lambda i: f"row {i}",
                                          ("tail", "head"))
    assert t.tolist() == [0, 1, 0] and h.tolist() == [2, 1, 3]
    assert labels.tolist() == ["b", "a", "c", "d"]


def test_text_ids_refuses_nulls_and_other_types():
    with pytest.raises(ValueError, match="missing labels"):
        K.text_ids([pa.array(["a", None])], 1, 1)
    with pytest.raises(TypeError, match="string or large_string"):
        K.text_ids([pa.array([1, 2])], 1, 1)
    for whole in (pa.chunked_array([["a"], ["b"]]), np.array(["a", "b"]), ["a", "b"]):
        with pytest.raises(TypeError, match="expected pyarrow arrays"):
            K.text_ids([whole], 1, 1)
    with pytest.raises(ValueError, match="n_tail"):
        K.text_ids([pa.array(["a"])], 2, 1)
    with pytest.raises(ValueError, match="threads"):
        K.text_ids([pa.array(["a"])], 1, 0)


def _piece_arrays(values, threads=1):
    """The arguments ``labels.text_ids`` hands to ``_labels.count_piece`` and
    ``_labels.map_piece`` for one piece: (pieces, count_piece args, map_piece args)."""
    from fastmst._kernels import _labels
    pieces = [K._pieces(pa.array(values))]
    seg, rows = K._segment_table(pieces, K._segments(pieces, len(values))[0])
    nblk = 8 * threads if threads > 1 else 1
    block = (rows + nblk - 1) // nblk
    nblk = (rows + block - 1) // block
    words = (rows + 63) // 64
    tables = _labels.LabelTables()
    segblk = np.zeros(((rows - 1) >> _labels.SEG_ROWS_LOG2) + 1, dtype=np.intp)
    counting = dict(tables=tables, seg=seg.reshape(-1), segblk=segblk, rows=rows, block=block,
                    regs=np.empty(nblk * _labels.REG_BYTES, dtype=np.uint8), threads=threads)
    mapping = dict(
        tables=tables, seg=seg.reshape(-1), segblk=segblk, rows=rows, block=block,
        off=np.empty(3 * nblk * _labels.N_PARTS, dtype=np.intp),
        ent=np.empty(rows * _labels.ENTRY_BYTES, dtype=np.uint8),
        part=np.empty(rows, dtype=np.uint8), eid=np.empty(rows, dtype=np.int32),
        bits=np.empty(words, dtype=np.uint64), below=np.empty(words, dtype=np.intp),
        out=np.empty(rows, dtype=np.int32), threads=threads)
    return pieces, counting, mapping


@settings(max_examples=60, deadline=None)
@given(st.lists(st.sampled_from(["a", "bb", "a much longer label", "é", ""]), min_size=1,
                max_size=300),
       st.sampled_from(["seg", "segblk", "off", "ent", "part", "eid", "bits",
                        "below", "out", "regs"]),
       st.sampled_from([1, 2]))
def test_map_piece_refuses_any_array_too_short_for_the_piece(values, name, threads):
    """The compiled defs check every array against the piece before their passes write: one
    array short by one element (or one segment word) is a ValueError, and the full-size set
    maps the piece as the reference does (reference: NumPy's np.unique, above)."""
    from fastmst._kernels import _labels
    pieces, counting, mapping = _piece_arrays(values, threads)
    args = counting if name in counting else mapping
    full = dict(args)
    args[name] = args[name][:-1]
    if args is counting:
        with pytest.raises(ValueError, match="count_piece"):
            _labels.count_piece(*args.values())
        _labels.count_piece(*full.values())
    else:
        _labels.count_piece(*counting.values())
        with pytest.raises(ValueError, match="map_piece"):
            _labels.map_piece(*args.values())
        _labels.count_piece(*counting.values())
    count = _labels.map_piece(*(full if args is mapping else mapping).values())
    ids, labels = reference(values)
    assert count == len(labels)
    out = (full if args is mapping else mapping)["out"]
    assert out.tolist() == ids.tolist()


def test_map_piece_refuses_a_piece_count_piece_did_not_count():
    """map_piece uses the partition counts count_piece kept: a piece not counted, counted
    with other segments, or mapped twice is refused before the scatter could overrun."""
    from fastmst._kernels import _labels
    pieces, counting, mapping = _piece_arrays(["a", "b", "a", "c"] * 50)
    with pytest.raises(ValueError, match="count_piece first"):
        _labels.map_piece(*mapping.values())
    _labels.count_piece(*counting.values())
    other = dict(mapping, seg=mapping["seg"].copy())
    other["seg"][2] -= 1            # another readable size: another segment table
    with pytest.raises(ValueError, match="count_piece first"):
        _labels.map_piece(*other.values())
    assert _labels.map_piece(*mapping.values()) == 3
    with pytest.raises(ValueError, match="count_piece first"):
        _labels.map_piece(*mapping.values())


@pytest.mark.parametrize("threads", [1, 2])
def test_pieces_that_do_not_fit_their_plan_are_counted_and_still_exact(threads, monkeypatch):
    """After the first piece the runs are planned from the last piece counted; a piece whose
    rows fall otherwise (here: spread labels, then one label in every row, then spread again)
    is counted and mapped again (the rest are not).  Ids as the reference gives them (NumPy first appearance),
    and the same with planning off (PLAN = False: every piece counted)."""
    from fastmst._kernels import _labels
    monkeypatch.setattr(K, "PIECE_ROWS", 4_000)
    counted = []
    real = _labels.count_piece

    def spy(*args):
        counted.append(args[3])
        return real(*args)
    monkeypatch.setattr(_labels, "count_piece", spy)
    spread = [f"s{i % 1500}" for i in range(4_000)]
    values = spread + ["hub"] * 4_000 + spread[::-1] + spread
    ids, labels = reference(values)
    ti, hi, offsets, data = K.text_ids([pa.array(values)], len(values), threads)
    assert ti.tolist() == ids.tolist() and label_arrays(offsets, data) == list(labels)
    # the first piece and the hub piece are counted; the piece after the hub only when its
    # rows overflow the 32 spare entries per run planned from the hub piece
    assert len(counted) in (2, 3)
    monkeypatch.setattr(K, "PLAN", False)
    counted.clear()
    again = K.text_ids([pa.array(values)], len(values), threads)
    assert again[0].tolist() == ids.tolist() and len(counted) == 4


def test_plan_piece_plans_nothing_before_a_count_or_beyond_the_room():
    """plan_piece needs a counted piece to plan from, and runs that fit the entries given."""
    from fastmst._kernels import _labels
    pieces, counting, mapping = _piece_arrays([f"v{i % 40}" for i in range(1000)])
    args = (counting["tables"], counting["seg"], counting["segblk"], counting["rows"],
            counting["block"])
    assert _labels.plan_piece(*args, 10**6) == -1
    with pytest.raises(ValueError, match="count_piece first"):
        _labels.map_piece(*mapping.values())
    _labels.count_piece(*counting.values())
    _labels.map_piece(*mapping.values())
    planned = _labels.plan_piece(*args, 10**6)
    most = int(_labels.PLAN_SLACK * 1000) + (_labels.PLAN_EXTRA + 1) * _labels.N_PARTS
    assert 1000 < planned <= most
    assert _labels.plan_piece(*args, planned - 1) == -1
    with pytest.raises(ValueError, match="plan_piece"):
        _labels.plan_piece(*args[:3], 999, args[4], 10**6)


@pytest.mark.parametrize("n_labels", [1, 10, 300, 5_000, 200_000])
def test_count_piece_estimate_is_close_to_the_distinct_count(n_labels):
    """The distinct-label estimate that sizes the tables, against the exact count (NumPy's
    np.unique): HyperLogLog with 2**12 registers has a standard error of 1.04 / 64 = 1.6 %
    (Flajolet, Fusy, Gandouet, Meunier, "HyperLogLog: the analysis of a near-optimal
    cardinality estimation algorithm", 2007); 8 % is five of them.  Small counts go through
    linear counting (same paper), which is close to exact there."""
    from fastmst._kernels import _labels
    rng = np.random.default_rng(n_labels)
    names = np.char.add("v", np.arange(n_labels).astype(str))
    values = names[rng.integers(0, n_labels, 3 * n_labels + 10)]
    pieces, counting, mapping = _piece_arrays(values.tolist())
    exact = np.unique(values).size
    estimate = _labels.count_piece(*counting.values())
    assert _labels.largest_partition(counting["tables"]) == 0     # nothing mapped yet
    assert abs(estimate - exact) <= max(2, 0.08 * exact)


@pytest.mark.parametrize("threads", [1, 2])
def test_tables_too_small_for_the_labels_still_give_exact_ids(threads, monkeypatch):
    """An estimate far too low (forced here) reserves tables the labels outgrow: they grow
    into memory of their own, and every id is as the reference gives it (NumPy first
    appearance, above)."""
    monkeypatch.setattr(K, "_per_partition", lambda estimate: 1)
    monkeypatch.setattr(K, "RESERVE_FROM", 0)
    reserved = []
    real = K._reserve
    monkeypatch.setattr(K, "_reserve", lambda *a: reserved.append(a[1]) or real(*a))
    monkeypatch.setattr(K, "PIECE_ROWS", 3_000)
    rng = np.random.default_rng(7)
    names = np.array([f"n{i}" if i % 2 else f"a-much-longer-label-{i}" for i in range(4_000)])
    tail = names[rng.integers(0, 4_000, 10_000)].tolist()
    head = names[rng.integers(0, 4_000, 10_000)].tolist()
    ids, labels = reference(tail + head)
    ti, hi, offsets, data = K.text_ids([pa.array(tail), pa.array(head)], len(tail), threads)
    assert reserved and max(reserved) < 20      # reserved, and far too small
    assert np.concatenate([ti, hi]).tolist() == ids.tolist()
    assert label_arrays(offsets, data) == list(labels)


@pytest.mark.parametrize("threads", [1, 2])
def test_room_for_labels_still_to_come_is_reserved_ahead(threads, monkeypatch):
    """Rows whose labels are all new (a file sorted by node): before each piece, room is
    reserved for as many new labels as the last piece brought, so the tables need not grow in
    the kernel; labels that repeat reserve once.  Ids as the reference gives them (NumPy first
    appearance, above)."""
    from fastmst._kernels import _labels
    monkeypatch.setattr(K, "RESERVE_FROM", 1_000)
    monkeypatch.setattr(K, "PIECE_ROWS", 20_000)
    reserved = []
    real = K._reserve
    monkeypatch.setattr(K, "_reserve", lambda *a: reserved.append(a[1]) or real(*a))
    unique = [f"node-{i:07d}" for i in range(80_000)]
    rng = np.random.default_rng(3)
    repeats = [f"n{i}" for i in rng.integers(0, 5_000, 80_000)]
    for values, ahead in ((unique, True), (repeats, False)):
        reserved.clear()
        tail, head = values[:40_000], values[40_000:]
        ids, labels = reference(tail + head)
        ti, hi, offsets, data = K.text_ids([pa.array(tail), pa.array(head)], 40_000, threads)
        if ahead:   # after the first piece's count, again before later pieces, growing
            assert len(reserved) >= 2 and reserved == sorted(reserved)
            assert max(reserved) * _labels.N_PARTS >= len(set(values))
        else:       # only the first piece's count
            assert len(reserved) == 1
        assert np.concatenate([ti, hi]).tolist() == ids.tolist()
        assert label_arrays(offsets, data) == list(labels)


def test_room_reserved_ahead_holds_partitions_that_grew(monkeypatch):
    """Tables reserved too small (forced) grow in the kernel; room reserved ahead afterwards
    still holds the largest partition (``largest_partition``), and the ids stay exact."""
    monkeypatch.setattr(K, "_per_partition", lambda estimate: max(1, estimate // 2_000))
    monkeypatch.setattr(K, "RESERVE_FROM", 0)
    monkeypatch.setattr(K, "PIECE_ROWS", 3_000)
    values = [f"site {i}" for i in range(12_000)]
    ids, labels = reference(values)
    ti, hi, offsets, data = K.text_ids([pa.array(values[:6_000]), pa.array(values[6_000:])],
                                       6_000, 2)
    assert np.concatenate([ti, hi]).tolist() == ids.tolist()
    assert label_arrays(offsets, data) == list(labels)


def test_reserve_refuses_buffers_without_room_for_the_labels():
    """reserve checks the buffers' shapes and that every partition's labels fit (load 2/3
    at most) before it moves anything; the tables still map exactly afterwards."""
    from fastmst._kernels import _labels
    values = [f"x{i}" for i in range(3000)]
    pieces, counting, mapping = _piece_arrays(values)
    _labels.count_piece(*counting.values())
    _labels.map_piece(*mapping.values())
    P = _labels.N_PARTS

    def bufs(cap, room, labels):
        return (np.empty(2 * P * cap, np.uint64), np.empty(P * room, np.int64),
                np.empty(P * room, np.uint64), np.empty(P * room, np.int32),
                np.empty(labels, np.uint64), np.empty(labels, np.int64))
    with pytest.raises(ValueError, match="partition"):
        _labels.reserve(mapping["tables"], *bufs(4, 2, 3000), 1)       # 3000 labels in 256 parts
    with pytest.raises(ValueError, match="power of two"):
        _labels.reserve(mapping["tables"], *bufs(48, 32, 3000), 1)
    with pytest.raises(ValueError, match="at least the labels"):
        _labels.reserve(mapping["tables"], *bufs(64, 32, 2999), 1)
    _labels.reserve(mapping["tables"], *bufs(64, 32, 3000), 1)
    more = values + [f"y{i}" for i in range(100)] + values[::-1]
    pieces2, counting2, mapping2 = _piece_arrays(more)
    counting2["tables"] = mapping2["tables"] = mapping["tables"]
    _labels.count_piece(*counting2.values())
    _labels.map_piece(*mapping2.values())
    ids, labels = reference(values + more)
    assert mapping2["out"].tolist() == ids[len(values):].tolist()


def test_label_bytes_refuses_offsets_that_do_not_match_the_lengths():
    """Offsets that would copy more or fewer bytes than a label holds are refused before any
    copy (the compiled def compares them with the recorded lengths)."""
    from fastmst._kernels import _labels
    pieces, counting, args = _piece_arrays(["alpha", "be", "alpha", "gamma ray"])
    _labels.count_piece(*counting.values())
    count = _labels.map_piece(*args.values())
    good = np.empty(count + 1, dtype=np.int64)
    assert _labels.label_offsets(args["tables"], good) == 16
    assert good.tolist() == [0, 5, 7, 16]
    for threads in (1, 2):
        out = np.empty(int(good[-1]), dtype=np.uint8)
        _labels.label_bytes(args["tables"], good, out, threads)
        assert out.tobytes() == b"alphabegamma ray"
    for bad in (good + np.array([0, 1, 1, 1]), np.array([0, 2, 4, 16]), good[:-1]):
        with pytest.raises(ValueError, match="label_bytes"):
            _labels.label_bytes(args["tables"], bad, np.empty(int(bad[-1]), dtype=np.uint8), 1)
    with pytest.raises(ValueError, match="label_offsets"):
        _labels.label_offsets(args["tables"], np.empty(count, dtype=np.int64))
    with pytest.raises(ValueError, match="threads"):
        _labels.label_bytes(args["tables"], good, out, 0)

INT64 = (-2**63, 2**63 - 1)
# digits, signs, spaces, hex prefixes, other digit characters, and values at the int64 limits
int_text = st.one_of(
    st.integers(-2**64, 2**64).map(str),
    st.integers(-2**64, 2**64).map(lambda v: ("+" if v >= 0 else "") + str(v)),
    st.integers(0, 10**6).map(lambda v: "0" * 3 + str(v)),
    st.sampled_from(["", "+", "-", "+-7", " 7", "7 ", "0x10", "1e3", "7.0", "١٢", "1_000",
                     str(INT64[0]), str(INT64[1]), str(INT64[1] + 1), str(INT64[0] - 1),
                     "-0", "+0", "00"]),
    st.text(alphabet="0123456789+- x", max_size=22))


def python_integers(values):
    """Python's reading of the rule ``[+-]?[0-9]+`` within int64 (reference: Python's re and
    int), or None when a value breaks it."""
    import re
    out = []
    for v in values:
        if not re.fullmatch(r"[+-]?[0-9]+", v, flags=re.ASCII):
            return None
        n = int(v)
        if not INT64[0] <= n <= INT64[1]:
            return None
        out.append(n)
    return out


@settings(max_examples=300, deadline=None)
@given(values=st.lists(int_text, max_size=40), cuts=st.lists(st.integers(0, 60), max_size=3),
       large=st.booleans(), sliced=st.booleans(), threads=st.sampled_from([1, 2, 3]))
def test_integer_values_match_python(values, cuts, large, sliced, threads):
    """Integer labels parsed in one pass (ids="integer"): the same values as Python's int for
    every row that is ``[+-]?[0-9]+`` within int64, and None as soon as one row is not
    (spaces, hex, exponents, other digits, overflow by one)."""
    got = K.integer_values(chunked(values, cuts, large, sliced), threads)
    want = python_integers(values)
    if want is None:
        assert got is None
    else:
        assert got is not None and got.dtype == np.int64 and got.tolist() == want


def test_integer_labels_refuses_segments_that_do_not_fit():
    from fastmst._kernels import _labels
    pieces = [K._pieces(pa.array(["1", "2", "3"]))]
    seg, rows = K._segment_table(pieces, [(0, 0, 3)])
    with pytest.raises(ValueError, match="integer_labels"):
        _labels.integer_labels(seg.reshape(-1), np.empty(2, np.int64), 1)
    with pytest.raises(ValueError, match="integer_labels"):
        _labels.integer_labels(seg.reshape(-1)[:-1], np.empty(3, np.int64), 1)
    with pytest.raises(ValueError, match="threads"):
        K.integer_values([pa.array(["1"])], 0)
    out = np.empty(3, np.int64)
    assert _labels.integer_labels(seg.reshape(-1), out, 1) and out.tolist() == [1, 2, 3]
