"""A forest or design named in a file (``check FOREST``, ``--design FILE``), and what is wrong
with it told in the file's own terms: its data rows and the sites' labels, never compact node
ids or Python calls.

A link listed twice is refused (:func:`read_forest`); a design that closes a cycle or leaves
two of its trees joinable is described by :func:`faults` (``check`` reports it) and refused by
:func:`require_spanning_forest` (``failures`` and ``backup`` analyse a spanning forest only).
"""
from __future__ import annotations

import numpy as np

import fastmst
from fastmst import io
from fastmst.cli import common


def read_forest(path, edges, opt: str) -> np.ndarray:
    """Positions of the links listed in ``path``, one per data row; a link listed twice (by
    position, or by a site pair naming the same link) is a :class:`fastmst.io.FileFormatError`
    naming both rows."""
    pos = io.read_forest_positions(path, edges, func=opt)
    order = np.argsort(pos, kind="stable")
    repeat = np.flatnonzero(pos[order][1:] == pos[order][:-1])
    if repeat.size:
        # the earliest second mention, and the row it repeats
        seconds_ = order[repeat + 1]
        k = int(np.argmin(seconds_))
        i, j = int(order[repeat[k]]), int(seconds_[k])
        raise io.FileFormatError(
            f"{opt} {path}: data rows {i + 1} and {j + 1} both name the link "
            f"{link_words(edges, int(pos[i]))}; a forest lists each link once. Drop one of the "
            f"two rows.")
    return pos


def link_words(edges, p: int) -> str:
    """Link ``p`` for a message: ``id a -- b (weight w, position p)`` in the user's labels."""
    return common.link_text(common.link_json(edges, p), edges)


def faults(edges, res) -> list:
    """(key, text) rows saying why a :class:`fastmst.ForestCheck` is not a spanning forest:
    the link that closes a cycle, the links that join two of its trees; empty when it is one."""
    rows = []
    if not res.is_forest and res.cycle >= 0:
        rows.append(("closes a cycle", f"{link_words(edges, int(res.cycle))} closes a cycle "
                                       f"with other links of the forest; drop one link of "
                                       f"that cycle"))
    crossing = np.asarray(res.crossing)
    if crossing.size:
        more = f" ({common.plural(crossing.size, 'link')} in all)" if crossing.size > 1 else ""
        rows.append(("joins two trees", f"{link_words(edges, int(crossing[0]))} joins two of "
                                        f"the forest's trees{more}; a spanning forest has one "
                                        f"tree per connected part of the network"))
    return rows


def faults_json(edges, res) -> dict:
    """:func:`faults` for JSON: ``closes_a_cycle`` (a link or None) and ``joins_trees`` (the
    count and the first few links)."""
    crossing = np.asarray(res.crossing)
    return {"closes_a_cycle": (common.link_json(edges, int(res.cycle))
                               if not res.is_forest and res.cycle >= 0 else None),
            "joins_trees": {"links": int(crossing.size),
                            "first": [common.link_json(edges, int(p))
                                      for p in crossing[:5].tolist()]}}


def require_spanning_forest(edges, design, excluded, opt: str, path) -> None:
    """Refuse (ValueError) a design that uses an excluded link or is not a spanning forest of
    the links it may use, naming the link (in labels) that shows it."""
    res = fastmst.check_forest(edges.tail, edges.head, edges.weight, design,
                               n_nodes=edges.n_nodes, excluded=excluded)
    used = np.asarray(res.used_excluded)
    if used.size:
        raise ValueError(f"{opt} {path}: the design uses {link_words(edges, int(used[0]))}, "
                         f"which --excluded excludes"
                         + (f" ({common.plural(used.size, 'such link')} in all)"
                            if used.size > 1 else "")
                         + "; drop it from the design or from the --excluded list.")
    if res.is_forest and res.is_spanning:
        return
    why = "; ".join(text for _, text in faults(edges, res))
    raise ValueError(f"{opt} {path}: not a spanning forest of {edges.source}: {why}. "
                     f"'fastmst solve' writes one; 'fastmst check' tells what a design lacks.")
