"""The tree kernels under the design tools (fastmst._kernels.halves and
fastmst._kernels.replacements) against outside references on random forests: lowest common
ancestors against networkx (networkx.tree_all_pairs_lowest_common_ancestor), the first covering
link of every forest link against brute force over the tree paths (networkx.shortest_path in
the forest), and the halves' cheapest cover against its exact optimum (scipy.optimize.milp)."""
import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from scipy.optimize import Bounds, LinearConstraint, milp

from fastmst._kernels.halves import common_ancestors, cover_by_halves
from fastmst._kernels.replacements import first_covers


@st.composite
def forests(draw, max_nodes=14):
    """(pnode, depth, pedge) of a random rooted forest with randomly permuted node ids."""
    n = draw(st.integers(1, max_nodes))
    seed = draw(st.integers(0, 2**31))
    rng = np.random.default_rng(seed)
    parent = np.array([-1 if i == 0 or rng.random() < 0.15 else int(rng.integers(0, i))
                       for i in range(n)], dtype=np.int64)
    perm = rng.permutation(n)               # node i of the draw is node perm[i]
    pnode = np.full(n, -1, dtype=np.int64)
    has = parent >= 0
    pnode[perm[has]] = perm[parent[has]]
    depth = np.zeros(n, dtype=np.int64)
    for i in range(n):                      # parents come first in the draw's order
        if parent[i] >= 0:
            depth[perm[i]] = depth[perm[parent[i]]] + 1
    child = np.flatnonzero(pnode >= 0)
    pedge = np.full(n, -1, dtype=np.int64)
    pedge[rng.permutation(child)] = np.arange(child.size)   # forest links in a random order
    return pnode, depth, pedge, rng


def _tree_graph(pnode):
    g = nx.Graph()
    g.add_nodes_from(range(pnode.size))
    g.add_edges_from((int(v), int(pnode[v])) for v in np.flatnonzero(pnode >= 0))
    return g


def _tops(pnode):
    top = np.arange(pnode.size)
    for v in range(pnode.size):
        while pnode[top[v]] >= 0:
            top[v] = pnode[top[v]]
    return top


def _pairs_in_trees(pnode, rng, m):
    top = _tops(pnode)
    a, b = [], []
    for _ in range(m):
        u = int(rng.integers(0, pnode.size))
        same = np.flatnonzero(top == top[u])
        a.append(u)
        b.append(int(rng.choice(same)))
    return np.array(a, dtype=np.int64), np.array(b, dtype=np.int64)


@settings(max_examples=200)
@given(forests(), st.integers(0, 30))
def test_common_ancestors_match_networkx(forest, m):
    pnode, depth, pedge, rng = forest
    a, b = _pairs_in_trees(pnode, rng, m)
    got = common_ancestors(pnode, a, b)
    dg = nx.DiGraph()
    dg.add_nodes_from(range(pnode.size))
    dg.add_edges_from((int(pnode[v]), int(v)) for v in np.flatnonzero(pnode >= 0))
    for top in np.flatnonzero(pnode < 0):
        tree = dg.subgraph(nx.descendants(dg, int(top)) | {int(top)})
        k = [i for i in range(m) if a[i] in tree]
        ref = dict(nx.tree_all_pairs_lowest_common_ancestor(
            tree, root=int(top), pairs=[(int(a[i]), int(b[i])) for i in k]))
        for i in k:
            assert got[i] == ref[(int(a[i]), int(b[i]))]


def test_common_ancestors_rejects_pairs_across_trees_and_cycles():
    pnode = np.array([-1, 0, -1, 2], dtype=np.int64)
    with pytest.raises(ValueError, match="joins two trees"):
        common_ancestors(pnode, np.array([1]), np.array([3]))
    with pytest.raises(ValueError, match="cycle"):
        common_ancestors(np.array([1, 0], dtype=np.int64), np.array([0]), np.array([1]))


