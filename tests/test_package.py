"""Smoke test: the package imports and reports a version; public names; a light import."""

import os
import subprocess
import sys
from pathlib import Path

import errdist


def test_version_is_a_string() -> None:
    assert isinstance(errdist.__version__, str)
    assert errdist.__version__.count(".") == 2


def test_public_api_names_resolve() -> None:
    for name in errdist.__all__:
        assert hasattr(errdist, name), name


def test_skewed_namespace_names() -> None:
    # the conditional-volatility engine relies on these names: keep them stable
    stable = (
        "pdf logpdf cdf sf logcdf logsf ppf isf rvs mean variance skewness excess_kurtosis "
        "standardized_params value_at_risk expected_shortfall fit_skewed"
    ).split()
    assert "skewed" in errdist.__all__
    for name in stable:
        assert name in errdist.skewed.__all__, name
        assert callable(getattr(errdist.skewed, name)), name
    # existing top-level names are not shadowed by the skewed law
    assert errdist.cdf.__module__ != errdist.skewed.cdf.__module__


def test_public_names_pinned() -> None:
    # the public API (README, docs/api): lazy loading must not add or lose a name
    expected = {
        "SHAPE_MAX", "SHAPE_MIN", "BacktestResult", "DomainError", "Fit", "GofResult",
        "InputTypeError", "InsufficientDataError", "__version__", "backtest", "cdf",
        "check_params", "christoffersen", "clean_sample", "compare", "edf_statistic",
        "empirical_points", "excess_kurtosis", "expected_shortfall", "fit", "goodness_of_fit",
        "isf", "kupiec", "logcdf", "loglik", "logpdf", "logsf", "pdf", "plotting_positions",
        "ppf", "returns_from_prices", "rolling_var", "rvs", "sample_excess_kurtosis",
        "sample_mean", "sample_median", "sample_skewness", "sample_std", "sf", "solve_scale",
        "solve_shape", "traffic_light", "value_at_risk", "variance",
        # the skewed law, conditional models and model backtests
        "skewed", "ConditionalFit", "fit_ewma", "fit_gjr", "rolling_forecasts", "es_backtest",
        "backtest_models",
    }  # fmt: skip
    assert set(errdist.__all__) == expected
    assert expected <= set(dir(errdist))
    from errdist import estimate, law

    assert errdist.fit is estimate.fit
    assert errdist.cdf is law.cdf
    assert law.solve_shape is errdist.solve_shape


def test_import_is_light() -> None:
    # common practice, no source: `import errdist` must not load pandas, scipy.stats or
    # scipy.optimize (timed in tests/benchmarks/bench_import.py); a fresh interpreter checks
    code = (
        "import sys, errdist; heavy = [m for m in ('pandas', 'scipy.stats', 'scipy.optimize') "
        "if m in sys.modules]; errdist.cdf(0.1); "
        "heavy += [m for m in ('pandas', 'scipy.stats') if m in sys.modules]; print(heavy)"
    )
    out = subprocess.run(
        [sys.executable, "-c", code],
        capture_output=True,
        text=True,
        check=True,
        env=dict(os.environ, PYTHONPATH=str(Path(errdist.__file__).parents[1])),
    ).stdout
    assert out.strip() == "[]"
