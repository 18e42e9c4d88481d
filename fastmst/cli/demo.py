"""``fastmst demo``: the invented fibre-backbone scenario of :mod:`fastmst.demo`, solved end to
end and written to a folder."""
from __future__ import annotations

import argparse
import json
import sys

from fastmst import demo
from fastmst.cli import common
from fastmst.cli.common import CAUTION, EXIT_OK, UsageError

EPILOG = """examples:
  fastmst demo
  fastmst demo --out /tmp/vale --sites 50000 --seed 7
"""


def add_parser(sub):
    p = sub.add_parser("demo", help="invented fibre-backbone scenario, solved end to end",
                       epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
                       description="Generate an invented rural district (sites, a road network, "
                                   "trench costs by surface), solve its cheapest fibre backbone "
                                   "and write CSV, GeoJSON and a PNG map to an output folder.")
    p.add_argument("--out", default="fastmst-demo-output", metavar="DIR",
                   help="output folder (default ./fastmst-demo-output)")
    p.add_argument("--sites", type=int, default=30_000, metavar="N",
                   help="number of sites (default 30000)")
    p.add_argument("--seed", type=int, default=2024, help="random seed (default 2024)")
    p.add_argument("--no-plot", action="store_true", help="skip the PNG map")
    common.add_output_options(p, outputs=False)
    p.set_defaults(run=run)


def run(args) -> int:
    if args.sites < 10:
        raise UsageError(f"--sites {args.sites}: the demo needs at least 10 sites.")
    rep = common.reporter(args)
    with rep:
        summary = demo.run(args.out, n_sites=args.sites, seed=args.seed, reporter=rep,
                           plot=not args.no_plot)
    if args.json:
        print(json.dumps(summary, indent=2))
    elif not args.quiet:
        print(demo.format_summary(summary))
    if not args.json:
        print(demo.CAUTIONS if not args.quiet else CAUTION,
              file=sys.stdout if not args.quiet else sys.stderr)
    return EXIT_OK
