"""bottleneck queries against networkx brute force; single_linkage and clusters against
scipy.cluster.hierarchy."""
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from scipy.cluster.hierarchy import fcluster, linkage
from scipy.spatial.distance import pdist

import fastmst
from toolkit_reference import canonical, minimax, small_graphs, tree_path_positions

PROFILE = dict(deadline=None, derandomize=True, max_examples=100)


@settings(**PROFILE)
@given(small_graphs(), st.booleans())
def test_bottleneck_matches_networkx_minimax(graph, maximize):
    """For every node pair, the value equals the minimax (maximin when maximizing) path value
    over the whole graph found by brute force with networkx.has_path on thresholded graphs, and
    the position is the tie-rule-heaviest edge on the tree path (networkx shortest_path in the
    forest)."""
    tail, head, weight, n = graph
    f = fastmst.minimum_spanning_forest(tail, head, weight, n, maximize=maximize)
    a, b = np.meshgrid(np.arange(n), np.arange(n), indexing="ij")
    value, position = f.bottleneck(a, b)
    assert value.shape == (n, n) and position.shape == (n, n)
    assert value.dtype == np.float64 and position.dtype == np.int64
    for u in range(n):
        for v in range(n):
            assert value[u, v] == minimax(tail, head, weight, n, u, v, maximize)
            path = tree_path_positions(tail, head, f.edges, n, u, v)
            if not path:                           # same node or different components
                assert position[u, v] == -1
                continue
            key = (lambda q: (-weight[q], q)) if maximize else (lambda q: (weight[q], q))
            assert position[u, v] == max(path, key=key)


def test_bottleneck_conventions_and_bad_input():
    """Hand-solved two-component graph: inf/-1 across components, -inf/-1 for a node with
    itself (reversed for a maximum forest); scalars work; ids out of range are errors."""
    tail, head, weight = [0, 1, 3], [1, 2, 4], [2.0, 5.0, 1.0]
    f = fastmst.minimum_spanning_forest(tail, head, weight)
    w, p = f.bottleneck([0, 0, 2, 3], [2, 3, 2, 4])
    assert w.tolist() == [5.0, np.inf, -np.inf, 1.0] and p.tolist() == [1, -1, -1, 2]
    w, p = f.bottleneck(0, 1)
    assert w.shape == () and float(w) == 2.0 and int(p) == 0
    g = fastmst.minimum_spanning_forest(tail, head, weight, maximize=True)
    w, p = g.bottleneck([0, 0, 2], [2, 3, 2])
    assert w.tolist() == [2.0, -np.inf, np.inf] and p.tolist() == [0, -1, -1]
    with pytest.raises(ValueError, match=r"node id 5 .* expected ids in \[0, 5\)"):
        f.bottleneck([0], [5])
    with pytest.raises(ValueError, match=r"node id -1"):
        f.bottleneck([-1], [0])
    with pytest.raises(TypeError, match="dtype float64; expected integer node ids"):
        f.bottleneck([0.5], [1])
    with pytest.raises(ValueError, match="one shape"):
        f.bottleneck([0, 1], [0, 1, 2])


def test_bottleneck_many_queries_against_networkx():
    """A 300-node random graph with tied weights, 2000 random pairs: values checked against the
    networkx brute-force minimax on a sample."""
    rng = np.random.default_rng(3)
    n, m = 300, 900
    tail, head = rng.integers(0, n, m), rng.integers(0, n, m)
    weight = rng.integers(0, 50, m).astype(np.float64)
    f = fastmst.minimum_spanning_forest(tail, head, weight, n)
    a, b = rng.integers(0, n, 2000), rng.integers(0, n, 2000)
    value, position = f.bottleneck(a, b)
    ok = position >= 0
    assert np.array_equal(value[ok], weight[position[ok]])
    for i in range(0, 2000, 50):
        assert value[i] == minimax(tail, head, weight, n, int(a[i]), int(b[i]))


def _points_forest(points):
    n = len(points)
    i, j = np.triu_indices(n, 1)
    d = pdist(points)                      # same pair order as triu_indices
    return fastmst.minimum_spanning_forest(i, j, d, n)


