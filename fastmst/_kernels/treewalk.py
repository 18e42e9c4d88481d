"""Walks over a rooted spanning forest and CSR adjacency, for the network-design tools
(``fastmst.design``).

``sides_beyond``
    For every tree edge (parent, child): the number of nodes on the side away from a chosen
    root (the child's subtree, or the rest of the tree when the root lies inside that
    subtree).  O(V): nodes bucketed by depth, subtree sizes summed deepest first.
``light_shallow_walk``
    The depth-first walk of Khuller, Raghavachari and Young, "Balancing minimum spanning trees
    and shortest-path trees", Algorithmica 14 (1995): walk round the minimum spanning tree
    relaxing its edges; where a node's current distance exceeds alpha times its shortest-path
    distance, graft its shortest path from the root.  O(V) after the two input trees.
``tree_distances``, ``adjacency``, ``parent_links``
    Distances from the root along the tree, links listed under both ends, the link to each
    node's shortest-path parent.

This module is the Python layer (checks of shapes and value ranges, allocation, results); the
compiled kernels are in ``_treewalk.pyx``.  The covering kernels of backup links are in
``halves``, the first covering links of single-link failures in ``replacements``.  Inputs are
int64 (node ids, parents, CSR offsets) and float64 (lengths, distances).
"""
import operator

import numpy as np

from fastmst._kernels import _treewalk


def sides_beyond(pnode, depth, root):
    """Nodes beyond every tree edge, seen from ``root``.

    Parameters
    ----------
    pnode, depth : ndarray of shape (n,), dtype=int64
        Parent (-1 at tree tops) and depth of every node (``paths.root_forest``).
    root : int
        A node, or -1: every edge is then seen from the top of its tree.

    Returns
    -------
    beyond : ndarray of shape (n,), dtype=int64
        For node ``v`` with a parent: the number of nodes on the far side of the edge
        (pnode[v], v) from ``root`` (from the tree's top in trees without ``root``); 0 at tops.
    top : ndarray of shape (n,), dtype=int64
        The top of every node's tree (a tree label).
    size : ndarray of shape (n,), dtype=int64
        Number of nodes in every node's subtree (its tree's size at tops).
    """
    root = operator.index(root)
    n = pnode.shape[0]
    if depth.shape[0] != n:
        raise ValueError(f"sides_beyond: pnode and depth must have one length, received {n} "
                         f"and {depth.shape[0]}.")
    if root < -1 or root >= n:
        raise ValueError(f"sides_beyond: root must be -1 or a node in [0, {n}), received {root}.")
    dmax = int(np.max(depth)) if n else 0
    if n and int(np.min(depth)) < 0:
        raise ValueError("sides_beyond: depths must be >= 0.")
    start = np.empty(dmax + 2, dtype=np.int64)
    order = np.empty(max(n, 1), dtype=np.int64)
    size = np.empty(max(n, 1), dtype=np.int64)
    top = np.empty(max(n, 1), dtype=np.int64)
    beyond = np.empty(max(n, 1), dtype=np.int64)
    _treewalk.sides_beyond(pnode, depth, root, start, order, size, top, beyond)
    return beyond[:n], top[:n], size[:n]


def light_shallow_walk(indptr, adj, adjw, adjpos, root, dist, spt_parent, spt_pos, alpha):
    """The light approximate shortest-path tree walk (Khuller, Raghavachari and Young 1995).

    Parameters
    ----------
    indptr, adj, adjw, adjpos : ndarray
        The spanning tree of the root's component as CSR adjacency (both directions): node
        ``u``'s neighbours are ``adj[indptr[u]:indptr[u + 1]]``, with lengths ``adjw`` and the
        input positions ``adjpos`` of the edges.
    root : int
    dist : ndarray of shape (n,), dtype=float64
        Shortest-path distances from ``root`` (inf outside its component).
    spt_parent, spt_pos : ndarray of shape (n,), dtype=int64
        Parent node and edge position of every node in a shortest-path tree (-1 at the root).
    alpha : float
        Allowed stretch, > 1.

    Returns
    -------
    parent, ppos : ndarray of shape (n,), dtype=int64
        Parent node and parent edge position in the result tree (-1 at the root and outside
        its component).
    d : ndarray of shape (n,), dtype=float64
        The walk's distance bound of every node (>= its distance in the result tree).
    """
    root = operator.index(root)
    n = dist.shape[0]
    if indptr.shape[0] != n + 1:
        raise ValueError(f"light_shallow_walk: indptr must have n + 1 = {n + 1} entries, "
                         f"received {indptr.shape[0]}.")
    if adj.shape[0] != adjw.shape[0] or adj.shape[0] != adjpos.shape[0] or \
            adj.shape[0] < indptr[n]:
        raise ValueError("light_shallow_walk: adj, adjw and adjpos must have one length, at "
                         "least indptr[-1].")
    if spt_parent.shape[0] != n or spt_pos.shape[0] != n:
        raise ValueError("light_shallow_walk: spt_parent and spt_pos need one entry per node.")
    if root < 0 or root >= n:
        raise ValueError(f"light_shallow_walk: root must be a node in [0, {n}), received {root}.")
    if not alpha > 1.0:
        raise ValueError(f"light_shallow_walk: alpha must be > 1, received {alpha}.")
    d = np.empty(n, dtype=np.float64)
    parent = np.empty(n, dtype=np.int64)
    ppos = np.empty(n, dtype=np.int64)
    tparent = np.empty(n, dtype=np.int64)
    stack = np.empty(n, dtype=np.int64)
    cursor = np.empty(n, dtype=np.int64)
    _treewalk.light_shallow_walk(indptr, adj, adjw, adjpos, root, dist, spt_parent, spt_pos,
                                 alpha, d, parent, ppos, tparent, stack, cursor)
    return parent, ppos, d


