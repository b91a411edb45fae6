"""Acerbi-Szekely Z2 Expected Shortfall backtest.

Reference: Acerbi, C. & Szekely, B. (2014) "Backtesting Expected Shortfall", Risk, December:
Z2 = sum_t X_t I_t / (T alpha ES_t) + 1, E[Z2] = 0 under the forecast law; thresholds -0.70
(5 %) and -1.8 (0.01 %) from memory.
"""

from __future__ import annotations

import numpy as np
import pytest

from errdist.checks.es_backtest import Z2_CRITICAL_5, es_backtest, z2_statistic
from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.risk.innovation_law import lower_tail, rvs


def test_z2_hand_example() -> None:
    # Worked by hand from the paper's definition: T = 5, alpha = 0.05, VaR 2 %, ES 4 %.
    # Exceptions on days 1 and 3 (-3 %, -5 %; day 5's -1 % is not beyond VaR):
    # Z2 = (-0.03/0.04 - 0.05/0.04) / (5 * 0.05) + 1 = -2 / 0.25 + 1 = -7.
    x = np.array([-0.03, 0.01, -0.05, 0.02, -0.01])
    res = es_backtest(x, np.full(5, 0.02), np.full(5, 0.04), 0.95)
    assert res.statistic == pytest.approx(-7.0, abs=1e-12)
    assert res.exceptions == 2 and res.n == 5
    assert res.reject_5 and res.reject_0_01
    assert res.pvalue is None  # no forecast law given
    # a loss exactly at the VaR is not an exception
    assert z2_statistic(np.array([-0.02, 0.0]), np.full(2, 0.02), np.full(2, 0.04), 0.05) == 1.0


def test_null_mean_is_zero_by_simulation() -> None:
    # Under the forecast law itself E[Z2] = 0 (Acerbi & Szekely 2014): 4,000 paths of 250 days
    # from a skewed law with time-varying volatility, exact VaR/ES; the mean must be within
    # 4 standard errors of 0.
    rng = np.random.default_rng(42)
    t, b, lam, c = 250, 0.9, -0.2, 0.975
    sig = 0.01 * np.exp(0.3 * np.sin(np.arange(t) / 20))
    q, e = lower_tail(1 - c, b, lam)
    var, es = -sig * q, -sig * e
    paths = sig * rvs(b, lam, (4000, t), rng)
    z = z2_statistic(paths, var, es, 1 - c)
    assert abs(z.mean()) < 4 * z.std() / np.sqrt(z.size)
    # the 5 % quantile is near the published -0.70 for alpha 2.5 %, T = 250 (from memory)
    assert -1.0 < np.quantile(z, 0.05) < -0.5


def test_simulation_pvalue_separates_right_and_wrong_models() -> None:
    rng = np.random.default_rng(1)
    t, b, lam, c = 2000, 1.0, -0.2, 0.99
    sig = np.full(t, 0.01)
    q, e = lower_tail(1 - c, b, lam)
    var, es = -sig * q, -sig * e
    law = (np.zeros(t), sig, np.full(t, b), np.full(t, lam))
    right = sig * rvs(b, lam, t, rng)
    wrong = 1.6 * sig * rvs(b, lam, t, rng)  # true volatility 60 % higher than forecast
    ok = es_backtest(right, var, es, c, law=law, simulations=500, seed=3)
    bad = es_backtest(wrong, var, es, c, law=law, simulations=500, seed=3)
    assert ok.pvalue > 0.01
    assert bad.pvalue < 0.01 and bad.statistic < Z2_CRITICAL_5
    again = es_backtest(right, var, es, c, law=law, simulations=500, seed=3)
    assert again.pvalue == ok.pvalue  # seeded


def test_bad_input() -> None:
    with pytest.raises(InputTypeError, match="same length"):
        es_backtest([0.1, 0.2], [0.1], [0.2, 0.2], 0.99)
    with pytest.raises(DomainError, match="positive"):
        es_backtest([0.1, 0.2], [0.1, 0.1], [0.2, 0.0], 0.99)
    with pytest.raises(DomainError, match="confidence"):
        es_backtest([0.1, 0.2], [0.1, 0.1], [0.2, 0.2], 1.5)
    with pytest.raises(InsufficientDataError):
        es_backtest([0.1], [0.1], [0.2], 0.99)
    with pytest.raises(DomainError, match="finite"):
        es_backtest([0.1, np.nan], [0.1, 0.1], [0.2, 0.2], 0.99)


def test_tail_only_simulation_matches_full_draws() -> None:
    # The p-value's simulation draws by inversion only on exception days; its Z2 null
    # distribution must equal that of full paths drawn by errdist.risk.innovation_law.rvs
    # (compared through p-values at quantiles of the full-path Z2).

    t, c = 300, 0.99
    rng = np.random.default_rng(8)
    shape = rng.uniform(0.8, 2.0, t)
    skew = rng.uniform(-0.4, 0.2, t)
    sig = rng.uniform(0.008, 0.02, t)
    mean = np.full(t, 0.0003)
    q, e = lower_tail(1 - c, shape, skew)
    var, es = -(mean + sig * q), -(mean + sig * e)
    full = mean + sig * rvs(shape, skew, (3000, t), np.random.default_rng(9))
    z_full = z2_statistic(full, var, es, 1 - c)
    # es_backtest's p-values on a grid of observed Z2 values trace its simulated null cdf
    grid = np.quantile(z_full, [0.05, 0.25, 0.5, 0.75])
    law = (mean, sig, shape, skew)
    checked = 0
    for g in grid:
        # build returns with exactly this Z2: one loss day scaled to hit the target value
        x = np.zeros(t)
        x[0] = (g - 1.0) * t * (1 - c) * es[0]
        if x[0] + var[0] >= 0:
            continue
        res = es_backtest(x, var, es, c, law=law, simulations=3000, seed=5)
        assert res.statistic == pytest.approx(g)
        assert res.pvalue == pytest.approx(np.mean(z_full <= g), abs=0.03)
        checked += 1
    assert checked >= 3
