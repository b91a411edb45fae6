"""Chart points (ECDF and QQ), checked against statsmodels and scipy.stats.gennorm."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

from errdist.checks.empirical import EMPIRICAL_COLUMNS, empirical_points, plotting_positions
from errdist.errors import DomainError, InputTypeError, InsufficientDataError


@pytest.mark.parametrize("n", [4, 7, 250])
def test_plotting_positions_are_hazens(n: int) -> None:
    # Reference: statsmodels.graphics.gofplots.plotting_pos(n, a) = (i - a)/(n + 1 - 2a);
    # a = 0.5 is Hazen's (i - 0.5)/n.
    gofplots = pytest.importorskip("statsmodels.graphics.gofplots")
    np.testing.assert_allclose(plotting_positions(n), gofplots.plotting_pos(n, 0.5), rtol=1e-15)


@pytest.mark.parametrize("shape", [0.8, 1.0, 1.5, 2.0, 5.0])
def test_points_against_scipy_gennorm(shape: float) -> None:
    # Reference: scipy.stats.gennorm (same law) for the fitted CDF and quantiles.
    rng = np.random.default_rng(int(shape * 100))
    x = rng.standard_t(4, size=120) * 0.012
    loc, scale = 0.0003, 0.01
    t = empirical_points(x, loc, scale, shape)
    assert list(t.columns) == list(EMPIRICAL_COLUMNS)
    np.testing.assert_array_equal(t["return"], np.sort(x))
    p = (np.arange(1, 121) - 0.5) / 120
    np.testing.assert_allclose(t["probability"], p, rtol=1e-15)
    np.testing.assert_allclose(
        t["fitted_cdf"], stats.gennorm.cdf(np.sort(x), shape, loc, scale), rtol=1e-10
    )
    np.testing.assert_allclose(
        t["fitted_quantile"], stats.gennorm.ppf(p, shape, loc, scale), rtol=1e-10
    )


def test_qq_points_follow_the_line_for_data_from_the_law() -> None:
    # 20,000 draws from scipy.stats.gennorm(1.3): sample quantiles converge to the law's, so
    # in the central 98% the QQ points sit on the 45° line within a few percent of the scale.
    x = stats.gennorm.rvs(1.3, loc=0.001, scale=0.01, size=20_000, random_state=5)
    t = empirical_points(x, 0.001, 0.01, 1.3)
    mid = t[(t["probability"] > 0.01) & (t["probability"] < 0.99)]
    assert np.max(np.abs(mid["return"] - mid["fitted_quantile"])) < 0.05 * 0.01 * 5


def test_blanks_dropped() -> None:
    x = np.array([0.01, np.nan, -0.02, 0.005, np.nan, 0.0])
    t = empirical_points(x, 0.0, 0.01, 1.5)
    assert len(t) == 4
    np.testing.assert_allclose(t["probability"], [0.125, 0.375, 0.625, 0.875])


def test_bad_parameters() -> None:
    with pytest.raises(DomainError, match="scale"):
        empirical_points([1.0, 2.0, 3.0, 4.0], 0.0, 0.0, 2.0)
    with pytest.raises(DomainError, match="shape"):
        empirical_points([1.0, 2.0, 3.0, 4.0], 0.0, 1.0, -1.0)


def test_bad_data() -> None:
    with pytest.raises(InsufficientDataError):
        empirical_points([1.0, 2.0], 0.0, 1.0, 2.0)
    with pytest.raises(InputTypeError):
        empirical_points([1.0, "a", 2.0, 3.0], 0.0, 1.0, 2.0)
