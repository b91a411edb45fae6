"""Catalog entries of model checking: backtests, rolling VaR, goodness of fit, rivals, points."""

from __future__ import annotations

from typing import Any

import numpy as np

from errdist.sheet.catalog.shared import (
    CONFIDENCE_DOC,
    DATA_DOC,
    EXAMPLE_DATA,
    MAX_ROWS,
    law_params,
    whole_number,
)
from errdist.sheet.entry import Entry, data_range, flag, number, text

__all__ = ["ENTRIES"]

_VAR_RETURNS = [[v] for v in (0.0123, -0.0089, 0.0031, None, -0.0245, 0.0067, 0.0154)] + [
    [v] for v in (-0.0012, 0.0078, -0.0301, 0.0019, 0.0042)
]
_VAR_FORECASTS = [[0.021]] * 9 + [[None], [0.022], [0.022]]


def _backtest_table(
    returns_: np.ndarray, var_forecasts: np.ndarray, confidence: float, header: bool
) -> list[list[Any]]:
    from errdist.checks.backtest import backtest

    r, v = returns_.ravel(), var_forecasts.ravel()
    # The cell reader trims trailing blank rows, so ranges of equal height can arrive with
    # different lengths: the shorter one is blank beyond its end (pairs dropped and counted).
    if r.size != v.size:
        size = max(r.size, v.size)
        r = np.concatenate([r, np.full(size - r.size, np.nan)])
        v = np.concatenate([v, np.full(size - v.size, np.nan)])
    res = backtest(r, v, confidence)
    rows: list[list[Any]] = []
    for label, value in res.rows():
        if label == "plus factor" and value is None:
            value = "none: the table is for 250 days at 99%"
        rows.append([label, value])
    return rows


def _rolling_cells(returns_: np.ndarray, window: float, confidence: float, method: str) -> Any:
    from errdist.checks.rolling import rolling_var

    return rolling_var(returns_, whole_number(window, "window", 4, MAX_ROWS), confidence, method)


def _gof_table(
    data: np.ndarray,
    loc: float | None,
    scale: float | None,
    shape: float | None,
    statistic: str,
    samples: float,
    seed: float | None,
) -> list[list[Any]]:
    from errdist.checks.goodness import MAX_SAMPLES, goodness_of_fit

    n_samples = whole_number(samples, "samples", 1, MAX_SAMPLES)
    s = None if seed is None else whole_number(seed, "seed", 0, 2**63 - 1)
    r = goodness_of_fit(data, loc, scale, shape, statistic=statistic, samples=n_samples, seed=s)
    return [
        ["statistic", r.statistic_name],
        ["value", r.statistic],
        ["p-value", r.pvalue],
        ["samples", r.samples],
        ["refit", bool(r.refit)],
        ["loc", r.loc],
        ["scale", r.scale],
        ["shape", r.shape],
        ["n", r.n],
    ]


def _compare_table(data: np.ndarray, header: bool) -> list[list[Any]]:
    from errdist.checks.rivals import compare

    return compare(data).to_numpy(dtype=object).tolist()


def _empirical_table(
    data: np.ndarray, loc: float, scale: float, shape: float, header: bool
) -> list[list[Any]]:
    from errdist.checks.empirical import empirical_points

    return empirical_points(data, loc, scale, shape).to_numpy(dtype=np.float64).tolist()


