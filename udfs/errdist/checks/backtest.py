r"""Backtesting Value-at-Risk forecasts: coverage tests and traffic-light zones.

Conventions
-----------
* An **exception** (a "hit") is a day whose loss exceeds the VaR forecast for that day:
  ``return < -VaR`` (strictly). VaR is a positive loss, as in :mod:`errdist.risk`.
* ``confidence`` is the VaR confidence as a fraction (0.99); the exception probability under a
  correct model is :math:`p = 1 - c`.
* Likelihood-ratio terms use :math:`0 \cdot \ln 0 = 0` (``scipy.special.xlogy``), so zero
  exceptions, all exceptions and transition tables with empty cells are all handled.

Tests
-----
Kupiec (1995) proportion of failures, :math:`x` exceptions in :math:`n` days,
:math:`\hat p = x/n`:

.. math::

    LR_{POF} = -2\ln\frac{(1-p)^{n-x} p^x}{(1-\hat p)^{n-x}\hat p^x} \sim \chi^2(1).

Christoffersen (1998) independence, with :math:`n_{ij}` the number of days in state :math:`j`
following a day in state :math:`i` (1 = exception), :math:`\hat\pi_{01} = n_{01}/(n_{00}+n_{01})`,
:math:`\hat\pi_{11} = n_{11}/(n_{10}+n_{11})`, :math:`\hat\pi = (n_{01}+n_{11})/(n-1)`:

.. math::

    LR_{IND} = -2\ln\frac{(1-\hat\pi)^{n_{00}+n_{10}}\hat\pi^{n_{01}+n_{11}}}
        {(1-\hat\pi_{01})^{n_{00}}\hat\pi_{01}^{n_{01}}(1-\hat\pi_{11})^{n_{10}}\hat\pi_{11}^{n_{11}}}
        \sim \chi^2(1),
    \qquad LR_{CC} = LR_{POF} + LR_{IND} \sim \chi^2(2).

(:math:`LR_{POF}` uses all :math:`n` days, :math:`LR_{IND}` the :math:`n-1` transitions — the
usual way of adding them, common practice, no source.)

Sources: Kupiec, P. (1995) "Techniques for verifying the accuracy of risk measurement models",
J. Derivatives 3(2):73-84. Christoffersen, P. (1998) "Evaluating interval forecasts",
International Economic Review 39(4):841-862. Basel Committee on Banking Supervision (1996)
"Supervisory framework for the use of 'backtesting' in conjunction with the internal models
approach to market risk capital requirements" (traffic-light zones; plus factors from memory).
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy import stats
from scipy.special import xlogy

from errdist._validate import check_confidence
from errdist._validate import fmt_number as _fmt
from errdist.errors import DomainError, InputTypeError, InsufficientDataError

__all__ = [
    "BCBS_PLUS_FACTORS",
    "BacktestResult",
    "ChristoffersenResult",
    "LRTest",
    "TrafficLight",
    "backtest",
    "christoffersen",
    "kupiec",
    "traffic_light",
]

#: Green / yellow boundaries of the cumulative binomial probability (BCBS 1996): green while
#: P(X <= exceptions) < 95 %, yellow while < 99.99 %, red from 99.99 %.
GREEN_BELOW = 0.95
YELLOW_BELOW = 0.9999

#: BCBS (1996) plus factors for 250 observations at 99 % (from memory): exceptions -> factor.
#: Green (0-4) adds 0.00, red (10 or more) adds 1.00.
BCBS_PLUS_FACTORS: dict[int, float] = {5: 0.40, 6: 0.50, 7: 0.65, 8: 0.75, 9: 0.85}


# --------------------------------------------------------------------------------------------
# results
# --------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class LRTest:
    """A likelihood-ratio statistic with its chi-squared p-value."""

    statistic: float
    pvalue: float
    df: int


@dataclass(frozen=True)
class ChristoffersenResult:
    """Christoffersen's tests: unconditional coverage (Kupiec POF), independence, both."""

    pof: LRTest
    independence: LRTest
    conditional_coverage: LRTest
    n00: int
    n01: int
    n10: int
    n11: int


@dataclass(frozen=True)
class TrafficLight:
    """Basel traffic-light zone of an exception count.

    ``plus_factor`` is the BCBS (1996) table value for 250 observations at 99 % (from memory);
    it is ``None`` for other sample sizes or confidences, where the table does not apply.
    """

    zone: str
    plus_factor: float | None
    cumulative_probability: float
    exceptions: int
    n: int
    confidence: float

    @property
    def observations(self) -> int:
        """Deprecated alias of :attr:`n` (kept for one release)."""
        _deprecated("TrafficLight.observations", "n")
        return self.n


