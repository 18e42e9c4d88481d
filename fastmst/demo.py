"""``fastmst demo``: an invented fibre-backbone scenario, solved end to end.

Everything here is invented: the district, its villages and farms, its roads, the surface
classes and their costs per metre.  The district is placed in the open North Atlantic (around
32 W, 44 N) so that no real place is implied.  The scenario exercises the whole file path:
it writes a site table and a candidate-trench table as CSV, reads them back through
``fastmst.io``, solves the cheapest backbone, lists its nearly tied cost choices by ``fastmst.sensitivity``
(the trenches whose smallest relative cost rise changes the design; ``fastmst margins`` gives
the same for any file), and writes CSV, GeoJSON, a PNG map,
a JSON summary and a README to the output folder.  ``fastmst demo`` (:mod:`fastmst.cli.demo`)
runs it from the command line.
"""
from __future__ import annotations

import json
import math
from contextlib import nullcontext
from pathlib import Path

import numpy as np

import fastmst
from fastmst import io
from fastmst.demo_design import resilience, resilience_lines
from fastmst.geometry.geodesy import haversine_m
from fastmst.plot import plot_forest

SCENARIO = "Invented scenario: fibre backbone for the fictional rural district of Low Marren"
# Surface classes of the invented district: name, invented trench cost per metre, map colour.
SURFACES = (
    ("field verge", 38.0, "#4daf4a"),
    ("gravel track", 52.0, "#a6761d"),
    ("asphalt road", 96.0, "#377eb8"),
    ("village paving", 135.0, "#984ea3"),
    ("river crossing", 410.0, "#17becf"),
)
CURRENCY = "cost units (invented)"
CAUTIONS = (
    "Cautions:\n"
    "  - The data above are invented; they describe no real place, network or price.\n"
    "  - A spanning tree has no redundancy: one cut trench disconnects every site beyond it.\n"
    "    Real backbones add rings or backup links where service must survive a cut.\n"
    "  - Designs for utilities or roads need review by licensed engineers under the local codes.")

_LON0, _LAT0, _DLON, _DLAT = -32.25, 43.85, 0.5, 0.3


