"""Rolling one-day VaR forecasts: alignment, no look-ahead, blanks, and outside checks.

References: scipy.stats.gennorm (generic maximum-likelihood fit and quantile) on a real daily
index series shipped with arch (`real_series.index(1).load()`, index 1 1999-2018).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from errdist.checks.backtest import backtest
from errdist.checks.rolling import rolling_var
from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.estimate import fit
from errdist.risk import value_at_risk
from real_series import index as real_index


def _returns(n: int = 400, seed: int = 7) -> np.ndarray:
    # invented, seeded heavy-tailed daily returns (Student t with 4 degrees of freedom)
    return 0.01 * stats.t.rvs(4, size=n, random_state=np.random.default_rng(seed))


def test_first_window_is_nan_and_values_match_fit_on_past_window() -> None:
    r = _returns()
    w = 100
    out = rolling_var(r, w, 0.99)
    assert out.shape == r.shape
    assert np.all(np.isnan(out[:w])) and np.all(np.isfinite(out[w:]))
    for t in (w, w + 1, 250, r.size - 1):
        f = fit(r[t - w : t])  # the fit of the past window only
        assert out[t] == pytest.approx(value_at_risk(0.99, f.loc, f.scale, f.shape), rel=1e-14)


def test_no_look_ahead() -> None:
    # Perturbing returns from day t on must not change any forecast up to and including day t.
    r = _returns()
    w, t = 120, 260
    base = rolling_var(r, w, 0.99)
    bumped = r.copy()
    bumped[t:] = bumped[t:] * 5.0 - 0.03
    out = rolling_var(bumped, w, 0.99)
    np.testing.assert_array_equal(out[: t + 1], base[: t + 1])
    assert np.all(out[t + 1 :] != base[t + 1 :])


def test_blanks_inside_window_are_dropped() -> None:
    r = _returns(300).astype(object)
    r[[5, 60, 61]] = None
    r[200] = float("nan")
    w = 80
    out = rolling_var(r, w, 0.975)
    clean = np.array([math.nan if v is None else v for v in r], dtype=float)
    t = 100  # window 20..99 holds the blanks at 60, 61
    seg = clean[t - w : t]
    f = fit(seg[~np.isnan(seg)])
    assert out[t] == pytest.approx(value_at_risk(0.975, f.loc, f.scale, f.shape), rel=1e-14)
    assert np.isfinite(out[200])  # a blank on the day itself does not stop its forecast


def test_column_shape_is_kept_and_feeds_backtest() -> None:
    r = _returns(300).reshape(-1, 1)
    out = rolling_var(r, 100, 0.99)
    assert out.shape == (300, 1)
    res = backtest(r, out, 0.99)
    assert res.n_dropped == 100 and res.n == 200


def test_moments_method_uses_spreadsheet_fit() -> None:
    r = _returns(200)
    out = rolling_var(r, 150, 0.95, method="moments")
    f = fit(r[10:160], "moments")
    assert out[160] == pytest.approx(value_at_risk(0.95, f.loc, f.scale, f.shape), rel=1e-12)


def test_rolling_mle_matches_scipy_on_index1() -> None:
    # Reference: scipy.stats.gennorm.fit (generic optimiser; its own MLE) and gennorm.ppf on
    # index 1 log returns from `arch.data` index 1. The generic optimiser stops near the maximum,
    # so agreement is to ~1e-3 relative, and our log-likelihood must be at least scipy's.
    prices = real_index(1).load()["Adj Close"].to_numpy()
    r = np.diff(np.log(prices))[-400:]
    w = 250
    out = rolling_var(r, w, 0.99)
    for t in (w, 330, 399):
        seg = r[t - w : t]
        b, m, a = stats.gennorm.fit(seg)
        var_scipy = -stats.gennorm.ppf(0.01, b, loc=m, scale=a)
        assert out[t] == pytest.approx(var_scipy, rel=5e-3)
        f = fit(seg)
        assert stats.gennorm.logpdf(seg, f.shape, f.loc, f.scale).sum() >= (
            stats.gennorm.logpdf(seg, b, m, a).sum() - 1e-9
        )


@pytest.mark.parametrize(
    ("kwargs", "error", "message"),
    [
        ({"window": 400}, InsufficientDataError, "smaller than the number of returns"),
        ({"window": 3}, DomainError, "window must be >= 4"),
        ({"window": 10.5}, DomainError, "whole number"),
        ({"confidence": 1.5}, DomainError, "confidence"),
        ({"method": "ols"}, InputTypeError, 'method must be "mle" or "moments"'),
        ({"returns": np.zeros((20, 2))}, InputTypeError, "one column or one row"),
        ({"returns": ["a"] * 30}, InputTypeError, "returns must be numbers"),
    ],
)
def test_bad_inputs(kwargs: dict, error: type, message: str) -> None:
    args = {"returns": _returns(400), "window": 50, "confidence": 0.99} | kwargs
    with pytest.raises(error, match=message):
        rolling_var(**args)


def test_window_without_enough_numbers_names_the_day() -> None:
    r = _returns(100)
    r[40:58] = np.nan
    with pytest.raises(InsufficientDataError, match="before day 58 holds only 3 numbers"):
        rolling_var(r, 20, 0.99)
    flat = np.concatenate([np.full(30, 0.001), _returns(30)])
    with pytest.raises(InsufficientDataError, match="all equal"):
        rolling_var(flat, 20, 0.99)
