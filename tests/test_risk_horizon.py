"""The "iid" horizon rule: the exact law of a sum of h i.i.d. generalized normal returns.

References (named beside each check):
* normal (shape 2): the sum of h i.i.d. N(mu, sigma^2) is N(h mu, h sigma^2) — scipy.stats.norm;
* Laplace (shape 1): the sum of h i.i.d. standard Laplace variables is G1 - G2 with G1, G2
  i.i.d. Gamma(h, 1) (characteristic function (1 + t^2)^-h = (1 + it)^-h (1 - it)^-h), whose
  tail is a finite sum of incomplete gamma functions (derived below, evaluated in mpmath);
* two days, any shape: P(Y1 + Y2 <= q) = int f(y) F(q - y) dy and
  E[Y1 + Y2; Y1 + Y2 <= q] = 2 int y f(y) F(q - y) dy by mpmath quadrature at 20 digits;
* seeded Monte Carlo with scipy.stats.gennorm draws (distribution-free order-statistic
  confidence interval for the quantile; CLT interval for the tail mean).
"""

from __future__ import annotations

import math

import mpmath as mp
import numpy as np
import pytest
from scipy import stats

from errdist.risk import expected_shortfall, value_at_risk

# the accuracy the iid rule promises (relative, VaR and ES)
REL = 1e-6


def test_one_day_iid_equals_closed_form() -> None:
    # h = 1: both rules are the one-day law; reference scipy.stats.gennorm.ppf.
    got = value_at_risk(0.99, 0.001, 0.01, 0.9, horizon=1, horizon_rule="iid")
    assert got == pytest.approx(-stats.gennorm.ppf(0.01, 0.9, loc=0.001, scale=0.01), rel=1e-10)


@pytest.mark.parametrize("h", [2, 10, 60])
@pytest.mark.parametrize("c", [0.95, 0.99, 0.995, 0.9999, 0.25])
def test_iid_normal_matches_closed_form(h: int, c: float) -> None:
    # Reference: scipy.stats.norm with mean h mu and sd sqrt(h) sigma; ES = sd phi(z_u)/u - mean.
    mu, sigma = 0.0004, 0.01
    u = 1 - c
    mean, sd = h * mu, math.sqrt(h) * sigma
    var_ref = -stats.norm.ppf(u, loc=mean, scale=sd)
    es_ref = sd * stats.norm.pdf(stats.norm.ppf(u)) / u - mean
    a = sigma * math.sqrt(2.0)
    got_var = value_at_risk(c, mu, a, 2.0, horizon=h, horizon_rule="iid")
    got_es = expected_shortfall(c, mu, a, 2.0, horizon=h, horizon_rule="iid")
    assert got_var == pytest.approx(var_ref, rel=REL)
    assert got_es == pytest.approx(es_ref, rel=REL)
    # the sqrt rule is exact for the normal, so both rules agree
    assert got_var == pytest.approx(value_at_risk(c, mu, a, 2.0, horizon=h), rel=REL)


def _laplace_sum_reference(h: int, q0: float, u: float) -> tuple[float, float]:
    """Quantile and tail mean of S = sum of h standard Laplace at lower-tail probability u.

    S = G1 - G2 (G i.i.d. Gamma(h, 1)). For v >= 0, with w_j = C(h-1, j) Gamma(j+h) /
    (2^(j+h) Gamma(h)^2), j = 0..h-1:
        density   f(v)         = e^-v sum_j w_j v^(h-1-j)
        tail      P(S >= v)    = sum_j w_j Gamma(h-j, v)
        tail mean E[S; S >= v] = sum_j w_j Gamma(h-j+1, v)
    (integrate f(v) = int g(v+y) g(y) dy term by term). By symmetry P(S <= -v) = P(S >= v).
    Newton in mpmath from the starting point q0 solves the tail equation.
    """
    with mp.workdps(30):
        w = [
            mp.binomial(h - 1, j) * mp.gamma(j + h) / (mp.mpf(2) ** (j + h) * mp.gamma(h) ** 2)
            for j in range(h)
        ]

        def tail(v):
            return mp.fsum(w[j] * mp.gammainc(h - j, v, mp.inf) for j in range(h))

        def dens(v):
            return mp.exp(-v) * mp.fsum(w[j] * v ** (h - 1 - j) for j in range(h))

        v = mp.mpf(-q0)
        for _ in range(50):
            step = (tail(v) - u) / dens(v)
            v += step
            if abs(step) < mp.mpf(10) ** -25 * v:
                break
        pmean = mp.fsum(w[j] * mp.gammainc(h - j + 1, v, mp.inf) for j in range(h))
        return float(-v), float(-pmean / u)


@pytest.mark.parametrize("h", [2, 5, 10, 30])
@pytest.mark.parametrize("c", [0.9, 0.99, 0.995, 0.9999])
def test_iid_laplace_matches_gamma_difference_closed_form(h: int, c: float) -> None:
    m, a = 0.0002, 0.007
    u = 1 - c
    got_var = value_at_risk(c, m, a, 1.0, horizon=h, horizon_rule="iid")
    got_es = expected_shortfall(c, m, a, 1.0, horizon=h, horizon_rule="iid")
    # start Newton from the normal approximation (variance 2h), not from our output
    q_ref, tail_ref = _laplace_sum_reference(h, stats.norm.ppf(u) * math.sqrt(2 * h), u)
    assert got_var == pytest.approx(-(h * m + a * q_ref), rel=REL)
    assert got_es == pytest.approx(-(h * m + a * tail_ref), rel=REL)


