"""Maps of a forest over its node coordinates, drawn with matplotlib's Agg backend (no display).

:func:`plot_forest` is the public entry point; its docstring holds the legend.  Layout: the
figure's height follows the data's aspect (longitude shrunk by cos(latitude) for lon/lat), the
legend sits outside the map on the right and matplotlib's constrained layout keeps every label,
tick label and legend entry inside the figure at any extent (``tests/test_plot.py`` checks
this).  Large graphs (over :data:`DENSE_EDGES` candidate links) draw the candidates as a grey
density image and the forest with thin translucent lines, so 600k links stay readable.
"""
from __future__ import annotations

import math
import textwrap

import numpy as np

from fastmst.geometry.geodesy import EARTH_RADIUS_M, haversine_m
from fastmst.io import atomic_write

#: Candidate links above which they are drawn as a density image instead of lines.
DENSE_EDGES = 50_000
#: Nodes up to which every site is drawn as a dot.
MAX_SITE_DOTS = 5_000
#: Highlighted links get a ring at their middle up to this many; more rings would cover the map.
MAX_RINGS = 200
#: Cluster colours: qualitative, distinct on white; clusters are coloured by a graph colouring
#: (linked clusters differ), so the palette repeats only where clusters are far apart.
PALETTE = ["#1f77b4", "#ff7f0e", "#2ca02c", "#d62728", "#9467bd", "#8c564b", "#e377c2",
           "#17becf", "#bcbd22", "#7f7f7f", "#1b9e77", "#d95f02", "#7570b3", "#e7298a",
           "#66a61e", "#e6ab02", "#a6761d", "#393b79", "#637939", "#843c39"]
FOREST = "#1b4f9c"
REQUIRED = "#1a9641"
EXCLUDED = "#d7301f"
ISOLATED = "#f28e2b"
CUT = "#000000"


def _segments(coords, tail, head):
    t = np.asarray(tail, dtype=np.int64)
    h = np.asarray(head, dtype=np.int64)
    return np.stack([coords[t], coords[h]], axis=1)


def _paths(edges, xy, positions):
    """The drawn shape of the edges at ``positions``: the input lines for edges read from a
    line layer, else straight segments between the nodes."""
    positions = np.asarray(positions, dtype=np.int64)
    lines = getattr(edges, "lines", None)
    if lines is None or positions.size == 0:
        return _segments(xy, edges.tail[positions], edges.head[positions])
    import shapely
    geoms = shapely.from_wkb(np.asarray(lines, dtype=object)[positions])
    coords, index = shapely.get_coordinates(geoms, return_index=True)
    cuts = np.flatnonzero(np.diff(index)) + 1
    return np.split(coords, cuts)


def _positions(value, n_edges, name):
    """Edge positions (required/excluded) as int64, checked against the edge count."""
    if value is None:
        return np.empty(0, np.int64)
    arr = np.asarray(value)
    if arr.size == 0:
        return np.empty(0, np.int64)
    if arr.dtype.kind not in "iu":
        raise TypeError(f"plot_forest: {name} must be edge positions (integers), received dtype "
                        f"{arr.dtype}.")
    arr = arr.astype(np.int64).ravel()
    bad = np.flatnonzero((arr < 0) | (arr >= n_edges))
    if bad.size:
        raise ValueError(f"plot_forest: {name}[{int(bad[0])}] = {int(arr[bad[0]])} is not an edge "
                         f"position; expected 0..{n_edges - 1}.")
    return arr


def _limits(xy, geographic):
    """(x0, x1, y0, y1) with room around the data; a single point or a line gets a window."""
    if xy.shape[0] == 0:
        return -1.0, 1.0, -1.0, 1.0
    lo, hi = xy.min(axis=0), xy.max(axis=0)
    span = hi - lo
    scale = float(span.max())
    if scale <= np.abs(xy).max() * 1e-9:   # one point, or closer than ticks could tell apart
        scale = 2e-3 if geographic else 2.0          # about 220 m, or 2 units
    span = np.maximum(span, 0.05 * scale)
    mid = (lo + hi) / 2
    pad = 0.55 * span
    return mid[0] - pad[0], mid[0] + pad[0], mid[1] - pad[1], mid[1] + pad[1]


