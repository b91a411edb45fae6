"""The ``xlwings.conf`` sheet: tells the xlwings add-in which module holds the functions."""

from __future__ import annotations

from errdist.workbook.layout import Plan
from errdist.workbook.sheets.context import Context

NAME = "xlwings.conf"

UDF_MODULE = "errdist.sheet.xlwings_udfs"
"""The module named under "UDF Modules" on this sheet."""


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the xlwings.conf sheet (``ctx`` unused: every sheet takes it)."""
    sp = plan.add_sheet(NAME)
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
