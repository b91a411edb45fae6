"""Reference tests for the skewed error law (errdist.law.skewed).

Outside sources named beside each check: mpmath (numerical integration of the density at 40
digits, incomplete gamma), scipy.stats.laplace_asymmetric (the shape-1 case), the two-piece
normal's published moments (Wallis, K.F. 2014, "The two-piece normal, binormal, or double
Gaussian distribution: its origin and rediscoveries", Statistical Science 29(1):106-112 --
formulas from memory), and the symmetric law errdist.distribution at skew 0 (itself tested
against scipy.stats.gennorm and mpmath in test_distribution.py).
"""

from __future__ import annotations

import math

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import special as sc
from scipy import stats

import errdist
from errdist.errors import DomainError, InputTypeError
from errdist.law import skewed as K


@pytest.fixture(autouse=True)
def _mp_digits():  # type: ignore[no-untyped-def]
    """40 significant digits for every mpmath reference here, whatever other modules set."""
    with mp.workdps(40):
        yield


SHAPES = [0.4, 0.7, 1.0, 1.3, 2.0, 3.5, 8.0]
SKEWS = [-0.9, -0.5, -0.15, 0.2, 0.6]


# ------------------------------------------------------------------ mpmath references
def mp_pdf(x, m, a, b, lam):
    """The density as defined by Fernández & Steel (1998) with bounded skew, in mpmath."""
    x, m, a, b, lam = (mp.mpf(v) for v in (x, m, a, b, lam))
    s = a * (1 + lam) if x >= m else a * (1 - lam)
    return b / (2 * a * mp.gamma(1 / b)) * mp.exp(-((abs(x - m) / s) ** b))


def mp_cdf_sf_quad(x, m, a, b, lam):
    """(F(x), S(x)), each by numerical integration of mp_pdf (40 digits), split at the mode.

    The far-side integrand is multiplied by exp(z), z = (|x - m|/s)^b, and the result divided
    by it again: mpmath's quadrature stops on an absolute error near 10^-40, so a tail mass
    of 1e-46 would otherwise keep only a few digits. Break points at multiples of the
    e-folding length |x - m|/(b z) of the density beyond x.
    """
    x, m = mp.mpf(x), mp.mpf(m)
    s = a * (1 - lam) if x < m else a * (1 + lam)
    z = (abs(x - m) / s) ** b
    boost = mp.exp(z)
    f = lambda t: mp_pdf(t, m, a, b, lam)  # noqa: E731
    g = lambda t: mp_pdf(t, m, a, b, lam) * boost  # noqa: E731
    step = abs(x - m) / (b * z) if z > 1 else s
    fan = [step * k for k in (0.5, 2, 8, 32, 128)]
    if x < m:
        lower = mp.quad(g, [-mp.inf, *[x - h for h in reversed(fan)], x]) / boost
        upper = mp.quad(f, [x, m, m + a * (1 + lam), mp.inf])
    else:
        near = [-mp.inf, m - a * (1 - lam), m] + ([x] if x > m else [])
        lower = mp.quad(f, near)
        upper = mp.quad(g, [x, *[x + h for h in fan], mp.inf]) / boost
    return lower, upper


def mp_tail_quad(x, m, a, b, lam):
    """The far-side tail mass by integration: F(x) below the mode, S(x) above."""
    f = lambda t: mp_pdf(t, m, a, b, lam)  # noqa: E731
    return mp.quad(f, [-mp.inf, x]) if x < m else mp.quad(f, [x, mp.inf])


def mp_tail_gamma(x, m, a, b, lam):
    """The far-side tail mass as (1 -/+ lam)/2 Q(1/b, z) with mpmath's incomplete gamma
    (used where quadrature is slow: far tails; checked against quadrature below)."""
    x, m, a, b, lam = (mp.mpf(v) for v in (x, m, a, b, lam))
    s = 1 - lam if x < m else 1 + lam
    z = (abs(x - m) / (a * s)) ** b
    return s / 2 * mp.gammainc(1 / b, z, mp.inf, regularized=True)