def generate(n_sites: int = 30_000, seed: int = 2024):
    """The invented district: (sites, trenches) as dicts of NumPy arrays.

    Sites cluster in villages with scattered farms between them; candidate trenches follow a
    generated road network (a Delaunay triangulation of the sites without its longest links),
    each with a surface class and a cost of length x the class's invented cost per metre.
    """
    from scipy.spatial import Delaunay

    rng = np.random.default_rng(seed)
    n_villages = max(3, n_sites // 1500)
    centres = np.column_stack([_LON0 + rng.uniform(0.05, 0.95, n_villages) * _DLON,
                               _LAT0 + rng.uniform(0.05, 0.95, n_villages) * _DLAT])
    spread = rng.uniform(0.003, 0.009, n_villages)
    share = rng.lognormal(0.0, 0.6, n_villages)
    n_village_sites = int(0.75 * n_sites)
    which = rng.choice(n_villages, size=n_village_sites, p=share / share.sum())
    pts = centres[which] + rng.normal(size=(n_village_sites, 2)) * spread[which, None] * \
        np.array([1.35, 1.0])
    farms = np.column_stack([_LON0 + rng.uniform(0, 1, n_sites - n_village_sites) * _DLON,
                             _LAT0 + rng.uniform(0, 1, n_sites - n_village_sites) * _DLAT])
    lonlat = np.vstack([pts, farms])
    village = np.concatenate([which, np.full(n_sites - n_village_sites, -1)])
    # Plane coordinates (degrees scaled by cos(latitude)) for the triangulation only.
    kx = math.cos(math.radians(_LAT0 + _DLAT / 2))
    tri = Delaunay(np.column_stack([lonlat[:, 0] * kx, lonlat[:, 1]]))
    s = tri.simplices
    pairs = np.vstack([s[:, [0, 1]], s[:, [1, 2]], s[:, [0, 2]]])
    pairs.sort(axis=1)
    key = np.unique(pairs[:, 0].astype(np.int64) * n_sites + pairs[:, 1])
    a, b = key // n_sites, key % n_sites
    length = haversine_m(lonlat[a, 0], lonlat[a, 1], lonlat[b, 0], lonlat[b, 1])
    keep = length <= 3_000.0          # no trench longer than 3 km between two sites
    a, b, length = a[keep], b[keep], length[keep]
    # An invented river winds west to east through the district.
    def river(lon):
        return _LAT0 + 0.45 * _DLAT + 0.03 * np.sin((lon - _LON0) * 19.0)
    crosses = (lonlat[a, 1] > river(lonlat[a, 0])) != (lonlat[b, 1] > river(lonlat[b, 0]))
    in_village = (village[a] >= 0) & (village[a] == village[b])
    u = rng.uniform(size=a.size)
    surface = np.where(u < 0.45, 0, np.where(u < 0.80, 1, 2))
    surface = np.where(in_village, np.where(rng.uniform(size=a.size) < 0.7, 3, 2), surface)
    surface = np.where(crosses, 4, surface)
    rate = np.array([r for _, r, _ in SURFACES])[surface]
    cost = np.round(length * rate, 2)
    ids = np.array([f"S{i:05d}" for i in range(n_sites)])
    kind = np.where(village >= 0, "village", "farm")
    sites = {"id": ids, "lon": np.round(lonlat[:, 0], 7), "lat": np.round(lonlat[:, 1], 7),
             "kind": kind}
    names = np.array([name for name, _, _ in SURFACES])
    link_ids = np.array([f"T{i:06d}" for i in range(a.size)])
    trenches = {"link_id": link_ids, "from": ids[a], "to": ids[b], "surface": names[surface],
                "length_m": np.round(length, 2), "cost": cost}
    return sites, trenches


def run(out_dir="fastmst-demo-output", *, n_sites=30_000, seed=2024, reporter=None, plot=True):
    """Generate, solve and write the demo into ``out_dir``; returns the summary dict."""
    import pyarrow as pa

    rep = reporter
    phase = rep.phase if rep is not None else (lambda name, total=None: nullcontext(None))
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    with phase("generating the invented district"):
        sites, trenches = generate(n_sites, seed)
        io.write_table(out / "sites.csv", pa.table(sites))
        io.write_table(out / "trenches.csv", pa.table(trenches))
    with phase("reading edges"):
        nodes = io.read_nodes(out / "sites.csv")
        edges = io.read_edges(out / "trenches.csv", tail="from", head="to", weight="cost",
                              nodes=nodes, link_id="link_id")
    with phase("solving"):
        forest = edges.solve()
    surf_names = np.asarray(trenches["surface"])
    lengths = np.asarray(trenches["length_m"])
    pos = forest.edges
    f_surface = surf_names[pos]
    f_length = lengths[pos]
    with phase("sensitivity"):
        sens = np.asarray(fastmst.sensitivity(edges.tail, edges.head, edges.weight, forest))
        # margins are differences of costs with two decimals: written to 15 significant
        # digits, so that 2308.47 is not written as 2308.4700000000003
        margin = np.array([float(f"{x:.15g}") for x in sens[pos].tolist()])
        with np.errstate(divide="ignore", invalid="ignore"):
            rel = np.where(forest.weights > 0, margin / forest.weights, np.inf)
        finite = np.flatnonzero(np.isfinite(rel))
        near = finite[np.lexsort((pos[finite], rel[finite]))][:10]
    table = io.forest_table(forest, edges)   # carries surface and length_m from the input
    table = table.append_column("margin", pa.array(margin))
    props = {"margin": margin}     # the carried columns (surface, length_m) come with the table
    files = []
    with phase("writing"):
        io.write_table(out / "backbone.csv", table)
        io.write_geojson(out / "backbone.geojson", forest, edges, properties=props)
        files += ["sites.csv", "trenches.csv", "backbone.csv", "backbone.geojson"]
    if plot:
        index = {name: k for k, (name, _, _) in enumerate(SURFACES)}
        groups = (np.array([index[x] for x in f_surface.tolist()], dtype=np.int64),
                  [n for n, _, _ in SURFACES], [c for _, _, c in SURFACES])
        with phase("plotting"):
            plot_forest(out / "backbone.png", edges, forest, groups=groups, highlight=near,
                        highlight_label=f"nearly tied cost choices ({len(near)})",
                        title=SCENARIO,
                        footnote="Invented data: no real place, network or price. A spanning "
                                 "tree has no redundancy; designs need review by licensed "
                                 "engineers under local codes.",
                        subtitle=f"cheapest backbone: {len(forest):,} trenches, "
                                 f"{f_length.sum() / 1000:,.1f} km, "
                                 f"{forest.weight:,.0f} {CURRENCY}")
        files.append("backbone.png")
    by_surface = {}
    for name, rate, _ in SURFACES:
        sel = f_surface == name
        by_surface[name] = {"cost_per_m": rate, "trenches": int(sel.sum()),
                            "km": round(float(f_length[sel].sum()) / 1000, 3),
                            "cost": round(float(forest.weights[sel].sum()), 2)}
    nearly_tied = []
    for i in near.tolist():
        a, b = edges.label([forest.tail[i], forest.head[i]]).tolist()
        nearly_tied.append({"from": a, "to": b, "surface": str(f_surface[i]),
                         "cost": float(forest.weights[i]), "margin": float(margin[i]),
                         "margin_percent": round(100 * float(rel[i]), 4),
                         "position": int(pos[i])})
    summary = {
        "scenario": SCENARIO, "invented": True, "output_folder": str(out),
        "sites": edges.n_nodes, "candidate_trenches": edges.n_edges,
        "components": forest.n_components, "backbone_trenches": len(forest),
        "backbone_km": round(float(f_length.sum()) / 1000, 3),
        "backbone_cost": round(forest.weight, 2), "currency": CURRENCY,
        "all_candidates_km": round(float(lengths.sum()) / 1000, 3),
        "by_surface": by_surface,
        "sensitivity": "computed",
        "bridges": int(np.isinf(margin).sum()),
        "nearly_tied_cost_choices": nearly_tied, "files": files,
        "seconds": {k: round(v, 4) for k, v in (rep.times.items() if rep else [])},
        "cautions": CAUTIONS,
    }
    summary["resilience"] = resilience(out, edges, forest, phase=phase, plot=plot)
    files += summary["resilience"]["files"]
    with open(out / "summary.json", "w", encoding="utf-8") as fh:
        json.dump(summary, fh, indent=2)
    (out / "README.txt").write_text(
        f"{SCENARIO}.\nEverything in this folder is invented: no real place, network or price.\n"
        f"Made by `fastmst demo --sites {n_sites} --seed {seed}`.\n\n"
        "sites.csv         site id, longitude, latitude (WGS 84 degrees), kind\n"
        "trenches.csv      candidate trenches: link_id, from, to, surface, length_m, cost\n"
        "backbone.csv      the cheapest backbone: from, to, cost, position (row in trenches.csv,\n"
        "                  from 0), link_id, surface, length_m, margin\n"
        "backbone.geojson  the backbone as RFC 7946 LineStrings\n"
        "backbone.png      map: backbone by surface over all candidates (grey)\n"
        "resilience.csv    backup trenches near the exchange: from, to, cost, position, why\n"
        "                  (tree or backup), single_point\n"
        "resilience.png    map: those backup trenches\n"
        "failures.png      map: the backbone trenches whose cut costs most to route around\n"
        "feeders.png       map: feeder cables of limited size from the exchange (Esau-Williams)\n"
        "shallow.png       map: a tree keeping every route from the exchange within 1.5 x\n"
        "                  the shortest\n"
        "summary.json      the figures printed on screen\n\n" + CAUTIONS + "\n",
        encoding="utf-8")
    files += ["summary.json", "README.txt"]
    return summary


def format_summary(s) -> str:
    """The demo summary as text for the screen."""
    lines = [s["scenario"] + ".", "",
             f"  sites                {s['sites']:,}",
             f"  candidate trenches   {s['candidate_trenches']:,} "
             f"({s['all_candidates_km']:,.1f} km)",
             f"  components           {s['components']:,}",
             f"  backbone trenches    {s['backbone_trenches']:,}",
             f"  backbone length      {s['backbone_km']:,.1f} km",
             f"  backbone cost        {s['backbone_cost']:,.0f} {s['currency']}",
             "", "  by surface (invented cost per metre):"]
    for name, d in s["by_surface"].items():
        lines.append(f"    {name:<15} {d['cost_per_m']:>6.0f}/m  {d['trenches']:>6,} trenches  "
                     f"{d['km']:>8,.1f} km  {d['cost']:>14,.0f}")
    lines.append("")
    if s["nearly_tied_cost_choices"]:
        lines.append("  nearly tied cost choices (smallest cost rise, in percent, that changes "
                     "the design):")
        for r in s["nearly_tied_cost_choices"]:
            lines.append(f"    {r['from']} -- {r['to']}  {r['surface']:<14} cost "
                         f"{r['cost']:>10,.0f}  may rise {r['margin']:>9,.2f} "
                         f"({r['margin_percent']:.3f} %)")
        lines.append(f"  links with no alternative route at any cost: {s['bridges']:,}")
    else:
        lines.append(f"  sensitivity: {s['sensitivity']}")
    if "resilience" in s:
        lines += resilience_lines(s["resilience"])
    lines += ["", f"  wrote to {s['output_folder']}/: " + ", ".join(s["files"])]
    if s["seconds"]:
        lines.append("  time: " + " | ".join(f"{k} {v:.2f} s" for k, v in s["seconds"].items()))
    return "\n".join(lines)
