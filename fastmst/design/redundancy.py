"""redundancy: the cheapest extra links that keep a tree design connected after any single link
failure (weighted tree augmentation to 2-edge-connectivity)."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fastmst import validation
from fastmst._kernels.halves import common_ancestors, cover_by_halves
from fastmst.design.checks import check_nonnegative, graph_and_design
from fastmst.design.pairs import cheapest_pairs
from fastmst.solve.totals import total

_FUNC = "backup_links"
#: Largest number of candidate links the exact mode (scipy.optimize.milp) accepts.
EXACT_LIMIT = 5_000
#: Largest coverage matrix (links x tree links on their paths) the LP bound is built for.
LP_LIMIT = 20_000_000


@dataclass(frozen=True)
class BackupLinks:
    """Backup links for a tree design.

    Attributes
    ----------
    forest : ndarray of shape (F,), dtype=int64
        The design's links (input positions).
    position : ndarray of shape (K,), dtype=int64
        The chosen backup links (input positions), ascending.
    weight : float
        Total weight of the backup links (float64 sum).
    lower_bound : float or None
        A certified lower bound on the cheapest possible set of backup links: the value of a
        feasible dual solution of the LP relaxation (None when not computed).
    optimal : bool
        True in exact mode: ``weight`` is the optimum.
    single_points : ndarray of shape (S,), dtype=int64
        Design links that no candidate link can back up (bridges of the candidate graph): they
        stay single points of failure.
    method : str
        ``"frederickson-jaja"`` (2-approximation) or ``"exact"``.
    """
    forest: np.ndarray
    position: np.ndarray
    weight: float
    lower_bound: float | None
    optimal: bool
    single_points: np.ndarray
    method: str

    def __len__(self) -> int:
        return int(self.position.shape[0])


def _paths(pnode, depth, pedge, a, b):
    """For every link (a[k], b[k]) in one tree: the indices (into the forest) of the tree links
    on its path, as CSR (indptr, edges), and how many of them lie on a[k]'s side of the
    lowest common ancestor (the first ``side[k]`` of its entries)."""
    indptr = np.zeros(a.size + 1, dtype=np.int64)
    side = np.zeros(a.size, dtype=np.int64)
    out = []
    pn, dp, pe = pnode.tolist(), depth.tolist(), pedge.tolist()
    for k, (u, v) in enumerate(zip(a.tolist(), b.tolist())):
        left, right = [], []
        while dp[u] > dp[v]:
            left.append(pe[u])
            u = pn[u]
        while dp[v] > dp[u]:
            right.append(pe[v])
            v = pn[v]
        while u != v:
            left.append(pe[u])
            right.append(pe[v])
            u, v = pn[u], pn[v]
        side[k] = len(left)
        out += left
        out += right
        indptr[k + 1] = len(out)
    return indptr, np.asarray(out, dtype=np.int64), side


def _halves_cover(d, a, b, c, pos):
    """Frederickson and JaJa's reduction, solved exactly by dynamic programming over the tree.

    Every candidate (u, v) splits into its two halves, u up to the lowest common ancestor w
    (``halves.common_ancestors``) and v up to w, each at the candidate's full cost; the
    cheapest set of halves covering every coverable tree link is a minimum-cost arborescence of
    their digraph and costs at most twice the optimum (the two halves of each optimal candidate
    are one such set).

    The halves covering a tree link (v, parent) all start below v and run up the one path to
    the root, so their coverage above v is nested.  With f(v) the cheapest cover of v's subtree
    and its link to the parent, and r(v, h) the cheapest such cover that contains half h, minus
    the children's sum S(v) = sum f(c): r(v, h) = cost(h) for a half starting at v, and
    r(c, h) + S(c) - f(c) for one from child c; f(v) = S(v) + min r(v, h) over the halves still
    above v.  Taken in a depth-first postorder, the halves starting in v's subtree are one range
    of a segment tree's leaves, which gives the least r and subtracts f(v) - S(v) from the
    range (``fastmst._kernels.halves.cover_by_halves``): O((V + H) log H) for H halves.  The
    choice is rebuilt from the top down.

    Returns (indices of the chosen candidates, boolean per forest link: coverable, the
    optimum of the halves' covering, the cost of the halves chosen).
    """
    pnode, depth = d.pnode, d.depth
    w = common_ancestors(pnode, a, b)
    starts, tops, link = [], [], []
    for side in (a, b):
        keep = side != w
        starts.append(side[keep])
        tops.append(w[keep])
        link.append(np.flatnonzero(keep))
    starts = np.concatenate(starts).astype(np.int64)
    link = np.concatenate(link).astype(np.int64)
    cost = np.ascontiguousarray(c[link], dtype=np.float64)
    tie = np.ascontiguousarray(pos[link], dtype=np.int64)   # the earlier candidate first
    best, total, chosen = cover_by_halves(pnode, depth, starts,
                                          depth[np.concatenate(tops)].astype(np.int64), cost,
                                          tie)
    value = float(total[pnode < 0].sum())
    covered = np.zeros(d.fpos.shape[0], dtype=bool)
    child = np.flatnonzero(pnode >= 0)
    covered[d.pedge[child]] = best[child] >= 0
    picked = np.zeros(a.shape[0], dtype=bool)
    picked[link[chosen]] = True
    return np.flatnonzero(picked), covered, value, float(cost[chosen].sum())


def _lp_bound(indptr, edges, c, needed):
    """Certified lower bound of the LP relaxation min c x, A x >= 1 (needed rows), 0 <= x <= 1,
    from the dual solution of scipy.optimize.linprog (HiGHS): y >= 0 from its marginals and
    z = max(0, A^T y - c) make a feasible dual, whose value sum(y) - sum(z) bounds the LP and
    so the optimum from below, whatever the solver's tolerances."""
    from scipy.optimize import linprog
    A, rows = _matrix(indptr, edges, needed)
    if rows.size == 0:
        return 0.0
    res = linprog(c, A_ub=-A, b_ub=-np.ones(rows.size), bounds=(0, 1), method="highs")
    if res.status != 0:
        return None
    y = np.maximum(-np.asarray(res.ineqlin.marginals, dtype=np.float64), 0.0)
    z = np.maximum(A.T @ y - c, 0.0)
    return float(max(y.sum() - z.sum(), 0.0))


def _matrix(indptr, edges, needed):
    """The coverage matrix (needed tree links x candidate links) as CSR, and the row ids."""
    from scipy.sparse import csr_array
    rows = np.flatnonzero(needed)
    remap = np.full(needed.size, -1, dtype=np.int64)
    remap[rows] = np.arange(rows.size)
    col = np.repeat(np.arange(indptr.size - 1), np.diff(indptr))
    r = remap[edges]
    keep = r >= 0
    A = csr_array((np.ones(int(keep.sum())), (r[keep], col[keep])),
                  shape=(rows.size, indptr.size - 1))
    A.sum_duplicates()
    A.data[:] = 1.0
    return A, rows


def _exact(indptr, edges, c, needed):
    """The optimum by scipy.optimize.milp (HiGHS branch and bound): indices of the links."""
    from scipy.optimize import Bounds, LinearConstraint, milp
    A, rows = _matrix(indptr, edges, needed)
    if rows.size == 0:
        return np.empty(0, dtype=np.int64)
    res = milp(c, constraints=LinearConstraint(A, lb=np.ones(rows.size), ub=np.inf),
               integrality=np.ones(c.size), bounds=Bounds(0, 1))
    if res.status != 0:
        raise ValueError(f"{_FUNC}: the exact solver stopped without an optimum "
                         f"({res.message}).")
    return np.flatnonzero(res.x > 0.5)


def backup_links(tail, head, weight, forest=None, *, n_nodes=None, excluded=None, exact=False,
                 lower_bound=True):
    """Cheapest extra links so that a tree design survives any single link failure.

    Parameters
    ----------
    tail, head, weight : array_like of shape (E,)
        Candidate links and their costs (>= 0; a link of cost ``inf`` is never chosen).
    forest : SpanningForest, or array_like of int or boolean mask of shape (E,), optional
        The design: a spanning forest of the usable links.  Default: the minimum spanning
        forest of the usable links.
    n_nodes : int, optional
    excluded : array_like of int or boolean mask, optional
        Links that may not be used.
    exact : bool, default False
        Find the optimum with ``scipy.optimize.milp`` (at most ``EXACT_LIMIT`` candidate
        links): an NP-hard problem, for small instances.  Otherwise the 2-approximation.
    lower_bound : bool, default True
        Compute the certified LP lower bound (``scipy.optimize.linprog``).

    Returns
    -------
    BackupLinks

    Notes
    -----
    The design plus the backup links is 2-edge-connected within each tree of the design, apart
    from the ``single_points`` that no candidate covers.  A candidate link (u, v) backs up the
    design links on the tree path from u to v; the problem is weighted tree augmentation.  The
    2-approximation is that of Frederickson and JaJa, "Approximation algorithms for several
    graph augmentation problems", SIAM J. Computing 10(2), 1981: each candidate becomes two
    arcs from the lowest common ancestor of its ends down to each end, tree links point to
    the root, and a minimum-cost arborescence picks links whose cost is at most twice the
    optimum.  Here that arborescence is found as its equivalent: the cheapest covering of the
    tree links by the candidates' halves (each end up to the common ancestor), solved exactly
    by a dynamic programme over the tree with a segment tree (O(E log E), in a kernel, after
    the lowest common ancestors by Tarjan's offline algorithm, also in a kernel).  Of several
    parallel candidates only the cheapest (the earliest position among equal costs) is
    considered.

    Running time: the lower bound and the exact mode walk every candidate's tree path in Python
    (their total length L) and HiGHS solves a problem with L nonzeros: for thousands to tens of
    thousands of sites.  With ``lower_bound=False`` the 2-approximation alone scales to
    millions of sites.
    """
    exact = validation.check_bool(exact, "exact", _FUNC)
    lower_bound = validation.check_bool(lower_bound, "lower_bound", _FUNC)
    d = graph_and_design(tail, head, weight, forest, n_nodes, excluded, _FUNC)
    g = d.g
    check_nonnegative(g, d.usable, _FUNC, "backup link selection")
    # a link of infinite cost is never worth building: as in the shallow and capacitated
    # trees, it is not a candidate (what only it could back up is a single point)
    cand = d.usable & ~d.in_forest
    if g.weight.dtype.kind == "f":
        cand &= g.weight != np.inf
    a, b, c, pos = cheapest_pairs(g, cand)
    if exact and a.size > EXACT_LIMIT:
        raise ValueError(f"{_FUNC}: exact=True takes at most {EXACT_LIMIT} candidate links, "
                         f"this graph has {a.size}; use exact=False (the 2-approximation with "
                         f"its lower bound).")
    bound = None
    if exact or lower_bound:
        indptr, edges, side = _paths(d.pnode, d.depth, d.pedge, a, b)
        covered_edge = np.zeros(d.fpos.size, dtype=bool)
        covered_edge[edges] = True
        if edges.size <= LP_LIMIT:
            bound = _lp_bound(indptr, edges, c, covered_edge)
    if exact:
        chosen = np.sort(pos[_exact(indptr, edges, c, covered_edge)])
        method = "exact"
    else:
        picked, covered_edge, _, _ = _halves_cover(d, a, b, c, pos)
        chosen = np.sort(pos[picked])
        method = "frederickson-jaja"
    single_mask = np.zeros(g.n_edges, dtype=bool)             # ascending positions, no sort
    single_mask[d.fpos[~covered_edge]] = True
    single = np.flatnonzero(single_mask)
    wsum = total(g.weight[chosen])
    return BackupLinks(forest=np.flatnonzero(d.in_forest), position=chosen, weight=wsum,
                       lower_bound=bound if lower_bound else None, optimal=exact,
                       single_points=single, method=method)