@dataclass(frozen=True)
class BacktestResult:
    """Everything :func:`backtest` measures.

    Attributes
    ----------
    n : int
        Pairs (return, VaR forecast) used (observation count).
    exceptions : int
        Days with ``return < -VaR``.
    expected : float
        ``n * (1 - confidence)``.
    n_dropped : int
        Pairs dropped because the return or the forecast was blank / NaN.
    confidence : float
        The VaR confidence tested.
    pof, independence, conditional_coverage : LRTest
        Kupiec's and Christoffersen's likelihood-ratio tests.
    zone, plus_factor, cumulative_probability
        The traffic light (see :class:`TrafficLight`).
    hits : numpy.ndarray
        The exception indicator (0/1) of the pairs used, in order.
    """

    n: int
    exceptions: int
    expected: float
    n_dropped: int
    confidence: float
    pof: LRTest
    independence: LRTest
    conditional_coverage: LRTest
    zone: str
    plus_factor: float | None
    cumulative_probability: float
    hits: NDArray[np.int8] = field(repr=False)

    @property
    def observations(self) -> int:
        """Deprecated alias of :attr:`n` (kept for one release)."""
        _deprecated("BacktestResult.observations", "n")
        return self.n

    @property
    def dropped(self) -> int:
        """Deprecated alias of :attr:`n_dropped` (kept for one release)."""
        _deprecated("BacktestResult.dropped", "n_dropped")
        return self.n_dropped

    def rows(self) -> list[tuple[str, float | int | str | None]]:
        """The result as (label, value) rows, in the order of the worksheet table."""
        return [
            ("observations", self.n),
            ("exceptions", self.exceptions),
            ("expected exceptions", self.expected),
            ("pairs dropped", self.n_dropped),
            ("LR POF (Kupiec)", self.pof.statistic),
            ("p-value POF", self.pof.pvalue),
            ("LR IND (Christoffersen)", self.independence.statistic),
            ("p-value IND", self.independence.pvalue),
            ("LR CC (Christoffersen)", self.conditional_coverage.statistic),
            ("p-value CC", self.conditional_coverage.pvalue),
            ("zone", self.zone),
            ("plus factor", self.plus_factor),
        ]


def _deprecated(old: str, new: str) -> None:
    warnings.warn(
        f"{old} is deprecated; use .{new} (the same name as in Fit and GofResult)",
        DeprecationWarning,
        stacklevel=3,
    )


# --------------------------------------------------------------------------------------------
# validation helpers
# --------------------------------------------------------------------------------------------
def _confidence(confidence: Any) -> float:
    return check_confidence(confidence)


def _count(name: str, value: Any, minimum: int = 0) -> int:
    if isinstance(value, (str, bytes, bool)) or value is None:
        raise InputTypeError(f"{name} must be a whole number, got {value!r}")
    try:
        f = float(value)
    except (TypeError, ValueError) as exc:
        raise InputTypeError(f"{name} must be a whole number, got {value!r}") from exc
    if not (math.isfinite(f) and f.is_integer()):
        raise DomainError(f"{name} must be a whole number, got {_fmt(f)}")
    if f < minimum:
        raise DomainError(f"{name} must be >= {minimum}, got {_fmt(f)}")
    return int(f)


def _numeric_column(name: str, values: Any) -> NDArray[np.float64]:
    """Values as a 1-D float array (row-major); None -> NaN; text -> InputTypeError."""
    if isinstance(values, (str, bytes)):
        raise InputTypeError(f"{name} must be numbers, got text {values!r}")
    arr = np.asarray(values, dtype=object) if not isinstance(values, np.ndarray) else values
    if arr.dtype == object:
        flat = arr.ravel()
        out = np.empty(flat.size)
        for i, v in enumerate(flat):
            if v is None:
                out[i] = math.nan
            elif isinstance(v, (str, bytes, bool)):
                raise InputTypeError(f"{name} must be numbers, got {v!r} at position {i + 1}")
            else:
                try:
                    out[i] = float(v)
                except (TypeError, ValueError) as exc:
                    raise InputTypeError(
                        f"{name} must be numbers, got {v!r} at position {i + 1}"
                    ) from exc
        return out
    try:
        out = np.asarray(arr, dtype=np.float64).ravel()
    except (TypeError, ValueError) as exc:
        raise InputTypeError(f"{name} must be numbers") from exc
    return out


def _no_infinity(name: str, arr: NDArray[np.float64]) -> None:
    bad = np.isinf(arr)
    if np.any(bad):
        i = int(np.argmax(bad))
        raise DomainError(f"{name} must be finite, got {_fmt(arr[i])} at position {i + 1}")


