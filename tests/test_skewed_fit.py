"""Maximum-likelihood fit of the skewed error law (errdist.law.skewed.fit_skewed).

References: real daily returns shipped with the `arch` package (arch.data index 2, index1;
log returns of the adjusted close), scipy.optimize (multi-start Nelder-Mead on the
log-likelihood written out here from the density's formula), a brute-force grid, and
scipy.stats.laplace_asymmetric (the shape-1 case) for simulated data.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import optimize, stats
from scipy.special import gammaln

import errdist
from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.law import skewed as K
from real_series import log_returns

arch_data = pytest.importorskip("arch.data", reason="the arch package ships the real series")


INDEX2 = log_returns(2)
INDEX1 = log_returns(1)


def loglik_ref(x: np.ndarray, m: float, a: float, b: float, lam: float) -> float:
    """Sum of log densities, written out from the definition (Fernández & Steel 1998 form)."""
    s = np.where(x >= m, a * (1 + lam), a * (1 - lam))
    return float(
        x.size * (math.log(b) - math.log(2 * a) - gammaln(1 / b)) - np.sum((np.abs(x - m) / s) ** b)
    )


def scipy_multistart(x: np.ndarray) -> float:
    """Best log-likelihood of Nelder-Mead from several starts (m, ln a, ln b, atanh l)."""
    sd = float(np.std(x))
    med = float(np.median(x))

    def nll(th: np.ndarray) -> float:
        m, a, b, lam = th[0], math.exp(th[1]), math.exp(th[2]), math.tanh(th[3])
        if not (0.1 <= b <= 20.0):
            return 1e300
        return -loglik_ref(x, m, a, b, lam)

    best = -math.inf
    for m0, b0, l0 in ((med, 1.0, 0.0), (med, 2.0, -0.3), (np.mean(x), 0.7, 0.2), (med, 1.3, -0.1)):
        th = np.array([m0, math.log(sd), math.log(b0), math.atanh(l0)])
        res = optimize.minimize(
            nll,
            th,
            method="Nelder-Mead",
            options={"xatol": 1e-10, "fatol": 1e-12, "maxiter": 20000, "maxfev": 40000},
        )
        best = max(best, -res.fun)
    return best


def grid_max(x: np.ndarray) -> float:
    """Brute force: m over every observation and midpoint, b and l on dense grids, a closed form
    (a^b = (b/n) sum w_i |x_i - m|^b with side weights (1 +- l)^-b)."""
    xs = np.sort(x)
    ms = np.concatenate([xs, 0.5 * (xs[1:] + xs[:-1])])
    n = xs.size
    d = xs[None, :] - ms[:, None]
    best = -math.inf
    lams = np.linspace(-0.6, 0.6, 61)
    for b in np.arange(0.5, 2.01, 0.02):
        p = np.abs(d) ** b
        r = np.where(d > 0, p, 0.0).sum(axis=1)
        lft = np.where(d < 0, p, 0.0).sum(axis=1)
        s = r[:, None] * (1 + lams[None, :]) ** (-b) + lft[:, None] * (1 - lams[None, :]) ** (-b)
        smin = float(s.min())
        ll = n * (math.log(b) - math.log(2) - gammaln(1 / b) - math.log(b * smin / n) / b - 1 / b)
        best = max(best, ll)
    return best


WINDOWS = {
    "index2 last 250": INDEX2[-250:],
    "index2 days 2000-2250": INDEX2[2000:2250],
    "index1 days 3000-3250": INDEX1[3000:3250],
    "index2 last 1000": INDEX2[-1000:],
    "index2 first 1000": INDEX2[:1000],
}


@pytest.mark.parametrize("name", list(WINDOWS))
def test_loglik_at_least_scipy_multistart_and_grid(name: str) -> None:
    x = WINDOWS[name]
    f = K.fit_skewed(x)
    # the reported log-likelihood is the one of the reported parameters
    assert f.loglik == pytest.approx(
        loglik_ref(x, f.loc, f.scale, f.shape, f.skew), rel=1e-12, abs=1e-9
    )
    assert f.n == x.size and f.n_dropped == 0 and not f.at_bound and f.warning == ""
    assert f.aic == pytest.approx(8 - 2 * f.loglik) and f.bic == pytest.approx(
        4 * math.log(x.size) - 2 * f.loglik
    )
    # Source: scipy.optimize Nelder-Mead from 4 starts; a dense brute-force grid
    assert f.loglik >= scipy_multistart(x) - 1e-8, name
    if x.size <= 250:
        assert f.loglik >= grid_max(x) - 1e-9, name
    # the skewed law nests the symmetric one: never a lower likelihood than errdist.fit
    assert f.loglik >= errdist.fit(x).loglik - 1e-9


@pytest.mark.parametrize("name", ["index2 last 250", "index1 days 3000-3250"])
def test_score_is_zero_at_the_fit(name: str) -> None:
    # Source: mpmath (30 digits) numerical derivatives of the log-likelihood written out from
    # the density, at the fitted location: the scale, shape and skew scores vanish (to what
    # a 1e-13 relative error of the parameters leaves), as at an exact maximum.
    import mpmath as mp

    x = WINDOWS[name]
    f = K.fit_skewed(x)
    xs = [mp.mpf(float(v)) for v in x]
    m = mp.mpf(f.loc)

    def ll(a, b, lam):  # type: ignore[no-untyped-def]
        total = len(xs) * (mp.log(b) - mp.log(2 * a) - mp.loggamma(1 / b))
        for v in xs:
            s = a * (1 + lam) if v >= m else a * (1 - lam)
            total -= (abs(v - m) / s) ** b
        return total

    with mp.workdps(30):
        a, b, lam = mp.mpf(f.scale), mp.mpf(f.shape), mp.mpf(f.skew)
        g_a = mp.diff(lambda t: ll(t, b, lam), a) * a
        g_b = mp.diff(lambda t: ll(a, t, lam), b) * b
        g_l = mp.diff(lambda t: ll(a, b, t), lam)
    n = len(xs)
    assert abs(g_a) < 1e-10 * n, g_a
    assert abs(g_b) < 1e-10 * n, g_b
    assert abs(g_l) < 1e-10 * n, g_l


def test_result_independent_of_order_and_equivariant() -> None:
    x = INDEX2[-500:]
    f = K.fit_skewed(x)
    rng = np.random.default_rng(3)
    for y in (x[::-1], rng.permutation(x), x.reshape(20, 25)):
        g = K.fit_skewed(y)
        assert (g.loc, g.scale, g.shape, g.skew, g.loglik) == (
            f.loc,
            f.scale,
            f.shape,
            f.skew,
            f.loglik,
        )
    # location-scale equivariance (percent units, shifted): same shape and skew
    h = K.fit_skewed(100.0 * x + 0.3)
    assert h.shape == pytest.approx(f.shape, rel=1e-12)
    assert h.skew == pytest.approx(f.skew, abs=1e-12)
    assert h.scale == pytest.approx(100.0 * f.scale, rel=1e-12)
    assert h.loc == pytest.approx(100.0 * f.loc + 0.3, rel=1e-12)
    assert h.loglik == pytest.approx(f.loglik - x.size * math.log(100.0), rel=1e-9)


def test_real_index_returns_are_left_skewed() -> None:
    # the loss tail of stock indices is the heavier one (common practice, no source):
    # over the full arch.data samples the fitted skew is negative
    for x in (INDEX2, INDEX1):
        f = K.fit_skewed(x)
        assert f.skew < 0.0
        assert 0.6 < f.shape < 1.2
        assert f.loglik >= errdist.fit(x).loglik


@pytest.mark.parametrize("lam", [-0.4, 0.3])
def test_recovers_asymmetric_laplace_parameters(lam: float) -> None:
    # data drawn by scipy.stats.laplace_asymmetric (kappa = sqrt((1-l)/(1+l)),
    # scale a sqrt(1 - l^2)); n = 4000: the estimates lie within a few standard errors
    a = 0.01
    kappa = math.sqrt((1 - lam) / (1 + lam))
    x = stats.laplace_asymmetric.rvs(
        kappa, loc=0.001, scale=a * math.sqrt(1 - lam * lam), size=4000, random_state=5
    )
    f = K.fit_skewed(x)
    assert f.shape == pytest.approx(1.0, abs=0.08)
    assert f.skew == pytest.approx(lam, abs=0.06)
    assert f.scale == pytest.approx(a, rel=0.08)


def test_two_piece_normal_data_give_shape_near_two() -> None:
    # two-piece normal drawn with numpy (half-normals of sd s1 left, s2 right, side chosen
    # with probability s1/(s1+s2)): shape near 2, location between observations
    rng = np.random.default_rng(8)
    s1, s2 = 0.6, 1.4
    left = rng.random(4000) < s1 / (s1 + s2)
    z = np.abs(rng.standard_normal(4000))
    x = np.where(left, -s1 * z, s2 * z)
    f = K.fit_skewed(x)
    assert f.shape == pytest.approx(2.0, abs=0.2)
    assert f.skew == pytest.approx((s2 - s1) / (s2 + s1), abs=0.06)
    assert not np.any(x == f.loc)


def test_many_equal_returns() -> None:
    # returns rounded to 0.1% (many ties, many exact zeros) as from a thinly traded series
    x = np.round(INDEX2[-250:], 3)
    assert np.count_nonzero(x == 0.0) >= 15
    f = K.fit_skewed(x)
    assert f.loglik >= scipy_multistart(x) - 1e-8
    assert f.loglik == pytest.approx(loglik_ref(x, f.loc, f.scale, f.shape, f.skew), rel=1e-12)
    if f.shape <= 0.1:
        assert f.at_bound and "repeated values" in f.warning
    # blanks are dropped and counted
    g = K.fit_skewed(np.concatenate([x, [np.nan, np.nan]]))
    assert g.n_dropped == 2 and g.loglik == f.loglik


def test_one_sided_data_hit_the_skew_bound() -> None:
    # exponential data: everything right of the mode; the skew is clipped and flagged
    x = stats.expon.rvs(size=300, random_state=2)
    f = K.fit_skewed(x)
    assert f.skew == pytest.approx(K.SKEW_MAX)
    assert f.at_bound and "skew at bound" in f.warning


def test_bad_data() -> None:
    with pytest.raises(InsufficientDataError, match="at least 5"):
        K.fit_skewed([0.1, 0.2, 0.3, 0.4])
    with pytest.raises(InsufficientDataError, match="no spread"):
        K.fit_skewed([0.1] * 10)
    with pytest.raises(DomainError, match="finite"):
        K.fit_skewed([0.1, 0.2, np.inf, 0.3, 0.5, 0.6])
    with pytest.raises(InputTypeError):
        K.fit_skewed(["a", 0.1, 0.2, 0.3, 0.4])


def test_local_method_from_a_start_and_mean_std() -> None:
    # Reference: the exact search (no start point) and scipy.integrate.quad of the fitted
    # density for the mean and standard deviation; data: arch.data index 1.
    from scipy import integrate

    r = INDEX1
    x0, x1 = r[2000:2500], r[2010:2510]  # two windows ten days apart, as in a rolling refit
    prev = K.fit_skewed(x0)
    local = K.fit_skewed(x1, start=prev, method="local")
    exact = K.fit_skewed(x1)
    assert local.loglik == pytest.approx(exact.loglik, abs=1e-6)
    assert local.loglik <= exact.loglik + 1e-9
    assert K.fit_skewed(x1, method="local").loglik == exact.loglik  # no start: exact search
    f = lambda t: K.pdf(t, exact.loc, exact.scale, exact.shape, exact.skew)  # noqa: E731
    pts = [exact.loc]
    mean = integrate.quad(lambda t: t * f(t), -1, 1, points=pts, limit=400, epsabs=1e-14)[0]
    m2 = integrate.quad(lambda t: (t - mean) ** 2 * f(t), -1, 1, points=pts, limit=400)[0]
    assert exact.mean == pytest.approx(mean, rel=1e-7, abs=1e-12)
    assert exact.std == pytest.approx(math.sqrt(m2), rel=1e-7)
    with pytest.raises(DomainError, match="method must be 'exact' or 'local'"):
        K.fit_skewed(x1, method="fast")