@settings(max_examples=200)
@given(forests(), st.integers(0, 30), st.sampled_from([np.int32, np.int64]))
def test_first_covers_match_brute_force(forest, m, dtype):
    """For every forest link, the first link (in the given order) whose tree path holds it:
    brute force over the paths of networkx.shortest_path in the forest."""
    pnode, depth, pedge, rng = forest
    n = pnode.size
    child = np.flatnonzero(pnode >= 0)
    a, b = _pairs_in_trees(pnode, rng, m)
    # the graph: the forest links (in pedge order) and then the other links
    tail = np.empty(child.size, dtype=np.int64)
    head = np.empty(child.size, dtype=np.int64)
    tail[pedge[child]] = child
    head[pedge[child]] = pnode[child]
    tail = np.concatenate([tail, a]).astype(dtype)
    head = np.concatenate([head, b]).astype(dtype)
    ranked = child.size + rng.permutation(m).astype(np.int64)
    got = first_covers(pnode, pedge, depth, child.size, tail, head, ranked)
    g = _tree_graph(pnode)
    link_of = {frozenset((int(v), int(pnode[v]))): int(pedge[v]) for v in child}
    ref = np.full(child.size, -1, dtype=np.int64)
    for p in ranked:
        path = nx.shortest_path(g, int(tail[p]), int(head[p]))
        for u, v in zip(path, path[1:]):
            k = link_of[frozenset((u, v))]
            if ref[k] < 0:
                ref[k] = p
    assert got.tolist() == ref.tolist()


def test_first_covers_rejects_links_across_trees():
    pnode = np.array([-1, 0, -1, 2], dtype=np.int64)
    depth = np.array([0, 1, 0, 1], dtype=np.int64)
    pedge = np.array([-1, 0, -1, 1], dtype=np.int64)
    tail = np.array([1, 3, 1], dtype=np.int64)
    head = np.array([0, 2, 3], dtype=np.int64)
    with pytest.raises(ValueError, match="joins two trees"):
        first_covers(pnode, pedge, depth, 2, tail, head, np.array([2], dtype=np.int64))


@settings(max_examples=150)
@given(forests(max_nodes=12), st.integers(0, 14), st.booleans())
def test_cover_by_halves_reaches_the_milp_optimum(forest, m, integer_costs):
    """The halves' cheapest cover: the value at the tree tops equals the optimum of the covering
    problem solved by scipy.optimize.milp; the chosen halves cover every coverable link, cost
    that optimum, and ``best`` names a half covering every coverable link."""
    pnode, depth, pedge, rng = forest
    n = pnode.size
    starts, tops = [], []
    for _ in range(m):
        s = int(rng.integers(0, n))
        if pnode[s] < 0:
            continue
        up = int(rng.integers(1, depth[s] + 1))
        starts.append(s)
        tops.append(depth[s] - up)
    starts = np.array(starts, dtype=np.int64)
    top_depth = np.array(tops, dtype=np.int64)
    h = starts.size
    cost = (rng.integers(0, 6, h).astype(np.float64) if integer_costs
            else rng.uniform(0, 5, h))
    tie = rng.integers(0, 4, h).astype(np.int64)
    best, total, chosen = cover_by_halves(pnode, depth, starts, top_depth, cost, tie)
    # coverage matrix: node v (its link to the parent) x half
    cover = np.zeros((n, h), dtype=bool)
    for k in range(h):
        v = int(starts[k])
        while depth[v] > top_depth[k]:
            cover[v, k] = True
            v = int(pnode[v])
    need = cover.any(axis=1)
    assert ((best >= 0) == need).all()
    assert cover[need][:, chosen].any(axis=1).all()
    opt = 0.0
    if need.any():
        res = milp(cost, constraints=LinearConstraint(cover[need].astype(float), lb=1),
                   integrality=np.ones(h), bounds=Bounds(0, 1))
        assert res.status == 0
        opt = res.fun
    assert float(total[pnode < 0].sum()) == pytest.approx(opt, abs=1e-9)
    assert float(cost[chosen].sum()) == pytest.approx(opt, abs=1e-9)
    assert all(cover[v, best[v]] for v in np.flatnonzero(need))


