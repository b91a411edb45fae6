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

The sheets (see ``docs/template.md``): Guide, Prices, Returns, Calibration, Risk, Fit check,
Backtest, Charts and ``xlwings.conf``. Only built-in functions the headless engine supports are
used (no SEQUENCE, LET, AGGREGATE or UNIQUE).

Rebuild the committed template with::

    python -m errdist.workbook.template --out workbook_template/errdist-monthly-risk.xlsx
"""

from __future__ import annotations

import argparse
import datetime as _dt
import math
import os
import sys
import tempfile
import time
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from errdist.errors import InputTypeError, InsufficientDataError
from errdist.workbook import charts as chart_pages
from errdist.workbook import guide_text
from errdist.workbook.layout import Plan, SheetPlan, absref, cell
from errdist.workbook.writer import write_plan

__all__ = [
    "BuildResult",
    "CONFIDENCES",
    "SHEETS",
    "VOLATILE_CELLS",
    "build_workbook",
    "layout_workbook",
    "main",
]

Values = Mapping[tuple[str, str], object]
Evaluator = Callable[[Path], Values]

GUIDE = "Guide"
PRICES = "Prices"
RETURNS = "Returns"
CALIB = "Calibration"
RISK = "Risk"
FITCHECK = "Fit check"
BACKTEST = "Backtest"
CHARTS = "Charts"
CONF = "xlwings.conf"
SHEETS: tuple[str, ...] = (GUIDE, PRICES, RETURNS, CALIB, RISK, FITCHECK, BACKTEST, CHARTS, CONF)
"""Sheet names of the template, in order."""

UDF_MODULE = "errdist.sheet.xlwings_udfs"
"""The module named under "UDF Modules" on the xlwings.conf sheet."""

CONFIDENCES: tuple[float, ...] = (0.95, 0.99, 0.995)
"""Confidence levels of the Risk sheet."""
HORIZON_DAYS = 10
"""Longer horizon of the Risk sheet (trading days)."""
POSITION_VALUE = 10_000_000.0
"""Default position value for the money figures of the Risk sheet."""
BACKTEST_WINDOW = 250
"""Rolling window of the backtest (returns)."""
BACKTEST_CONFIDENCE = 0.99
"""Confidence of the backtested VaR."""
HIST_BINS = 30
"""Number of histogram bins on the Fit check sheet."""
GOF_STATISTIC = "ad"
GOF_SAMPLES = 199
GOF_SEED = 20261202
"""Goodness-of-fit test settings (Anderson-Darling, parametric bootstrap, fixed seed)."""

# Bisection bracket of ln(shape) for the built-in moments re-derivation, and its steps.
_LN_SHAPE_LO = "LN(0.02)"
_LN_SHAPE_HI = "LN(200)"
_BISECTION_STEPS = 30
_NEWTON_STEPS = 3
_NEWTON_H = 1e-5

VOLATILE_CELLS: dict[tuple[str, str], str] = {}
"""Cells whose value legitimately changes between builds, and why (filled by the layout)."""


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


# ---------------------------------------------------------------------------------- catalog


def _catalog_names() -> frozenset[str]:
    """Names of the worksheet functions the catalog holds now."""
    try:
        from errdist.sheet import catalog
    except ImportError:  # pragma: no cover - the catalog ships with the package
        return frozenset()
    entries = getattr(catalog, "CATALOG", None) or getattr(catalog, "ENTRIES", None) or ()
    if isinstance(entries, Mapping):
        return frozenset(str(k).upper() for k in entries)
    return frozenset(str(getattr(e, "name", e)).upper() for e in entries)


def _call_entry(name: str, *args: object) -> list[list[object]]:
    """Evaluate catalog function ``name`` on cell arguments; the result as rows of cells."""
    from errdist.sheet import catalog

    entry = catalog.get(name) if hasattr(catalog, "get") else catalog.CATALOG[name]
    out = entry.evaluate(list(args))
    if not isinstance(out, (list, tuple)):
        return [[out]]
    if out and not isinstance(out[0], (list, tuple)):
        return [[v] for v in out]
    return [list(r) for r in out]


# ---------------------------------------------------------------------------------- context


@dataclass
class _Ctx:
    """Shared facts of one layout: sizes, key cells and the functions available."""

    fund: str
    dates: list[_dt.datetime]
    prices: np.ndarray
    funcs: frozenset[str]
    returns: np.ndarray = field(default_factory=lambda: np.empty(0))
    keys: dict[str, str] = field(default_factory=dict)

    @property
    def n_prices(self) -> int:
        return len(self.prices)

    @property
    def n(self) -> int:
        """Number of returns."""
        return len(self.prices) - 1

    @property
    def r(self) -> str:
        """The returns range."""
        return absref(RETURNS, "B2", f"B{self.n + 1}")

    def has(self, *names: str) -> bool:
        return all(name in self.funcs for name in names)


# Number formats of the labelled tables the catalog functions return, by row label (label /
# value tables) or by column header; a true/false value always gets "bool", text none.
_FIT_REPORT_FMTS: dict[str, str] = {
    "n used": "int",
    "blanks skipped": "int",
    "mean": "pct3",
    "median": "pct3",
    "STDEV.S": "pct3",
    "SKEW": "num4",
    "KURT": "num4",
    "MLE loc": "num",
    "MLE scale": "num",
    "MLE shape": "num4",
    "MLE log-likelihood": "num2",
    "MLE AIC": "num2",
    "moments loc": "num",
    "moments scale": "num",
    "moments shape": "num4",
    "moments log-likelihood": "num2",
    "moments AIC": "num2",
    "MLE shape at search bound": "bool",
}
_GOF_FMTS: dict[str, str] = {
    "value": "num4",
    "p-value": "pval",
    "samples": "int",
    "refit": "bool",
    "loc": "num",
    "scale": "num",
    "shape": "num4",
    "n": "int",
}
_COMPARE_FMTS: dict[str, str] = {
    "loc": "num",
    "scale": "num",
    "shape_or_df": "num4",
    "loglik": "num2",
    "aic": "num2",
    "bic": "num2",
    "ks": "num4",
    "var99": "pct",
    "at_bound": "bool",
}
_BACKTEST_FMTS: dict[str, str] = {
    "observations": "int",
    "exceptions": "int",
    "expected exceptions": "num2",
    "pairs dropped": "int",
    "LR POF (Kupiec)": "num4",
    "p-value POF": "pval",
    "LR IND (Christoffersen)": "num4",
    "p-value IND": "pval",
    "LR CC (Christoffersen)": "num4",
    "p-value CC": "pval",
    "plus factor": "num2",
}


def _value_fmt(value: object, fmt: str) -> str:
    """The format of one result cell: ``bool`` for a true/false value, else ``fmt``.

    Text keeps the default (left) alignment whatever number format its row has.
    """
    return "bool" if isinstance(value, (bool, np.bool_)) else fmt


def _label_value_fmts(
    rows: Sequence[Sequence[object]], fmts: Mapping[str, str], head_rows: int = 0
) -> list[list[str]]:
    """Cell formats of a label / value table: labels plain, each value by its row's label."""
    out: list[list[str]] = []
    for i, row in enumerate(rows):
        if i < head_rows:
            out.append(["head"] + ["head_r"] * (len(row) - 1))
            continue
        label = str(row[0])
        out.append([""] + [_value_fmt(v, fmts.get(label, "gen")) for v in row[1:]])
    return out


