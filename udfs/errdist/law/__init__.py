"""The laws: the symmetric error law (density, tails, quantiles, draws), its moments and the
moment solvers (kurtosis -> shape, standard deviation -> scale)."""

from __future__ import annotations

from errdist.law.moment_solvers import solve_scale, solve_shape
from errdist.law.moments import excess_kurtosis, variance
from errdist.law.symmetric import (
    cdf,
    check_params,
    isf,
    logcdf,
    logpdf,
    logsf,
    pdf,
    ppf,
    rvs,
    sf,
)

__all__ = [
    "cdf",
    "check_params",
    "excess_kurtosis",
    "isf",
    "logcdf",
    "logpdf",
    "logsf",
    "pdf",
    "ppf",
    "rvs",
    "sf",
    "solve_scale",
    "solve_shape",
    "variance",
]
