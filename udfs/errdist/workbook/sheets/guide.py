"""The Guide sheet: what the workbook holds, its key figures and the cautions.

Laid out after the other sheets (:data:`LAYOUT_LAST`) because its key figures point at cells
they publish in ``ctx.keys``; it is still the first sheet of the workbook and the one that
opens. The prose lives in :mod:`errdist.workbook.guide_text`.
"""

from __future__ import annotations

from errdist.workbook import guide_text
from errdist.workbook.layout import Plan, PrintSetup
from errdist.workbook.sheets.context import VOLATILE_CELLS, Context
from errdist.workbook.sheets.tables import heading
from errdist.workbook.summary import SHAPE_GAP_MARGIN

NAME = "Guide"
PRINT = PrintSetup(pages_tall=1)  # the guide and its cautions on one page
LAYOUT_LAST = True
"""Laid out once every other sheet has published its key cells."""


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Guide: heading, key figures (from ``ctx.keys``) and the guide text."""
    sp = plan.add_sheet(NAME)
    sp.width("A", 31)
    sp.width("B", 22)
    sp.width("C", 70)
    sp.tab_color = "#1F3864"
    first, last = ctx.dates[0], ctx.dates[-1]
    heading(
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
    if "gof_pvalue" in ctx.keys:
        p = ctx.keys["gof_pvalue"]
        key_rows += [
            (
                "Fit verdict",
                f'=IF({p}<0.05,"error law rejected at 5%","error law not rejected at 5%")',
                "key_text",
                "Anderson-Darling test of the fitted law (Fit check sheet)",
            ),
            (
                "Goodness-of-fit p-value",
                "=" + p,
                "key_p",
                "below 0.05: the data are unlikely under the fitted law",
            ),
        ]
    if "compare_best" in ctx.keys:
        key_rows.append(
            (
                "Best law by AIC",
                "=" + ctx.keys["compare_best"],
                "key_text",
                "symmetric laws compared on the Fit check sheet (lower AIC is better)",
            )
        )
    if "aic_winner" in ctx.keys:
        key_rows.append(
            (
                "Skewed vs symmetric law",
                "=" + ctx.keys["aic_winner"],
                "key_text",
                "the one with the lower AIC (Models sheet)",
            )
        )
    if "fit_mom_shape" in ctx.keys:
        mom, mle = ctx.keys["fit_mom_shape"], ctx.keys["fit_mle_shape"]
        gap = f"ABS({mom}-{mle})/{mle}"
        key_rows.append(
            (
                "Shapes, moments vs MLE",
                f'=IF({gap}>{SHAPE_GAP_MARGIN},"WARNING: they differ by more than '
                f'{SHAPE_GAP_MARGIN:.0%}","agree within {SHAPE_GAP_MARGIN:.0%}")',
                "key_text",
                f"relative gap; {SHAPE_GAP_MARGIN:.0%} is a common-practice margin (no "
                "source): a larger gap means the tail is not well pinned down",
            )
        )
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
    if "cond_var99" in ctx.keys:
        key_rows += [
            (
                "Model of today's figures",
                "=" + ctx.keys["cond_model"],
                "key_text",
                "conditional model chosen on the Models sheet (the one passing the backtest)",
            ),
            (
                "Today's VaR 99%, model",
                "=" + ctx.keys["cond_var99"],
                "key_pct",
                "model named on the Models sheet (GJR-GARCH, skewed law, by default); Risk sheet",
            ),
            ("Today's ES 99%, model", "=" + ctx.keys["cond_es99"], "key_pct", ""),
            (
                "Today's ES 97.5%, model",
                "=" + ctx.keys["cond_es975"],
                "key_pct",
                "the Basel market-risk (FRTB 2019) ES level",
            ),
        ]
    if "cmp_gjr_verdict" in ctx.keys:
        key_rows += [
            (
                "Backtest verdict, GJR-GARCH",
                "=" + ctx.keys["cmp_gjr_verdict"],
                "key_text",
                "last 250 days: 99% VaR exceptions, Kupiec, Christoffersen, zone, ES backtest "
                "(Backtest sheet)",
            ),
            (
                "Exceptions, GJR-GARCH",
                "=" + ctx.keys["cmp_gjr_row_exceptions"],
                "key_int",
                "",
            ),
            ("Zone, GJR-GARCH", "=" + ctx.keys["cmp_gjr_row_zone"], "key_text", ""),
            (
                "Kupiec p-value, GJR-GARCH",
                "=" + ctx.keys["cmp_gjr_row_p-value POF"],
                "key_p",
                "",
            ),
            (
                "Backtest verdict, EWMA",
                "=" + ctx.keys["cmp_ewma_verdict"],
                "key_text",
                "",
            ),
            (
                "Backtest verdict, error law",
                "=" + ctx.keys["cmp_symmetric_verdict"],
                "key_text",
                "the unconditional symmetric law, refitted daily to 250 days, for comparison",
            ),
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
            VOLATILE_CELLS[(NAME, e.a1)] = "ERRDIST_VERSION(): changes with each release"
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
    plan.active = NAME