def _column_fmts(rows: Sequence[Sequence[object]], fmts: Mapping[str, str]) -> list[list[str]]:
    """Cell formats of a table with a header row: each column by its header."""
    heads = [str(h) for h in rows[0]]
    out = [["head"] + ["head_r"] * (len(heads) - 1)]
    for row in rows[1:]:
        out.append(
            ["" if j == 0 else _value_fmt(v, fmts.get(heads[j], "gen")) for j, v in enumerate(row)]
        )
    return out


def _heading(sp: SheetPlan, title: str, subtitle: str) -> None:
    sp.text("A1", title, "title")
    sp.text("A2", subtitle, "subtitle")


# ---------------------------------------------------------------------------------- sheets


def _guide(plan: Plan, ctx: _Ctx) -> None:
    sp = plan.add_sheet(GUIDE)
    sp.width("A", 30)
    sp.width("B", 22)
    sp.width("C", 70)
    sp.tab_color = "#1F3864"
    first, last = ctx.dates[0], ctx.dates[-1]
    _heading(
        sp,
        f"Monthly risk workbook — {ctx.fund}",
        f"Daily prices {first:%Y-%m-%d} to {last:%Y-%m-%d}: {ctx.n_prices} prices, "
        f"{ctx.n} log returns. Figures as of {last:%Y-%m-%d}.",
    )
    from errdist.data.demo import FUND_NAME

    row = 3
    if ctx.fund == FUND_NAME:
        sp.text(f"A{row}", guide_text.DEMO_NOTE, "note")
        row += 1
    row += 1
    sp.text(f"A{row}", "Key figures", "h2")
    sp.text(f"B{row}", "", "h2")
    sp.text(f"C{row}", "", "h2")
    row += 1
    key_rows: list[tuple[str, str, str, str]] = []
    if "fit_mle_shape" in ctx.keys:
        key_rows += [
            (
                "Shape (maximum likelihood)",
                "=" + ctx.keys["fit_mle_shape"],
                "key",
                "2 = normal, 1 = Laplace; below 2 = heavier tails than the normal",
            ),
            ("Shape (moments)", "=" + ctx.keys["fit_mom_shape"], "key", ""),
        ]
    if "var99" in ctx.keys:
        key_rows += [
            (
                "VaR 99%, 1 day",
                "=" + ctx.keys["var99"],
                "key_pct",
                "fitted law; a loss, in return units",
            ),
            ("Expected Shortfall 99%, 1 day", "=" + ctx.keys["es99"], "key_pct", ""),
        ]
    if "bt_zone" in ctx.keys:
        key_rows += [
            (
                "Backtest zone (last 250 days)",
                "=" + ctx.keys["bt_zone"],
                "key_text",
                "green / yellow / red (Basel 1996 zones at 99%)",
            ),
        ]
    if "ERRDIST_VERSION" in ctx.funcs:
        key_rows.append(
            (
                "Add-in that calculated the values",
                "=ERRDIST_VERSION()",
                "label",
                "",
            )
        )
    for label, formula, fmt, note in key_rows:
        sp.text(f"A{row}", label, "label_b")
        e = sp.formula(f"B{row}", formula, fmt)
        if formula == "=ERRDIST_VERSION()":
            VOLATILE_CELLS[(GUIDE, e.a1)] = "ERRDIST_VERSION(): changes with each release"
        if note:
            sp.text(f"C{row}", note, "note_i")
        row += 1
    row += 1
    for style, text in guide_text.blocks():
        if style == "h2":
            row += 1
            sp.text(f"A{row}", text, "h2")
            sp.text(f"B{row}", "", "h2")
            sp.text(f"C{row}", "", "h2")
        else:
            sp.paragraph(f"A{row}", ("•  " if style == "bullet" else "") + text, 3)
        row += 1
    sp.landscape = False
    sp.print_area = f"A1:C{row}"
    plan.active = GUIDE


def _prices(plan: Plan, ctx: _Ctx) -> None:
    sp = plan.add_sheet(PRICES)
    sp.width("A", 12)
    sp.width("B", 12)
    sp.width("D", 60)
    sp.freeze = (1, 0)
    sp.text("A1", "Date", "head_r")
    sp.text("B1", "Price", "head_r")
    sp.repeat_rows = (0, 0)
    for i, (d, p) in enumerate(zip(ctx.dates, ctx.prices, strict=True)):
        sp.date(f"A{i + 2}", d, "input_date")
        sp.number(f"B{i + 2}", float(p), "input_price")
    sp.text("D1", "Input: one row per business day, oldest first.", "note")
    sp.text("D2", f"{ctx.fund}: {ctx.n_prices} daily closing prices.", "note")
    sp.text(
        "D3",
        "To update inside the spreadsheet, paste over the yellow cells keeping the "
        "same number of rows; otherwise rebuild with: errdist refresh.",
        "note",
    )
    sp.print_area = f"A1:B{ctx.n_prices + 1}"


