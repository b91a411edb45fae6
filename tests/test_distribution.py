"""Reference tests for errdist.law.symmetric.

Every numerical check names its outside source: scipy.stats (gennorm, norm, laplace), mpmath at
40 significant digits, or Nadarajah, S. (2005) "A generalized normal distribution",
J. Applied Statistics 32(7):685-694.
"""

from __future__ import annotations

import math

import mpmath as mp
import numpy as np
import pytest
from scipy import special as sc
from scipy import stats

import errdist
import errdist.law as D
from errdist.errors import DomainError, InputTypeError

mp.mp.dps = 40

SHAPES = [0.3, 0.5, 0.8, 1.0, 1.5, 2.0, 3.0, 5.0, 8.0, 10.0]


# ------------------------------------------------------------------ mpmath references (40 digits)
def mp_cdf(x: float, loc: float, scale: float, shape: float) -> mp.mpf:
    """F(x) = 1/2 Q(1/b, z) below loc, 1 - 1/2 Q above (mpmath, 40 digits)."""
    d = (mp.mpf(x) - mp.mpf(loc)) / mp.mpf(scale)
    b = mp.mpf(shape)
    q = mp.gammainc(1 / b, abs(d) ** b, mp.inf, regularized=True)
    return q / 2 if d < 0 else 1 - q / 2


def mp_pdf(x: float, loc: float, scale: float, shape: float) -> mp.mpf:
    """Nadarajah (2005) eq. 1 evaluated in mpmath."""
    d = (mp.mpf(x) - mp.mpf(loc)) / mp.mpf(scale)
    b = mp.mpf(shape)
    return b / (2 * mp.mpf(scale) * mp.gamma(1 / b)) * mp.exp(-(abs(d) ** b))


def mp_kurtosis(shape: float) -> mp.mpf:
    """Nadarajah (2005) eq. 8 evaluated in mpmath."""
    b = mp.mpf(shape)
    return mp.gamma(5 / b) * mp.gamma(1 / b) / mp.gamma(3 / b) ** 2 - 3


def rel(a: float, b: mp.mpf) -> float:
    return float(abs((mp.mpf(a) - b) / b))


# ------------------------------------------------------------------ against scipy.stats.gennorm
@pytest.mark.parametrize("shape", SHAPES)
def test_pdf_cdf_sf_match_scipy_gennorm(shape: float) -> None:
    # Source: scipy.stats.gennorm (same law: loc, scale, beta = shape). Compared where scipy's
    # value is neither underflowed nor a cancelled tail (it uses 1/2 Q on both sides as well).
    x = np.concatenate([-np.geomspace(40.0, 1e-3, 40), [0.0], np.geomspace(1e-3, 40.0, 40)])
    loc, scale = 0.7, 1.9
    xs = loc + scale * x
    ref_cdf = stats.gennorm.cdf(xs, shape, loc=loc, scale=scale)
    ref_sf = stats.gennorm.sf(xs, shape, loc=loc, scale=scale)
    ref_pdf = stats.gennorm.pdf(xs, shape, loc=loc, scale=scale)
    ours_cdf = D.cdf(xs, loc, scale, shape)
    ours_sf = D.sf(xs, loc, scale, shape)
    ours_pdf = D.pdf(xs, loc, scale, shape)
    ok = ref_cdf > 1e-300
    np.testing.assert_allclose(ours_cdf[ok], ref_cdf[ok], rtol=1e-13)
    ok = ref_sf > 1e-300
    np.testing.assert_allclose(ours_sf[ok], ref_sf[ok], rtol=1e-13)
    ok = ref_pdf > 1e-300
    # exp(-z) has condition number b*z in x: allow for the rounding of xs itself far out
    cond = 1.0 + shape * np.abs((xs - loc) / scale) ** shape
    assert np.all(np.abs(ours_pdf[ok] / ref_pdf[ok] - 1.0) <= 1e-14 * cond[ok] + 1e-14)


