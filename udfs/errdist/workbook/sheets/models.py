"""The Models sheet: the skewed error law and the conditional volatility models, fitted.

The skewed (two-piece) error law fitted by exact maximum likelihood (ERRDIST_SKEW_FIT), its AIC
against the symmetric law's, and the two conditional models - GJR-GARCH(1,1) and RiskMetrics
EWMA, both with the skewed law as innovation law - with every parameter and its standard error
(ERRDIST_COND_PARAMS). The yellow cell names the conditional model whose figures the Risk
sheet shows as today's: GJR-GARCH when it passes the backtest on the Backtest sheet, else
EWMA when that passes, else GJR-GARCH (a formula the user may overwrite).

Publishes ``skew_loc``, ``skew_scale``, ``skew_shape``, ``skew_skew``, ``skew_aic``,
``cond_model`` (the model cell) and ``gjr_*`` / ``ewma_*`` cells (volatility, nu, skew, persistence)
in ``ctx.keys``.
"""

from __future__ import annotations

from errdist.workbook.layout import Plan, PrintSetup, absref, cell
from errdist.workbook.sheets.backtest import verdict_ref
from errdist.workbook.sheets.context import Context
from errdist.workbook.sheets.tables import heading

NAME = "Models"
PRINT = PrintSetup(landscape=True, pages_tall=1)

COND_MODEL = "gjr"
"""The conditional model of today's figures on the Risk sheet (an input cell)."""

# Parameters of ERRDIST_COND_PARAMS by model (rows after the nine figure rows).
_PARAMS = {
    "gjr": ("mu", "omega", "alpha", "gamma", "beta", "nu", "skew"),
    "ewma": ("lambda", "z_mean", "z_std", "nu", "skew"),
}
_FIGURES = (
    ("model", "gen"),
    ("n", "int"),
    ("blanks skipped", "int"),
    ("confidence", "pct1"),
    ("volatility tomorrow", "pct3"),
    ("mean tomorrow", "pct3"),
    ("VaR 1 day", "pct3"),
    ("ES 1 day", "pct3"),
    ("log-likelihood", "num2"),
)
_PARAM_FMT = {"omega": "sci", "mu": "sci", "lambda": "num4"}

_NOTES = (
    "GJR-GARCH(1,1) (Glosten, Jagannathan & Runkle 1993): σ²(t) = ω + (α + γ·[ε(t−1) < 0])·"
    "ε(t−1)² + β·σ²(t−1), ε = r − μ; estimated by maximum likelihood with the arch package, "
    "errdist's skewed error law as the innovation law (shape ν, skew); robust standard errors. "
    "γ > 0: losses raise tomorrow's volatility more than gains of the same size.",
    "EWMA (RiskMetrics 1996): σ²(t) = λ·σ²(t−1) + (1 − λ)·r(t−1)², λ = 0.94 set by the user "
    "(no standard error); the skewed law is fitted to the scaled returns r/σ, whose mean "
    "(z_mean) and spread (z_std) correct the fixed λ.",
    "Parameter uncertainty: a figure ± 2 standard errors is a rough 95% range. A persistence "
    "α + γ/2 + β close to 1 means shocks fade slowly; at or above 1 there is no long-run "
    "volatility. Conditional figures change with the last days' returns.",
)


def _cond_rows(model: str) -> list[tuple[str, str]]:
    rows = list(_FIGURES)
    rows += [(p, _PARAM_FMT.get(p, "num4")) for p in _PARAMS[model]]
    rows += [("at_bound", "bool"), ("warning", "gen")]
    return rows


