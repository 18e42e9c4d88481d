"""Maps: every text inside the figure at any extent, a scale bar that measures true distances,
required/excluded links and isolated sites drawn, cluster colours that do not repeat between
linked clusters, and a readable large map.

Coordinates come from real networks shipped inside registry packages (tests/real_data.py):
pygsp's Minnesota road network (lon/lat; also rescaled into the extent where labels were cut
off, lon 4.80-4.98 / lat 45.70-45.80, and into a 1e-5 degree box), momepy's bubenec streets
(EPSG:3857 metres) and libpysal's geodanet streets (US survey feet).  The 600k-link map uses
the invented Low Marren demo scenario (fastmst.demo), the only source of that size here.

Scale-bar reference: pyproj.Geod (WGS 84 ellipsoid) distance between the bar's two ends, with
the projected bar's ends transformed to lon/lat by pyproj.Transformer.
"""
import numpy as np
import pyarrow as pa
import pytest
from hypothesis import given, settings, strategies as st

import fastmst
from fastmst import io
from fastmst.plot import PALETTE, cluster_colours, plot_forest
import real_data as rd

matplotlib = pytest.importorskip("matplotlib")
pyproj = pytest.importorskip("pyproj")


def _minnesota(lon=None, lat=None):
    net, xy = rd.minnesota()
    x, y = xy[:, 0], xy[:, 1]
    if lon is not None:   # rescaled into a box: the same network at another extent
        x = (x - x.min()) / np.ptp(x) * (lon[1] - lon[0]) + lon[0]
        y = (y - y.min()) / np.ptp(y) * (lat[1] - lat[0]) + lat[0]
    nodes = pa.table({"id": np.arange(len(x)), "lon": x, "lat": y})
    return io.from_table(pa.table({"t": net.tail, "h": net.head, "w": net.weight}), nodes=nodes)


def _layer(which):
    path = rd.package_file("momepy", "datasets", "bubenec.gpkg") if which == "bubenec" else \
        rd.package_file("libpysal", "examples", "geodanet", "streets.shp")
    pytest.importorskip("pyogrio")
    return io.read_line_layer(str(path))


def _one_site():
    """One site and no link (coordinates of a Minnesota node)."""
    _, xy = rd.minnesota()
    return io.EdgeList(np.empty(0, np.int64), np.empty(0, np.int64), np.empty(0), 1,
                       np.array(["site A"]), xy[:1].copy(), True, "one site")


EXTENTS = {
    "wide-lonlat": lambda: _minnesota((4.80, 4.98), (45.70, 45.80)),
    "state-lonlat": lambda: _minnesota(),
    "tiny-lonlat": lambda: _minnesota((4.85, 4.85001), (45.75, 45.75001)),
    "projected-metres": lambda: _layer("bubenec"),
    "projected-feet": lambda: _layer("geodanet"),
    "single-site": _one_site,
}


def texts_outside(fig):
    """Drawn texts whose window extent leaves the figure (tick labels only where their tick is
    inside the view, as matplotlib draws them), as (text, extent) pairs."""
    from matplotlib.text import Text
    fig.canvas.draw()
    r = fig.canvas.get_renderer()
    box = fig.bbox
    hidden = set()
    for ax in fig.axes:
        for axis in (ax.xaxis, ax.yaxis):
            lo, hi = sorted(axis.get_view_interval())
            for tick in axis.get_major_ticks() + axis.get_minor_ticks():
                if not lo - 1e-9 * (hi - lo) <= tick.get_loc() <= hi + 1e-9 * (hi - lo):
                    hidden.update({id(tick.label1), id(tick.label2)})
    out, seen = [], 0
    for t in fig.findobj(Text):
        if not t.get_visible() or not t.get_text().strip() or id(t) in hidden:
            continue
        seen += 1
        e = t.get_window_extent(r)
        if e.x0 < box.x0 - 0.5 or e.y0 < box.y0 - 0.5 or e.x1 > box.x1 + 0.5 or \
                e.y1 > box.y1 + 0.5:
            out.append((t.get_text(), e))
    assert seen >= 8, "expected the title, axis labels, tick labels, legend and scale bar"
    legend = [lg.get_window_extent(r) for lg in fig.legends]
    for ax in fig.axes:                 # the title stays clear of the legend beside the map
        title = ax.title.get_window_extent(r)
        out += [("title overlaps the legend", title) for lg in legend if title.overlaps(lg)]
    for ax in fig.axes:                 # tick labels of one axis never overlap each other
        for axis in (ax.xaxis, ax.yaxis):
            boxes = [t.label1.get_window_extent(r) for t in axis.get_major_ticks()
                     if id(t.label1) not in hidden and t.label1.get_text()]
            for a, b in zip(boxes, boxes[1:]):
                if a.overlaps(b):
                    out.append((f"overlapping tick labels on the {axis.axis_name} axis", a))
    return out


