"""One-day VaR and ES of the generalized normal law, checked against outside references.

References used (named beside each check):
* scipy.stats.gennorm (same parametrisation: beta = shape, scale = a), norm, laplace;
* mpmath: root of the CDF and quadrature of x f(x) at 30 digits (independent of scipy);
* textbook closed forms: normal ES = sigma * phi(z) / (1 - c) - mu; Laplace VaR = -m - a ln(2u),
  ES = VaR + a (u = 1 - c < 1/2), both from integrating the densities directly.
"""

from __future__ import annotations

import math

import mpmath as mp
import numpy as np
import pytest
from scipy import stats

from errdist.errors import DomainError, InputTypeError
from errdist.risk import expected_shortfall, value_at_risk

CASES = [
    # (confidence, loc, scale, shape)
    (0.99, 0.0005, 0.01, 1.3),
    (0.995, -0.001, 0.02, 0.7),
    (0.95, 0.0, 1.0, 2.0),
    (0.975, 0.002, 0.015, 4.0),
    (0.999, 0.0, 0.01, 0.35),
    (0.9999, 0.0, 1.0, 1.0),
    (0.3, 0.001, 0.01, 1.5),  # below 1/2: the quantile is above the location
    (0.5, 0.0, 1.0, 0.8),
]


def _mp_reference(confidence: float, loc: float, scale: float, shape: float) -> tuple[float, float]:
    """VaR and ES from mpmath at 30 digits: F solved for q, ES = -(1/u) int_{-inf}^q x f(x) dx."""
    with mp.workdps(30):
        m, a, b = mp.mpf(loc), mp.mpf(scale), mp.mpf(shape)
        u = 1 - mp.mpf(confidence)
        norm_c = b / (2 * a * mp.gamma(1 / b))

        def pdf(x):
            return norm_c * mp.exp(-((abs(x - m) / a) ** b))

        def cdf(x):
            z = (abs(x - m) / a) ** b
            tail = mp.gammainc(1 / b, z, mp.inf, regularized=True) / 2
            return tail if x < m else 1 - tail

        # start from scipy's quantile (an outside library); Newton in mpmath refines it
        q = mp.mpf(stats.gennorm.ppf(float(u), shape, loc=loc, scale=scale))
        for _ in range(50):
            step = (cdf(q) - u) / pdf(q)
            q -= step
            if abs(step) <= mp.mpf(10) ** -25 * (abs(q) + a):
                break
        points = [-mp.inf, q] if q <= m else [-mp.inf, m, q]
        tail_integral = mp.quad(lambda x: x * pdf(x), points)
        return float(-q), float(-tail_integral / u)


@pytest.mark.parametrize("case", CASES)
def test_var_and_es_match_mpmath_quadrature(case: tuple[float, float, float, float]) -> None:
    # Reference: mpmath at 30 digits (root of the CDF, quadrature of x f(x) over the tail).
    var_ref, es_ref = _mp_reference(*case)
    assert value_at_risk(*case) == pytest.approx(var_ref, rel=1e-12, abs=1e-15)
    assert expected_shortfall(*case) == pytest.approx(es_ref, rel=1e-12, abs=1e-15)


@pytest.mark.parametrize("case", CASES)
def test_var_and_es_match_scipy_gennorm(case: tuple[float, float, float, float]) -> None:
    # Reference: scipy.stats.gennorm.ppf and gennorm.expect(conditional=True) over the tail.
    c, m, a, b = case
    q = stats.gennorm.ppf(1 - c, b, loc=m, scale=a)
    assert value_at_risk(c, m, a, b) == pytest.approx(-q, rel=1e-10, abs=1e-14)
    tail_mean = stats.gennorm.expect(
        lambda x: x, args=(b,), loc=m, scale=a, lb=-np.inf, ub=q, conditional=True
    )
    assert expected_shortfall(c, m, a, b) == pytest.approx(-tail_mean, rel=1e-7)


