"""Risk figures: Value-at-Risk and Expected Shortfall in closed form, horizon rules."""

from __future__ import annotations

from errdist.risk.measures import HORIZON_RULES, expected_shortfall, value_at_risk

__all__ = ["HORIZON_RULES", "expected_shortfall", "value_at_risk"]