@pytest.mark.parametrize("extent", sorted(EXTENTS))
def test_every_text_inside_the_figure(extent, tmp_path):
    """Title, axis labels, tick labels, legend entries and the scale bar's label lie inside the
    figure at every extent (the cut-off labels were seen at lon 4.80-4.98, lat 45.70-45.80),
    also with a long title, subtitle and footnote; the PNG is written."""
    el = EXTENTS[extent]()
    f = el.solve()
    kw = dict(title="A title long enough to need wrapping when the figure is narrow " * 2,
              subtitle=f"{el.source}: {len(f):,} of {el.n_edges:,} links",
              footnote="A footnote that runs on and on, as cautions do, " * 4)
    fig = plot_forest(None, el, f, **kw)
    try:
        assert texts_outside(fig) == []
    finally:
        matplotlib.pyplot.close(fig)
    out = plot_forest(tmp_path / "map.png", el, f, **kw)
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def _scale_bar(fig):
    from mpl_toolkits.axes_grid1.anchored_artists import AnchoredSizeBar
    ax = fig.axes[0]
    bar = next(a for a in ax.artists if isinstance(a, AnchoredSizeBar))
    label = bar.txt_label.get_text()
    width = bar.size_bar.get_children()[0].get_width()   # in data units
    value, unit = label.split()
    return float(value) * (1000.0 if unit == "km" else 1.0), width, unit


@pytest.mark.parametrize("extent", ["wide-lonlat", "state-lonlat", "projected-metres",
                                    "projected-feet"])
def test_scale_bar_measures_true_distance(extent):
    """The bar's label equals the WGS 84 ellipsoidal distance (pyproj.Geod) between its two
    ends at the map's middle within 0.6 % (sphere against ellipsoid, and the middle latitude
    against the bar's); for EPSG:3857 this needs the local scale (1/cos(50 deg) = 1.55 off
    without it)."""
    el = EXTENTS[extent]()
    fig = plot_forest(None, el, el.solve())
    try:
        metres, width, unit = _scale_bar(fig)
        assert unit in ("m", "km")
    finally:
        matplotlib.pyplot.close(fig)
    lo, hi = el.coords.min(axis=0), el.coords.max(axis=0)     # the bar at the map's middle
    x = (lo[0] + hi[0]) / 2 + np.array([-width / 2, width / 2])
    y = np.full(2, (lo[1] + hi[1]) / 2)
    if not el.geographic:
        tr = pyproj.Transformer.from_crs(el.crs.crs, "EPSG:4326", always_xy=True)
        x, y = tr.transform(x, y)
    d = pyproj.Geod(ellps="WGS84").inv(x[0], y[0], x[1], y[1])[2]
    assert metres == pytest.approx(d, rel=6e-3)


def test_required_excluded_and_isolated_are_drawn_and_listed():
    """bubenec streets solved with two required and two excluded links (one excluded link is
    the only link of its end node, which becomes an isolated site; the count of such sites is
    computed here from the edge list): the legend lists each with its count, and each is drawn
    (a collection in its colour)."""
    el = _layer("bubenec")
    deg = np.bincount(np.concatenate([el.tail, el.head]), minlength=el.n_nodes)
    leaf = int(np.flatnonzero((deg[el.tail] == 1) | (deg[el.head] == 1))[0])
    excluded = [leaf, int(el.solve().edges[-1])]
    required = [i for i in range(el.n_edges) if i not in excluded][:2]
    f = fastmst.minimum_spanning_forest(el.tail, el.head, el.weight, el.n_nodes,
                                        required=required, excluded=excluded)
    fig = plot_forest(None, el, f, required=required, excluded=excluded)
    try:
        labels = [t.get_text() for t in fig.legends[0].get_texts()]
        assert "required links (2)" in labels and "excluded links (2)" in labels
        allowed = np.setdiff1d(np.arange(el.n_edges), excluded)
        allowed = allowed[el.tail[allowed] != el.head[allowed]]
        lone = int((np.bincount(np.concatenate([el.tail[allowed], el.head[allowed]]),
                                minlength=el.n_nodes) == 0).sum())
        assert lone >= 1 and f"isolated sites ({lone}): no forest link" in labels
        from matplotlib.colors import to_hex
        colours = {to_hex(c) for coll in fig.axes[0].collections
                   for c in np.atleast_2d(coll.get_edgecolor())}
        assert {"#1a9641", "#d7301f", "#f28e2b"} <= colours
    finally:
        matplotlib.pyplot.close(fig)
    with pytest.raises(ValueError, match=r"required\[0\] = 99 is not an edge position"):
        plot_forest(None, el, f, required=[99])
    with pytest.raises(TypeError, match=r"excluded must be edge positions.*float64"):
        plot_forest(None, el, f, excluded=[0.5])