@pytest.mark.parametrize("c", [0.9, 0.95, 0.99, 0.995, 0.9999, 0.2])
def test_normal_special_case(c: float) -> None:
    # shape 2 is the normal with sigma = a / sqrt(2); closed forms from scipy.stats.norm:
    # VaR = -mu + sigma z_c, ES = sigma * phi(z_u) / u - mu (u = 1 - c).
    mu, sigma = 0.0004, 0.012
    u = 1 - c
    z_u = stats.norm.ppf(u)
    var_ref = -(mu + sigma * z_u)
    es_ref = sigma * stats.norm.pdf(z_u) / u - mu
    a = sigma * math.sqrt(2.0)
    assert value_at_risk(c, mu, a, 2.0) == pytest.approx(var_ref, rel=1e-12)
    assert expected_shortfall(c, mu, a, 2.0) == pytest.approx(es_ref, rel=1e-12)


@pytest.mark.parametrize("c", [0.9, 0.99, 0.995, 0.99999])
def test_laplace_special_case(c: float) -> None:
    # shape 1 is the Laplace law: q_u = m + a ln(2u) for u < 1/2 (scipy.stats.laplace.ppf),
    # and E[X | X <= q] = q - a (the exponential tail is memoryless), so ES = VaR + a.
    m, a = -0.0002, 0.008
    u = 1 - c
    var_ref = -stats.laplace.ppf(u, loc=m, scale=a)
    assert var_ref == pytest.approx(-(m + a * math.log(2 * u)), rel=1e-12)
    assert value_at_risk(c, m, a, 1.0) == pytest.approx(var_ref, rel=1e-12)
    assert expected_shortfall(c, m, a, 1.0) == pytest.approx(var_ref + a, rel=1e-12)


def test_amount_gives_money() -> None:
    # Money = amount x return-unit loss (our documented convention); reference value from
    # scipy.stats.norm for the normal special case.
    amount = 2_500_000.0
    sigma = 0.01
    var_ref = -stats.norm.ppf(0.01, scale=sigma) * amount
    got = value_at_risk(0.99, 0.0, sigma * math.sqrt(2), 2.0, amount=amount)
    assert got == pytest.approx(var_ref, rel=1e-12)
    es_ref = sigma * stats.norm.pdf(stats.norm.ppf(0.01)) / 0.01 * amount
    got_es = expected_shortfall(0.99, 0.0, sigma * math.sqrt(2), 2.0, amount=amount)
    assert got_es == pytest.approx(es_ref, rel=1e-12)


def test_vectorised_over_confidence_and_parameters() -> None:
    # Reference: scipy.stats.gennorm.ppf element by element.
    conf = np.array([0.9, 0.95, 0.99, 0.995])
    out = value_at_risk(conf, 0.001, 0.01, 1.4)
    assert isinstance(out, np.ndarray) and out.shape == (4,)
    np.testing.assert_allclose(out, -stats.gennorm.ppf(1 - conf, 1.4, 0.001, 0.01), rtol=1e-10)
    shapes = np.array([[0.6], [1.0], [2.5]])
    grid = expected_shortfall(conf, 0.0, 0.01, shapes)
    assert grid.shape == (3, 4)
    for i, b in enumerate(shapes[:, 0]):
        for j, c in enumerate(conf):
            assert grid[i, j] == pytest.approx(expected_shortfall(float(c), 0.0, 0.01, float(b)))
    assert isinstance(value_at_risk(0.99, 0.0, 0.01, 1.4), float)


def test_es_exceeds_var_and_grows_with_confidence() -> None:
    # Property of every law with a continuous lower tail (ES is a tail mean beyond the VaR).
    conf = np.linspace(0.5, 0.9999, 40)
    for b in (0.4, 1.0, 1.7, 6.0):
        var = value_at_risk(conf, 0.0, 1.0, b)
        es = expected_shortfall(conf, 0.0, 1.0, b)
        assert np.all(es > var)
        assert np.all(np.diff(var) > 0) and np.all(np.diff(es) > 0)