@settings(deadline=None, derandomize=True, max_examples=40)
@given(st.integers(2, 40), st.integers(0, 10**6))
def test_single_linkage_matches_scipy(n, seed):
    """On random points (distinct distances almost surely) the linkage matrix equals
    scipy.cluster.hierarchy.linkage(points, method="single") -- ids, heights and sizes -- and
    fcluster gives the same partitions as SpanningForest.clusters (Gower and Ross, "Minimum
    spanning trees and single linkage cluster analysis", 1969, for the equivalence)."""
    pts = np.random.default_rng(seed).random((n, 2))
    f = _points_forest(pts)
    z = fastmst.single_linkage(f)
    ref = linkage(pts, method="single")
    assert z.shape == ref.shape == (n - 1, 4)
    assert np.array_equal(z[:, [0, 1, 3]], ref[:, [0, 1, 3]])
    assert np.allclose(z[:, 2], ref[:, 2], rtol=1e-12, atol=0)
    for k in range(1, n + 1):
        want = canonical(fcluster(ref, k, criterion="maxclust"))
        assert canonical(f.clusters(k=k)) == want
        assert canonical(fcluster(z, k, criterion="maxclust")) == want
    for t in np.quantile(ref[:, 2], [0.1, 0.5, 0.9]).tolist():
        assert canonical(f.clusters(threshold=t)) == canonical(fcluster(ref, t, "distance"))


def test_single_linkage_disconnected_and_ties():
    """Hand-solved: two components are joined last at height inf (fcluster still works); tied
    heights keep the tie-rule order; an empty forest of one node gives a 0x4 matrix."""
    tail, head, weight = [0, 2, 1], [1, 3, 4], [1.0, 1.0, 2.0]
    f = fastmst.minimum_spanning_forest(tail, head, weight, 6)
    z = fastmst.single_linkage(f)
    assert z.tolist() == [[0, 1, 1.0, 2], [2, 3, 1.0, 2], [4, 6, 2.0, 3],
                          [7, 8, np.inf, 5], [5, 9, np.inf, 6]]
    # scipy.cluster.hierarchy.fcluster on our matrix, with k clusters = 3 components.
    assert canonical(fcluster(z, 3, "maxclust")) == canonical(f.clusters(k=3))
    assert f.clusters(k=3).tolist() == [0, 0, 1, 1, 0, 2]
    assert f.clusters(k=6).tolist() == [0, 1, 2, 3, 4, 5]
    assert fastmst.single_linkage(fastmst.minimum_spanning_forest([], [], [], 1)).shape == (0, 4)


def test_clusters_maximum_forest():
    """For a maximum forest (similarities) the lightest links are cut; threshold cuts links
    below it (hand-solved path 0-1-2-3 with similarities 9, 1, 5)."""
    f = fastmst.minimum_spanning_forest([0, 1, 2], [1, 2, 3], [9, 1, 5], maximize=True)
    assert f.clusters(k=2).tolist() == [0, 0, 1, 1]
    assert f.clusters(k=3).tolist() == [0, 0, 1, 2]
    assert f.clusters(threshold=5).tolist() == [0, 0, 1, 1]
    assert f.clusters(threshold=6).tolist() == [0, 0, 1, 2]
    with pytest.raises(ValueError, match="maximum spanning forest"):
        fastmst.single_linkage(f)


def test_clusters_and_linkage_bad_input():
    """k outside n_components..n_nodes, both or neither of k/threshold, NaN threshold, negative
    heights and wrong types are clear errors."""
    f = fastmst.minimum_spanning_forest([0, 1], [1, 2], [1.0, 2.0], 4)   # 2 components
    with pytest.raises(ValueError, match=r"k = 0 is out of range; expected 2 <= k <= 4"):
        f.clusters(k=0)
    with pytest.raises(ValueError, match=r"k = 5 is out of range"):
        f.clusters(k=5)
    with pytest.raises(ValueError, match="already has 2 connected components"):
        f.clusters(k=1)
    with pytest.raises(TypeError, match="k must be an integer"):
        f.clusters(k=2.0)
    with pytest.raises(ValueError, match="exactly one of k"):
        f.clusters()
    with pytest.raises(ValueError, match="exactly one of k"):
        f.clusters(k=2, threshold=1.0)
    with pytest.raises(ValueError, match="threshold is NaN"):
        f.clusters(threshold=float("nan"))
    g = fastmst.minimum_spanning_forest([0], [1], [-1.0])
    with pytest.raises(ValueError, match="heights must be >= 0"):
        fastmst.single_linkage(g)
    with pytest.raises(TypeError, match="expected a SpanningForest"):
        fastmst.single_linkage(np.zeros((3, 4)))


