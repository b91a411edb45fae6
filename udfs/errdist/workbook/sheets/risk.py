"""The Risk sheet: one-day and h-day VaR and Expected Shortfall at several confidences.

The fitted error distribution (ERRDIST_VAR, ERRDIST_ES) beside the normal law with the same
mean and standard deviation, computed with built-ins only, their ratio and the money figures.
Publishes ``var99`` and ``es99`` (one-day 99%, fitted law) in ``ctx.keys``.
"""

from __future__ import annotations

from collections.abc import Callable

from errdist.workbook.layout import Plan, absref, cell
from errdist.workbook.sheets.context import Context
from errdist.workbook.sheets.tables import heading

NAME = "Risk"

CONFIDENCES: tuple[float, ...] = (0.95, 0.99, 0.995)
"""Confidence levels of the Risk sheet."""
HORIZON_DAYS = 10
"""Longer horizon of the Risk sheet (trading days)."""
POSITION_VALUE = 10_000_000.0
"""Default position value for the money figures of the Risk sheet."""


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Risk sheet (left out without ERRDIST_VAR, ERRDIST_ES and the MLE fit)."""
    if not ctx.has("ERRDIST_VAR", "ERRDIST_ES") or "fit_mle_loc" not in ctx.keys:
        return
    sp = plan.add_sheet(NAME)
    sp.landscape = True
    sp.width("A", 34)
    sp.width("B", 16, "G")
    heading(
        sp,
        f"Value at Risk and Expected Shortfall — {ctx.fund}",
        "Positive losses: a fraction of the position's value (log-return units) unless "
        "marked as money.",
    )
    loc, scale, shape = (ctx.keys[f"fit_mle_{p}"] for p in ("loc", "scale", "shape"))
    sp.text("A4", "Inputs", "h2")
    sp.text("B4", "", "h2")
    sp.text("A5", "Location (maximum likelihood)")
    sp.formula("B5", f"={loc}", "num")
    sp.text("A6", "Scale (maximum likelihood)")
    sp.formula("B6", f"={scale}", "num")
    sp.text("A7", "Shape (maximum likelihood)")
    sp.formula("B7", f"={shape}", "num")
    sp.text("A8", "Mean (AVERAGE) for the normal law")
    sp.formula("B8", f"={ctx.keys['mean']}", "num")
    sp.text("A9", "Standard deviation (STDEV.S)")
    sp.formula("B9", f"={ctx.keys['sd']}", "num")
    sp.text("A10", "Longer horizon (trading days)")
    sp.number("B10", HORIZON_DAYS, "input_num")
    sp.text("A11", "Position value (money table)")
    sp.number("B11", POSITION_VALUE, "input_num")
    sp.text("A12", "Amount for the tables above")
    sp.blank("B12", "input_num")
    sp.text("C12", "blank: losses as a fraction of the position value; a number: money", "note")
    sp.text("A13", "Multiplier for the built-in table")
    sp.formula("B13", "=IF(ISBLANK($B$12),1,$B$12)", "gen")
    notes = [
        'Square-root rule ("sqrt"): the location is scaled by h and the spread around it by '
        "√h — the common convention.",
        'I.i.d. rule ("iid"): the exact law of the sum of h independent daily returns with '
        "the fitted law (numerical convolution in the add-in).",
        "Normal law: mean = AVERAGE, σ = STDEV.S, computed with the built-ins NORM.S.INV and "
        "NORM.S.DIST only: VaR = σ·z − μ, ES = σ·φ(z)/(1−c) − μ, z = NORM.S.INV(c). It is the "
        "error distribution with shape 2 and scale √2·σ.",
        "For the normal law both rules give the same h-day law: mean h·μ and standard "
        "deviation σ·√h.",
        "Edit the yellow cells to change the confidence levels, the horizon or the position. "
        "B12 is the amount argument of ERRDIST_VAR / ERRDIST_ES; it is left blank so that the "
        "argument takes its default (return units) while the horizon rule is still given.",
    ]

    heads = (
        "Confidence",
        "VaR 1 day",
        "ES 1 day",
        "VaR h days (√h)",
        "ES h days (√h)",
        "VaR h days (i.i.d.)",
        "ES h days (i.i.d.)",
    )

    def table(top: int, title: str, rows: Callable[[str], list[str]], key: str = "") -> None:
        sp.text(f"A{top}", title, "h2")
        for c in "BCDEFG":
            sp.text(f"{c}{top}", "", "h2")
        sp.row_heights[top - 1] = 27  # room above the section title
        for j, h in enumerate(heads):
            sp.text(cell(top, j), h, "head_r")
        sp.row_heights[top] = 32
        for i, conf in enumerate(CONFIDENCES):
            rr = top + 2 + i
            conf_cell = f"$A${rr}"
            if key:
                sp.number(f"A{rr}", conf, "input_pct")
            else:
                sp.formula(f"A{rr}", f"=A{rr - (top - 14)}", "pct1")
            for j, f in enumerate(rows(conf_cell)):
                sp.formula(cell(rr - 1, 1 + j), f, "pct3")
            if key and conf == 0.99:
                ctx.keys["var99"] = absref(NAME, f"B{rr}")
                ctx.keys["es99"] = absref(NAME, f"C{rr}")

    p = "$B$5,$B$6,$B$7"

    def fitted(c: str) -> list[str]:
        return [
            f"=ERRDIST_VAR({c},{p},1,$B$12)",
            f"=ERRDIST_ES({c},{p},1,$B$12)",
            f'=ERRDIST_VAR({c},{p},$B$10,$B$12,"sqrt")',
            f'=ERRDIST_ES({c},{p},$B$10,$B$12,"sqrt")',
            f'=ERRDIST_VAR({c},{p},$B$10,$B$12,"iid")',
            f'=ERRDIST_ES({c},{p},$B$10,$B$12,"iid")',
        ]

    def normal(c: str) -> list[str]:
        z = f"NORM.S.INV({c})"
        var1 = f"$B$9*{z}-$B$8"
        es1 = f"$B$9*NORM.S.DIST({z},FALSE)/(1-{c})-$B$8"
        var_h = f"SQRT($B$10)*$B$9*{z}-$B$10*$B$8"
        es_h = f"SQRT($B$10)*$B$9*NORM.S.DIST({z},FALSE)/(1-{c})-$B$10*$B$8"
        return [f"=$B$13*({f})" for f in (var1, es1, var_h, es_h, var_h, es_h)]

    table(14, "Fitted error distribution (ERRDIST_VAR, ERRDIST_ES)", fitted, key="fit")
    table(20, "Normal law, same mean and standard deviation (built-ins only)", normal)
    # Ratio fitted / normal.
    top = 26
    sp.text(f"A{top}", "Fitted / normal", "h2")
    for c in "BCDEFG":
        sp.text(f"{c}{top}", "", "h2")
    sp.row_heights[top - 1] = 27
    for j, h in enumerate(heads):
        sp.text(cell(top, j), h, "head_r")
    sp.row_heights[top] = 32
    for i in range(len(CONFIDENCES)):
        rr = top + 2 + i
        sp.formula(f"A{rr}", f"=A{16 + i}", "pct1")
        for j in range(6):
            col = "BCDEFG"[j]
            sp.formula(f"{col}{rr}", f"={col}{16 + i}/{col}{22 + i}", "num2")
    # Money figures.
    top = 32
    sp.page_breaks.append(top - 1)  # the money table and the notes on a page of their own
    sp.text(f"A{top}", "In money, one day (position value in B11)", "h2")
    for c in "BCDEFG":
        sp.text(f"{c}{top}", "", "h2")
    sp.row_heights[top - 1] = 27
    for j, h in enumerate(("Confidence", "VaR 1 day", "ES 1 day")):
        sp.text(cell(top, j), h, "head_r")
    for i in range(len(CONFIDENCES)):
        rr = top + 2 + i
        sp.formula(f"A{rr}", f"=A{16 + i}", "pct1")
        sp.formula(f"B{rr}", f"=ERRDIST_VAR($A{rr},{p},1,$B$11)", "money")
        sp.formula(f"C{rr}", f"=ERRDIST_ES($A{rr},{p},1,$B$11)", "money")
    top += len(CONFIDENCES) + 3
    sp.text(f"A{top}", "Notes", "h2")
    for c in "BCDEFG":
        sp.text(f"{c}{top}", "", "h2")
    for i, note in enumerate(notes):
        sp.paragraph(f"A{top + 1 + i}", note, 7)
    sp.print_area = f"A1:G{top + len(notes)}"
