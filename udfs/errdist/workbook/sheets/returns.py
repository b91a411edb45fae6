"""The Returns sheet: daily log returns from the Prices sheet (ERRDIST_RETURNS).

Publishes ``ctx.returns_range``, the returns column every later sheet analyses.
"""

from __future__ import annotations

from errdist.workbook.layout import Plan, absref
from errdist.workbook.sheets.context import Context

NAME = "Returns"


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Returns sheet and publish ``ctx.returns_range``."""
    sp = plan.add_sheet(NAME)
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
    ctx.returns_range = absref(NAME, "B2", f"B{n + 1}")
