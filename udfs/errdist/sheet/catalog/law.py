"""Catalog entries of the law: density, probabilities, quantiles, draws, moments, solvers."""

from __future__ import annotations

from typing import Any

import numpy as np

from errdist import law
from errdist.sheet.catalog.shared import (
    MAX_ROWS,
    law_params,
    scale_param,
    shape_param,
    whole_number,
)
from errdist.sheet.entry import Entry, flag, number

__all__ = ["ENTRIES"]

_cdf_core = law.cdf
_sf_core = law.sf


def _cdf(x: Any, loc: Any, scale: Any, shape: Any, upper: bool) -> Any:
    return (_sf_core if upper else _cdf_core)(x, loc, scale, shape)


def _rand(count: float, loc: float, scale: float, shape: float, seed: Any) -> np.ndarray:
    n = whole_number(count, "count", 1, MAX_ROWS)
    s = None if seed is None else whole_number(seed, "seed", 0, 2**63 - 1)
    return np.asarray(law.rvs(n, loc, scale, shape, seed=s), dtype=np.float64).reshape(-1, 1)


ENTRIES: tuple[Entry, ...] = (
    Entry(
        name="ERRDIST_PDF",
        core="errdist.law.symmetric:pdf",
        params=(
            number("x", "Value(s) at which to evaluate the density.", example=0.5),
            *law_params(),
        ),
        result="spill",
        summary="Density f(x) of the error (generalized normal) distribution. Any argument "
        "may be a range: the result spills in the broadcast shape.",
    ),
    Entry(
        name="ERRDIST_CDF",
        core="errdist.law.symmetric:cdf",
        call=_cdf,
        params=(
            number("x", "Value(s) at which to evaluate the probability.", example=0.5),
            *law_params(),
            flag(
                "upper",
                "FALSE or omitted: P(X <= x). TRUE: the upper tail P(X > x), accurate far "
                "into that tail.",
            ),
        ),
        result="spill",
        summary="Cumulative probability P(X <= x) of the error distribution, or the upper "
        "tail P(X > x) when upper is TRUE.",
        notes="`upper` TRUE uses `errdist.law.symmetric.sf`, so tail probabilities such as "
        "1e-300 keep their digits instead of rounding 1 − F(x) to 0.",
    ),
    Entry(
        name="ERRDIST_INV",
        core="errdist.law.symmetric:ppf",
        params=(
            number("p", "Probability(ies) strictly between 0 and 1.", example=0.99),
            *law_params(),
        ),
        result="spill",
        summary="Quantile (inverse cumulative probability) of the error distribution: the x "
        "with P(X <= x) = p.",
    ),
    Entry(
        name="ERRDIST_RAND",
        core="errdist.law.symmetric:rvs",
        call=_rand,
        params=(
            number("count", "How many draws: a whole number from 1 up.", example=5, spill=False),
            *law_params(spill=False),
            number(
                "seed",
                "Optional whole-number seed: the same seed gives the same draws. Omit it for "
                "fresh draws on every recalculation.",
                example=20261202,
                default=None,
                spill=False,
            ),
        ),
        result="column",
        summary="A column of random draws from the error distribution; reproducible when a "
        "seed is given.",
        notes="Through the xlwings add-in the function is not volatile (xlwings declares "
        "volatility per function, not per call): without a seed it draws again when its "
        "arguments change or on a full recalculation (Ctrl+Alt+F9). The VBA module written by "
        "`errdist vba` marks a call volatile only when the seed is omitted.",
    ),
    Entry(
        name="ERRDIST_VARIANCE",
        core="errdist.law.moments:variance",
        params=(scale_param(), shape_param()),
        result="spill",
        summary="Variance a^2 Gamma(3/b) / Gamma(1/b) of the error distribution with scale a "
        "and shape b (not Value-at-Risk: that is ERRDIST_VAR).",
    ),
    Entry(
        name="ERRDIST_KURT",
        core="errdist.law.moments:excess_kurtosis",
        params=(shape_param(),),
        result="spill",
        summary="Excess kurtosis Gamma(5/b) Gamma(1/b) / Gamma(3/b)^2 - 3 of the error "
        "distribution with shape b (0 for the normal law, 3 for Laplace).",
    ),
    Entry(
        name="ERRDIST_SOLVE_SHAPE",
        core="errdist.estimate:solve_shape",
        params=(
            number(
                "excess_kurtosis",
                "Excess kurtosis (as KURT gives it); must be above -1.2.",
                example=1.2,
            ),
        ),
        result="spill",
        vectorized=False,
        summary="The shape b whose excess kurtosis equals the given value (method of "
        "moments). Any value above -1.2 has one.",
    ),
    Entry(
        name="ERRDIST_SOLVE_SCALE",
        core="errdist.estimate:solve_scale",
        params=(
            number("sd", "Standard deviation (> 0), e.g. from STDEV.S.", example=0.012),
            shape_param(),
        ),
        result="spill",
        vectorized=False,
        summary="The scale a giving standard deviation sd for shape b: "
        "a = sd sqrt(Gamma(1/b) / Gamma(3/b)).",
    ),
)
"""This subject's worksheet functions, in catalog order."""
