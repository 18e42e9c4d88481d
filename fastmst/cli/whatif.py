"""``fastmst what-if``: the design again with the costs of some categories scaled (asphalt
dearer, aerial cheaper, ...), and what changes."""
from __future__ import annotations

import argparse
import dataclasses
import json

import numpy as np

import fastmst
from fastmst import io
from fastmst.cli import common
from fastmst.cli.common import CAUTION, EXIT_OK, UsageError, derived, fmt_num, plural

EPILOG = """examples:
  fastmst what-if links.csv --by route_type --scale "asphalt road=1.25"
  fastmst what-if links.csv --by route_type --scale aerial=0.8 --scale duct=1.1 -o new.csv
"""


def add_parser(sub):
    p = sub.add_parser("what-if", help="re-solve with costs scaled by category; what changes",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Multiply the weight of every link of the chosen categories "
                                   "(values of the --by column) by a factor, solve the design "
                                   "again under the same --required/--excluded links, and "
                                   "report the new total and the links that enter and leave.")
    common.add_input_options(p)
    g = p.add_argument_group("scenario")
    g.add_argument("--by", metavar="COLUMN", required=True,
                   help="the category column of the input (e.g. route_type)")
    g.add_argument("--scale", metavar="VALUE=FACTOR", action="append", required=True,
                   help="multiply the weights of links whose --by column is VALUE by FACTOR; "
                        "repeat for several categories")
    g.add_argument("--maximize", action="store_true", help="maximum spanning forest")
    common.add_constraint_options(g)
    g.add_argument("--limit", type=int, default=10, metavar="N",
                   help="links entering and leaving listed on screen (default 10)")
    common.add_output_options(p)
    p.set_defaults(run=run)


def _factors(items) -> dict:
    out = {}
    for item in items:
        value, sep, factor = item.rpartition("=")
        try:
            f = float(factor)
        except ValueError:
            f = None
        if not sep or not value or f is None or not np.isfinite(f) or f < 0:
            raise UsageError(f"--scale {item!r}: expected VALUE=FACTOR with a factor >= 0, "
                             f"e.g. --scale \"asphalt road=1.25\".")
        out[value] = f
    return out


def run(args) -> int:
    factors = _factors(args.scale)
    common.check_outputs(args)
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        attrs = edges.attributes
        if attrs is None or args.by not in attrs.column_names:
            have = ", ".join(attrs.column_names) if attrs is not None else "none"
            raise UsageError(f"--by {args.by}: not a column carried from {edges.source} "
                             f"(carried: {have}; --keep-columns must keep it).")
        category = np.asarray([str(x) for x in attrs.column(args.by).to_pylist()], dtype=object)
        missing = sorted(set(factors) - set(category.tolist()))
        if missing:
            raise ValueError(f"--scale {missing[0]!r}: no link has {args.by} = {missing[0]!r}; "
                             f"the values are {', '.join(sorted(set(category.tolist()))[:12])}.")
        before, links = common.solve_design(args, edges, rep)
        scale = np.ones(edges.n_edges, dtype=np.float64)
        for value, f in factors.items():
            scale[category == value] = f
        new_weight = np.asarray(edges.weight, dtype=np.float64) * scale
        constraints = {k: v for k, v in (("required", before.required),
                                         ("excluded", before.excluded)) if v.size}
        with rep.phase("solving the scenario"):
            after = fastmst.minimum_spanning_forest(edges.tail, edges.head, new_weight,
                                                    edges.n_nodes, maximize=args.maximize,
                                                    **constraints)
        scenario = dataclasses.replace(edges, weight=new_weight)
        if args.output:
            with io.StagedOutputs() as staged:
                with rep.phase("writing"):
                    for out in args.output:
                        io.write_forest(staged.path(out), after, scenario,
                                        spreadsheet_safe=args.spreadsheet_safe)
                staged.commit()
    old_set, new_set = set(before.edges.tolist()), set(after.edges.tolist())
    entering = sorted(new_set - old_set, key=lambda p: (new_weight[p], p))
    leaving = sorted(old_set - new_set, key=lambda p: (-float(edges.weight[p]), p))
    old_at_new = derived(float(new_weight[before.edges].sum()))
    out = {"source": edges.source, "by": args.by, "scale": factors,
           "total_before": derived(before.weight),
           "old_design_at_new_costs": old_at_new,
           "total_after": derived(after.weight),
           "saving_from_redesign": derived(old_at_new - after.weight),
           "links_entering": len(entering), "links_leaving": len(leaving),
           "entering": [_change(edges, p, new_weight) for p in entering],
           "leaving": [_change(edges, p, new_weight) for p in leaving],
           "by_category": _by_category(category, before, after, edges.weight, new_weight),
           "written": list(args.output), "seconds": common.seconds(rep.times),
           "caution": CAUTION}
    if links:
        out["links_named"] = links
    if args.json:
        print(json.dumps(out, indent=2))
    elif not args.quiet:
        rows = [("scale", ", ".join(f"{k} x{fmt_num(v)}" for k, v in factors.items())),
                ("total before", fmt_num(out["total_before"])),
                ("old design at new costs", fmt_num(old_at_new)),
                ("total after", fmt_num(out["total_after"])),
                ("saving from redesign", fmt_num(out["saving_from_redesign"])),
                ("links changed", f"{plural(len(entering), 'link')} "
                                  f"{'enters' if len(entering) == 1 else 'enter'}, "
                                  f"{plural(len(leaving), 'link')} "
                                  f"{'leaves' if len(leaving) == 1 else 'leave'}")]
        rows += common.constraint_rows(links)
        if args.output:
            rows.append(("wrote", ", ".join(args.output)))
        common.print_block(f"fastmst what-if: {edges.source}", rows)
        print(f"  by {args.by} (links before -> after):")
        for k, d in out["by_category"].items():
            print(f"    {k:<20} {d['links_before']:>8,} -> {d['links_after']:<8,}")
        for word, lst in (("enters", out["entering"]), ("leaves", out["leaving"])):
            for d in lst[:args.limit]:
                print(f"  {word}: {common.link_text(d, edges)}"
                      + (f", new weight {fmt_num(d['new_weight'])}"
                         if d["new_weight"] != d["weight"] else ""))
            if len(lst) > args.limit:
                print(f"  ... {plural(len(lst) - args.limit, 'more link')} {word[:-1]} "
                      f"(see --json)")
    common.print_caution(args)
    return EXIT_OK


def _by_category(category, before, after, weight, new_weight) -> dict:
    out = {}
    for k in sorted(set(category.tolist())):
        b = before.edges[category[before.edges] == k]
        a = after.edges[category[after.edges] == k]
        out[k] = {"links_before": int(b.size), "links_after": int(a.size),
                  "weight_before": derived(float(np.asarray(weight, dtype=np.float64)[b].sum())),
                  "weight_after": derived(float(new_weight[a].sum()))}
    return out


def _change(edges, p, new_weight) -> dict:
    """A link entering or leaving: its input weight and its weight in the scenario."""
    d = common.link_json(edges, p)
    d["new_weight"] = derived(new_weight[p])
    return d
