"""Cross-check every method against each other and against SciPy/networkx on graph families
larger and more varied than the unit tests (not part of CI; run by hand).

    python bench/crosscheck.py [--scale 1.0]

For each family: every method in fastmst.METHODS must return identical `edges`; the total must
equal scipy.sparse.csgraph.minimum_spanning_tree's on a simple, zero-free version of the graph
(SciPy sums parallel edges and drops zeros, so its input is made simple first: the lightest copy
of each pair is kept, weights are shifted to be positive); families small enough are also checked
against networkx's Kruskal on the full multigraph.
"""
import argparse
import time

import networkx as nx
import numpy as np
from scipy.sparse import coo_array
from scipy.sparse.csgraph import minimum_spanning_tree

import fastmst


def grid(rows, cols, rng, weights="int"):
    idx = np.arange(rows * cols).reshape(rows, cols)
    t = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel()])
    h = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel()])
    w = rng.integers(0, 10, t.size).astype(np.float64) if weights == "int" else rng.random(t.size)
    return t, h, w, rows * cols


def power_law(n, m_per_node, rng):
    # Preferential attachment by sampling endpoints from the list of earlier endpoints.
    t = np.repeat(np.arange(1, n), m_per_node)
    ends = np.empty(2 * t.size, np.int64)
    h = np.empty(t.size, np.int64)
    k = 0
    for i, v in enumerate(t):
        h[i] = ends[rng.integers(0, k)] if k and rng.random() < 0.8 else rng.integers(0, v)
        ends[k], ends[k + 1] = v, h[i]
        k += 2
    return t, h, rng.random(t.size), n


def families(scale, rng):
    n = int(200_000 * scale)
    m = 5 * n
    yield "random G(n,m)", rng.integers(0, n, m), rng.integers(0, n, m), rng.random(m), n
    yield "random int ties", rng.integers(0, n, m), rng.integers(0, n, m), \
        rng.integers(0, 5, m).astype(np.float32), n
    side = int(400 * scale ** 0.5)
    yield "grid int weights", *grid(side, side, rng)
    yield "grid float weights", *grid(side, side, rng, "float")
    yield "power law", *power_law(int(30_000 * scale), 3, rng)
    k = int(600 * scale ** 0.5)
    iu, iv = np.triu_indices(k, 1)
    yield "dense complete", iu, iv, rng.random(iu.size), k
    yield "star", np.zeros(n - 1, np.int64), np.arange(1, n), rng.integers(0, 3, n - 1), n
    p = np.arange(n - 1)
    yield "long path", p, p + 1, rng.random(n - 1), n
    blocks = 5000
    bt = rng.integers(0, 20, m) + 20 * rng.integers(0, blocks, m)
    bh = (bt // 20) * 20 + rng.integers(0, 20, m)
    yield "many components", bt, bh, rng.random(m), blocks * 30
    w = np.sort(rng.integers(-50, 50, m)).astype(np.int64)
    t, h = rng.integers(0, n, m), rng.integers(0, n, m)
    yield "presorted int64", t, h, w, n
    yield "reverse sorted", t, h, w[::-1].copy(), n
    yield "all weights equal", t, h, np.ones(m), n
    yield "zero/neg/inf", t, h, rng.choice([-np.inf, -1.0, 0.0, -0.0, 2.0, np.inf], m), n


def scipy_simple_total(t, h, w, n, forest):
    """SciPy's total on a simple zero-free graph equivalent for the minimum forest."""
    w = np.asarray(w, dtype=np.float64)
    if not np.isfinite(w).all():
        return None
    keep = t != h
    t, h, w = t[keep], h[keep], w[keep]
    a, b = np.minimum(t, h), np.maximum(t, h)
    order = np.lexsort((w, b, a))
    a, b, w = a[order], b[order], w[order]
    first = np.ones(a.size, bool)
    first[1:] = (a[1:] != a[:-1]) | (b[1:] != b[:-1])
    a, b, w = a[first], b[first], w[first]
    shift = 1.0 - w.min() if w.size else 0.0
    total = float(minimum_spanning_tree(coo_array((w + shift, (a, b)), shape=(n, n)).tocsr()).sum())
    return total - shift * len(forest)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--scale", type=float, default=1.0)
    args = ap.parse_args()
    rng = np.random.default_rng(2026)
    failures = 0
    for name, t, h, w, n in families(args.scale, rng):
        t0 = time.perf_counter()
        forests = {mx: [fastmst.minimum_spanning_forest(t, h, w, n, method=m, maximize=mx)
                        for m in fastmst.METHODS] for mx in (False, True)}
        same = all(np.array_equal(f.edges, fs[0].edges) for fs in forests.values() for f in fs)
        f = forests[False][0]
        ref = scipy_simple_total(t, h, w, n, f)
        ok_scipy = ref is None or abs(ref - f.weight) <= 1e-6 * max(1.0, abs(ref))
        ok_nx = True
        if t.size <= 20_000:
            g = nx.MultiGraph()
            g.add_nodes_from(range(n))
            g.add_weighted_edges_from(zip(t.tolist(), h.tolist(), np.asarray(w, float).tolist()))
            nx_total = sum(d["weight"] for *_, d in nx.minimum_spanning_edges(g, data=True))
            ok_nx = nx_total == f.weight or abs(nx_total - f.weight) <= 1e-9 * abs(nx_total)
        ok = same and ok_scipy and ok_nx
        failures += not ok
        print(f"{'ok  ' if ok else 'FAIL'} {name:20s} E={t.size:>9,d} comps={f.n_components:>7,d} "
              f"methods-identical={same} scipy={'n/a' if ref is None else ok_scipy} "
              f"networkx={'n/a' if t.size > 20_000 else ok_nx} ({time.perf_counter() - t0:.1f}s)")
    raise SystemExit(1 if failures else 0)


if __name__ == "__main__":
    main()
