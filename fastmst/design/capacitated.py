"""capacitated: trees from a central site in which every subtree hanging from the root carries
at most a given demand (the Esau-Williams heuristic)."""
from __future__ import annotations

import heapq
from dataclasses import dataclass

import numpy as np

from fastmst import validation
from fastmst.design.checks import check_capacity, check_demand, check_node
from fastmst.design.pairs import cheapest_pairs
from fastmst.solve.totals import total

_FUNC = "capacitated_tree"


@dataclass(frozen=True)
class CapacitatedTree:
    """A tree from a root whose subtrees each carry at most ``capacity``.

    Attributes
    ----------
    position : ndarray of shape (K,), dtype=int64
        The tree's links (input positions), ascending.
    reason : ndarray of shape (K,), dtype=str
        ``"feeder"`` for a link from the root (one per subtree), ``"branch"`` for a link inside
        a subtree.
    subtree : ndarray of shape (V,), dtype=int64
        The subtree of every site, numbered 0.. in order of their feeder links' positions; -1
        at the root and at unserved sites.
    load : ndarray of shape (S,), dtype=float64
        Total demand of every subtree (<= capacity).
    capacity : float
    root : int
    weight : float
        Total weight of the tree's links (float64 sum).
    unserved : ndarray of shape (U,), dtype=int64
        Sites left without a route to the root: their group never reached a link from the root
        within the capacity.
    """
    position: np.ndarray
    reason: np.ndarray
    subtree: np.ndarray
    load: np.ndarray
    capacity: float
    root: int
    weight: float
    unserved: np.ndarray

    def __len__(self) -> int:
        return int(self.position.shape[0])


def _find(parent: list, x: int) -> int:
    while parent[x] != x:
        parent[x] = parent[parent[x]]
        x = parent[x]
    return x