def mp_moment(k, m, a, b, lam, centre=0):
    """E[(X - centre)^k] by integration (40 digits), split at the mode."""
    f = lambda t: (t - centre) ** k * mp_pdf(t, m, a, b, lam)  # noqa: E731
    return mp.quad(f, [-mp.inf, m]) + mp.quad(f, [m, mp.inf])


def rel(ours: float, ref) -> float:
    return float(abs((mp.mpf(ours) - ref) / ref))


# ------------------------------------------------------------------ cdf / sf vs integration
@pytest.mark.parametrize("b", [0.7, 2.0, 3.5])
@pytest.mark.parametrize("lam", [-0.6, 0.3])
def test_cdf_sf_match_mpmath_quadrature(b: float, lam: float) -> None:
    # Source: mpmath quad of the defining density, 40 digits.
    m, a = 0.3, 1.7
    # (the far tails are checked against mpmath's incomplete gamma in test_far_tails_*)
    for d in (-4.0, -1.0, -0.2, 0.0, 0.2, 1.0, 4.0):
        x = m + a * d
        ref_cdf, ref_sf = mp_cdf_sf_quad(x, m, a, b, lam)
        # exp(-z) has condition number b*z in x: allow for the rounding of x and a(1 +- l)
        s = 1 - lam if x < m else 1 + lam
        tol = 1e-13 + 4e-16 * b * (abs(x - m) / (a * s)) ** b
        if ref_cdf > mp.mpf("1e-300"):
            assert rel(K.cdf(x, m, a, b, lam), ref_cdf) < tol, (x, b, lam)
        if ref_sf > mp.mpf("1e-300"):
            assert rel(K.sf(x, m, a, b, lam), ref_sf) < tol, (x, b, lam)
        # log of the larger mass from the smaller one (1 - tiny keeps 40 digits only so)
        ref_logcdf = mp.log(ref_cdf) if ref_cdf < ref_sf else mp.log1p(-ref_sf)
        ref_logsf = mp.log(ref_sf) if ref_sf < ref_cdf else mp.log1p(-ref_cdf)
        for ours, ref in (
            (K.logcdf(x, m, a, b, lam), ref_logcdf),
            (K.logsf(x, m, a, b, lam), ref_logsf),
        ):
            # log1p(-tail) with a tail below 1e-300 rounds to -0.0: compare absolutely there
            assert abs(ours - ref) <= tol * abs(ref) + 1e-300, (x, b, lam, ours)
        if mp_pdf(x, m, a, b, lam) > mp.mpf("1e-300"):
            assert rel(K.pdf(x, m, a, b, lam), mp_pdf(x, m, a, b, lam)) < tol
        assert rel(K.logpdf(x, m, a, b, lam), mp.log(mp_pdf(x, m, a, b, lam))) < tol


def test_gamma_reference_agrees_with_quadrature() -> None:
    # the incomplete-gamma reference used for the far tails equals the integral (mpmath both)
    for x in (-4.0, 5.0):
        for b, lam in ((0.7, -0.5), (2.0, 0.4)):
            q = mp_tail_quad(x, 0.0, 1.0, b, lam)
            g = mp_tail_gamma(x, 0.0, 1.0, b, lam)
            assert abs(q - g) / g < mp.mpf("1e-25")


@pytest.mark.parametrize("b", SHAPES)
@pytest.mark.parametrize("lam", SKEWS)
def test_far_tails_match_mpmath(b: float, lam: float) -> None:
    # Source: mpmath gammainc (40 digits). Tail masses down to 1e-300 and log tails where they
    # underflow: relative error <= 1e-13 (the symmetric core's standard).
    m, a = 0.0, 1.0
    for z in (3.0, 30.0, 300.0, 2000.0):
        d = z ** (1.0 / b)
        for side in (-1.0, 1.0):
            s = 1.0 - lam if side < 0 else 1.0 + lam
            x = m + side * a * s * d
            ref = mp_tail_gamma(x, m, a, b, lam)
            if side < 0:
                ours, logs = K.cdf(x, m, a, b, lam), K.logcdf(x, m, a, b, lam)
            else:
                ours, logs = K.sf(x, m, a, b, lam), K.logsf(x, m, a, b, lam)
            # condition number b*z in x: x = s*d and x/s each round once
            tol = 1e-13 + 4e-16 * b * z
            if ref > mp.mpf("1e-300"):
                assert rel(ours, ref) < tol, (x, b, lam, ours)
            assert rel(logs, mp.log(ref)) < tol, (x, b, lam, logs)


