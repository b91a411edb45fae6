"""The unattended commands: ``errdist demo``, ``errdist refresh``, ``errdist check`` and
``errdist freeze``.

``errdist.cli`` parses the arguments and calls :func:`run_demo`, :func:`run_refresh` and
:func:`run_check`; each returns the exit code. Bad input raises ``ValueError``/``OSError``
subclasses, which the CLI prints as one line (exit code 2). Workbooks are written atomically
(:mod:`errdist.workbook.atomic`): the output file is either complete or not there at all, and
an existing file is overwritten only with ``--force``.

A step still running after a second is announced on standard error (``evaluating workbook…``,
then ``evaluating workbook: done in 4.1 s``); the summary goes to standard output.
"""

from __future__ import annotations

import argparse
import math
import re
import sys
import threading
import time
import warnings
from collections.abc import Callable, Iterator, Mapping
from contextlib import contextmanager
from pathlib import Path
from typing import Any, TextIO

from errdist.errors import InsufficientDataError
from errdist.workbook.atomic import atomic_path, check_target

DEFAULT_DEMO_FILE = "errdist-demo.xlsx"
"""Workbook written by ``errdist demo`` when ``--out`` is not given (in the current folder)."""

PROGRESS_AFTER = 1.0
"""Steps that take at least this many seconds get a progress line."""

MAX_LISTED = 50
"""Mismatches printed by ``errdist check`` before "... and N more"."""


class _Progress:
    """Times named steps; announces a step still running after ``PROGRESS_AFTER`` seconds.

    A step that is still running after ``PROGRESS_AFTER`` seconds prints ``name…`` at once
    (from a timer thread), and ``name: done in 2.3 s`` when it ends; quicker steps print
    nothing.
    """

    def __init__(self, stream: TextIO | None = None) -> None:
        self.stream = stream
        self.timings: dict[str, float] = {}
        self._lock = threading.Lock()

    def _say(self, text: str) -> None:
        with self._lock:
            sys.stdout.flush()
            print(text, file=self.stream or sys.stderr, flush=True)

    @contextmanager
    def step(self, name: str) -> Iterator[None]:
        announced = threading.Event()

        def announce() -> None:
            announced.set()
            self._say(f"{name}…")

        timer = threading.Timer(PROGRESS_AFTER, announce)
        timer.daemon = True
        t0 = time.perf_counter()
        timer.start()
        try:
            yield
        finally:
            timer.cancel()
            elapsed = time.perf_counter() - t0
            self.timings[name] = elapsed
            if announced.is_set():
                self._say(f"{name}: done in {elapsed:.1f} s")


def _evaluator_with_progress(
    progress: _Progress,
) -> Callable[[Path], Mapping[tuple[str, str], Any]]:
    from errdist.workbook import engine

    def evaluate(path: Path) -> Mapping[tuple[str, str], Any]:
        with progress.step("evaluating workbook"):
            return engine.evaluate_workbook(path)

    return evaluate


def _build(
    prices: Any, out: Path, *, fund_name: str, as_of: Any, force: bool, progress: _Progress
) -> Any:
    """Build the workbook into a temporary file and move it onto ``out`` atomically."""
    from errdist.workbook import template

    with atomic_path(out, force=force) as tmp, progress.step("building workbook"):
        return template.build_workbook(
            prices,
            tmp,
            fund_name=fund_name,
            as_of=as_of,
            evaluate=_evaluator_with_progress(progress),
        )


def _float(v: Any) -> float:
    try:
        return float(v)
    except (TypeError, ValueError):
        return math.nan


def _num(v: Any, fmt: str) -> str:
    try:
        x = float(v)
    except (TypeError, ValueError):
        return "n/a"
    return "n/a" if math.isnan(x) else format(x, fmt)