def _returns(plan: Plan, ctx: _Ctx) -> None:
    sp = plan.add_sheet(RETURNS)
    sp.width("A", 12)
    sp.width("B", 13)
    sp.width("D", 60)
    sp.freeze = (1, 0)
    n, last = ctx.n, ctx.n_prices + 1
    sp.text("A1", "Date", "head_r")
    sp.text("B1", "Log return", "head_r")
    sp.repeat_rows = (0, 0)
    sp.spill("A2", n, 1, f"=Prices!A3:A{last}", "date")
    sp.spill("B2", n, 1, f'=ERRDIST_RETURNS(Prices!B2:B{last},"log")', "pct3")
    sp.text("D1", "Daily log return ln(P_t / P_t-1), dated at the later price.", "note")
    sp.text("D2", "ERRDIST_RETURNS spills one row shorter than the prices.", "note")
    sp.print_area = f"A1:B{n + 1}"


def _calibration(plan: Plan, ctx: _Ctx) -> None:
    sp = plan.add_sheet(CALIB)
    sp.width("A", 34)
    sp.width("B", 15)
    sp.width("C", 15)
    sp.width("D", 32)
    sp.width("E", 15, "G")
    sp.width("H", 3)
    sp.width("I", 26)
    sp.width("J", 16)
    sp.landscape = True
    r = ctx.r
    _heading(
        sp,
        f"Calibration — {ctx.fund}",
        f"Fitting the error distribution to the {ctx.n} daily log returns on the Returns sheet.",
    )

    # Sample statistics with built-in functions.
    sp.text("A4", "Sample statistics (built-in functions)", "h2")
    sp.text("B4", "", "h2")
    stats = [
        ("Observations (COUNT)", f"=COUNT({r})", "int", "n_obs"),
        ("Mean (AVERAGE)", f"=AVERAGE({r})", "pct3", "mean"),
        ("Median (MEDIAN)", f"=MEDIAN({r})", "pct3", "median"),
        ("Standard deviation (STDEV.S)", f"=STDEV.S({r})", "pct3", "sd"),
        ("Skewness (SKEW)", f"=SKEW({r})", "num4", "skew"),
        ("Excess kurtosis (KURT)", f"=KURT({r})", "num4", "kurt"),
        ("Minimum (MIN)", f"=MIN({r})", "pct3", "min"),
        ("Maximum (MAX)", f"=MAX({r})", "pct3", "max"),
    ]
    for i, (label, formula, fmt, key) in enumerate(stats):
        row = 5 + i
        sp.text(f"A{row}", label)
        sp.formula(f"B{row}", formula, fmt)
        ctx.keys[key] = absref(CALIB, f"B{row}")

    # The two fits side by side.
    if ctx.has("ERRDIST_FIT"):
        sp.text("D4", "Fitted error distribution (ERRDIST_FIT)", "h2")
        for c in "EFG":
            sp.text(f"{c}4", "", "h2")
        sp.text("D5", "Method", "head")
        sp.spill(
            "E5",
            2,
            3,
            f'=ERRDIST_FIT({r},"moments",TRUE)',
            "num",
            head_rows=1,
            cell_fmts=[["head_r"] * 3, ["num"] * 3],
        )
        sp.text("D6", "Moments (KURT, STDEV.S, MEDIAN)", "label")
        sp.spill("E7", 1, 3, f'=ERRDIST_FIT({r},"mle")', "num")
        sp.text("D7", "Maximum likelihood", "label_b")
        for method, row in (("mom", 6), ("mle", 7)):
            for par, c in (("loc", "E"), ("scale", "F"), ("shape", "G")):
                ctx.keys[f"fit_{method}_{par}"] = absref(CALIB, f"{c}{row}")
        sp.text(
            "D8",
            "The maximum likelihood fit feeds the Risk, Fit check and Backtest sheets.",
            "note",
        )
    notes_top = 16
    if ctx.has("ERRDIST_FIT_REPORT"):
        sp.text("I4", "Fit report (ERRDIST_FIT_REPORT)", "h2")
        sp.text("J4", "", "h2")
        rows = _call_entry("ERRDIST_FIT_REPORT", ctx.returns.reshape(-1, 1).tolist())
        sp.spill(
            "I5",
            len(rows),
            len(rows[0]),
            f"=ERRDIST_FIT_REPORT({r})",
            "gen",
            cell_fmts=_label_value_fmts(rows, _FIT_REPORT_FMTS),
        )
        notes_top = 5 + len(rows) + 2

    _moments_by_hand(sp, ctx, top=15, notes_top=notes_top)


