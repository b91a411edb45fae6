"""The panel's overview workbook (XlsxWriter): one row per series, a chart, a guide.

Sheets
------
Overview
    The ranked table of :func:`errdist.panel.table.build_table` with readable headings, the
    monthly workbook's number formats (:data:`errdist.workbook.writer.FORMATS`), an
    autofilter on every column (sort and filter from the heading row) and frozen headings.
VaR chart
    One-day VaR at each confidence for the series with the largest Expected Shortfall
    (at most :data:`CHART_SERIES` of them, read from the Overview rows).
Guide
    What the columns mean, the settings used, and the monthly workbook's cautions
    (:data:`errdist.workbook.guide_text.CAUTIONS`, shared, not copied).

Values are plain numbers (no formulas), so the file reads the same in any spreadsheet program.
"""

from __future__ import annotations

import datetime as dt
import math
import os
from pathlib import Path
from typing import Any

import pandas as pd

from errdist.panel.job import JobOptions, conf_tag
from errdist.panel.models import get_models
from errdist.panel.table import rank_column
from errdist.workbook import guide_text
from errdist.workbook.atomic import atomic_path
from errdist.workbook.writer import FORMATS

__all__ = ["CHART_SERIES", "column_label", "write_overview"]

CHART_SERIES = 40
"""Most series drawn on the VaR chart (the riskiest by Expected Shortfall)."""

OVERVIEW = "Overview"
CHART = "VaR chart"
GUIDE = "Guide"
_TOP = 4  # 0-based row of the heading row on the Overview sheet

_FIXED_LABELS = {
    "rank": ("Rank", "int", 6),
    "series": ("Series", "label_b", 18),
    "status": ("Status", "label", 8),
    "reason": ("Reason (failed series)", "label", 40),
    "notes": ("Notes", "label", 40),
    "first_date": ("First price", "date", 11),
    "last_date": ("Last price", "date", 11),
    "n": ("Returns", "int", 8),
    "mle_loc": ("MLE loc", "num", 11),
    "mle_scale": ("MLE scale", "num", 11),
    "mle_shape": ("MLE shape", "num4", 9),
    "mle_loglik": ("MLE log-likelihood", "num2", 12),
    "mle_aic": ("MLE AIC", "num2", 11),
    "at_bound": ("Shape at search bound", "bool", 9),
    "moments_loc": ("Moments loc", "num", 11),
    "moments_scale": ("Moments scale", "num", 11),
    "moments_shape": ("Moments shape", "num4", 9),
    "gof_statistic": ("Fit check statistic", "num4", 10),
    "gof_pvalue": ("Fit check p-value", "pval", 9),
    "gof_samples": ("Fit check samples", "int", 9),
    "gof_seed": ("Fit check seed", "int", 20),
    "best_law": ("Best law by AIC", "label", 16),
    "aic_gap": ("AIC of error law minus best", "num2", 11),
    "book": ("Monthly workbook", "label", 24),
}

_MODEL_LABELS = {
    "forecasts": ("forecasts", "int", 10),
    "exceptions": ("exceptions", "int", 10),
    "expected": ("expected exceptions", "num2", 10),
    "pof_pvalue": ("p-value POF (Kupiec)", "pval", 11),
    "ind_pvalue": ("p-value IND (Christoffersen)", "pval", 13),
    "cc_pvalue": ("p-value CC (Christoffersen)", "pval", 13),
    "exceptions_last": ("exceptions, last {z}", "int", 10),
    "zone": ("zone, last {z}", "label", 9),
}


def column_label(col: str, opts: JobOptions) -> tuple[str, str, float]:
    """Heading, cell format name and column width of output column ``col``."""
    if col in _FIXED_LABELS:
        return _FIXED_LABELS[col]
    if col.startswith(("var_", "es_")):
        kind, tag, days = col.split("_")
        d = int(days[:-1])
        rule = "" if d == 1 else (" (√h)" if opts.horizon_rule == "sqrt" else " (i.i.d.)")
        what = "VaR" if kind == "var" else "ES"
        return f"{what} {tag}% {d} day{'s' if d > 1 else ''}{rule}", "pct3", 10
    for m in opts.models:
        prefix = f"{m}_"
        if col.startswith(prefix) and col[len(prefix) :] in _MODEL_LABELS:
            text, fmt, width = _MODEL_LABELS[col[len(prefix) :]]
            return f"{m} backtest: {text.format(z=opts.zone_days)}", fmt, max(width, 12)
    return col, "gen", 12


def _blank(v: Any) -> bool:
    return v is None or v is pd.NA or v is pd.NaT or (isinstance(v, float) and math.isnan(v))