def _chi2_sf(stat: float, df: int) -> float:
    return float(stats.chi2.sf(max(stat, 0.0), df))


# --------------------------------------------------------------------------------------------
# tests
# --------------------------------------------------------------------------------------------
def _lr_pof(x: int, n: int, p: float) -> float:
    phat = x / n
    restricted = xlogy(n - x, 1.0 - p) + xlogy(x, p)
    free = xlogy(n - x, 1.0 - phat) + xlogy(x, phat)
    return max(float(-2.0 * (restricted - free)), 0.0)


def kupiec(exceptions: int, observations: int, confidence: float) -> LRTest:
    r"""Kupiec's proportion-of-failures (POF) likelihood-ratio test.

    .. math::

        LR_{POF} = -2\left[(n-x)\ln(1-p) + x\ln p - (n-x)\ln(1-\hat p) - x\ln\hat p\right],
        \quad \hat p = x/n,\ p = 1 - c,

    asymptotically :math:`\chi^2(1)` under a correct VaR model (Kupiec 1995, J. Derivatives
    3(2):73-84). :math:`0\ln 0 = 0`.

    Parameters
    ----------
    exceptions : int
        Number of exceptions :math:`x`, ``0 <= x <= observations``.
    observations : int
        Number of days :math:`n \ge 1`.
    confidence : float
        VaR confidence in (0, 1).

    Returns
    -------
    LRTest
        ``statistic``, ``pvalue`` (chi-squared, 1 degree of freedom), ``df = 1``.
    """
    c = _confidence(confidence)
    n = _count("observations", observations, 1)
    x = _count("exceptions", exceptions, 0)
    if x > n:
        raise DomainError(f"exceptions ({x}) cannot exceed observations ({n})")
    stat = _lr_pof(x, n, 1.0 - c)
    return LRTest(stat, _chi2_sf(stat, 1), 1)


def _hits_array(hits: Any) -> NDArray[np.int8]:
    arr = _numeric_column("hits", hits)
    if np.any(np.isnan(arr)):
        i = int(np.argmax(np.isnan(arr)))
        raise InputTypeError(f"hits must be 0 or 1, got a blank at position {i + 1}")
    bad = (arr != 0.0) & (arr != 1.0)
    if np.any(bad):
        i = int(np.argmax(bad))
        raise DomainError(f"hits must be 0 or 1, got {_fmt(arr[i])} at position {i + 1}")
    if arr.size < 2:
        raise InsufficientDataError(
            f"the independence test needs at least 2 days of hits, got {arr.size}"
        )
    return arr.astype(np.int8)


def christoffersen(hits: ArrayLike, confidence: float) -> ChristoffersenResult:
    r"""Christoffersen's independence and conditional-coverage likelihood-ratio tests.

    First-order Markov alternative: the hit probability may depend on whether the previous
    day was a hit. With transition counts :math:`n_{ij}` (state :math:`i` then :math:`j`) the
    independence statistic :math:`LR_{IND}` (formula in the module docstring) is
    :math:`\chi^2(1)`; :math:`LR_{CC} = LR_{POF} + LR_{IND}` is :math:`\chi^2(2)`
    (Christoffersen 1998, International Economic Review 39(4):841-862).

    Parameters
    ----------
    hits : array_like of 0/1
        Exception indicator per day, in time order (at least 2 days).
    confidence : float
        VaR confidence in (0, 1).

    Returns
    -------
    ChristoffersenResult
        ``pof`` (Kupiec, on all days), ``independence``, ``conditional_coverage`` and the
        transition counts ``n00, n01, n10, n11``.
    """
    c = _confidence(confidence)
    h = _hits_array(hits)
    prev, curr = h[:-1], h[1:]
    n01 = int(np.sum((prev == 0) & (curr == 1)))
    n00 = int(np.sum((prev == 0) & (curr == 0)))
    n11 = int(np.sum((prev == 1) & (curr == 1)))
    n10 = int(np.sum((prev == 1) & (curr == 0)))
    pof_stat = _lr_pof(int(h.sum()), h.size, 1.0 - c)
    ind_stat = _lr_ind(n00, n01, n10, n11)
    cc_stat = pof_stat + ind_stat
    return ChristoffersenResult(
        pof=LRTest(pof_stat, _chi2_sf(pof_stat, 1), 1),
        independence=LRTest(ind_stat, _chi2_sf(ind_stat, 1), 1),
        conditional_coverage=LRTest(cc_stat, _chi2_sf(cc_stat, 2), 2),
        n00=n00,
        n01=n01,
        n10=n10,
        n11=n11,
    )


