"""The ``fastmst`` command: solve, check, clusters, margins, path, what-if, bench and demo.

One module per subcommand (:mod:`~fastmst.cli.solve`, :mod:`~fastmst.cli.check`,
:mod:`~fastmst.cli.clusters`, :mod:`~fastmst.cli.margins`, :mod:`~fastmst.cli.path`,
:mod:`~fastmst.cli.whatif`, :mod:`~fastmst.cli.bench`, :mod:`~fastmst.cli.demo`), each with
``add_parser(subparsers)`` and ``run(args) -> exit code``; shared options, exit codes and the
caution are in :mod:`~fastmst.cli.common`.  Adding a command: a new module with those two
functions, listed in :data:`COMMANDS`.

Exit codes: 0 success; 1 bad data (unreadable or malformed files, invalid values); 2 bad usage
(unknown options, conflicting or missing arguments, unknown output formats); 3 ``check`` ran and
the given forest is not a minimum spanning forest.  Errors print one message without a traceback;
``--debug`` shows the traceback.  A reader that closes stdout early (``| head``) ends the
run quietly (exit 1).  Anything unexpected is still one message (exit 1) asking for
a report.  Outputs are written only once everything that can fail has succeeded
(:class:`fastmst.io.StagedOutputs`), so a failed run leaves no output behind.
"""
from __future__ import annotations

import argparse
import os
import sys

import fastmst
from fastmst.cli import bench, check, clusters, demo, margins, path, solve, whatif
from fastmst.cli import backup, failures, feeders, shallow
from fastmst.cli.common import EXIT_DATA, EXIT_USAGE, UsageError
from fastmst.cli.paths import os_error_text

COMMANDS = (solve, check, clusters, margins, path, whatif, failures, backup, feeders, shallow,
            bench, demo)


def build_parser() -> argparse.ArgumentParser:
    """The argument parser with every subcommand."""
    parser = argparse.ArgumentParser(
        prog="fastmst",
        description="Minimum spanning forests of edge-list files: fast, exact, deterministic.",
        epilog="examples:\n  fastmst demo\n  fastmst solve links.csv -o forest.csv\n"
               "  fastmst solve --help\n\nexit codes: 0 success, 1 bad data, 2 bad usage, "
               "3 check: not minimum",
        formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--version", action="version", version=f"fastmst {fastmst.__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for command in COMMANDS:
        command.add_parser(sub)
    return parser


def main(argv=None) -> int:
    """Run the command line; returns the exit code (also the process's, via ``fastmst``)."""
    parser = build_parser()
    argv = sys.argv[1:] if argv is None else list(argv)
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: --help/--version exit 0, bad usage exits 2
        return int(exc.code or 0)
    if args.command is None:
        parser.print_help()
        return EXIT_USAGE
    debug = getattr(args, "debug", False)
    try:
        return args.run(args)
    except UsageError as exc:
        if debug:
            raise
        print(f"fastmst {args.command}: usage error: {exc}", file=sys.stderr)
        return EXIT_USAGE
    except ImportError as exc:
        if debug:
            raise
        print(f"fastmst {args.command}: error: {exc}; the command line needs its extras: "
              f"pip install \"fastmst[cli]\"", file=sys.stderr)
        return EXIT_DATA
    except BrokenPipeError:
        # the reader of stdout stopped (| head): stop quietly, as command-line tools do; stdout
        # goes to the null device so that the interpreter's last flush does not fail again
        try:
            os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        except (OSError, ValueError):
            pass
        return EXIT_DATA
    except (ValueError, TypeError, OSError, MemoryError, ArithmeticError) as exc:
        if debug:
            raise
        text = os_error_text(exc) if isinstance(exc, OSError) else exc
        print(f"fastmst {args.command}: error: {text}", file=sys.stderr)
        if isinstance(exc, MemoryError):
            print("  (out of memory; run again with --debug for the traceback)", file=sys.stderr)
        return EXIT_DATA
    except KeyboardInterrupt:
        print("fastmst: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:   # a bug: still one message, never a traceback without --debug
        if debug:
            raise
        print(f"fastmst {args.command}: unexpected error ({type(exc).__name__}: {exc}); please "
              f"report it with the command line, and run again with --debug for the "
              f"traceback.", file=sys.stderr)
        return EXIT_DATA