def format_summary(summary: Mapping[str, Any], path: Path, seconds: float) -> str:
    """The summary printed after a build: fund, period, both fits, the fit verdict, 99% VaR/ES
    (fitted law and conditional model), and the backtest verdict in plain words."""
    from errdist.workbook.summary import MODEL_NAMES, SHAPE_GAP_MARGIN

    lines = []
    n = summary.get("n_returns")
    n_text = f"{n:,} daily returns" if isinstance(n, int) else "daily returns"
    lines.append(
        f"{summary.get('fund', 'Portfolio')}: {summary.get('first_date', '?')} to "
        f"{summary.get('last_date', '?')} ({n_text})"
    )
    lines.append(f"  {'fit':<9}{'loc':>12}{'scale':>12}{'shape':>9}")
    for key, label in (("moments", "moments"), ("mle", "MLE")):
        fit = summary.get(key) or {}
        lines.append(
            f"  {label:<9}{_num(fit.get('loc'), '12.6f')}{_num(fit.get('scale'), '12.6f')}"
            f"{_num(fit.get('shape'), '9.4f')}"
        )
    p = _float(summary.get("gof_pvalue"))
    if not math.isnan(p):
        verdict = "rejected at 5%" if p < 0.05 else "not rejected at 5%"
        lines.append(
            f"  fit verdict: goodness of fit p = {p:.3f}, the fitted error law is {verdict}"
            + (
                f"; best law by AIC: {summary['best_law_aic']}"
                if summary.get("best_law_aic")
                else ""
            )
            + (f"; {summary['aic_winner']} has the lower AIC" if summary.get("aic_winner") else "")
        )
    gap = _float(summary.get("shape_gap"))
    if not math.isnan(gap):
        mom = (summary.get("moments") or {}).get("shape")
        mle = (summary.get("mle") or {}).get("shape")
        if summary.get("shape_gap_warning"):
            lines.append(
                f"  WARNING: the moments shape {_num(mom, '.3f')} and the MLE shape "
                f"{_num(mle, '.3f')} differ by {gap:.0%}, more than the {SHAPE_GAP_MARGIN:.0%} "
                "margin: the tail is not well pinned down; read the Fit check sheet"
            )
        else:
            lines.append(
                f"  shapes agree: moments {_num(mom, '.3f')} vs MLE {_num(mle, '.3f')} "
                f"({gap:.0%} apart, margin {SHAPE_GAP_MARGIN:.0%})"
            )
    lines.append(
        f"  1-day 99%: VaR {_num(summary.get('var99'), '.3%')}, "
        f"ES {_num(summary.get('es99'), '.3%')} (losses, fitted law)"
    )
    if not math.isnan(_float(summary.get("cond_var99"))):
        model = str(summary.get("cond_model") or "gjr")
        lines.append(
            f"  today, conditional {model}: VaR 99% {_num(summary.get('cond_var99'), '.3%')}, "
            f"ES 99% {_num(summary.get('cond_es99'), '.3%')}, "
            f"ES 97.5% {_num(summary.get('cond_es975'), '.3%')}"
        )
    exc = summary.get("backtest_exceptions")
    zone = summary.get("backtest_zone") or "n/a"
    # The count and the zone are those of the last 250 days (the Basel window), not of the
    # whole backtest: say so.
    lines.append(
        f"  backtest, last 250 days: {_num(exc, '.0f')} exceptions of the 99% VaR, {zone} zone"
    )
    models = summary.get("models") or {}
    if models:
        lines.append("  models over the last 250 days (99% VaR, ES backtest):")
        for name, m in models.items():
            lines.append(
                f"    {MODEL_NAMES.get(name, name)}: {_num(m.get('exceptions'), '.0f')} "
                f"exceptions ({_num(m.get('expected'), '.1f')} expected), "
                f"{m.get('zone') or 'n/a'} zone; Kupiec p = {_num(m.get('kupiec_pvalue'), '.2f')}, "
                f"Christoffersen p = {_num(m.get('independence_pvalue'), '.2f')}; "
                f"ES Z2 = {_num(m.get('es_statistic'), '.2f')} "
                f"(p = {_num(m.get('es_pvalue'), '.2f')}): {m.get('verdict') or 'n/a'}"
            )
        best = str(summary.get("best_model") or "")
        if best in models:
            m = models[best]
            passed = m.get("verdict") == "passes"
            lines.append(
                f"  backtest verdict: the 99% VaR of the {MODEL_NAMES.get(best, best)} model had "
                f"{_num(m.get('exceptions'), '.0f')} exceptions in the last 250 days: "
                f"{m.get('zone') or 'n/a'} zone; Kupiec p = {_num(m.get('kupiec_pvalue'), '.2f')}"
                + ("" if passed else "; no model passed every test")
            )
    lines.append(f"wrote {path.resolve()} in {seconds:.1f} s")
    return "\n".join(lines)


def fund_name_from_file(path: str | Path) -> str:
    """A fund name from a prices file's name: ``meridian_fund-prices-2026-11.csv`` ->
    ``"meridian fund"``; ``"Portfolio"`` when nothing is left."""
    stem = Path(path).stem
    words = [w for w in re.split(r"[\s_\-.]+", stem) if w]
    drop = {"prices", "price", "nav", "navs", "history", "daily", "data", "export"}
    kept = [w for w in words if w.casefold() not in drop and not w.isdigit()]
    return " ".join(kept) or "Portfolio"