def test_textbook_example_graph():
    """The 9-node example graph of Cormen, Leiserson, Rivest and Stein, "Introduction to
    Algorithms" (3rd ed., 2009, Fig. 23.1); edge list and MST weight 37 recalled from memory and
    cross-checked here with networkx.minimum_spanning_tree.  The design certifies, and the
    bottleneck values are those of the tree paths (worked by hand on the figure)."""
    import networkx as nx
    names = "abcdefghi"
    links = [("a", "b", 4), ("a", "h", 8), ("b", "h", 11), ("b", "c", 8), ("h", "i", 7),
             ("h", "g", 1), ("i", "c", 2), ("i", "g", 6), ("c", "d", 7), ("c", "f", 4),
             ("g", "f", 2), ("d", "f", 14), ("d", "e", 9), ("e", "f", 10)]
    tail = np.array([names.index(u) for u, _, _ in links])
    head = np.array([names.index(v) for _, v, _ in links])
    weight = np.array([w for _, _, w in links], dtype=np.float64)
    g = nx.Graph()
    g.add_weighted_edges_from(links)
    assert nx.minimum_spanning_tree(g).size(weight="weight") == 37
    f = fastmst.minimum_spanning_forest(tail, head, weight)
    assert f.weight == 37.0 and fastmst.check_forest(tail, head, weight, f).is_minimum
    w, _ = f.bottleneck([names.index("a")] * 3, [names.index(x) for x in "egb"])
    assert w.tolist() == [9.0, 8.0, 4.0]
    assert fastmst.single_linkage(f)[-1, 2] == 9.0


def test_bottleneck_long_paths_many_blocks():
    """A 4000-node sparse random graph (long tree paths spanning many 32-gap blocks of the
    range-maximum index): the heaviest edge on 150 random tree paths equals the one found by
    walking the networkx shortest path in the forest (networkx.shortest_path)."""
    import networkx as nx
    rng = np.random.default_rng(21)
    n, m = 4000, 5200
    tail, head = rng.integers(0, n, m), rng.integers(0, n, m)
    weight = rng.random(m)
    f = fastmst.minimum_spanning_forest(tail, head, weight, n)
    g = nx.Graph()
    g.add_nodes_from(range(n))
    for p in f.edges.tolist():
        g.add_edge(int(tail[p]), int(head[p]), position=p)
    a, b = rng.integers(0, n, 150), rng.integers(0, n, 150)
    value, position = f.bottleneck(a, b)
    longest = 0
    for u, v, w, p in zip(a.tolist(), b.tolist(), value.tolist(), position.tolist()):
        if u == v or not nx.has_path(g, u, v):
            assert p == -1
            continue
        path = nx.shortest_path(g, u, v)
        longest = max(longest, len(path))
        on = [g.edges[x, y]["position"] for x, y in zip(path, path[1:])]
        assert p == max(on, key=lambda q: weight[q]) and w == weight[p]
    assert longest > 20
    # The pairs lie far apart in the index's leaf order, so the sparse table over blocks is used.
    from fastmst.toolkit.pathmax import forest_merge_tree
    pos = forest_merge_tree(f).index.pos
    assert (np.abs(pos[a] - pos[b]) > 3 * 32).sum() > 50


def test_forest_pickles_after_queries():
    """A forest that has cached its merge tree (after bottleneck) still pickles, e.g. to go to
    a worker process, and answers the same afterwards (reference: the answers before)."""
    import pickle
    rng = np.random.default_rng(4)
    tail, head, weight = rng.integers(0, 500, 2000), rng.integers(0, 500, 2000), rng.random(2000)
    f = fastmst.minimum_spanning_forest(tail, head, weight, 500)
    a, b = rng.integers(0, 500, 1000), rng.integers(0, 500, 1000)
    before = f.bottleneck(a, b)
    g = pickle.loads(pickle.dumps(f))
    after = g.bottleneck(a, b)
    assert all(np.array_equal(x, y) for x, y in zip(before, after))
    assert np.array_equal(fastmst.single_linkage(g), fastmst.single_linkage(f))
