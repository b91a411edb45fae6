"""The ``errdist`` command.

Sub-commands dispatch to the modules that own the work:

- ``errdist demo``     the demo month (``errdist.workbook.commands.run_demo``)
- ``errdist refresh``  the unattended monthly job (``errdist.workbook.commands.run_refresh``)
- ``errdist check``    audit a workbook (``errdist.workbook.commands.run_check``)
- ``errdist freeze``   a values copy for recipients (``errdist.workbook.commands.run_freeze``)
- ``errdist backtest`` backtest VaR/ES models over a price history
  (``errdist.backtest_command.run_backtest``)
- ``errdist panel``    many series at once (``errdist.panel.command.run_panel``)
- ``errdist vba``      write the VBA module for manual import (``errdist.sheet.vba.main``)
- ``errdist libreoffice install|uninstall``  live functions in LibreOffice Calc
  (``errdist.libreoffice.commands.run``)
- ``errdist version``  versions, for audit trails

Exit codes (the same for every sub-command; docs/security-and-limits.md):

- 0  done (``check``: every formula cell matches);
- 1  ``check``: some cells differ or cannot be recomputed; ``refresh``: the workbook was
  written but its headline figures could not be computed (n/a);
- 4  ``check``: formulas differ from the template's (5: values and formulas differ);
- 2  the input cannot be read or is refused (bad arguments, missing/unsafe/damaged file,
  bad data, a limit exceeded): one line on standard error, nothing written;
- 70 an internal error (a defect of errdist): one line on standard error; set
  ``ERRDIST_DEBUG=1`` to see the traceback;
- 130 interrupted (Ctrl+C); 143 terminated (SIGTERM); temporary files are removed.
"""

from __future__ import annotations

import argparse
import contextlib
import importlib
import os
import signal
import sys
import threading
from collections.abc import Callable, Iterator, Sequence

from errdist import __version__, _tempfiles

EXIT_OK = 0
EXIT_DIFFERS = 1
EXIT_CANNOT_READ = 2
EXIT_INTERNAL = 70  # EX_SOFTWARE of sysexits.h


def _dispatch(module: str, function: str) -> Callable[[argparse.Namespace], int]:
    def run(args: argparse.Namespace) -> int:
        return int(getattr(importlib.import_module(module), function)(args) or 0)

    return run


#: Packages of the ``headless`` extra (the workbook commands need them).
HEADLESS_PACKAGES = frozenset({"formulas", "xlsxwriter", "openpyxl", "defusedxml"})
HEADLESS_HINT = 'pip install "errdist[headless]"'


def _missing_headless(exc: ImportError) -> str | None:
    """The missing package of the headless extra behind ``exc``, or None."""
    root = (exc.name or "").split(".")[0].lower()
    return root if root in HEADLESS_PACKAGES else None


#: Commands that read or write workbooks (they need the headless extra).
WORKBOOK_COMMANDS = frozenset({"refresh", "check", "freeze"})


def missing_headless_package() -> str | None:
    """The first package of the headless extra that cannot be imported, or None."""
    import importlib.util

    for name in sorted(HEADLESS_PACKAGES):
        try:
            if importlib.util.find_spec(name) is None:
                return name
        except (ImportError, ValueError):
            return name
    return None


def _run_demo(args: argparse.Namespace) -> int:
    if missing_headless_package() is None:
        try:
            commands = importlib.import_module("errdist.workbook.commands")
            return int(commands.run_demo(args) or 0)
        except ImportError as exc:
            if _missing_headless(exc) is None:
                raise
    from errdist.data.demo_report import print_demo_fit

    return print_demo_fit()


def _dist_version(name: str) -> str:
    """Installed version of a distribution from its metadata (no import of the package)."""
    from importlib import metadata

    try:
        return metadata.version(name)
    except metadata.PackageNotFoundError:
        return "not installed"