def run_demo(args: argparse.Namespace) -> int:
    """``errdist demo``: build and evaluate the demo fund's workbook; print a summary.

    Writes ``args.out`` (default ``errdist-demo.xlsx`` in the current folder), never over an
    existing file unless ``args.force``.
    """
    from errdist.data.demo import FUND_NAME, simulate_prices

    t0 = time.perf_counter()
    out = Path(getattr(args, "out", None) or DEFAULT_DEMO_FILE)
    force = bool(getattr(args, "force", False))
    _require_xlsx(out)
    check_target(out, force=force)
    copy = _values_copy_target(args, out, force)
    progress = _Progress()
    with progress.step("simulating prices"):
        prices = simulate_prices()
    result = _build(prices, out, fund_name=FUND_NAME, as_of=None, force=force, progress=progress)
    print(format_summary(result.summary, out, time.perf_counter() - t0))
    _write_values_copy(out, copy, force)
    return 0


def _values_copy_target(args: argparse.Namespace, out: Path, force: bool) -> Path | None:
    """``--values-copy FILE``, checked before anything is built (None when not asked)."""
    name = getattr(args, "values_copy", None)
    if not name:
        return None
    copy = Path(name)
    _require_xlsx(copy)
    if copy.resolve() == out.resolve():
        raise ValueError(f"--values-copy {copy} is the live workbook itself; choose another name")
    check_target(copy, force=force)
    return copy


def _write_values_copy(out: Path, copy: Path | None, force: bool) -> None:
    if copy is None:
        return
    from errdist.workbook.freeze import freeze_workbook

    freeze_workbook(out, copy, force=force)
    print(f"values copy (no formulas, for readers without the add-in): {copy}")


def _require_xlsx(out: Path) -> None:
    if out.suffix.lower() != ".xlsx":
        raise ValueError(f"--out must name an .xlsx file, got {out}")


def run_refresh(args: argparse.Namespace) -> int:
    """``errdist refresh``: read a prices file, build the month's workbook, print a summary.

    Reads ``args.prices`` (:func:`errdist.data.prices_io.read_prices` with
    ``args.date_column``, ``args.price_column``, ``args.as_of``, ``args.sheet``; a warning
    about repeated prices goes to standard error) and writes ``args.out``
    atomically, never over an existing file unless ``args.force``. The fund name is taken
    from the prices file's name (:func:`fund_name_from_file`).
    """
    from errdist.data.prices_io import read_prices
    from errdist.data.stale_prices import StalePricesWarning

    t0 = time.perf_counter()
    out = Path(args.out)
    force = bool(getattr(args, "force", False))
    _require_xlsx(out)
    src = Path(args.prices)
    if src.exists() and out.exists() and src.resolve() == out.resolve():
        raise ValueError(f"--out {out} is the prices file itself; choose another name")
    check_target(out, force=force)
    copy = _values_copy_target(args, out, force)
    progress = _Progress()
    as_of = getattr(args, "as_of", None)
    with progress.step("reading prices"), warnings.catch_warnings():
        warnings.simplefilter("ignore", StalePricesWarning)  # printed below, once
        prices = read_prices(
            src,
            date_column=getattr(args, "date_column", None),
            price_column=getattr(args, "price_column", None),
            as_of=as_of,
            sheet=getattr(args, "sheet", None),
        )
    if prices.attrs.get("warning"):
        print(f"warning: {prices.attrs['warning']}", file=sys.stderr, flush=True)
    try:
        result = _build(
            prices,
            out,
            fund_name=fund_name_from_file(src),
            as_of=as_of,
            force=force,
            progress=progress,
        )
    except InsufficientDataError as exc:
        upto = f" up to --as-of {as_of}" if as_of else ""
        raise InsufficientDataError(f"{src}{upto}: {exc}") from None
    first, last = prices.attrs.get("rows", (None, None))
    if first is not None:
        order = ", newest first" if prices.attrs.get("newest_first") else ""
        if prices.attrs.get("header_row"):
            order += f", header row {prices.attrs['header_row']} under title rows"
        sheet = f", sheet {prices.attrs['sheet']!r}" if prices.attrs.get("sheet") else ""
        print(
            f"read {len(prices):,} prices from {src}{sheet} (rows {min(first, last)}-"
            f"{max(first, last)}{order}, columns {prices.attrs.get('date_column')!r} and "
            f"{prices.attrs.get('price_column')!r})"
        )
    print(format_summary(result.summary, out, time.perf_counter() - t0))
    _write_values_copy(out, copy, force)
    missing = missing_figures(result.summary)
    if missing:
        print(
            f"errdist refresh: {out} was written, but {', '.join(missing)} could not be "
            "computed (n/a); open the workbook to see why before using it",
            file=sys.stderr,
        )
        return 1
    return 0


