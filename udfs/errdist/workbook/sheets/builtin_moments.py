"""The Calibration sheet's second half: the moments fit with built-in functions only.

A reader without the add-in can follow (and audit) the moments fit: the excess kurtosis
equation is solved for ln(shape) by bisection then Newton steps in plain cells, and compared
with ERRDIST_SOLVE_SHAPE / ERRDIST_SOLVE_SCALE and ERRDIST_FIT when those are available.
"""

from __future__ import annotations

from errdist.workbook.layout import SheetPlan, absref
from errdist.workbook.sheets.context import Context

# Bisection bracket of ln(shape) for the built-in moments re-derivation, and its steps.
_LN_SHAPE_LO = "LN(0.02)"
_LN_SHAPE_HI = "LN(200)"
_BISECTION_STEPS = 30
_NEWTON_STEPS = 3
_NEWTON_H = 1e-5


def layout_section(sp: SheetPlan, ctx: Context, top: int, notes_top: int) -> None:
    """The moments fit with built-in functions only: bisection then Newton on ln(shape).

    Solves  GAMMALN(5/b) + GAMMALN(1/b) − 2·GAMMALN(3/b) = LN(KURT + 3)  for t = ln b
    (Nadarajah 2005: excess kurtosis Γ(5/b)Γ(1/b)/Γ(3/b)² − 3, strictly decreasing in b).
    """
    r = ctx.returns_range
    row = top
    sp.text(f"A{row}", "Moments fit with built-in functions only (no add-in needed)", "h2")
    for c in "BCDE":
        sp.text(f"{c}{row}", "", "h2")
    notes = [
        "The moments fit matches the sample excess kurtosis K (KURT) with the law's "
        "Γ(5/b)Γ(1/b)/Γ(3/b)² − 3, which falls steadily as the shape b grows.",
        "Taking logs, g(t) = GAMMALN(5/b) + GAMMALN(1/b) − 2·GAMMALN(3/b) − LN(K+3) with "
        "b = EXP(t) is zero at the solution.",
        f"{_BISECTION_STEPS} halvings of the bracket t in [ln 0.02, ln 200] find t to about "
        "1e-8; Newton steps with a centred difference then reach full precision.",
        "Scale a = STDEV.S·√(Γ(1/b)/Γ(3/b)); location = MEDIAN. The differences from the "
        "add-in's figures should be below 1e-10.",
    ]
    row += 1
    k_cell, sd_cell, loc_cell, target_cell = (
        f"B{row}",
        f"B{row + 1}",
        f"B{row + 2}",
        f"B{row + 3}",
    )
    sp.text(f"A{row}", "Excess kurtosis K (KURT)")
    sp.formula(k_cell, f"=KURT({r})", "num4")
    sp.text(f"A{row + 1}", "Standard deviation (STDEV.S)")
    sp.formula(sd_cell, f"=STDEV.S({r})", "pct3")
    sp.text(f"A{row + 2}", "Location = MEDIAN")
    sp.formula(loc_cell, f"=MEDIAN({r})", "num")
    sp.text(f"A{row + 3}", "Target LN(K + 3)")
    sp.formula(target_cell, f"=LN({k_cell}+3)", "num")
    shape_row, scale_row = row + 4, row + 5
    sp.text(f"A{shape_row}", "Shape b (solved below)", "label_b")
    sp.text(f"A{scale_row}", "Scale a = sd·√(Γ(1/b)/Γ(3/b))", "label_b")
    shape_cell, scale_cell = f"B{shape_row}", f"B{scale_row}"
    sp.formula(
        scale_cell,
        f"=${sd_cell[0]}${sd_cell[1:]}*EXP((GAMMALN(1/{shape_cell})-GAMMALN(3/{shape_cell}))/2)",
        "key",
    )
    ctx.keys["hand_shape"] = absref(sp.name, shape_cell)
    ctx.keys["hand_scale"] = absref(sp.name, scale_cell)
    ctx.keys["hand_loc"] = absref(sp.name, loc_cell)
    check_row = scale_row + 1
    if ctx.has("ERRDIST_SOLVE_SHAPE", "ERRDIST_SOLVE_SCALE"):
        sp.text(f"C{row}", "add-in", "head_r")
        sp.text(f"D{row}", "relative difference", "head_r")
        sp.formula(f"C{shape_row}", f"=ERRDIST_SOLVE_SHAPE({k_cell})", "num")
        sp.formula(f"C{scale_row}", f"=ERRDIST_SOLVE_SCALE({sd_cell},C{shape_row})", "num")
        sp.formula(f"D{shape_row}", f"=ABS({shape_cell}-C{shape_row})/C{shape_row}", "check")
        sp.formula(f"D{scale_row}", f"=ABS({scale_cell}-C{scale_row})/C{scale_row}", "check")
        sp.text(f"E{shape_row}", "ERRDIST_SOLVE_SHAPE(K)", "note")
        sp.text(f"E{scale_row}", "ERRDIST_SOLVE_SCALE(sd, b)", "note")
    if "fit_mom_shape" in ctx.keys:
        sp.text(f"A{check_row}", "vs ERRDIST_FIT moments: loc, scale, shape")
        sp.formula(f"B{check_row}", f"=ABS({loc_cell}-{ctx.keys['fit_mom_loc']})", "check")
        sp.formula(
            f"C{check_row}",
            f"=ABS({scale_cell}-{ctx.keys['fit_mom_scale']})/{ctx.keys['fit_mom_scale']}",
            "check",
        )
        sp.formula(
            f"D{check_row}",
            f"=ABS({shape_cell}-{ctx.keys['fit_mom_shape']})/{ctx.keys['fit_mom_shape']}",
            "check",
        )
    # Bisection table on t = ln b.
    row = check_row + 2
    sp.text(f"A{row}", "Bisection on t = ln b", "head")
    for c, h in zip("BCDE", ("t low", "t high", "t mid", "g(t mid)"), strict=True):
        sp.text(f"{c}{row}", h, "head_r")
    first = row + 1

    def g(t: str) -> str:
        return (
            f"GAMMALN(5/EXP({t}))+GAMMALN(1/EXP({t}))-2*GAMMALN(3/EXP({t}))"
            f"-${target_cell[0]}${target_cell[1:]}"
        )

    for i in range(_BISECTION_STEPS):
        rr = first + i
        sp.text(f"A{rr}", f"step {i + 1}")
        if i == 0:
            sp.formula(f"B{rr}", f"={_LN_SHAPE_LO}", "num")
            sp.formula(f"C{rr}", f"={_LN_SHAPE_HI}", "num")
        else:
            p = rr - 1
            # g > 0: kurtosis of b too high, so b (and t) must grow: keep the upper half.
            sp.formula(f"B{rr}", f"=IF(E{p}>0,D{p},B{p})", "num")
            sp.formula(f"C{rr}", f"=IF(E{p}>0,C{p},D{p})", "num")
        sp.formula(f"D{rr}", f"=(B{rr}+C{rr})/2", "num")
        sp.formula(f"E{rr}", f"={g(f'D{rr}')}", "sci")
    row = first + _BISECTION_STEPS + 1
    sp.text(f"A{row}", "Newton steps on t", "head")
    for c, h in zip("BCDE", ("t", "g(t)", "g(t + h)", "g(t − h)"), strict=True):
        sp.text(f"{c}{row}", h, "head_r")
    h_row = row - 1
    sp.text(f"F{h_row}", "Newton difference step h", "label_r")
    sp.number(f"G{h_row}", _NEWTON_H, "sci")
    hcell = f"$G${h_row}"
    for j in range(_NEWTON_STEPS + 1):
        rr = row + 1 + j
        sp.text(f"A{rr}", f"Newton {j}" if j else "start (last midpoint)")
        if j == 0:
            sp.formula(f"B{rr}", f"=D{first + _BISECTION_STEPS - 1}", "num")
        else:
            p = rr - 1
            sp.formula(f"B{rr}", f"=B{p}-C{p}*2*{hcell}/(D{p}-E{p})", "num")
        sp.formula(f"C{rr}", f"={g(f'B{rr}')}", "sci")
        sp.formula(f"D{rr}", f"={g(f'(B{rr}+{hcell})')}", "sci")
        sp.formula(f"E{rr}", f"={g(f'(B{rr}-{hcell})')}", "sci")
    last_t = f"B{row + 1 + _NEWTON_STEPS}"
    sp.formula(shape_cell, f"=EXP({last_t})", "key")
    row += _NEWTON_STEPS + 3
    # The explanation starts a printed page of its own rather than leaving its heading
    # alone at the foot of the first.
    sp.page_breaks.append(row - 1)
    sp.text(f"A{row}", "How the built-in moments fit works", "h2")
    for c in "BCDEFG":
        sp.text(f"{c}{row}", "", "h2")
    for i, note in enumerate(notes):
        sp.paragraph(f"A{row + 1 + i}", note, 7)
    sp.print_area = f"A1:J{max(row + len(notes), notes_top)}"