ENTRIES: tuple[Entry, ...] = (
    Entry(
        name="ERRDIST_BACKTEST",
        core="errdist.checks.backtest:backtest",
        call=_backtest_table,
        params=(
            data_range(
                "returns",
                "Column of realised returns in time order. Blank cells drop their pair.",
                example=_VAR_RETURNS,
            ),
            data_range(
                "var_forecasts",
                "Column of the VaR forecast (positive loss) for each of those days, same "
                "height. Blank cells drop their pair.",
                example=_VAR_FORECASTS,
            ),
            number("confidence", CONFIDENCE_DOC, example=0.99, spill=False),
            flag("header", "TRUE adds a row of labels (measure, value) above the table."),
        ),
        result="table",
        header=("measure", "value"),
        call_in_wizard=False,
        summary="Backtest of VaR forecasts: exceptions (return < -VaR), Kupiec and "
        "Christoffersen likelihood-ratio tests with p-values, Basel traffic-light zone and plus "
        "factor, as a two-column labelled table.",
        notes="Rows: observations; exceptions; expected exceptions; pairs dropped (a blank in "
        "either column); LR POF (Kupiec) and its chi-squared(1) p-value; LR IND "
        "(Christoffersen) and p-value; LR CC = POF + IND and its chi-squared(2) p-value; zone "
        "(green / yellow / red by the cumulative binomial probability, 95% and 99.99%); plus "
        "factor (BCBS 1996 table for 250 days at 99%, quoted from memory; otherwise a note). "
        "See `docs/backtesting.md`.",
    ),
    Entry(
        name="ERRDIST_ROLLING_VAR",
        core="errdist.checks.rolling:rolling_var",
        call=_rolling_cells,
        params=(
            data_range(
                "returns",
                "Column of returns in time order. Blank cells are skipped inside each window.",
                example=_VAR_RETURNS,
            ),
            number(
                "window",
                "Number of past returns per fit: a whole number >= 4, smaller than the column.",
                example=8,
                spill=False,
            ),
            number("confidence", CONFIDENCE_DOC, example=0.95, spill=False),
            text(
                "method",
                '"mle" (default, maximum likelihood) or "moments" (MEDIAN, STDEV.S, KURT).',
                choices=("mle", "moments"),
                default="mle",
            ),
        ),
        result="column",
        call_in_wizard=False,
        summary="One-day VaR forecasts aligned with a column of returns: each day's VaR is "
        "fitted on the window of returns before it only; blank for the first window days.",
        notes="Feeds ERRDIST_BACKTEST directly with the same returns column. No look-ahead: "
        "the forecast in row t uses rows t - window to t - 1. A row keeps the orientation of "
        "its input. See `docs/backtesting.md`.",
    ),
    Entry(
        name="ERRDIST_GOF",
        core="errdist.checks.goodness:goodness_of_fit",
        call=_gof_table,
        params=(
            data_range("data", DATA_DOC, example=EXAMPLE_DATA),
            number(
                "loc",
                "Optional location of a law fixed in advance. Give loc, scale and shape "
                "together, or none of them to fit the law by maximum likelihood.",
                example=0.0,
                default=None,
                spill=False,
            ),
            number(
                "scale",
                "Optional scale a > 0 of a law fixed in advance (with loc and shape).",
                example=0.015,
                default=None,
                spill=False,
            ),
            number(
                "shape",
                "Optional shape b > 0 of a law fixed in advance (with loc and scale).",
                example=1.5,
                default=None,
                spill=False,
            ),
            text(
                "statistic",
                '"ad" Anderson-Darling (default, weighs the tails), "ks" Kolmogorov-Smirnov '
                'or "cvm" Cramer-von Mises.',
                choices=("ad", "ks", "cvm"),
                default="ad",
            ),
            number(
                "samples",
                "Simulated data sets for the p-value, a whole number 1 to 100000 (default 999).",
                example=99,
                default=999,
                spill=False,
            ),
            number(
                "seed",
                "Optional whole-number seed: the same seed gives the same p-value. Omit it for "
                "a fresh simulation on every recalculation.",
                example=20261202,
                default=None,
                spill=False,
            ),
        ),
        result="table",
        call_in_wizard=False,
        summary="Goodness of fit of the error distribution: EDF statistic and bootstrap "
        "p-value, refitting each simulated sample when the law was fitted. Two-column "
        "labelled table.",
        notes="Rows: statistic (its name); value; p-value = (1 + #{simulated >= value}) / "
        "(samples + 1); samples; refit (TRUE when loc, scale, shape were fitted by maximum "
        "likelihood and every simulated data set refitted, FALSE for a law given in full); "
        "loc, scale, shape (the law tested); n (numbers used). Giving only some of loc, "
        "scale and shape is refused (`#VALUE!`). See `docs/model-checking.md`.",
    ),
    Entry(
        name="ERRDIST_COMPARE",
        core="errdist.checks.rivals:compare",
        call=_compare_table,
        params=(
            data_range("data", DATA_DOC, example=EXAMPLE_DATA),
            flag("header", "TRUE adds a row of column labels above the table."),
        ),
        result="table",
        header=(
            "law",
            "loc",
            "scale",
            "shape_or_df",
            "loglik",
            "aic",
            "bic",
            "ks",
            "var99",
            "at_bound",
        ),
        call_in_wizard=False,
        summary="Fits the error, normal, Laplace, Student t and Cauchy laws by maximum "
        "likelihood; one row each with log-likelihood, AIC, BIC, KS distance and 99% VaR, "
        "best AIC first.",
        notes="Columns: law; loc; scale; shape_or_df (error-law shape, Student t degrees of "
        "freedom, blank otherwise); loglik; aic = 2k - 2 ln L; bic = k ln n - 2 ln L (k = 3 "
        "for the error law and t, 2 otherwise); ks = largest gap between the data's "
        "empirical distribution and the fitted law; var99 = one-day 99% VaR as a positive "
        "loss; at_bound = TRUE when the shape or degrees of freedom stopped at its search "
        "bound. See `docs/model-checking.md`.",
    ),
    Entry(
        name="ERRDIST_EMPIRICAL",
        core="errdist.checks.empirical:empirical_points",
        call=_empirical_table,
        params=(
            data_range("data", DATA_DOC, example=EXAMPLE_DATA),
            *law_params(0.0, 0.015, 1.5, spill=False),
            flag("header", "TRUE adds a row of column labels above the table."),
        ),
        result="table",
        header=("return", "probability", "fitted_cdf", "fitted_quantile"),
        summary="Chart points: sorted data, plotting position (i-0.5)/n, fitted CDF at each "
        "point and fitted quantile at each position - for an ECDF-vs-fit chart and a QQ "
        "chart.",
        notes="One row per number, ascending. ECDF chart: return vs probability (points) and "
        "return vs fitted_cdf (line). QQ chart: fitted_quantile (x) vs return (y) with the "
        "45-degree line. Hazen plotting position; see `docs/model-checking.md`.",
    ),
)
"""This subject's worksheet functions, in catalog order."""
