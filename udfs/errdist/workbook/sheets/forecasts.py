"""The Forecasts sheet: rolling one-day VaR/ES forecasts of four models and their backtests.

ERRDIST_FORECASTS gives, for each model, one row per return of the last ``fit_window`` + 250
days: VaR, ES and the forecast law (mean, std, shape, skew), using only the returns before the
row (the first ``fit_window`` rows are the estimation window of the first forecast, blank). The models: the symmetric
error law and the skewed error law fitted to the last ``window`` returns (unconditional), EWMA
and GJR-GARCH(1,1) with the skewed law (conditional; parameters re-estimated every ``refit``
days on the last ``fit_window`` returns, volatility updated daily). Over the last 250 days each
model is backtested with ERRDIST_BACKTEST (exceptions, Kupiec, Christoffersen, zone) and
ERRDIST_ES_BACKTEST (Acerbi-Szekely Z2 with its simulation p-value).

Publishes, per model ``m``, ``cmp_{m}_{measure}`` cells (the Backtest sheet's side-by-side
table reads them) and ``fc_last`` (the last data row) in ``ctx.keys``.
"""

from __future__ import annotations

import numpy as np

from errdist.workbook.layout import Plan, PrintSetup, absref, cell
from errdist.workbook.sheets.backtest import BACKTEST_FMTS
from errdist.workbook.sheets.context import Context, call_entry
from errdist.workbook.sheets.tables import heading, label_value_fmts

NAME = "Forecasts"
# A long data sheet: shrunk to one landscape page when printed; its numbers are read on
# screen (the Backtest sheet prints the models side by side).
PRINT = PrintSetup(landscape=True, pages_tall=1, repeat_header=False)

MODELS: tuple[tuple[str, str], ...] = (
    ("symmetric", "Error law (symmetric), rolling fit"),
    ("skewed", "Skewed error law, rolling fit"),
    ("ewma", "EWMA, skewed law"),
    ("gjr", "GJR-GARCH(1,1), skewed law"),
)
"""The models compared, in column order (name for ERRDIST_FORECASTS, title)."""
CONFIDENCE = 0.99
WINDOW = 250
FIT_WINDOW = 1000
REFIT = 21
ZONE_DAYS = 250
"""Forecast settings (editable on the sheet) and the backtest window."""
ES_SIMULATIONS = 1000
ES_SEED = 20140101

ES_FMTS: dict[str, str] = {
    "Z2 statistic": "num4",
    "p-value": "pval",
    "days": "int",
    "exceptions": "int",
    "expected exceptions": "num2",
    "simulations": "int",
    "pairs dropped": "int",
}
_COLS = ("VaR", "ES", "mean", "std", "shape", "skew")
_COL_FMTS = ("pct3", "pct3", "pct3", "pct3", "num4", "num4")
TOP = 10
"""Row of the first return."""


