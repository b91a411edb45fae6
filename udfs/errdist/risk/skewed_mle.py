r"""Maximum-likelihood fit of the two-piece (skewed) error law, for the rolling forecasts.

For fixed mode :math:`m`, shape :math:`b` and skew :math:`\lambda` the likelihood's scale has a
closed form (differentiate :math:`-n\ln a - a^{-b}\sum_i (|x_i-m|/(1\pm\lambda))^b`):

.. math::

    a^b = \frac{b}{n}\sum_i \left(\frac{|x_i - m|}{1+\lambda\,\mathrm{sign}(x_i-m)}\right)^b,
    \qquad
    \ell_p(m, b, \lambda) = n\left[\ln b - \ln 2 - \ln a - \ln\Gamma(1/b) - 1/b\right],

so the search runs over :math:`(m, \ln b, \operatorname{artanh}\lambda)` with Nelder-Mead (the
profile is not smooth in :math:`m` for :math:`b \le 1`, which rules out gradient methods),
started from the previous fit when one is given (warm start). The result is reported as the
law's mean, standard deviation, shape and skew (:mod:`errdist.risk.innovation_law`), i.e. the law of
:math:`\mu + \sigma Z` with :math:`Z` standardized.

This is the rolling backtest's fitting engine, not an exact-MLE reference: it stops at
Nelder-Mead's tolerance (relative 1e-8 in the parameters). Construction: Fernández & Steel
(1998), J. American Statistical Association 93(441):359-371.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy import optimize
from scipy import special as sc

from errdist.errors import InsufficientDataError
from errdist.risk.innovation_law import SHAPE_BOUNDS, SKEW_BOUNDS, standardized_params

__all__ = ["SkewedLawFit", "fit_skewed_law"]


@dataclass(frozen=True)
class SkewedLawFit:
    """A fitted two-piece error law as mean, standard deviation, shape and skew."""

    mean: float
    std: float
    shape: float
    skew: float
    loglik: float
    n: int
    at_bound: bool


def _profile(theta: NDArray[np.float64], x: NDArray[np.float64]) -> tuple[float, float]:
    m, logb, t = theta
    b = math.exp(logb)
    lam = math.tanh(t)
    d = x - m
    s = np.where(d < 0.0, 1.0 - lam, 1.0 + lam)
    sb = float(np.sum((np.abs(d) / s) ** b))
    if not (sb > 0.0 and math.isfinite(sb)):
        return math.inf, math.nan
    n = x.size
    ab = b * sb / n
    log_a = math.log(ab) / b
    ll = n * (math.log(b) - math.log(2.0) - log_a - sc.gammaln(1.0 / b) - 1.0 / b)
    return -ll, math.exp(log_a)


def fit_skewed_law(x: NDArray[np.float64], start: SkewedLawFit | None = None) -> SkewedLawFit:
    """Fit the two-piece error law to a sample by maximum likelihood.

    Parameters
    ----------
    x : ndarray
        Finite sample, at least 10 values with spread.
    start : SkewedLawFit, optional
        A previous fit to start from (warm start).

    Returns
    -------
    SkewedLawFit
        ``at_bound`` is True when the shape or skew ended at the search bounds
        (:data:`~errdist.risk.innovation_law.SHAPE_BOUNDS`, :data:`~errdist.risk.innovation_law.SKEW_BOUNDS`).
    """
    x = np.asarray(x, dtype=float)
    if x.size < 10:
        raise InsufficientDataError(f"the skewed law needs at least 10 returns, got {x.size}")
    spread = float(np.std(x))
    if not spread > 0.0:
        raise InsufficientDataError("the returns have no spread: nothing to fit")
    # Work on a standardized copy so the tolerances are scale-free.
    centre = float(np.median(x))
    y = (x - centre) / spread
    if start is None:
        theta0 = np.array([0.0, math.log(1.2), 0.0])
    else:
        m0, a0 = standardized_params(start.shape, start.skew)
        mode = (start.mean + start.std * m0 - centre) / spread
        theta0 = np.array([mode, math.log(start.shape), math.atanh(start.skew)])
    lo_b, hi_b = (math.log(v) for v in SHAPE_BOUNDS)
    lo_t, hi_t = (math.atanh(v) for v in SKEW_BOUNDS)

    def objective(theta: NDArray[np.float64]) -> float:
        th = np.array([theta[0], min(max(theta[1], lo_b), hi_b), min(max(theta[2], lo_t), hi_t)])
        penalty = (theta[1] - th[1]) ** 2 + (theta[2] - th[2]) ** 2
        return _profile(th, y)[0] + 1e3 * penalty

    res = optimize.minimize(
        objective,
        theta0,
        method="Nelder-Mead",
        options={"xatol": 1e-8, "fatol": 1e-10, "maxiter": 4000},
    )
    m, logb, t = res.x
    logb = min(max(logb, lo_b), hi_b)
    t = min(max(t, lo_t), hi_t)
    nll, a = _profile(np.array([m, logb, t]), y)
    b, lam = math.exp(logb), math.tanh(t)
    ms, as_ = standardized_params(b, lam)
    # y = mode + a*(...) = mean_y + std_y*Z with Z standardized: std_y = a/as_, mean_y = m - std_y*ms
    std_y = a / as_
    mean_y = m - std_y * ms
    at_bound = bool(
        abs(logb - lo_b) < 1e-6
        or abs(logb - hi_b) < 1e-6
        or abs(t - lo_t) < 1e-6
        or abs(t - hi_t) < 1e-6
    )
    return SkewedLawFit(
        mean=centre + spread * mean_y,
        std=spread * std_y,
        shape=b,
        skew=lam,
        loglik=-nll - x.size * math.log(spread),
        n=int(x.size),
        at_bound=at_bound,
    )