def test_cluster_colours_differ_between_linked_clusters():
    """Minnesota cut into many clusters (more than the palette's 20 colours): clusters joined by
    a link (pairs computed here from the edge list) get different colours whenever the
    cluster has fewer than 20 linked clusters; up to 20 clusters every one has its own."""
    net, xy = rd.minnesota()      # weighted by great-circle length for varied cluster sizes
    el = io.from_table(pa.table({"t": net.tail, "h": net.head}), weight="length",
                       nodes=pa.table({"id": np.arange(len(xy)), "lon": xy[:, 0],
                                       "lat": xy[:, 1]}))
    f = el.solve()
    labels = np.asarray(f.clusters(threshold=float(np.quantile(f.weights, 0.95))))
    k = int(labels.max()) + 1
    assert k > len(PALETTE)
    colour = cluster_colours(labels, el.tail, el.head)
    a, b = labels[el.tail], labels[el.head]
    pairs = {(min(x, y), max(x, y)) for x, y in zip(a.tolist(), b.tolist()) if x != y}
    degree = np.zeros(k, int)
    for x, y in pairs:
        degree[x] += 1
        degree[y] += 1
    assert len(pairs) > 50
    assert all(colour[x] != colour[y] for x, y in pairs if max(degree[x], degree[y]) < 20)
    few = np.asarray(f.clusters(k=12))
    assert sorted(cluster_colours(few, el.tail, el.head).tolist()) == list(range(12))


@pytest.mark.slow
def test_600k_links_readable_and_inside(tmp_path):
    """600k candidate links (the invented Low Marren demo scenario at 200,000 sites): both the
    candidates and the forest are drawn as density images (no line tangle), and every text is
    inside the figure."""
    from fastmst import demo
    sites, trenches = demo.generate(200_000, 2024)
    el = io.from_table(pa.table(trenches), tail="from", head="to", weight="cost",
                       nodes=io.read_nodes(pa.table(sites)))
    assert el.n_edges > 590_000
    f = el.solve()
    fig = plot_forest(None, el, f, subtitle="invented scenario")
    try:
        ax = fig.axes[0]
        assert len(ax.images) == 2 and len(ax.collections) <= 2
        assert texts_outside(fig) == []
    finally:
        matplotlib.pyplot.close(fig)


@settings(max_examples=8)
@given(geographic=st.booleans(), log_w=st.floats(-6, 2), log_ratio=st.floats(-2.5, 2.5),
       cx=st.floats(-1.0, 1.0), cy=st.floats(-1.0, 1.0))
def test_text_inside_over_extents_and_aspects(geographic, log_w, log_ratio, cx, cy):
    """libpysal's geodanet streets (220 sites) moved and stretched into boxes from 1e-6 to 100
    units wide, with height/width ratios from 1/300 to 300, as lon/lat (anywhere between
    +-170 degrees and +-80 degrees latitude) or planar coordinates up to 1e7 from the origin:
    every text inside the figure, no overlapping tick labels."""
    el = _layer("geodanet")
    xy = el.coords - el.coords.min(axis=0)
    xy = xy / np.maximum(xy.max(axis=0), 1e-300)
    w = 10.0 ** log_w
    h = w * 10.0 ** log_ratio
    if geographic:
        w, h = min(w, 340.0), min(h, 160.0)
        x0, y0 = cx * (170 - w / 2) - w / 2, cy * (80 - h / 2) - h / 2
    else:
        x0, y0 = cx * 1e7, cy * 1e7
    coords = np.column_stack([x0 + xy[:, 0] * w, y0 + xy[:, 1] * h])
    moved = io.EdgeList(el.tail, el.head, el.weight, el.n_nodes, None, coords, geographic,
                        "geodanet streets, moved")
    fig = plot_forest(None, moved, moved.solve(), dpi=40)
    try:
        assert texts_outside(fig) == []
    finally:
        matplotlib.pyplot.close(fig)


@pytest.mark.parametrize("many", [False, True])
def test_highlight_rings_only_while_few(many):
    """Up to MAX_RINGS highlighted links get a ring each (findable when short); beyond, red
    lines only, so thousands of rings do not cover the map (pygsp's Minnesota roads)."""
    from matplotlib.collections import PathCollection
    from fastmst.plot import MAX_RINGS
    el = _minnesota()
    f = el.solve()
    k = min(f.edges.size, MAX_RINGS + 1) if many else 3
    assert (k > MAX_RINGS) == many
    fig = plot_forest(None, el, f, highlight=np.arange(k))
    try:
        rings = [c for c in fig.axes[0].collections if isinstance(c, PathCollection)
                 and len(c.get_offsets()) == k]
        assert len(rings) == (0 if many else 1)
        labels = [t.get_text() for t in fig.legends[0].get_texts()]
        assert f"highlighted links ({k:,})" in labels
    finally:
        matplotlib.pyplot.close(fig)