@pytest.mark.parametrize("shape", SHAPES)
def test_ppf_isf_match_scipy_gennorm(shape: float) -> None:
    # Source: scipy.stats.gennorm.ppf/isf (gammainccinv on the tail probability, like ours).
    p = np.concatenate([np.geomspace(1e-12, 0.2, 20), np.linspace(0.26, 0.74, 9)])
    p = np.concatenate([p, 1.0 - p[::-1]])
    loc, scale = -0.3, 0.02
    ref = stats.gennorm.ppf(p, shape, loc=loc, scale=scale)
    np.testing.assert_allclose(D.ppf(p, loc, scale, shape), ref, rtol=1e-12, atol=1e-15)
    ref = stats.gennorm.isf(p, shape, loc=loc, scale=scale)
    np.testing.assert_allclose(D.isf(p, loc, scale, shape), ref, rtol=1e-12, atol=1e-15)


@pytest.mark.parametrize("shape", [0.3, 1.0, 2.0, 8.0])
def test_logpdf_matches_scipy_gennorm(shape: float) -> None:
    # Source: scipy.stats.gennorm.logpdf.
    x = np.linspace(-50.0, 50.0, 101)
    np.testing.assert_allclose(
        D.logpdf(x, 1.0, 2.0, shape), stats.gennorm.logpdf(x, shape, 1.0, 2.0), rtol=1e-13
    )


# ------------------------------------------------------------------ far tails against mpmath
@pytest.mark.parametrize(
    ("shape", "k"),
    [(2.0, 8.5), (2.0, 20.0), (2.0, 26.0), (0.5, 5000.0), (1.0, 650.0), (8.0, 2.2), (0.3, 1e6)],
)
def test_far_tail_cdf_against_mpmath_and_naive_fails(shape: float, k: float) -> None:
    # Source: mpmath.gammainc (regularized, 40 digits) for F(-k scales) = 1/2 Q(1/b, k^b).
    ref = mp_cdf(-k, 0.0, 1.0, shape)
    assert ref > mp.mpf("1e-300")
    ours = D.cdf(-k, 0.0, 1.0, shape)
    assert rel(ours, ref) < 1e-13
    assert rel(D.sf(k, 0.0, 1.0, shape), ref) < 1e-13
    # The textbook construction 1/2 + 1/2 sign(x) P(1/b, z) cancels to 0 here (Nadarajah eq. 3
    # evaluated literally in double precision).
    naive = 0.5 - 0.5 * sc.gammainc(1.0 / shape, k**shape)
    assert naive == 0.0
    assert ref < mp.mpf("1e-20")


@pytest.mark.parametrize("shape", [0.5, 1.0, 2.0, 8.0])
def test_cdf_sf_against_mpmath_body(shape: float) -> None:
    # Source: mpmath.gammainc, 40 digits, including points very close to loc.
    # (scipy.special.gammaincc itself is off by 2.6e-14 at Q(1/2, 1) = erfc(1): hence 1e-13.)
    for x in [-2.0, -1.0, -1e-6, 0.0, 1e-9, 0.4, 1.5]:
        assert rel(D.cdf(x, 0.0, 1.0, shape), mp_cdf(x, 0.0, 1.0, shape)) < 1e-13
        assert rel(D.sf(x, 0.0, 1.0, shape), 1 - mp_cdf(x, 0.0, 1.0, shape)) < 1e-13
        assert rel(D.pdf(x, 0.0, 1.0, shape), mp_pdf(x, 0.0, 1.0, shape)) < 1e-14


@pytest.mark.parametrize(
    ("shape", "k"),
    [(2.0, 40.0), (2.0, 1000.0), (2.0, 1e6), (0.5, 1e4), (0.5, 1e7), (8.0, 40.0), (8.0, 1000.0),
     (2.0, 5.0), (1.0, 745.0), (0.3, 1e5), (10.0, 3.0)],
)  # fmt: skip
def test_logcdf_logsf_far_tails_against_mpmath(shape: float, k: float) -> None:
    # Source: mpmath log(1/2 Q(1/b, k^b)) at 40 digits; float cdf underflows for most of these.
    ref = mp.log(mp_cdf(-k, 0.0, 1.0, shape))
    assert rel(D.logcdf(-k, 0.0, 1.0, shape), ref) < 1e-13
    assert rel(D.logsf(k, 0.0, 1.0, shape), ref) < 1e-13
    arr = D.logcdf(np.array([-k, 0.0]), 0.0, 1.0, shape)
    assert rel(float(arr[0]), ref) < 1e-13
    assert rel(float(D.logsf(np.array([k]), 0.0, 1.0, shape)[0]), ref) < 1e-13
    # the near side: log F(+k) = log1p(-1/2 Q), mpmath again
    ref_near = mp.log1p(-mp_cdf(-k, 0.0, 1.0, shape))
    ours_near = D.logcdf(k, 0.0, 1.0, shape)
    assert abs(ours_near - float(ref_near)) <= 1e-13 * abs(float(ref_near)) + 1e-300


