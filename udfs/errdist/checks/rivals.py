"""Rival laws for returns: normal, Laplace, Student t and Cauchy fits, and :func:`compare`.

Each rival is fitted by maximum likelihood and set beside the generalized normal (GN) fit of
:func:`errdist.estimate.fit` with its log-likelihood, AIC, BIC, Kolmogorov–Smirnov distance and
the one-day 99% value at risk it implies.

Maximum-likelihood estimators
-----------------------------
normal
    closed form: loc = sample mean, scale = σ = sqrt(mean((x - mean)²)) (divisor n, not n-1).
Laplace
    closed form: loc = sample median, scale = mean |x - median| (Norton, R.M. (1984) "The double
    exponential distribution: using calculus to find a maximum likelihood estimator",
    The American Statistician 38(2):135–136).
Student t (loc, scale, degrees of freedom ν)
    numerical: for each ν on a grid, EM iterations for (loc, scale) with weights
    ``(ν+1)/(ν + r²)`` (Liu, C. & Rubin, D.B. (1995) "ML estimation of the t distribution using
    EM and its extensions, ECM and ECME", Statistica Sinica 5:19–39); the best grid point then
    starts a bounded quasi-Newton search (L-BFGS-B, analytic gradient) over (loc, log scale,
    log ν), ν in [0.05, 1e12]; the near-normal limit ν = 1e12 started from the normal
    fit is tried as well, since the likelihood is almost flat in ν there.
Cauchy (loc, scale)
    numerical: the same EM with ν = 1 from (median, half the interquartile range), then
    L-BFGS-B over (loc, log scale).

AIC = 2k - 2 ln L, BIC = k ln n - 2 ln L (Akaike 1974; Schwarz 1978) with k = 2 (normal,
Laplace, Cauchy) or 3 (Student t, GN) parameters.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike, NDArray
from scipy import optimize, special, stats

from errdist import estimate as _est
from errdist.checks.goodness import kolmogorov_smirnov
from errdist.errors import InsufficientDataError
from errdist.estimate.sample_stats import binary_exponent
from errdist.law import symmetric as _dist
from errdist.risk import value_at_risk

__all__ = [
    "COLUMNS",
    "LAWS",
    "RivalFit",
    "compare",
    "fit_cauchy",
    "fit_laplace",
    "fit_normal",
    "fit_student_t",
]

#: Law names in the order they are fitted (the table is then sorted by AIC).
LAWS: tuple[str, ...] = ("generalized normal", "normal", "Laplace", "Student t", "Cauchy")

#: Columns of the table returned by :func:`compare`.
COLUMNS: tuple[str, ...] = (
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
)

_DF_MIN, _DF_MAX = 0.05, 1.0e12
_DF_GRID = (0.5, 1.0, 2.0, 3.0, 4.0, 6.0, 10.0, 20.0, 50.0, 200.0)


@dataclass(frozen=True)
class RivalFit:
    """Maximum-likelihood fit of one law.

    ``shape_or_df`` is the GN shape for the generalized normal, the degrees of freedom for
    Student t and NaN for the two-parameter laws; ``k`` is the number of fitted parameters;
    ``at_bound`` is true when the shape (GN) or the degrees of freedom (Student t) stopped at
    the edge of its search range, so the maximum may lie beyond it.
    """

    law: str
    loc: float
    scale: float
    shape_or_df: float
    loglik: float
    k: int
    at_bound: bool = False


# --------------------------------------------------------------------------------------------
# Closed-form fits
# --------------------------------------------------------------------------------------------


def fit_normal(x: NDArray[np.float64]) -> RivalFit:
    """Normal MLE: mean and the divisor-n standard deviation; ln L = -n/2 (ln(2πσ²) + 1)."""
    n = x.size
    m = float(np.mean(x))
    s = float(np.sqrt(np.mean((x - m) ** 2)))
    _positive_spread(s)
    ll = -0.5 * n * (math.log(2.0 * math.pi * s * s) + 1.0)
    return RivalFit("normal", m, s, math.nan, ll, 2)


def fit_laplace(x: NDArray[np.float64]) -> RivalFit:
    """Laplace MLE: median and mean absolute deviation from it; ln L = -n (ln(2b) + 1)."""
    n = x.size
    m = float(np.median(x))
    b = float(np.mean(np.abs(x - m)))
    _positive_spread(b)
    ll = -n * (math.log(2.0 * b) + 1.0)
    return RivalFit("Laplace", m, b, math.nan, ll, 2)


# --------------------------------------------------------------------------------------------
# Student t and Cauchy
# --------------------------------------------------------------------------------------------


def _t_const(nu: float) -> float:
    """ln Γ((ν+1)/2) - ln Γ(ν/2) - ½ ln(νπ), written as -½ ln ν - ln B(ν/2, ½) so that it
    keeps full precision for very large ν (no difference of two huge log-gammas)."""
    return -0.5 * math.log(nu) - float(special.betaln(0.5 * nu, 0.5))


def _t_loglik(x: NDArray[np.float64], m: float, s: float, nu: float) -> float:
    r = np.abs((x - m) / s)
    n = x.size
    c = _t_const(nu)
    # ln(1 + r²/ν); beyond r = 1e150 (r² would overflow) it is 2 ln r - ln ν to double precision
    with np.errstate(over="ignore"):
        lg = np.where(r < 1e150, np.log1p(r * r / nu), 2.0 * np.log(r) - math.log(nu))
    return float(n * (c - math.log(s)) - 0.5 * (nu + 1.0) * np.sum(lg))


def _t_em(x: NDArray[np.float64], m: float, s: float, nu: float, iters: int) -> tuple[float, float]:
    """EM updates of (loc, scale) of the t law for fixed ν (Liu & Rubin 1995)."""
    for _ in range(iters):
        r = (x - m) / s
        with np.errstate(over="ignore"):
            w = (nu + 1.0) / (nu + r * r)
        m = float(np.sum(w * x) / np.sum(w))
        # s² = Σ w r² / n in units of the previous s, with w r² = (ν+1) / (ν/r² + 1), so a far
        # outlier (r² = inf) adds ν+1 instead of 0·inf = NaN
        with np.errstate(divide="ignore", over="ignore"):
            r2 = ((x - m) / s) ** 2
            wr2 = (nu + 1.0) / (nu / r2 + 1.0)
        s = s * float(math.sqrt(np.sum(wr2) / x.size))
        if not s > 0:
            raise InsufficientDataError("the data have no spread; a scale cannot be fitted")
    return m, s


def _t_negll(
    theta: NDArray[np.float64], x: NDArray[np.float64], m0: float, s0: float, fix_nu: float | None
) -> tuple[float, NDArray[np.float64]]:
    """Negative t log-likelihood and gradient in (u, v[, w]) with m = m0 + s0·u,
    s = s0·e^v, ν = e^w (or ν fixed)."""
    m = m0 + s0 * theta[0]
    v = theta[1]
    s = s0 * math.exp(v)
    nu = fix_nu if fix_nu is not None else math.exp(theta[2])
    n = x.size
    r = (x - m) / s
    r2 = r * r
    q = nu + r2
    lg = np.log1p(r2 / nu)
    c = _t_const(nu)
    ll = n * (c - math.log(s)) - 0.5 * (nu + 1.0) * np.sum(lg)
    d_m = (nu + 1.0) * np.sum(r / q) / s
    d_v = -n + (nu + 1.0) * np.sum(r2 / q)
    grad = [-(s0 * d_m), -d_v]
    if fix_nu is None:
        d_nu = (
            0.5 * n * (special.digamma(0.5 * (nu + 1.0)) - special.digamma(0.5 * nu) - 1.0 / nu)
            - 0.5 * np.sum(lg)
            + 0.5 * (nu + 1.0) * np.sum(r2 / (nu * q))
        )
        grad.append(-(nu * d_nu))
    return float(-ll), np.asarray(grad, dtype=float)


def _polish(
    x: NDArray[np.float64], m: float, s: float, nu: float, fix_nu: float | None
) -> tuple[float, float, float]:
    """L-BFGS-B from (m, s, ν); keeps the start when the search does not improve on it."""
    theta0 = [0.0, 0.0] if fix_nu is not None else [0.0, 0.0, math.log(nu)]
    bounds = [(None, None), (-30.0, 30.0)]
    if fix_nu is None:
        bounds.append((math.log(_DF_MIN), math.log(_DF_MAX)))
    fun: Callable[..., tuple[float, NDArray[np.float64]]] = _t_negll
    # a far outlier makes r² overflow to inf in some trial steps: their -ln L is inf, which
    # the optimizer rejects; the warning is expected there
    with np.errstate(over="ignore", invalid="ignore"):
        res = optimize.minimize(
            fun,
            np.asarray(theta0),
            args=(x, m, s, fix_nu),
            jac=True,
            method="L-BFGS-B",
            bounds=bounds,
            options={"ftol": 1e-15, "gtol": 1e-10, "maxiter": 500},
        )
        start_nll = fun(np.asarray(theta0), x, m, s, fix_nu)[0]
    if not (np.isfinite(res.fun) and res.fun <= start_nll):
        return m, s, nu
    m1 = m + s * float(res.x[0])
    s1 = s * math.exp(float(res.x[1]))
    nu1 = fix_nu if fix_nu is not None else math.exp(float(res.x[2]))
    return m1, s1, nu1


def _robust_start(x: NDArray[np.float64]) -> tuple[float, float]:
    m = float(np.median(x))
    q75, q25 = np.percentile(x, [75.0, 25.0])
    half_iqr = 0.5 * float(q75 - q25)
    if not half_iqr > 0:
        half_iqr = float(np.mean(np.abs(x - m)))
    _positive_spread(half_iqr)
    return m, half_iqr


def fit_student_t(x: NDArray[np.float64]) -> RivalFit:
    """Student t MLE (loc, scale, degrees of freedom); see the module docstring."""
    m0, half_iqr = _robust_start(x)
    best: tuple[float, float, float, float] | None = None
    for nu in _DF_GRID:
        s_start = half_iqr / float(stats.t.ppf(0.75, nu))
        m, s = _t_em(x, m0, s_start, nu, iters=25)
        ll = _t_loglik(x, m, s, nu)
        if best is None or ll > best[0]:
            best = (ll, m, s, nu)
    assert best is not None
    _, m, s, nu = best
    m, s, nu = _polish(x, m, s, nu, fix_nu=None)
    ll = _t_loglik(x, m, s, nu)
    # the near-normal end: ν at its bound, (loc, scale) by EM from the normal fit
    m_n = float(np.mean(x))
    s_n = float(np.sqrt(np.mean((x - m_n) ** 2)))
    m_n, s_n = _t_em(x, m_n, s_n, _DF_MAX, iters=3)
    ll_n = _t_loglik(x, m_n, s_n, _DF_MAX)
    if ll_n > ll:
        m, s, nu, ll = m_n, s_n, _DF_MAX, ll_n
    at_bound = not (_DF_MIN * (1 + 1e-9) < nu < _DF_MAX * (1 - 1e-9))
    return RivalFit("Student t", m, s, nu, ll, 3, at_bound)


def fit_cauchy(x: NDArray[np.float64]) -> RivalFit:
    """Cauchy MLE (loc, scale): EM from (median, half IQR), then L-BFGS-B."""
    m, s = _robust_start(x)
    m, s = _t_em(x, m, s, 1.0, iters=50)
    m, s, _ = _polish(x, m, s, 1.0, fix_nu=1.0)
    return RivalFit("Cauchy", m, s, math.nan, _t_loglik(x, m, s, 1.0), 2)


def fit_generalized_normal(x: NDArray[np.float64]) -> RivalFit:
    """GN maximum-likelihood fit through :func:`errdist.estimate.fit`."""
    f = _est.fit(x, method="mle")
    return RivalFit("generalized normal", f.loc, f.scale, f.shape, float(f.loglik), 3, f.at_bound)


# --------------------------------------------------------------------------------------------
# The comparison table
# --------------------------------------------------------------------------------------------


def _cdf(fit: RivalFit, x: NDArray[np.float64]) -> NDArray[np.float64]:
    if fit.law == "generalized normal":
        return np.asarray(_dist.cdf(x, fit.loc, fit.scale, fit.shape_or_df), dtype=float)
    if fit.law == "normal":
        return stats.norm.cdf(x, fit.loc, fit.scale)
    if fit.law == "Laplace":
        return stats.laplace.cdf(x, fit.loc, fit.scale)
    if fit.law == "Student t":
        return stats.t.cdf(x, fit.shape_or_df, fit.loc, fit.scale)
    return stats.cauchy.cdf(x, fit.loc, fit.scale)


def _var99(fit: RivalFit) -> float:
    """One-day 99% VaR as a positive loss: -F⁻¹(0.01) (GN: :func:`errdist.risk.value_at_risk`)."""
    p = 0.01
    if fit.law == "generalized normal":
        return float(value_at_risk(0.99, fit.loc, fit.scale, fit.shape_or_df))
    if fit.law == "normal":
        q = stats.norm.ppf(p, fit.loc, fit.scale)
    elif fit.law == "Laplace":
        q = stats.laplace.ppf(p, fit.loc, fit.scale)
    elif fit.law == "Student t":
        q = stats.t.ppf(p, fit.shape_or_df, fit.loc, fit.scale)
    else:
        q = stats.cauchy.ppf(p, fit.loc, fit.scale)
    return -float(q)


def compare(data: ArrayLike) -> pd.DataFrame:
    """Fit the GN law and its rivals by maximum likelihood and tabulate them.

    Parameters
    ----------
    data : array_like
        Returns; NaN dropped (:func:`errdist.estimate.clean_sample`), at least 4 values.

    Returns
    -------
    pandas.DataFrame
        One row per law (generalized normal, normal, Laplace, Student t, Cauchy), sorted by
        AIC ascending (best first), columns :data:`COLUMNS`:

        ``law``; ``loc``; ``scale`` (GN scale a, normal σ, Laplace b, t scale, Cauchy γ);
        ``shape_or_df`` (GN shape b, Student t degrees of freedom ν, NaN otherwise);
        ``loglik`` (maximised ln L); ``aic`` = 2k - 2 ln L; ``bic`` = k ln n - 2 ln L;
        ``ks`` = sup |F_n - F| (Kolmogorov–Smirnov distance of the fitted law);
        ``var99`` = -F⁻¹(0.01), the one-day 99% value at risk as a positive loss;
        ``at_bound`` (bool): the shape or degrees of freedom stopped at its search bound.
    """
    x, _ = _est.clean_sample(data, name="data")
    x = np.sort(x)
    n = x.size
    if not np.ptp(x) > 0:
        raise InsufficientDataError("the data have no spread; no law can be fitted")
    # Data near 1e±300 (or one huge outlier) would overflow squares and sums: fit y = x / 2**e
    # (exact scaling) and scale back. Every law here is a location-scale family: loc, scale
    # and VaR scale with the data, the shape/df and the KS distance do not, ln L drops by
    # n·e·ln 2.
    e = binary_exponent(x)
    e = e if abs(e) > 200 else 0
    y = np.ldexp(x, -e) if e else x
    shift = n * e * math.log(2.0)
    fits = [
        fit_generalized_normal(y),
        fit_normal(y),
        fit_laplace(y),
        fit_student_t(y),
        fit_cauchy(y),
    ]
    rows = []
    for f in fits:
        loglik = f.loglik - shift
        rows.append(
            {
                "law": f.law,
                "loc": math.ldexp(f.loc, e),
                "scale": math.ldexp(f.scale, e),
                "shape_or_df": f.shape_or_df,
                "loglik": loglik,
                "aic": 2.0 * f.k - 2.0 * loglik,
                "bic": f.k * math.log(n) - 2.0 * loglik,
                "ks": float(kolmogorov_smirnov(_cdf(f, y))),
                "var99": math.ldexp(_var99(f), e),
                "at_bound": bool(f.at_bound),
            }
        )
    table = pd.DataFrame(rows, columns=list(COLUMNS))
    return table.sort_values("aic", kind="stable").reset_index(drop=True)


def _positive_spread(s: float) -> None:
    if not s > 0:
        raise InsufficientDataError("the data have no spread; a scale cannot be fitted")
