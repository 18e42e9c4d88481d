"""Maps of a forest over its node coordinates, drawn with matplotlib's Agg backend (no display)."""
from __future__ import annotations

import math

import numpy as np


def _segments(coords, tail, head):
    t = np.asarray(tail, dtype=np.int64)
    h = np.asarray(head, dtype=np.int64)
    return np.stack([coords[t], coords[h]], axis=1)


def plot_forest(path, edges, forest, *, title=None, subtitle=None, groups=None,
                highlight=None, dpi=150):
    """Draw the forest over the full graph (faint) and write a PNG to ``path``, atomically.

    Parameters
    ----------
    path : str or Path
        Output PNG.
    edges : fastmst.io.EdgeList
        Must carry node coordinates (a node table).
    forest : SpanningForest
    groups : (labels, names, colours), optional
        A class index per forest edge, with a legend name and colour per class.
    highlight : array of forest-edge indices, optional
        Edges drawn thick in red on top (for example the riskiest links).

    Stays readable at 100k edges: line widths shrink with the edge count and the full graph is
    drawn light grey underneath.
    """
    import matplotlib
    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt
    from matplotlib.collections import LineCollection

    from fastmst.io import _atomic

    if edges.coords is None:
        raise ValueError(f"plot: {edges.source} has no node coordinates; give a node table with "
                         f"lon/lat or x/y columns (CLI: --nodes FILE).")
    xy = edges.coords
    n_all, n_f = edges.n_edges, len(forest)
    scale = min(1.0, math.sqrt(20_000 / max(n_all, 1)))
    fig, ax = plt.subplots(figsize=(10, 8), dpi=dpi)
    ax.add_collection(LineCollection(_segments(xy, edges.tail, edges.head), colors="#b8b8b8",
                                     linewidths=0.5 * scale + 0.1, alpha=0.6, zorder=1,
                                     label=f"all {n_all:,} candidate edges"))
    fseg = _segments(xy, forest.tail, forest.head)
    if groups is None:
        ax.add_collection(LineCollection(fseg, colors="#1b4f9c", linewidths=1.4 * scale + 0.3,
                                         zorder=2, label=f"forest, {n_f:,} edges"))
    else:
        idx, names, colours = groups
        idx = np.asarray(idx)
        for k, (name, colour) in enumerate(zip(names, colours)):
            sel = idx == k
            if sel.any():
                ax.add_collection(LineCollection(fseg[sel], colors=colour,
                                                 linewidths=1.6 * scale + 0.4, zorder=2,
                                                 label=f"{name} ({int(sel.sum()):,})"))
    if highlight is not None and len(highlight):
        ax.add_collection(LineCollection(fseg[np.asarray(highlight)], colors="#d62728",
                                         linewidths=3.0, zorder=3,
                                         label=f"riskiest {len(highlight)} links"))
    if edges.n_nodes <= 20_000:
        ax.scatter(xy[:, 0], xy[:, 1], s=1.5 * scale + 0.2, c="#333333", zorder=2.5,
                   linewidths=0)
    ax.autoscale()
    if edges.geographic:
        mid = float(np.mean(xy[:, 1])) if xy.size else 0.0
        ax.set_aspect(1.0 / max(math.cos(math.radians(mid)), 0.05))
        ax.set_xlabel("longitude (degrees)")
        ax.set_ylabel("latitude (degrees)")
    else:
        ax.set_aspect("equal")
        ax.set_xlabel("x")
        ax.set_ylabel("y")
    heading = title or f"{'Maximum' if forest.maximize else 'Minimum'} spanning forest"
    ax.set_title(heading + (f"\n{subtitle}" if subtitle else ""), fontsize=11)
    ax.legend(loc="upper right", fontsize=8, framealpha=0.9)
    ax.grid(True, color="#eeeeee", linewidth=0.5, zorder=0)
    fig.tight_layout()

    def write(tmp):
        fig.savefig(tmp, format="png")
    try:
        return _atomic(path, write)
    finally:
        plt.close(fig)