def test_logcdf_finite_where_cdf_underflows() -> None:
    # Source: mpmath; the normal shape 40 scales out: cdf is 0 in double precision.
    # 40 scales out F = erfc(40)/2 ~ 1e-697 underflows, as does 1000 scales out.
    for k in [40.0, 1000.0]:
        assert D.cdf(-k, 0.0, 1.0, 2.0) == 0.0
        lc = D.logcdf(-k, 0.0, 1.0, 2.0)
        assert math.isfinite(lc)
        assert rel(lc, mp.log(mp.erfc(k) / 2)) < 1e-14  # shape 2 scale 1: F(-k) = erfc(k)/2


@pytest.mark.parametrize("shape", [0.5, 1.0, 2.0, 8.0])
def test_ppf_extreme_tails_against_mpmath(shape: float) -> None:
    # Source: mpmath.findroot on the 40-digit cdf, at p = 1e-300 and its neighbours.
    for p in [1e-300, 1e-100, 1e-20, 0.0499, 0.05, 0.07, 0.25, 0.4999, 0.5 + 1e-9, 0.9]:
        x = D.ppf(p, 0.0, 1.0, shape)
        ref = mp.findroot(lambda t, p=p: mp_cdf(t, 0.0, 1.0, shape) - p, mp.mpf(x))
        assert rel(x, ref) < 5e-14, (p, x, ref)
        # isf(p) = -ppf(p) by symmetry (mpmath root of 1 - F = p)
        assert rel(D.isf(p, 0.0, 1.0, shape), -ref) < 5e-14


def test_ppf_endpoints_and_centre() -> None:
    # Source: definition of the quantile function (F(-inf) = 0, F(+inf) = 1, median = loc).
    assert D.ppf(0.0, 1.0, 2.0, 1.5) == -math.inf
    assert D.ppf(1.0, 1.0, 2.0, 1.5) == math.inf
    assert D.isf(0.0, 1.0, 2.0, 1.5) == math.inf
    assert D.isf(1.0, 1.0, 2.0, 1.5) == -math.inf
    assert D.ppf(0.5, 1.0, 2.0, 1.5) == 1.0
    np.testing.assert_array_equal(D.ppf(np.array([0.0, 0.5, 1.0]), 1.0), [-np.inf, 1.0, np.inf])


# ------------------------------------------------------------------ special cases
def test_normal_special_case() -> None:
    # Source: scipy.stats.norm; shape 2 with scale sqrt(2) * sigma is N(mu, sigma^2).
    mu, sigma = 0.01, 0.2
    a = math.sqrt(2.0) * sigma
    x = np.linspace(-2.0, 2.0, 81)
    np.testing.assert_allclose(D.pdf(x, mu, a, 2.0), stats.norm.pdf(x, mu, sigma), rtol=1e-13)
    np.testing.assert_allclose(D.cdf(x, mu, a, 2.0), stats.norm.cdf(x, mu, sigma), rtol=1e-13)
    np.testing.assert_allclose(D.sf(x, mu, a, 2.0), stats.norm.sf(x, mu, sigma), rtol=1e-13)
    np.testing.assert_allclose(
        D.logcdf(x, mu, a, 2.0), stats.norm.logcdf(x, mu, sigma), rtol=1e-13, atol=1e-300
    )
    p = np.array([1e-10, 0.01, 0.3, 0.5, 0.7, 0.99])
    np.testing.assert_allclose(D.ppf(p, mu, a, 2.0), stats.norm.ppf(p, mu, sigma), rtol=1e-13)
    assert D.variance(a, 2.0) == pytest.approx(sigma**2, rel=1e-14)