def layout(plan: Plan, ctx: Context) -> None:
    """Lay out the Models sheet (left out without the skewed-law and conditional functions)."""
    if not ctx.has("ERRDIST_SKEW_FIT", "ERRDIST_COND_PARAMS") or ctx.n < 300:
        return
    sp = plan.add_sheet(NAME)
    sp.landscape = True
    r = ctx.returns_range
    heading(
        sp,
        f"Models — {ctx.fund}",
        "The skewed error law and the conditional volatility models, fitted to all "
        f"{ctx.n} daily log returns.",
    )
    sp.width("A", 24)
    sp.width("B", 14, "I")
    sp.width("E", 24)
    sp.width("J", 3)
    # Skewed law fit.
    sp.text("A4", "Skewed error law, maximum likelihood (ERRDIST_SKEW_FIT)", "h2")
    for c in "BCDEFGHI":
        sp.text(f"{c}4", "", "h2")
    fmts = ["num", "num", "num4", "num4", "int", "num2", "num2", "bool", "gen"]
    sp.spill(
        "A5",
        2,
        9,
        f"=ERRDIST_SKEW_FIT({r},TRUE)",
        "gen",
        head_rows=1,
        cell_fmts=[["head_r"] * 9, fmts],
    )
    for j, key in enumerate(("loc", "scale", "shape", "skew")):
        ctx.keys[f"skew_{key}"] = absref(NAME, cell(5, j))
    ctx.keys["skew_aic"] = absref(NAME, "G6")
    sp.text("A7", "AIC of the symmetric law (maximum likelihood)")
    if "mle_aic" in ctx.keys:
        sp.formula("E7", "=" + ctx.keys["mle_aic"], "num2")
        sp.text("A8", "Law with the lower AIC")
        sp.formula("E8", '=IF(G6<E7,"skewed error law","symmetric error law")', "key_text")
        ctx.keys["aic_winner"] = absref(NAME, "E8")
    sp.text(
        "F7",
        "AIC = 2·parameters − 2·log-likelihood (4 for the skewed law, 3 for the symmetric); "
        "lower is better.",
        "note",
    )
    # Conditional models side by side.
    sp.text("A10", "Conditional model for today's figures on the Risk sheet")
    gjr, ewma = verdict_ref(ctx, "gjr"), verdict_ref(ctx, "ewma")
    if gjr and ewma:
        sp.formula(
            "E10",
            f'=IF({gjr}="passes","gjr",IF({ewma}="passes","ewma","{COND_MODEL}"))',
            "input",
        )
        sp.text(
            "F10",
            "GJR-GARCH if it passes the backtest (Backtest sheet), else EWMA if it passes, "
            'else GJR-GARCH; type "gjr", "ewma" or "garch" to choose.',
            "note",
        )
    else:
        sp.text("E10", COND_MODEL, "input")
        sp.text("F10", '"gjr" (GJR-GARCH), "ewma" or "garch"', "note")
    ctx.keys["cond_model"] = absref(NAME, "E10")
    top = 12
    for col, model, title in (
        ("A", "gjr", "GJR-GARCH(1,1), skewed error law (ERRDIST_COND_PARAMS)"),
        ("E", "ewma", "EWMA λ = 0.94, skewed error law (ERRDIST_COND_PARAMS)"),
    ):
        c0 = ord(col) - ord("A")
        sp.text(f"{col}{top}", title, "h2")
        for k in range(1, 4):
            sp.text(cell(top - 1, c0 + k), "", "h2")
        rows = _cond_rows(model)
        body = [["", f, f if label in _PARAMS[model] else "gen"] for label, f in rows]
        e = sp.spill(
            f"{col}{top + 1}",
            len(rows) + 1,
            3,
            f'=ERRDIST_COND_PARAMS({r},"{model}",0.99,0.94,TRUE)',
            "gen",
            head_rows=1,
            cell_fmts=[["head", "head_r", "head_r"], *body],
        )
        for i, (label, _) in enumerate(rows):
            if label in ("volatility tomorrow", "nu", "skew", "VaR 1 day", "ES 1 day"):
                key = label.split()[0].lower()
                ctx.keys[f"{model}_{key}"] = absref(NAME, cell(e.row + 1 + i, e.col + 1))
        if model == "gjr":
            names = [label for label, _ in rows]
            v = {p: cell(e.row + 1 + names.index(p), e.col + 1) for p in ("alpha", "gamma", "beta")}
            rr = top + len(rows) + 3
            sp.text(f"A{rr}", "Persistence α + γ/2 + β")
            sp.formula(f"B{rr}", f"={v['alpha']}+{v['gamma']}/2+{v['beta']}", "num4")
            ctx.keys["gjr_persistence"] = absref(NAME, f"B{rr}")
    notes_top = top + len(_cond_rows("gjr")) + 5
    sp.text(f"A{notes_top}", "Notes", "h2")
    for c in "BCDEFGHI":
        sp.text(f"{c}{notes_top}", "", "h2")
    for i, note in enumerate(_NOTES):
        sp.paragraph(f"A{notes_top + 1 + i}", note, 9)
    sp.print_area = f"A1:I{notes_top + len(_NOTES)}"
