"""pairs: the one link of every node pair that the design tools consider (of parallel links,
the first under the tie rule)."""
from __future__ import annotations

import numpy as np

from fastmst._kernels.rule_order import edge_order


def cheapest_pairs(g, usable: np.ndarray):
    """The tie-rule-first usable link of every unordered node pair (no self-loops): (a, b, w,
    pos) with a < b, float64 lengths and input positions, sorted by pair.  The links are sorted by pair in position order (a stable sort, quick on
    link lists that come in runs, as grids and most files do) and only pairs with parallel
    links are ranked by the tie rule."""
    keep = np.flatnonzero(usable & (g.ktail != g.khead))
    ta, hb = g.ktail[keep], g.khead[keep]
    a = np.minimum(ta, hb).astype(np.int64)
    b = np.maximum(ta, hb).astype(np.int64)
    del ta, hb
    order = np.argsort(a * g.n_nodes + b, kind="stable")
    a, b, keep = a[order], b[order], keep[order]
    del order
    first = np.ones(a.shape[0], dtype=bool)
    first[1:] = (a[1:] != a[:-1]) | (b[1:] != b[:-1])
    heads = np.flatnonzero(first)
    if heads.size < keep.size:                  # parallel links: the tie rule's first of each
        group = np.cumsum(first) - 1
        size = np.diff(np.append(heads, keep.size))
        members = np.flatnonzero(size[group] > 1)
        sub = keep[members]                     # by pair, ascending positions within one
        ranked = edge_order(g.kweight[sub], False)
        ranked = ranked[np.argsort(group[members][ranked], kind="stable")]
        lead = np.ones(ranked.size, dtype=bool)
        gr = group[members][ranked]
        lead[1:] = gr[1:] != gr[:-1]
        keep[heads[gr[lead]]] = sub[ranked[lead]]
    keep = keep[heads]
    return a[heads], b[heads], g.weight[keep].astype(np.float64), keep
