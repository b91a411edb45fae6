"""The Calibration sheet: sample statistics, the two fits and the fit report.

Publishes the sample statistics (``mean``, ``sd``...) and the fitted parameters
(``fit_mle_loc``... ``fit_mom_shape``) in ``ctx.keys``; the lower half, the moments fit with
built-ins only, is :mod:`errdist.workbook.sheets.builtin_moments`.
"""

from __future__ import annotations

from errdist.workbook.layout import Plan, PrintSetup, absref
from errdist.workbook.sheets import builtin_moments
from errdist.workbook.sheets.context import Context, call_entry
from errdist.workbook.sheets.tables import heading, label_value_fmts

NAME = "Calibration"
PRINT = PrintSetup(landscape=True, pages_tall=1)
"""Printed on one landscape page."""

FIT_REPORT_FMTS: dict[str, str] = {
    "n used": "int",
    "blanks skipped": "int",
    "repeated values": "int",
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
"""Number formats of the ERRDIST_FIT_REPORT rows, by row label."""


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Calibration sheet (the built-in moments fit from row 15)."""
    sp = plan.add_sheet(NAME)
    sp.width("A", 34)
    sp.width("B", 15)
    sp.width("C", 15)
    sp.width("D", 32)
    sp.width("E", 15, "G")
    sp.width("H", 3)
    sp.width("I", 26)
    sp.width("J", 16)
    sp.landscape = True
    r = ctx.returns_range
    heading(
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
        ctx.keys[key] = absref(NAME, f"B{row}")

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
                ctx.keys[f"fit_{method}_{par}"] = absref(NAME, f"{c}{row}")
        sp.text(
            "D8",
            "The maximum likelihood fit feeds the Risk, Fit check and Backtest sheets.",
            "note",
        )
    notes_top = 16
    if ctx.has("ERRDIST_FIT_REPORT"):
        sp.text("I4", "Fit report (ERRDIST_FIT_REPORT)", "h2")
        sp.text("J4", "", "h2")
        rows = call_entry("ERRDIST_FIT_REPORT", ctx.returns.reshape(-1, 1).tolist())
        sp.spill(
            "I5",
            len(rows),
            len(rows[0]),
            f"=ERRDIST_FIT_REPORT({r})",
            "gen",
            cell_fmts=label_value_fmts(rows, FIT_REPORT_FMTS),
        )
        for i, row in enumerate(rows):
            if row[0] in ("MLE AIC", "MLE shape", "moments shape"):
                key = {"MLE AIC": "mle_aic", "MLE shape": "report_mle_shape"}.get(
                    str(row[0]), "report_mom_shape"
                )
                ctx.keys[key] = absref(NAME, f"J{5 + i}")
        notes_top = 5 + len(rows) + 2

    builtin_moments.layout_section(sp, ctx, top=15, notes_top=notes_top)
