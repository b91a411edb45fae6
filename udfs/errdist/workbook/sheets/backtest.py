"""The Backtest sheet: rolling one-day VaR forecasts against the returns that followed.

ERRDIST_ROLLING_VAR refits the law on each window; exceptions and the traffic-light zone are
counted with built-ins and, when available, tested with ERRDIST_BACKTEST. Publishes the
forecast rows (``bt_first``, ``bt_last``), ``bt_exceptions`` and ``bt_zone`` in ``ctx.keys``.
"""

from __future__ import annotations

import numpy as np

from errdist.workbook.layout import Plan, PrintSetup, SheetPlan, absref, cell
from errdist.workbook.sheets.context import Context, call_entry
from errdist.workbook.sheets.tables import heading, label_value_fmts

NAME = "Backtest"
PRINT = PrintSetup(landscape=True, pages_tall=1, repeat_header=False)
"""Printed: the summaries on one page (the print area set in ``layout``); the daily rows are
data."""

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
    right = _comparison(sp, ctx)
    top_rows = max((e.row + e.rows for e in sp.entries if e.col >= 7), default=4)
    sp.print_area = f"H4:{right}{top_rows}"


COMPARISON: tuple[tuple[str, str, str], ...] = (
    ("Forecast days", "observations", "int"),
    ("Exceptions", "exceptions", "int"),
    ("Expected exceptions", "expected exceptions", "num2"),
    ("Kupiec p-value (right rate)", "p-value POF", "pval"),
    ("Christoffersen p-value (independence)", "p-value IND", "pval"),
    ("Conditional coverage p-value", "p-value CC", "pval"),
    ("Zone (Basel 1996)", "zone", "text_r"),
    ("ES backtest Z2 (0 = right)", "es Z2 statistic", "num4"),
    ("ES backtest p-value", "es p-value", "pval"),
    ("VaR for tomorrow", "var_today", "pct3"),
    ("ES for tomorrow", "es_today", "pct3"),
)
"""Rows of the side-by-side comparison: label, key suffix (Forecasts sheet), format."""
PASS_LEVEL = 0.05
"""p-values above this pass (5%, common practice, no source)."""


def verdict_ref(ctx: Context, model: str) -> str | None:
    """Where the side-by-side table will put ``model``'s verdict ("passes"...), or None when
    the table will be left out (the sheets before this one may point at it)."""
    from errdist.workbook.sheets import forecasts

    needed = ("ERRDIST_ROLLING_VAR", "ERRDIST_FORECASTS", "ERRDIST_BACKTEST", "ERRDIST_ES_BACKTEST")
    if not ctx.has(*needed) or ctx.n < 2 * forecasts.ZONE_DAYS or ctx.n <= BACKTEST_WINDOW:
        return None
    names = [m for m, _ in forecasts.MODELS]
    return absref(NAME, f"{'OPQR'[names.index(model)]}{6 + len(COMPARISON)}")


def _comparison(sp: SheetPlan, ctx: Context) -> str:
    """The models side by side over the last 250 days (from the Forecasts sheet); the last
    column used."""
    from errdist.workbook.sheets.forecasts import MODELS

    if "cmp_gjr_zone" not in ctx.keys:
        return "L"
    sp.width("M", 3)
    sp.width("N", 34)
    sp.width("O", 13, "R")
    sp.text("N4", "Models side by side, last 250 days (Forecasts sheet)", "h2")
    for c in "OPQR":
        sp.text(f"{c}4", "", "h2")
    sp.text("N5", "Measure", "head")
    heads = {"symmetric": "Error law", "skewed": "Skewed law", "ewma": "EWMA", "gjr": "GJR-GARCH"}
    cols = "OPQR"
    for col, (model, _) in zip(cols, MODELS, strict=True):
        sp.text(f"{col}5", heads[model], "head_r")
    for i, (label, suffix, fmt) in enumerate(COMPARISON):
        rr = 6 + i
        sp.text(f"N{rr}", label)
        for col, (model, _) in zip(cols, MODELS, strict=True):
            sp.formula(f"{col}{rr}", "=" + ctx.keys[f"cmp_{model}_{suffix}"], fmt)
            ctx.keys[f"cmp_{model}_row_{suffix}"] = absref(NAME, f"{col}{rr}")
    rr = 6 + len(COMPARISON)
    sp.text(f"N{rr}", "Verdict", "label_b")
    row_of = {suffix: 6 + i for i, (_, suffix, _) in enumerate(COMPARISON)}
    for col, (model, _) in zip(cols, MODELS, strict=True):
        kup, ind = f"{col}{row_of['p-value POF']}", f"{col}{row_of['p-value IND']}"
        zone, esp = f"{col}{row_of['zone']}", f"{col}{row_of['es p-value']}"
        sp.formula(
            f"{col}{rr}",
            f'=IF({kup}>{PASS_LEVEL},IF({ind}>{PASS_LEVEL},IF({zone}="green",'
            f'IF({esp}>{PASS_LEVEL},"passes","fails ES test"),"not green"),'
            '"exceptions cluster"),"wrong exception rate")',
            "key_text_r",
        )
        ctx.keys[f"cmp_{model}_verdict"] = absref(NAME, f"{col}{rr}")
        assert verdict_ref(ctx, model) == ctx.keys[f"cmp_{model}_verdict"]
    notes = (
        f"A model passes when its Kupiec, Christoffersen and ES-backtest p-values are above "
        f"{PASS_LEVEL:g}",
        "(5%, common practice, no source) and its zone is green. All four models forecast the",
        "same days from the returns before each day. Passing is evidence, not proof: 250 days",
        "hold only about 2.5 expected exceptions at 99%.",
    )
    for i, note in enumerate(notes):
        sp.text(f"N{rr + 2 + i}", note, "note")
    return "R"


def _rolling_stub(ctx: Context) -> np.ndarray:
    """A placeholder VaR series of the right length, used only to size the backtest table."""
    m = ctx.n - BACKTEST_WINDOW
    return np.full(m, float(np.std(ctx.returns)) * 2.33)