def missing_figures(summary: Mapping[str, Any]) -> list[str]:
    """The headline figures of a build summary that are n/a (not a finite number)."""

    def bad(v: Any) -> bool:
        try:
            return not math.isfinite(float(v))
        except (TypeError, ValueError):
            return True

    out = []
    for key, label in (("moments", "the moments fit"), ("mle", "the MLE fit")):
        fit = summary.get(key) or {}
        if any(bad(fit.get(k)) for k in ("loc", "scale", "shape")):
            out.append(label)
    for key, label in (("var99", "the 99% VaR"), ("es99", "the 99% ES")):
        if bad(summary.get(key)):
            out.append(label)
    return out


EXIT_VALUES = 1
"""``errdist check`` exit code bit: a formula cell's stored value differs from the
recomputation (or cannot be recomputed)."""
EXIT_FORMULAS = 4
"""``errdist check`` exit code bit: formulas of the template overridden by constants, deleted,
changed or added. Both problems give ``EXIT_VALUES | EXIT_FORMULAS`` (5); bad input gives 2."""


def _print_changes(changes: list[Any]) -> None:
    from errdist.workbook.formula_map import KINDS

    for kind in KINDS:
        group = [c for c in changes if c.kind == kind]
        if not group:
            continue
        print(f"{len(group):,} formula cell(s) {kind}:")
        for c in group[:MAX_LISTED]:
            print(f"  {c}")
        if len(group) > MAX_LISTED:
            print(f"  ... and {len(group) - MAX_LISTED} more")


def run_check(args: argparse.Namespace) -> int:
    """``errdist check BOOK [--engine formulas|libreoffice]``: recompute every formula, compare
    with the stored values, and compare the formulas with the template's.

    Prints the formulas overridden, deleted, changed or added (each kind in its own list),
    then each value mismatch (sheet!cell, formula, stored and recomputed values, relative
    difference) or ``all N formula cells match``. Exit code: 0 all is well;
    :data:`EXIT_VALUES` (1) values differ; :data:`EXIT_FORMULAS` (4) formulas differ from the
    template; 5 both.
    """
    from errdist.workbook.check import check_report

    tolerance = getattr(args, "tolerance", 1e-9)
    engine = getattr(args, "engine", None) or "formulas"
    progress = _Progress()
    step = "recomputing workbook" + (" in LibreOffice" if engine == "libreoffice" else "")
    with progress.step(step):
        report = check_report(args.book, tolerance, engine=engine, venv=getattr(args, "venv", None))
    code = 0
    if report.changes is None:
        print(
            "not built by errdist (no dated prices on a Prices sheet): formulas not compared "
            "with the template"
        )
    elif report.changes:
        _print_changes(report.changes)
        code |= EXIT_FORMULAS
    else:
        print(
            "every formula of the template is in place (none overridden, deleted, changed or added)"
        )
    if not report.mismatches:
        print(
            f"all {report.cells:,} formula cells match (relative tolerance {tolerance:g}; "
            f"recomputed by {report.engine})"
        )
        return code
    for m in report.mismatches[:MAX_LISTED]:
        print(m)
    extra = len(report.mismatches) - MAX_LISTED
    if extra > 0:
        print(f"... and {extra} more")
    if report.cells:
        print(
            f"{len(report.mismatches):,} of {report.cells:,} formula cells differ or cannot be "
            f"recomputed (relative tolerance {tolerance:g}; recomputed by {report.engine})"
        )
    else:
        print(
            f"{len(report.mismatches):,} formula cell(s) or name(s) cannot be recomputed; "
            "nothing was computed"
        )
    return code | EXIT_VALUES


def run_freeze(args: argparse.Namespace) -> int:
    """``errdist freeze BOOK --out COPY``: a values copy (every formula replaced by its
    stored value, formats and charts kept, a note on the Guide); never over an existing file
    unless ``--force``."""
    from errdist.workbook.freeze import freeze_workbook

    out = Path(args.out)
    _require_xlsx(out)
    check_target(out, force=bool(getattr(args, "force", False)))
    freeze_workbook(args.book, out, force=bool(getattr(args, "force", False)))
    print(
        f"wrote {out}: values only, from {args.book} (send this one to readers without the add-in)"
    )
    return 0
