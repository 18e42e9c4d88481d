"""Required and excluded links mean the same thing in every toolkit call: the optimum under
constraints is the required links plus the minimum spanning forest of the graph with the
required links contracted and the excluded ones removed.  Reference: that construction solved
with scipy.sparse.csgraph.minimum_spanning_tree (weights shifted to be positive, parallel
links reduced to their lightest, since SciPy sums duplicates), over hypothesis graphs."""
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from scipy.sparse import coo_array
from scipy.sparse.csgraph import connected_components, minimum_spanning_tree

import fastmst


def _find(parent, x):
    while parent[x] != x:
        parent[x] = parent[parent[x]]
        x = parent[x]
    return x


def reference(t, h, w, n, req, exc):
    """(weight of the constrained optimum, node -> contracted group) by scipy.sparse.csgraph;
    None when the required links hold a cycle."""
    parent = list(range(n))
    for p in req:
        a, b = _find(parent, t[p]), _find(parent, h[p])
        if a == b:
            return None, None
        parent[a] = b
    roots = sorted({_find(parent, v) for v in range(n)})
    gid = {r: i for i, r in enumerate(roots)}
    group = np.array([gid[_find(parent, v)] for v in range(n)])
    best = {}
    for p in range(len(t)):
        if p in req or p in exc:
            continue
        a, b = group[t[p]], group[h[p]]
        if a != b:
            key = (min(a, b), max(a, b))
            best[key] = min(best.get(key, np.inf), w[p])
    total = float(sum(w[p] for p in req))
    m = len(roots)
    if best:
        shift = 1.0 - min(best.values())
        mat = coo_array(([v + shift for v in best.values()],
                         ([k[0] for k in best], [k[1] for k in best])), shape=(m, m))
        tree = minimum_spanning_tree(mat)
        total += float(tree.sum()) - shift * tree.nnz
    return total, group


@st.composite
def constrained_graphs(draw, distinct=False):
    n = draw(st.integers(2, 9))
    e = draw(st.integers(1, 22))
    t = draw(st.lists(st.integers(0, n - 1), min_size=e, max_size=e))
    h = draw(st.lists(st.integers(0, n - 1), min_size=e, max_size=e))
    if distinct:
        w = list(draw(st.permutations(range(e))))
    else:
        w = draw(st.lists(st.integers(-5, 12), min_size=e, max_size=e))
    flags = draw(st.lists(st.sampled_from("..rx"), min_size=e, max_size=e))
    req = [i for i, f in enumerate(flags) if f == "r" and t[i] != h[i]]
    exc = [i for i, f in enumerate(flags) if f == "x"]
    return (np.array(t), np.array(h), np.array(w, dtype=np.float64), n, req, exc)


def _solve(t, h, w, n, req, exc):
    try:
        return fastmst.minimum_spanning_forest(t, h, w, n, required=req, excluded=exc)
    except ValueError as err:
        assert "form a cycle" in str(err) or "self-loop" in str(err)
        return None


@settings(max_examples=150, deadline=None)
@given(constrained_graphs())
def test_constrained_design_checks_as_optimal(g):
    """The constrained solve equals the csgraph reference, and check_forest (given the same
    constraints, or reading them from the forest) certifies it; the unconstrained optimum
    passes exactly when it keeps the constraints and costs the same."""
    t, h, w, n, req, exc = g
    f = _solve(t, h, w, n, req, exc)
    ref, _ = reference(t, h, w, n, req, exc)
    if f is None:
        assert ref is None
        return
    assert f.weight == pytest.approx(ref)
    for c in (fastmst.check_forest(t, h, w, f.edges, n, required=req, excluded=exc),
              fastmst.check_forest(t, h, w, f)):
        assert c.is_minimum and c.excess == 0.0 and c.violations.size == 0
    free = fastmst.minimum_spanning_forest(t, h, w, n)
    c = fastmst.check_forest(t, h, w, free.edges, n, required=req, excluded=exc)
    keeps = set(req) <= set(free.edges.tolist()) and not set(exc) & set(free.edges.tolist())
    assert c.missing_required.tolist() == sorted(set(req) - set(free.edges.tolist()))
    assert c.used_excluded.tolist() == sorted(set(exc) & set(free.edges.tolist()))
    if keeps and c.is_spanning:
        assert c.is_minimum == (free.weight == pytest.approx(ref))
    else:
        assert not c.is_minimum and np.isnan(c.excess)


@settings(max_examples=150, deadline=None)
@given(constrained_graphs(), st.integers(0, 2**32 - 1))
def test_swaps_keep_constraints_and_save_what_they_say(g, seed):
    """A spanning forest that keeps the constraints but is not optimal (the constrained optimum
    under shuffled weights): excess = its weight - the reference; every listed swap keeps the
    required links, adds no excluded one, and lowers the weight by exactly its saving; the
    ranked swaps name each removed link once, savings descending."""
    t, h, w, n, req, exc = g
    other = np.random.default_rng(seed).permutation(w)
    f = _solve(t, h, other, n, req, exc)
    if f is None:
        return
    ref, _ = reference(t, h, w, n, req, exc)
    c = fastmst.check_forest(t, h, w, f.edges, n, required=req, excluded=exc)
    assert c.is_forest and c.is_spanning
    given_weight = float(w[f.edges].sum())
    assert c.excess == pytest.approx(given_weight - ref)
    assert c.is_minimum == (given_weight == pytest.approx(ref))
    for a, r, s in zip(c.violations, c.replaces, c.savings):
        assert a not in exc and r not in req and s > 0
        new = [p for p in f.edges.tolist() if p != r] + [int(a)]
        chk = fastmst.check_forest(t, h, w, new, n, required=req, excluded=exc)
        assert chk.is_forest and chk.is_spanning and chk.missing_required.size == 0
        assert float(w[new].sum()) == pytest.approx(given_weight - s)
    add, rem, sav = c.best_swaps()
    assert len(set(rem.tolist())) == rem.size == len(set(c.replaces.tolist()))
    assert np.all(np.diff(sav) <= 0)
    for r, s in zip(rem, sav):
        assert s == c.savings[c.replaces == r].max()


