"""Steiner trees along a network, checked against outside references.

References: an exact Dreyfus–Wagner dynamic programme written here (Dreyfus and Wagner, "The
Steiner problem in graphs", Networks 1, 1971) for the optimum on tiny graphs; the bound
2(1 - 1/l) of Kou, Markowsky and Berman, "A fast algorithm for Steiner trees" (1981) and Mehlhorn,
"A faster approximation algorithm for the Steiner problem in graphs" (1988);
networkx.algorithms.approximation.steiner_tree(method="mehlhorn"); scipy.sparse.csgraph.dijkstra
for two-terminal shortest paths and connected_components for the forest case.
"""
import itertools
import math

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from networkx.algorithms.approximation import steiner_tree as nx_steiner
from scipy import sparse
from scipy.sparse.csgraph import connected_components, dijkstra

import fastmst


def random_graph(rng, n, m, wmax=20, connected=True):
    """Random multigraph edges (a spanning path first when connected), integer-valued weights."""
    t, h = [], []
    if connected:
        perm = rng.permutation(n)
        t += perm[:-1].tolist()
        h += perm[1:].tolist()
    extra = m - len(t)
    t += rng.integers(0, n, extra).tolist()
    h += rng.integers(0, n, extra).tolist()
    w = rng.integers(0, wmax, len(t)).astype(float)
    return np.array(t), np.array(h), w


def simple_graph(t, h, w):
    """networkx graph keeping the lightest of parallel edges, without self-loops."""
    g = nx.Graph()
    g.add_nodes_from(set(t.tolist()) | set(h.tolist()))
    for a, b, c in zip(t.tolist(), h.tolist(), w.tolist()):
        if a != b and (not g.has_edge(a, b) or g[a][b]["weight"] > c):
            g.add_edge(a, b, weight=c)
    return g


def dreyfus_wagner(n, t, h, w, terms):
    """Exact Steiner tree weight (Dreyfus and Wagner 1971), for tiny graphs."""
    INF = math.inf
    d = [[INF] * n for _ in range(n)]
    for v in range(n):
        d[v][v] = 0.0
    for a, b, c in zip(t.tolist(), h.tolist(), w.tolist()):
        if c < d[a][b]:
            d[a][b] = d[b][a] = c
    for k in range(n):                           # Floyd–Warshall
        for i in range(n):
            for j in range(n):
                if d[i][k] + d[k][j] < d[i][j]:
                    d[i][j] = d[i][k] + d[k][j]
    k = len(terms)
    if k <= 1:
        return 0.0
    dp = {}
    for i, s in enumerate(terms):
        dp[1 << i] = [d[s][v] for v in range(n)]
    for size in range(2, k + 1):
        for subset in itertools.combinations(range(k), size):
            mask = sum(1 << i for i in subset)
            merge = [INF] * n
            sub = (mask - 1) & mask
            while sub:
                if sub < (mask ^ sub):           # each split once
                    a, b = dp[sub], dp[mask ^ sub]
                    for u in range(n):
                        if a[u] + b[u] < merge[u]:
                            merge[u] = a[u] + b[u]
                sub = (sub - 1) & mask
            dp[mask] = [min(merge[u] + d[u][v] for u in range(n)) for v in range(n)]
    return min(dp[(1 << k) - 1])


def check_valid(res, t, h, w, terms):
    """A forest over real edges, spanning the terminals, every leaf a terminal."""
    terms = set(np.asarray(terms).tolist())
    g = res.to_networkx()
    assert nx.is_forest(g)
    assert terms <= set(g.nodes)
    assert all(g.degree(v) >= 2 or v in terms for v in g.nodes)
    assert np.array_equal(res.tail, t[res.edges]) and np.array_equal(res.head, h[res.edges])
    assert res.weight == pytest.approx(float(w[res.edges].sum()))
    assert nx.number_connected_components(g) == res.n_trees


