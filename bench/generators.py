"""Synthetic graph families for benchmarks (seeded, so every run measures the same graphs).

Each generator returns ``(tail, head, weight, n_nodes)`` with int32 ids and float64 weights
unless stated.  The families are those users meet: uniform random graphs, road-like networks
(a jittered grid with Euclidean lengths and a planar k-nearest-neighbour graph), power-law
degree graphs, dense complete graphs, presorted input, and graphs of many components.  All data
here is synthetic.
"""
from __future__ import annotations

import numpy as np


def random_graph(n: int, m: int, seed: int = 0, weight_dtype=np.float64):
    """G(n, m) with replacement: m endpoint pairs uniform over n nodes, uniform weights.

    Self-loops and parallel edges occur, as in real edge lists.
    """
    rng = np.random.default_rng(seed)
    tail = rng.integers(0, n, m, dtype=np.int32)
    head = rng.integers(0, n, m, dtype=np.int32)
    weight = rng.random(m).astype(weight_dtype, copy=False)
    return tail, head, weight, n


def grid_graph(rows: int, cols: int, seed: int = 0):
    """4-neighbour rows x cols grid with uniform random weights (2*rows*cols - rows - cols edges)."""
    rng = np.random.default_rng(seed)
    ids = np.arange(rows * cols, dtype=np.int32).reshape(rows, cols)
    tail = np.concatenate([ids[:, :-1].ravel(), ids[:-1, :].ravel()])
    head = np.concatenate([ids[:, 1:].ravel(), ids[1:, :].ravel()])
    weight = rng.random(tail.shape[0])
    return tail, head, weight, rows * cols


def road_grid(rows: int, cols: int, seed: int = 0, keep: float = 0.8):
    """Road-like network: grid points jittered by up to 0.3 spacing, each grid link kept with
    probability ``keep`` (node degrees 0-4, mostly 2-4), weight = Euclidean length."""
    rng = np.random.default_rng(seed)
    xy = (np.stack(np.meshgrid(np.arange(cols), np.arange(rows)), -1).reshape(-1, 2)
          + rng.uniform(-0.3, 0.3, (rows * cols, 2)))
    tail, head, _, n = grid_graph(rows, cols, seed)
    mask = rng.random(tail.shape[0]) < keep
    tail, head = tail[mask], head[mask]
    weight = np.hypot(*(xy[tail] - xy[head]).T)
    return tail, head, weight, n


def knn_graph(n: int, k: int = 6, seed: int = 0):
    """Planar-ish k-nearest-neighbour graph of n uniform random points in the unit square,
    Euclidean lengths (each unordered pair once)."""
    from scipy.spatial import cKDTree
    rng = np.random.default_rng(seed)
    pts = rng.random((n, 2))
    dist, idx = cKDTree(pts).query(pts, k + 1)
    tail = np.repeat(np.arange(n, dtype=np.int64), k)
    head = idx[:, 1:].ravel()
    lo, hi = np.minimum(tail, head), np.maximum(tail, head)
    key = np.unique(lo * n + hi)
    tail, head = (key // n).astype(np.int32), (key % n).astype(np.int32)
    weight = np.hypot(*(pts[tail] - pts[head]).T)
    return tail, head, weight, n


def power_law_graph(n: int, m: int, seed: int = 0, exponent: float = 2.5):
    """Chung-Lu style graph: endpoints drawn with probability proportional to a power-law
    expected degree (exponent ``exponent``), uniform weights.  Hubs, many parallel edges."""
    rng = np.random.default_rng(seed)
    wdeg = (np.arange(1, n + 1, dtype=np.float64)) ** (-1.0 / (exponent - 1.0))
    cdf = np.cumsum(wdeg)
    cdf /= cdf[-1]
    tail = np.searchsorted(cdf, rng.random(m)).astype(np.int32)
    head = np.searchsorted(cdf, rng.random(m)).astype(np.int32)
    perm = rng.permutation(n).astype(np.int32)  # hubs at random ids
    return perm[tail], perm[head], rng.random(m), n


def complete_graph(n: int, seed: int = 0):
    """Dense complete graph on n nodes (n*(n-1)/2 edges), uniform weights."""
    rng = np.random.default_rng(seed)
    tail, head = np.triu_indices(n, 1)
    return tail.astype(np.int32), head.astype(np.int32), rng.random(tail.shape[0]), n


def presorted_graph(n: int, m: int, seed: int = 0):
    """A random graph whose edges are listed in non-decreasing weight (presorted=True)."""
    tail, head, weight, n = random_graph(n, m, seed)
    order = np.argsort(weight, kind="stable")
    return tail[order], head[order], weight[order], n


def components_graph(n: int, m: int, parts: int, seed: int = 0):
    """``parts`` disjoint random graphs of n/parts nodes each (a forest of many trees)."""
    rng = np.random.default_rng(seed)
    size = max(1, n // parts)
    block = rng.integers(0, parts, m, dtype=np.int32)
    tail = block * size + rng.integers(0, size, m, dtype=np.int32)
    head = block * size + rng.integers(0, size, m, dtype=np.int32)
    return tail, head, rng.random(m), size * parts


FAMILIES = {
    "random": random_graph,
    "grid": grid_graph,
    "road": road_grid,
    "knn": knn_graph,
    "power-law": power_law_graph,
    "complete": complete_graph,
    "presorted": presorted_graph,
    "components": components_graph,
}
