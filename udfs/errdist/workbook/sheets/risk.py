"""The Risk sheet: one-day and h-day VaR and Expected Shortfall at several confidences.

First today's one-day figures by model side by side: the symmetric error law and the skewed
error law fitted to all returns (unconditional) and the conditional model named on the Models
sheet (GJR-GARCH with the skewed law by default: ERRDIST_COND_VAR / ERRDIST_COND_ES). Then the
fitted symmetric law (ERRDIST_VAR, ERRDIST_ES) at one day and h days beside the normal law with
the same mean and standard deviation, computed with built-ins only, their ratio and the money
figures. Confidences 95%, 97.5% (the FRTB 2019 ES level), 99% and 99.5%.

Publishes ``var99`` and ``es99`` (one-day 99%, fitted symmetric law), ``cond_var99``,
``cond_es99``, ``cond_es975``, ``skew_var99``, ``skew_es99`` and ``es975`` in ``ctx.keys``.
"""

from __future__ import annotations

from collections.abc import Callable

from errdist.workbook.layout import Plan, PrintSetup, absref, cell
from errdist.workbook.sheets.context import Context
from errdist.workbook.sheets.tables import heading

NAME = "Risk"
PRINT = PrintSetup(landscape=True, pages_tall=1)
"""Printed on one landscape page."""

