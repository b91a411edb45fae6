"""Rolling one-day VaR/ES forecasts: no look-ahead, reuse of rolling_var, fit quality, and a
real-series coverage check.

References: errdist.checks.rolling.rolling_var (the existing symmetric rolling forecasts, themselves
checked against scipy.stats.gennorm); errdist.law.skewed.fit_skewed (the exact skewed MLE);
arch.data index 2 (index 2 daily closes 1999-2018, shipped with arch).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

from errdist.checks.backtest import backtest
from errdist.checks.rolling import rolling_var
from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.risk.forecasts import rolling_forecasts

arch = pytest.importorskip("arch", reason="the arch package is not installed")


def _index2() -> np.ndarray:
    from real_series import index as real_index

    return np.diff(np.log(real_index(2).load()["Adj Close"].to_numpy()))


def _garchy(n: int = 700, seed: int = 4) -> np.ndarray:
    # invented, seeded returns with volatility clustering (GARCH(1,1) with t(5) shocks)
    rng = np.random.default_rng(seed)
    r = np.empty(n)
    s2 = 1e-4
    for t in range(n):
        r[t] = np.sqrt(s2) * rng.standard_t(5) / np.sqrt(5 / 3)
        s2 = 2e-6 + 0.08 * r[t] ** 2 + 0.9 * s2
    return r


@pytest.mark.parametrize("model", ["symmetric", "skewed", "ewma", "gjr"])
def test_no_look_ahead(model: str) -> None:
    # Changing the returns from day `cut` on must leave every forecast up to day `cut` as it was.
    r = _garchy()
    kw = dict(window=100, fit_window=300, refit=21)
    base = rolling_forecasts(r, model, 0.99, **kw)
    cut = 300 + 21 * 3 + 5  # inside a refit block
    r2 = r.copy()
    r2[cut:] = r2[cut:] * 5.0 - 0.03
    moved = rolling_forecasts(r2, model, 0.99, **kw)
    np.testing.assert_array_equal(base.var[: cut + 1], moved.var[: cut + 1])
    np.testing.assert_array_equal(base.es[: cut + 1], moved.es[: cut + 1])
    assert not np.allclose(base.var[cut + 1 :], moved.var[cut + 1 :])  # the test can fail
    assert np.all(np.isnan(base.var[:300])) and np.all(np.isfinite(base.var[300:]))
    assert np.all(base.es[300:] > base.var[300:])


def test_symmetric_model_is_rolling_var() -> None:
    # Reference: errdist.checks.rolling.rolling_var, today's symmetric rolling forecasts.
    r = _index2()[:900]
    path = rolling_forecasts(r, "symmetric", 0.99, window=250, fit_window=250)
    ref = rolling_var(r, 250, 0.99)
    np.testing.assert_allclose(path.var[250:], ref[250:], rtol=1e-12)
    assert path.refits == 650 and path.n == 650


def test_warm_started_fit_reaches_exact_skewed_mle() -> None:
    # Reference: the exact search of errdist.law.skewed.fit_skewed (maximum likelihood with
    # no start point, itself tested against mpmath in test_skewed_fit.py) on arch.data index 2.
    from errdist.law import skewed as sk

    r = _index2()
    prev = None
    for t0 in range(1000, 1000 + 21 * 6, 21):
        x = r[t0 - 250 : t0]
        f = sk.fit_skewed(x, start=prev, method="local")
        prev = f
        exact = sk.fit_skewed(x)
        assert f.loglik == pytest.approx(exact.loglik, abs=0.01)
        assert f.loglik <= exact.loglik + 1e-6
        assert f.shape == pytest.approx(exact.shape, rel=0.02)


def test_forecast_law_draws_match_var() -> None:
    # The VaR column is the (1 - c) quantile of the stored forecast law (checked by simulation
    # of that law with scipy's binomial test on the share of draws below -VaR).
    from errdist.risk.innovation_law import rvs

    r = _garchy(500)
    p = rolling_forecasts(r, "gjr", 0.99, window=100, fit_window=300, refit=50)
    t = 450
    rng = np.random.default_rng(0)
    draws = p.mean[t] + p.std[t] * rvs(p.shape[t], p.skew[t], 200_000, rng)
    k = int(np.sum(draws < -p.var[t]))
    assert stats.binomtest(k, 200_000, 0.01).pvalue > 0.001
    tail = draws[draws < -p.var[t]]
    assert -tail.mean() == pytest.approx(p.es[t], rel=0.03)


def test_bad_input() -> None:
    r = _garchy(400)
    with pytest.raises(InputTypeError, match="model"):
        rolling_forecasts(r, "egarch")
    with pytest.raises(InsufficientDataError, match="no day to forecast"):
        rolling_forecasts(r, "ewma", fit_window=1000)
    with pytest.raises(DomainError, match="refit"):
        rolling_forecasts(r, "ewma", fit_window=300, refit=0)
    with pytest.raises(InputTypeError, match="gap-free"):
        rolling_forecasts(np.r_[r[:10], np.nan, r[10:]], "ewma", fit_window=300)


@pytest.mark.slow
def test_index2_gjr_skewed_passes_coverage_on_recent_slice() -> None:
    # arch.data index 2: the last 2,500 returns (to 2018-12-31), 1,500 one-day 99 % forecasts,
    # GJR-GARCH + skewed error law refitted every 21 days on 1,000 days. The full 4,000-day
    # run is in tests/benchmarks/bench_backtest_models.py.
    r = _index2()[-2500:]
    p = rolling_forecasts(r, "gjr", 0.99, fit_window=1000, refit=21)
    bt = backtest(r[p.first :], p.var[p.first :], 0.99)
    assert bt.n == 1500
    assert bt.pof.pvalue > 0.05
    assert bt.independence.pvalue > 0.05