def test_arrays_match_scalars() -> None:
    x = np.linspace(-4, 4, 17)
    p = np.array([1e-200, 1e-9, 0.01, 0.2, 0.5, 0.7, 0.99, 1 - 1e-12])
    for fn in (K.pdf, K.logpdf, K.cdf, K.sf, K.logcdf, K.logsf):
        arr = fn(x, 0.2, 1.1, 1.4, -0.3)
        assert arr.shape == x.shape
        for xi, yi in zip(x, arr, strict=True):
            # the array and scalar paths round differently by at most an ulp or two
            assert yi == pytest.approx(fn(float(xi), 0.2, 1.1, 1.4, -0.3), rel=4e-15, abs=0)
    for fn in (K.ppf, K.isf):
        arr = fn(p, 0.2, 1.1, 1.4, -0.3)
        for pi, yi in zip(p, arr, strict=True):
            assert yi == pytest.approx(fn(float(pi), 0.2, 1.1, 1.4, -0.3), rel=4e-15, abs=0)
    # broadcasting over the skew
    lam = np.array([-0.5, 0.0, 0.5])
    out = K.cdf(0.3, 0.0, 1.0, 1.5, lam)
    assert out.shape == (3,)
    assert out[1] == pytest.approx(errdist.cdf(0.3, 0.0, 1.0, 1.5), rel=4e-16, abs=0)


# ------------------------------------------------------------------ skew 0 = the symmetric law
@pytest.mark.parametrize("b", SHAPES)
def test_skew_zero_is_the_symmetric_law_bit_for_bit(b: float) -> None:
    # Source: errdist's symmetric law (tested against scipy.stats.gennorm and mpmath).
    x = np.concatenate([-np.geomspace(50, 1e-3, 20), [0.0], np.geomspace(1e-3, 50, 20)])
    p = np.array([0.0, 1e-300, 1e-20, 1e-3, 0.04, 0.05, 0.3, 0.5, 0.7, 0.95, 0.96, 1 - 1e-9, 1.0])
    m, a = 0.01, 0.02
    x = m + a * x
    for name in ("pdf", "logpdf", "cdf", "sf", "logcdf", "logsf"):
        ours, sym = getattr(K, name), getattr(errdist, name)
        np.testing.assert_array_equal(ours(x, m, a, b, 0.0), sym(x, m, a, b))
        np.testing.assert_array_equal(ours(x, m, a, b), sym(x, m, a, b))
        for xi in x[::5]:
            assert ours(float(xi), m, a, b, 0.0) == sym(float(xi), m, a, b)
    for name in ("ppf", "isf"):
        ours, sym = getattr(K, name), getattr(errdist, name)
        np.testing.assert_array_equal(ours(p, m, a, b, 0.0), sym(p, m, a, b))
        for pi in p:
            assert ours(float(pi), m, a, b, 0.0) == sym(float(pi), m, a, b)
    assert K.variance(a, b, 0.0) == errdist.variance(a, b)
    assert K.excess_kurtosis(b, 0.0) == errdist.excess_kurtosis(b)
    assert K.mean(m, a, b, 0.0) == m
    assert K.skewness(b, 0.0) == 0.0
    for c in (0.95, 0.99, 0.975):
        assert K.value_at_risk(c, m, a, b, 0.0) == errdist.value_at_risk(c, m, a, b)
        assert K.expected_shortfall(c, m, a, b, 0.0) == errdist.expected_shortfall(c, m, a, b)
    np.testing.assert_array_equal(K.rvs(50, m, a, b, 0.0, seed=7), errdist.rvs(50, m, a, b, seed=7))


