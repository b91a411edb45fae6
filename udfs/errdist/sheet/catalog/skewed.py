"""Catalog entries of the skewed error law: density, probabilities, quantiles, VaR, ES, fit.

Separate ``ERRDIST_SKEW_*`` functions rather than an optional ``skew`` argument on
ERRDIST_PDF, ERRDIST_VAR...: the skew then sits where the law's other parameters sit,
``(x, loc, scale, shape, skew)`` as in :mod:`errdist.law.skewed`, instead of after
``upper`` or after ``horizon_days, amount, horizon_rule`` (ERRDIST_VAR(0.99, m, a, b, 1, , "sqrt",
-0.2) would hide it at the end); the function wizard shows it as a required argument, so a
reader of ``=ERRDIST_SKEW_VAR(...)`` knows which law is used; and every existing formula keeps
its exact meaning and its bit-identical value because its code is untouched.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from errdist.law import skewed
from errdist.sheet.catalog.shared import DATA_DOC, EXAMPLE_DATA, law_params
from errdist.sheet.entry import Entry, Param, data_range, flag, number

__all__ = ["ENTRIES", "SKEW_DOC"]

SKEW_DOC = (
    "Skew between -1 and 1: below 0 the loss (left) side is wider, 0 is the symmetric error "
    "law (the ERRDIST_ functions without SKEW), P(X < loc) = (1 - skew)/2."
)
_CONFIDENCE_DOC = "Confidence as a fraction strictly between 0 and 1, e.g. 0.99 for 99%."


def _skew_param(example: float = -0.1, *, spill: bool = True) -> Param:
    return number("skew", SKEW_DOC, example=example, spill=spill)


def _cdf(x: Any, loc: Any, scale: Any, shape: Any, skew: Any, upper: bool) -> Any:
    return (skewed.sf if upper else skewed.cdf)(x, loc, scale, shape, skew)


def _var(
    confidence: Any, loc: Any, scale: Any, shape: Any, skew: Any, horizon: float, amount: Any
) -> Any:
    return skewed.value_at_risk(confidence, loc, scale, shape, skew, horizon, amount)


def _es(
    confidence: Any, loc: Any, scale: Any, shape: Any, skew: Any, horizon: float, amount: Any
) -> Any:
    return skewed.expected_shortfall(confidence, loc, scale, shape, skew, horizon, amount)


def _fit_row(data: np.ndarray, header: bool) -> list[list[Any]]:
    f = skewed.fit_skewed(data)
    return [
        [
            f.loc,
            f.scale,
            f.shape,
            f.skew,
            f.n,
            f.loglik,
            f.aic,
            bool(f.at_bound),
            f.warning or "none",
        ]
    ]


def _risk_params() -> tuple[Param, ...]:
    return (
        number("confidence", _CONFIDENCE_DOC, example=0.99),
        *law_params(0.0005, 0.01, 1.3),
        _skew_param(),
        number(
            "horizon_days",
            "Optional horizon in days, >= 1 (default 1): the one-day quantile's distance from "
            "the mean is scaled by sqrt(days), the mean by days.",
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
    )


ENTRIES: tuple[Entry, ...] = (
    Entry(
        name="ERRDIST_SKEW_PDF",
        core="errdist.law.skewed:pdf",
        params=(
            number("x", "Value(s) at which to evaluate the density.", example=0.5),
            *law_params(),
            _skew_param(),
        ),
        result="spill",
        summary="Density of the skewed (two-piece) error distribution: half-scale "
        "scale*(1-skew) left of loc, scale*(1+skew) right of it. Any argument may be a range.",
        notes="f(x) = b / (2 a Gamma(1/b)) exp(-(|x-m| / (a (1 + skew sign(x-m))))^b) "
        "(inverse scale factors, Fernandez & Steel 1998). Skew 0 is ERRDIST_PDF to the last "
        "bit. See `docs/methodology.md`.",
    ),
    Entry(
        name="ERRDIST_SKEW_CDF",
        core="errdist.law.skewed:cdf",
        call=_cdf,
        params=(
            number("x", "Value(s) at which to evaluate the probability.", example=-0.5),
            *law_params(),
            _skew_param(),
            flag(
                "upper",
                "FALSE or omitted: P(X <= x). TRUE: the upper tail P(X > x), accurate far "
                "into that tail.",
            ),
        ),
        result="spill",
        summary="Cumulative probability P(X <= x) of the skewed error distribution, or the "
        "upper tail P(X > x) when upper is TRUE.",
        notes="Each side's tail is computed from the upper incomplete gamma function Q, never "
        "as 1 - P, so small tail probabilities keep their digits.",
    ),
    Entry(
        name="ERRDIST_SKEW_INV",
        core="errdist.law.skewed:ppf",
        params=(
            number("p", "Probability(ies) strictly between 0 and 1.", example=0.01),
            *law_params(),
            _skew_param(),
        ),
        result="spill",
        summary="Quantile of the skewed error distribution: the x with P(X <= x) = p.",
    ),
    Entry(
        name="ERRDIST_SKEW_VAR",
        core="errdist.law.skewed:value_at_risk",
        call=_var,
        params=_risk_params(),
        result="spill",
        summary="Value-at-Risk from the skewed error distribution of one-day returns: the "
        "loss not exceeded with the given confidence, as a positive return (or money with "
        "amount).",
        notes="VaR = -q, q the (1 - confidence) quantile. Longer horizons scale the "
        "quantile's distance from the mean by sqrt(days) (independent days assumed; common "
        "practice, no source). Skew 0 gives ERRDIST_VAR's value.",
    ),
    Entry(
        name="ERRDIST_SKEW_ES",
        core="errdist.law.skewed:expected_shortfall",
        call=_es,
        params=_risk_params(),
        result="spill",
        summary="Expected Shortfall from the skewed error distribution: the mean loss on the "
        "days beyond the VaR, as a positive return (or money with amount), in closed form.",
        notes="Left of the mode ES = a (1-skew)^2 Gamma(2/b) Q(2/b, z) / (2 Gamma(1/b) "
        "(1 - confidence)) - m, the symmetric formula with the left half-scale (derivation in "
        "`docs/risk.md`); horizons as for ERRDIST_SKEW_VAR.",
    ),
    Entry(
        name="ERRDIST_SKEW_FIT",
        core="errdist.law.skewed:fit_skewed",
        call=_fit_row,
        params=(
            data_range("data", DATA_DOC, example=EXAMPLE_DATA),
            flag("header", "TRUE adds a row of labels above the numbers."),
        ),
        result="table",
        header=("loc", "scale", "shape", "skew", "n", "loglik", "aic", "at_bound", "warning"),
        call_in_wizard=False,
        summary="Fits the skewed error distribution by exact maximum likelihood; spills loc, "
        "scale, shape, skew, n, log-likelihood, AIC, at_bound and a warning in a row.",
        notes="aic = 2*4 - 2 ln L (four parameters), comparable with the AIC of ERRDIST_FIT_REPORT "
        "and ERRDIST_COMPARE on the same data. at_bound is TRUE when the shape or the skew "
        'stopped at its search bound; warning then says why ("none" otherwise).',
    ),
)
"""This subject's worksheet functions, in catalog order."""