def _metres_per_unit(edges, x0, x1, y):
    """Metres per x unit at the map's middle, and a unit label; (None, label) when the units
    are unknown (planar coordinates without a CRS)."""
    xm = (x0 + x1) / 2
    if edges.geographic:
        return float(EARTH_RADIUS_M * math.pi / 180 * math.cos(math.radians(y))), "m"
    crs = getattr(edges, "crs", None)
    if crs is None:
        return None, "coordinate units"
    import pyproj   # the local scale of a projected CRS: the great-circle length of a step
    tr = pyproj.Transformer.from_crs(crs.crs, "EPSG:4326", always_xy=True)
    step = (x1 - x0) / 100 or 1.0
    lon, lat = tr.transform([xm - step / 2, xm + step / 2], [y, y])
    d = float(haversine_m(lon[0], lat[0], lon[1], lat[1]))
    if not math.isfinite(d) or d <= 0:
        return None, crs.unit
    return d / step, "m"


def _nice(x):
    """The largest 1, 2 or 5 times a power of ten not above x."""
    if x <= 0 or not math.isfinite(x):
        return 1.0
    p = 10 ** math.floor(math.log10(x))
    return max(m * p for m in (1, 2, 5) if m * p <= x)


def _scale_bar(ax, edges, lims, fontsize):
    from mpl_toolkits.axes_grid1.anchored_artists import AnchoredSizeBar
    x0, x1, y0, y1 = lims
    per, unit = _metres_per_unit(edges, x0, x1, (y0 + y1) / 2)
    width = x1 - x0
    if per is None:
        length = _nice(0.2 * width)
        label, size = f"{length:g} {unit}", length
    else:
        metres = _nice(0.2 * width * per)
        label = f"{metres / 1000:g} km" if metres >= 1000 else f"{metres:g} m"
        size = metres / per
    bar = AnchoredSizeBar(ax.transData, size, label, loc="lower left", pad=0.4, borderpad=0.6,
                          sep=3, frameon=True, size_vertical=0,
                          fontproperties={"size": fontsize})
    bar.patch.set_alpha(0.8)
    bar.patch.set_edgecolor("#999999")
    ax.add_artist(bar)
    return label


def cluster_colours(labels, tail, head, palette=PALETTE):
    """A palette index per cluster: its own colour while the palette lasts, else a greedy graph
    colouring (largest-degree first, free colours least used first) of the clusters linked by
    an edge, so that linked clusters get different colours (a cluster with as many coloured
    neighbours as the palette has colours takes the least used colour among them)."""
    labels = np.asarray(labels, dtype=np.int64)
    k = int(labels.max()) + 1 if labels.size else 0
    if k <= len(palette):            # few clusters: a colour of its own for each
        return np.arange(k, dtype=np.int64)
    a, b = labels[np.asarray(tail, np.int64)], labels[np.asarray(head, np.int64)]
    cross = a != b
    pairs = np.unique(np.stack([np.minimum(a[cross], b[cross]),
                                np.maximum(a[cross], b[cross])], 1), axis=0) \
        if cross.any() else np.empty((0, 2), np.int64)
    nbrs = [[] for _ in range(k)]
    for u, v in pairs.tolist():
        nbrs[u].append(v)
        nbrs[v].append(u)
    colour = np.full(k, -1, dtype=np.int64)
    m = len(palette)
    total = np.zeros(m, dtype=np.int64)     # free colours: the least used so far, so the
    for c in sorted(range(k), key=lambda c: (-len(nbrs[c]), c)):   # whole palette is used
        used = np.bincount([colour[v] for v in nbrs[c] if colour[v] >= 0], minlength=m)
        free = np.flatnonzero(used == 0)
        colour[c] = int(free[np.argmin(total[free])]) if free.size else int(np.argmin(used))
        total[colour[c]] += 1
    return colour


def _density_image(ax, xy, tail, head, lims, zorder, colours=("#e6e6e6", "#8c8c8c")):
    """Links as an image of how many pass through each pixel (log scale, light to dark)."""
    from matplotlib.colors import LinearSegmentedColormap, LogNorm
    seg = _segments(xy, tail, head)
    f = np.linspace(0.0, 1.0, 6)[:, None, None]
    pts = (seg[None, :, 0, :] * (1 - f) + seg[None, :, 1, :] * f).reshape(-1, 2)
    x0, x1, y0, y1 = lims
    nx = 700
    ny = max(50, min(1400, int(nx * (y1 - y0) / max(x1 - x0, 1e-300))))
    hist, _, _ = np.histogram2d(pts[:, 1], pts[:, 0], bins=(ny, nx), range=((y0, y1), (x0, x1)))
    hist = np.where(hist > 0, hist, np.nan)
    grey = LinearSegmentedColormap.from_list("density", list(colours))
    if np.isfinite(hist).any():
        ax.imshow(hist, extent=(x0, x1, y0, y1), origin="lower", cmap=grey,
                  norm=LogNorm(vmin=1, vmax=max(2.0, float(np.nanmax(hist)))),
                  interpolation="nearest", aspect="auto", zorder=zorder)