def test_tiny_skew_is_continuous() -> None:
    # no jump at 0 (common practice, no source: the law is continuous in its parameters)
    for fn in (K.cdf, K.sf, K.pdf):
        v0 = fn(-0.5, 0.0, 1.0, 1.3, 0.0)
        assert abs(fn(-0.5, 0.0, 1.0, 1.3, 1e-12) - v0) < 1e-11
        assert abs(fn(-0.5, 0.0, 1.0, 1.3, -1e-12) - v0) < 1e-11


# ------------------------------------------------------------------ shape 1: scipy's asymmetric Laplace
@pytest.mark.parametrize("lam", [-0.8, -0.3, 0.1, 0.5])
def test_shape_one_is_scipy_laplace_asymmetric(lam: float) -> None:
    # Source: scipy.stats.laplace_asymmetric, density exp(-x kappa) (x >= 0), exp(x/kappa)
    # (x < 0) over (kappa + 1/kappa) times scale; mapping (derived): kappa = sqrt((1-l)/(1+l)),
    # scipy scale = a sqrt(1 - l^2).
    m, a = 0.002, 0.011
    kappa = math.sqrt((1 - lam) / (1 + lam))
    ref = stats.laplace_asymmetric(kappa, loc=m, scale=a * math.sqrt(1 - lam * lam))
    x = m + a * np.linspace(-8, 8, 33)
    np.testing.assert_allclose(K.pdf(x, m, a, 1.0, lam), ref.pdf(x), rtol=1e-13)
    below, above = x < m, x >= m
    np.testing.assert_allclose(K.cdf(x, m, a, 1.0, lam)[below], ref.cdf(x)[below], rtol=1e-13)
    np.testing.assert_allclose(K.sf(x, m, a, 1.0, lam)[above], ref.sf(x)[above], rtol=1e-13)
    p = np.array([1e-10, 1e-4, 0.01, 0.2, 0.5, 0.8, 0.99])
    np.testing.assert_allclose(K.ppf(p, m, a, 1.0, lam), ref.ppf(p), rtol=1e-12, atol=1e-17)
    np.testing.assert_allclose(K.isf(p, m, a, 1.0, lam), ref.isf(p), rtol=1e-12, atol=1e-17)
    mu, var, skw, kur = ref.stats(moments="mvsk")
    assert K.mean(m, a, 1.0, lam) == pytest.approx(float(mu), rel=1e-13)
    assert K.variance(a, 1.0, lam) == pytest.approx(float(var), rel=1e-13)
    assert K.skewness(1.0, lam) == pytest.approx(float(skw), rel=1e-12)
    assert K.excess_kurtosis(1.0, lam) == pytest.approx(float(kur), rel=1e-12)
    # Kolmogorov-Smirnov of our draws against scipy's cdf (fixed seed; p far from 0)
    draws = K.rvs(4000, m, a, 1.0, lam, seed=11)
    assert stats.kstest(draws, ref.cdf).pvalue > 0.01


# ------------------------------------------------------------------ shape 2: two-piece normal
@pytest.mark.parametrize("lam", [-0.7, -0.2, 0.4])
def test_shape_two_is_the_two_piece_normal(lam: float) -> None:
    # Source: the two-piece normal with sigma_1 = a(1-l)/sqrt2 (left), sigma_2 = a(1+l)/sqrt2:
    # F(x) = (s1/(s1+s2)) * 2 Phi((x-m)/s1) below m; mean m + sqrt(2/pi)(s2 - s1);
    # variance (1 - 2/pi)(s2 - s1)^2 + s1 s2 (Wallis 2014, from memory).
    m, a = -0.001, 0.013
    s1, s2 = a * (1 - lam) / math.sqrt(2), a * (1 + lam) / math.sqrt(2)
    w1, w2 = s1 / (s1 + s2), s2 / (s1 + s2)
    for d in (-9.0, -3.0, -0.5, 0.0, 0.5, 3.0, 9.0):
        x = m + d * a
        if x < m:
            ref = 2 * w1 * stats.norm.cdf((x - m) / s1)
            assert K.cdf(x, m, a, 2.0, lam) == pytest.approx(ref, rel=1e-13)
        else:
            ref = 2 * w2 * stats.norm.sf((x - m) / s2)
            assert K.sf(x, m, a, 2.0, lam) == pytest.approx(ref, rel=1e-13)
    assert K.mean(m, a, 2.0, lam) == pytest.approx(
        m + math.sqrt(2 / math.pi) * (s2 - s1), rel=1e-13
    )
    ref_var = (1 - 2 / math.pi) * (s2 - s1) ** 2 + s1 * s2
    assert K.variance(a, 2.0, lam) == pytest.approx(ref_var, rel=1e-13)


