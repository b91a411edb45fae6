"""Catalog entries of risk measures: Value-at-Risk and Expected Shortfall."""

from __future__ import annotations

from errdist.sheet.catalog.shared import CONFIDENCE_DOC, law_params
from errdist.sheet.entry import Entry, Param, number, text

__all__ = ["ENTRIES"]


def _risk_params(*, loc_example: float = 0.0005) -> tuple[Param, ...]:
    return (
        number("confidence", CONFIDENCE_DOC, example=0.99),
        *law_params(loc_example, 0.01, 1.3),
        number(
            "horizon_days",
            'Optional horizon in days, >= 1 (default 1); a whole number with horizon_rule "iid".',
            example=10,
            default=1.0,
            spill=False,
        ),
        number(
            "amount",
            "Optional position value > 0: the result is then money (amount x return loss). "
            "Omitted: a return, e.g. 0.025 for a 2.5% loss.",
            example=1_000_000.0,
            default=None,
        ),
        text(
            "horizon_rule",
            '"sqrt" (default): centred one-day quantile x sqrt(days), location x days. '
            '"iid": exact law of the sum of i.i.d. one-day returns (the fat tail is not simply '
            "scaled).",
            choices=("sqrt", "iid"),
            default="sqrt",
        ),
    )


ENTRIES: tuple[Entry, ...] = (
    Entry(
        name="ERRDIST_VAR",
        core="errdist.risk:value_at_risk",
        params=_risk_params(),
        result="spill",
        summary="Value-at-Risk: the loss not exceeded with the given confidence, as a positive "
        "return (or money with amount), from the error distribution of one-day returns.",
        notes="VaR = -q where q is the (1 - confidence) quantile of the horizon return. "
        'Horizon rules: "sqrt" scales the centred quantile by sqrt(days) and the location by '
        'days (a convention, exact only for the normal law); "iid" computes the law of the sum '
        "of independent one-day returns numerically. Both assume independent days. See "
        "`docs/risk.md`.",
    ),
    Entry(
        name="ERRDIST_ES",
        core="errdist.risk:expected_shortfall",
        params=_risk_params(),
        result="spill",
        summary="Expected Shortfall: the mean loss on the days beyond the VaR at the given "
        "confidence, as a positive return (or money with amount), in closed form.",
        notes="ES = a Gamma(2/b) Q(2/b, z) / (2 Gamma(1/b) (1 - confidence)) - m for one day, "
        "with z = |(q - m)/a|^b (derivation in `docs/risk.md`); horizon rules as for "
        "ERRDIST_VAR.",
    ),
)
"""This subject's worksheet functions, in catalog order."""