def test_laplace_special_case() -> None:
    # Source: scipy.stats.laplace; shape 1 is the Laplace law with the same loc and scale.
    x = np.linspace(-30.0, 30.0, 121)
    np.testing.assert_allclose(D.pdf(x, 0.5, 1.5, 1.0), stats.laplace.pdf(x, 0.5, 1.5), rtol=1e-13)
    np.testing.assert_allclose(D.cdf(x, 0.5, 1.5, 1.0), stats.laplace.cdf(x, 0.5, 1.5), rtol=1e-13)
    np.testing.assert_allclose(D.sf(x, 0.5, 1.5, 1.0), stats.laplace.sf(x, 0.5, 1.5), rtol=1e-13)
    p = np.array([1e-200, 1e-5, 0.2, 0.5, 0.8])
    np.testing.assert_allclose(D.ppf(p, 0.5, 1.5, 1.0), stats.laplace.ppf(p, 0.5, 1.5), rtol=1e-13)
    assert D.variance(1.5, 1.0) == pytest.approx(2 * 1.5**2, rel=1e-14)  # Laplace: 2 a^2


# ------------------------------------------------------------------ moments
@pytest.mark.parametrize("shape", [0.003, 0.01, 0.05, 0.0999, 0.1, 0.3, 0.5, 1.0, 1.5, 1.99, 2.01, 3.0, 8.0, 19.9, 20.0, 50.0,
                                   1e3, 1e6])  # fmt: skip
def test_variance_kurtosis_against_mpmath(shape: float) -> None:
    # Source: Nadarajah (2005) eq. 6 and 8, evaluated in mpmath at 40 digits.
    b = mp.mpf(shape)
    var_ref = mp.mpf("1.7") ** 2 * mp.gamma(3 / b) / mp.gamma(1 / b)
    if var_ref > mp.mpf(np.finfo(float).max):
        assert D.variance(1.7, shape) == math.inf  # beyond the double range: inf, no warning
    else:
        assert rel(D.variance(1.7, shape), var_ref) < 2e-14 + 1e-16 / shape
    k_ref = mp_kurtosis(shape)
    # exp(L) with L ~ 1.5/b near overflow: a double result can only be good to ~ L * eps;
    # near b = 2 the kurtosis crosses 0, so allow 1e-15 absolute there
    k = D.excess_kurtosis(shape)
    assert abs(k - float(k_ref)) <= (1e-14 + 5e-16 / shape) * abs(float(k_ref)) + 1e-15


@pytest.mark.parametrize("shape", [0.3, 0.7, 1.0, 2.0, 4.0, 10.0])
def test_moments_against_scipy_stats(shape: float) -> None:
    # Source: scipy.stats.gennorm.stats(moments='vk').
    v, k = stats.gennorm.stats(shape, scale=2.5, moments="vk")
    assert D.variance(2.5, shape) == pytest.approx(float(v), rel=1e-13)
    assert D.excess_kurtosis(shape) == pytest.approx(float(k), rel=1e-12, abs=1e-14)


def test_moment_limits() -> None:
    # Source: Nadarajah (2005): b = 2 normal (kurtosis 0), b = 1 Laplace (3), b -> inf uniform
    # (kurtosis -6/5, variance a^2/3), b -> 0 kurtosis -> inf.
    assert D.excess_kurtosis(2.0) == pytest.approx(0.0, abs=2e-15)
    assert D.excess_kurtosis(1.0) == pytest.approx(3.0, rel=1e-14)
    assert D.excess_kurtosis(1e12) == pytest.approx(-1.2, rel=1e-14)
    assert D.excess_kurtosis(1e300) == -1.2
    assert D.variance(3.0, 1e12) == pytest.approx(3.0, rel=1e-11)
    with np.errstate(all="raise"):  # no overflow warnings, just inf
        assert D.excess_kurtosis(1e-3) == math.inf
        assert D.excess_kurtosis(1e-320) == math.inf
        assert D.variance(1.0, 1e-3) == math.inf
    ks = D.excess_kurtosis(np.geomspace(0.05, 1e4, 400))
    assert np.all(np.diff(ks) < 0)  # strictly decreasing in b (DESIGN.md; Nadarajah 2005 fig. 2)


# ------------------------------------------------------------------ random variates
def test_rvs_moments_and_ks() -> None:
    # Source: theory (Nadarajah 2005 eqs. 6, 8) within Monte Carlo error, and scipy.stats.kstest
    # against scipy.stats.gennorm.cdf. Seeded, so deterministic.
    n = 200_000
    for i, shape in enumerate([0.7, 2.0, 6.0]):
        x = D.rvs(n, 0.1, 0.5, shape, seed=1234 + i)
        var = D.variance(0.5, shape)
        assert abs(x.mean() - 0.1) < 5 * math.sqrt(var / n)
        m2 = x.var()
        kurt_ref = stats.gennorm.stats(shape, scale=0.5, moments="k")
        se_var = math.sqrt(var**2 * (float(kurt_ref) + 2.0) / n)
        assert abs(m2 - var) < 5 * se_var
        ks = stats.kstest(x[:20_000], stats.gennorm(shape, loc=0.1, scale=0.5).cdf)
        assert ks.pvalue > 1e-3


