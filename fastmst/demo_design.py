"""The demo's design part (invented Low Marren scenario): what single trench cuts cost, backup
trenches around the invented exchange, feeder cables of limited size from it, and routes kept
short from it; maps of link sets coloured by why each link is there (also used by the design
subcommands)."""
from __future__ import annotations

import numpy as np

from fastmst import io
from fastmst.design import (backup_links, capacitated_tree, light_shallow_tree,
                            link_failures)
from fastmst.design.shallow import shortest_paths
from fastmst.plot import plot_forest

DESIGN_CAUTION = ("Planning aid only: resilience requirements (diverse routing, shared ducts and "
                  "common-mode failures that a graph does not see), capacities and limits come "
                  "from local codes and licensed engineers.")

#: map colours of the ``why`` classes
COLOURS = {"tree": "#1b4f9c", "backup": "#d62728", "feeder": "#ff7f0e", "branch": "#1b4f9c",
           "shortcut": "#2ca02c", "single point": "#000000",
           "no alternative route": "#000000"}

#: sites around the invented exchange given backup trenches and feeders in the demo
BACKUP_SITES = 3_000

#: sites one feeder cable may serve in the demo (an invented figure)
FEEDER_SITES = 150


class Links:
    """A set of links drawn by :func:`fastmst.plot.plot_forest` (tail, head, weights, edges)."""

    maximize = False
    required = excluded = None

    def __init__(self, edges, positions):
        self.n_nodes = edges.n_nodes
        self.edges = np.asarray(positions, dtype=np.int64)
        self.tail = edges.tail[self.edges]
        self.head = edges.head[self.edges]
        self.weights = edges.weight[self.edges]

    def __len__(self):
        return int(self.edges.shape[0])


def plot_links(path, edges, positions, why, *, title, subtitle=None, footnote=None,
               highlight=None, highlight_label=None):
    """A map of the links coloured by their ``why`` class over all candidates (grey);
    ``highlight`` (indices into ``positions``) drawn thick in red on top."""
    why = np.asarray(why, dtype=str)
    names = [k for k in COLOURS if (why == k).any()]
    idx = np.array([names.index(w) for w in why.tolist()], dtype=np.int64)
    return plot_forest(path, edges, Links(edges, positions),
                       groups=(idx, names, [COLOURS[k] for k in names]), title=title,
                       subtitle=subtitle, footnote=footnote or DESIGN_CAUTION,
                       highlight=highlight, highlight_label=highlight_label)


