"""The Guide sheet: what the workbook holds, its key figures and the cautions.

Laid out after the other sheets (:data:`LAYOUT_LAST`) because its key figures point at cells
they publish in ``ctx.keys``; it is still the first sheet of the workbook and the one that
opens. The prose lives in :mod:`errdist.workbook.guide_text`.
"""

from __future__ import annotations

from errdist.workbook import guide_text
from errdist.workbook.layout import Plan
from errdist.workbook.sheets.context import VOLATILE_CELLS, Context
from errdist.workbook.sheets.tables import heading

NAME = "Guide"
LAYOUT_LAST = True
"""Laid out once every other sheet has published its key cells."""


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Guide: heading, key figures (from ``ctx.keys``) and the guide text."""
    sp = plan.add_sheet(NAME)
    sp.width("A", 30)
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