def tree_distances(parent, pw, root):
    """Distances from ``root`` down a tree given by parent pointers.

    Parameters
    ----------
    parent : ndarray of shape (n,), dtype=int64
        Parent of every node (-1 at the root and at nodes outside the tree); must form a tree
        rooted at ``root`` (nodes whose parent chain does not reach ``root`` stay at inf).
    pw : ndarray of shape (n,), dtype=float64
        Length of the link to the parent.
    root : int

    Returns
    -------
    dist : ndarray of shape (n,), dtype=float64
        Sum of link lengths from ``root`` (inf where not reached), added from the root down.
    """
    root = operator.index(root)
    n = parent.shape[0]
    if pw.shape[0] != n:
        raise ValueError("tree_distances: parent and pw must have one length.")
    if root < 0 or root >= n:
        raise ValueError(f"tree_distances: root must be a node in [0, {n}), received {root}.")
    if n and (int(np.min(parent)) < -1 or int(np.max(parent)) >= n):
        raise ValueError("tree_distances: parents must be -1 or nodes.")
    if parent[root] != -1:
        raise ValueError("tree_distances: the root's parent must be -1.")
    start = np.empty(n + 1, dtype=np.int64)
    child = np.empty(max(n, 1), dtype=np.int64)
    queue = np.empty(max(n, 1), dtype=np.int64)
    dist = np.empty(n, dtype=np.float64)
    _treewalk.tree_distances(parent, pw, root, start, child, queue, dist)
    return dist


def adjacency(a, b, n_nodes):
    """Both directions of every link as CSR adjacency, by counting (O(V + E)).

    Parameters
    ----------
    a, b : ndarray of shape (m,), dtype=int64
        Link ends, node ids in [0, n_nodes).
    n_nodes : int

    Returns
    -------
    indptr : ndarray of shape (n_nodes + 1,), dtype=int64
    nbr, link : ndarray of shape (2 m,), dtype=int64
        Node ``u``'s neighbours ``nbr[indptr[u]:indptr[u + 1]]`` and the index (into ``a``)
        of the link to each, in link order.
    """
    n_nodes = operator.index(n_nodes)
    m = a.shape[0]
    if b.shape[0] != m:
        raise ValueError("adjacency: a and b must have one length.")
    if n_nodes < 0:
        raise ValueError(f"adjacency: n_nodes must be >= 0, received {n_nodes}.")
    if m and (min(int(np.min(a)), int(np.min(b))) < 0 or
              max(int(np.max(a)), int(np.max(b))) >= n_nodes):
        raise ValueError(f"adjacency: node ids must lie in [0, {n_nodes}).")
    indptr = np.empty(n_nodes + 1, dtype=np.int64)
    nbr = np.empty(2 * m, dtype=np.int64)
    link = np.empty(2 * m, dtype=np.int64)
    _treewalk.adjacency(a, b, indptr, nbr, link)
    return indptr, nbr, link


def parent_links(indptr, nbr, link, w, pred):
    """For every node with a parent ``pred[v]`` (>= 0), the lightest link (the smallest index
    among equal lengths) joining it to that parent; -1 elsewhere.

    ``indptr``, ``nbr``, ``link`` as returned by :func:`adjacency`; ``w`` the links' lengths.
    """
    n = pred.shape[0]
    if indptr.shape[0] != n + 1 or nbr.shape[0] != link.shape[0] or \
            nbr.shape[0] < indptr[n] or w.shape[0] * 2 != nbr.shape[0]:
        raise ValueError("parent_links: the adjacency does not match pred and w.")
    if n and (int(np.max(pred)) >= n or int(np.min(pred)) < -1):
        raise ValueError("parent_links: parents must be -1 or nodes.")
    out = np.empty(n, dtype=np.int64)
    _treewalk.parent_links(indptr, nbr, link, w, pred, out)
    return out
