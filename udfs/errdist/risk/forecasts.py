r"""Rolling one-day VaR/ES forecasts without look-ahead, for four models.

Every forecast for day :math:`t` (0-based position in the returns) uses returns
:math:`r_0, \dots, r_{t-1}` only. Each model's forecast law of day :math:`t` is
:math:`\mu_t + \sigma_t Z`, :math:`Z` the standardized two-piece error law with shape
:math:`\nu_t` and skew :math:`\lambda_t` (:mod:`errdist.risk.innovation_law`); the result keeps the
four columns, so VaR, ES and the simulations of the ES backtest all come from the same law.

Models
------
``"symmetric"``
    The symmetric error law fitted every day by exact maximum likelihood to the ``window``
    returns before the day — the engine and figures of :func:`errdist.checks.rolling.rolling_var`
    (its VaR column is identical).
``"skewed"``
    The two-piece law fitted by maximum likelihood to the ``window`` returns before the day,
    refitted every ``refit`` days (the warm-started search
    ``errdist.law.skewed.fit_skewed(..., start=previous, method="local")``; see below).
``"ewma"``
    RiskMetrics EWMA variance (:func:`errdist.risk.conditional.ewma_variance`, daily); the law of
    the scaled returns :math:`r_s/\sigma_s` over the ``fit_window`` days before the refit day,
    refitted every ``refit`` days.

The law fits of "skewed" and "ewma" use the warm-started local search of the one skewed-law
fit, :func:`errdist.law.skewed.fit_skewed` with ``method="local"`` and the previous window's
fit as ``start`` (the first window gets the exact search): the exact search takes about
0.15 s at 250 points and 0.55 s at 1,000, too slow for ~200 refits per model within the
command's time budget. The local search is not certified global: on the arch.data index 2
windows it falls short of the exact fit in about one refit in seven, by at most about 1
log-likelihood unit (docs/backtesting.md).
``"gjr"`` / ``"garch"``
    GJR-GARCH(1,1) / GARCH(1,1) with the skewed law, estimated by ``arch`` on the
    ``fit_window`` returns before the refit day (warm start from the previous estimate) every
    ``refit`` days; between refits the variance is filtered daily by ``arch``'s fixed-parameter
    one-step forecasts (``forecast(params, start=..., reindex=False)``), each using the returns
    up to the day before.

All models start at the same day ``first = max(window, fit_window)`` so they are compared on
the same days.

About ``arch``'s fixed-parameter forecasts: the recursion starts at the estimation window's
first day from ``arch``'s backcast (an exponentially weighted mean of that window's first 75
squared residuals — all in the past). ``arch`` also computes loose safety bounds on the variance
(1e-8 x the sample variance to 1e7 x the largest square, over the data the model holds); they
never bind on return data and the no-look-ahead test changes future returns to confirm the
forecasts do not move.
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy import special as sc

from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.estimate.mle import _mle_sorted
from errdist.law.skewed import SkewedFit, fit_skewed
from errdist.risk.conditional import (
    EWMA_LAMBDA,
    EWMA_SEED_DAYS,
    _confidence,
    _lambda,
    data_scale,
    ewma_variance,
    fit_arch_quietly,
    gjr_model,
    law_risk,
)

__all__ = ["MODELS", "ForecastPath", "rolling_forecasts"]

#: Models known to :func:`rolling_forecasts`.
MODELS = ("symmetric", "skewed", "ewma", "gjr", "garch")

Progress = Callable[[str, int, int], None]


@dataclass(frozen=True)
class ForecastPath:
    """Rolling one-day forecasts of one model, aligned with the returns.

    Arrays have the returns' length; positions before ``first`` are NaN.

    Attributes
    ----------
    model : str
    confidence : float
    first : int
        0-based position of the first forecast.
    n : int
        Number of forecasts (``len(returns) - first``).
    refits : int
        Number of estimations made.
    mean, std, shape, skew : ndarray
        The forecast law :math:`\\mu_t + \\sigma_t Z` of each day.
    var, es : ndarray
        One-day VaR and ES (positive losses, return units).
    seconds : float
        Time taken.
    warning : str
        Empty, or estimation problems met (e.g. non-converged refits, shapes at bounds).
    """

    model: str
    confidence: float
    first: int
    n: int
    refits: int
    mean: NDArray[np.float64] = field(repr=False)
    std: NDArray[np.float64] = field(repr=False)
    shape: NDArray[np.float64] = field(repr=False)
    skew: NDArray[np.float64] = field(repr=False)
    var: NDArray[np.float64] = field(repr=False)
    es: NDArray[np.float64] = field(repr=False)
    seconds: float
    warning: str


def _whole(name: str, value: Any, minimum: int) -> int:
    if isinstance(value, (str, bytes, bool)) or value is None:
        raise InputTypeError(f"{name} must be a whole number, got {value!r}")
    v = float(value)
    if not (math.isfinite(v) and v.is_integer()):
        raise DomainError(f"{name} must be a whole number, got {value!r}")
    if v < minimum:
        raise DomainError(f"{name} must be at least {minimum}, got {int(v)}")
    return int(v)


def _returns(returns: ArrayLike) -> NDArray[np.float64]:
    from errdist.risk.conditional import clean_returns

    r, dropped = clean_returns(returns, minimum=2)
    if dropped:
        raise InputTypeError(
            f"the rolling forecasts need a gap-free series; {dropped} blank returns found"
        )
    return r


# --------------------------------------------------------------------------------------------
# the models
# --------------------------------------------------------------------------------------------
def _symmetric(r: NDArray[np.float64], first: int, window: int, tick: Progress) -> tuple:
    n = r.size
    m = np.full(n, np.nan)
    sd = np.full(n, np.nan)
    b = np.full(n, np.nan)
    for t in range(first, n):
        xs = np.sort(r[t - window : t])
        if xs[0] == xs[-1]:
            raise InsufficientDataError(
                f"the returns in the window before day {t + 1} are all equal: no spread to fit"
            )
        loc, scale, shape, _ = _mle_sorted(xs)
        m[t], b[t] = loc, shape
        sd[t] = scale * math.exp(0.5 * (sc.gammaln(3.0 / shape) - sc.gammaln(1.0 / shape)))
        if (t - first) % 250 == 0:
            tick("symmetric", t - first, n - first)
    return m, sd, b, np.where(np.isnan(b), np.nan, 0.0), n - first, ""


def _blocks(first: int, n: int, refit: int) -> list[tuple[int, int]]:
    return [(t0, min(t0 + refit, n)) for t0 in range(first, n, refit)]


def _skewed(r: NDArray[np.float64], first: int, window: int, refit: int, tick: Progress) -> tuple:
    n = r.size
    cols = [np.full(n, np.nan) for _ in range(4)]
    prev: SkewedFit | None = None
    bounds = 0
    blocks = _blocks(first, n, refit)
    for i, (t0, t1) in enumerate(blocks):
        f = fit_skewed(r[t0 - window : t0], start=prev, method="local")
        prev = f
        bounds += f.at_bound
        for col, v in zip(cols, (f.mean, f.std, f.shape, f.skew), strict=True):
            col[t0:t1] = v
        tick("skewed", i, len(blocks))
    warn = f"{bounds} of {len(blocks)} fits ended at a shape/skew bound" if bounds else ""
    return (*cols, len(blocks), warn)


def _ewma(
    r: NDArray[np.float64], first: int, fit_window: int, refit: int, lam: float, tick: Progress
) -> tuple:
    n = r.size
    sig = np.sqrt(ewma_variance(r, lam))[:n]  # sig[t] uses r[:t]
    z = r / sig
    cols = [np.full(n, np.nan) for _ in range(4)]
    prev: SkewedFit | None = None
    bounds = 0
    blocks = _blocks(first, n, refit)
    for i, (t0, t1) in enumerate(blocks):
        lo = max(EWMA_SEED_DAYS, t0 - fit_window)
        f = fit_skewed(z[lo:t0], start=prev, method="local")
        prev = f
        bounds += f.at_bound
        cols[0][t0:t1] = sig[t0:t1] * f.mean
        cols[1][t0:t1] = sig[t0:t1] * f.std
        cols[2][t0:t1] = f.shape
        cols[3][t0:t1] = f.skew
        tick("ewma", i, len(blocks))
    warn = f"{bounds} of {len(blocks)} fits ended at a shape/skew bound" if bounds else ""
    return (*cols, len(blocks), warn)


def gjr_path(
    r: NDArray[np.float64],
    first: int,
    fit_window: int,
    refit: int,
    *,
    asymmetric: bool = True,
    mean: str = "constant",
    model_factory: Callable[[NDArray[np.float64]], Any] | None = None,
    tick: Progress | None = None,
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], int, list[str]]:
    """Daily conditional mean and standard deviation of a refitted ``arch`` model.

    Returns ``(mean, std, dist_params, refits, warnings)``; ``dist_params`` has one row per
    day with the innovation law's parameters in force that day (NaN before ``first``).
    ``model_factory(y)`` builds the ``arch`` model of the scaled returns ``y`` (default:
    :func:`errdist.risk.conditional.gjr_model` with errdist's skewed law) — the benchmark passes
    ``arch``'s skew-t model through it to run the identical protocol.
    """
    n = r.size
    s = data_scale(r[:first])
    y = r * s
    model = (
        model_factory(y)
        if model_factory is not None
        else gjr_model(y, asymmetric=asymmetric, mean=mean)
    )
    mu = np.full(n, np.nan)
    sd = np.full(n, np.nan)
    k_dist = model.distribution.num_params
    dist = np.full((n, k_dist), np.nan)
    start_values: NDArray[np.float64] | None = None
    warns: list[str] = []
    blocks = _blocks(first, n, refit)
    for i, (t0, t1) in enumerate(blocks):
        res, warn = fit_arch_quietly(
            model, first_obs=t0 - fit_window, last_obs=t0, starting_values=start_values
        )
        if warn:
            # a cold start sometimes recovers what a warm start missed
            res2, warn2 = fit_arch_quietly(model, first_obs=t0 - fit_window, last_obs=t0)
            if not warn2 or res2.loglikelihood > res.loglikelihood:
                res, warn = res2, warn2
        if warn:
            warns.append(f"day {t0 + 1}: {warn}")
        params = np.asarray(res.params, dtype=float)
        start_values = params
        fc = model.forecast(params, horizon=1, start=t0 - 1, reindex=False)
        v = np.asarray(fc.variance, dtype=float)[: t1 - t0, 0]
        m = np.asarray(fc.mean, dtype=float)[: t1 - t0, 0]
        sd[t0:t1] = np.sqrt(v) / s
        mu[t0:t1] = m / s
        dist[t0:t1] = params[len(params) - k_dist :]
        if tick is not None:
            tick("gjr" if asymmetric else "garch", i, len(blocks))
    return mu, sd, dist, len(blocks), warns


# --------------------------------------------------------------------------------------------
# entry point
# --------------------------------------------------------------------------------------------
def rolling_forecasts(
    returns: ArrayLike,
    model: str,
    confidence: float = 0.99,
    *,
    window: int = 250,
    fit_window: int = 1000,
    refit: int = 21,
    lam: float = EWMA_LAMBDA,
    first: int | None = None,
    progress: Progress | None = None,
) -> ForecastPath:
    """Rolling one-day VaR/ES forecasts of one model, without look-ahead.

    Parameters
    ----------
    returns : array_like
        Daily returns, oldest first, without blanks.
    model : {"symmetric", "skewed", "ewma", "gjr", "garch"}
    confidence : float, default 0.99
    window : int, default 250
        Past days each unconditional fit ("symmetric", "skewed") uses.
    fit_window : int, default 1000
        Past days each conditional estimation ("ewma" law, "gjr"/"garch") uses.
    refit : int, default 21
        Days between estimations ("skewed", "ewma", "gjr", "garch"; "symmetric" refits
        daily like :func:`errdist.checks.rolling.rolling_var`).
    lam : float, default 0.94
        EWMA decay factor.
    first : int, optional
        0-based position of the first forecast; default ``max(window, fit_window)``. Must be
        at least that.
    progress : callable, optional
        ``progress(model, done, total)`` called as the work advances.

    Returns
    -------
    ForecastPath
    """
    if not isinstance(model, str) or model.strip().lower() not in MODELS:
        raise InputTypeError(f"model must be one of {', '.join(MODELS)}; got {model!r}")
    model = model.strip().lower()
    c = _confidence(confidence)
    r = _returns(returns)
    window = _whole("window", window, 20)
    fit_window = _whole("fit_window", fit_window, 250)
    refit = _whole("refit", refit, 1)
    lam = _lambda(lam)
    need = max(window, fit_window)
    first = need if first is None else _whole("first", first, need)
    if first >= r.size:
        raise InsufficientDataError(
            f"{r.size} returns leave no day to forecast: the first forecast needs "
            f"{first} earlier returns (window {window}, fit window {fit_window})"
        )

    def tick(name: str, done: int, total: int) -> None:
        if progress is not None:
            progress(name, done, total)

    t_start = time.perf_counter()
    n = r.size
    if model == "symmetric":
        m, sd, b, lam_col, refits, warn = _symmetric(r, first, window, tick)
    elif model == "skewed":
        m, sd, b, lam_col, refits, warn = _skewed(r, first, window, refit, tick)
    elif model == "ewma":
        m, sd, b, lam_col, refits, warn = _ewma(r, first, fit_window, refit, lam, tick)
    else:
        m, sd, dist, refits, warns = gjr_path(
            r, first, fit_window, refit, asymmetric=model == "gjr", tick=tick
        )
        b, lam_col = dist[:, 0], dist[:, 1]
        warn = ""
        if warns:
            warn = f"{len(warns)} of {refits} estimations did not converge cleanly ({warns[0]})"
    var = np.full(n, np.nan)
    es = np.full(n, np.nan)
    sl = slice(first, n)
    var[sl], es[sl] = law_risk(c, m[sl], sd[sl], b[sl], lam_col[sl])
    return ForecastPath(
        model=model,
        confidence=c,
        first=first,
        n=n - first,
        refits=refits,
        mean=m,
        std=sd,
        shape=b,
        skew=lam_col,
        var=var,
        es=es,
        seconds=time.perf_counter() - t_start,
        warning=warn,
    )
