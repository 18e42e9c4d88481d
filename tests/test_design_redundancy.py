"""backup_links: the design plus its backup links has no bridge but the reported single points
(networkx.bridges); the 2-approximation of Frederickson and JaJa ("Approximation algorithms for
several graph augmentation problems", SIAM J. Computing 10(2), 1981, Theorem: cost <= 2 OPT)
costs at most twice the optimum; the LP bound is at most the optimum; exact mode
(scipy.optimize.milp) equals the optimum found by brute force over every subset of candidates."""
import itertools

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

import fastmst
from fastmst.design import backup_links
from toolkit_reference import multigraph

EPS = 1e-9


@st.composite
def graphs(draw, max_nodes=7, max_edges=13):
    n = draw(st.integers(1, max_nodes))
    m = draw(st.integers(0, max_edges))
    tail = draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    head = draw(st.lists(st.integers(0, n - 1), min_size=m, max_size=m))
    weight = draw(st.lists(st.integers(0, 5), min_size=m, max_size=m))
    excluded = draw(st.lists(st.integers(0, max(m - 1, 0)), max_size=m // 4, unique=True)) \
        if m else []
    return (np.array(tail, dtype=np.int64), np.array(head, dtype=np.int64),
            np.array(weight, dtype=np.float64), n, excluded)


def _bridge_pairs(tail, head, n, keep):
    g = multigraph(tail, head, np.zeros(len(tail)), n, keep)
    return {frozenset(e) for e in nx.bridges(g)}


def _pairs(tail, head, positions):
    return {frozenset((int(tail[p]), int(head[p]))) for p in positions}


def _check(tail, head, weight, n, excluded, r):
    usable = np.ones(len(tail), dtype=bool)
    usable[list(excluded)] = False
    in_forest = np.zeros(len(tail), dtype=bool)
    in_forest[r.forest] = True
    # single points: exactly the design links that are bridges of the candidate graph
    cand_bridges = _bridge_pairs(tail, head, n, usable)
    assert _pairs(tail, head, r.single_points) == _pairs(tail, head, r.forest) & cand_bridges
    # the design plus backups: its bridges are exactly the single points
    keep = in_forest.copy()
    keep[r.position] = True
    assert usable[r.position].all() and not in_forest[r.position].any()
    assert _bridge_pairs(tail, head, n, keep) == _pairs(tail, head, r.single_points)
    assert r.weight == pytest.approx(float(weight[r.position].sum()))


def _brute_optimum(tail, head, weight, n, excluded, forest, single):
    """Cheapest subset of usable non-forest links leaving no bridge but the single points."""
    usable = np.ones(len(tail), dtype=bool)
    usable[list(excluded)] = False
    in_forest = np.zeros(len(tail), dtype=bool)
    in_forest[forest] = True
    cand = [p for p in range(len(tail)) if usable[p] and not in_forest[p]
            and tail[p] != head[p]]
    target = _pairs(tail, head, single)
    best = np.inf
    for k in range(len(cand) + 1):
        for sub in itertools.combinations(cand, k):
            cost = float(weight[list(sub)].sum())
            if cost >= best:
                continue
            keep = in_forest.copy()
            keep[list(sub)] = True
            if _bridge_pairs(tail, head, n, keep) == target:
                best = cost
    return best, len(cand)


@settings(max_examples=50)
@given(graphs())
def test_two_approximation_lp_bound_and_exact_mode_against_brute_force(case):
    tail, head, weight, n, excluded = case
    approx = backup_links(tail, head, weight, n_nodes=n, excluded=excluded)
    _check(tail, head, weight, n, excluded, approx)
    exact = backup_links(tail, head, weight, n_nodes=n, excluded=excluded, exact=True)
    _check(tail, head, weight, n, excluded, exact)
    assert exact.optimal and exact.method == "exact"
    opt, n_cand = _brute_optimum(tail, head, weight, n, excluded, approx.forest,
                                 approx.single_points)
    if n_cand <= 10:
        assert exact.weight == pytest.approx(opt)
    else:
        opt = exact.weight      # beyond brute force, the milp optimum is the reference
    assert approx.weight <= 2 * opt + EPS
    assert approx.lower_bound <= opt + EPS
    assert exact.lower_bound <= exact.weight + EPS


@pytest.mark.parametrize("seed", range(3))
def test_grid_designs_against_milp(seed):
    """Jittered 7 x 7 grids with a random spanning tree as the design (not the optimum):
    2-edge-connected result, cost <= 2 x the milp optimum, LP bound <= optimum."""
    rng = np.random.default_rng(seed)
    k = 7
    idx = np.arange(k * k).reshape(k, k)
    t = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel()])
    h = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel()])
    w = np.round(rng.uniform(1, 10, t.size), 2)
    design = fastmst.minimum_spanning_forest(t, h, rng.random(t.size)).edges
    approx = backup_links(t, h, w, design)
    exact = backup_links(t, h, w, design, exact=True)
    _check(t, h, w, k * k, [], approx)
    _check(t, h, w, k * k, [], exact)
    assert approx.single_points.size == 0
    assert exact.lower_bound <= exact.weight + EPS
    assert exact.weight <= approx.weight + EPS <= 2 * exact.weight + 2 * EPS