def _two_day_reference(shape: float, u: float) -> tuple[float, float]:
    """Quantile and tail mean of Y1 + Y2 (standard law) by mpmath quadrature at 20 digits."""
    with mp.workdps(20):
        b = mp.mpf(shape)
        norm_c = b / (2 * mp.gamma(1 / b))

        def pdf(y):
            return norm_c * mp.exp(-(abs(y) ** b))

        def cdf(y):
            t = mp.gammainc(1 / b, abs(y) ** b, mp.inf, regularized=True) / 2
            return t if y < 0 else 1 - t

        def conv_cdf(q):
            return mp.quad(lambda y: pdf(y) * cdf(q - y), [-mp.inf, q, 0, mp.inf])

        def conv_pdf(q):
            return mp.quad(lambda y: pdf(y) * pdf(q - y), [-mp.inf, q, 0, mp.inf])

        # start: the normal approximation with the law's variance (Nadarajah 2005)
        sd = mp.sqrt(2 * mp.gamma(3 / b) / mp.gamma(1 / b))
        q = sd * mp.mpf(stats.norm.ppf(u))
        for _ in range(60):
            step = (conv_cdf(q) - u) / conv_pdf(q)
            q -= step
            if abs(step) < mp.mpf(10) ** -15 * abs(q):
                break
        tail = 2 * mp.quad(lambda y: y * pdf(y) * cdf(q - y), [-mp.inf, q, 0, mp.inf])
        return float(q), float(tail / u)


@pytest.mark.parametrize("shape", [0.25, 0.5, 1.5, 3.0])
def test_iid_two_days_matches_mpmath_convolution(shape: float) -> None:
    u = 0.005
    q_ref, tail_ref = _two_day_reference(shape, u)
    m, a = -0.0001, 0.01
    got_var = value_at_risk(1 - u, m, a, shape, horizon=2, horizon_rule="iid")
    got_es = expected_shortfall(1 - u, m, a, shape, horizon=2, horizon_rule="iid")
    assert got_var == pytest.approx(-(2 * m + a * q_ref), rel=REL)
    assert got_es == pytest.approx(-(2 * m + a * tail_ref), rel=REL)


@pytest.mark.parametrize("shape", [0.7, 1.5])
def test_iid_ten_days_matches_seeded_monte_carlo(shape: float) -> None:
    # Monte Carlo with scipy.stats.gennorm draws, seed 20261202, n = 200,000 ten-day sums.
    # Quantile: distribution-free order-statistic interval, ranks n u -/+ 4.5 sqrt(n u (1-u))
    # (binomial count of sums below the true quantile); false-alarm rate about 1e-5.
    # ES: CLT interval +/- 4.5 SE with SE^2 = [Var(X | X <= q) + (1-u)(E[X | X <= q] - q)^2]/(n u)
    # (asymptotic variance of the empirical tail mean).
    h, n, c = 10, 200_000, 0.99
    u = 1 - c
    rng = np.random.default_rng(20261202)
    sums = stats.gennorm.rvs(shape, size=(n, h), random_state=rng).sum(axis=1)
    sums.sort()
    half = 4.5 * math.sqrt(n * u * (1 - u))
    lo, hi = sums[int(n * u - half)], sums[int(math.ceil(n * u + half))]
    var = value_at_risk(c, 0.0, 1.0, shape, horizon=h, horizon_rule="iid")
    assert lo <= -var <= hi
    k = int(round(n * u))
    tail = sums[:k]
    se = math.sqrt((tail.var(ddof=1) + (1 - u) * (tail.mean() - sums[k]) ** 2) / (n * u))
    es = expected_shortfall(c, 0.0, 1.0, shape, horizon=h, horizon_rule="iid")
    assert abs(es - (-tail.mean())) < 4.5 * se


def test_iid_vectorised_and_symmetric() -> None:
    # Symmetry of the sum's law about h m: q_u - h m = -(q_{1-u} - h m); elementwise equals scalar.
    m, a, b, h = 0.001, 0.01, 0.9, 5
    conf = np.array([0.2, 0.5, 0.8, 0.99])
    var = value_at_risk(conf, m, a, b, horizon=h, horizon_rule="iid")
    for ci, vi in zip(conf, var, strict=True):
        assert vi == pytest.approx(
            value_at_risk(float(ci), m, a, b, horizon=h, horizon_rule="iid"), rel=1e-12
        )
    assert var[0] + var[2] == pytest.approx(-2 * h * m, abs=1e-9)
    assert var[1] == pytest.approx(-h * m, abs=1e-9)
    es = expected_shortfall(conf, m, a, b, horizon=h, horizon_rule="iid")
    assert np.all(es > var)
    # several shapes in one call: grouped per shape, same as one at a time
    shapes = np.array([0.9, 1.8])
    both = value_at_risk(0.99, m, a, shapes, horizon=h, horizon_rule="iid")
    assert both[0] == pytest.approx(value_at_risk(0.99, m, a, 0.9, horizon=h, horizon_rule="iid"))