def test_bound_against_exact_dreyfus_wagner():
    """OPT <= weight <= ratio_bound * OPT and lower_bound <= OPT on 60 tiny random graphs."""
    rng = np.random.default_rng(5)
    hits = 0
    for trial in range(60):
        n = int(rng.integers(5, 10))
        t, h, w = random_graph(rng, n, int(rng.integers(n, 3 * n)), wmax=10)
        k = int(rng.integers(2, min(n, 6) + 1))
        terms = rng.choice(n, k, replace=False)
        res = fastmst.steiner_tree(t, h, w, terms, n_nodes=n)
        check_valid(res, t, h, w, terms)
        opt = dreyfus_wagner(n, t, h, w, terms.tolist())   # reference: exact optimum
        assert opt - 1e-9 <= res.weight <= res.ratio_bound * opt + 1e-9
        # reference: networkx's Mehlhorn is within the same bound of the exact optimum
        ref = nx_steiner(simple_graph(t, h, w), terms.tolist(), weight="weight",
                         method="mehlhorn")
        assert ref.size(weight="weight") <= res.ratio_bound * opt + 1e-9
        assert res.ratio_bound == pytest.approx(2 * (1 - 1 / k) if k > 2 else 1.0)
        assert res.lower_bound <= opt + 1e-9
        hits += res.weight == opt
    assert hits > 30          # mostly optimal on tiny graphs; not a bound, a sanity check


def test_totals_against_networkx_mehlhorn():
    """Ours is no heavier than networkx's Mehlhorn on average, and never heavier than its bound."""
    rng = np.random.default_rng(9)
    ours, theirs = [], []
    for trial in range(25):
        n = 120
        t, h, w = random_graph(rng, n, 360, wmax=50)
        w = w + 1
        terms = rng.choice(n, 15, replace=False)
        res = fastmst.steiner_tree(t, h, w, terms)
        check_valid(res, t, h, w, terms)
        # reference: networkx.algorithms.approximation.steiner_tree(method="mehlhorn")
        ref = nx_steiner(simple_graph(t, h, w), terms.tolist(), weight="weight",
                         method="mehlhorn")
        ours.append(res.weight)
        theirs.append(ref.size(weight="weight"))
        # both are within the certified ratio of our lower bound on the optimum
        assert theirs[-1] >= res.lower_bound - 1e-9
    assert np.mean(ours) <= np.mean(theirs) + 1e-9


def test_two_terminals_is_shortest_path():
    """With two terminals the result is a shortest path (scipy.sparse.csgraph.dijkstra)."""
    rng = np.random.default_rng(3)
    for trial in range(10):
        n = 200
        t, h, w = random_graph(rng, n, 700)
        w = w + rng.random(len(w))
        a, b = rng.choice(n, 2, replace=False)
        res = fastmst.steiner_tree(t, h, w, [a, b])
        # keep the lightest of parallel edges: dijkstra on the elementwise minimum
        dense = np.full((n, n), np.inf)
        np.minimum.at(dense, (t, h), w)
        np.minimum.at(dense, (h, t), w)
        dense[dense == np.inf] = 0          # weights here are > 0, so 0 means "no edge"
        # reference: scipy.sparse.csgraph.dijkstra
        ref = dijkstra(sparse.csr_array(dense), directed=False, indices=a)[b]
        assert res.weight == pytest.approx(ref, rel=1e-12)
        assert res.ratio_bound == 1.0
        check_valid(res, t, h, w, [a, b])


def test_terminals_in_different_components_give_a_forest():
    """Terminals in separate components: one tree per component, and the result says so."""
    rng = np.random.default_rng(4)
    t1, h1, w1 = random_graph(rng, 30, 80)
    t2, h2, w2 = random_graph(rng, 20, 50)
    t = np.concatenate([t1, t2 + 30])
    h = np.concatenate([h1, h2 + 30])
    w = np.concatenate([w1, w2])
    terms = np.array([1, 5, 9, 33, 40, 45, 49, 60])        # 60 is an isolated node
    res = fastmst.steiner_tree(t, h, w, terms, n_nodes=61)
    check_valid(res, t, h, w, terms)
    # reference: scipy.sparse.csgraph.connected_components of the input network
    _, lab = connected_components(sparse.coo_array((np.ones(len(t)), (t, h)), shape=(61, 61)),
                                  directed=False)
    assert res.n_trees == len(np.unique(lab[terms])) == 3
    assert not res.connected
    assert "separate components" in repr(res)
    assert res.terminal_tree.tolist() == [0, 0, 0, 1, 1, 1, 1, 2]
    # each tree alone equals the tree of its component's terminals alone
    sub = fastmst.steiner_tree(t, h, w, terms[:3], n_nodes=61)
    assert set(sub.edges.tolist()) <= set(res.edges.tolist())