CONFIDENCES: tuple[float, ...] = (0.95, 0.975, 0.99, 0.995)
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
    by_model = "skew_loc" in ctx.keys and "cond_model" in ctx.keys
    by_model = by_model and ctx.has("ERRDIST_SKEW_VAR", "ERRDIST_COND_VAR")
    loc, scale, shape = (ctx.keys[f"fit_mle_{p}"] for p in ("loc", "scale", "shape"))
    sp.text("A4", "Inputs", "h2")
    sp.text("B4", "", "h2")
    inputs: list[tuple[str, str, str, str]] = [
        ("loc", "Location (maximum likelihood)", f"={loc}", "num"),
        ("scale", "Scale (maximum likelihood)", f"={scale}", "num"),
        ("shape", "Shape (maximum likelihood)", f"={shape}", "num"),
    ]
    if by_model:
        inputs += [
            (f"s_{p}", f"Skewed law {p} (Models sheet)", "=" + ctx.keys[f"skew_{p}"], fmt)
            for p, fmt in (("loc", "num"), ("scale", "num"), ("shape", "num"), ("skew", "num4"))
        ]
        inputs.append(
            ("model", "Conditional model (Models sheet)", "=" + ctx.keys["cond_model"], "gen")
        )
    inputs += [
        ("mean", "Mean (AVERAGE) for the normal law", f"={ctx.keys['mean']}", "num"),
        ("sd", "Standard deviation (STDEV.S)", f"={ctx.keys['sd']}", "num"),
    ]
    at: dict[str, str] = {}
    row = 5
    for key, label, formula, fmt in inputs:
        sp.text(f"A{row}", label)
        sp.formula(f"B{row}", formula, fmt)
        at[key] = f"$B${row}"
        row += 1
    sp.text(f"A{row}", "Longer horizon (trading days)")
    sp.number(f"B{row}", HORIZON_DAYS, "input_num")
    at["h"] = f"$B${row}"
    sp.text(f"A{row + 1}", "Position value (money table)")
    sp.number(f"B{row + 1}", POSITION_VALUE, "input_num")
    at["pos"] = f"$B${row + 1}"
    sp.text(f"A{row + 2}", "Amount for the tables below")
    sp.blank(f"B{row + 2}", "input_num")
    sp.text(
        f"C{row + 2}", "blank: losses as a fraction of the position value; a number: money", "note"
    )
    at["amt"] = f"$B${row + 2}"
    sp.text(f"A{row + 3}", "Multiplier for the built-in table")
    sp.formula(f"B{row + 3}", f"=IF(ISBLANK({at['amt']}),1,{at['amt']})", "gen")
    at["mult"] = f"$B${row + 3}"
    k = len(CONFIDENCES)
    step = k + 3
    top0 = row + 5
    amt_cell = at["amt"].replace("$", "")
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
        "Expected Shortfall at 97.5% is the level of the Basel market-risk standard (FRTB, "
        "2019); 99% VaR is the level of the Basel (1996) backtest zones.",
        "Edit the yellow cells to change the confidence levels, the horizon or the position. "
        f"{amt_cell} is the amount argument of ERRDIST_VAR / ERRDIST_ES; it is left blank so "
        "that the argument takes its default (return units) while the horizon rule is still "
        "given.",
    ]
    if by_model:
        notes[:0] = [
            "Today's figures by model: the symmetric and the skewed error law are fitted to all "
            "the returns (one law for every day: unconditional); the conditional model "
            "(GJR-GARCH or EWMA with the skewed law, Models sheet) scales its law by tomorrow's "
            "volatility, so its figures rise after large losses and fall in calm spells — they "
            "change with the last days' returns. The Backtest sheet shows which models held up "
            "over the last 250 days; choose the model on the Models sheet (yellow cell).",
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
    model_heads = (
        "Confidence",
        "VaR, error law",
        "ES, error law",
        "VaR, skewed law",
        "ES, skewed law",
        "VaR, conditional",
        "ES, conditional",
    )
    conf_rows: list[int] = []

    def section(top: int, title: str, labels: tuple[str, ...]) -> None:
        sp.text(f"A{top}", title, "h2")
        for c in "BCDEFG":
            sp.text(f"{c}{top}", "", "h2")
        sp.row_heights[top - 1] = 27  # room above the section title
        for j, h in enumerate(labels):
            sp.text(cell(top, j), h, "head_r")
        sp.row_heights[top] = 32

    def table(
        top: int,
        title: str,
        rows: Callable[[str], list[str]],
        keys: dict[float, tuple[str, ...]] | None = None,
        labels: tuple[str, ...] = heads,
    ) -> None:
        section(top, title, labels)
        for i, conf in enumerate(CONFIDENCES):
            rr = top + 2 + i
            conf_cell = f"$A${rr}"
            if not conf_rows or len(conf_rows) < k:
                sp.number(f"A{rr}", conf, "input_pct")
                conf_rows.append(rr)
            else:
                sp.formula(f"A{rr}", f"=A{conf_rows[i]}", "pct1")
            for j, f in enumerate(rows(conf_cell)):
                sp.formula(cell(rr - 1, 1 + j), f, "pct3")
            for name, col in zip((keys or {}).get(conf, ()), "BCDEFG", strict=False):
                if name:
                    ctx.keys[name] = absref(NAME, f"{col}{rr}")

    p = f"{at['loc']},{at['scale']},{at['shape']}"
    amt = at["amt"]

    def fitted(c: str) -> list[str]:
        return [
            f"=ERRDIST_VAR({c},{p},1,{amt})",
            f"=ERRDIST_ES({c},{p},1,{amt})",
            f'=ERRDIST_VAR({c},{p},{at["h"]},{amt},"sqrt")',
            f'=ERRDIST_ES({c},{p},{at["h"]},{amt},"sqrt")',
            f'=ERRDIST_VAR({c},{p},{at["h"]},{amt},"iid")',
            f'=ERRDIST_ES({c},{p},{at["h"]},{amt},"iid")',
        ]

    def models(c: str) -> list[str]:
        sk = f"{at['s_loc']},{at['s_scale']},{at['s_shape']},{at['s_skew']}"
        r = ctx.returns_range
        return [
            f"=ERRDIST_VAR({c},{p})",
            f"=ERRDIST_ES({c},{p})",
            f"=ERRDIST_SKEW_VAR({c},{sk})",
            f"=ERRDIST_SKEW_ES({c},{sk})",
            f"=ERRDIST_COND_VAR({r},{c},{at['model']})",
            f"=ERRDIST_COND_ES({r},{c},{at['model']})",
        ]

    def normal(c: str) -> list[str]:
        mu, sd, h = at["mean"], at["sd"], at["h"]
        z = f"NORM.S.INV({c})"
        var1 = f"{sd}*{z}-{mu}"
        es1 = f"{sd}*NORM.S.DIST({z},FALSE)/(1-{c})-{mu}"
        var_h = f"SQRT({h})*{sd}*{z}-{h}*{mu}"
        es_h = f"SQRT({h})*{sd}*NORM.S.DIST({z},FALSE)/(1-{c})-{h}*{mu}"
        return [f"={at['mult']}*({f})" for f in (var1, es1, var_h, es_h, var_h, es_h)]

    top = top0
    if by_model:
        table(
            top,
            "Today's one-day VaR and ES by model (return units)",
            models,
            keys={
                0.99: ("", "", "skew_var99", "skew_es99", "cond_var99", "cond_es99"),
                0.975: ("", "", "", "", "", "cond_es975"),
            },
            labels=model_heads,
        )
        top += step
    fit_top = top
    table(
        top,
        "Fitted error distribution (ERRDIST_VAR, ERRDIST_ES)",
        fitted,
        keys={0.99: ("var99", "es99"), 0.975: ("", "es975")},
    )
    top += step
    normal_top = top
    sp.page_breaks.append(top - 1)  # the normal law and the ratios on the next page
    table(top, "Normal law, same mean and standard deviation (built-ins only)", normal)
    top += step
    # Ratio fitted / normal.
    section(top, "Fitted / normal", heads)
    for i in range(k):
        rr = top + 2 + i
        sp.formula(f"A{rr}", f"=A{conf_rows[i]}", "pct1")
        for col in "BCDEFG":
            sp.formula(f"{col}{rr}", f"={col}{fit_top + 2 + i}/{col}{normal_top + 2 + i}", "num2")
    top += step
    # Money figures.
    sp.page_breaks.append(top - 1)  # the money table and the notes on a page of their own
    section(top, f"In money, one day (position value in {at['pos'].replace('$', '')})", heads[:3])
    for i in range(k):
        rr = top + 2 + i
        sp.formula(f"A{rr}", f"=A{conf_rows[i]}", "pct1")
        sp.formula(f"B{rr}", f"=ERRDIST_VAR($A{rr},{p},1,{at['pos']})", "money")
        sp.formula(f"C{rr}", f"=ERRDIST_ES($A{rr},{p},1,{at['pos']})", "money")
    top += k + 3
    sp.text(f"A{top}", "Notes", "h2")
    for c in "BCDEFG":
        sp.text(f"{c}{top}", "", "h2")
    for i, note in enumerate(notes):
        sp.paragraph(f"A{top + 1 + i}", note, 7)
    sp.print_area = f"A1:G{top + len(notes)}"