def _moments_by_hand(sp: SheetPlan, ctx: _Ctx, top: int, notes_top: int) -> None:
    """The moments fit with built-in functions only: bisection then Newton on ln(shape).

    Solves  GAMMALN(5/b) + GAMMALN(1/b) − 2·GAMMALN(3/b) = LN(KURT + 3)  for t = ln b
    (Nadarajah 2005: excess kurtosis Γ(5/b)Γ(1/b)/Γ(3/b)² − 3, strictly decreasing in b).
    """
    r = ctx.r
    row = top
    sp.text(f"A{row}", "Moments fit with built-in functions only (no add-in needed)", "h2")
    for c in "BCDE":
        sp.text(f"{c}{row}", "", "h2")
    notes = [
        "The moments fit matches the sample excess kurtosis K (KURT) with the law's "
        "Γ(5/b)Γ(1/b)/Γ(3/b)² − 3, which falls steadily as the shape b grows.",
        "Taking logs, g(t) = GAMMALN(5/b) + GAMMALN(1/b) − 2·GAMMALN(3/b) − LN(K+3) with "
        "b = EXP(t) is zero at the solution.",
        f"{_BISECTION_STEPS} halvings of the bracket t in [ln 0.02, ln 200] find t to about "
        "1e-8; Newton steps with a centred difference then reach full precision.",
        "Scale a = STDEV.S·√(Γ(1/b)/Γ(3/b)); location = MEDIAN. The differences from the "
        "add-in's figures should be below 1e-10.",
    ]
    row += 1
    k_cell, sd_cell, loc_cell, target_cell = (
        f"B{row}",
        f"B{row + 1}",
        f"B{row + 2}",
        f"B{row + 3}",
    )
    sp.text(f"A{row}", "Excess kurtosis K (KURT)")
    sp.formula(k_cell, f"=KURT({r})", "num4")
    sp.text(f"A{row + 1}", "Standard deviation (STDEV.S)")
    sp.formula(sd_cell, f"=STDEV.S({r})", "pct3")
    sp.text(f"A{row + 2}", "Location = MEDIAN")
    sp.formula(loc_cell, f"=MEDIAN({r})", "num")
    sp.text(f"A{row + 3}", "Target LN(K + 3)")
    sp.formula(target_cell, f"=LN({k_cell}+3)", "num")
    shape_row, scale_row = row + 4, row + 5
    sp.text(f"A{shape_row}", "Shape b (solved below)", "label_b")
    sp.text(f"A{scale_row}", "Scale a = sd·√(Γ(1/b)/Γ(3/b))", "label_b")
    shape_cell, scale_cell = f"B{shape_row}", f"B{scale_row}"
    sp.formula(
        scale_cell,
        f"=${sd_cell[0]}${sd_cell[1:]}*EXP((GAMMALN(1/{shape_cell})-GAMMALN(3/{shape_cell}))/2)",
        "key",
    )
    ctx.keys["hand_shape"] = absref(CALIB, shape_cell)
    ctx.keys["hand_scale"] = absref(CALIB, scale_cell)
    ctx.keys["hand_loc"] = absref(CALIB, loc_cell)
    check_row = scale_row + 1
    if ctx.has("ERRDIST_SOLVE_SHAPE", "ERRDIST_SOLVE_SCALE"):
        sp.text(f"C{row}", "add-in", "head_r")
        sp.text(f"D{row}", "relative difference", "head_r")
        sp.formula(f"C{shape_row}", f"=ERRDIST_SOLVE_SHAPE({k_cell})", "num")
        sp.formula(f"C{scale_row}", f"=ERRDIST_SOLVE_SCALE({sd_cell},C{shape_row})", "num")
        sp.formula(f"D{shape_row}", f"=ABS({shape_cell}-C{shape_row})/C{shape_row}", "check")
        sp.formula(f"D{scale_row}", f"=ABS({scale_cell}-C{scale_row})/C{scale_row}", "check")
        sp.text(f"E{shape_row}", "ERRDIST_SOLVE_SHAPE(K)", "note")
        sp.text(f"E{scale_row}", "ERRDIST_SOLVE_SCALE(sd, b)", "note")
    if "fit_mom_shape" in ctx.keys:
        sp.text(f"A{check_row}", "vs ERRDIST_FIT moments: loc, scale, shape")
        sp.formula(f"B{check_row}", f"=ABS({loc_cell}-{ctx.keys['fit_mom_loc']})", "check")
        sp.formula(
            f"C{check_row}",
            f"=ABS({scale_cell}-{ctx.keys['fit_mom_scale']})/{ctx.keys['fit_mom_scale']}",
            "check",
        )
        sp.formula(
            f"D{check_row}",
            f"=ABS({shape_cell}-{ctx.keys['fit_mom_shape']})/{ctx.keys['fit_mom_shape']}",
            "check",
        )
    # Bisection table on t = ln b.
    row = check_row + 2
    sp.text(f"A{row}", "Bisection on t = ln b", "head")
    for c, h in zip("BCDE", ("t low", "t high", "t mid", "g(t mid)"), strict=True):
        sp.text(f"{c}{row}", h, "head_r")
    first = row + 1

    def g(t: str) -> str:
        return (
            f"GAMMALN(5/EXP({t}))+GAMMALN(1/EXP({t}))-2*GAMMALN(3/EXP({t}))"
            f"-${target_cell[0]}${target_cell[1:]}"
        )

    for i in range(_BISECTION_STEPS):
        rr = first + i
        sp.text(f"A{rr}", f"step {i + 1}")
        if i == 0:
            sp.formula(f"B{rr}", f"={_LN_SHAPE_LO}", "num")
            sp.formula(f"C{rr}", f"={_LN_SHAPE_HI}", "num")
        else:
            p = rr - 1
            # g > 0: kurtosis of b too high, so b (and t) must grow: keep the upper half.
            sp.formula(f"B{rr}", f"=IF(E{p}>0,D{p},B{p})", "num")
            sp.formula(f"C{rr}", f"=IF(E{p}>0,C{p},D{p})", "num")
        sp.formula(f"D{rr}", f"=(B{rr}+C{rr})/2", "num")
        sp.formula(f"E{rr}", f"={g(f'D{rr}')}", "sci")
    row = first + _BISECTION_STEPS + 1
    sp.text(f"A{row}", "Newton steps on t", "head")
    for c, h in zip("BCDE", ("t", "g(t)", "g(t + h)", "g(t − h)"), strict=True):
        sp.text(f"{c}{row}", h, "head_r")
    h_row = row - 1
    sp.text(f"F{h_row}", "Newton difference step h", "label_r")
    sp.number(f"G{h_row}", _NEWTON_H, "sci")
    hcell = f"$G${h_row}"
    for j in range(_NEWTON_STEPS + 1):
        rr = row + 1 + j
        sp.text(f"A{rr}", f"Newton {j}" if j else "start (last midpoint)")
        if j == 0:
            sp.formula(f"B{rr}", f"=D{first + _BISECTION_STEPS - 1}", "num")
        else:
            p = rr - 1
            sp.formula(f"B{rr}", f"=B{p}-C{p}*2*{hcell}/(D{p}-E{p})", "num")
        sp.formula(f"C{rr}", f"={g(f'B{rr}')}", "sci")
        sp.formula(f"D{rr}", f"={g(f'(B{rr}+{hcell})')}", "sci")
        sp.formula(f"E{rr}", f"={g(f'(B{rr}-{hcell})')}", "sci")
    last_t = f"B{row + 1 + _NEWTON_STEPS}"
    sp.formula(shape_cell, f"=EXP({last_t})", "key")
    row += _NEWTON_STEPS + 3
    # The explanation starts a printed page of its own rather than leaving its heading
    # alone at the foot of the first.
    sp.page_breaks.append(row - 1)
    sp.text(f"A{row}", "How the built-in moments fit works", "h2")
    for c in "BCDEFG":
        sp.text(f"{c}{row}", "", "h2")
    for i, note in enumerate(notes):
        sp.paragraph(f"A{row + 1 + i}", note, 7)
    sp.print_area = f"A1:J{max(row + len(notes), notes_top)}"