def _write_cell(ws: Any, r: int, c: int, v: Any, fmt: Any) -> None:
    if _blank(v):
        ws.write_blank(r, c, None, fmt)
    elif isinstance(v, bool):
        ws.write_boolean(r, c, v, fmt)
    elif isinstance(v, (dt.date, dt.datetime)):
        ws.write_datetime(r, c, dt.datetime(v.year, v.month, v.day), fmt)
    elif isinstance(v, (int, float)) and not isinstance(v, bool):
        ws.write_number(r, c, float(v), fmt)
    else:
        ws.write_string(r, c, str(v), fmt)


def write_overview(
    table: pd.DataFrame,
    path: str | os.PathLike[str],
    opts: JobOptions,
    *,
    source: str,
    as_of: dt.date,
    force: bool = False,
    atomic: bool = True,
) -> Path:
    """Write the overview workbook (see the module docstring); with ``atomic`` through
    :func:`errdist.workbook.atomic.atomic_path`, without straight to ``path``."""
    import xlsxwriter

    if atomic:
        with atomic_path(path, force=force) as tmp:
            write_overview(table, tmp, opts, source=source, as_of=as_of, atomic=False)
        return Path(path)
    wb = xlsxwriter.Workbook(str(path), {"strings_to_numbers": False})
    wb.set_properties(
        {
            "title": "errdist panel overview",
            "subject": f"Error-distribution fit, VaR/ES and backtests as of {as_of}",
            "created": dt.datetime(2000, 1, 1),
        }
    )
    fmts = {name: wb.add_format(props) for name, props in FORMATS.items()}
    _overview_sheet(wb, fmts, table, opts, source, as_of)
    _chart_sheet(wb, fmts, table, opts)
    _guide_sheet(wb, fmts, opts, source, as_of)
    wb.close()
    return Path(path)


def _overview_sheet(
    wb: Any,
    fmts: dict[str, Any],
    table: pd.DataFrame,
    opts: JobOptions,
    source: str,
    as_of: dt.date,
) -> None:
    ws = wb.add_worksheet(OVERVIEW)
    n_ok = int((table["status"] == "ok").sum())
    n_failed = len(table) - n_ok
    key_label = column_label(rank_column(opts), opts)[0]
    ws.write_string(
        0, 0, f"Panel overview — {len(table):,} series as of {as_of:%Y-%m-%d}", fmts["title"]
    )
    ws.write_string(
        1,
        0,
        f"Ranked by {key_label} of the maximum-likelihood error law, largest first; "
        f"{n_ok:,} computed, {n_failed:,} failed (listed last with the reason). "
        f"Source: {Path(source).name}. Use the arrows in the heading row to sort or filter.",
        fmts["subtitle"],
    )
    ws.write_string(
        2,
        0,
        "Model figures under an assumed symmetric, i.i.d. law: read the Guide sheet's cautions "
        "before relying on any of them. Not investment advice.",
        fmts["note"],
    )
    cols = list(table.columns)
    for j, col in enumerate(cols):
        label, fmt, width = column_label(col, opts)
        text_column = fmt in ("label", "label_b")  # headings sit over their values' side
        ws.write_string(_TOP, j, label, fmts["head"] if text_column else fmts["head_r"])
        ws.set_column(j, j, width)
    ws.set_row(_TOP, 62)
    fmt_of = [fmts[column_label(c, opts)[1]] for c in cols]
    values = table.to_numpy(dtype=object)
    for i, row in enumerate(values):
        r = _TOP + 1 + i
        for j, v in enumerate(row):
            _write_cell(ws, r, j, v, fmt_of[j])
    last = _TOP + max(1, len(table))
    ws.autofilter(_TOP, 0, last, len(cols) - 1)
    ws.freeze_panes(_TOP + 1, 2)
    ws.set_landscape()
    ws.set_paper(8)  # A3: the table is wide; headings and series names repeat on each page
    ws.repeat_rows(_TOP)
    ws.repeat_columns(0, 1)