def capacitated_tree(tail, head, weight, root, capacity, *, demand=None, n_nodes=None,
                     excluded=None):
    """A capacitated tree from ``root`` by the Esau-Williams heuristic (1966).

    Parameters
    ----------
    tail, head, weight : array_like of shape (E,)
        The candidate links and their costs; links at ``root`` are the possible feeders.
    root : int
        The central site (central office, substation, plant).
    capacity : float
        The most demand one subtree hanging from the root may carry (a feeder's capacity).
    demand : array_like of shape (V,), optional
        Demand of every site (finite, >= 0; the root's is ignored).  Default 1 per site, so
        ``capacity`` counts sites.
    n_nodes : int, optional
    excluded : array_like of int or boolean mask, optional
        Links that may not be used.

    Returns
    -------
    CapacitatedTree

    Notes
    -----
    Esau and Williams, "On teleprocessing system design, part II: a method for approximating
    the optimal network", IBM Systems Journal 5(3), 1966.  Every site starts as its own
    subtree with its cheapest link to the root as its feeder.  Repeatedly, the merge with the
    largest saving is made: for a subtree A and a link (i, j) from i in A to j in another
    subtree B whose joint demand fits the capacity, the saving is A's feeder cost minus the
    link's cost; A joins B through (i, j) and gives up its feeder.  The merges stop when no
    saving is positive.  Subtrees without any feeder (sites with no link to the root) merge
    first, cheapest link first; those still without one at the end are ``unserved``.  Ties go
    to the cheaper link, then the earlier position.  No guarantee of optimality: the
    capacitated minimum spanning tree problem is NP-hard (Papadimitriou 1978, recalled from
    memory); the tests
    report the gap to the exact optimum on small instances.

    Complexity: every subtree keeps a heap of its outgoing links; heaps merge smaller into
    larger and a global heap holds each subtree's best saving, refreshed lazily.  Each link is
    moved O(log V) times and dropped once (inside one subtree, or over capacity, which stays
    so as loads only grow): O(E log E log V) time, O(E) memory, in Python.

    Examples
    --------
    >>> from fastmst.design import capacitated_tree
    >>> # root 0, sites 1-4 in a row, each 10 from the root, 1 apart from the next
    >>> t = [0, 0, 0, 0, 1, 2, 3]
    >>> h = [1, 2, 3, 4, 2, 3, 4]
    >>> w = [10.0, 10.0, 10.0, 10.0, 1.0, 1.0, 1.0]
    >>> r = capacitated_tree(t, h, w, 0, 2)
    >>> r.position.tolist(), r.reason.tolist(), r.load.tolist(), r.weight
    ([1, 3, 4, 6], ['feeder', 'feeder', 'branch', 'branch'], [2.0, 2.0], 22.0)
    """
    g = validation.validate_edges(tail, head, weight, n_nodes, func=_FUNC)
    n = g.n_nodes
    root = check_node(root, n, "root", _FUNC, allow_none=False)
    capacity = check_capacity(capacity, _FUNC)
    dem = check_demand(demand, n, _FUNC)
    dem[root] = 0.0
    over = np.flatnonzero(dem > capacity)
    if over.size:
        v = int(over[0])
        raise ValueError(f"{_FUNC}: site {v} has demand {validation.shown(dem[v])} > capacity "
                         f"{validation.shown(capacity)}; no subtree can carry it. Raise the "
                         f"capacity or split that site's demand.")
    usable = np.ones(g.n_edges, dtype=bool)
    if excluded is not None:
        usable[validation.check_positions(excluded, g.n_edges, "excluded", _FUNC)] = False
    a, b, w, pos = cheapest_pairs(g, usable)
    at_root = (a == root) | (b == root)
    # feeders: the cheapest link of every site to the root (cheapest_pairs keeps one per pair)
    inf = float("inf")
    gate_w = [inf] * n
    gate_p = [-1] * n
    for x, y, c, p in zip(a[at_root].tolist(), b[at_root].tolist(), w[at_root].tolist(),
                          pos[at_root].tolist()):
        s = y if x == root else x
        gate_w[s], gate_p[s] = c, p
    # every subtree's heap of outgoing links (cost, position, from, to)
    heaps = [[] for _ in range(n)]
    inner = ~at_root
    for x, y, c, p in zip(a[inner].tolist(), b[inner].tolist(), w[inner].tolist(),
                          pos[inner].tolist()):
        heaps[x].append((c, p, x, y))
        heaps[y].append((c, p, y, x))
    for hp in heaps:
        heapq.heapify(hp)
    parent = list(range(n))
    load = dem.tolist()
    version = [0] * n
    branches = []

    def best(r):
        hp = heaps[r]
        while hp:
            c, p, _, j = hp[0]
            rj = _find(parent, j)
            if rj == r or load[r] + load[rj] > capacity:
                heapq.heappop(hp)        # inside the subtree, or over capacity for good
                continue
            return hp[0]
        return None

    def key(r, item):
        c, p = item[0], item[1]
        g_r = gate_w[r]
        return (0, c - g_r, c, p, r) if g_r < inf else (-1, c, c, p, r)

    queue = []
    for r in range(n):
        if r != root:
            item = best(r)
            if item is not None:
                queue.append((key(r, item), version[r], r))
    heapq.heapify(queue)
    while queue:
        k, ver, r = heapq.heappop(queue)
        if ver != version[r] or parent[r] != r:
            continue
        item = best(r)
        if item is None:
            continue
        k_now = key(r, item)
        if k_now != k:
            heapq.heappush(queue, (k_now, ver, r))
            continue
        if k[0] == 0 and k[1] >= 0:
            break                        # no merge saves anything any more
        c, p, i, j = item
        rb = _find(parent, j)
        # A = r joins B = rb through (i, j): the merged subtree keeps B's feeder
        big, small = (r, rb) if len(heaps[r]) >= len(heaps[rb]) else (rb, r)
        parent[small] = big
        for entry in heaps[small]:
            heapq.heappush(heaps[big], entry)
        heaps[small] = []
        gate_w[big], gate_p[big] = gate_w[rb], gate_p[rb]
        load[big] = load[r] + load[rb]
        version[big] += 1
        version[small] += 1
        branches.append(p)
        item = best(big)
        if item is not None:
            heapq.heappush(queue, (key(big, item), version[big], big))
    tops = np.array([_find(parent, v) for v in range(n)], dtype=np.int64)
    gate_arr = np.asarray(gate_p, dtype=np.int64)
    is_top = (tops == np.arange(n)) & (np.arange(n) != root)
    fed = is_top & (gate_arr[np.minimum(tops, n - 1)] >= 0) if n else is_top
    feeders = np.sort(gate_arr[fed])
    # subtree numbers in order of their feeders' positions
    number = np.full(n, -1, dtype=np.int64)
    fed_tops = np.flatnonzero(fed)
    number[fed_tops[np.argsort(gate_arr[fed_tops], kind="stable")]] = \
        np.arange(fed_tops.size)
    subtree = number[tops]
    subtree[root] = -1
    served = subtree >= 0
    unserved = np.flatnonzero(~served & (np.arange(n) != root))
    branch = np.asarray(branches, dtype=np.int64)
    # branches inside unserved groups are left out with their sites
    if branch.size:
        branch = branch[served[g.ktail[branch]]]
    position = np.concatenate([feeders, branch])
    reason = np.concatenate([np.full(feeders.size, "feeder"), np.full(branch.size, "branch")])
    order = np.argsort(position, kind="stable")
    position, reason = position[order], reason[order]
    loads = np.bincount(subtree[served], weights=dem[served], minlength=fed_tops.size) \
        if served.any() else np.zeros(fed_tops.size)
    wsum = total(g.weight[position])
    return CapacitatedTree(position=position, reason=reason, subtree=subtree,
                           load=loads.astype(np.float64), capacity=capacity, root=root,
                           weight=wsum, unserved=unserved)
