"""Estimation: spreadsheet-convention sample statistics, the moments fit, the exact MLE (one
sample and batched) -> :class:`Fit`."""

from __future__ import annotations

from errdist.estimate.fit import (
    N_PARAMS,
    SHAPE_MAX,
    SHAPE_MIN,
    Fit,
    clean_sample,
    fit,
    loglik,
    sample_excess_kurtosis,
    sample_mean,
    sample_median,
    sample_skewness,
    sample_std,
    solve_scale,
    solve_shape,
)

__all__ = [
    "N_PARAMS",
    "SHAPE_MAX",
    "SHAPE_MIN",
    "Fit",
    "clean_sample",
    "fit",
    "loglik",
    "sample_excess_kurtosis",
    "sample_mean",
    "sample_median",
    "sample_skewness",
    "sample_std",
    "solve_scale",
    "solve_shape",
]