def _risk(plan: Plan, ctx: _Ctx) -> None:
    if not ctx.has("ERRDIST_VAR", "ERRDIST_ES") or "fit_mle_loc" not in ctx.keys:
        return
    sp = plan.add_sheet(RISK)
    sp.landscape = True
    sp.width("A", 34)
    sp.width("B", 16, "G")
    _heading(
        sp,
        f"Value at Risk and Expected Shortfall — {ctx.fund}",
        "Positive losses: a fraction of the position's value (log-return units) unless "
        "marked as money.",
    )
    loc, scale, shape = (ctx.keys[f"fit_mle_{p}"] for p in ("loc", "scale", "shape"))
    sp.text("A4", "Inputs", "h2")
    sp.text("B4", "", "h2")
    sp.text("A5", "Location (maximum likelihood)")
    sp.formula("B5", f"={loc}", "num")
    sp.text("A6", "Scale (maximum likelihood)")
    sp.formula("B6", f"={scale}", "num")
    sp.text("A7", "Shape (maximum likelihood)")
    sp.formula("B7", f"={shape}", "num")
    sp.text("A8", "Mean (AVERAGE) for the normal law")
    sp.formula("B8", f"={ctx.keys['mean']}", "num")
    sp.text("A9", "Standard deviation (STDEV.S)")
    sp.formula("B9", f"={ctx.keys['sd']}", "num")
    sp.text("A10", "Longer horizon (trading days)")
    sp.number("B10", HORIZON_DAYS, "input_num")
    sp.text("A11", "Position value (money table)")
    sp.number("B11", POSITION_VALUE, "input_num")
    sp.text("A12", "Amount for the tables above")
    sp.blank("B12", "input_num")
    sp.text("C12", "blank: losses as a fraction of the position value; a number: money", "note")
    sp.text("A13", "Multiplier for the built-in table")
    sp.formula("B13", "=IF(ISBLANK($B$12),1,$B$12)", "gen")
    notes = [
        'Square-root rule ("sqrt"): the location is scaled by h and the spread around it by '
        "√h — the common convention.",
        'I.i.d. rule ("iid"): the exact law of the sum of h independent daily returns with '
        "the fitted law (numerical convolution in the add-in).",
        "Normal law: mean = AVERAGE, σ = STDEV.S, computed with the built-ins NORM.S.INV and "
        "NORM.S.DIST only: VaR = σ·z − μ, ES = σ·φ(z)/(1−c) − μ, z = NORM.S.INV(c). It is the "
        "error distribution with shape 2 and scale √2·σ.",
        "For the normal law both rules give the same h-day law: mean h·μ and standard "
        "deviation σ·√h.",
        "Edit the yellow cells to change the confidence levels, the horizon or the position. "
        "B12 is the amount argument of ERRDIST_VAR / ERRDIST_ES; it is left blank so that the "
        "argument takes its default (return units) while the horizon rule is still given.",
    ]

    heads = (
        "Confidence",
        "VaR 1 day",
        "ES 1 day",
        "VaR h days (√h)",
        "ES h days (√h)",
        "VaR h days (i.i.d.)",
        "ES h days (i.i.d.)",
    )

    def table(top: int, title: str, rows: Callable[[str], list[str]], key: str = "") -> None:
        sp.text(f"A{top}", title, "h2")
        for c in "BCDEFG":
            sp.text(f"{c}{top}", "", "h2")
        sp.row_heights[top - 1] = 27  # room above the section title
        for j, h in enumerate(heads):
            sp.text(cell(top, j), h, "head_r")
        sp.row_heights[top] = 32
        for i, conf in enumerate(CONFIDENCES):
            rr = top + 2 + i
            conf_cell = f"$A${rr}"
            if key:
                sp.number(f"A{rr}", conf, "input_pct")
            else:
                sp.formula(f"A{rr}", f"=A{rr - (top - 14)}", "pct1")
            for j, f in enumerate(rows(conf_cell)):
                sp.formula(cell(rr - 1, 1 + j), f, "pct3")
            if key and conf == 0.99:
                ctx.keys["var99"] = absref(RISK, f"B{rr}")
                ctx.keys["es99"] = absref(RISK, f"C{rr}")

    p = "$B$5,$B$6,$B$7"

    def fitted(c: str) -> list[str]:
        return [
            f"=ERRDIST_VAR({c},{p},1,$B$12)",
            f"=ERRDIST_ES({c},{p},1,$B$12)",
            f'=ERRDIST_VAR({c},{p},$B$10,$B$12,"sqrt")',
            f'=ERRDIST_ES({c},{p},$B$10,$B$12,"sqrt")',
            f'=ERRDIST_VAR({c},{p},$B$10,$B$12,"iid")',
            f'=ERRDIST_ES({c},{p},$B$10,$B$12,"iid")',
        ]

    def normal(c: str) -> list[str]:
        z = f"NORM.S.INV({c})"
        var1 = f"$B$9*{z}-$B$8"
        es1 = f"$B$9*NORM.S.DIST({z},FALSE)/(1-{c})-$B$8"
        var_h = f"SQRT($B$10)*$B$9*{z}-$B$10*$B$8"
        es_h = f"SQRT($B$10)*$B$9*NORM.S.DIST({z},FALSE)/(1-{c})-$B$10*$B$8"
        return [f"=$B$13*({f})" for f in (var1, es1, var_h, es_h, var_h, es_h)]

    table(14, "Fitted error distribution (ERRDIST_VAR, ERRDIST_ES)", fitted, key="fit")
    table(20, "Normal law, same mean and standard deviation (built-ins only)", normal)
    # Ratio fitted / normal.
    top = 26
    sp.text(f"A{top}", "Fitted / normal", "h2")
    for c in "BCDEFG":
        sp.text(f"{c}{top}", "", "h2")
    sp.row_heights[top - 1] = 27
    for j, h in enumerate(heads):
        sp.text(cell(top, j), h, "head_r")
    sp.row_heights[top] = 32
    for i in range(len(CONFIDENCES)):
        rr = top + 2 + i
        sp.formula(f"A{rr}", f"=A{16 + i}", "pct1")
        for j in range(6):
            col = "BCDEFG"[j]
            sp.formula(f"{col}{rr}", f"={col}{16 + i}/{col}{22 + i}", "num2")
    # Money figures.
    top = 32
    sp.page_breaks.append(top - 1)  # the money table and the notes on a page of their own
    sp.text(f"A{top}", "In money, one day (position value in B11)", "h2")
    for c in "BCDEFG":
        sp.text(f"{c}{top}", "", "h2")
    sp.row_heights[top - 1] = 27
    for j, h in enumerate(("Confidence", "VaR 1 day", "ES 1 day")):
        sp.text(cell(top, j), h, "head_r")
    for i in range(len(CONFIDENCES)):
        rr = top + 2 + i
        sp.formula(f"A{rr}", f"=A{16 + i}", "pct1")
        sp.formula(f"B{rr}", f"=ERRDIST_VAR($A{rr},{p},1,$B$11)", "money")
        sp.formula(f"C{rr}", f"=ERRDIST_ES($A{rr},{p},1,$B$11)", "money")
    top += len(CONFIDENCES) + 3
    sp.text(f"A{top}", "Notes", "h2")
    for c in "BCDEFG":
        sp.text(f"{c}{top}", "", "h2")
    for i, note in enumerate(notes):
        sp.paragraph(f"A{top + 1 + i}", note, 7)
    sp.print_area = f"A1:G{top + len(notes)}"


