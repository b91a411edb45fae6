"""The Charts sheet: two charts per printed page, drawn from Fit check and Backtest cells.

The chart definitions live in :mod:`errdist.workbook.charts`.
"""

from __future__ import annotations

from errdist.workbook import charts as chart_pages
from errdist.workbook.layout import Plan, PrintSetup
from errdist.workbook.sheets import backtest, fit_check
from errdist.workbook.sheets.context import Context

NAME = "Charts"
PRINT = PrintSetup(landscape=False, pages_tall=2)  # five charts on two pages
"""Printed portrait, two charts a page (see :mod:`errdist.workbook.charts`)."""


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Charts sheet (needs the Fit check and Backtest keys)."""
    sp = plan.add_sheet(NAME)
    sp.landscape = True
    chart_pages.add_charts(
        sp, ctx.keys, fitcheck=fit_check.NAME, backtest=backtest.NAME, fund=ctx.fund
    )