def test_rejects_bad_arguments():
    t, h, w = [0, 1, 0], [1, 2, 2], [1.0, 2.0, 3.0]
    with pytest.raises(TypeError, match="exact must be True or False"):
        backup_links(t, h, w, exact="yes")
    with pytest.raises(ValueError, match="weight -3"):
        backup_links(t, h, [1.0, 2.0, -3.0])


@settings(max_examples=60)
@given(graphs(max_nodes=12, max_edges=30), st.booleans())
def test_halves_dynamic_programme_equals_the_arborescence_lp(case, random_design):
    """The dynamic programme over the halves (the arborescence step of Frederickson and JaJa)
    reaches the optimum of the halves' covering problem, solved independently by
    scipy.optimize.milp over the explicit covering matrix; the halves it picks cost exactly
    that optimum and cover every coverable design link."""
    from fastmst.design import redundancy
    from fastmst.design.checks import graph_and_design
    from fastmst.design.pairs import cheapest_pairs
    tail, head, weight, n, excluded = case
    forest = None
    if random_design:
        usable = np.ones(len(tail), dtype=bool)
        usable[list(excluded)] = False
        g = multigraph(tail, head, np.arange(len(tail))[::-1].astype(float), n, usable)
        forest = sorted(k for _, _, k in nx.minimum_spanning_edges(g, keys=True, data=False))
    d = graph_and_design(tail, head, weight, forest, n, excluded, "test")
    a, b, c, pos = cheapest_pairs(d.g, d.usable & ~d.in_forest)
    picked, covered, value, chosen_cost = redundancy._halves_cover(d, a, b, c, pos)
    indptr, edges, side = redundancy._paths(d.pnode, d.depth, d.pedge, a, b)
    need = np.zeros(d.fpos.size, dtype=bool)
    need[edges] = True
    assert covered.tolist() == need.tolist()
    half_ptr = np.empty(2 * a.size + 1, dtype=np.int64)
    half_ptr[0] = 0
    half_ptr[1::2] = indptr[:-1] + side
    half_ptr[2::2] = indptr[1:]
    cols = redundancy._exact(half_ptr, edges, np.repeat(c, 2), need)
    assert value == pytest.approx(float(np.repeat(c, 2)[cols].sum()), abs=1e-9)
    assert chosen_cost == pytest.approx(value, abs=1e-9)


@settings(max_examples=50, deadline=None)
@given(graphs(max_nodes=9, max_edges=20), st.data())
def test_infinite_cost_candidates_are_never_chosen(case, data):
    """A candidate of cost inf is not worth building: the result equals the call in which those
    links are excluded (same design given), in both modes; the LP bound stays finite (scipy's
    linprog refuses infinite costs, which once surfaced as its own error message)."""
    tail, head, weight, n, _ = case
    forest = fastmst.minimum_spanning_forest(tail, head, weight, n).edges
    others = np.setdiff1d(np.arange(tail.size), forest)
    if others.size == 0:
        return
    inf_at = np.array(data.draw(st.lists(st.sampled_from(others.tolist()), min_size=1,
                                         unique=True), label="infinite candidates"))
    w_inf = weight.copy()
    w_inf[inf_at] = np.inf
    for exact in (False, True):
        got = backup_links(tail, head, w_inf, forest, n_nodes=n, exact=exact)
        ref = backup_links(tail, head, weight, forest, n_nodes=n, excluded=inf_at, exact=exact)
        np.testing.assert_array_equal(got.position, ref.position)
        np.testing.assert_array_equal(got.single_points, ref.single_points)
        assert got.weight == ref.weight and np.isfinite(got.weight)
        assert got.lower_bound == ref.lower_bound
