"""mpmath references for the law over the benchmark grid and at extreme parameters.

Two parts:

* the benchmark grid (tests/benchmarks/bench_distribution.py): shapes {0.6, 0.92, 1, 1.3, 2, 4}
  x two point sets (x ~ N(0, (2a)^2), x uniform over +-16 scales), sampled; every routed path
  (body series, gammaincc, asymptotic and continued-fraction log tails) is checked, on the
  scalar and on the array path;
* extreme parameters: shapes 1e-3 ... 1e6, scales 1e-300 ... 1e300, p near 0, 1/2 and 1.

Every reference is mpmath (regularized incomplete gamma, 50 significant digits) unless named.
"""

from __future__ import annotations

import math

import mpmath as mp
import numpy as np
import pytest

import errdist
import errdist.law as D
from errdist.errors import DomainError
from errdist.law import _incgamma

DPS = 50
GRID_SHAPES = [0.6, 0.92, 1.0, 1.3, 2.0, 4.0]
#: Largest relative error accepted against mpmath on the grid (measured max: see
#: docs/performance.md; the b = 4 tails are limited by rounding z = |d|^4, ~4 z eps).
GRID_RTOL = {"cdf": 4e-14, "sf": 4e-14, "logcdf": 4e-14, "logsf": 4e-14, "pdf": 4e-14}


def _mp_half_q(d: float, shape: float) -> mp.mpf:
    """1/2 Q(1/b, |d|^b) in mpmath: the far-side tail mass."""
    b = mp.mpf(shape)
    return mp.gammainc(1 / b, abs(mp.mpf(d)) ** b, mp.inf, regularized=True) / 2


def _mp_refs(d: float, shape: float) -> dict[str, mp.mpf]:
    """cdf, sf, logcdf, logsf, pdf of the standard law at d (mpmath)."""
    with mp.workdps(DPS):
        h = _mp_half_q(d, shape)
        b = mp.mpf(shape)
        pdf = b / (2 * mp.gamma(1 / b)) * mp.exp(-(abs(mp.mpf(d)) ** b))
        if d < 0:
            return {"cdf": h, "sf": 1 - h, "logcdf": mp.log(h), "logsf": mp.log1p(-h), "pdf": pdf}
        return {"cdf": 1 - h, "sf": h, "logcdf": mp.log1p(-h), "logsf": mp.log(h), "pdf": pdf}


def _rel(value: float, ref: mp.mpf) -> float:
    if ref == 0:
        return abs(value)
    if abs(ref) < mp.mpf("2.2250738585072014e-308"):  # beyond the normal float range
        return 0.0 if abs(value) < 2.3e-308 else 1.0
    return float(abs((mp.mpf(value) - ref) / ref))


def _grid_points(shape: float, n: int, seed: int) -> np.ndarray:
    rng = np.random.default_rng(seed)
    normal = rng.standard_normal(n) * 2.0
    uniform = rng.uniform(-16.0, 16.0, n)
    # the route boundaries: body/tail switch z = 1/b + 1, P = 0.9, the log-tail switches
    c = 1.0 / shape
    z_edges = np.array([c + 1.0, 0.999 * (c + 1.0), 600.0, 500.0 * max(c, 1.0) * 1.001, 1e4])
    edges = z_edges ** (1.0 / shape)
    return np.concatenate([normal, uniform, edges, -edges])


@pytest.mark.parametrize("shape", GRID_SHAPES)
def test_grid_functions_against_mpmath(shape: float) -> None:
    # Source: mpmath.gammainc (regularized) at 50 digits; sampled points of both benchmark sets
    x = _grid_points(shape, 25, seed=int(shape * 100))
    loc, scale = 0.001, 0.012
    xs = loc + scale * x
    d = (xs - loc) / scale  # the offsets the functions see
    arrays = {name: getattr(D, name)(xs, loc, scale, shape) for name in GRID_RTOL}
    worst = dict.fromkeys(GRID_RTOL, 0.0)
    for i, di in enumerate(d):
        refs = _mp_refs(float(di), shape)
        refs["pdf"] = refs["pdf"] / scale
        # z = |d|^b is rounded once in double precision: e^{-z} and Q then carry a relative
        # error of about z eps whatever the method (conditioning, not the algorithm), and so
        # does log1p(-Q/2) on the near side; the errors below are divided by max(1, z / 10)
        cond = max(1.0, abs(float(di)) ** shape / 10.0)
        for name in GRID_RTOL:
            scalar = getattr(D, name)(float(xs[i]), loc, scale, shape)
            err = max(_rel(scalar, refs[name]), _rel(arrays[name][i], refs[name]))
            worst[name] = max(worst[name], err / cond)
    for name, tol in GRID_RTOL.items():
        assert worst[name] < tol, (name, shape, worst[name])


