"""Exact references for the network-design tests and the design benchmark, written from the
textbook formulations and solved with scipy.optimize.milp (HiGHS)."""
import numpy as np
from scipy.optimize import Bounds, LinearConstraint, milp
from scipy.sparse import coo_array


def capacitated_optimum(tail, head, weight, n, root, capacity, demand):
    """Optimal capacitated tree cost by the single-commodity flow formulation (Gavish, "Formula-
    tions and algorithms for the capacitated minimal directed tree problem", J. ACM 30, 1983;
    recalled from memory): arc variables y (binary) and flows f >= 0; one arc into every site, flow conservation with
    the site's demand, f <= Q y on arcs out of the root and f <= (Q - d_u) y on arcs out of a
    site u.  Every demand must be > 0 (then the chosen arcs form a tree).  None if infeasible."""
    t = np.asarray(tail, dtype=np.int64)
    h = np.asarray(head, dtype=np.int64)
    c = np.asarray(weight, dtype=np.float64)
    keep = t != h
    t, h, c = t[keep], h[keep], c[keep]
    src = np.concatenate([t, h])
    dst = np.concatenate([h, t])
    cost = np.concatenate([c, c])
    ok = dst != root
    src, dst, cost = src[ok], dst[ok], cost[ok]
    a = src.size
    d = np.asarray(demand, dtype=np.float64).copy()
    d[root] = 0.0
    sites = [v for v in range(n) if v != root]
    rows, cols, vals = [], [], []
    lo, hi = [], []
    r = 0
    for v in sites:                              # one arc into every site
        for k in np.flatnonzero(dst == v):
            rows.append(r), cols.append(k), vals.append(1.0)
        lo.append(1.0), hi.append(1.0)
        r += 1
    for v in sites:                              # flow in - flow out = demand
        for k in np.flatnonzero(dst == v):
            rows.append(r), cols.append(a + k), vals.append(1.0)
        for k in np.flatnonzero(src == v):
            rows.append(r), cols.append(a + k), vals.append(-1.0)
        lo.append(d[v]), hi.append(d[v])
        r += 1
    for k in range(a):                           # f <= cap y
        cap = capacity if src[k] == root else capacity - d[src[k]]
        rows += [r, r]
        cols += [a + k, k]
        vals += [1.0, -cap]
        lo.append(-np.inf), hi.append(0.0)
        r += 1
    A = coo_array((vals, (rows, cols)), shape=(r, 2 * a)).tocsr()
    res = milp(np.concatenate([cost, np.zeros(a)]),
               constraints=LinearConstraint(A, lo, hi),
               integrality=np.concatenate([np.ones(a), np.zeros(a)]),
               bounds=Bounds(np.zeros(2 * a), np.concatenate([np.ones(a),
                                                             np.full(a, capacity)])))
    return float(res.fun) if res.status == 0 else None


def complete_instance(n, seed):
    """Random points in the unit square, every pair a link with its Euclidean length."""
    rng = np.random.default_rng(seed)
    xy = rng.random((n, 2))
    i, j = np.triu_indices(n, 1)
    return i, j, np.hypot(*(xy[i] - xy[j]).T), xy
