"""The Fit check sheet: goodness of fit, rival laws, histogram and chart points.

How well the maximum likelihood fit describes the returns: ERRDIST_GOF (bootstrap p-value),
ERRDIST_COMPARE (rival laws by AIC), a FREQUENCY histogram against the fitted and normal
densities, and the ERRDIST_EMPIRICAL points the Charts sheet plots. Publishes the histogram
rows, the empirical rows and the QQ line in ``ctx.keys``.
"""

from __future__ import annotations

from errdist.workbook.layout import Plan, PrintSetup, SheetPlan, absref, cell
from errdist.workbook.sheets.context import Context, call_entry
from errdist.workbook.sheets.tables import column_fmts, heading, label_value_fmts

NAME = "Fit check"
PRINT = PrintSetup(landscape=True, pages_tall=1)
"""Printed on one landscape page (the chart points to the right are data)."""

HIST_BINS = 30
"""Number of histogram bins."""
GOF_STATISTIC = "ad"
GOF_SAMPLES = 199
GOF_SEED = 20261202
"""Goodness-of-fit test settings (Anderson-Darling, parametric bootstrap, fixed seed)."""

GOF_FMTS: dict[str, str] = {
    "value": "num4",
    "p-value": "pval",
    "samples": "int",
    "refit": "bool",
    "loc": "num",
    "scale": "num",
    "shape": "num4",
    "n": "int",
}
"""Number formats of the ERRDIST_GOF rows, by row label."""