def test_edge_cases():
    """No terminals, one terminal, repeats, self-loops, zero weights, parallel edges, no edges."""
    t = np.array([0, 1, 1, 2, 2, 3])
    h = np.array([1, 2, 1, 3, 3, 0])
    w = np.array([0.0, 1.0, 0.5, 4.0, 2.0, 7.0])
    assert len(fastmst.steiner_tree(t, h, w, [])) == 0
    one = fastmst.steiner_tree(t, h, w, [2, 2])
    assert len(one) == 0 and one.weight == 0.0 and one.n_trees == 1
    res = fastmst.steiner_tree(t, h, w, [0, 3, 0])
    # by hand: 0-1 (0) + 1-2 (1) + 2-3 parallel (2) = 3 < direct 3-0 (7)
    assert res.edges.tolist() == [0, 1, 4] and res.weight == 3.0
    assert res.steiner_nodes.tolist() == [1, 2]
    empty = fastmst.steiner_tree([], [], [], [0, 2], n_nodes=3)
    assert empty.n_trees == 2 and len(empty) == 0


def test_integer_weights_and_no_mutation():
    """Integer weights work; inputs are left unchanged; results are identical run to run."""
    rng = np.random.default_rng(8)
    t, h, w = random_graph(rng, 300, 1200)
    wi = w.astype(np.int64)
    copies = [a.copy() for a in (t, h, wi)]
    terms = rng.choice(300, 25, replace=False)
    a = fastmst.steiner_tree(t, h, wi, terms)
    b = fastmst.steiner_tree(t, h, wi, terms)
    assert all(np.array_equal(x, y) for x, y in zip((t, h, wi), copies))
    assert np.array_equal(a.edges, b.edges) and a.weights.dtype == np.int64
    assert a.weight == fastmst.steiner_tree(t, h, w, terms).weight


@pytest.mark.parametrize("args,exc,match", [
    (([0, 1], [1, 2], [1.0, -2.0], [0, 2]), ValueError, r"weight\[1\] = -2.0.*non-negative"),
    (([0, 1], [1, 2], [1.0, np.inf], [0, 2]), ValueError, "finite"),
    (([0, 1], [1, 2], [1.0, np.nan], [0, 2]), ValueError, "NaN"),
    (([0, 1], [1, 2], [1.0, 1.0], [0, 7]), ValueError, r"terminals\[1\] = 7"),
    (([0, 1], [1, 2], [1.0, 1.0], [0.0, 2.0]), TypeError, "integer node ids"),
    (([0, 1], [1, 2], [1.0, 1.0], [[0, 2]]), ValueError, "1-D"),
    (([0, 1], [1, 2], [1.0, 1.0], None), TypeError, "terminals is None"),
    (([0, 1], [1], [1.0, 1.0], [0]), ValueError, "one length"),
])
def test_bad_input_is_explained(args, exc, match):
    """Bad input gets a clear TypeError/ValueError."""
    with pytest.raises(exc, match=match):
        fastmst.steiner_tree(*args)


@settings(deadline=None, derandomize=True, max_examples=40)
@given(st.integers(3, 8).flatmap(lambda n: st.tuples(
    st.just(n),
    st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1), st.integers(0, 5)),
             min_size=0, max_size=20),
    st.lists(st.integers(0, n - 1), min_size=1, max_size=5))))
def test_random_small_networks(case):
    """Never crashes; always valid; within the bound of the exact optimum per component."""
    n, edges, terms = case
    t = np.array([e[0] for e in edges], dtype=np.int64)
    h = np.array([e[1] for e in edges], dtype=np.int64)
    w = np.array([e[2] for e in edges], dtype=np.float64)
    res = fastmst.steiner_tree(t, h, w, terms, n_nodes=n)
    check_valid(res, t, h, w, terms)
    _, lab = connected_components(
        sparse.coo_array((np.ones(len(t)), (t, h)), shape=(n, n)), directed=False)
    opt = 0.0
    for c in np.unique(lab[terms]):
        # reference: exact Dreyfus–Wagner per component
        opt += dreyfus_wagner(n, t, h, w, sorted({x for x in terms if lab[x] == c}))
    assert opt - 1e-9 <= res.weight <= res.ratio_bound * opt + 1e-9
    assert res.lower_bound <= opt + 1e-9