# ------------------------------------------------------------------ moments vs integration
@pytest.mark.parametrize("b", [0.6, 1.7, 4.0])
@pytest.mark.parametrize("lam", [-0.7, 0.45])
def test_moments_match_mpmath_quadrature(b: float, lam: float) -> None:
    # Source: mpmath quad of x^k f(x), 40 digits.
    m, a = 0.4, 1.3
    mu = mp_moment(1, m, a, b, lam)
    var = mp_moment(2, m, a, b, lam, mu)
    m3 = mp_moment(3, m, a, b, lam, mu)
    m4 = mp_moment(4, m, a, b, lam, mu)
    assert rel(K.mean(m, a, b, lam), mu) < 1e-13
    assert rel(K.variance(a, b, lam), var) < 1e-13
    assert rel(K.skewness(b, lam), m3 / var**1.5) < 1e-12
    assert rel(K.excess_kurtosis(b, lam), m4 / var**2 - 3) < 1e-12
    for k in (1, 2, 3, 4):
        assert rel(K.raw_moment_pieces(k, b, lam), mp_moment(k, 0, 1, b, lam)) < 1e-13
    # sign of the skewness follows the skew
    assert math.copysign(1.0, K.skewness(b, lam)) == math.copysign(1.0, lam)


@pytest.mark.parametrize("b", [0.8, 1.6, 5.0])
@pytest.mark.parametrize("lam", [-0.5, 0.0])
def test_standardized_params_give_mean_zero_variance_one(b: float, lam: float) -> None:
    # Source: mpmath quad (40 digits) of the law at the returned (loc, scale).
    loc, scale = K.standardized_params(b, lam)
    mu = mp_moment(1, loc, scale, b, lam)
    var = mp_moment(2, loc, scale, b, lam, mu)
    assert abs(mu) < 1e-14
    assert abs(var - 1) < 1e-14
    if lam == 0.0:
        assert loc == 0.0 and scale == pytest.approx(math.sqrt(sc.gamma(1 / b) / sc.gamma(3 / b)))
    arr_loc, arr_scale = K.standardized_params(np.array([b, b]), np.array([lam, -lam]))
    assert arr_loc[0] == loc and arr_scale[0] == scale and arr_loc[1] == -loc


# ------------------------------------------------------------------ VaR and ES
@pytest.mark.parametrize("b", [0.7, 1.0, 1.5, 2.0, 3.0])
@pytest.mark.parametrize("lam", [-0.6, -0.2, 0.3])
@pytest.mark.parametrize("c", [0.95, 0.975, 0.99, 0.999, 0.2])
def test_var_es_match_mpmath(b: float, lam: float, c: float) -> None:
    # Source: mpmath findroot of the integrated cdf (VaR) and quad of x f(x) below it (ES).
    m, a = 0.0005, 0.009
    var = K.value_at_risk(c, m, a, b, lam)
    q = -var
    u = 1 - mp.mpf(c)
    ref_u = mp_cdf_sf_quad(q, m, a, b, lam)[0]
    assert rel(ref_u, u) < 1e-13  # the quantile has the right tail mass
    f = lambda t: t * mp_pdf(t, m, a, b, lam)  # noqa: E731
    pieces = [-mp.inf, q] if q <= m else [-mp.inf, m, q]
    ref_es = -mp.quad(f, pieces) / ref_u
    es = K.expected_shortfall(c, m, a, b, lam)
    assert rel(es, ref_es) < 1e-12
    assert es >= var


