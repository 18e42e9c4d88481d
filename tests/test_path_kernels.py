"""The compiled layers of the tree kernels (``fastmst._kernels._paths``, ``_treewalk``): every
specialisation of the path-maxima query (int32 and int64 tables, int32 and int64 ids) against
networkx paths in the forest, and the length checks that keep each thin ``def`` from touching
memory outside the arrays it is given."""
import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from fastmst._kernels import _paths, _treewalk
from fastmst._kernels.paths import kruskal_tree

PROFILE = dict(deadline=None, derandomize=True, max_examples=30)


def random_forest(n, seed):
    """Forest edges (tail, head) on n nodes in a random order: each node > 0 joins a random
    smaller node, a few of those links dropped so that there are several trees."""
    rng = np.random.default_rng(seed)
    parent = (rng.random(n - 1) * np.arange(1, n)).astype(np.int64)
    child = np.arange(1, n, dtype=np.int64)
    keep = rng.permutation(n - 1)[:max(0, n - 1 - n // 20)]
    order = rng.permutation(keep.size)
    return parent[keep][order], child[keep][order]


def tables(kparent, left, right, size, n, dtype):
    """The path-maxima tables, as ``paths.PathMaxIndex`` allocates them, in ``dtype``."""
    f = left.shape[0]
    g = max(n - 1, 1)
    nb = (g + _paths.BLOCK - 1) // _paths.BLOCK
    offset = np.empty(max(n + f, 1), np.int64)
    gap = np.full(g, f, np.int64)
    pre, suf = np.empty(g, np.int64), np.empty(g, np.int64)
    table = np.empty(nb.bit_length() * nb, np.int64)
    _paths.leaf_tables(kparent, left, right, size, offset, gap, pre, suf, table)
    return [a.astype(dtype) for a in (offset[:n], gap, pre, suf, table)]


@settings(**PROFILE)
@given(st.integers(2, 400), st.integers(0, 2**32 - 1), st.sampled_from([np.int32, np.int64]),
       st.sampled_from([np.int32, np.int64]))
def test_path_max_every_width_matches_networkx(n, seed, table_dtype, id_dtype):
    """path_max32 / path_max64 with either id width: the heaviest (latest in the given order)
    forest edge on the tree path, -1 across trees, -2 for a node with itself; reference: the
    path from networkx.shortest_path in the forest as an nx.Graph."""
    tail, head = random_forest(n, seed)
    kparent, left, right, size, cycle = kruskal_tree(tail, head, n)
    assert cycle == -1
    pos, gap, pre, suf, table = tables(kparent, left, right, size, n, table_dtype)
    rng = np.random.default_rng(seed + 1)
    qa = rng.integers(0, n, 200).astype(id_dtype)
    qb = rng.integers(0, n, 200).astype(id_dtype)
    out = np.empty(200, np.int64)
    run = _paths.path_max32 if table_dtype == np.int32 else _paths.path_max64
    run(pos, gap, pre, suf, table, tail.size, qa, qb, out, 2)
    g = nx.Graph()
    g.add_nodes_from(range(n))
    g.add_edges_from((int(a), int(b), {"i": i}) for i, (a, b) in enumerate(zip(tail, head)))
    for u, v, got in zip(qa.tolist(), qb.tolist(), out.tolist()):
        if u == v:
            assert got == -2
        elif not nx.has_path(g, u, v):
            assert got == -1
        else:
            path = nx.shortest_path(g, u, v)
            assert got == max(g.edges[x, y]["i"] for x, y in zip(path, path[1:]))


def i64(k):
    return np.zeros(k, np.int64)


def u8(k):
    return np.zeros(k, np.uint8)


def f64(k):
    return np.zeros(k, np.float64)


# (call, message): every call gives one array a length one short of what its kernel reads or
# writes (or two inputs that disagree); common practice, no source.
SHORT = {
    "kruskal_tree lengths": (lambda: _paths.kruskal_tree(i64(3), i64(2), i64(4), u8(4), i64(4),
                                                          i64(7), i64(3), i64(3), i64(3)),
                             "one length"),
    "kruskal_tree work": (lambda: _paths.kruskal_tree(i64(3), i64(3), i64(3), u8(4), i64(4),
                                                       i64(7), i64(3), i64(3), i64(3)),
                          "n_nodes entries"),
    "root_forest adjacency": (lambda: _paths.root_forest(i64(3), i64(3), i64(5), i64(5), i64(6),
                                                          i64(4), i64(4), i64(4), i64(4)),
                              ">= 2 F"),
    "root_forest nodes": (lambda: _paths.root_forest(i64(3), i64(3), i64(5), i64(6), i64(6),
                                                      i64(4), i64(4), i64(4), i64(3)),
                          "n_nodes"),
    "cover_paths pairs": (lambda: _paths.cover_paths(i64(4), i64(4), i64(4), i64(2), i64(1),
                                                      i64(4), u8(4), i64(4), i64(3)),
                          "qa and qb"),
    "cover_paths work": (lambda: _paths.cover_paths(i64(4), i64(4), i64(4), i64(2), i64(2),
                                                     i64(4), u8(3), i64(4), i64(3)),
                         "n_nodes entries"),
    "union_parent rank": (lambda: _paths.union_parent(i64(2), i64(2), i64(4), u8(3)),
                          "rank"),
    "leaf_tables offset": (lambda: _paths.leaf_tables(i64(7), i64(3), i64(3), i64(3), i64(6),
                                                       i64(3), i64(3), i64(3), i64(1)),
                           "too short"),
    "path_max32 out": (lambda: _paths.path_max32(*[np.zeros(3, np.int32)] * 5, 2, i64(2),
                                                  i64(2), i64(1), 1),
                       "one length"),
    "path_max64 table": (lambda: _paths.path_max64(i64(4), i64(3), i64(3), i64(3), i64(0), 3,
                                                    i64(2), i64(2), i64(2), 1),
                         "do not fit"),
    "sides_beyond": (lambda: _treewalk.sides_beyond(i64(4), i64(4), 0, i64(2), i64(4), i64(4),
                                                     i64(3), i64(4)),
                     "too short"),
    "light_shallow_walk": (lambda: _treewalk.light_shallow_walk(
        i64(4), i64(0), f64(0), i64(0), 0, f64(3), i64(3), i64(3), 2.0, f64(3), i64(3),
        i64(3), i64(3), i64(2), i64(3)), "at least n"),
    "tree_distances": (lambda: _treewalk.tree_distances(i64(4), f64(4), 0, i64(4), i64(4),
                                                         i64(4), f64(4)),
                       "too short"),
    "adjacency": (lambda: _treewalk.adjacency(i64(3), i64(3), i64(4), i64(6), i64(5)),
                  ">= 2 m"),
    "parent_links": (lambda: _treewalk.parent_links(i64(4), i64(4), i64(4), f64(2), i64(3),
                                                     i64(2)),
                     "does not match"),
}


@pytest.mark.parametrize("case", sorted(SHORT))
def test_thin_defs_refuse_short_arrays(case):
    """A thin def given an array too short for its kernel raises ValueError naming the arrays
    instead of running the kernel."""
    call, message = SHORT[case]
    with pytest.raises(ValueError, match=message):
        call()