def _run_version(args: argparse.Namespace) -> int:
    print(
        f"errdist {__version__} (numpy {_dist_version('numpy')}, scipy {_dist_version('scipy')}, "
        f"pandas {_dist_version('pandas')}, Python {sys.version.split()[0]})"
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
    demo.add_argument(
        "--values-copy",
        dest="values_copy",
        default=None,
        help="also write a values copy (no formulas) for readers without the add-in",
    )
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
    refresh.add_argument(
        "--sheet",
        default=None,
        help="the sheet of an .xlsx prices file that holds the prices (default: the first)",
    )
    refresh.add_argument("--force", action="store_true", help="overwrite an existing file")
    refresh.add_argument(
        "--values-copy",
        dest="values_copy",
        default=None,
        help="also write a values copy (no formulas) for readers without the add-in",
    )
    refresh.set_defaults(func=_dispatch("errdist.workbook.commands", "run_refresh"))

    check = sub.add_parser(
        "check",
        help="recompute every formula of a workbook and list cells whose stored value differs",
    )
    check.add_argument("book", help="workbook to check (.xlsx)")
    check.add_argument(
        "--tolerance", type=float, default=1e-9, help="relative tolerance (default 1e-9)"
    )
    check.add_argument(
        "--engine",
        choices=("formulas", "libreoffice"),
        default="formulas",
        help="what recomputes: the headless 'formulas' engine (default) or LibreOffice Calc, "
        "live (needs libreoffice-calc, python3-uno, libreoffice-script-provider-python)",
    )
    check.add_argument(
        "--venv",
        default=None,
        help="with --engine libreoffice: virtual environment made with LibreOffice's Python "
        "(default: this one)",
    )
    check.set_defaults(func=_dispatch("errdist.workbook.commands", "run_check"))

    freeze = sub.add_parser(
        "freeze", help="write a values copy of a workbook (no formulas) for recipients"
    )
    freeze.add_argument("book", help="the live workbook (.xlsx)")
    freeze.add_argument("--out", required=True, help="the values copy to write (.xlsx)")
    freeze.add_argument("--force", action="store_true", help="overwrite an existing file")
    freeze.set_defaults(func=_dispatch("errdist.workbook.commands", "run_freeze"))

    lo = sub.add_parser("libreoffice", help="live ERRDIST_ functions in LibreOffice Calc")
    lo_sub = lo.add_subparsers(dest="lo_command", metavar="ACTION")
    lo_install = lo_sub.add_parser(
        "install", help="install (or refresh) the functions in a LibreOffice profile"
    )
    lo_uninstall = lo_sub.add_parser("uninstall", help="remove them from the profile")
    for p in (lo_install, lo_uninstall):
        p.add_argument(
            "--profile",
            default=None,
            help="LibreOffice profile folder (default: the user's, e.g. ~/.config/libreoffice/4)",
        )
    lo_install.add_argument(
        "--venv",
        default=None,
        help="virtual environment made with LibreOffice's Python that has errdist "
        "(default: this one)",
    )
    lo.set_defaults(func=_dispatch("errdist.libreoffice.commands", "run"))
    from errdist.backtest_command import add_parser as add_backtest

    add_backtest(sub)

    from errdist.panel.command import add_parser as add_panel_parser

    add_panel_parser(sub)

    vba = sub.add_parser("vba", help="write the VBA module (.bas) for manual import")
    vba.add_argument("--out", default=None, help="file to write, .bas (default: standard output)")
    vba.add_argument("--force", action="store_true", help="overwrite an existing file")
    vba.set_defaults(func=_dispatch("errdist.sheet.vba", "main"))

    version = sub.add_parser("version", help="print versions for audit trails")
    version.set_defaults(func=_run_version)
    return parser


class _Terminated(BaseException):
    """SIGTERM arrived: unwind (removing temporary files) and exit with code 143."""


@contextlib.contextmanager
def _terminate_cleanly() -> Iterator[None]:
    """Turn SIGTERM into :class:`_Terminated` while a command runs, so every ``finally`` and
    temporary folder is cleaned up (the default action kills the process on the spot)."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return

    def handler(signum: int, frame: object) -> None:
        raise _Terminated

    previous = signal.signal(signal.SIGTERM, handler)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, previous)


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``errdist`` command; returns the exit code."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "command", None):
        parser.print_help()
        return 2
    if args.command in WORKBOOK_COMMANDS:
        missing = missing_headless_package()
        if missing is not None:
            print(
                f"errdist {args.command}: needs the 'headless' extra ({missing} is not "
                f"installed): {HEADLESS_HINT}",
                file=sys.stderr,
            )
            return 2
    try:
        with _terminate_cleanly(), _tempfiles.run_folder():
            return args.func(args)
    except _Terminated:
        print("errdist: terminated; nothing written", file=sys.stderr)
        return 143
    except (ValueError, OSError) as exc:
        print(f"errdist {args.command}: {exc}", file=sys.stderr)
        return EXIT_CANNOT_READ
    except ImportError as exc:
        missing = _missing_headless(exc)
        if missing is None:
            raise
        print(
            f"errdist {args.command}: needs the 'headless' extra ({missing} is not installed): "
            f"{HEADLESS_HINT}",
            file=sys.stderr,
        )
        return 2
    except KeyboardInterrupt:
        print("errdist: interrupted; nothing written", file=sys.stderr)
        return 130
    except Exception as exc:  # a defect: say so in one line, keep exit code 1 for "differs"
        if os.environ.get("ERRDIST_DEBUG"):
            raise
        print(
            f"errdist {args.command}: internal error ({type(exc).__name__}: {exc}); nothing "
            "written. Please report it; ERRDIST_DEBUG=1 shows the traceback",
            file=sys.stderr,
        )
        return EXIT_INTERNAL


if __name__ == "__main__":
    sys.exit(main())
