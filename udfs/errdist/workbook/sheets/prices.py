"""The Prices sheet: the input, one date and closing price per business day, oldest first."""

from __future__ import annotations

from errdist.workbook.layout import Plan
from errdist.workbook.sheets.context import Context

NAME = "Prices"


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Prices sheet: the dates and prices as input cells."""
    sp = plan.add_sheet(NAME)
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
