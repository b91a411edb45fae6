r"""Backtest several VaR/ES models side by side on one return series.

For each model (:data:`errdist.risk.forecasts.MODELS`) the rolling one-day forecasts
(:func:`errdist.risk.forecasts.rolling_forecasts`) are checked against the returns that followed:
exceptions, Kupiec's and Christoffersen's likelihood-ratio tests
(:func:`errdist.checks.backtest.backtest`), the Basel traffic-light zone of the last 250 days
(:func:`errdist.checks.backtest.traffic_light`) and Acerbi & Szekely's :math:`Z_2` ES test
(:func:`errdist.checks.es_backtest.es_backtest`, simulation p-value under the forecast laws). All
models are evaluated on the same days.

The field names of :class:`ModelBacktest` are the keys of ``errdist backtest --format json``
(documented in ``docs/backtesting.md``).
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import asdict, dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from errdist.checks.backtest import backtest, traffic_light
from errdist.checks.es_backtest import es_backtest
from errdist.errors import InputTypeError
from errdist.risk.forecasts import MODELS, ForecastPath, rolling_forecasts

__all__ = ["ZONE_DAYS", "ModelBacktest", "backtest_models", "summarize"]

#: Days of the traffic-light window.
ZONE_DAYS = 250


@dataclass(frozen=True)
class ModelBacktest:
    """Backtest of one model's rolling one-day forecasts (JSON field names).

    Attributes
    ----------
    model : str
    n : int
        Forecast days.
    confidence : float
    exceptions : int
    exception_rate : float
        ``exceptions / n``.
    expected_rate : float
        ``1 - confidence``.
    kupiec_statistic, kupiec_pvalue : float
    independence_statistic, independence_pvalue : float
        Christoffersen's independence test.
    conditional_coverage_statistic, conditional_coverage_pvalue : float
    es_statistic : float
        Acerbi-Szekely :math:`Z_2`.
    es_pvalue : float
        Simulation p-value of :math:`Z_2` (lower tail).
    zone : str
        Traffic light of the last ``zone_days`` days (green/yellow/red).
    zone_exceptions, zone_days : int
    last_var, last_es : float
        The forecasts of the last day of the series.
    refits : int
    seconds : float
    warning : str
    """

    model: str
    n: int
    confidence: float
    exceptions: int
    exception_rate: float
    expected_rate: float
    kupiec_statistic: float
    kupiec_pvalue: float
    independence_statistic: float
    independence_pvalue: float
    conditional_coverage_statistic: float
    conditional_coverage_pvalue: float
    es_statistic: float
    es_pvalue: float
    zone: str
    zone_exceptions: int
    zone_days: int
    last_var: float
    last_es: float
    refits: int
    seconds: float
    warning: str

    def as_dict(self) -> dict[str, Any]:
        """The fields as a plain dict (JSON-ready)."""
        return asdict(self)


def summarize(
    returns: np.ndarray,
    path: ForecastPath,
    *,
    simulations: int = 1000,
    seed: int = 20140101,
) -> ModelBacktest:
    """Backtest one :class:`~errdist.risk.forecasts.ForecastPath` against its returns."""
    sl = slice(path.first, None)
    r = np.asarray(returns, dtype=float)[sl]
    v, e = path.var[sl], path.es[sl]
    c = path.confidence
    bt = backtest(r, v, c)
    k = min(ZONE_DAYS, r.size)
    light = traffic_light(int(bt.hits[-k:].sum()), k, c)
    esb = es_backtest(
        r,
        v,
        e,
        c,
        law=(path.mean[sl], path.std[sl], path.shape[sl], path.skew[sl]),
        simulations=simulations,
        seed=seed,
    )
    warn = "; ".join(w for w in (path.warning, esb.warning) if w)
    return ModelBacktest(
        model=path.model,
        n=bt.n,
        confidence=c,
        exceptions=bt.exceptions,
        exception_rate=bt.exceptions / bt.n,
        expected_rate=1.0 - c,
        kupiec_statistic=bt.pof.statistic,
        kupiec_pvalue=bt.pof.pvalue,
        independence_statistic=bt.independence.statistic,
        independence_pvalue=bt.independence.pvalue,
        conditional_coverage_statistic=bt.conditional_coverage.statistic,
        conditional_coverage_pvalue=bt.conditional_coverage.pvalue,
        es_statistic=esb.statistic,
        es_pvalue=float(esb.pvalue) if esb.pvalue is not None else float("nan"),
        zone=light.zone,
        zone_exceptions=light.exceptions,
        zone_days=k,
        last_var=float(v[-1]),
        last_es=float(e[-1]),
        refits=path.refits,
        seconds=path.seconds,
        warning=warn,
    )


def backtest_models(
    returns: ArrayLike,
    models: Sequence[str] = ("symmetric", "skewed", "ewma", "gjr"),
    confidence: float = 0.99,
    *,
    window: int = 250,
    fit_window: int = 1000,
    refit: int = 21,
    lam: float = 0.94,
    simulations: int = 1000,
    seed: int = 20140101,
    progress: Callable[[str, int, int], None] | None = None,
) -> dict[str, ModelBacktest]:
    """Rolling forecasts and backtests of several models on the same days.

    Parameters are those of :func:`errdist.risk.forecasts.rolling_forecasts` and
    :func:`errdist.checks.es_backtest.es_backtest`. Returns one :class:`ModelBacktest` per model, in
    the order given.
    """
    names = [str(m).strip().lower() for m in models]
    unknown = [m for m in names if m not in MODELS]
    if unknown or not names:
        raise InputTypeError(
            f"unknown model {unknown[0]!r}; choose from {', '.join(MODELS)}"
            if unknown
            else "no model given"
        )
    if len(set(names)) != len(names):
        raise InputTypeError("a model is named twice")
    first = max(int(window), int(fit_window))
    out: dict[str, ModelBacktest] = {}
    for name in names:
        path = rolling_forecasts(
            returns,
            name,
            confidence,
            window=window,
            fit_window=fit_window,
            refit=refit,
            lam=lam,
            first=first,
            progress=progress,
        )
        out[name] = summarize(np.asarray(returns, float), path, simulations=simulations, seed=seed)
    return out
