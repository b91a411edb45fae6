"""The laws: the symmetric error law (density, tails, quantiles, draws), its moments and the
moment solvers (kurtosis -> shape, standard deviation -> scale)."""

from __future__ import annotations

from typing import TYPE_CHECKING

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

if TYPE_CHECKING:
    from errdist.law.moment_solvers import solve_scale, solve_shape


def __getattr__(name: str) -> object:
    # the moment solvers load on first use (they need scipy.optimize, slow to import)
    if name in ("solve_scale", "solve_shape"):
        from errdist.law import moment_solvers

        return getattr(moment_solvers, name)
    raise AttributeError(f"module 'errdist.law' has no attribute {name!r}")


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