def resilience(out, edges, forest, *, phase, plot=True, currency="cost units (invented)"):
    """Failure analysis of the backbone, backup trenches for the sites nearest the invented
    exchange, and a shallow tree from it; writes resilience.csv (and resilience.png).
    Returns the summary part."""
    import pyarrow as pa
    xy = edges.coords
    # lon/lat degrees: a degree of longitude is cos(latitude) of a degree of latitude on the
    # ground, so distances on this district's scale are measured on the locally scaled plane
    ground = xy * np.array([np.cos(np.radians(xy[:, 1].mean())), 1.0])
    centre = ground.mean(axis=0)
    exchange = int(np.argmin(np.hypot(*(ground - centre).T)))
    with phase("failure analysis"):
        fail = link_failures(edges.tail, edges.head, edges.weight, forest, root=exchange)
    finite = np.flatnonzero(~fail.bridge)
    with phase("backup trenches"):
        # the sites nearest the exchange, with the trenches among them
        near = np.argsort(np.hypot(*(ground - ground[exchange]).T), kind="stable")[:BACKUP_SITES]
        inside = np.zeros(edges.n_nodes, dtype=bool)
        inside[near] = True
        keep = np.flatnonzero(inside[edges.tail] & inside[edges.head])
        remap = np.full(edges.n_nodes, -1, dtype=np.int64)
        remap[near] = np.arange(near.size)
        local = io.EdgeList(remap[edges.tail[keep]], remap[edges.head[keep]],
                            edges.weight[keep], int(near.size), labels=edges.label(near),
                            coords=xy[near], geographic=edges.geographic,
                            source="trenches near the exchange",
                            columns=edges.columns)
        back = backup_links(local.tail, local.head, local.weight, n_nodes=local.n_nodes)
    with phase("shallow tree"):
        shallow = light_shallow_tree(edges.tail, edges.head, edges.weight, exchange, alpha=1.5,
                                     n_nodes=edges.n_nodes)
    with phase("feeders"):
        feed, fedges, n_trench = _feeders(local, int(remap[exchange]))
    single = np.isin(back.forest, back.single_points)
    pos = np.concatenate([back.forest, back.position])
    why = np.concatenate([np.where(single, "single point", "tree"),
                          np.full(len(back), "backup")])
    ta, tb = local.label(local.tail[pos]), local.label(local.head[pos])
    table = pa.table({"from": pa.array(ta.tolist()), "to": pa.array(tb.tolist()),
                      "cost": pa.array(np.asarray(local.weight[pos])),
                      "position": pa.array(keep[pos]),
                      "why": pa.array(np.where(why == "single point", "tree", why).tolist()),
                      "single_point": pa.array(single.tolist() + [False] * len(back))})
    io.write_table(out / "resilience.csv", table)
    files = ["resilience.csv"]
    tree_w = float(local.weight[back.forest].sum())
    if plot:
        with phase("plotting"):
            plot_links(out / "resilience.png", local, pos, why,
                       title="Invented scenario: Low Marren - backup trenches near the exchange",
                       subtitle=f"{local.n_nodes:,} sites nearest the exchange: backup "
                                f"trenches (red) {back.weight:,.0f}, lower bound "
                                f"{back.lower_bound:,.0f}, backbone {tree_w:,.0f}",
                       footnote="Invented data. " + DESIGN_CAUTION)
        files.append("resilience.png")
        with phase("plotting"):
            files += _design_maps(out, edges, fail, shallow, feed, fedges, n_trench)
    cut = int(np.argmax(fail.sites_cut_off)) if len(fail) else -1
    return {
        "exchange": str(edges.label([exchange])[0]),
        "bridges": fail.n_bridges,
        "worst_cut_sites": int(fail.sites_cut_off[cut]) if cut >= 0 else 0,
        "dearest_repair": float(fail.cost_increase[finite].max()) if finite.size else 0.0,
        "median_repair": float(np.median(fail.cost_increase[finite])) if finite.size else 0.0,
        "backup_sites": int(local.n_nodes), "backup_backbone_cost": round(tree_w, 2),
        "backup_trenches": len(back), "backup_cost": round(back.weight, 2),
        "backup_lower_bound": round(back.lower_bound, 2) if back.lower_bound else 0.0,
        "backup_single_points": int(back.single_points.size),
        "shallow_alpha": shallow.alpha,
        "shallow_weight_ratio": round(_weight_ratio(shallow), 4),
        "shallow_worst_stretch": round(float(np.nanmax(shallow.stretch)), 4),
        "shallow_shortcuts": int((shallow.reason == "shortcut").sum()),
        "feeder_capacity_sites": FEEDER_SITES, "feeders": int(feed.load.size),
        "feeder_largest_load": int(feed.load.max()) if feed.load.size else 0,
        "feeder_tree_cost": round(feed.weight, 2), "feeder_unserved": int(feed.unserved.size),
        "files": files, "caution": DESIGN_CAUTION,
    }


def _weight_ratio(shallow):
    """The shallow tree's weight over the backbone's in the exchange's component (1 when both
    are 0: an exchange without trenches)."""
    return shallow.weight / shallow.mst_weight if shallow.mst_weight > 0 else 1.0


def _feeders(local, root):
    """Feeder cables from the exchange (``root``) to the sites of ``local``, each serving at
    most FEEDER_SITES sites (Esau-Williams).  Besides the trenches, every site may have its
    own cable from the exchange along its cheapest trench route, at that route's cost (the
    shortest-path distances).  Returns the CapacitatedTree, the EdgeList it was solved on
    (trenches, then the direct cables) and the number of trenches."""
    direct = shortest_paths(local.n_nodes, local.tail.astype(np.int64),
                            local.head.astype(np.int64),
                            np.asarray(local.weight, dtype=np.float64), root)[0]
    sites = np.flatnonzero(np.isfinite(direct) & (np.arange(local.n_nodes) != root))
    tail = np.concatenate([local.tail, np.full(sites.size, root)]).astype(np.int64)
    head = np.concatenate([local.head, sites]).astype(np.int64)
    weight = np.concatenate([np.asarray(local.weight, dtype=np.float64), direct[sites]])
    fedges = io.EdgeList(tail, head, weight, local.n_nodes,
                         labels=local.label(np.arange(local.n_nodes)), coords=local.coords,
                         geographic=local.geographic, source="trenches and direct cables")
    return (capacitated_tree(tail, head, weight, root, FEEDER_SITES, n_nodes=local.n_nodes),
            fedges,
            int(local.n_edges))