@pytest.mark.parametrize("shape", GRID_SHAPES)
def test_grid_ppf_against_mpmath(shape: float) -> None:
    # Source: mpmath.findroot on the 50-digit tail mass; p from both benchmark point sets
    x = _grid_points(shape, 8, seed=7 + int(shape * 10))
    p = np.asarray(D.cdf(x, 0.0, 1.0, shape))
    p = p[(p > 1e-300) & (p < 1.0) & (p != 0.5)]
    arr = D.ppf(p, 0.0, 1.0, shape)
    with mp.workdps(DPS):
        c = 1 / mp.mpf(shape)
        for i, pi in enumerate(p):
            target = 2 * min(mp.mpf(pi), 1 - mp.mpf(pi))
            z0 = abs(mp.mpf(float(arr[i]))) ** shape

            def f(z: mp.mpf, target: mp.mpf = target) -> mp.mpf:
                return mp.log(mp.gammainc(c, z, mp.inf, regularized=True)) - mp.log(target)

            z = mp.findroot(f, z0 if z0 > 0 else mp.mpf("1e-300"))
            ref = z**c * (-1 if pi < 0.5 else 1)
            assert _rel(D.ppf(float(pi), 0.0, 1.0, shape), ref) < 2e-14, (pi, shape)
            assert _rel(float(arr[i]), ref) < 2e-14, (pi, shape)


@pytest.mark.parametrize(
    ("shape", "z"),
    [
        (b, z)
        for b in (0.25, 0.6, 4.0)
        for z in (600.0, 2000.0, 1e5, 1e17, 1e70, 1e180, 1e300)
        if math.log10(z) / b < 307.0  # |d| = z^(1/b) must be a double
    ],
)
def test_log_tail_far_out_against_mpmath(shape: float, z: float) -> None:
    # Source: mpmath log(1/2 Q(1/b, z)) at 50 digits; continued fraction (per-point stop) and
    # asymptotic series regions, scalar and array paths, including z > 1e16
    d = -(z ** (1.0 / shape))
    with mp.workdps(DPS):
        ref = mp.log(_mp_half_q(d, shape))
    assert _rel(D.logcdf(d, 0.0, 1.0, shape), ref) < 1e-15
    assert _rel(float(D.logcdf(np.array([d, -1.0]), 0.0, 1.0, shape)[0]), ref) < 1e-15


def test_continued_fraction_stops_per_point() -> None:
    # Source: mpmath log Q(a, z) at 50 digits. The stop test must be reachable (relative,
    # a few ulps): points that converge at once and slow ones in the same call.
    a = np.array([0.25, 1.0 / 0.6, 3.0, 10.0])
    z = np.array([1e17, 700.0, 50.0, 30.0])
    got = _incgamma._log_q_cf(a, z)
    for ai, zi, gi in zip(a, z, got, strict=True):
        with mp.workdps(DPS):
            ref = mp.log(mp.gammainc(mp.mpf(ai), mp.mpf(zi), mp.inf, regularized=True))
        assert _rel(float(gi), ref) < 1e-15
        assert _rel(_incgamma._log_q_cf_scalar(float(ai), float(zi)), ref) < 1e-15


# ------------------------------------------------------------------ extreme parameters
EXTREME_SHAPES = [1e-3, 0.005, 0.1, 2.0, 1074.0, 2000.0, 5e4, 1e6]
EXTREME_SCALES = [1e-300, 1.0, 1e300]


