r"""Backtesting Expected Shortfall: Acerbi & Szekely's :math:`Z_2` test.

With returns (P&L) :math:`X_t`, forecasts :math:`\mathrm{VaR}_t > 0` and
:math:`\mathrm{ES}_t > 0` at confidence :math:`c` (tail probability :math:`\alpha = 1-c`),
exceptions :math:`I_t = \mathbf 1[X_t + \mathrm{VaR}_t < 0]` and :math:`T` days:

.. math::

    Z_2 = \sum_{t=1}^{T} \frac{X_t I_t}{T\,\alpha\,\mathrm{ES}_t} + 1 .

If each day's forecast law is right, :math:`E[X_t I_t] = -\alpha\,\mathrm{ES}_t` and
:math:`E[Z_2] = 0`; an underestimated ES (or too many exceptions) makes :math:`Z_2` negative.
The test is one-sided: small :math:`Z_2` rejects.

p-value by simulation under the forecast laws (seeded): draw :math:`X_t^{(j)}` from day
:math:`t`'s forecast law :math:`\mu_t + \sigma_t Z` for every day, :math:`j = 1..M`, compute
:math:`Z_2^{(j)}` with the same VaR and ES columns, and report
:math:`p = (1 + \#\{Z_2^{(j)} \le Z_2\})/(M + 1)`. The draws are by inversion,
:math:`X = \mu_t + \sigma_t F^{-1}(U)`, and only days with :math:`U < F(-\mathrm{VaR}_t)`
(the exceptions, about 1 % of them) reach :math:`F^{-1}` — the only draws :math:`Z_2` uses.

Published thresholds (Acerbi & Szekely 2014, for :math:`\alpha = 2.5\%`, :math:`T = 250`,
found to vary little across the laws they tried; from memory): :math:`Z_2 < -0.70` rejects at
5 % and :math:`Z_2 < -1.8` at 0.01 %. They were tabulated for that :math:`\alpha` and
:math:`T`; at 99 % or over thousands of days use the simulation p-value.

Source: Acerbi, C. & Szekely, B. (2014) "Backtesting Expected Shortfall", Risk, December.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.risk.innovation_law import standardized_cdf, standardized_ppf

__all__ = ["Z2_CRITICAL_5", "Z2_CRITICAL_0_01", "EsBacktestResult", "es_backtest", "z2_statistic"]

#: Acerbi & Szekely (2014) 5 % threshold of Z2 (alpha 2.5 %, T = 250; from memory).
Z2_CRITICAL_5 = -0.70
#: Acerbi & Szekely (2014) 0.01 % threshold of Z2 (from memory).
Z2_CRITICAL_0_01 = -1.8


@dataclass(frozen=True)
class EsBacktestResult:
    """Acerbi-Szekely Z2 test of an ES forecast column.

    Attributes
    ----------
    statistic : float
        :math:`Z_2` (0 under a correct model; negative = ES too small).
    pvalue : float or None
        Simulation p-value (one-sided, lower tail); ``None`` without the forecast laws.
    n, exceptions : int
    confidence : float
    simulations : int
        Number of simulated paths (0 without the forecast laws).
    reject_5, reject_0_01 : bool
        :math:`Z_2` below the published thresholds -0.70 / -1.8 (from memory).
    warning : str
    """

    statistic: float
    pvalue: float | None
    n: int
    exceptions: int
    confidence: float
    simulations: int
    reject_5: bool
    reject_0_01: bool
    warning: str


def _column(name: str, values: ArrayLike) -> NDArray[np.float64]:
    try:
        arr = np.asarray(values, dtype=float).ravel()
    except (TypeError, ValueError) as exc:
        raise InputTypeError(f"{name} must be numbers") from exc
    if not np.all(np.isfinite(arr)):
        i = int(np.argmax(~np.isfinite(arr)))
        raise DomainError(f"{name} must be finite numbers; position {i + 1} is {arr[i]}")
    return arr


def z2_statistic(
    returns: NDArray[np.float64],
    var: NDArray[np.float64],
    es: NDArray[np.float64],
    alpha: float,
) -> Any:
    r""":math:`Z_2 = \sum_t X_t I_t / (T\alpha\,\mathrm{ES}_t) + 1`; ``returns`` may be 2-D
    (one path per row), then one statistic per row."""
    x = np.asarray(returns, dtype=float)
    hit = x + var < 0.0
    t = x.shape[-1]
    z = np.sum(np.where(hit, x / es, 0.0), axis=-1) / (t * alpha) + 1.0
    return float(z) if np.ndim(z) == 0 else z


def es_backtest(
    returns: ArrayLike,
    var: ArrayLike,
    es: ArrayLike,
    confidence: float,
    *,
    law: tuple[ArrayLike, ArrayLike, ArrayLike, ArrayLike] | None = None,
    simulations: int = 1000,
    seed: int = 20140101,
) -> EsBacktestResult:
    r"""Acerbi & Szekely's :math:`Z_2` test of one-day ES forecasts.

    Parameters
    ----------
    returns, var, es : array_like
        Realised returns and the day's VaR and ES forecasts (positive losses), same length,
        in time order, no blanks.
    confidence : float
        Confidence of the forecasts, e.g. 0.99 (:math:`\alpha = 1 - c`).
    law : (mean, std, shape, skew), optional
        Each day's forecast law :math:`\mu_t + \sigma_t Z` (:mod:`errdist.risk.innovation_law`);
        needed for the simulation p-value.
    simulations : int, default 1000
    seed : int, default 20140101
        Seed of the simulations (the p-value is reproducible).

    Returns
    -------
    EsBacktestResult
    """
    if isinstance(confidence, (str, bytes, bool)):
        raise InputTypeError(f"confidence must be a number, got {confidence!r}")
    c = float(confidence)
    if not 0.5 <= c < 1.0:
        raise DomainError(f"confidence must be a fraction in [0.5, 1) such as 0.99, got {c}")
    x = _column("returns", returns)
    v = _column("var", var)
    e = _column("es", es)
    if not (x.size == v.size == e.size):
        raise InputTypeError(
            f"returns, var and es must have the same length, got {x.size}, {v.size}, {e.size}"
        )
    if x.size < 2:
        raise InsufficientDataError(f"the ES backtest needs at least 2 days, got {x.size}")
    if np.any(e <= 0.0):
        i = int(np.argmax(e <= 0.0))
        raise DomainError(f"es must be positive losses; position {i + 1} is {e[i]}")
    alpha = 1.0 - c
    z2 = z2_statistic(x, v, e, alpha)
    hits = int(np.sum(x + v < 0.0))
    warning = ""
    if hits == 0:
        warning = "no exceptions: Z2 = 1 and the test has no power"
    pvalue: float | None = None
    sims = 0
    if law is not None:
        mean, std, shape, skew = (
            np.broadcast_to(_column(k, a), x.shape)
            for k, a in zip(("mean", "std", "shape", "skew"), law, strict=True)
        )
        sims = int(simulations)
        if sims < 1:
            raise DomainError(f"simulations must be at least 1, got {simulations}")
        rng = np.random.default_rng(seed)
        # P(X_t < -VaR_t) under day t's law; a draw X = mean + std * F^-1(U) is an exception
        # exactly when U < p_t, and only those draws enter Z2.
        p_hit = standardized_cdf((-v - mean) / std, shape, skew)
        below = 0
        chunk = max(1, min(sims, 2_000_000 // x.size))
        done = 0
        while done < sims:
            k = min(chunk, sims - done)
            u = rng.random((k, x.size))
            hit = u < p_hit
            rows, cols = np.nonzero(hit)
            z = standardized_ppf(u[rows, cols], shape[cols], skew[cols])
            contrib = (mean[cols] + std[cols] * z) / e[cols]
            z2_sim = np.bincount(rows, weights=contrib, minlength=k) / (x.size * alpha) + 1.0
            below += int(np.sum(z2_sim <= z2))
            done += k
        pvalue = (1.0 + below) / (sims + 1.0)
    return EsBacktestResult(
        statistic=z2,
        pvalue=pvalue,
        n=int(x.size),
        exceptions=hits,
        confidence=c,
        simulations=sims,
        reject_5=bool(z2 < Z2_CRITICAL_5),
        reject_0_01=bool(z2 < Z2_CRITICAL_0_01),
        warning=warning,
    )
