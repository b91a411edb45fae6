"""The ``errdist`` command.

Sub-commands dispatch to the modules that own the work:

- ``errdist demo``     the demo month (``errdist.workbook.commands.run_demo``)
- ``errdist refresh``  the unattended monthly job (``errdist.workbook.commands.run_refresh``)
- ``errdist check``    audit a workbook (``errdist.workbook.commands.run_check``)
- ``errdist backtest`` backtest VaR/ES models over a price history
  (``errdist.backtest_command.run_backtest``)
- ``errdist vba``      write the VBA module for manual import (``errdist.sheet.vba.main``)
- ``errdist version``  versions, for audit trails

Errors in the user's input are printed as one line on standard error with exit code 2; no
traceback is shown for them.
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Callable, Sequence

from errdist import __version__


def _dispatch(module: str, function: str) -> Callable[[argparse.Namespace], int]:
    def run(args: argparse.Namespace) -> int:
        return int(getattr(importlib.import_module(module), function)(args) or 0)

    return run


def _run_demo(args: argparse.Namespace) -> int:
    try:
        commands = importlib.import_module("errdist.workbook.commands")
    except ImportError:
        from errdist.data.demo_report import print_demo_fit

        return print_demo_fit()
    return int(commands.run_demo(args) or 0)


def _run_version(args: argparse.Namespace) -> int:
    import numpy
    import pandas
    import scipy

    print(
        f"errdist {__version__} (numpy {numpy.__version__}, scipy {scipy.__version__}, "
        f"pandas {pandas.__version__}, Python {sys.version.split()[0]})"
    )
    return 0


def build_parser() -> argparse.ArgumentParser:
    """Build the argument parser of the ``errdist`` command."""
    parser = argparse.ArgumentParser(
        prog="errdist",
        description="Generalized normal (error) distribution: fit return series, risk "
        "figures, and the monthly risk workbook.",
    )
    parser.add_argument("--version", action="version", version=f"errdist {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    demo = sub.add_parser("demo", help="build and evaluate the demo month's risk workbook")
    demo.add_argument(
        "--out",
        default=None,
        help="workbook to write (default: errdist-demo.xlsx in the current folder)",
    )
    demo.add_argument("--force", action="store_true", help="overwrite an existing file")
    demo.set_defaults(func=_run_demo)

    refresh = sub.add_parser("refresh", help="build the month's workbook from a prices file")
    refresh.add_argument("--prices", required=True, help="CSV or xlsx with dates and prices")
    refresh.add_argument("--out", required=True, help="workbook to write (.xlsx)")
    refresh.add_argument(
        "--as-of",
        dest="as_of",
        default=None,
        help="last date to use (YYYY-MM-DD); default: the last row",
    )
    refresh.add_argument(
        "--date-column",
        dest="date_column",
        default=None,
        help="name of the date column (default: detected)",
    )
    refresh.add_argument(
        "--price-column",
        dest="price_column",
        default=None,
        help="name of the price column (default: detected)",
    )
    refresh.add_argument("--force", action="store_true", help="overwrite an existing file")
    refresh.set_defaults(func=_dispatch("errdist.workbook.commands", "run_refresh"))

    check = sub.add_parser(
        "check",
        help="recompute every formula of a workbook and list cells whose stored value differs",
    )
    check.add_argument("book", help="workbook to check (.xlsx)")
    check.add_argument(
        "--tolerance", type=float, default=1e-9, help="relative tolerance (default 1e-9)"
    )
    check.set_defaults(func=_dispatch("errdist.workbook.commands", "run_check"))

    from errdist.backtest_command import add_parser as add_backtest

    add_backtest(sub)

    vba = sub.add_parser("vba", help="write the VBA module (.bas) for manual import")
    vba.add_argument("--out", default=None, help="file to write (default: standard output)")
    vba.set_defaults(func=_dispatch("errdist.sheet.vba", "main"))

    version = sub.add_parser("version", help="print versions for audit trails")
    version.set_defaults(func=_run_version)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``errdist`` command; returns the exit code."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "command", None):
        parser.print_help()
        return 2
    try:
        return args.func(args)
    except (ValueError, OSError) as exc:
        print(f"errdist {args.command}: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("errdist: interrupted; nothing written", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