@pytest.mark.parametrize(("b", "lam"), [(0.7, -0.6), (1.5, 0.3), (3.0, -0.2)])
@pytest.mark.parametrize("p", [1e-12, 1e-4, 0.05, 0.8])
def test_lower_tail_matches_mpmath(b: float, lam: float, p: float) -> None:
    # Source: mpmath quad of the density (tail mass) and of x f(x) below the quantile.
    # Tiny p is given as a probability, not as a confidence 1 - p (which would round).
    m, a = 0.0005, 0.009
    q, tail_mean = K.lower_tail(p, m, a, b, lam)
    ref_u = mp_cdf_sf_quad(q, m, a, b, lam)[0]
    assert rel(ref_u, mp.mpf(p)) < 1e-12
    f = lambda t: t * mp_pdf(t, m, a, b, lam)  # noqa: E731
    pieces = [-mp.inf, q] if q <= m else [-mp.inf, m, q]
    assert rel(tail_mean, mp.quad(f, pieces) / ref_u) < 1e-12
    qs, _ = K.lower_tail(np.array([p, p]), m, a, b, np.array([lam, -lam]))
    assert qs[0] == q
    with pytest.raises(DomainError, match="p must be a probability in"):
        K.lower_tail(0.0, m, a, b, lam)


@pytest.mark.parametrize("lam", [-0.4, 0.25])
def test_laplace_es_is_var_plus_left_half_scale(lam: float) -> None:
    # Source: exponential tail (memoryless), common practice: ES = VaR + a(1 - l) for b = 1.
    m, a = 0.001, 0.01
    for c in (0.95, 0.99, 0.999):
        var = K.value_at_risk(c, m, a, 1.0, lam)
        assert K.expected_shortfall(c, m, a, 1.0, lam) == pytest.approx(
            var + a * (1 - lam), rel=1e-13
        )


def test_var_es_amount_horizon_and_arrays() -> None:
    m, a, b, lam = 0.0004, 0.01, 1.2, -0.3
    var1 = K.value_at_risk(0.99, m, a, b, lam)
    assert K.value_at_risk(0.99, m, a, b, lam, amount=1e6) == pytest.approx(1e6 * var1, rel=1e-15)
    # square-root-of-time around the mean (common practice, no source)
    mu = K.mean(m, a, b, lam)
    h = 10
    assert K.value_at_risk(0.99, m, a, b, lam, horizon=h) == pytest.approx(
        -(h * mu + math.sqrt(h) * (-var1 - mu)), rel=1e-14
    )
    cs = np.array([0.95, 0.99])
    out = K.expected_shortfall(cs, m, a, b, lam)
    assert out.shape == (2,) and out[1] == K.expected_shortfall(0.99, m, a, b, lam)
    # a heavier left tail (more negative skew, same variance) gives a larger 99% ES
    l0, s0 = K.standardized_params(b, 0.0)
    l1, s1 = K.standardized_params(b, -0.3)
    assert K.expected_shortfall(0.99, l1, s1, b, -0.3) > K.expected_shortfall(0.99, l0, s0, b, 0.0)


# ------------------------------------------------------------------ round trips
@settings(max_examples=300, deadline=None)
@given(
    p=st.floats(1e-300, 1.0, exclude_max=True),
    b=st.floats(0.2, 12.0),
    lam=st.floats(-0.98, 0.98),
)
def test_ppf_cdf_round_trip(p: float, b: float, lam: float) -> None:
    # cdf(ppf(p)) = p; relative in the lower tail, absolute near 1 (conditioning of 1 - p).
    x = K.ppf(p, 0.3, 2.0, b, lam)
    back = K.cdf(x, 0.3, 2.0, b, lam)
    assert abs(back - p) <= 1e-12 * p + 4e-16
    y = K.isf(p, 0.3, 2.0, b, lam)
    back_s = K.sf(y, 0.3, 2.0, b, lam)
    assert abs(back_s - p) <= 1e-12 * p + 4e-16