@pytest.mark.parametrize("shape", EXTREME_SHAPES)
@pytest.mark.parametrize("scale", EXTREME_SCALES)
def test_extreme_cdf_sf_against_mpmath(shape: float, scale: float) -> None:
    # Source: mpmath.gammainc at 50 digits. For shape > ~1074, |d|^b underflows for |d| < 1;
    # the body series uses |d| itself (the example: F(0.5) at shape 2000 is 0.750072)
    if shape >= 5e4:
        pytest.skip(
            "mpmath's incomplete gamma for c = 1/b <= 2e-5 takes minutes; shapes 1074 "
            "and 2000 cover the underflow, test_var_es_at_huge_shapes the largest"
        )
    for d in [-1.5, -0.999, -0.5, -1e-10, 1e-300, 0.3, 0.99999, 1.0000001]:
        x = d * scale
        refs = _mp_refs(x / scale, shape)
        for name in ("cdf", "sf"):
            got = getattr(D, name)(x, 0.0, scale, shape)
            got_arr = float(getattr(D, name)(np.array([x, 0.0]), 0.0, scale, shape)[0])
            assert _rel(got, refs[name]) < 5e-13, (name, x, scale, shape, got)
            assert _rel(got_arr, refs[name]) < 5e-13, (name, x, scale, shape, got_arr)


@pytest.mark.parametrize("shape", EXTREME_SHAPES)
@pytest.mark.parametrize("p", [1e-300, 1e-10, 0.01, 0.49999999999999, 0.5000000001, 0.75, 0.99])
def test_extreme_ppf_against_mpmath(shape: float, p: float) -> None:
    # Source: mpmath at 50 digits: the tail mass (regularized incomplete gamma) evaluated at
    # the float quantile's neighbours brackets p, i.e. the quantile is right to ~1e-13.
    # The examples: ppf(0.75) at shape 2000 is 0.49986; ppf(0.49999999999999) at shape
    # 25 is -1.96e-14 (was exactly 0: gammaincinv's z underflowed)
    if shape >= 5e4 and 0.05 < p < 0.95:
        pytest.skip(
            "mpmath's P(c, z) for c <= 2e-5 takes minutes; the centre at huge shapes "
            "is checked at shapes 1074 and 2000"
        )
    t = D.ppf(p, 0.0, 1.0, shape)
    t_arr = float(D.ppf(np.array([p, 0.5]), 0.0, 1.0, shape)[0])
    assert t == pytest.approx(t_arr, rel=1e-13)
    assert (t < 0) == (p < 0.5)
    with mp.workdps(DPS):
        b = mp.mpf(shape)
        c = 1 / b
        pm = mp.mpf(p)
        tail = 2 * min(pm, 1 - pm)  # Q(c, z) at the quantile

        def q_at(tt: mp.mpf) -> mp.mpf:
            z = mp.power(abs(tt), b)
            if tail > mp.mpf("0.5"):  # near the centre: compare P, not 1 - P
                return 1 - mp.gammainc(c, 0, z, regularized=True)
            return mp.gammainc(c, z, mp.inf, regularized=True)

        if math.isinf(t):  # beyond the float range: the mass beyond 1.8e308 still exceeds p
            assert q_at(mp.mpf("1.7976931348623157e308")) > tail
            return
        lo, hi = abs(mp.mpf(t)) * (1 - mp.mpf("1e-13")), abs(mp.mpf(t)) * (1 + mp.mpf("1e-13"))
        # Q decreases in |t|: the exact quantile lies between lo and hi
        assert q_at(lo) >= tail >= q_at(hi), (p, shape, t)
    for scale in EXTREME_SCALES:
        want = t * scale
        if math.isfinite(want) and abs(want) > 1e-290:
            assert D.ppf(p, 0.0, scale, shape) == pytest.approx(want, rel=1e-14)


