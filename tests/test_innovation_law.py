"""The skewed error law as innovation law: its math and its ``arch`` distribution.

References (named beside each check): arch's GeneralizedError (arch 7/8, K. Sheppard),
scipy.stats.gennorm, scipy.stats.laplace_asymmetric, numerical integration
(scipy.integrate.quad), and errdist.law.skewed (the separately written skewed-law module).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import integrate, stats

from errdist.risk import innovation_law as L

arch = pytest.importorskip("arch", reason="the arch package is not installed")
from arch.univariate import GARCH, ConstantMean, GeneralizedError  # noqa: E402

from errdist.risk.arch_law import SkewedErrorInnovations  # noqa: E402

CASES = [(0.5, -0.6), (0.8, -0.3), (1.0, 0.0), (1.5, 0.2), (2.0, 0.0), (3.5, -0.1)]


@pytest.mark.parametrize("nu", [1.02, 1.3, 2.0, 3.5, 12.0])
def test_loglik_equals_arch_generalized_error_at_skew_0(nu: float) -> None:
    # Reference: arch.univariate.GeneralizedError.loglikelihood (standardized GED, nu > 1.01).
    rng = np.random.default_rng(11)
    e = rng.standard_t(4, 400)
    s2 = rng.uniform(0.3, 3.0, 400)
    ours = SkewedErrorInnovations().loglikelihood([nu, 0.0], e, s2, individual=True)
    ref = GeneralizedError().loglikelihood([nu], e, s2, individual=True)
    np.testing.assert_allclose(ours, ref, rtol=1e-13, atol=1e-10)
    sym = SkewedErrorInnovations(skewed=False).loglikelihood([nu], e, s2)
    assert sym == pytest.approx(float(np.sum(ref)), rel=1e-13, abs=1e-9)


def test_garch_fit_matches_arch_ged_when_shape_above_its_bound() -> None:
    # Reference: arch's own GARCH(1,1)-GED fit. On data whose MLE shape is well above 1.01 the
    # two bounds do not bind, so both fits must find the same maximum.
    rng = np.random.default_rng(5)
    y = 0.8 * rng.standard_normal(1500)
    ours = ConstantMean(y, volatility=GARCH(1, 0, 1), distribution=SkewedErrorInnovations(False))
    ref = ConstantMean(y, volatility=GARCH(1, 0, 1), distribution=GeneralizedError())
    r1 = ours.fit(disp="off")
    r2 = ref.fit(disp="off")
    assert r1.params.iloc[-1] > 1.1
    assert r1.loglikelihood == pytest.approx(r2.loglikelihood, abs=1e-4)
    np.testing.assert_allclose(r1.params.to_numpy(), r2.params.to_numpy(), atol=5e-3)


def test_shape_below_arch_bound_is_allowed() -> None:
    # arch's GeneralizedError refuses nu <= 1.01; errdist's law goes down to 0.3.
    lo, _ = SkewedErrorInnovations().bounds(np.empty(0))[0]
    assert lo == pytest.approx(0.3)
    assert GeneralizedError().bounds(np.empty(0))[0][0] > 1.0
    # a Laplace-like heavy tail: the fitted shape must go below 1.01
    rng = np.random.default_rng(2)
    y = rng.laplace(size=3000) * rng.choice([0.5, 1.0, 3.0], 3000)  # a scale mixture: shape < 1
    res = ConstantMean(y, volatility=GARCH(1, 0, 1), distribution=SkewedErrorInnovations()).fit(
        disp="off"
    )
    assert res.params["nu"] < 1.0


@pytest.mark.parametrize(("b", "lam"), CASES)
def test_standardized_law_integrates_to_mean_0_variance_1(b: float, lam: float) -> None:
    # Reference: numerical integration of the density (scipy.integrate.quad), split at the mode.
    m, _ = L.standardized_params(b, lam)

    def f(z: float) -> float:
        return math.exp(float(L.standardized_logpdf(z, b, lam)))

    def q(g: object) -> float:
        return sum(
            integrate.quad(g, lo, hi, limit=200)[0] for lo, hi in ((-np.inf, m), (m, np.inf))
        )

    assert q(f) == pytest.approx(1.0, abs=1e-9)
    assert q(lambda z: z * f(z)) == pytest.approx(0.0, abs=1e-9)
    assert q(lambda z: z * z * f(z)) == pytest.approx(1.0, abs=1e-8)


@pytest.mark.parametrize(("b", "lam"), CASES)
@pytest.mark.parametrize("u", [0.001, 0.01, 0.025, 0.6, 0.97])
def test_quantile_and_tail_mean_against_integration(b: float, lam: float, u: float) -> None:
    # Reference: scipy.integrate.quad of the density and of z * density up to the quantile.
    m, _ = L.standardized_params(b, lam)

    def f(z: float) -> float:
        return math.exp(float(L.standardized_logpdf(z, b, lam)))

    qz, e = L.lower_tail(u, b, lam)
    if qz <= m:
        mass = integrate.quad(f, -np.inf, qz, limit=200, epsabs=0, epsrel=1e-13)[0]
        part = integrate.quad(lambda z: z * f(z), -np.inf, qz, limit=200, epsabs=0, epsrel=1e-13)[0]
    else:
        mass = 1.0 - integrate.quad(f, qz, np.inf, limit=200)[0]
        part = -integrate.quad(lambda z: z * f(z), qz, np.inf, limit=200)[0]
    assert mass == pytest.approx(u, rel=1e-9)
    assert part / u == pytest.approx(e, rel=1e-8, abs=1e-12)


@pytest.mark.parametrize("lam", [-0.5, -0.2, 0.3])
def test_shape_1_is_scipy_asymmetric_laplace(lam: float) -> None:
    # Reference: scipy.stats.laplace_asymmetric(kappa, scale=s) has right scale s/kappa and
    # left scale s*kappa: kappa = sqrt((1-lam)/(1+lam)), s = a*sqrt(1-lam^2), loc = the mode.
    m, a = L.standardized_params(1.0, lam)
    ref = stats.laplace_asymmetric(
        math.sqrt((1 - lam) / (1 + lam)), loc=m, scale=a * math.sqrt(1 - lam**2)
    )
    z = np.linspace(-6, 6, 41)
    np.testing.assert_allclose(
        L.standardized_logpdf(z, 1.0, lam), ref.logpdf(z), rtol=1e-13, atol=1e-13
    )
    for u in (0.005, 0.01, 0.05):
        qz, e = L.lower_tail(u, 1.0, lam)
        assert qz == pytest.approx(ref.ppf(u), rel=1e-12)
        assert e == pytest.approx(ref.expect(lambda x: x, ub=qz, conditional=True), rel=1e-7)


def test_symmetric_case_is_scipy_gennorm() -> None:
    # Reference: scipy.stats.gennorm(beta) scaled to unit variance.
    for b in (0.7, 1.3, 2.0):
        g = stats.gennorm(b, scale=1.0 / math.sqrt(stats.gennorm(b).var()))
        z = np.linspace(-5, 5, 21)
        np.testing.assert_allclose(L.standardized_logpdf(z, b, 0.0), g.logpdf(z), rtol=1e-12)
        assert L.standardized_ppf(0.01, b, 0.0) == pytest.approx(g.ppf(0.01), rel=1e-10)


def test_agrees_with_the_skewed_law_module() -> None:
    # Reference: errdist.law.skewed (written separately): same density, VaR and ES.
    sk = pytest.importorskip("errdist.law.skewed")
    for b, lam in CASES:
        m, a = L.standardized_params(b, lam)
        z = np.linspace(-4, 4, 17)
        np.testing.assert_allclose(
            L.standardized_logpdf(z, b, lam), sk.logpdf(z, m, a, b, lam), atol=1e-13
        )
        qz, e = L.lower_tail(0.01, b, lam)
        assert -qz == pytest.approx(sk.value_at_risk(0.99, m, a, b, lam), rel=1e-12)
        assert -e == pytest.approx(sk.expected_shortfall(0.99, m, a, b, lam), rel=1e-10)


def test_draws_have_the_law() -> None:
    # Reference: scipy.stats.kstest of the draws against the law's cdf (arch adapter's cdf).
    d = SkewedErrorInnovations(seed=3)
    draws = d.simulate([0.9, -0.3])(20000)
    res = stats.kstest(draws, lambda x: d.cdf(x, [0.9, -0.3]))
    assert res.pvalue > 0.001
    assert abs(draws.mean()) < 0.03 and abs(draws.var() - 1) < 0.05
    assert d.ppf(0.01, [0.9, -0.3]) == pytest.approx(L.standardized_ppf(0.01, 0.9, -0.3))
