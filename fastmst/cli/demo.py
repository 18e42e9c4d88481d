"""``fastmst demo``: the invented fibre-backbone scenario of :mod:`fastmst.demo`, solved end to
end and written to a folder."""
from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

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
                   help="output folder (default ./fastmst-demo-output): a new or empty folder, "
                        "or one an earlier demo wrote (its files are replaced)")
    p.add_argument("--sites", type=int, default=30_000, metavar="N",
                   help=f"number of sites, {MIN_SITES:,} to {MAX_SITES:,} (default 30000)")
    p.add_argument("--seed", type=int, default=2024,
                   help="random seed, 0 or more (default 2024)")
    p.add_argument("--no-plot", action="store_true", help="skip the PNG map")
    common.add_output_options(p, outputs=False)
    p.set_defaults(run=run)


MIN_SITES, MAX_SITES = 10, 1_000_000


def run(args) -> int:
    if args.sites < MIN_SITES:
        raise UsageError(f"--sites {args.sites}: the demo needs at least {MIN_SITES} sites.")
    if args.sites > MAX_SITES:
        raise UsageError(f"--sites {args.sites:,}: the demo generates at most {MAX_SITES:,} "
                         f"sites; give a smaller number (solve your own files of any size "
                         f"with 'fastmst solve').")
    if args.seed < 0:
        raise UsageError(f"--seed {args.seed}: expected a seed of 0 or more, e.g. --seed 7.")
    check_folder(args.out)
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


def check_folder(out: str) -> None:
    """Create ``--out`` when it is new; otherwise it must be an empty folder or one an
    earlier demo wrote (its ``summary.json`` names the invented scenario): the demo writes
    sites.csv, trenches.csv and more there, and must never replace the user's own files."""
    path = Path(out)
    if path.exists() and not path.is_dir():
        raise OSError(f"--out {out}: is a file; expected a folder for the demo's files. "
                      f"Choose a new folder name.")
    if not path.is_dir():
        try:
            path.mkdir(parents=True)
        except OSError as exc:
            raise OSError(f"--out {out}: cannot create the folder ({exc.strerror}); check the "
                          f"path, or choose a folder you may write to.") from None
        return
    try:
        names = sorted(p.name for p in path.iterdir())
    except OSError as exc:
        raise UsageError(f"--out {out}: cannot list the folder ({exc.strerror}); choose "
                         f"another.") from None
    if not names or _written_by_demo(path / "summary.json"):
        return
    shown = ", ".join(names[:5]) + (f", ... ({len(names)} in all)" if len(names) > 5 else "")
    raise UsageError(f"--out {out}: the folder holds files the demo did not write ({shown}); "
                     f"the demo writes sites.csv, trenches.csv and more there and would "
                     f"replace files of the same names. Choose a new or empty folder.")


def _written_by_demo(summary) -> bool:
    try:
        with open(summary, encoding="utf-8") as fh:
            d = json.load(fh)
    except (OSError, ValueError):
        return False
    return isinstance(d, dict) and d.get("invented") is True and \
        d.get("scenario") == demo.SCENARIO