@pytest.mark.parametrize("shape", [1074.0, 2000.0, 5e4])
def test_var_es_at_huge_shapes_against_mpmath(shape: float) -> None:
    # Source: mpmath at 50 digits: VaR = -F^{-1}(0.01), ES = Gamma(2/b) Q(2/b, |t|^b) /
    # (2 Gamma(1/b) 0.01) (the closed form in errdist.risk.measures). The example:
    # VaR(0.99) at shape 5e4 is 0.97999 (was -0: gammainccinv's z underflowed)
    var = errdist.value_at_risk(0.99, 0.0, 1.0, shape)
    es = errdist.expected_shortfall(0.99, 0.0, 1.0, shape)
    with mp.workdps(DPS):
        b = mp.mpf(shape)
        c = 1 / b

        # P(k, z) = z^k e^{-z} 1F1(1; k+1; z) / Gamma(k+1) (A&S 6.5.12/13.1.2) via mpmath.hyp1f1:
        # mpmath's gammainc itself takes minutes for k <= 2e-5; here z^c = t, z^{2c} = t^2
        def p_reg(k: mp.mpf, zk: mp.mpf, z: mp.mpf) -> mp.mpf:
            return zk * mp.exp(-z) * mp.hyp1f1(1, k + 1, z) / mp.gamma(k + 1)

        def f(t: mp.mpf) -> mp.mpf:
            return p_reg(c, t, t**b) - mp.mpf("0.98")

        t = mp.findroot(f, mp.mpf(var))
        es_ref = (mp.gamma(2 * c) / mp.gamma(c) * (1 - p_reg(2 * c, t * t, t**b))) / (
            2 * mp.mpf("0.01")
        )
    assert _rel(var, t) < 1e-13
    assert _rel(es, es_ref) < 1e-12
    assert es >= var


@pytest.mark.parametrize("scale", [5e-324, 1e-310, 1e-300, 1e300])
@pytest.mark.parametrize("shape", [1e-3, 0.005, 2.0, 2000.0])
def test_subnormal_and_huge_scales_give_numbers(scale: float, shape: float) -> None:
    # Source: the law's own limits (common practice, no source): with a sub-normal scale every
    # function returns a number - 0/1 tails, a density of 0 far out or inf at the centre -
    # never NaN (a blank cell in the sheet)
    xs = [0.0, 0.5 * scale, -1.0, 1e308]
    with np.errstate(invalid="raise"):  # no NaN produced on the way
        for name in ("cdf", "sf", "logcdf", "logsf", "pdf", "logpdf"):
            for x in xs:
                assert not math.isnan(getattr(D, name)(x, 0.0, scale, shape)), (name, x)
            assert not np.any(np.isnan(getattr(D, name)(np.array(xs), 0.0, scale, shape)))
        assert not math.isnan(D.variance(scale, shape))
    for p in (0.01, 0.5, 0.75):
        assert not math.isnan(D.ppf(p, 0.0, scale, shape))


def test_variance_tiny_scale_against_mpmath() -> None:
    # Source: Nadarajah (2005) eq. 6 in mpmath: a^2 Gamma(3/b) / Gamma(1/b); a * a underflows
    for scale, shape in [(1e-300, 0.005), (1e-200, 0.01), (1e-170, 2.0), (1e150, 0.1)]:
        with mp.workdps(DPS):
            b = mp.mpf(shape)
            ref = mp.mpf(scale) ** 2 * mp.gamma(3 / b) / mp.gamma(1 / b)
        if ref > mp.mpf("1.7e308"):
            assert D.variance(scale, shape) == math.inf
        else:
            assert _rel(D.variance(scale, shape), ref) < 1e-12


@pytest.mark.parametrize("shape", [1e-310, 5e-324])
def test_subnormal_shape_is_a_clear_error(shape: float) -> None:
    # common practice, no source: below the smallest normal double 1/b overflows; a clear
    # DomainError instead of NaN
    for call in (
        lambda: D.cdf(0.5, 0.0, 1.0, shape),
        lambda: D.ppf(np.array([0.75]), 0.0, 1.0, shape),
        lambda: errdist.value_at_risk(0.99, 0.0, 1.0, shape),
    ):
        with pytest.raises(DomainError, match="shape must be at least 2.2e-308"):
            call()
    # the moments keep their limit (inf) there, as before
    assert D.excess_kurtosis(shape) == math.inf