def _fit_check(plan: Plan, ctx: _Ctx) -> None:
    if "fit_mle_loc" not in ctx.keys:
        return
    sp = plan.add_sheet(FITCHECK)
    sp.landscape = True
    r = ctx.r
    loc, scale, shape = (ctx.keys[f"fit_mle_{p}"] for p in ("loc", "scale", "shape"))
    _heading(
        sp, f"Fit check — {ctx.fund}", "How well the maximum likelihood fit describes the returns."
    )
    sp.width("A", 26)
    sp.width("B", 13, "J")
    sp.width("K", 3)
    sp.width("G", 15, "H")
    sp.width("L", 16, "O")
    row = 4
    if ctx.has("ERRDIST_GOF"):
        sp.text(f"A{row}", "Goodness of fit (ERRDIST_GOF)", "h2")
        for c in "BCDE":
            sp.text(f"{c}{row}", "", "h2")
        sp.text(f"A{row + 1}", "Law to test: loc, scale, shape")
        for c in "BCD":
            sp.blank(f"{c}{row + 1}", "input")
        sp.text(
            f"E{row + 1}",
            "optional; blank: the maximum likelihood law, refitted to each simulated sample",
            "note",
        )
        args = (ctx.returns.reshape(-1, 1).tolist(), None, None, None, GOF_STATISTIC, 19, GOF_SEED)
        rows = _call_entry("ERRDIST_GOF", *args)
        law = f"B{row + 1},C{row + 1},D{row + 1}"
        f = f'=ERRDIST_GOF({r},{law},"{GOF_STATISTIC}",{GOF_SAMPLES},{GOF_SEED})'
        sp.spill(
            f"A{row + 2}",
            len(rows),
            len(rows[0]),
            f,
            "gen",
            cell_fmts=_label_value_fmts(rows, _GOF_FMTS),
        )
        sp.text(
            f"D{row + 2}",
            "Anderson-Darling statistic A²; its p-value comes from "
            f"{GOF_SAMPLES} samples simulated",
            "note",
        )
        sp.text(
            f"D{row + 3}",
            "from the fitted law, each refitted before its statistic is "
            "computed (parametric bootstrap,",
            "note",
        )
        sp.text(
            f"D{row + 4}",
            "Stephens 1974), with a fixed seed so the figure is "
            "reproducible. A p-value below 0.05 says",
            "note",
        )
        sp.text(f"D{row + 5}", "the data are unlikely under the fitted law.", "note")
        row += 1
        row += len(rows) + 2
    if ctx.has("ERRDIST_COMPARE"):
        sp.text(f"A{row}", "Rival laws (ERRDIST_COMPARE), best AIC first", "h2")
        for c in "BCDEFGHIJ":
            sp.text(f"{c}{row}", "", "h2")
        rows = _call_entry("ERRDIST_COMPARE", ctx.returns.reshape(-1, 1).tolist(), True)
        sp.spill(
            f"A{row + 1}",
            len(rows),
            len(rows[0]),
            f"=ERRDIST_COMPARE({r},TRUE)",
            "gen",
            head_rows=1,
            cell_fmts=_column_fmts(rows, _COMPARE_FMTS),
        )
        row += len(rows) + 2
    # Histogram against the fitted density.
    row = _histogram(sp, ctx, row, loc, scale, shape)
    if ctx.has("ERRDIST_EMPIRICAL"):
        sp.text("L4", "Empirical vs fitted (ERRDIST_EMPIRICAL)", "h2")
        for c in "MNO":
            sp.text(f"{c}4", "", "h2")
        e = sp.spill(
            "L5",
            ctx.n + 1,
            4,
            f"=ERRDIST_EMPIRICAL({r},{loc},{scale},{shape},TRUE)",
            "num",
            head_rows=1,
            cell_fmts=[["head_r1"] * 4] + [["pct3", "num4", "num4", "pct3"]] * ctx.n,
        )
        ctx.keys["emp_first_row"] = str(e.row + 2)
        ctx.keys["emp_last_row"] = str(e.row + 1 + ctx.n)
        sp.text(
            "L3",
            "Sorted returns, plotting position (i − 0.5)/n, fitted CDF, fitted "
            "quantile — the Charts sheet plots them.",
            "note",
        )
        sp.text("Q4", "QQ chart's 45° line", "h2")
        sp.text("Q5", "from (MIN)")
        sp.formula("R5", f"=MIN({r})", "pct3")
        sp.text("Q6", "to (MAX)")
        sp.formula("R6", f"=MAX({r})", "pct3")
        sp.width("Q", 12)
        sp.width("R", 12)
        ctx.keys["qq_line"] = absref(FITCHECK, "R5", "R6")
    sp.print_area = f"A1:J{row}"


