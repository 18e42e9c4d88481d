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
from fastmst.cli.forests import link_words
from fastmst.cli.common import CAUTION, EXIT_OK, UsageError, derived, fmt_num, plural
from fastmst.plot import plot_forest
from fastmst.solve.totals import signed_sum, total

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
    common.add_output_options(p, layers=True)
    p.set_defaults(run=run)


def _factors(items) -> dict:
    out = {}
    given = {}
    for item in items:
        value, sep, factor = item.rpartition("=")
        try:
            f = float(factor)
        except ValueError:
            f = None
        if not sep or not value or f is None or not np.isfinite(f) or f < 0:
            raise UsageError(f"--scale {item!r}: expected VALUE=FACTOR with a factor >= 0, "
                             f"e.g. --scale \"asphalt road=1.25\".")
        if value in given:
            raise UsageError(f"--scale {item!r}: the category {value!r} is already scaled by "
                             f"--scale {given[value]!r}; give each category once.")
        given[value] = item
        out[value] = f
    return out


def scaled_weights(edges, category, factors: dict, by: str) -> np.ndarray:
    """The weights with each category's links multiplied by its factor, every other weight
    exactly as read.  Integer weights stay integers under whole-number factors; other factors
    need float64, which holds integers exactly only up to 2**53, so larger ones are refused.
    A product beyond the weight type's range is refused naming the link (it became inf, or
    wrapped around)."""
    w = np.asarray(edges.weight)
    masks = {v: category == v for v in factors}
    whole = all(float(f).is_integer() for f in factors.values())
    if w.dtype.kind in "iu" and whole:
        out, info = w.copy(), np.iinfo(w.dtype)
        for v, f in factors.items():
            m = masks[v]
            if not m.any():
                continue
            lo, hi = int(w[m].min()) * int(f), int(w[m].max()) * int(f)
            if lo < info.min or hi > info.max:
                p = int(np.flatnonzero(m)[np.argmax(np.abs(w[m].astype(object)))])
                raise ValueError(f"--scale {v}={f:g}: {link_words(edges, p)} would weigh "
                                 f"{int(w[p]) * int(f):,}, beyond the {w.dtype} weights of "
                                 f"{edges.source} (at most {info.max:,}); give a smaller "
                                 f"factor.")
            out[m] = w[m] * w.dtype.type(int(f))
        return out
    if w.dtype.kind in "iu" and w.size:
        big = max(abs(int(w.min())), abs(int(w.max())))
        if big > 2 ** 53:
            raise ValueError(f"--scale: {edges.source} has integer weights up to {big:,}; a "
                             f"factor that is not a whole number is applied in float64, which "
                             f"holds integers exactly only up to 2**53 = {2 ** 53:,}, and "
                             f"would round weights it was not asked to change. Use whole-"
                             f"number factors, or weights in smaller units.")
    out = w.astype(np.float64)
    with np.errstate(over="ignore"):
        for v, f in factors.items():
            out[masks[v]] *= f
    over = np.flatnonzero(~np.isfinite(out) & np.isfinite(w.astype(np.float64)))
    if over.size:
        p = int(over[0])
        raise ValueError(f"--scale {category[p]}={factors[category[p]]:g}: "
                         f"{link_words(edges, p)} would weigh more than the largest float64 "
                         f"(about 1.8e308); give a smaller factor, or weights in smaller "
                         f"units ({by} has {plural(over.size, 'such link')}).")
    return out


def _plot(path, scenario, before, after, factors, by) -> None:
    """The scenario's design over the candidate links, the links that enter it in red."""
    entering = np.flatnonzero(~np.isin(after.edges, before.edges))
    scale = ", ".join(f"{k} x{v:g}" for k, v in factors.items())
    plot_forest(path, scenario, after, highlight=entering,
                highlight_label=f"links entering the design ({entering.size:,})",
                title="What-if: the design with scaled costs",
                subtitle=f"{scenario.source}: {by} {scale}; {entering.size:,} links enter, "
                         f"{int(np.count_nonzero(~np.isin(before.edges, after.edges))):,} "
                         f"leave",
                footnote=CAUTION)


def run(args) -> int:
    factors = _factors(args.scale)
    common.check_outputs(args)
    rep = common.reporter(args)
    with rep:
        edges = common.load_edges(args, rep)
        common.check_geojson_coordinates(args, edges)
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
        new_weight = scaled_weights(edges, category, factors, args.by)
        constraints = {k: v for k, v in (("required", before.required),
                                         ("excluded", before.excluded)) if v.size}
        with rep.phase("solving the scenario"):
            after = fastmst.minimum_spanning_forest(edges.tail, edges.head, new_weight,
                                                    edges.n_nodes, maximize=args.maximize,
                                                    **constraints)
        scenario = dataclasses.replace(edges, weight=new_weight)
        if args.output or args.plot:
            with io.StagedOutputs() as staged:
                with rep.phase("writing"):
                    for out in args.output:
                        io.write_forest(staged.path(out), after, scenario,
                                        spreadsheet_safe=args.spreadsheet_safe)
                if args.plot:
                    with rep.phase("plotting"):
                        _plot(staged.path(args.plot), scenario, before, after, factors, args.by)
                staged.commit()
    old_set, new_set = set(before.edges.tolist()), set(after.edges.tolist())
    entering = sorted(new_set - old_set, key=lambda p: (new_weight[p], p))
    leaving = sorted(old_set - new_set, key=lambda p: (-float(edges.weight[p]), p))
    old_at_new = derived(total(new_weight[before.edges]))
    saving = signed_sum([(new_weight[before.edges], 1), (new_weight[after.edges], -1)])
    out = {"source": edges.source, "by": args.by, "scale": factors,
           "total_before": derived(before.weight),
           "old_design_at_new_costs": old_at_new,
           "total_after": derived(after.weight),
           "saving_from_redesign": derived(saving),
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
                  "weight_before": derived(total(np.asarray(weight)[b])),
                  "weight_after": derived(total(new_weight[a]))}
    return out


def _change(edges, p, new_weight) -> dict:
    """A link entering or leaving: its input weight and its weight in the scenario."""
    d = common.link_json(edges, p)
    d["new_weight"] = derived(new_weight[p])
    return d
