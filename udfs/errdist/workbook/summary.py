"""Key figures of a built workbook, read from the engine's values at the plan's key cells.

Besides the fits and the 99% figures, the summary carries the fit verdict (goodness-of-fit
p-value, the law with the best AIC, the skewed law against the symmetric one), the gap between
the moments and maximum likelihood shapes (flagged above :data:`SHAPE_GAP_MARGIN`) and each
model's backtest over the last 250 days (Forecasts / Backtest sheets).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

import pandas as pd

from errdist.workbook.layout import Plan

__all__ = [
    "MODEL_NAMES",
    "SHAPE_GAP_MARGIN",
    "Values",
    "best_model",
    "canonical_values",
    "lookup",
    "summarize",
]

SHAPE_GAP_MARGIN = 0.25
"""Relative gap |moments shape - MLE shape| / MLE shape above which the two fits are said to
disagree (25%: common practice, no source). The moments fit rests on the sample kurtosis, which
single extreme returns move a lot; a larger gap means the tails are not well pinned down."""

MODEL_NAMES = {
    "gjr": "GJR-GARCH (skewed law)",
    "ewma": "EWMA (skewed law)",
    "skewed": "skewed error law (rolling fit)",
    "symmetric": "error law (rolling fit)",
}
"""Plain names of the backtested models, in order of preference."""
_MODEL_FIELDS = {
    "exceptions": "exceptions",
    "expected": "expected exceptions",
    "kupiec_pvalue": "p-value POF",
    "independence_pvalue": "p-value IND",
    "zone": "zone",
    "es_statistic": "es Z2 statistic",
    "es_pvalue": "es p-value",
    "var_today": "var_today",
    "es_today": "es_today",
    "verdict": "verdict",
}

Values = Mapping[tuple[str, str], object]
"""Evaluated cell values keyed by ``(sheet, A1)``."""


def lookup(values: Values, key: str) -> object:
    """Value of an absolute reference such as ``Calibration!$G$7`` in evaluated values."""
    sheet, ref = key.rsplit("!", 1)
    sheet = sheet.strip("'").replace("''", "'")
    return values.get((sheet, ref.replace("$", "")))


def summarize(plan: Plan, values: Values, prices: pd.DataFrame, fund: str) -> dict[str, Any]:
    """The ``BuildResult.summary`` dict: dates, fits, one-day 99% VaR/ES and the backtest."""
    keys = plan.keys

    def num(name: str) -> float:
        v = lookup(values, keys[name]) if name in keys else None
        try:
            return float(v)  # type: ignore[arg-type]
        except (TypeError, ValueError):
            return math.nan

    out: dict[str, Any] = {
        "fund": fund,
        "first_date": pd.Timestamp(prices["date"].iloc[0]).strftime("%Y-%m-%d"),
        "last_date": pd.Timestamp(prices["date"].iloc[-1]).strftime("%Y-%m-%d"),
        "n_returns": len(prices) - 1,
    }
    for method in ("mom", "mle"):
        name = "moments" if method == "mom" else "mle"
        out[name] = {p: num(f"fit_{method}_{p}") for p in ("loc", "scale", "shape")}
    out["var99"] = num("var99")
    out["es99"] = num("es99")
    out["backtest_exceptions"] = num("bt_exceptions")
    zone = lookup(values, keys["bt_zone"]) if "bt_zone" in keys else None
    out["backtest_zone"] = "" if zone is None else str(zone)

    def text(name: str) -> str:
        v = lookup(values, keys[name]) if name in keys else None
        return "" if v is None else str(v)

    out["gof_pvalue"] = num("gof_pvalue")
    out["gof_statistic"] = text("gof_statistic")
    out["best_law_aic"] = text("compare_best")
    out["aic_winner"] = text("aic_winner")
    mom, mle = out["moments"]["shape"], out["mle"]["shape"]
    gap = abs(mom - mle) / mle if mle > 0 else math.nan
    out["shape_gap"] = gap
    out["shape_gap_warning"] = bool(gap > SHAPE_GAP_MARGIN) if not math.isnan(gap) else False
    for name in ("cond_var99", "cond_es99", "cond_es975", "es975", "skew_var99", "skew_es99"):
        out[name] = num(name)
    out["cond_model"] = text("cond_model")
    models: dict[str, dict[str, Any]] = {}
    for model in MODEL_NAMES:
        if f"cmp_{model}_row_zone" not in keys:
            continue
        row: dict[str, Any] = {}
        for field, suffix in _MODEL_FIELDS.items():
            key = f"cmp_{model}_verdict" if suffix == "verdict" else f"cmp_{model}_row_{suffix}"
            v = lookup(values, keys[key]) if key in keys else None
            if field in ("zone", "verdict"):
                row[field] = "" if v is None else str(v)
            else:
                try:
                    row[field] = float(v)  # type: ignore[arg-type]
                except (TypeError, ValueError):
                    row[field] = math.nan
        models[model] = row
    out["models"] = models
    out["best_model"] = best_model(models)
    return out


def best_model(models: Mapping[str, Mapping[str, Any]]) -> str:
    """The first model of :data:`MODEL_NAMES` whose backtest verdict is "passes"; else the
    conditional GJR-GARCH model (the default), or "" without backtests."""
    for name in MODEL_NAMES:
        if models.get(name, {}).get("verdict") == "passes":
            return name
    return "gjr" if "gjr" in models else ""


def canonical_values(values: Values, plan: Plan) -> dict[tuple[str, str], object]:
    """Engine results keyed by the plan's own sheet names (engines may change the case)."""
    names = {s.name.upper(): s.name for s in plan.sheets}
    out: dict[tuple[str, str], object] = {}
    for (sheet, ref), v in values.items():
        out[(names.get(str(sheet).upper(), str(sheet)), str(ref).replace("$", "").upper())] = v
    return out