def _lr_ind(n00: int, n01: int, n10: int, n11: int) -> float:
    total = n00 + n01 + n10 + n11
    pi = (n01 + n11) / total
    pi01 = n01 / (n00 + n01) if n00 + n01 > 0 else 0.0
    pi11 = n11 / (n10 + n11) if n10 + n11 > 0 else 0.0
    restricted = xlogy(n00 + n10, 1.0 - pi) + xlogy(n01 + n11, pi)
    free = xlogy(n00, 1.0 - pi01) + xlogy(n01, pi01) + xlogy(n10, 1.0 - pi11) + xlogy(n11, pi11)
    return max(float(-2.0 * (restricted - free)), 0.0)


def traffic_light(
    exceptions: int, observations: int = 250, confidence: float = 0.99
) -> TrafficLight:
    r"""Basel traffic-light zone of an exception count (BCBS 1996).

    With :math:`X \sim \mathrm{Binomial}(n, 1-c)` and :math:`P = P(X \le x)`:
    green while :math:`P < 95\%`, yellow while :math:`P < 99.99\%`, red from
    :math:`99.99\%`. For 250 observations at 99 % this gives green 0-4, yellow 5-9, red 10 or
    more, with the plus factors (from memory) 0.00 in green, 0.40, 0.50, 0.65, 0.75, 0.85 for
    5-9 exceptions and 1.00 in red. Other sizes: the zone follows the same cumulative rule;
    ``plus_factor`` is ``None`` (the table is defined for 250 days at 99 % only).

    Parameters
    ----------
    exceptions : int
        Number of exceptions, ``0 <= exceptions <= observations``.
    observations : int, default 250
        Number of days.
    confidence : float, default 0.99
        VaR confidence in (0, 1).

    Returns
    -------
    TrafficLight
    """
    c = _confidence(confidence)
    n = _count("observations", observations, 1)
    x = _count("exceptions", exceptions, 0)
    if x > n:
        raise DomainError(f"exceptions ({x}) cannot exceed observations ({n})")
    cum = float(stats.binom.cdf(x, n, 1.0 - c))
    zone = "green" if cum < GREEN_BELOW else ("yellow" if cum < YELLOW_BELOW else "red")
    plus: float | None = None
    if n == 250 and abs(c - 0.99) < 1e-12:
        plus = 0.0 if zone == "green" else (1.0 if zone == "red" else BCBS_PLUS_FACTORS[x])
    return TrafficLight(zone, plus, cum, x, n, c)


def backtest(returns: ArrayLike, var_forecasts: ArrayLike, confidence: float) -> BacktestResult:
    """Backtest a column of VaR forecasts against the realised returns.

    Parameters
    ----------
    returns : array_like
        Realised returns, in time order (1-D, or a 2-D range read row-major).
    var_forecasts : array_like
        The VaR forecast for each day (positive loss, same units), same number of cells.
    confidence : float
        Confidence of the forecasts, in (0, 1).

    Returns
    -------
    BacktestResult
        Counts, the Kupiec and Christoffersen tests, the traffic light. Pairs where either
        value is blank / NaN are dropped and counted (``dropped``); the remaining pairs are
        taken as consecutive days for the independence test. An exception is
        ``return < -VaR``.

    Raises
    ------
    InputTypeError
        Text in either column, or columns of different lengths.
    DomainError
        ±inf in either column; ``confidence`` outside (0, 1).
    InsufficientDataError
        Fewer than 2 complete pairs.
    """
    c = _confidence(confidence)
    r = _numeric_column("returns", returns)
    v = _numeric_column("var_forecasts", var_forecasts)
    if r.size != v.size:
        raise InputTypeError(
            f"returns and var_forecasts must have the same number of cells, got {r.size} and {v.size}"
        )
    _no_infinity("returns", r)
    _no_infinity("var_forecasts", v)
    keep = ~(np.isnan(r) | np.isnan(v))
    dropped = int(r.size - keep.sum())
    r, v = r[keep], v[keep]
    n = int(r.size)
    if n < 2:
        raise InsufficientDataError(
            f"backtest needs at least 2 complete (return, VaR) pairs, got {n} ({dropped} dropped)"
        )
    hits = (r < -v).astype(np.int8)
    x = int(hits.sum())
    ch = christoffersen(hits, c)
    light = traffic_light(x, n, c)
    return BacktestResult(
        n=n,
        exceptions=x,
        expected=n * (1.0 - c),
        n_dropped=dropped,
        confidence=c,
        pof=ch.pof,
        independence=ch.independence,
        conditional_coverage=ch.conditional_coverage,
        zone=light.zone,
        plus_factor=light.plus_factor,
        cumulative_probability=light.cumulative_probability,
        hits=hits,
    )
