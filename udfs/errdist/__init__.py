"""errdist: the generalized normal ("error") distribution for spreadsheet risk work.

The Python API (snake_case, scipy-style names, argument order ``(x, loc, scale, shape)``):

- distribution: :func:`pdf`, :func:`logpdf`, :func:`cdf`, :func:`sf`, :func:`logcdf`,
  :func:`logsf`, :func:`ppf`, :func:`isf`, :func:`rvs`, :func:`variance`,
  :func:`excess_kurtosis`
- estimation: :func:`fit` (-> :class:`Fit`), :func:`loglik`, :func:`solve_shape`,
  :func:`solve_scale`, spreadsheet-convention sample statistics
- risk: :func:`value_at_risk`, :func:`expected_shortfall`
- model checking: :func:`goodness_of_fit`, :func:`compare`, :func:`empirical_points`
- backtesting: :func:`kupiec`, :func:`christoffersen`, :func:`traffic_light`,
  :func:`backtest`, :func:`rolling_var`
- data: :func:`returns_from_prices`
- conditional volatility (EWMA, GJR-GARCH through ``arch``): :func:`fit_ewma`,
  :func:`fit_gjr`; rolling VaR/ES forecasts :func:`rolling_forecasts`; the Acerbi-Szekely ES
  backtest :func:`es_backtest`; side-by-side model backtests :func:`backtest_models`
- the skewed error law, as the namespace ``errdist.skewed`` (module
  :mod:`errdist.law.skewed`): ``skewed.pdf``, ``skewed.cdf``, ... ``skewed.fit_skewed``,
  argument order ``(x, loc, scale, shape, skew)``; skew 0 is the symmetric law above

Errors are :class:`ValueError` subclasses from :mod:`errdist.errors`.
"""

from __future__ import annotations

__version__ = "0.1.0"

from typing import TYPE_CHECKING, Any

from errdist.errors import DomainError, InputTypeError, InsufficientDataError

#: Public name -> the module that defines it. Imported on first use (PEP 562 module
#: ``__getattr__``), so ``import errdist`` does not pull in scipy.stats, scipy.optimize or
#: pandas; ``errdist.X`` and ``from errdist import X`` work as with eager imports.
_LAZY = {
    **dict.fromkeys(
        (
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
        ),
        "errdist.estimate",
    ),
    **dict.fromkeys(
        (
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
            "variance",
        ),
        "errdist.law",
    ),
    **dict.fromkeys(
        ("BacktestResult", "backtest", "christoffersen", "kupiec", "traffic_light"),
        "errdist.checks.backtest",
    ),
    "empirical_points": "errdist.checks.empirical",
    "plotting_positions": "errdist.checks.empirical",
    "GofResult": "errdist.checks.goodness",
    "edf_statistic": "errdist.checks.goodness",
    "goodness_of_fit": "errdist.checks.goodness",
    "compare": "errdist.checks.rivals",
    "rolling_var": "errdist.checks.rolling",
    "returns_from_prices": "errdist.data.returns",
    "expected_shortfall": "errdist.risk",
    "value_at_risk": "errdist.risk",
    "skewed": "errdist.law.skewed",  # the module itself: the skewed law's namespace
    "es_backtest": "errdist.checks.es_backtest",
    "backtest_models": "errdist.checks.model_backtest",
    "ConditionalFit": "errdist.risk.conditional",
    "fit_ewma": "errdist.risk.conditional",
    "fit_gjr": "errdist.risk.conditional",
    "rolling_forecasts": "errdist.risk.forecasts",
}


def __getattr__(name: str) -> Any:
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'errdist' has no attribute {name!r}")
    import importlib

    mod = importlib.import_module(module)
    value = mod if name == "skewed" else getattr(mod, name)  # errdist.skewed is a module
    globals()[name] = value  # later look-ups skip this function
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))


if TYPE_CHECKING:  # static analysis sees the eager imports
    from errdist.checks.backtest import (
        BacktestResult,
        backtest,
        christoffersen,
        kupiec,
        traffic_light,
    )
    from errdist.checks.empirical import empirical_points, plotting_positions
    from errdist.checks.es_backtest import es_backtest
    from errdist.checks.goodness import GofResult, edf_statistic, goodness_of_fit
    from errdist.checks.model_backtest import backtest_models
    from errdist.checks.rivals import compare
    from errdist.checks.rolling import rolling_var
    from errdist.data.returns import returns_from_prices
    from errdist.estimate import (
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
    from errdist.law import (
        cdf,
        check_params,
        excess_kurtosis,
        isf,
        logcdf,
        logpdf,
        logsf,
        pdf,
        ppf,
        rvs,
        sf,
        skewed,
        variance,
    )
    from errdist.risk import expected_shortfall, value_at_risk
    from errdist.risk.conditional import ConditionalFit, fit_ewma, fit_gjr
    from errdist.risk.forecasts import rolling_forecasts

__all__ = [
    "SHAPE_MAX",
    "SHAPE_MIN",
    "BacktestResult",
    "ConditionalFit",
    "DomainError",
    "Fit",
    "GofResult",
    "InputTypeError",
    "InsufficientDataError",
    "__version__",
    "backtest",
    "backtest_models",
    "cdf",
    "check_params",
    "christoffersen",
    "clean_sample",
    "compare",
    "edf_statistic",
    "empirical_points",
    "es_backtest",
    "excess_kurtosis",
    "expected_shortfall",
    "fit",
    "fit_ewma",
    "fit_gjr",
    "goodness_of_fit",
    "isf",
    "kupiec",
    "logcdf",
    "loglik",
    "logpdf",
    "logsf",
    "pdf",
    "plotting_positions",
    "ppf",
    "returns_from_prices",
    "rolling_forecasts",
    "rolling_var",
    "rvs",
    "sample_excess_kurtosis",
    "sample_mean",
    "sample_median",
    "sample_skewness",
    "sample_std",
    "sf",
    "skewed",
    "solve_scale",
    "solve_shape",
    "traffic_light",
    "value_at_risk",
    "variance",
]