def _histogram(sp: SheetPlan, ctx: _Ctx, row: int, loc: str, scale: str, shape: str) -> int:
    r = ctx.r
    sp.text(f"A{row}", f"Histogram vs fitted density ({HIST_BINS} bins, FREQUENCY)", "h2")
    for c in "BCDEFGH":
        sp.text(f"{c}{row}", "", "h2")
    sp.text(f"A{row + 1}", "Bin width")
    wcell = f"$B${row + 1}"
    sp.formula(f"B{row + 1}", f"=(MAX({r})-MIN({r}))/{HIST_BINS}", "pct3")
    sp.text(f"A{row + 2}", "Observations")
    ncell = f"$B${row + 2}"
    sp.formula(f"B{row + 2}", f"=COUNT({r})", "int")
    head = row + 3
    heads = (
        "Bin",
        "Lower",
        "Upper",
        "Midpoint",
        "Count",
        "Density",
        "Fitted density",
        "Normal density",
    )
    for j, h in enumerate(heads):
        sp.text(cell(head - 1, j), h, "head_r")
    first = head + 1
    last = first + HIST_BINS - 1
    for i in range(HIST_BINS):
        rr = first + i
        sp.number(f"A{rr}", i + 1, "int")
        sp.formula(f"B{rr}", f"=MIN({r})+{i}*{wcell}", "pct3")
        if i == HIST_BINS - 1:
            sp.formula(f"C{rr}", f"=MAX({r})", "pct3")
        else:
            sp.formula(f"C{rr}", f"=MIN({r})+{i + 1}*{wcell}", "pct3")
        sp.formula(f"D{rr}", f"=(B{rr}+C{rr})/2", "pct3")
        sp.formula(f"F{rr}", f"=E{rr}/({ncell}*{wcell})", "num2")
        sp.formula(f"H{rr}", f"=NORM.DIST(D{rr},{ctx.keys['mean']},{ctx.keys['sd']},FALSE)", "num2")
    sp.text(f"A{last + 1}", "above the last upper edge", "note")
    sp.spill(f"E{first}", HIST_BINS + 1, 1, f"=FREQUENCY({r},C{first}:C{last})", "int")
    if ctx.has("ERRDIST_PDF"):
        sp.spill(
            f"G{first}",
            HIST_BINS,
            1,
            f"=ERRDIST_PDF(D{first}:D{last},{loc},{scale},{shape})",
            "num2",
        )
    ctx.keys["hist_first"] = str(first)
    ctx.keys["hist_last"] = str(last)
    sp.paragraph(
        f"A{last + 2}",
        "Density = count / (observations × bin width), comparable with "
        "the fitted and normal densities at the bin midpoints. FREQUENCY's extra last "
        "cell counts returns above the last upper edge (always 0 here).",
        8,
        "note_wrap",
    )
    return last + 3


def _backtest(plan: Plan, ctx: _Ctx) -> None:
    if not ctx.has("ERRDIST_ROLLING_VAR"):
        return
    sp = plan.add_sheet(BACKTEST)
    sp.landscape = True
    n = ctx.n
    _heading(
        sp,
        f"Backtest — {ctx.fund}",
        f"Rolling {BACKTEST_WINDOW}-day one-day VaR at {BACKTEST_CONFIDENCE:.0%} "
        "(maximum likelihood refit each day) against the return that followed.",
    )
    for c, w in zip("ABCDEFGHIJKL", (12, 12, 14, 11, 19, 12, 3, 26, 30, 3, 26, 30), strict=True):
        sp.width(c, w)
    sp.text("A4", "Window (returns)")
    sp.number("C4", BACKTEST_WINDOW, "input_num")
    sp.text("A5", "Confidence")
    sp.number("C5", BACKTEST_CONFIDENCE, "input_pct")
    top = 7
    heads = ("Date", "Return", "VaR forecast", "Exception", "Exception return", "−VaR")
    for j, h in enumerate(heads):
        sp.text(cell(top - 1, j), h, "head_r")
    sp.freeze = (top, 0)
    sp.repeat_rows = (top - 1, top - 1)
    first, last = top + 1, top + n
    f0 = first + BACKTEST_WINDOW  # first row with a forecast
    ret = f"B{first}:B{last}"
    sp.spill(f"A{first}", n, 1, f"=Returns!A2:A{n + 1}", "date")
    sp.spill(f"B{first}", n, 1, f"=Returns!B2:B{n + 1}", "pct3")
    sp.spill(f"C{first}", n, 1, f'=ERRDIST_ROLLING_VAR({ret},$C$4,$C$5,"mle")', "pct3")
    if n > BACKTEST_WINDOW:
        rng_b, rng_c = f"B{f0}:B{last}", f"C{f0}:C{last}"
        m = last - f0 + 1
        sp.spill(f"D{f0}", m, 1, f"=IF(-{rng_b}>{rng_c},1,0)", "int")
        # 0 rather than NA() off the exception days: the chart draws these as columns, and
        # a zero-height column is invisible in every spreadsheet program (LibreOffice plots
        # #N/A as 0 in line charts, which would draw a band of markers along the axis).
        sp.spill(f"E{f0}", m, 1, f"=IF(D{f0}:D{last}=1,{rng_b},0)", "pct3")
        sp.spill(f"F{f0}", m, 1, f"=-{rng_c}", "pct3")
        ctx.keys["bt_first"] = str(f0)
        ctx.keys["bt_last"] = str(last)
        # Summary with built-ins.
        sp.text("H4", "Summary (built-in functions)", "h2")
        sp.text("I4", "", "h2")
        last250 = max(f0, last - 249)
        rows = [
            ("Forecasts", f"=COUNT({rng_c})", "int"),
            ("Exceptions", f"=SUM(D{f0}:D{last})", "int"),
            ("Expected exceptions", "=(1-$C$5)*I5", "num2"),
            ("Exception rate", "=I6/I5", "pct"),
            ("Exceptions, last 250 days", f"=SUM(D{last250}:D{last})", "int"),
            ("Zone, last 250 days", '=IF(I9<=4,"green",IF(I9<=9,"yellow","red"))', "key_text"),
        ]
        for i, (label, f, fmt) in enumerate(rows):
            sp.text(f"H{5 + i}", label)
            sp.formula(f"I{5 + i}", f, fmt)
        ctx.keys["bt_exceptions"] = absref(BACKTEST, "I9")
        ctx.keys["bt_zone_builtin"] = absref(BACKTEST, "I10")
        sp.text("H11", "Basel (1996) zones for 250 days at 99%: green 0–4, yellow 5–9,", "note")
        sp.text("H12", "red 10 or more exceptions.", "note")
        if ctx.has("ERRDIST_BACKTEST"):
            m = last - f0 + 1
            stub = _rolling_stub(ctx)
            blocks = (
                ("H", f"Coverage tests, all {m} forecasts (ERRDIST_BACKTEST)", f0, stub),
                (
                    "K",
                    "Last 250 days: zone and plus factor (ERRDIST_BACKTEST)",
                    last250,
                    stub[-(last - last250 + 1) :],
                ),
            )
            for col, title, r0, var_stub in blocks:
                sp.text(f"{col}14", title, "h2")
                sp.text(f"{chr(ord(col) + 1)}14", "", "h2")
                rows_bt = _call_entry(
                    "ERRDIST_BACKTEST",
                    ctx.returns[-len(var_stub) :].reshape(-1, 1).tolist(),
                    var_stub.reshape(-1, 1).tolist(),
                    BACKTEST_CONFIDENCE,
                    True,
                )
                e = sp.spill(
                    f"{col}15",
                    len(rows_bt),
                    len(rows_bt[0]),
                    f"=ERRDIST_BACKTEST(B{r0}:B{last},C{r0}:C{last},$C$5,TRUE)",
                    "gen",
                    head_rows=1,
                    cell_fmts=_label_value_fmts(rows_bt, _BACKTEST_FMTS, head_rows=1),
                )
                for i, rr in enumerate(rows_bt):
                    if col == "K" and str(rr[0]).strip().lower() == "zone":
                        ctx.keys["bt_zone"] = absref(BACKTEST, cell(e.row + i, e.col + 1))
        ctx.keys.setdefault("bt_zone", ctx.keys["bt_zone_builtin"])
    sp.print_area = f"A1:L{last}"