def test_far_tail_is_finite_and_accurate() -> None:
    # Reference: mpmath at 30 digits, one-in-a-billion tail.
    case = (1 - 1e-9, 0.0, 1.0, 0.8)
    var_ref, es_ref = _mp_reference(*case)
    assert value_at_risk(*case) == pytest.approx(var_ref, rel=1e-9)
    assert expected_shortfall(*case) == pytest.approx(es_ref, rel=1e-9)


@pytest.mark.parametrize(
    ("kwargs", "error", "message"),
    [
        ({"confidence": 1.0}, DomainError, "confidence must be a fraction in (0, 1)"),
        ({"confidence": 0.0}, DomainError, "got 0"),
        ({"confidence": 99}, DomainError, "got 99"),
        ({"confidence": float("nan")}, DomainError, "got nan"),
        ({"confidence": [0.9, 1.2]}, DomainError, "got 1.2 at position 1"),
        ({"confidence": "0.99"}, InputTypeError, "confidence must be numeric"),
        ({"scale": 0.0}, DomainError, "scale must be > 0, got 0"),
        ({"shape": -1.0}, DomainError, "shape must be > 0, got -1"),
        ({"horizon": 0.5}, DomainError, "horizon must be >= 1 day, got 0.5"),
        ({"horizon": "ten"}, InputTypeError, "horizon must be a number"),
        ({"horizon": 2.5, "horizon_rule": "iid"}, DomainError, "whole number of days"),
        ({"horizon_rule": "linear"}, InputTypeError, 'horizon_rule must be "sqrt" or "iid"'),
        ({"horizon_rule": None}, InputTypeError, "horizon_rule"),
        ({"amount": -5.0}, DomainError, "amount must be > 0"),
        ({"amount": "lots"}, InputTypeError, "amount must be numeric"),
    ],
)
def test_bad_inputs_raise_clear_errors(kwargs: dict, error: type, message: str) -> None:
    args = {"confidence": 0.99, "loc": 0.0, "scale": 0.01, "shape": 1.5} | kwargs
    for func in (value_at_risk, expected_shortfall):
        with pytest.raises(error) as info:
            func(**args)
        assert message in str(info.value)


def test_sqrt_rule_formula_and_fractional_horizon() -> None:
    # Documented convention (common practice, no source): q_h = h m + sqrt(h) (q_1 - m).
    # The one-day quantile comes from scipy.stats.gennorm.
    m, a, b, h = 0.0006, 0.011, 1.2, 10
    q1 = stats.gennorm.ppf(0.01, b, loc=m, scale=a)
    expected = -(h * m + math.sqrt(h) * (q1 - m))
    assert value_at_risk(0.99, m, a, b, horizon=h) == pytest.approx(expected, rel=1e-10)
    assert value_at_risk(0.99, m, a, b, horizon=2.5) == pytest.approx(
        -(2.5 * m + math.sqrt(2.5) * (q1 - m)), rel=1e-10
    )
    tail1 = stats.gennorm.expect(lambda x: x, args=(b,), loc=m, scale=a, ub=q1, conditional=True)
    expected_es = -(h * m + math.sqrt(h) * (tail1 - m))
    assert expected_shortfall(0.99, m, a, b, horizon=h) == pytest.approx(expected_es, rel=1e-7)


@pytest.mark.parametrize("h", [1, 5, 10, 250])
def test_sqrt_rule_is_exact_for_the_normal(h: int) -> None:
    # Sum of h i.i.d. N(mu, sigma^2) is N(h mu, h sigma^2) (closed form; scipy.stats.norm).
    mu, sigma = 0.0003, 0.009
    var_ref = -stats.norm.ppf(0.005, loc=h * mu, scale=math.sqrt(h) * sigma)
    got = value_at_risk(0.995, mu, sigma * math.sqrt(2), 2.0, horizon=h)
    assert got == pytest.approx(var_ref, rel=1e-12)