@settings(max_examples=100, deadline=None)
@given(constrained_graphs(distinct=True))
def test_sensitivity_under_constraints_against_resolves(g):
    """Each margin, checked by re-solving under the same constraints with the weight moved
    just past it (the edge's membership flips) and just short of it (it does not); inf
    margins (required, excluded, bridges, paths of required links only) never flip."""
    t, h, w, n, req, exc = g
    f = _solve(t, h, w, n, req, exc)
    if f is None:
        return
    margin, partner = fastmst.sensitivity(t, h, w, f, return_partner=True)
    assert np.array_equal(margin, fastmst.sensitivity(t, h, w, f.edges, required=req,
                                                      excluded=exc))
    inside = set(f.edges.tolist())
    for p in range(len(t)):
        if t[p] == h[p]:
            continue
        up = p in inside                  # forest edges may rise, others must fall
        moves = [1000.0] if np.isinf(margin[p]) else [margin[p] - 0.5, margin[p] + 0.5]
        for d in moves:
            if d < 0:
                continue
            w2 = w.copy()
            w2[p] += d if up else -d
            f2 = fastmst.minimum_spanning_forest(t, h, w2, n, required=req, excluded=exc)
            flipped = (p in set(f2.edges.tolist())) != (p in inside)
            assert flipped == (not np.isinf(margin[p]) and d > margin[p]), (p, d, margin[p])
        if p in req or p in exc:
            assert np.isinf(margin[p]) and partner[p] == -1


@settings(max_examples=100, deadline=None)
@given(constrained_graphs(distinct=True), st.integers(0, 20))
def test_clusters_never_cut_required_links(g, extra):
    """k clusters of a constrained forest equal single linkage on the contracted graph
    (its csgraph minimum spanning tree with the heaviest edges cut), mapped back to sites."""
    t, h, w, n, req, exc = g
    f = _solve(t, h, w, n, req, exc)
    if f is None:
        return
    _, group = reference(t, h, w, n, req, exc)
    cuttable = len(f) - len(req)
    k = f.n_components + (extra % (cuttable + 1))
    labels = f.clusters(k=k)
    assert len(set(labels.tolist())) == k
    for p in req:
        assert labels[t[p]] == labels[h[p]]
    # reference: cut the heaviest non-required forest edges, components by csgraph
    keep = [p for p in f.edges.tolist() if p in req]
    others = sorted((p for p in f.edges.tolist() if p not in req), key=lambda p: w[p])
    keep += others[:len(others) - (k - f.n_components)]
    mat = coo_array((np.ones(len(keep)), (t[keep], h[keep])), shape=(n, n))
    _, ref = connected_components(mat, directed=False)
    pairs = {(a, b) for a, b in zip(labels.tolist(), ref.tolist())}
    assert len(pairs) == k
    with pytest.raises(ValueError, match="never cut"):
        if req:
            f.clusters(k=f.n_components + cuttable + 1)
        else:
            raise ValueError("never cut")


@settings(max_examples=80, deadline=None)
@given(constrained_graphs(), st.lists(st.tuples(st.integers(0, 8), st.integers(0, 8),
                                                st.integers(-5, 12)), min_size=1, max_size=6),
       st.data())
def test_add_edges_keeps_and_takes_constraints(g, new, data):
    """add_edges keeps the old required/excluded links and honours required/excluded new ones:
    the result equals a full constrained solve of the combined graph (csgraph reference)."""
    t, h, w, n, req, exc = g
    f = _solve(t, h, w, n, req, exc)
    if f is None:
        return
    nt = np.array([a % n for a, _, _ in new])
    nh = np.array([b % n for _, b, _ in new])
    nw = np.array([c for _, _, c in new], dtype=np.float64)
    flags = data.draw(st.lists(st.sampled_from("..rx"), min_size=len(new), max_size=len(new)))
    nreq = [i for i, x in enumerate(flags) if x == "r" and nt[i] != nh[i]]
    nexc = [i for i, x in enumerate(flags) if x == "x"]
    T, H, W = np.concatenate([t, nt]), np.concatenate([h, nh]), np.concatenate([w, nw])
    R = req + [len(t) + i for i in nreq]
    X = exc + [len(t) + i for i in nexc]
    ref, _ = reference(T, H, W, n, R, X)
    if ref is None:
        with pytest.raises(ValueError, match="cycle|self-loop"):
            f.add_edges(nt, nh, nw, required=nreq, excluded=nexc)
        return
    g2 = f.add_edges(nt, nh, nw, required=nreq, excluded=nexc)
    full = fastmst.minimum_spanning_forest(T, H, W, n, required=R, excluded=X)
    assert g2.weight == pytest.approx(ref)
    assert g2.edges.tolist() == full.edges.tolist()
    assert sorted(g2.required.tolist()) == sorted(R)
    assert sorted(g2.excluded.tolist()) == sorted(X)
    assert g2.required_excess == pytest.approx(full.required_excess)