def _rolling_stub(ctx: _Ctx) -> np.ndarray:
    """A placeholder VaR series of the right length, used only to size the backtest table."""
    m = ctx.n - BACKTEST_WINDOW
    return np.full(m, float(np.std(ctx.returns)) * 2.33)


def _charts(plan: Plan, ctx: _Ctx) -> None:
    sp = plan.add_sheet(CHARTS)
    sp.landscape = True
    chart_pages.add_charts(sp, ctx.keys, fitcheck=FITCHECK, backtest=BACKTEST, fund=ctx.fund)


def _conf(plan: Plan) -> None:
    sp = plan.add_sheet(CONF)
    sp.width("A", 16)
    sp.width("B", 30)
    sp.width("D", 70)
    sp.text("A1", "UDF Modules")
    sp.text("B1", UDF_MODULE)
    sp.text(
        "D1",
        "Read by the xlwings add-in: keys in column A from A1 down, values in column B.",
        "note",
    )
    sp.text("D2", "UDF Modules names the Python module that holds the ERRDIST_ functions.", "note")
    sp.text("D3", "Other settings (interpreter, conda) can go in the rows below A1.", "note")
    sp.print_area = "A1:D3"


# ---------------------------------------------------------------------------------- build


def _clean_prices(prices: pd.DataFrame, as_of: object) -> pd.DataFrame:
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
    ctx = _Ctx(
        fund=fund_name,
        dates=dates,
        prices=values,
        funcs=_catalog_names() if functions is None else functions,
    )
    ctx.returns = np.diff(np.log(values))
    VOLATILE_CELLS.clear()
    last = dates[-1]
    plan = Plan(
        title=f"Monthly risk workbook — {fund_name}",
        subject=f"Error-distribution fit, VaR/ES, fit check and backtest as of {last:%Y-%m-%d}",
        created=_dt.datetime(last.year, last.month, last.day, 18, 0, 0),
    )
    _prices(plan, ctx)
    _returns(plan, ctx)
    _calibration(plan, ctx)
    _risk(plan, ctx)
    _fit_check(plan, ctx)
    _backtest(plan, ctx)
    _guide(plan, ctx)  # last: its key figures point at cells laid out above
    _charts(plan, ctx)
    _conf(plan)
    plan.sheets.sort(key=lambda sheet: SHEETS.index(sheet.name))
    plan.keys = dict(ctx.keys)
    return plan


def _default_evaluator() -> Evaluator:
    from errdist.workbook.engine import evaluate_workbook

    return evaluate_workbook


def _lookup(values: Values, key: str) -> object:
    """Value of an absolute reference such as ``Calibration!$G$7`` in evaluated values."""
    sheet, ref = key.rsplit("!", 1)
    sheet = sheet.strip("'").replace("''", "'")
    return values.get((sheet, ref.replace("$", "")))


def _summary(plan: Plan, values: Values, prices: pd.DataFrame, fund: str) -> dict[str, Any]:
    keys = plan.keys

    def num(name: str) -> float:
        v = _lookup(values, keys[name]) if name in keys else None
        try:
            return float(v)  # type: ignore[arg-type]
        except (TypeError, ValueError):
            return math.nan

    out: dict[str, Any] = {
        "fund": fund,
        "first_date": pd.Timestamp(prices["date"].iloc[0]).strftime("%Y-%m-%d"),
        "last_date": pd.Timestamp(prices["date"].iloc[-1]).strftime("%Y-%m-%d"),
        "n_returns": len(prices) - 1,
    }
    for method in ("mom", "mle"):
        name = "moments" if method == "mom" else "mle"
        out[name] = {p: num(f"fit_{method}_{p}") for p in ("loc", "scale", "shape")}
    out["var99"] = num("var99")
    out["es99"] = num("es99")
    out["backtest_exceptions"] = num("bt_exceptions")
    zone = _lookup(values, keys["bt_zone"]) if "bt_zone" in keys else None
    out["backtest_zone"] = "" if zone is None else str(zone)
    return out


def _canonical(values: Values, plan: Plan) -> dict[tuple[str, str], object]:
    """Engine results keyed by the plan's own sheet names (engines may change the case)."""
    names = {s.name.upper(): s.name for s in plan.sheets}
    out: dict[tuple[str, str], object] = {}
    for (sheet, ref), v in values.items():
        out[(names.get(str(sheet).upper(), str(sheet)), str(ref).replace("$", "").upper())] = v
    return out


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
        values = _canonical(evaluate(first), plan)
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
    return BuildResult(out_path, _summary(plan, values, df, fund_name), timings)


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
