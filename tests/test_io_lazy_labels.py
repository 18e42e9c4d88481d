"""Text labels kept as the reader's pyarrow array (EdgeList.labels made on first use) and
numeric columns of several chunks copied from pyarrow's pool: checked against NumPy's own
indexing and concatenation (reference: NumPy)."""
from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

pa = pytest.importorskip("pyarrow")

from fastmst import io  # noqa: E402
from fastmst.io.columns import to_numpy  # noqa: E402
from fastmst.io.edgelist import EdgeList  # noqa: E402

WORDS = st.lists(st.text(min_size=1, max_size=6), min_size=1, max_size=60, unique=True)


@settings(max_examples=60, deadline=None)
@given(words=WORDS, data=st.data())
def test_label_of_arrow_labels_matches_numpy_indexing(words, data):
    """label(ids) over a pyarrow label array equals NumPy indexing of the same labels (any
    shape, negative ids counted from the end, out-of-range ids an IndexError as in NumPy)."""
    n = len(words)
    ids = np.array(data.draw(st.lists(st.integers(-n, n - 1), max_size=12)), dtype=np.int64)
    shape = data.draw(st.sampled_from([(ids.size,), (1, ids.size)]))
    ids = ids.reshape(shape)
    ref = np.array(words, dtype=object)
    zeros = np.zeros(2, dtype=np.int32)

    def fresh():   # labels not yet made (label() takes few from the Arrow array, many from all)
        return EdgeList(zeros, zeros, np.zeros(2), n, pa.array(words, type=pa.large_string()))
    got = fresh().label(ids)
    assert got.shape == ref[ids].shape and got.tolist() == ref[ids].tolist()
    assert "labelled=True" in repr(fresh())
    bad = data.draw(st.sampled_from([n, n + 5, -n - 1]))
    with pytest.raises(IndexError):
        ref[np.array([bad])]
    with pytest.raises(IndexError):
        fresh().label([bad])
    el = fresh()
    # the full labels: a NumPy object array equal to the words, made once
    assert isinstance(el.labels, np.ndarray) and el.labels.dtype == object
    assert el.labels.tolist() == words and el.labels is el.labels
    assert el.label(ids).tolist() == ref[ids].tolist()


def test_read_edges_labels_are_numpy_text(tmp_path):
    """read_edges of text labels: labels in first-appearance order as a NumPy object array
    (reference: the order written, tail column then head column)."""
    p = tmp_path / "e.csv"
    p.write_text("tail,head,weight\nb,a,1\nc,b,2\nd,a,3\n")
    el = io.read_edges(p)
    assert el.label([0, 3]).tolist() == ["b", "a"]
    assert el.labels.dtype == object and el.labels.tolist() == ["b", "c", "d", "a"]
    assert el.tail.tolist() == [0, 1, 2] and el.head.tolist() == [3, 0, 3]


@settings(max_examples=60, deadline=None)
@given(dtype=st.sampled_from(["int8", "int32", "int64", "uint64", "float32", "float64"]),
       sizes=st.lists(st.integers(0, 40), min_size=2, max_size=6), seed=st.integers(0, 99))
def test_to_numpy_of_chunks_matches_numpy_concatenate(dtype, sizes, seed):
    """A numeric column of several chunks: the values of np.concatenate of its chunks, same
    dtype, writable (reference: NumPy)."""
    rng = np.random.default_rng(seed)
    parts = [(rng.random(k) * 100).astype(dtype) for k in sizes]
    got = to_numpy(pa.chunked_array([pa.array(a) for a in parts], type=pa.from_numpy_dtype(
        np.dtype(dtype))))
    ref = np.concatenate(parts)
    assert got.dtype == ref.dtype and np.array_equal(got, ref) and got.flags.writeable


def test_reading_text_labels_does_not_import_pandas(tmp_path):
    """Two CSV files (text labels; ids that look like integers, read as text) read in a new
    interpreter without importing pandas: pyarrow passes Python scalars and to_numpy calls
    through its pandas shim, which imports pandas when it is installed (0.35 s measured on the
    first read of a process); read_edges avoids those calls.  The values read are checked
    after."""
    import subprocess
    import sys
    text = tmp_path / "t.csv"
    text.write_text("from,to,cost\nA,B,1.5\nB,C,2\nC,A,0.25\n")
    ints = tmp_path / "i.csv"
    ints.write_text("tail,head,weight\n3,4,1\n4,5,2\n")
    code = (
        "import sys\n"
        "from fastmst import io\n"
        f"e = io.read_edges({str(text)!r})\n"
        f"f = io.read_edges({str(ints)!r})\n"
        "print('pandas' in sys.modules)\n"
        "assert e.tail.tolist() == [0, 1, 2] and e.weight.tolist() == [1.5, 2.0, 0.25]\n"
        "assert e.label([0, 2]).tolist() == ['A', 'C']\n"
        "assert f.weight.tolist() == [1, 2] and f.label([0]).tolist() == ['3']\n")
    import os

    import fastmst
    root = os.path.dirname(os.path.dirname(os.path.abspath(fastmst.__file__)))  # as imported
    env = dict(os.environ, PYTHONPATH=os.pathsep.join(
        [root] + [p for p in os.environ.get("PYTHONPATH", "").split(os.pathsep) if p]))
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                       cwd=tmp_path, env=env, timeout=120)
    assert r.returncode == 0, r.stderr
    assert r.stdout.strip() == "False"
