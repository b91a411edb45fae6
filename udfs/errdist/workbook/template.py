"""The monthly risk workbook: lay it out, evaluate it headlessly, write it with cached values.

:func:`build_workbook` turns a price history into the template workbook:

1. :func:`layout_workbook` describes every cell (:class:`~errdist.workbook.layout.Plan`): the
   prices as constants, everything else as formulas — the ERRDIST_ worksheet functions and the
   spreadsheet's built-ins — with the range each spilling result fills;
2. the plan is written once without cached values and evaluated by the headless engine
   (:func:`errdist.workbook.engine.evaluate_workbook`, PyPI ``formulas`` with every catalog
   function registered);
3. the plan is written again with every formula cell's value cached, each cell of a spill
   included, so the file shows correct figures in any spreadsheet, add-in or not.

The sheets (see ``docs/template.md``) are one module each under
:mod:`errdist.workbook.sheets`, listed in workbook order in :data:`SHEET_MODULES`: Guide,
Prices, Returns, Calibration, Models, Risk, Fit check, Forecasts, Backtest, Charts and
``xlwings.conf``. Adding a
sheet is adding one module there and listing it here. Only built-in functions the headless
engine supports are used (no SEQUENCE, LET, AGGREGATE or UNIQUE).

Rebuild the committed template with::

    python -m errdist.workbook.template --out workbook_template/errdist-monthly-risk.xlsx
"""

from __future__ import annotations

import argparse
import datetime as _dt
import os
import sys
import tempfile
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from types import ModuleType
from typing import Any

import numpy as np
import pandas as pd

from errdist.errors import InputTypeError, InsufficientDataError
from errdist.workbook.layout import Plan
from errdist.workbook.sheets import (
    backtest,
    calibration,
    charts,
    fit_check,
    forecasts,
    guide,
    models,
    prices,
    returns,
    risk,
    xlwings_conf,
)
from errdist.workbook.sheets.backtest import BACKTEST_WINDOW
from errdist.workbook.sheets.context import VOLATILE_CELLS, Context, catalog_names
from errdist.workbook.sheets.risk import CONFIDENCES
from errdist.workbook.summary import Values, canonical_values, summarize
from errdist.workbook.writer import write_plan

__all__ = [
    "BuildResult",
    "CONFIDENCES",
    "SHEETS",
    "SHEET_MODULES",
    "VOLATILE_CELLS",
    "build_workbook",
    "layout_workbook",
    "main",
]

Evaluator = Callable[[Path], Values]

SHEET_MODULES: tuple[ModuleType, ...] = (
    guide,
    prices,
    returns,
    calibration,
    models,
    risk,
    fit_check,
    forecasts,
    backtest,
    charts,
    xlwings_conf,
)
"""The sheet modules, in workbook order (each has ``NAME`` and ``layout(plan, ctx)``)."""

SHEETS: tuple[str, ...] = tuple(m.NAME for m in SHEET_MODULES)
"""Sheet names of the template, in order."""


@dataclass(frozen=True)
class BuildResult:
    """What :func:`build_workbook` wrote.

    Attributes
    ----------
    path : Path
        The workbook written.
    summary : dict
        Key figures read from the evaluated workbook: ``fund``, ``first_date``, ``last_date``,
        ``n_returns``; ``moments`` and ``mle`` (dicts of loc, scale, shape); ``var99``,
        ``es99`` (one-day 99%, fitted law, positive losses in return units);
        ``backtest_exceptions``, ``backtest_zone``.
    timings : dict
        Seconds spent in ``layout``, ``evaluate`` and ``write`` (the two file writes).
    """

    path: Path
    summary: dict[str, Any]
    timings: dict[str, float] = field(default_factory=dict)


def _clean_prices(prices: pd.DataFrame, as_of: object) -> pd.DataFrame:
    """The ``date`` / ``price`` columns sorted by date up to ``as_of``; refused if too short."""
    if not isinstance(prices, pd.DataFrame) or not {"date", "price"} <= set(prices.columns):
        raise InputTypeError("prices must be a DataFrame with columns 'date' and 'price'")
    df = prices[["date", "price"]].copy()
    df["date"] = pd.to_datetime(df["date"])
    df["price"] = pd.to_numeric(df["price"], errors="raise").astype(float)
    df = df.sort_values("date", kind="stable").reset_index(drop=True)
    if as_of is not None:
        cutoff = pd.Timestamp(as_of)
        df = df[df["date"] <= cutoff].reset_index(drop=True)
    if len(df) < BACKTEST_WINDOW + 10:
        raise InsufficientDataError(
            f"the workbook needs at least {BACKTEST_WINDOW + 10} prices (a {BACKTEST_WINDOW}-day "
            f"backtest window and some forecasts), got {len(df)}"
        )
    return df


