"""Estimation for the generalized normal ("error") law: sample statistics, moments, MLE.

Public module of the estimation layer. Sample statistics follow the spreadsheet's
conventions (see :mod:`errdist.estimate.sample_stats`); :func:`solve_shape` and :func:`solve_scale`
invert the kurtosis and variance formulas (see :mod:`errdist.law.moment_solvers`); the exact
maximum-likelihood engine lives in :mod:`errdist.estimate.mle`.

The law (Nadarajah 2005, "A generalized normal distribution", J. Applied Statistics
32(7):685-694), location m, scale a > 0, shape b > 0:

    f(x) = b / (2a Γ(1/b)) · exp(−(|x−m|/a)^b).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Literal

import numpy as np
from scipy.special import gammaln

from errdist.errors import DomainError, InputTypeError
from errdist.estimate.mle import SHAPE_MAX, SHAPE_MIN, _mle_sorted, _sorted
from errdist.estimate.sample_stats import (
    _clean,
    _kurt,
    _mean,
    _require_spread,
    _std,
    binary_exponent,
    clean_sample,
    sample_excess_kurtosis,
    sample_mean,
    sample_median,
    sample_skewness,
    sample_std,
)
from errdist.law.moment_solvers import solve_scale, solve_shape

__all__ = [
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

_RESCALE_BEYOND = 200
"""Data whose largest magnitude is beyond 2**±200 are fitted rescaled (see :func:`fit`)."""

N_PARAMS = 3
"""Number of fitted parameters (loc, scale, shape) used in AIC and BIC."""


@dataclass(frozen=True)
class Fit:
    """Result of :func:`fit`.

    Attributes
    ----------
    loc, scale, shape : float
        Fitted location m, scale a and shape b.
    method : str
        ``"mle"`` or ``"moments"``.
    n : int
        Number of observations used.
    n_dropped : int
        Number of NaN / blank entries dropped.
    loglik : float
        Log-likelihood Σ ln f(xᵢ) at the fitted parameters.
    aic, bic : float
        Akaike and Bayesian information criteria, 2k − 2ℓ and k·ln n − 2ℓ with k = 3.
    at_bound : bool
        True when the MLE shape sits at SHAPE_MIN or SHAPE_MAX.
    warning : str
        Explanation when ``at_bound`` (empty otherwise); it says when the lower bound was
        reached at a repeated value (tied data, see ``ties``).
    ties : int
        Number of observations equal to another, earlier one (n minus the number of distinct
        values). Repeated values (prices rounded to a tick, stale prices) make the
        likelihood of a continuous law grow without limit as the shape goes to 0 at a
        repeated value; the MLE is the maximum over [SHAPE_MIN, SHAPE_MAX], and when that is
        the lower bound at a repeated value the warning says so.
    """

    loc: float
    scale: float
    shape: float
    method: str
    n: int
    n_dropped: int
    loglik: float
    aic: float
    bic: float
    at_bound: bool
    warning: str
    ties: int = 0


def _check_params(loc: float, scale: float, shape: float) -> tuple[float, float, float]:
    loc, scale, shape = float(loc), float(scale), float(shape)
    if not math.isfinite(loc):
        raise DomainError(f"loc must be a finite number, got {loc:g}")
    if not (math.isfinite(scale) and scale > 0.0):
        raise DomainError(f"scale must be > 0, got {scale:g}")
    if not (math.isfinite(shape) and shape > 0.0):
        raise DomainError(f"shape must be > 0, got {shape:g}")
    return loc, scale, shape


def _loglik(x: np.ndarray, loc: float, scale: float, shape: float) -> float:
    n = x.size
    z = np.abs(x - loc) / scale
    return n * (
        math.log(shape) - math.log(2.0) - math.log(scale) - float(gammaln(1.0 / shape))
    ) - float((z**shape).sum())


def loglik(data: Any, loc: float, scale: float, shape: float) -> float:
    """Log-likelihood Σ ln f(xᵢ) of the data under the law (loc, scale, shape).

    .. math:: \\ell = n\\,[\\ln b - \\ln 2 - \\ln a - \\ln\\Gamma(1/b)]
              - \\sum_i (|x_i - m|/a)^b

    NaN (blank) entries are dropped.

    Raises
    ------
    DomainError
        scale ≤ 0, shape ≤ 0, non-finite loc, or ±inf in the data.
    InsufficientDataError
        No numbers in the data.
    """
    loc, scale, shape = _check_params(loc, scale, shape)
    x, _ = clean_sample(data, min_count=1)
    with np.errstate(over="ignore", invalid="ignore"):
        value = _loglik(x, loc, scale, shape)
    if not math.isfinite(value):
        raise DomainError(
            "log-likelihood exceeds the float range: the data lie too many scales from loc"
        )
    return value


def _make_fit(
    loc: float,
    scale: float,
    shape: float,
    method: str,
    n: int,
    n_dropped: int,
    ll: float,
    ties: int = 0,
    loc_count: int = 1,
) -> Fit:
    at_bound = False
    warning = ""
    if method == "mle":
        if shape >= SHAPE_MAX * (1.0 - 1e-12):
            at_bound = True
            warning = (
                f"shape at upper bound {SHAPE_MAX:g}: data look lighter-tailed than any "
                "error law in range; treat tail figures with care"
            )
        elif shape <= SHAPE_MIN * (1.0 + 1e-12) and loc_count > 1:
            at_bound = True
            warning = (
                f"shape at lower bound {SHAPE_MIN:g} at a repeated value: {loc_count} of {n} "
                f"observations equal loc ({ties} repeated values in all). With tied data "
                "(prices rounded to a tick, stale prices) the likelihood grows without limit "
                "as the shape goes to 0 at a repeated value, so the fit stops at the bound; "
                "the tail figures of this fit are not usable: remove stale prices or use "
                "coarser (e.g. weekly) returns"
            )
        elif shape <= SHAPE_MIN * (1.0 + 1e-12):
            at_bound = True
            warning = (
                f"shape at lower bound {SHAPE_MIN:g}: data look heavier-tailed than any "
                "error law in range (or have many repeated values); treat tail figures "
                "with care"
            )
    return Fit(
        loc=float(loc),
        scale=float(scale),
        shape=float(shape),
        method=method,
        n=int(n),
        n_dropped=int(n_dropped),
        loglik=float(ll),
        aic=2.0 * N_PARAMS - 2.0 * ll,
        bic=N_PARAMS * math.log(n) - 2.0 * ll,
        at_bound=at_bound,
        warning=warning,
        ties=int(ties),
    )


def fit(
    data: Any,
    method: Literal["mle", "moments"] = "mle",
    *,
    start: Fit | float | None = None,
) -> Fit:
    """Fit the generalized normal law to data.

    Parameters
    ----------
    data : array_like
        Observations (1-D or 2-D, read row-major); NaN / blank entries are dropped.
    method : {"mle", "moments"}
        ``"mle"``: exact maximum likelihood, shape searched in [SHAPE_MIN, SHAPE_MAX]
        (profile likelihood; see :mod:`errdist.estimate.mle`).
        ``"moments"``: loc = MEDIAN, shape = :func:`solve_shape` (KURT),
        scale = :func:`solve_scale` (STDEV.S, shape) — the spreadsheet's own statistics, so
        a workbook doing the same by hand gets the same figures.
    start : Fit or float, optional
        Accepted for compatibility and checked (a shape > 0), but not used: the MLE search
        always starts from the moment shape and searches both shape regions, so its result
        cannot depend on a start. Ignored for moments.

    Returns
    -------
    Fit

    Raises
    ------
    InsufficientDataError
        Fewer than 4 numbers, or no spread.
    DomainError
        ±inf in the data; for ``"moments"``, a sample excess kurtosis ≤ −1.2.
    InputTypeError
        Unknown ``method`` or non-numeric data.
    """
    if method not in ("mle", "moments"):
        raise InputTypeError(f"method must be 'mle' or 'moments', got {method!r}")
    x, n_dropped = _clean(data, "data", 4, copy=False)  # read only below
    e = binary_exponent(x)
    if abs(e) > _RESCALE_BEYOND:
        # Data near 1e±300: fit x / 2**e (exact scaling) and scale the result back; the law is
        # a location-scale family, so loc and scale scale with the data, the shape does not,
        # and ln L drops by n·e·ln 2.
        f = fit(np.ldexp(x, -e), method=method, start=start)
        return _make_fit(
            math.ldexp(f.loc, e),
            math.ldexp(f.scale, e),
            f.shape,
            f.method,
            f.n,
            n_dropped,
            f.loglik - f.n * e * math.log(2.0),
        )
    n = x.size
    if method == "moments":
        k = _kurt(x)  # raises on zero spread
        if k <= -1.2:
            raise DomainError(
                f"sample excess kurtosis is {k:.6g} <= -1.2: no error distribution has "
                "kurtosis that low, so the moments fit is impossible; use the maximum-likelihood fit (method 'mle')"
            )
        shape = solve_shape(k)
        sd = _std(x, _mean(x))
        scale = solve_scale(sd, shape)
        loc = float(np.median(x))
        ties = int(n - np.unique(x).size)
        ll = _loglik(x, loc, scale, shape)
        return _make_fit(loc, scale, shape, "moments", n, n_dropped, ll, ties)
    xs = _sorted(x)
    if xs[0] == xs[-1]:
        _require_spread(xs, 0.0, "data")
    start_shape = start.shape if isinstance(start, Fit) else start
    if start_shape is not None:
        start_shape = float(start_shape)
        if not (math.isfinite(start_shape) and start_shape > 0.0):
            raise DomainError(f"start shape must be > 0, got {start_shape:g}")
    loc, scale, shape, ll = _mle_sorted(xs, start_shape)
    ties = int(np.count_nonzero(xs[1:] == xs[:-1]))
    loc_count = int(np.searchsorted(xs, loc, "right") - np.searchsorted(xs, loc, "left"))
    return _make_fit(loc, scale, shape, "mle", n, n_dropped, ll, ties, loc_count)
