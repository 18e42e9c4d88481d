"""fastmst._kernels.labels.text_ids against two outside references.

References: NumPy's ``np.unique(..., return_index=True)`` (distinct labels with the index of
their first occurrence, reordered by that index: first-appearance numbering), and pyarrow's
own ``dictionary_encode`` (whose dictionary is in first-appearance order) for the same rows.
"""
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

pa = pytest.importorskip("pyarrow")

from fastmst import io  # noqa: E402
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


# short (packed into one word), exactly 8/9 bytes, long, empty, unicode, embedded NUL
label = st.one_of(st.sampled_from(["", "a", "b", "ab", "abcdefgh", "abcdefghi", "a\0", "\0",
                                   "é", "ключ", "节点-1", "x" * 40, "x" * 41]),
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
    results = [K.text_ids(col.chunks + col.chunks, len(col), t) for t in (1, 2, 3, 8)]
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
    with pytest.raises(ValueError, match="n_tail"):
        K.text_ids([pa.array(["a"])], 2, 1)
    with pytest.raises(ValueError, match="threads"):
        K.text_ids([pa.array(["a"])], 1, 0)


# --- the streaming path: LabelMapper fed batch by batch, and read_edges reading CSV ranges ----

@settings(max_examples=150, deadline=None)
@given(tail=st.lists(label, min_size=0, max_size=60), head=st.lists(label, min_size=0, max_size=60),
       cuts=st.lists(st.integers(0, 60), max_size=8), threads=st.sampled_from([1, 2, 3]),
       piece=st.sampled_from([1, 5, 1 << 22]), large=st.booleans())
def test_mapper_batches_give_the_ids_of_text_ids(tail, head, cuts, threads, piece, large,
                                                 monkeypatch_module):
    """Batches of any size (1 row up to all rows, empty ones included: repeated cuts), labels
    first seen in a head column and later in a tail, unicode: fed batch by batch, the ids
    equal the numbering of the whole columns (reference: np.unique first appearance)."""
    monkeypatch_module.setattr(K, "PIECE_ROWS", piece)
    n = min(len(tail), len(head))
    tail, head = tail[:n], head[:n]
    ids, labels = reference(tail + head)
    m = K.LabelMapper(threads)
    bounds = [0] + sorted(c % (n + 1) for c in cuts) + [n]
    typ = pa.large_string() if large else pa.string()
    for lo, hi in zip(bounds[:-1], bounds[1:]):
        m.feed([pa.array(tail[lo:hi], type=typ)], [pa.array(head[lo:hi], type=pa.string())])
    assert m.rows == (n, n)
    ti, hi, offsets, data = m.finish()
    assert ti.tolist() == ids[:n].tolist() and hi.tolist() == ids[n:].tolist()
    assert label_arrays(offsets, data) == list(labels)


def test_mapper_many_batches_match_arrow_for_every_thread_count():
    """150,000 rows over 70,000 labels in batches of 997 rows (labels first seen in the head of
    one batch and in a tail later); reference: pyarrow dictionary_encode of tail then head."""
    rng = np.random.default_rng(5)
    names = np.array([f"n{i}" if i % 3 else f"label-{i:09d}-long" for i in range(70_000)])
    t = names[rng.integers(0, 70_000, 75_000)].tolist()
    h = names[rng.integers(0, 70_000, 75_000)].tolist()
    enc = pa.chunked_array([pa.array(t), pa.array(h)]).combine_chunks().dictionary_encode()
    want = enc.indices.to_numpy()
    for threads in (1, 2, 4):
        m = K.LabelMapper(threads)
        for lo in range(0, 75_000, 997):
            m.feed([pa.array(t[lo:lo + 997])], [pa.array(h[lo:lo + 997])])
        ti, hi, offsets, data = m.finish()
        assert np.array_equal(np.concatenate([ti, hi]), want)
        assert label_arrays(offsets, data) == enc.dictionary.to_pylist()


def test_mapper_refuses_misuse():
    m = K.LabelMapper(1)
    with pytest.raises(ValueError, match="missing labels"):
        m.feed([pa.array(["a", None])], [pa.array(["b", "c"])])
    with pytest.raises(TypeError, match="string or large_string"):
        m.feed([pa.array([1])], [pa.array(["b"])])
    m.feed([pa.array(["a"])], [pa.array(["b"])])
    assert [a.tolist() for a in m.finish()[:2]] == [[0], [1]]
    with pytest.raises(ValueError, match="finished"):
        m.feed([pa.array(["a"])], [pa.array(["b"])])
    with pytest.raises(ValueError, match="threads"):
        K.LabelMapper(0)


csv_label = st.one_of(st.sampled_from(["a", "b", "n1", "x,y", 'say "hi"', "é", "ключ",
                                       "节点-1", " pad ", "x" * 30, "NA", "007", "7"]),
                      st.text(st.characters(blacklist_categories=("Cs", "Cc")), min_size=1,
                              max_size=12))


@settings(max_examples=60, deadline=None)
@given(rows=st.lists(st.tuples(csv_label, csv_label, st.integers(-5, 5)), min_size=1,
                     max_size=40),
       range_bytes=st.sampled_from([1, 7, 64, 1 << 25]), threads=st.sampled_from([1, 2]),
       tsv=st.booleans())
def test_read_edges_in_ranges_equals_the_whole_file(rows, range_bytes, threads, tsv,
                                                    tmp_path_factory, monkeypatch_module):
    """read_edges reading a CSV/TSV in ranges (down to one line per range), labels mapped range
    by range, gives the EdgeList of the whole-file read (labels quoted, with separators, quotes
    and non-ASCII text, first seen in the head column); reference: the labels' first
    appearance by np.unique, and the whole-file path of the same reader."""
    import csv

    from fastmst.io.formats import csv as csv_format
    path = tmp_path_factory.mktemp("ranges") / ("e.tsv" if tsv else "e.csv")
    with open(path, "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f, delimiter="\t" if tsv else ",", quoting=csv.QUOTE_NONNUMERIC)
        w.writerow(["tail", "head", "w"])
        w.writerows(rows)
    monkeypatch_module.setenv("OMP_NUM_THREADS", str(threads))
    monkeypatch_module.setattr(csv_format, "RANGE_BYTES", range_bytes)
    monkeypatch_module.setattr(csv_format, "RANGE_MIN_THREADS", 1)   # also on a busy machine
    fed = []
    feed = csv_format.TextLabelStream.feed
    monkeypatch_module.setattr(csv_format.TextLabelStream, "feed",
                               lambda self, t, h: (fed.append(len(t)), feed(self, t, h))[1])
    el = io.read_edges(path)
    assert sum(fed) == len(rows)          # the ranges path mapped the labels
    ids, labels = reference([r[0] for r in rows] + [r[1] for r in rows])
    assert el.tail.tolist() == ids[:len(rows)].tolist()
    assert el.head.tolist() == ids[len(rows):].tolist()
    assert el.labels.tolist() == list(labels)
    assert el.weight.tolist() == [r[2] for r in rows]
    monkeypatch_module.setattr(csv_format, "read_ranges", lambda *a, **k: None)
    whole = io.read_edges(path)
    monkeypatch_module.undo()
    for name in ("tail", "head", "weight", "labels"):
        assert np.array_equal(getattr(el, name), getattr(whole, name))
    assert el.tail.dtype == whole.tail.dtype and el.weight.dtype == whole.weight.dtype


def test_read_edges_in_ranges_falls_back_when_ranges_guess_types_differently(tmp_path,
                                                                             monkeypatch):
    """Integer weights in the first range and decimals later (so a range alone would guess
    int64, another float64): the reader reads the whole file instead, as before, and the
    weights stay exact (reference: the values written)."""
    from fastmst.io.formats import csv as csv_format
    rows = [(f"n{i}", f"n{i + 1}", str(i) if i < 50 else f"{i}.5") for i in range(100)]
    p = tmp_path / "e.csv"
    p.write_text("a,b,w\n" + "".join(f"{a},{b},{w}\n" for a, b, w in rows))
    monkeypatch.setattr(csv_format, "RANGE_BYTES", 64)
    monkeypatch.setattr(csv_format, "RANGE_MIN_THREADS", 1)
    el = io.read_edges(p)
    assert el.weight.dtype == np.float64
    assert el.weight.tolist() == [float(w) for _, _, w in rows]
    assert el.labels.tolist() == [f"n{i}" for i in range(101)]