COMPARE_FMTS: dict[str, str] = {
    "loc": "num",
    "scale": "num",
    "shape_or_df": "num4",
    "loglik": "num2",
    "aic": "num2",
    "bic": "num2",
    "ks": "num4",
    "var99": "pct",
    "at_bound": "bool",
}
"""Number formats of the ERRDIST_COMPARE columns, by column header."""


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Fit check sheet (left out without the MLE fit)."""
    if "fit_mle_loc" not in ctx.keys:
        return
    sp = plan.add_sheet(NAME)
    sp.landscape = True
    r = ctx.returns_range
    loc, scale, shape = (ctx.keys[f"fit_mle_{p}"] for p in ("loc", "scale", "shape"))
    heading(
        sp, f"Fit check — {ctx.fund}", "How well the maximum likelihood fit describes the returns."
    )
    sp.width("A", 26)
    sp.width("B", 13, "J")
    sp.width("K", 3)
    sp.width("G", 15, "H")
    sp.width("L", 16, "O")
    row = 4
    if ctx.has("ERRDIST_GOF"):
        sp.text(f"A{row}", "Goodness of fit (ERRDIST_GOF)", "h2")
        for c in "BCDE":
            sp.text(f"{c}{row}", "", "h2")
        sp.text(f"A{row + 1}", "Law to test: loc, scale, shape")
        for c in "BCD":
            sp.blank(f"{c}{row + 1}", "input")
        sp.text(
            f"E{row + 1}",
            "optional; blank: the maximum likelihood law, refitted to each simulated sample",
            "note",
        )
        args = (ctx.returns.reshape(-1, 1).tolist(), None, None, None, GOF_STATISTIC, 19, GOF_SEED)
        rows = call_entry("ERRDIST_GOF", *args)
        law = f"B{row + 1},C{row + 1},D{row + 1}"
        f = f'=ERRDIST_GOF({r},{law},"{GOF_STATISTIC}",{GOF_SAMPLES},{GOF_SEED})'
        sp.spill(
            f"A{row + 2}",
            len(rows),
            len(rows[0]),
            f,
            "gen",
            cell_fmts=label_value_fmts(rows, GOF_FMTS),
        )
        for i, rr in enumerate(rows):
            if rr[0] in ("p-value", "value"):
                key = "gof_pvalue" if rr[0] == "p-value" else "gof_statistic"
                ctx.keys[key] = absref(NAME, f"B{row + 2 + i}")
        sp.text(
            f"D{row + 2}",
            "Anderson-Darling statistic A²; its p-value comes from "
            f"{GOF_SAMPLES} samples simulated",
            "note",
        )
        sp.text(
            f"D{row + 3}",
            "from the fitted law, each refitted before its statistic is "
            "computed (parametric bootstrap,",
            "note",
        )
        sp.text(
            f"D{row + 4}",
            "Stephens 1974), with a fixed seed so the figure is "
            "reproducible. A p-value below 0.05 says",
            "note",
        )
        sp.text(f"D{row + 5}", "the data are unlikely under the fitted law.", "note")
        row += 1
        row += len(rows) + 2
    if ctx.has("ERRDIST_COMPARE"):
        sp.text(f"A{row}", "Rival laws (ERRDIST_COMPARE), best AIC first", "h2")
        for c in "BCDEFGHIJ":
            sp.text(f"{c}{row}", "", "h2")
        rows = call_entry("ERRDIST_COMPARE", ctx.returns.reshape(-1, 1).tolist(), True)
        sp.spill(
            f"A{row + 1}",
            len(rows),
            len(rows[0]),
            f"=ERRDIST_COMPARE({r},TRUE)",
            "gen",
            head_rows=1,
            cell_fmts=column_fmts(rows, COMPARE_FMTS),
        )
        ctx.keys["compare_best"] = absref(NAME, f"A{row + 2}")
        row += len(rows) + 2
    # Histogram against the fitted density.
    row = _histogram(sp, ctx, row, loc, scale, shape)
    if ctx.has("ERRDIST_EMPIRICAL"):
        sp.text("L4", "Empirical vs fitted (ERRDIST_EMPIRICAL)", "h2")
        for c in "MNO":
            sp.text(f"{c}4", "", "h2")
        e = sp.spill(
            "L5",
            ctx.n + 1,
            4,
            f"=ERRDIST_EMPIRICAL({r},{loc},{scale},{shape},TRUE)",
            "num",
            head_rows=1,
            cell_fmts=[["head_r1"] * 4] + [["pct3", "num4", "num4", "pct3"]] * ctx.n,
        )
        ctx.keys["emp_first_row"] = str(e.row + 2)
        ctx.keys["emp_last_row"] = str(e.row + 1 + ctx.n)
        sp.text(
            "L3",
            "Sorted returns, plotting position (i − 0.5)/n, fitted CDF, fitted "
            "quantile — the Charts sheet plots them.",
            "note",
        )
        sp.text("Q4", "QQ chart's 45° line", "h2")
        sp.text("Q5", "from (MIN)")
        sp.formula("R5", f"=MIN({r})", "pct3")
        sp.text("Q6", "to (MAX)")
        sp.formula("R6", f"=MAX({r})", "pct3")
        sp.width("Q", 12)
        sp.width("R", 12)
        ctx.keys["qq_line"] = absref(NAME, "R5", "R6")
        _loss_tail(sp, ctx, e.row + 2)
    sp.print_area = f"A1:J{row}"


TAIL_FRACTION = 0.1
"""Share of the returns (the worst ones) in the loss-tail table."""


def _loss_tail(sp: SheetPlan, ctx: Context, first: int) -> None:
    """The loss tail from the ERRDIST_EMPIRICAL rows starting at ``first``: loss x and the
    probability of a loss of at least x, empirical, fitted, skewed law and normal."""
    k = max(10, int(ctx.n * TAIL_FRACTION))
    a, b = first, first + k - 1
    loc, scale, shape = (ctx.keys[f"fit_mle_{p}"] for p in ("loc", "scale", "shape"))
    sp.text("T4", f"Loss tail: the worst {k} returns", "h2")
    for c in "UVWX":
        sp.text(f"{c}4", "", "h2")
    heads = ("Loss x", "Empirical P(loss ≥ x)", "Fitted error law", "Skewed law", "Normal")
    for j, h in enumerate(heads):
        sp.text(cell(4, 19 + j), h, "head_r1")
    sp.width("T", 11)
    sp.width("U", 12, "X")
    top = 6
    last = top + k - 1
    sp.spill(f"T{top}", k, 1, f"=-L{a}:L{b}", "pct3")
    sp.spill(f"U{top}", k, 1, f"=M{a}:M{b}", "sci")
    sp.spill(f"V{top}", k, 1, f"=N{a}:N{b}", "sci")
    if "skew_loc" in ctx.keys and ctx.has("ERRDIST_SKEW_CDF"):
        sk = ",".join(ctx.keys[f"skew_{p}"] for p in ("loc", "scale", "shape", "skew"))
        sp.spill(f"W{top}", k, 1, f"=ERRDIST_SKEW_CDF(L{a}:L{b},{sk})", "sci")
        ctx.keys["tail_skewed"] = "W"
    # The normal lower tail as erfc(-z/sqrt 2)/2: NORM.DIST(..., TRUE) is 1/2 (1 + erf(...)) in
    # some engines, which loses digits far in the lower tail.
    for i in range(k):
        sp.formula(
            f"X{top + i}",
            f"=ERFC(({ctx.keys['mean']}-L{a + i})/({ctx.keys['sd']}*SQRT(2)))/2",
            "sci",
        )
    sp.text(
        "T3",
        "P(loss ≥ x) = P(return ≤ −x): plotting position, fitted CDFs and the normal CDF at "
        "the sorted returns — the Charts sheet plots them on a log scale.",
        "note",
    )
    ctx.keys["tail_first"] = str(top)
    ctx.keys["tail_last"] = str(last)


def _histogram(sp: SheetPlan, ctx: Context, row: int, loc: str, scale: str, shape: str) -> int:
    """The histogram against the fitted and normal densities from ``row``; the next free row."""
    r = ctx.returns_range
    sp.text(f"A{row}", f"Histogram vs fitted density ({HIST_BINS} bins, FREQUENCY)", "h2")
    for c in "BCDEFGH":
        sp.text(f"{c}{row}", "", "h2")
    sp.text(f"A{row + 1}", "Bin width")
    wcell = f"$B${row + 1}"
    sp.formula(f"B{row + 1}", f"=(MAX({r})-MIN({r}))/{HIST_BINS}", "pct3")
    sp.text(f"A{row + 2}", "Observations")
    ncell = f"$B${row + 2}"
    sp.formula(f"B{row + 2}", f"=COUNT({r})", "int")
    head = row + 3
    heads = (
        "Bin",
        "Lower",
        "Upper",
        "Midpoint",
        "Count",
        "Density",
        "Fitted density",
        "Normal density",
    )
    for j, h in enumerate(heads):
        sp.text(cell(head - 1, j), h, "head_r")
    first = head + 1
    last = first + HIST_BINS - 1
    for i in range(HIST_BINS):
        rr = first + i
        sp.number(f"A{rr}", i + 1, "int")
        sp.formula(f"B{rr}", f"=MIN({r})+{i}*{wcell}", "pct3")
        if i == HIST_BINS - 1:
            sp.formula(f"C{rr}", f"=MAX({r})", "pct3")
        else:
            sp.formula(f"C{rr}", f"=MIN({r})+{i + 1}*{wcell}", "pct3")
        sp.formula(f"D{rr}", f"=(B{rr}+C{rr})/2", "pct3")
        sp.formula(f"F{rr}", f"=E{rr}/({ncell}*{wcell})", "num2")
        sp.formula(f"H{rr}", f"=NORM.DIST(D{rr},{ctx.keys['mean']},{ctx.keys['sd']},FALSE)", "num2")
    sp.text(f"A{last + 1}", "above the last upper edge", "note")
    sp.spill(f"E{first}", HIST_BINS + 1, 1, f"=FREQUENCY({r},C{first}:C{last})", "int")
    if ctx.has("ERRDIST_PDF"):
        sp.spill(
            f"G{first}",
            HIST_BINS,
            1,
            f"=ERRDIST_PDF(D{first}:D{last},{loc},{scale},{shape})",
            "num2",
        )
    ctx.keys["hist_first"] = str(first)
    ctx.keys["hist_last"] = str(last)
    sp.paragraph(
        f"A{last + 2}",
        "Density = count / (observations × bin width), comparable with "
        "the fitted and normal densities at the bin midpoints. FREQUENCY's extra last "
        "cell counts returns above the last upper edge (always 0 here).",
        8,
        "note_wrap",
    )
    return last + 3
