"""solve_shape / solve_scale against the kurtosis and variance formulas (Nadarajah 2005)."""

from __future__ import annotations

import math
from fractions import Fraction

import mpmath as mp
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.special import gammaln

from errdist.errors import DomainError
from errdist.estimate import solve_scale, solve_shape


def _kurt_mp(b: mp.mpf) -> mp.mpf:
    # Nadarajah (2005), J. Applied Statistics 32(7): excess kurtosis G(5/b)G(1/b)/G(3/b)^2 - 3
    return mp.gamma(5 / b) * mp.gamma(1 / b) / mp.gamma(3 / b) ** 2 - 3


@pytest.mark.parametrize(
    "b", [0.005, 0.05, 0.1, 0.3, 0.5, 0.9, 1.0, 1.5, 2.0, 3.0, 7.0, 10.0, 25.0, 100.0, 1e4, 1e7]
)
def test_round_trip_against_mpmath(b: float) -> None:
    # Reference: mpmath at 60 digits. The exact inverse of the *rounded* kurtosis is the
    # reference, so the check does not depend on the conditioning near -1.2.
    with mp.workdps(60):
        k = float(_kurt_mp(mp.mpf(b)))
        target = mp.log(mp.mpf(k) + 3)
        u = mp.findroot(lambda t: mp.log(_kurt_mp(mp.exp(t)) + 3) - target, mp.log(b))
        expected = float(mp.exp(u))
    assert solve_shape(k) == pytest.approx(expected, rel=2e-14)


@settings(max_examples=150, deadline=None)
@given(st.floats(min_value=0.05, max_value=50.0))
def test_round_trip_property(b: float) -> None:
    # Kurtosis by the published formula (Nadarajah 2005) in log-gamma form
    k = math.exp(gammaln(5 / b) + gammaln(1 / b) - 2 * gammaln(3 / b)) - 3
    assert solve_shape(k) == pytest.approx(b, rel=1e-10)


def test_known_shapes() -> None:
    # Laplace has excess kurtosis 3 and the normal 0 (textbook facts, common practice)
    assert solve_shape(3.0) == pytest.approx(1.0, rel=1e-14)
    assert solve_shape(0.0) == pytest.approx(2.0, rel=1e-14)


def test_practitioner_figure() -> None:
    # Sample excess kurtosis 3.83 corresponds to a shape of about 0.92
    # (common practice, no source)
    assert solve_shape(3.83) == pytest.approx(0.92, abs=0.005)


def test_close_to_uniform_limit_gives_huge_but_right_shape() -> None:
    # kurtosis ~ -1.2 + 1.2*pi^2/b^2 for large b (series of ln Gamma; Nadarajah 2005 formula)
    k = -1.2 + 1e-12
    b = solve_shape(k)
    assert math.isfinite(b)
    excess = float(Fraction(k) + Fraction(6, 5))  # exact k + 6/5 (the double -1.2 is not -6/5)
    # next series term is O(1/b): relative size about 4.4/b
    assert b == pytest.approx(math.pi * math.sqrt(1.2 / excess), rel=5e-6)
    assert solve_shape(math.nextafter(-1.2, 0.0)) > 1e8


def test_huge_kurtosis() -> None:
    b = solve_shape(1e300)
    assert 0.001 < b < 0.01
    with mp.workdps(40):
        assert float(_kurt_mp(mp.mpf(b))) == pytest.approx(1e300, rel=1e-10)


@pytest.mark.parametrize("k", [-1.2, -1.3, -5.0])
def test_below_uniform_limit_is_domain_error(k: float) -> None:
    with pytest.raises(DomainError, match=r"no error distribution has excess kurtosis <= -1\.2"):
        solve_shape(k)
    try:
        solve_shape(-1.3)
    except DomainError as exc:
        assert "(got -1.3)" in str(exc)


@pytest.mark.parametrize("k", [math.nan, math.inf, -math.inf])
def test_non_finite_kurtosis(k: float) -> None:
    with pytest.raises(DomainError):
        solve_shape(k)


def test_solve_scale_closed_forms() -> None:
    # Normal (b=2): sd = a/sqrt(2); Laplace (b=1): sd = sqrt(2)*a  (textbook closed forms)
    assert solve_scale(0.3, 2.0) == pytest.approx(math.sqrt(2) * 0.3, rel=1e-15)
    assert solve_scale(0.3, 1.0) == pytest.approx(0.3 / math.sqrt(2), rel=1e-15)


def test_solve_scale_against_variance_formula() -> None:
    # Variance a^2 G(3/b)/G(1/b) (Nadarajah 2005), evaluated with mpmath
    for b in (0.4, 0.9, 3.5, 12.0):
        a = solve_scale(1.7, b)
        with mp.workdps(30):
            sd = mp.sqrt(mp.mpf(a) ** 2 * mp.gamma(3 / mp.mpf(b)) / mp.gamma(1 / mp.mpf(b)))
        assert float(sd) == pytest.approx(1.7, rel=1e-14)


@pytest.mark.parametrize(("sd", "b"), [(0.0, 1.0), (-1.0, 1.0), (1.0, 0.0), (math.nan, 1.0)])
def test_solve_scale_domain(sd: float, b: float) -> None:
    with pytest.raises(DomainError, match="must be > 0"):
        solve_scale(sd, b)
