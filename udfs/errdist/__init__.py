"""errdist: the generalized normal ("error") distribution for spreadsheet risk work."""

from __future__ import annotations

__version__ = "0.1.0"

# --- distribution functions (owner: core-distribution) ---
from errdist.distribution import (  # noqa: E402, F401
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
    variance,
)

# --- estimation (owner: core-estimate) ---
from errdist.estimate import (  # noqa: E402, F401
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

# --- risk measures and backtesting (owner: risk) ---
# isort: split
from errdist.backtest import (  # noqa: E402, F401
    BacktestResult,
    backtest,
    christoffersen,
    kupiec,
    rolling_var,
    traffic_light,
)
from errdist.risk import expected_shortfall, value_at_risk  # noqa: E402, F401

# --- model checking: goodness of fit, rival laws, chart points (owner: model-checking) ---
# isort: split
from errdist.empirical import empirical_points, plotting_positions  # noqa: E402, F401
from errdist.goodness import GofResult, edf_statistic, goodness_of_fit  # noqa: E402, F401
from errdist.rivals import compare  # noqa: E402, F401

# --- prices to returns (owner: worksheet layer) ---
# isort: split
from errdist.returns import returns_from_prices  # noqa: E402, F401
