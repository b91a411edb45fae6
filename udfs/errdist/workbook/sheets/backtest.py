"""The Backtest sheet: rolling one-day VaR forecasts against the returns that followed.

ERRDIST_ROLLING_VAR refits the law on each window; exceptions and the traffic-light zone are
counted with built-ins and, when available, tested with ERRDIST_BACKTEST. Publishes the
forecast rows (``bt_first``, ``bt_last``), ``bt_exceptions`` and ``bt_zone`` in ``ctx.keys``.
"""

from __future__ import annotations

import numpy as np

from errdist.workbook.layout import Plan, absref, cell
from errdist.workbook.sheets.context import Context, call_entry
from errdist.workbook.sheets.tables import heading, label_value_fmts

NAME = "Backtest"

BACKTEST_WINDOW = 250
"""Rolling window of the backtest (returns)."""
BACKTEST_CONFIDENCE = 0.99
"""Confidence of the backtested VaR."""

BACKTEST_FMTS: dict[str, str] = {
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
"""Number formats of the ERRDIST_BACKTEST rows, by row label."""


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Backtest sheet (left out without ERRDIST_ROLLING_VAR)."""
    if not ctx.has("ERRDIST_ROLLING_VAR"):
        return
    sp = plan.add_sheet(NAME)
    sp.landscape = True
    n = ctx.n
    heading(
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
        ctx.keys["bt_exceptions"] = absref(NAME, "I9")
        ctx.keys["bt_zone_builtin"] = absref(NAME, "I10")
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
                rows_bt = call_entry(
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
                    cell_fmts=label_value_fmts(rows_bt, BACKTEST_FMTS, head_rows=1),
                )
                for i, rr in enumerate(rows_bt):
                    if col == "K" and str(rr[0]).strip().lower() == "zone":
                        ctx.keys["bt_zone"] = absref(NAME, cell(e.row + i, e.col + 1))
        ctx.keys.setdefault("bt_zone", ctx.keys["bt_zone_builtin"])
    sp.print_area = f"A1:L{last}"


def _rolling_stub(ctx: Context) -> np.ndarray:
    """A placeholder VaR series of the right length, used only to size the backtest table."""
    m = ctx.n - BACKTEST_WINDOW
    return np.full(m, float(np.std(ctx.returns)) * 2.33)