def test_rvs_large_shape_is_uniform_like() -> None:
    # Source: scipy.stats.kstest against scipy.stats.uniform on [-a, a]: b = 1e4 is uniform to
    # within 1e-4 in distribution (|F_b - F_uniform| -> 0 as b -> inf, Nadarajah 2005).
    x = D.rvs(20_000, 0.0, 2.0, 1e4, seed=7)
    assert np.all(np.abs(x) <= 2.0)
    assert stats.kstest(x, stats.uniform(-2.0, 4.0).cdf).pvalue > 1e-3


def test_rvs_seed_reproducible_and_generator() -> None:
    # Reproducibility contract (DESIGN.md conventions): same seed -> same draws.
    a = D.rvs(10, 0.0, 1.0, 1.3, seed=42)
    b = D.rvs(10, 0.0, 1.0, 1.3, seed=42)
    np.testing.assert_array_equal(a, b)
    assert not np.array_equal(a, D.rvs(10, 0.0, 1.0, 1.3, seed=43))
    g1, g2 = np.random.default_rng(5), np.random.default_rng(5)
    np.testing.assert_array_equal(D.rvs(4, shape=0.5, seed=g1), D.rvs(4, shape=0.5, seed=g2))
    assert isinstance(D.rvs(None, seed=1), float)
    assert D.rvs((2, 3), seed=1).shape == (2, 3)
    assert D.rvs(3, loc=[0.0, 10.0, 20.0], seed=1).shape == (3,)


# ------------------------------------------------------------------ errors, types, broadcasting
@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: D.cdf(0.0, 0.0, 0.0, 2.0), "scale must be > 0, got 0"),
        (lambda: D.cdf(0.0, 0.0, -1, 2.0), "scale must be > 0, got -1"),
        (lambda: D.pdf(0.0, 0.0, 1.0, -0.5), "shape must be > 0, got -0.5"),
        (lambda: D.pdf(0.0, 0.0, 1.0, float("nan")), "shape must be > 0, got nan"),
        (lambda: D.sf(0.0, float("nan"), 1.0, 2.0), "loc must be finite, got nan"),
        (lambda: D.sf(0.0, float("inf"), 1.0, 2.0), "loc must be finite, got inf"),
        (lambda: D.logcdf(0.0, 0.0, float("inf"), 2.0), "scale must be finite, got inf"),
        (lambda: D.ppf(1.5, 0.0, 1.0, 2.0), "p must be in [0, 1], got 1.5"),
        (lambda: D.isf(-0.1, 0.0, 1.0, 2.0), "p must be in [0, 1], got -0.1"),
        (lambda: D.ppf(float("nan")), "p must be in [0, 1], got nan"),
        (lambda: D.ppf([0.1, 0.2, 2.0]), "p must be in [0, 1], got 2 at position 2"),
        (lambda: D.cdf([1.0], 0.0, [1.0, 0.0]), "scale must be > 0, got 0 at position 1"),
        (lambda: D.variance(-2.0, 1.0), "scale must be > 0, got -2"),
        (lambda: D.excess_kurtosis(0.0), "shape must be > 0, got 0"),
        (lambda: D.rvs(3, shape=0.0), "shape must be > 0, got 0"),
        (lambda: D.rvs(3, seed=-1), "seed must be a non-negative integer, got -1"),
        (lambda: D.check_params(0.0, 1.0, [[1.0, 2.0], [3.0, -4.0]]),
         "shape must be > 0, got -4 at position (1, 1)"),
    ],
)  # fmt: skip
def test_domain_errors(call, message: str) -> None:  # type: ignore[no-untyped-def]
    # Contract: errdist/errors.py DomainError (-> #NUM!) with a precise message.
    with pytest.raises(DomainError) as info:
        call()
    assert str(info.value) == message
    assert isinstance(info.value, ValueError)


