"""shallow: trees from a central site whose routes stay within a factor of the shortest path
and whose weight stays within a factor of the minimum spanning tree."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fastmst import validation
from fastmst._kernels.treewalk import adjacency, light_shallow_walk, parent_links, tree_distances
from fastmst.design.checks import check_alpha, check_node, check_nonnegative
from fastmst.solve import minimum_spanning_forest
from fastmst.solve.totals import total

_FUNC = "light_shallow_tree"


@dataclass(frozen=True)
class ShallowTree:
    """A light approximate shortest-path tree from a root.

    Attributes
    ----------
    position : ndarray of shape (K,), dtype=int64
        The tree's links (input positions), ascending.
    reason : ndarray of shape (K,), dtype=str
        Why each link is there: ``"tree"`` (a minimum spanning tree link) or ``"shortcut"``
        (a shortest-path link grafted to keep a site's route short).
    parent : ndarray of shape (V,), dtype=int64
        Every site's next node towards the root (-1 at the root and at unreached sites).
    distance : ndarray of shape (V,), dtype=float64
        Route length from the root along the tree (inf where unreached).
    shortest : ndarray of shape (V,), dtype=float64
        Shortest-path distance from the root over all usable links (inf where unreached).
    root : int
    alpha : float
    weight : float
        Total weight of the tree's links (float64 sum).
    mst_weight : float
        Total weight of the minimum spanning tree of the root's component (float64 sum).
    unreached : int
        Sites with no usable route to the root (left out).
    """
    position: np.ndarray
    reason: np.ndarray
    parent: np.ndarray
    distance: np.ndarray
    shortest: np.ndarray
    root: int
    alpha: float
    weight: float
    mst_weight: float
    unreached: int

    def __len__(self) -> int:
        return int(self.position.shape[0])

    @property
    def stretch(self) -> np.ndarray:
        """distance / shortest per site (1 where both are 0, nan where unreached)."""
        with np.errstate(divide="ignore", invalid="ignore"):
            s = self.distance / self.shortest
        s[(self.distance == 0) & (self.shortest == 0)] = 1.0
        s[~np.isfinite(self.shortest)] = np.nan
        return s


def shortest_paths(n: int, a, b, w, root: int):
    """Dijkstra from ``root`` (scipy.sparse.csgraph.dijkstra) over links (a, b) of lengths w
    (float64; parallel links allowed).  Returns distances, parent node and parent link (index
    into a: the lightest, then the first, joining the parent) of every node, -1 at the root and
    where unreached."""
    from scipy.sparse import csr_array
    from scipy.sparse.csgraph import dijkstra
    indptr, nbr, link = adjacency(a, b, n)
    # duplicate entries stay apart (no coo -> csr summing); Dijkstra relaxes each of them
    m = csr_array((w[link], nbr, indptr), shape=(n, n))
    dist, pred = dijkstra(m, directed=True, indices=root, return_predecessors=True)
    pred = pred.astype(np.int64)
    pred[pred < 0] = -1
    return dist, pred, parent_links(indptr, nbr, link, w, pred)


def light_shallow_tree(tail, head, weight, root, *, alpha=2.0, n_nodes=None, excluded=None):
    """A light approximate shortest-path tree (Khuller, Raghavachari and Young 1995).

    Every site's route to ``root`` along the tree is at most ``alpha`` times its shortest-path
    distance, and the tree weighs at most ``1 + 2 / (alpha - 1)`` times the minimum spanning
    tree of the root's component.

    Parameters
    ----------
    tail, head, weight : array_like of shape (E,)
        The candidate links; weights (lengths, costs) must be >= 0.
    root : int
        The central site.
    alpha : float, default 2.0
        The allowed stretch, > 1: near 1 gives a shortest-path tree, large values the minimum
        spanning tree.
    n_nodes : int, optional
    excluded : array_like of int or boolean mask, optional
        Links that may not be used.

    Returns
    -------
    ShallowTree

    Notes
    -----
    The minimum spanning tree is walked depth first, relaxing each tree link on the way down
    and back up; where a site's current route exceeds ``alpha`` times its shortest-path
    distance, its shortest path from the root is grafted on (Khuller, Raghavachari and Young,
    "Balancing minimum spanning trees and shortest-path trees", Algorithmica 14, 1995,
    Theorem 1 gives both bounds).  Shortest paths come from ``scipy.sparse.csgraph.dijkstra``
    (O(E + V log V)); the walk is O(V).  Distances are float64 sums, so the stretch bound
    holds up to float64 rounding of those sums.

    Examples
    --------
    >>> from fastmst.design import light_shallow_tree
    >>> t = light_shallow_tree([0, 1, 2, 0], [1, 2, 3, 3], [1.0, 1.0, 1.0, 2.0], 0, alpha=1.4)
    >>> t.position.tolist(), t.reason.tolist(), t.distance.tolist()
    ([0, 1, 3], ['tree', 'tree', 'shortcut'], [0.0, 1.0, 2.0, 2.0])
    """
    g = validation.validate_edges(tail, head, weight, n_nodes, func=_FUNC)
    root = check_node(root, g.n_nodes, "root", _FUNC, allow_none=False)
    alpha = check_alpha(alpha, _FUNC)
    usable = np.ones(g.n_edges, dtype=bool)
    if excluded is not None:
        usable[validation.check_positions(excluded, g.n_edges, "excluded", _FUNC)] = False
    check_nonnegative(g, usable, _FUNC, "a light shallow tree")
    n = g.n_nodes
    keep = np.flatnonzero(usable & (g.ktail != g.khead))
    a = g.ktail[keep].astype(np.int64)
    b = g.khead[keep].astype(np.int64)
    w = g.weight[keep].astype(np.float64)
    dist, spt_parent, spt_link = shortest_paths(n, a, b, w, root)
    _check_no_overflow(dist, a, b, w, root, n)
    spt_pos = np.full(n, -1, dtype=np.int64)
    spt_pos[spt_link >= 0] = keep[spt_link[spt_link >= 0]]
    # the minimum spanning forest of the usable links (tie rule), its adjacency for the walk
    forest = minimum_spanning_forest(g.tail, g.head, g.weight, n,
                                     excluded=np.flatnonzero(~usable))
    fpos = np.asarray(forest.edges, dtype=np.int64)
    fa, fb = g.ktail[fpos].astype(np.int64), g.khead[fpos].astype(np.int64)
    fw = g.weight[fpos].astype(np.float64)
    indptr, adj, flink = adjacency(fa, fb, n)
    adjw = fw[flink]
    adjpos = fpos[flink]
    parent, ppos, _ = light_shallow_walk(indptr, adj, adjw, adjpos, root, dist, spt_parent,
                                         spt_pos, alpha)
    chosen = ppos >= 0
    pw = np.zeros(n, dtype=np.float64)
    pw[chosen] = g.weight[ppos[chosen]].astype(np.float64)
    distance = tree_distances(parent, pw, root)
    position = np.sort(ppos[chosen])
    in_mst = np.zeros(g.n_edges, dtype=bool)
    in_mst[fpos] = True
    reason = np.where(in_mst[position], "tree", "shortcut")
    reached = np.isfinite(dist)
    mst_links = reached[fa]
    return ShallowTree(position=position, reason=reason, parent=parent, distance=distance,
                       shortest=dist, root=root, alpha=alpha,
                       weight=total(g.weight[position]),
                       mst_weight=total(g.weight[fpos[mst_links]]),
                       unreached=int(n - np.count_nonzero(reached)))


def _check_no_overflow(dist, a, b, w, root, n) -> None:
    """A site joined to the root by links of finite cost must not look unreached because its
    distance, a float64 sum, overflowed (inf is what marks the unreached)."""
    far = np.isinf(dist)
    if not far.any():
        return
    from scipy.sparse import coo_array
    from scipy.sparse.csgraph import breadth_first_order
    fin = np.isfinite(w)
    graph = coo_array((np.ones(int(fin.sum())), (a[fin], b[fin])), shape=(n, n)).tocsr()
    reached = breadth_first_order(graph, root, directed=False, return_predecessors=False)
    lost = reached[far[reached]]
    if lost.size:
        raise ValueError(f"{_FUNC}: node {int(lost[0])} is joined to the root by links of finite "
                         f"cost, but its distance from the root exceeds the float64 range "
                         f"({lost.size} such nodes); scale the weights down (e.g. divide them "
                         f"by 1e6) and call again.")