@settings(max_examples=200, deadline=None)
@given(d=st.floats(-30.0, 30.0), b=st.floats(0.3, 8.0), lam=st.floats(-0.95, 0.95))
def test_cdf_plus_sf_is_one_and_monotone(d: float, b: float, lam: float) -> None:
    c, s = K.cdf(d, 0.0, 1.0, b, lam), K.sf(d, 0.0, 1.0, b, lam)
    assert abs(c + s - 1.0) <= 2e-16
    assert K.cdf(d + 1e-3, 0.0, 1.0, b, lam) >= c


def test_mode_splits_the_mass() -> None:
    # P(X < m) = (1 - l)/2 (Fernández & Steel 1998, the defining property of the skewing)
    for lam in (-0.7, 0.0, 0.35):
        assert K.cdf(0.2, 0.2, 1.0, 1.4, lam) == pytest.approx((1 - lam) / 2, rel=1e-15)
        assert K.ppf((1 - lam) / 2, 0.2, 1.0, 1.4, lam) == pytest.approx(0.2, abs=1e-15)


# ------------------------------------------------------------------ bad input
def test_bad_skew_and_p_are_named() -> None:
    for bad in (1.0, -1.0, 1.5, math.nan, math.inf):
        with pytest.raises(DomainError, match="skew must be in"):
            K.cdf(0.0, 0.0, 1.0, 2.0, bad)
        with pytest.raises(DomainError, match="skew must be in"):
            K.cdf(np.array([0.0]), 0.0, 1.0, 2.0, bad)
    with pytest.raises(DomainError, match="position 1"):
        K.pdf(0.0, 0.0, 1.0, 2.0, np.array([0.1, 2.0]))
    with pytest.raises(InputTypeError):
        K.cdf(0.0, 0.0, 1.0, 2.0, "left")
    # the message shows the scale as given, not the side's scale a(1 -+ l)
    for fn in (K.cdf, K.sf, K.pdf, K.logpdf, K.logcdf, K.logsf, K.ppf, K.isf):
        with pytest.raises(DomainError, match="scale must be > 0, got -1$"):
            fn(0.3, 0.0, -1.0, 2.0, 0.2)
        with pytest.raises(DomainError, match="scale must be > 0, got -1 at position 1"):
            fn(np.array([0.3, 0.4]), 0.0, np.array([1.0, -1.0]), 2.0, 0.2)
        with pytest.raises(DomainError, match="shape must be > 0, got 0$"):
            fn(0.3, 0.0, 1.0, 0.0, -0.2)
    with pytest.raises(DomainError, match="p must be in"):
        K.ppf(1.5, 0.0, 1.0, 2.0, 0.2)
    with pytest.raises(DomainError, match="p must be in"):
        K.isf(np.array([0.5, -0.1]), 0.0, 1.0, 2.0, 0.2)
    with pytest.raises(DomainError, match="confidence"):
        K.value_at_risk(1.0, 0.0, 1.0, 2.0, 0.2)
    with pytest.raises(DomainError, match="seed"):
        K.rvs(3, 0.0, 1.0, 2.0, 0.2, seed=-1)


@pytest.mark.parametrize("nu", [1.2, 1.5, 2.0, 3.0])
def test_standardized_law_at_skew_zero_is_arch_generalized_error(nu: float) -> None:
    # Source: arch.univariate.GeneralizedError (arch's standardized error law, shape nu):
    # log f(e / sigma) - log sigma with the (loc, scale) of standardized_params, skew 0.
    arch_uni = pytest.importorskip("arch.univariate", reason="the arch package is not installed")
    rng = np.random.default_rng(1)
    e = 0.01 * rng.standard_normal(500)
    s2 = 1e-4 * (1.0 + rng.random(500))
    ref = arch_uni.GeneralizedError().loglikelihood(np.array([nu]), e, s2, individual=True)
    loc, scale = K.standardized_params(nu, 0.0)
    sd = np.sqrt(s2)
    ours = K.logpdf(e / sd, loc, scale, nu, 0.0) - np.log(sd)
    np.testing.assert_allclose(ours, ref, rtol=1e-13)