def layout_workbook(
    prices: pd.DataFrame,
    *,
    fund_name: str,
    as_of: object = None,
    functions: frozenset[str] | None = None,
) -> Plan:
    """Lay out the template for a price history (nothing is written or evaluated).

    Parameters
    ----------
    prices : pandas.DataFrame
        Columns ``date`` and ``price``, one row per business day.
    fund_name : str
        Shown in the titles.
    as_of : date-like, optional
        Last date used; later rows are dropped.
    functions : frozenset of str, optional
        Worksheet functions to use (default: all in the catalog). Sections whose functions are
        missing are left out.

    Returns
    -------
    Plan
    """
    df = _clean_prices(prices, as_of)
    dates = [d.to_pydatetime() for d in df["date"]]
    values = df["price"].to_numpy(dtype=float)
    ctx = Context(
        fund=fund_name,
        dates=dates,
        prices=values,
        funcs=catalog_names() if functions is None else functions,
    )
    ctx.returns = np.diff(np.log(values))
    VOLATILE_CELLS.clear()
    last = dates[-1]
    plan = Plan(
        title=f"Monthly risk workbook — {fund_name}",
        subject=f"Error-distribution fit, VaR/ES, fit check and backtest as of {last:%Y-%m-%d}",
        created=_dt.datetime(last.year, last.month, last.day, 18, 0, 0),
    )
    # Each sheet reads the key cells of the sheets laid out before it; the Guide goes last.
    for module in sorted(SHEET_MODULES, key=lambda m: getattr(m, "LAYOUT_LAST", False)):
        module.layout(plan, ctx)
        _apply_print(plan, module)
    plan.sheets.sort(key=lambda sheet: SHEETS.index(sheet.name))
    plan.keys = dict(ctx.keys)
    return plan


def _apply_print(plan: Plan, module: ModuleType) -> None:
    """Apply the sheet module's print declaration (``PRINT``), if it has one and laid out
    its sheet."""
    setup = getattr(module, "PRINT", None)
    if setup is not None and any(s.name == module.NAME for s in plan.sheets):
        plan.sheet(module.NAME).apply_print(setup)


def _default_evaluator() -> Evaluator:
    from errdist.workbook.engine import evaluate_workbook

    return evaluate_workbook


def build_workbook(
    prices: pd.DataFrame,
    out_path: str | os.PathLike[str],
    *,
    fund_name: str,
    as_of: object = None,
    evaluate: Evaluator | None = None,
) -> BuildResult:
    """Build the monthly risk workbook for a price history, with every value cached.

    Parameters
    ----------
    prices : pandas.DataFrame
        Columns ``date`` and ``price`` (one row per business day; sorted here).
    out_path : path-like
        The .xlsx file to write (overwritten; the caller decides about existing files).
    fund_name : str
        Shown in the titles.
    as_of : date-like, optional
        Last date used (later rows are dropped).
    evaluate : callable, optional
        ``evaluate(path) -> {(sheet, A1): value}`` for every formula cell; default the
        headless engine :func:`errdist.workbook.engine.evaluate_workbook`.

    Returns
    -------
    BuildResult
    """
    t0 = time.perf_counter()
    df = _clean_prices(prices, as_of)
    plan = layout_workbook(df, fund_name=fund_name)
    t1 = time.perf_counter()
    evaluate = evaluate or _default_evaluator()
    out_path = Path(out_path)
    with tempfile.TemporaryDirectory(prefix="errdist-build-") as tmp:
        first = Path(tmp) / "first-pass.xlsx"
        write_plan(plan, first)
        t2 = time.perf_counter()
        values = canonical_values(evaluate(first), plan)
        t3 = time.perf_counter()
    missing = [(s, a1) for s, a1, _ in plan.formula_cells() if (s, a1) not in values]
    if missing:
        shown = ", ".join(f"{s}!{a1}" for s, a1 in missing[:5])
        raise RuntimeError(
            f"the engine returned no value for {len(missing)} formula cells (first: {shown})"
        )
    write_plan(plan, out_path, values)
    t4 = time.perf_counter()
    timings = {
        "layout": t1 - t0,
        "evaluate": t3 - t2,
        "write": (t2 - t1) + (t4 - t3),
        "total": t4 - t0,
    }
    return BuildResult(out_path, summarize(plan, values, df, fund_name), timings)


# ---------------------------------------------------------------------------------- CLI


def main(argv: Sequence[str] | None = None) -> int:
    """Rebuild the template from the demo data: ``python -m errdist.workbook.template``."""
    from errdist.data.demo import FUND_NAME, simulate_prices

    parser = argparse.ArgumentParser(
        prog="python -m errdist.workbook.template",
        description="Build the monthly risk workbook template from the demo fund's prices.",
    )
    parser.add_argument(
        "--out",
        default="workbook_template/errdist-monthly-risk.xlsx",
        help="workbook to write (default: %(default)s)",
    )
    args = parser.parse_args(argv)
    result = build_workbook(simulate_prices(), args.out, fund_name=FUND_NAME)
    t = result.timings
    print(
        f"wrote {result.path} (layout {t['layout']:.2f} s, evaluate {t['evaluate']:.2f} s, "
        f"write {t['write']:.2f} s, total {t['total']:.2f} s)"
    )
    return 0


if __name__ == "__main__":
    sys.exit(main())