def _chart_sheet(wb: Any, fmts: dict[str, Any], table: pd.DataFrame, opts: JobOptions) -> None:
    ws = wb.add_worksheet(CHART)
    cols = list(table.columns)
    ranked = int(table["rank"].notna().sum())
    k = min(CHART_SERIES, ranked)
    ws.write_string(0, 0, "One-day VaR across series", fmts["title"])
    ws.write_string(
        1,
        0,
        f"The {k} series with the largest {column_label(rank_column(opts), opts)[0]} "
        f"(of {ranked:,} computed), in the Overview's order.",
        fmts["subtitle"],
    )
    if k == 0:
        ws.write_string(
            3, 0, "No series could be computed: see the Overview's reasons.", fmts["note"]
        )
        return
    chart = wb.add_chart({"type": "column"})
    first, lastr = _TOP + 1, _TOP + k
    name_col = cols.index("series")
    colors = ("#9DC3E6", "#2E75B6", "#1F3864", "#7F7F7F")
    for i, c in enumerate(sorted(opts.confidences)):
        j = cols.index(f"var_{conf_tag(c)}_1d")
        chart.add_series(
            {
                "name": column_label(f"var_{conf_tag(c)}_1d", opts)[0],
                "categories": [OVERVIEW, first, name_col, lastr, name_col],
                "values": [OVERVIEW, first, j, lastr, j],
                "fill": {"color": colors[i % len(colors)]},
                "gap": 60,
            }
        )
    chart.set_title(
        {"name": "One-day VaR of the fitted error law (positive loss)", "name_font": {"size": 12}}
    )
    chart.set_y_axis(
        {
            "name": "Loss (daily log return)",
            "num_format": "0.0%",
            "major_gridlines": {"visible": True, "line": {"color": "#D9D9D9"}},
        }
    )
    chart.set_x_axis(
        {"name": "Series (largest Expected Shortfall first)", "num_font": {"rotation": -45}}
    )
    chart.set_legend({"position": "bottom"})
    chart.set_size({"width": max(720, 22 * k + 200), "height": 420})
    ws.insert_chart(3, 0, chart)
    ws.set_landscape()
    ws.fit_to_pages(1, 1)


def _guide_sheet(
    wb: Any, fmts: dict[str, Any], opts: JobOptions, source: str, as_of: dt.date
) -> None:
    ws = wb.add_worksheet(GUIDE)
    ws.set_column(0, 0, 100)
    ws.fit_to_pages(1, 0)
    conf = ", ".join(f"{conf_tag(c)}%" for c in opts.confidences)
    rule = "square-root-of-time" if opts.horizon_rule == "sqrt" else "exact i.i.d. sum"
    models = get_models(list(opts.models))
    blocks: list[tuple[str, str]] = [
        ("h2", "What this workbook holds"),
        (
            "wrap",
            "One row per price series of the input file: both fits of the generalized normal "
            '("error") distribution to the series\' daily log returns, VaR and Expected '
            f"Shortfall of the maximum-likelihood law at {conf} for one day and {opts.horizon} "
            f"days ({rule} rule), the goodness-of-fit p-value, the best law by AIC among the "
            "error law and its rivals (normal, Laplace, Student t, Cauchy), and the rolling "
            "backtest of each VaR model. Each row has the figures the monthly workbook of that "
            "series shows; build one with errdist refresh to look at a series in detail.",
        ),
        (
            "wrap",
            "A series that could not be used keeps its row, with status failed and the reason "
            "(the same checks and messages as errdist refresh). Notes list steps that failed "
            "on an otherwise computed series (e.g. a series too short for the backtest).",
        ),
        ("h2", "Settings of this run"),
        ("bullet", f"Prices file: {source}; all series cut at {as_of:%Y-%m-%d}."),
        ("bullet", f"VaR / ES confidences: {conf}; longer horizon {opts.horizon} days ({rule})."),
        (
            "bullet",
            (
                f"Goodness of fit: {opts.gof_statistic.upper()} statistic, parametric bootstrap "
                f"with {opts.gof_samples} simulated data sets, seeded per series (the seed "
                "column reproduces a p-value with ERRDIST_GOF)."
            )
            if opts.gof_samples > 0
            else "Goodness of fit: not run (--gof-samples 0).",
        ),
        (
            "bullet",
            f"Backtests: rolling {opts.window}-return window, one-day VaR at "
            f"{conf_tag(opts.backtest_confidence)}%; coverage tests over all forecasts, "
            f"exceptions and Basel zone over the last {opts.zone_days}. Models: "
            + ("; ".join(f"{m.name} = {m.label}" for m in models) or "none")
            + ".",
        ),
        ("h2", "Reading the columns"),
        (
            "bullet",
            "VaR and ES are positive losses in daily log-return units (0.025 = a 2.5% loss).",
        ),
        (
            "bullet",
            "Fit check p-value: a small value (below 0.05) says the error law does not "
            "describe the series well; treat its VaR and ES with extra care.",
        ),
        (
            "bullet",
            "AIC of error law minus best: 0 when the error law is the best; a gap above about "
            "2 favours the rival named in Best law by AIC.",
        ),
        (
            "bullet",
            "Backtest p-values below 0.05 reject correct coverage (POF), independent "
            "exceptions (IND) or both (CC); the zone follows the Basel (1996) traffic light.",
        ),
        *guide_text.CAUTIONS,
    ]
    style = {"h2": "h2", "wrap": "wrap", "bullet": "wrap", "step": "wrap"}
    ws.write_string(0, 0, "Guide — errdist panel overview", fmts["title"])
    r = 2
    for kind, text in blocks:
        prefix = "•  " if kind == "bullet" else ""
        ws.write_string(r, 0, prefix + text, fmts[style[kind]])
        if kind != "h2":
            ws.set_row(r, 15 * max(1, math.ceil(len(text) / 105)))
        r += 1 if kind != "h2" else 1