def plot_forest(path, edges, forest, *, title=None, subtitle=None, groups=None, clusters=None,
                required=None, excluded=None, highlight=None, highlight_label=None,
                footnote=None, dpi=150, scale_bar=True):
    """Draw the forest over its candidate links and write a PNG to ``path`` (atomically).

    Legend (every item present in the map is listed, with its count):

    * **candidate links**: light grey lines, every input link not in the forest; above
      ``DENSE_EDGES`` (50,000) links, a grey image whose shade counts the links crossing each
      pixel (log scale), so dense areas stay distinct;
    * **forest**: dark blue lines (thinner and translucent for large forests), or coloured by
      ``groups`` or ``clusters``;
    * **clusters** (``clusters``): each cluster in a colour of a 20-colour qualitative palette
      chosen by a graph colouring, so clusters joined by a link never share a colour while the
      palette lasts; forest links between clusters (the cuts) are black;
    * **required links**: a broad green band under the forest line;
    * **excluded links**: dashed red lines;
    * **highlighted links** (``highlight``): thick red lines with a ring at their middle (up
      to ``MAX_RINGS``, 200; more are drawn as red lines only, which rings would bury);
    * **sites**: small dark dots (up to 5,000 nodes);
    * **isolated sites**: orange squares, nodes without any forest link (no candidate link, or
      only excluded ones);
    * **scale bar** (lower left): metres or kilometres; longitude/latitude use the local
      scale at the map's middle latitude (great-circle metres), projected layers the local
      scale of their CRS (so Web Mercator is right away from the equator too); planar
      coordinates without a CRS are labelled in coordinate units.

    Parameters
    ----------
    path : str, Path or None
        Output PNG; None returns the matplotlib Figure instead (the caller closes it).
    edges : fastmst.io.EdgeList
        The edges the forest was solved from; must carry node coordinates.
    forest : SpanningForest
    title, subtitle, footnote : str, optional
        Texts above and below the map; long ones are wrapped.
    groups : (labels, names, colours), optional
        A class index per forest edge with a legend name and colour per class (e.g. surface
        types).
    clusters : array of int of shape (n_nodes,), optional
        A cluster number per node (``forest.clusters(k=...)``).
    required, excluded : arrays of edge positions, optional
        Default: the forest's own ``required``/``excluded`` lists when it has them.
    highlight : array of forest-edge indices, optional
        Links drawn thick in red on top, labelled ``highlight_label``.
    dpi : int, default 150
    scale_bar : bool, default True

    Returns
    -------
    Path, or the Figure when ``path`` is None.
    """
    import matplotlib
    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt
    from matplotlib.collections import LineCollection
    from matplotlib.lines import Line2D

    if edges.coords is None:
        raise ValueError(f"plot_forest: {edges.source} has no node coordinates; give a node "
                         f"table with lon/lat or x/y columns (CLI: --nodes FILE).")
    if getattr(forest, "n_nodes", None) != edges.n_nodes:
        raise ValueError(f"plot_forest: the forest has {getattr(forest, 'n_nodes', '?')} nodes "
                         f"but {edges.source} has {edges.n_nodes}; pass the EdgeList the forest "
                         f"was solved from.")
    if required is None:
        required = getattr(forest, "required", None)
    if excluded is None:
        excluded = getattr(forest, "excluded", None)
    req = _positions(required, edges.n_edges, "required")
    exc = _positions(excluded, edges.n_edges, "excluded")
    if clusters is not None:
        clusters = np.asarray(clusters)
        if clusters.shape != (edges.n_nodes,) or clusters.dtype.kind not in "iu":
            raise ValueError(f"plot_forest: clusters must hold one integer per node, shape "
                             f"({edges.n_nodes},); received dtype {clusters.dtype} and shape "
                             f"{clusters.shape}.")
    xy = np.asarray(edges.coords, dtype=np.float64)
    lims = _limits(xy, edges.geographic)
    x0, x1, y0, y1 = lims
    ymid = (y0 + y1) / 2
    aspect = 1.0 / max(math.cos(math.radians(min(abs(ymid), 89.0))), 0.02) \
        if edges.geographic else 1.0
    ratio = (y1 - y0) * aspect / (x1 - x0)
    map_w = 7.6
    map_h = min(9.0, max(3.2, map_w * ratio))
    wrap = 88   # characters of the title's font across the map's width
    heading = title or f"{'Maximum' if forest.maximize else 'Minimum'} spanning forest"
    text = textwrap.fill(heading, wrap) + (f"\n{textwrap.fill(subtitle, wrap)}"
                                           if subtitle else "")
    foot = textwrap.fill(footnote, 150) if footnote else None
    fig_h = map_h + 1.3 + 0.22 * text.count("\n") + (0.2 + 0.16 * foot.count("\n") if foot
                                                     else 0)
    fig = plt.figure(figsize=(11.0, fig_h), dpi=dpi, layout="constrained")
    ax = fig.add_subplot()
    # the window as data limits (no fixed limits): with adjustable="datalim" the map fills
    # the space constrained layout gives it and the limits widen to keep the aspect
    ax.update_datalim([(x0, y0), (x1, y1)])
    ax.margins(0)
    ax.set_aspect(aspect, adjustable="datalim")
    n_all, n_f = edges.n_edges, len(forest)
    handles = []
    dense = n_all > DENSE_EDGES
    in_forest = np.zeros(n_all, dtype=bool)
    in_forest[np.asarray(forest.edges, np.int64)] = True
    others = np.flatnonzero(~in_forest)
    if others.size:
        if dense:
            _density_image(ax, xy, edges.tail[others], edges.head[others], lims, 1)
        else:
            lw = 0.3 + 0.4 * min(1.0, math.sqrt(5_000 / others.size))
            ax.add_collection(LineCollection(_paths(edges, xy, others),
                                             colors="#bdbdbd", linewidths=lw, zorder=1))
        handles.append(Line2D([], [], color="#bdbdbd", lw=2 if dense else 1,
                              label=f"candidate links not used ({others.size:,})"
                                    + (", shade = density" if dense else "")))
    ft, fh = np.asarray(forest.tail, np.int64), np.asarray(forest.head, np.int64)
    fseg = _segments(xy, ft, fh)
    fpaths = fseg if n_f > DENSE_EDGES else _paths(edges, xy, forest.edges)
    if isinstance(fpaths, list):   # input lines of differing lengths: an array of arrays
        shapes = np.empty(len(fpaths), dtype=object)
        for i, line in enumerate(fpaths):
            shapes[i] = line
        fpaths = shapes
    lw = float(np.clip(2.2 * math.sqrt(2_000 / max(n_f, 1)), 0.25, 1.8))
    alpha = 1.0 if n_f <= 20_000 else float(max(0.45, math.sqrt(20_000 / n_f)))
    if len(req):
        ax.add_collection(LineCollection(_paths(edges, xy, req), colors=REQUIRED,
                                         linewidths=lw + 3.0,
                                         alpha=0.55, zorder=1.8, capstyle="round"))
        handles.append(Line2D([], [], color=REQUIRED, lw=5, alpha=0.55,
                              label=f"required links ({len(req):,})"))
    if groups is not None:
        idx, names, colours = groups
        idx = np.asarray(idx)
        for k, (name, colour) in enumerate(zip(names, colours)):
            sel = idx == k
            if sel.any():
                ax.add_collection(LineCollection(list(fpaths[sel]), colors=colour,
                                                 linewidths=lw, alpha=alpha, zorder=2))
                handles.append(Line2D([], [], color=colour, lw=2,
                                      label=f"{name} ({int(sel.sum()):,})"))
    elif clusters is not None:
        ca, cb = clusters[ft], clusters[fh]
        colour_of = cluster_colours(clusters, edges.tail, edges.head)
        inside = ca == cb
        cols = np.array(PALETTE)[colour_of[ca[inside]]] if inside.any() else []
        ax.add_collection(LineCollection(list(fpaths[inside]), colors=cols, linewidths=lw,
                                         alpha=alpha, zorder=2))
        k = int(clusters.max()) + 1 if clusters.size else 0
        sizes = np.bincount(clusters, minlength=k)
        if k <= 12:
            for c in range(k):
                handles.append(Line2D([], [], color=PALETTE[colour_of[c]], lw=2,
                                      label=f"cluster {c} ({sizes[c]:,} "
                                            f"site{'' if sizes[c] == 1 else 's'})"))
        else:
            handles.append(Line2D([], [], color=PALETTE[0], lw=2,
                                  label=f"{k:,} clusters; linked clusters differ in colour"))
        if (~inside).any():
            ax.add_collection(LineCollection(list(fpaths[~inside]), colors=CUT,
                                             linewidths=lw + 0.6,
                                             zorder=2.2))
            cuts = int((~inside).sum())
            handles.append(Line2D([], [], color=CUT, lw=2,
                                  label=f"forest links between clusters ({cuts:,})"))
    elif n_f > DENSE_EDGES:
        _density_image(ax, xy, ft, fh, lims, 2, ("#c6dbef", "#08306b"))
        handles.append(Line2D([], [], color=FOREST, lw=4,
                              label=f"forest ({n_f:,} links), shade = density"))
    else:
        ax.add_collection(LineCollection(list(fpaths), colors=FOREST, linewidths=lw,
                                         alpha=alpha, zorder=2))
        handles.append(Line2D([], [], color=FOREST, lw=2, label=f"forest ({n_f:,} links)"))
    if len(exc):
        ax.add_collection(LineCollection(_paths(edges, xy, exc), colors=EXCLUDED,
                                         linewidths=max(lw, 0.8),
                                         linestyles=(0, (3, 2)), zorder=2.4))
        handles.append(Line2D([], [], color=EXCLUDED, lw=1.2, ls=(0, (3, 2)),
                              label=f"excluded links ({len(exc):,})"))
    if highlight is not None and len(highlight):
        hl = np.asarray(highlight, dtype=np.int64)
        ringed = len(hl) <= MAX_RINGS
        lw = 3.0 if ringed else 1.6
        ax.add_collection(LineCollection(list(fpaths[hl]), colors="#d62728", linewidths=lw,
                                         zorder=3))
        if ringed:
            mid = fseg[hl].mean(axis=1)   # rings make short links findable
            ax.scatter(mid[:, 0], mid[:, 1], s=140, facecolors="none", edgecolors="#d62728",
                       linewidths=1.6, zorder=3.5)
        handles.append(Line2D([], [], color="#d62728", lw=lw, marker="o" if ringed else None,
                              mfc="none", ms=9,
                              label=highlight_label or f"highlighted links ({len(hl):,})"))
    if 0 < edges.n_nodes <= MAX_SITE_DOTS:
        dots = "#333333" if clusters is None else \
            np.array(PALETTE)[cluster_colours(clusters, edges.tail, edges.head)[clusters]]
        ax.scatter(xy[:, 0], xy[:, 1], s=min(18.0, 2000.0 / edges.n_nodes) + 1.0,
                   c=dots, zorder=2.5, linewidths=0)
        handles.append(Line2D([], [], color="#333333", lw=0, marker="o", ms=4,
                              label=f"sites ({edges.n_nodes:,})"
                                    + (", in their cluster's colour" if clusters is not None
                                       else "")))
    degree = np.bincount(np.concatenate([ft, fh]), minlength=edges.n_nodes)
    lone = np.flatnonzero(degree == 0)
    if lone.size:
        ax.scatter(xy[lone, 0], xy[lone, 1], s=46, marker="s", facecolors="none",
                   edgecolors=ISOLATED, linewidths=1.6, zorder=3.2)
        handles.append(Line2D([], [], color=ISOLATED, lw=0, marker="s", mfc="none", mew=1.6,
                              ms=7, label=f"isolated sites ({lone.size:,}): no forest link"))
    from matplotlib.ticker import MaxNLocator
    for axis in (ax.xaxis, ax.yaxis):
        axis.set_major_locator(MaxNLocator(nbins=6))
    ax.ticklabel_format(useOffset=False, style="plain")   # whole coordinates, no "1e6" corner
    ax.tick_params(labelsize=8)
    if edges.geographic:
        ax.set_xlabel("longitude (degrees)", fontsize=9)
        ax.set_ylabel("latitude (degrees)", fontsize=9)
    else:
        crs = getattr(edges, "crs", None)
        unit = f" ({crs.unit}, {crs.name})" if crs is not None else ""
        ax.set_xlabel(f"x{unit}", fontsize=9)
        ax.set_ylabel("y", fontsize=9)
    ax.set_title(text, fontsize=10.5)
    ax.grid(True, color="#eeeeee", linewidth=0.5, zorder=0)
    if scale_bar:
        _scale_bar(ax, edges, lims, 8)
    fig.legend(handles=handles, loc="outside right upper", fontsize=8, frameon=False)
    if foot:
        fig.supxlabel(foot, fontsize=7.5, color="#555555", x=0.01, ha="left")
    # The first draw lays the figure out and widens the limits to the aspect; the tick labels
    # of those limits may be wider than the ones the layout measured, so the limits are then
    # fixed (the box keeps the aspect) and the next draw lays out the final labels.
    fig.canvas.draw()
    xlim, ylim = ax.get_xlim(), ax.get_ylim()
    ax.set_aspect(aspect, adjustable="box")
    ax.set_xlim(xlim)
    ax.set_ylim(ylim)
    if path is None:
        return fig

    def write(tmp):
        fig.savefig(tmp, format="png")
    try:
        return atomic_write(path, write)
    finally:
        plt.close(fig)
