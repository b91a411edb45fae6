"""Catalog entries of estimation: the fits, the fit report and the log-likelihood."""

from __future__ import annotations

from typing import Any

import numpy as np

from errdist import estimate
from errdist.errors import ErrdistError
from errdist.sheet.catalog.shared import DATA_DOC, EXAMPLE_DATA, law_params
from errdist.sheet.cells import sheet_error
from errdist.sheet.entry import Entry, data_range, flag, text

__all__ = ["ENTRIES"]


def _fit_row(data: np.ndarray, method: str, header: bool) -> list[list[Any]]:
    f = estimate.fit(data, method=method)
    return [[f.loc, f.scale, f.shape]]


def _fit_report(data: np.ndarray) -> list[list[Any]]:
    values, _ = estimate.clean_sample(data)
    blanks = _interior_blanks(data)
    mle = estimate.fit(values, method="mle")
    rows: list[list[Any]] = [
        ["n used", values.size],
        ["blanks skipped", blanks],
        ["mean", estimate.sample_mean(values)],
        ["median", estimate.sample_median(values)],
        ["STDEV.S", estimate.sample_std(values)],
        ["SKEW", estimate.sample_skewness(values)],
        ["KURT", estimate.sample_excess_kurtosis(values)],
        ["MLE loc", mle.loc],
        ["MLE scale", mle.scale],
        ["MLE shape", mle.shape],
        ["MLE log-likelihood", mle.loglik],
        ["MLE AIC", mle.aic],
    ]
    labels = ["loc", "scale", "shape", "log-likelihood", "AIC"]
    try:
        mom = estimate.fit(values, method="moments")
    except ErrdistError as exc:
        note = sheet_error(exc).text
        rows += [[f"moments {label}", note] for label in labels]
    else:
        rows += [
            [f"moments {label}", v]
            for label, v in zip(
                labels, (mom.loc, mom.scale, mom.shape, mom.loglik, mom.aic), strict=True
            )
        ]
    rows.append(["MLE shape at search bound", bool(mle.at_bound)])
    rows.append(["MLE note", mle.warning or "none"])
    return rows


def _interior_blanks(data: np.ndarray) -> int:
    """Blank cells between the first and the last number (row-major)."""
    flat = np.isnan(np.asarray(data, dtype=np.float64).ravel())
    filled = np.flatnonzero(~flat)
    if filled.size == 0:
        return 0
    return int(flat[filled[0] : filled[-1] + 1].sum())


def _loglik(data: np.ndarray, loc: float, scale: float, shape: float) -> float:
    return estimate.loglik(data, loc, scale, shape)


ENTRIES: tuple[Entry, ...] = (
    Entry(
        name="ERRDIST_FIT",
        core="errdist.estimate:fit",
        call=_fit_row,
        params=(
            data_range("data", DATA_DOC, example=EXAMPLE_DATA),
            text(
                "method",
                'Estimator: "mle" (maximum likelihood, default) or "moments" (loc = MEDIAN, '
                "scale and shape from STDEV.S and KURT).",
                choices=("mle", "moments"),
                default="mle",
            ),
            flag("header", "TRUE adds a row of labels above the numbers."),
        ),
        result="table",
        header=("loc", "scale", "shape"),
        call_in_wizard=False,
        summary="Fits the error distribution to a data range; spills loc, scale and shape in "
        "a row.",
    ),
    Entry(
        name="ERRDIST_FIT_REPORT",
        core="errdist.estimate:fit",
        call=_fit_report,
        params=(data_range("data", DATA_DOC, example=EXAMPLE_DATA),),
        result="table",
        call_in_wizard=False,
        summary="A two-column labelled table: sample statistics, both fits (MLE and moments) "
        "with log-likelihood and AIC, and whether the MLE shape hit its search bound.",
        notes="Rows: n used; blanks skipped (blank cells between the first and last number); "
        "mean; median; STDEV.S; SKEW; KURT; MLE loc, scale, shape, log-likelihood, AIC; the "
        "same five for the moments fit; MLE shape at search bound (TRUE/FALSE); MLE note. "
        "When the moments fit is impossible (KURT <= -1.2) its five rows show the reason "
        "instead of numbers and the rest of the table stands.",
    ),
    Entry(
        name="ERRDIST_LOGLIK",
        core="errdist.estimate:loglik",
        call=_loglik,
        params=(data_range("data", DATA_DOC, example=EXAMPLE_DATA), *law_params(scale=0.01)),
        result="spill",
        vectorized=False,
        summary="Log-likelihood sum of ln f(x) of a data range under the error distribution; "
        "ranges of loc, scale or shape spill a profile.",
    ),
)
"""This subject's worksheet functions, in catalog order."""