@settings(max_examples=200)
@given(st.integers(1, 8), st.integers(0, 40), st.integers(0, 2**31),
       st.sampled_from([np.float64, np.float32, np.int64, np.uint8]))
def test_cheapest_pairs_match_brute_force(n, m, seed, dtype):
    """The candidate of every node pair: brute force over the usable links (lightest, then the
    earliest position; -0.0 equals +0.0), pairs in ascending order."""
    from fastmst import validation
    from fastmst.design.pairs import cheapest_pairs
    rng = np.random.default_rng(seed)
    tail = rng.integers(0, n, m)
    head = rng.integers(0, n, m)
    weight = rng.integers(0, 4, m).astype(dtype)
    if dtype == np.float64 and m:
        weight[rng.random(m) < 0.3] = -0.0
    usable = rng.random(m) < 0.8
    g = validation.validate_edges(tail, head, weight, n, func="test")
    a, b, w, pos = cheapest_pairs(g, usable)
    ref = {}
    for p in range(m):
        if usable[p] and tail[p] != head[p]:
            key = (min(tail[p], head[p]), max(tail[p], head[p]))
            if key not in ref or weight[p] < weight[ref[key]]:
                ref[key] = p
    pairs = sorted(ref)
    assert list(zip(a.tolist(), b.tolist())) == [tuple(map(int, k)) for k in pairs]
    assert pos.tolist() == [ref[k] for k in pairs]
    assert w.tolist() == [float(weight[ref[k]]) for k in pairs]


@pytest.mark.parametrize("seed,n,h", [(0, 3_000, 8_000), (1, 5_000, 4_000), (2, 2_000, 12_000)])
def test_cover_by_halves_matches_the_lp_optimum_on_larger_trees(seed, n, h):
    """On trees of thousands of nodes (segment trees many levels deep, with long-lived halves
    and many removals): the cover's value equals the optimum of the covering LP solved by
    scipy.optimize.linprog (HiGHS).  The LP optimum is the integer optimum here because the
    matrix of upward paths in a rooted tree is a network matrix, hence totally unimodular
    (Schrijver, "Theory of Linear and Integer Programming", 1986, ch. 19).  Costs with many
    ties; the chosen halves cover every coverable link and cost that optimum."""
    from scipy.optimize import linprog
    from scipy.sparse import csr_array
    rng = np.random.default_rng(seed)
    parent = np.concatenate([[-1], [int(rng.integers(max(0, i - 30), i)) for i in range(1, n)]])
    depth = np.zeros(n, dtype=np.int64)
    for i in range(1, n):
        depth[i] = depth[parent[i]] + 1
    starts = rng.integers(1, n, h)
    top_depth = (rng.random(h) * depth[starts]).astype(np.int64)
    cost = rng.integers(1, 50, h) * 0.1
    tie = rng.integers(0, 1000, h)
    best, total, chosen = cover_by_halves(parent, depth, starts, top_depth, cost, tie)
    rows, cols = [], []
    for k in range(h):
        v = int(starts[k])
        while depth[v] > top_depth[k]:
            rows.append(v)
            cols.append(k)
            v = int(parent[v])
    cover = csr_array((np.ones(len(rows)), (rows, cols)), shape=(n, h))
    need = np.asarray(cover.sum(axis=1)).ravel() > 0
    assert ((best >= 0) == need).all()
    assert (cover[need][:, chosen].sum(axis=1) >= 1).all()
    res = linprog(cost, A_ub=-cover[need], b_ub=-np.ones(int(need.sum())), bounds=(0, 1),
                  method="highs")
    assert res.status == 0
    assert float(total[parent < 0].sum()) == pytest.approx(res.fun, rel=1e-9)
    assert float(cost[chosen].sum()) == pytest.approx(res.fun, rel=1e-9)
    assert need.sum() > n // 2                  # a cover that is not trivial
