"""The printed summary states the fit and backtest verdicts in plain words.

The wording is checked on hand-made summaries; the figures themselves come from the workbook's
cells, which tests/test_template.py recomputes. The 25% shape margin is common practice, no
source (documented in errdist.workbook.summary.SHAPE_GAP_MARGIN and docs/template.md).
"""

from __future__ import annotations

from pathlib import Path

from errdist.workbook.commands import format_summary
from errdist.workbook.summary import SHAPE_GAP_MARGIN, best_model


def _summary(**extra: object) -> dict[str, object]:
    base: dict[str, object] = {
        "fund": "Test fund",
        "first_date": "2022-01-03",
        "last_date": "2026-11-30",
        "n_returns": 1260,
        "moments": {"loc": 0.0, "scale": 0.004, "shape": 0.70},
        "mle": {"loc": 0.0, "scale": 0.006, "shape": 1.00},
        "var99": 0.024,
        "es99": 0.030,
        "backtest_exceptions": 3.0,
        "backtest_zone": "green",
        "gof_pvalue": 0.64,
        "best_law_aic": "Student t",
        "aic_winner": "skewed error law",
        "shape_gap": 0.30,
        "shape_gap_warning": True,
        "cond_model": "gjr",
        "cond_var99": 0.028,
        "cond_es99": 0.035,
        "cond_es975": 0.029,
    }
    base.update(extra)
    return base


def _model(exceptions: float, zone: str, kupiec: float, verdict: str) -> dict[str, object]:
    return {
        "exceptions": exceptions,
        "expected": 2.5,
        "kupiec_pvalue": kupiec,
        "independence_pvalue": 0.8,
        "zone": zone,
        "es_statistic": -0.1,
        "es_pvalue": 0.4,
        "var_today": 0.03,
        "es_today": 0.036,
        "verdict": verdict,
    }


def test_fit_verdict_and_shape_warning_in_words() -> None:
    text = format_summary(_summary(), Path("book.xlsx"), 1.0)
    assert "goodness of fit p = 0.640, the fitted error law is not rejected at 5%" in text
    assert "best law by AIC: Student t" in text and "skewed error law has the lower AIC" in text
    assert "WARNING: the moments shape 0.700 and the MLE shape 1.000 differ by 30%" in text
    assert f"{SHAPE_GAP_MARGIN:.0%} margin" in text
    calm = format_summary(
        _summary(shape_gap=0.1, shape_gap_warning=False, gof_pvalue=0.01), Path("b.xlsx"), 1.0
    )
    assert "WARNING" not in calm and "shapes agree" in calm
    assert "the fitted error law is rejected at 5%" in calm


def test_backtest_verdict_names_the_model_exceptions_zone_and_kupiec() -> None:
    models = {
        "gjr": _model(3, "green", 0.64, "passes"),
        "symmetric": _model(6, "yellow", 0.06, "not green"),
    }
    text = format_summary(_summary(models=models, best_model="gjr"), Path("b.xlsx"), 1.0)
    assert (
        "the 99% VaR of the GJR-GARCH (skewed law) model had 3 exceptions in the last 250 days: "
        "green zone; Kupiec p = 0.64"
    ) in text
    assert "error law (rolling fit): 6 exceptions (2.5 expected), yellow zone" in text
    assert "today, conditional gjr: VaR 99% 2.800%, ES 99% 3.500%, ES 97.5% 2.900%" in text


def test_best_model_prefers_a_passing_model_then_gjr() -> None:
    assert best_model({"gjr": {"verdict": "not green"}, "ewma": {"verdict": "passes"}}) == "ewma"
    assert best_model({"gjr": {"verdict": "passes"}, "ewma": {"verdict": "passes"}}) == "gjr"
    assert best_model({"gjr": {"verdict": "fails ES test"}, "ewma": {"verdict": "no"}}) == "gjr"
    assert best_model({}) == ""
    failing = {"gjr": _model(12, "red", 0.0, "wrong exception rate")}
    text = format_summary(_summary(models=failing, best_model="gjr"), Path("b.xlsx"), 1.0)
    assert "red zone; Kupiec p = 0.00; no model passed every test" in text