def test_input_type_errors() -> None:
    with pytest.raises(InputTypeError, match="x must be numeric"):
        D.cdf("abc")
    with pytest.raises(InputTypeError, match="scale must be numeric"):
        D.pdf(0.0, 0.0, "wide")
    with pytest.raises(InputTypeError, match="x must be numeric, got None"):
        D.pdf(None)  # type: ignore[arg-type]
    with pytest.raises(InputTypeError, match="x must be numeric, got None at position 1"):
        D.cdf([0.5, None, 1.0])
    with pytest.raises(InputTypeError, match="p must be numeric, got 'a' at position 0"):
        D.ppf(["a", 0.5])
    with pytest.raises(InputTypeError, match="seed must be"):
        D.rvs(2, seed="x")  # type: ignore[arg-type]


def test_check_params_accepts_valid() -> None:
    assert D.check_params(0.0, 1.0, 2.0) is None
    assert D.check_params(np.zeros(3), [1.0, 2.0, 3.0], 0.01) is None


def test_scalar_in_float_out_and_broadcasting() -> None:
    funcs = [D.pdf, D.logpdf, D.cdf, D.sf, D.logcdf, D.logsf]
    for f in funcs:
        assert type(f(0.3)) is float
        assert type(f(np.float64(0.3), 0, 1, 2)) is float
        assert type(f(np.array(0.3))) is float  # 0-d array counts as scalar
        assert type(f(1, 0, 1, 1)) is float  # Python ints
        out = f(np.zeros((3, 1)), np.zeros(4), 1.0, [[1.0, 2.0, 3.0, 4.0]])
        assert out.shape == (3, 4)
        # array path and scalar fast path agree (to an ulp: numpy's exp is not libm's)
        xs = np.array([-50.0, -3.0, -0.2, 0.0, 0.7, 9.0])
        np.testing.assert_allclose(
            f(xs, 0.1, 0.9, 1.7), [f(float(v), 0.1, 0.9, 1.7) for v in xs], rtol=1e-15
        )
    for f in [D.ppf, D.isf]:
        assert type(f(0.3)) is float
        assert f(np.full((2, 2), 0.3), 0.0, 1.0, [1.0, 2.0]).shape == (2, 2)
        ps = np.array([0.0, 1e-300, 0.1, 0.25, 0.3, 0.5, 0.75, 0.9, 1.0])
        np.testing.assert_allclose(
            f(ps, 0.1, 0.9, 1.7), [f(float(v), 0.1, 0.9, 1.7) for v in ps], rtol=1e-15
        )
    assert type(D.variance(1.0, 2.0)) is float
    assert type(D.excess_kurtosis(2.0)) is float
    assert D.excess_kurtosis([1.0, 2.0]).shape == (2,)


def test_nan_and_infinite_x() -> None:
    # Documented behaviour: NaN x -> NaN at that position only; +-inf x are the limits.
    out = D.cdf(np.array([np.nan, 0.0, -np.inf, np.inf]))
    assert np.isnan(out[0]) and out[1] == 0.5 and out[2] == 0.0 and out[3] == 1.0
    assert math.isnan(D.cdf(float("nan")))
    assert math.isnan(D.logcdf(float("nan")))
    assert D.pdf(math.inf) == 0.0
    assert D.logsf(math.inf) == -math.inf
    assert D.logcdf(-math.inf) == -math.inf


def test_public_reexport() -> None:
    # API.md: errdist re-exports the distribution functions.
    assert errdist.cdf is D.cdf and errdist.ppf is D.ppf and errdist.check_params is D.check_params


def test_extreme_offsets_give_limits_without_warnings() -> None:
    # |x - m| / a beyond the float range: cdf is exactly 0 / 1, logs -inf / 0 (limits of the
    # law), and no RuntimeWarning leaks out.
    import warnings

    x = np.array([-1e300, 1e300])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        np.testing.assert_array_equal(D.cdf(x, 0.0, 1e-300, 3.0), [0.0, 1.0])
        np.testing.assert_array_equal(D.pdf(x, 0.0, 1e-300, 3.0), [0.0, 0.0])
        np.testing.assert_array_equal(D.logcdf(x, 0.0, 1e-300, 3.0), [-np.inf, 0.0])
        np.testing.assert_array_equal(D.logsf(x, 0.0, 1e-300, 3.0), [0.0, -np.inf])
        assert D.cdf(-1e300, 0.0, 1e-300, 3.0) == 0.0
        assert D.logcdf(-1e300, 0.0, 1e-300, 3.0) == -math.inf
