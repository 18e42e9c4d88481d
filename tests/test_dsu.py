"""DisjointSet against a brute-force model of set membership."""
import numpy as np
import pytest
from hypothesis import given, strategies as st

from fastmst import DisjointSet


@given(st.integers(1, 40), st.lists(st.tuples(st.integers(0, 39), st.integers(0, 39)),
                                    max_size=80))
def test_against_brute_force_sets(n, ops):
    """Every query agrees with an explicit list-of-sets model after each union."""
    ops = [(a % n, b % n) for a, b in ops]
    ds = DisjointSet(n)
    model = [{i} for i in range(n)]
    owner = list(range(n))
    for a, b in ops:
        expect_merge = owner[a] != owner[b]
        assert ds.union(a, b) == expect_merge
        if expect_merge:
            keep, drop = owner[a], owner[b]
            model[keep] |= model[drop]
            for x in model[drop]:
                owner[x] = keep
            model[drop] = set()
        assert ds.connected(a, b)
        assert ds.set_size(a) == len(model[owner[a]])
        assert ds.n_sets == sum(1 for s in model if s)
    for x in range(n):
        for y in range(n):
            assert ds.connected(x, y) == (owner[x] == owner[y])
        assert owner[ds.find(x)] == owner[x]
    labels = ds.labels()
    assert labels.dtype == np.int64
    first_seen = {}
    for x in range(n):
        first_seen.setdefault(owner[x], len(first_seen))
        assert labels[x] == first_seen[owner[x]]


@given(st.integers(1, 30), st.lists(st.tuples(st.integers(0, 29), st.integers(0, 29)),
                                    max_size=60))
def test_union_pairs_matches_sequential_unions(n, ops):
    """The batch union reports exactly the merges that one-by-one unions report."""
    a = np.array([x % n for x, _ in ops], dtype=np.int64)
    b = np.array([y % n for _, y in ops], dtype=np.int64)
    seq = DisjointSet(n)
    expect = [seq.union(int(x), int(y)) for x, y in zip(a, b)]
    batch = DisjointSet(n)
    got = batch.union_pairs(a, b)
    assert got.dtype == bool and got.tolist() == expect
    assert batch.n_sets == seq.n_sets
    assert batch.labels().tolist() == seq.labels().tolist()


def test_path_compression_repoints_every_node_on_the_path():
    """After find, every node on the walked path points straight at the root."""
    ds = DisjointSet(6)
    # Build a chain 5 -> 4 -> ... by unions of equal-rank singletons onto a growing root.
    for i in range(5):
        ds.union(i, i + 1)
    root = ds.find(5)
    parent = ds._parent
    assert all(parent[i] == root for i in range(6))
    assert parent.dtype == np.int32


def test_errors_and_empty():
    """Bad sizes raise TypeError/ValueError naming the problem."""
    with pytest.raises(TypeError, match="n must be an integer"):
        DisjointSet(2.0)
    with pytest.raises(ValueError, match="n must be >= 0"):
        DisjointSet(-1)


@pytest.mark.parametrize("n", [2**40, 2**62, 2**70, np.int64(2**62)])
def test_huge_n_is_refused_before_allocating(n):
    """n beyond this machine's memory (or any address space) is a ValueError that says how
    much it would need, raised before the arrays are allocated (a MemoryError or a numpy
    'array is too big' error would come from the allocation)."""
    with pytest.raises(ValueError, match=r"DisjointSet\(n\): n=\d+ elements would need .* GiB"):
        DisjointSet(n)


def test_element_errors_and_empty():
    """Bad elements raise TypeError/ValueError naming the problem; n=0 is a valid empty set."""
    ds = DisjointSet(3)
    with pytest.raises(ValueError, match=r"x=3 is out of range; expected 0 <= x < 3"):
        ds.find(3)
    with pytest.raises(TypeError, match="a must be an integer"):
        ds.union("0", 1)
    with pytest.raises(ValueError, match=r"b\[0\] = 9 is out of range"):
        ds.union_pairs([0], [9])
    with pytest.raises(TypeError, match="must hold integers"):
        ds.union_pairs([0.5], [1])
    empty = DisjointSet(0)
    assert empty.n_sets == 0 and empty.labels().shape == (0,) and len(empty) == 0