def _design_maps(out, edges, fail, shallow, feed, fedges, n_trench):
    """failures.png, feeders.png and shallow.png; returns their names."""
    why = np.where(fail.bridge, "no alternative route", "tree")
    finite = np.flatnonzero(~fail.bridge)
    dear = finite[fail.cost_increase[finite] >= np.quantile(fail.cost_increase[finite], 0.99)] \
        if finite.size else finite
    plot_links(out / "failures.png", edges, fail.position, why,
               highlight=dear, highlight_label="dearest 1 % of cuts to route around",
               title="Invented scenario: Low Marren - what a single trench cut costs",
               subtitle=f"backbone seen from the exchange: the {dear.size:,} trenches whose cut "
                        f"costs most to route around (red), {fail.n_bridges:,} with no "
                        f"alternative route")
    # the map shows the trenches and only the chosen direct cables (drawn straight)
    keep = np.arange(fedges.n_edges) < n_trench
    keep[feed.position] = True
    shown = np.flatnonzero(keep)
    at = np.full(fedges.n_edges, -1, dtype=np.int64)
    at[shown] = np.arange(shown.size)
    sub = io.EdgeList(fedges.tail[shown], fedges.head[shown], fedges.weight[shown],
                      fedges.n_nodes, labels=fedges.label(np.arange(fedges.n_nodes)),
                      coords=fedges.coords, geographic=fedges.geographic,
                      source=fedges.source)
    plot_links(out / "feeders.png", sub, at[feed.position], feed.reason,
               title="Invented scenario: Low Marren - feeder cables of at most "
                     f"{FEEDER_SITES} sites from the exchange",
               subtitle=f"{fedges.n_nodes:,} sites nearest the exchange: {feed.load.size} "
                        f"feeders (orange; direct cables drawn straight), largest "
                        f"{int(feed.load.max()) if feed.load.size else 0} sites, cost "
                        f"{feed.weight:,.0f}, {feed.unserved.size} unserved (Esau-Williams)")
    plot_links(out / "shallow.png", edges, shallow.position, shallow.reason,
               title="Invented scenario: Low Marren - routes from the exchange within "
                     f"{shallow.alpha:g} x the shortest",
               subtitle=f"a tree from the exchange: {int((shallow.reason == 'shortcut').sum()):,}"
                        f" shortcut trenches (green) take the place of backbone links; weight "
                        f"{_weight_ratio(shallow):.3f} x the backbone, worst "
                        f"stretch {np.nanmax(shallow.stretch):.3f}")
    return ["failures.png", "feeders.png", "shallow.png"]


def resilience_lines(r) -> list:
    """The design part of the demo summary, as text lines."""
    return [
        "",
        f"  single trench cuts (backbone, seen from the exchange {r['exchange']}):",
        f"    trenches with no alternative route   {r['bridges']:,} (worst cuts off "
        f"{r['worst_cut_sites']:,} sites)",
        f"    repair cost rise: median {r['median_repair']:,.0f}, dearest "
        f"{r['dearest_repair']:,.0f}",
        f"  backup trenches for the {r['backup_sites']:,} sites nearest the exchange "
        f"(Frederickson-JaJa 2-approximation):",
        f"    {r['backup_trenches']:,} trenches, cost {r['backup_cost']:,.0f} (lower bound "
        f"{r['backup_lower_bound']:,.0f}; backbone there {r['backup_backbone_cost']:,.0f}), "
        f"{r['backup_single_points']:,} single points left",
        f"  routes from the exchange within {r['shallow_alpha']:g} x the shortest: tree weight "
        f"{r['shallow_weight_ratio']:.3f} x the backbone, worst stretch "
        f"{r['shallow_worst_stretch']:.3f}, {r['shallow_shortcuts']:,} shortcut trenches",
        f"  feeder cables of at most {r['feeder_capacity_sites']} sites for the "
        f"{r['backup_sites']:,} sites nearest the exchange (Esau-Williams): {r['feeders']} "
        f"feeders, largest {r['feeder_largest_load']} sites, cost {r['feeder_tree_cost']:,.0f}, "
        f"{r['feeder_unserved']} unserved",
        "  " + r["caution"],
    ]
