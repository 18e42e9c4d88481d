"""First covering links of a rooted forest's links: for single-link failures
(``fastmst.design.failures``), the replacement of every forest link.

``first_covers``
    For every forest link, the first of a list of links whose tree path holds it (Tarjan
    1982), by a disjoint set that jumps over the links already covered.

This module checks the inputs with NumPy, allocates the node records and assembles the cover
of every link; the compiled ``_replacements`` holds the kernel, behind a thin ``def`` that
takes those arrays.
"""
import operator

import numpy as np

from fastmst._kernels import _replacements
from fastmst._kernels.halves import int64_vector

# int32 words of one node's record (_replacements.pyx's walk_t: up, top, pnode, depth, cover,
# rank and two words of padding), and the word that holds the cover
_RECORD_WORDS = 8
_COVER_WORD = 4


def first_covers(pnode, pedge, depth, n_links, tail, head, ranked):
    """For every link of a rooted forest, the first of the ``ranked`` links whose tree path
    holds it (Tarjan, "Sensitivity analysis of minimum spanning trees and shortest path trees",
    Inf. Proc. Letters 14(1), 1982): each ranked link marks the not yet marked forest links on
    its path, a disjoint set (union by rank, path halving) jumping over marked ones, so every
    forest link is marked once: union by rank and path halving, O((V + Q) alpha(V)).  The
    ranked links come at random places in the tree, so the ends of the links 32 places ahead
    and their nodes' records 16 places ahead are prefetched.  Fewer than 2**31 nodes and
    ranked links.

    Parameters
    ----------
    pnode, pedge, depth : ndarray of shape (n,), dtype=int64
        The rooted forest (``paths.root_forest``): parent node, index of the link to it (into
        the forest's ``n_links`` links) and depth of every node.
    n_links : int
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Ends of every link of the graph.
    ranked : ndarray of shape (Q,), dtype=int64
        Positions (into tail/head) of links outside the forest, in priority order.

    Returns
    -------
    cover : ndarray of shape (n_links,), dtype=int64
        Position of the first covering link, -1 where none covers it.
    """
    pnode = int64_vector("first_covers", "pnode", pnode)
    pe = int64_vector("first_covers", "pedge", pedge)
    depth = int64_vector("first_covers", "depth", depth)
    rk = int64_vector("first_covers", "ranked", ranked)
    n_links = operator.index(n_links)
    n = pnode.shape[0]
    e = np.shape(tail)[0] if np.ndim(tail) else 0
    if pe.shape[0] != n or depth.shape[0] != n:
        raise ValueError("first_covers: pnode, pedge and depth must have one length.")
    if np.shape(head)[:1] != (e,):
        raise ValueError("first_covers: tail and head must have one length.")
    if n >= 2**31 - 1 or rk.shape[0] >= 2**31 - 1:
        raise ValueError(f"first_covers: at most 2**31 - 2 nodes and ranked links, received "
                         f"{n} and {rk.shape[0]}.")
    if n_links < 0:
        raise ValueError(f"first_covers: n_links must be >= 0, received {n_links}.")
    if n and (int(np.min(pnode)) < -1 or int(np.max(pnode)) >= n or int(pe.max()) >= n_links
              or int(np.min(depth)) < 0):
        raise ValueError("first_covers: parents must be -1 or nodes, links below n_links, "
                         "depths >= 0.")
    if rk.size and (int(rk.min()) < 0 or int(rk.max()) >= e):
        raise ValueError(f"first_covers: ranked positions must lie in [0, {e}).")
    if e and (min(int(np.min(tail)), int(np.min(head))) < 0 or
              max(int(np.max(tail)), int(np.max(head))) >= n):
        raise ValueError(f"first_covers: link ends must be nodes in [0, {n}).")
    records = np.empty((max(n, 1), _RECORD_WORDS), dtype=np.int32)
    bad = _replacements.first_covers(pnode, depth, tail, head, rk, records)
    if bad >= 0:
        p = int(rk[bad])
        raise ValueError(f"first_covers: the link at position {p} ({tail[p]}-{head[p]}) joins "
                         f"two trees of the forest.")
    cover = np.full(n_links, -1, dtype=np.int64)
    node_cover = records[:n, _COVER_WORD]
    has = pe >= 0
    j = node_cover[has]
    cover[pe[has]] = np.where(j >= 0, rk[np.maximum(j, 0)], -1) if rk.size else -1
    return cover