def fit_window(n: int) -> int:
    """Past days per conditional estimation: 1000, fewer for short histories (>= 250)."""
    return max(250, min(FIT_WINDOW, n - ZONE_DAYS))


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Forecasts sheet (left out without the functions or 500 returns)."""
    if not ctx.has("ERRDIST_FORECASTS", "ERRDIST_BACKTEST", "ERRDIST_ES_BACKTEST"):
        return
    n = ctx.n
    if n < 2 * ZONE_DAYS:
        return
    sp = plan.add_sheet(NAME)
    sp.landscape = True
    heading(
        sp,
        f"Forecasts — {ctx.fund}",
        "Rolling one-day VaR and ES of four models, each day from the returns before it only; "
        f"backtests over the last {ZONE_DAYS} days on the right (from column AC).",
    )
    sp.width("A", 11)
    sp.width("B", 10)
    sp.width("C", 2)
    sp.width("D", 9, "AA")
    sp.width("AB", 2)
    inputs = (
        ("Confidence", CONFIDENCE, "input_pct"),
        ("Window, unconditional fits (days)", WINDOW, "input_num"),
        ("Fit window, conditional models (days)", fit_window(n), "input_num"),
        ("Days between re-estimations", REFIT, "input_num"),
    )
    for i, (label, value, fmt) in enumerate(inputs):
        sp.text(f"D{4 + i}", label)
        sp.number(f"J{4 + i}", value, fmt)
    conf, win, fwin, refit = "$J$4", "$J$5", "$J$6", "$J$7"
    first, last = TOP, TOP + n - 1
    # The forecasts are needed for the backtest window only: each model reads the last
    # fit_window + 250 returns, so its cost does not grow with the length of the history.
    f0 = max(first, last - ZONE_DAYS - fit_window(n) + 1)
    ret = f"$B${f0}:$B${last}"
    sp.text(f"A{TOP - 1}", "Date", "head_r")
    sp.text(f"B{TOP - 1}", "Return", "head_r")
    sp.spill(f"A{first}", n, 1, f"=Returns!A2:A{n + 1}", "date")
    sp.spill(f"B{first}", n, 1, f"=Returns!B2:B{n + 1}", "pct3")
    sp.freeze = (TOP - 1, 2)
    z0 = last - ZONE_DAYS + 1  # first row of the backtest window
    ctx.keys["fc_zone_first"] = str(z0)
    ctx.keys["fc_last"] = str(last)
    ret_z = f"$B${z0}:$B${last}"
    stub_r = ctx.returns[-ZONE_DAYS:].reshape(-1, 1).tolist()
    stub_v = np.full((ZONE_DAYS, 1), float(np.std(ctx.returns)) * 2.33)
    stub_f = np.column_stack(
        [stub_v[:, 0], stub_v[:, 0] * 1.2, np.zeros(ZONE_DAYS), stub_v[:, 0] / 2.33]
        + [np.full(ZONE_DAYS, 1.3), np.zeros(ZONE_DAYS)]
    )
    bt_rows = call_entry("ERRDIST_BACKTEST", stub_r, stub_v.tolist(), CONFIDENCE, True)
    es_rows = call_entry("ERRDIST_ES_BACKTEST", stub_r, stub_f.tolist(), CONFIDENCE, 10, 1, True)
    for m, (model, title) in enumerate(MODELS):
        c0 = 3 + 6 * m  # column D, J, P, V
        sp.text(cell(TOP - 3, c0), title, "h2")
        for j in range(1, 6):
            sp.text(cell(TOP - 3, c0 + j), "", "h2")
        for j, h in enumerate(_COLS):
            sp.text(cell(TOP - 2, c0 + j), h, "head_r")
        sp.spill(
            cell(f0 - 1, c0),
            last - f0 + 1,
            6,
            f'=ERRDIST_FORECASTS({ret},"{model}",{conf},{win},{fwin},{refit})',
            "pct3",
            cell_fmts=[list(_COL_FMTS)] * (last - f0 + 1),
        )
        var_z = f"{cell(z0 - 1, c0)}:{cell(last - 1, c0)}"
        law_z = f"{cell(z0 - 1, c0)}:{cell(last - 1, c0 + 5)}"
        ctx.keys[f"fc_{model}_var_col"] = cell(0, c0).rstrip("1")
        # Backtest tables, one block of columns per model from AC.
        t0 = 28 + 3 * m  # AC, AF, AI, AL
        col_l = cell(0, t0).rstrip("1")
        sp.width(col_l, 22)
        sp.width(cell(0, t0 + 1).rstrip("1"), 12)
        sp.width(cell(0, t0 + 2).rstrip("1"), 2)
        sp.text(cell(3, t0), title, "h2")
        sp.text(cell(3, t0 + 1), "", "h2")
        e = sp.spill(
            cell(4, t0),
            len(bt_rows),
            2,
            f"=ERRDIST_BACKTEST({ret_z},{var_z},{conf},TRUE)",
            "gen",
            head_rows=1,
            cell_fmts=label_value_fmts(bt_rows, BACKTEST_FMTS, head_rows=1),
        )
        for i, row in enumerate(bt_rows):
            ctx.keys[f"cmp_{model}_{row[0]}"] = absref(NAME, cell(e.row + i, e.col + 1))
        r2 = 4 + len(bt_rows) + 1
        e2 = sp.spill(
            cell(r2, t0),
            len(es_rows),
            2,
            f"=ERRDIST_ES_BACKTEST({ret_z},{law_z},{conf},{ES_SIMULATIONS},{ES_SEED},TRUE)",
            "gen",
            head_rows=1,
            cell_fmts=label_value_fmts(es_rows, ES_FMTS, head_rows=1),
        )
        for i, row in enumerate(es_rows):
            ctx.keys[f"cmp_{model}_es {row[0]}"] = absref(NAME, cell(e2.row + i, e2.col + 1))
        ctx.keys[f"cmp_{model}_var_today"] = absref(NAME, cell(last - 1, c0))
        ctx.keys[f"cmp_{model}_es_today"] = absref(NAME, cell(last - 1, c0 + 1))
    sp.text("AC1", f"Backtests of the forecasts — {ctx.fund}", "title")
    sp.text(
        "AC2",
        f"Each model over the last {ZONE_DAYS} days; the forecasts themselves are in columns "
        "D to AA.",
        "subtitle",
    )
    end_row = 4 + len(bt_rows) + 1 + len(es_rows) + 1
    sp.paragraph(
        f"AC{end_row + 1}",
        f"Backtests over the last {ZONE_DAYS} days at the confidence in J4. ERRDIST_BACKTEST: "
        "exceptions (return < −VaR), Kupiec (right number of exceptions) and Christoffersen "
        "(no clustering) tests, Basel zone. ERRDIST_ES_BACKTEST: Acerbi & Szekely's Z2 — 0 "
        "when the ES is right, negative when losses beyond the VaR were larger than forecast; "
        f"p-value from {ES_SIMULATIONS} histories simulated from the forecast laws (seeded).",
        11,
        "note_wrap",
    )
    sp.print_area = f"AC1:AM{end_row + 2}"
