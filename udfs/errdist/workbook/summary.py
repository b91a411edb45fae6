"""Key figures of a built workbook, read from the engine's values at the plan's key cells."""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

import pandas as pd

from errdist.workbook.layout import Plan

__all__ = ["Values", "canonical_values", "lookup", "summarize"]

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
    return out


def canonical_values(values: Values, plan: Plan) -> dict[tuple[str, str], object]:
    """Engine results keyed by the plan's own sheet names (engines may change the case)."""
    names = {s.name.upper(): s.name for s in plan.sheets}
    out: dict[tuple[str, str], object] = {}
    for (sheet, ref), v in values.items():
        out[(names.get(str(sheet).upper(), str(sheet)), str(ref).replace("$", "").upper())] = v
    return out
