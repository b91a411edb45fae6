"""Conditional volatility models: EWMA recursion, GJR-GARCH through arch, today's figures.

References: the RiskMetrics Technical Document (J.P. Morgan/Reuters 1996, eq. 5.3) recursion
worked by hand; arch's EWMAVariance recursion; arch's own GJR-GARCH estimation; the closed-form
VaR/ES of errdist.law.skewed; arch.data index 2 (index 2 1999-2018, shipped with arch).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.risk.conditional import (
    EWMA_SEED_DAYS,
    clean_returns,
    ewma_variance,
    fit_ewma,
    fit_gjr,
    law_risk,
)

arch = pytest.importorskip("arch", reason="the arch package is not installed")


def _index2() -> np.ndarray:
    from real_series import index as real_index

    return np.diff(np.log(real_index(2).load()["Adj Close"].to_numpy()))


def test_ewma_hand_example() -> None:
    # RiskMetrics (1996) eq. 5.3, sigma2_t = lam sigma2_{t-1} + (1 - lam) r_{t-1}^2, worked
    # by hand with lam = 0.94: 75 days of 1 % seed sigma2 = 1e-4; then r = 2 %, -3 %:
    # 0.94e-4 + 0.06 * 4e-4 = 1.18e-4; 0.94 * 1.18e-4 + 0.06 * 9e-4 = 1.6492e-4.
    r = np.r_[np.full(EWMA_SEED_DAYS, 0.01), 0.02, -0.03]
    s2 = ewma_variance(r, 0.94)
    assert np.all(np.isnan(s2[:EWMA_SEED_DAYS]))
    assert s2[75] == pytest.approx(1e-4, rel=1e-14)
    assert s2[76] == pytest.approx(1.18e-4, rel=1e-14)
    assert s2[77] == pytest.approx(1.6492e-4, rel=1e-14)
    assert s2.size == r.size + 1


def test_ewma_matches_arch_recursion() -> None:
    # Reference: arch.univariate.EWMAVariance.compute_variance with the same starting value.
    from arch.univariate import EWMAVariance

    r = _index2()[:2000]
    ours = ewma_variance(r, 0.97)
    resid = r[EWMA_SEED_DAYS:]
    sigma2 = np.empty(resid.size)
    seed = float(np.mean(r[:EWMA_SEED_DAYS] ** 2))
    bounds = np.tile([0.0, np.inf], (resid.size, 1))
    EWMAVariance(0.97).compute_variance(np.empty(0), resid, sigma2, seed, bounds)
    np.testing.assert_allclose(ours[EWMA_SEED_DAYS:-1], sigma2, rtol=1e-12)


def test_fit_gjr_on_index2_matches_arch_and_closed_form() -> None:
    # Reference: the same model estimated by arch directly (on percent returns); VaR/ES from
    # errdist.law.skewed's closed forms at the standardized law's loc/scale.
    from arch.univariate import GARCH, ConstantMean

    from errdist.risk.arch_law import SkewedErrorInnovations

    r = _index2()
    f = fit_gjr(r, 0.99)
    ref = ConstantMean(100 * r, volatility=GARCH(1, 1, 1), distribution=SkewedErrorInnovations())
    res = ref.fit(disp="off")
    assert f.shape == pytest.approx(res.params["nu"], rel=1e-3)
    assert f.skew == pytest.approx(res.params["lambda"], rel=1e-2)
    assert f.params[f.param_names.index("gamma")] == pytest.approx(res.params["gamma[1]"], rel=1e-2)
    # real index: heavier loss side, shape above arch's bound here but skew clearly negative
    assert f.skew < -0.05
    assert f.std_errors[f.param_names.index("skew")] > 0
    sk = pytest.importorskip("errdist.law.skewed")
    m, a = sk.standardized_params(f.shape, f.skew)
    ref_var = sk.value_at_risk(0.99, f.mean + f.volatility * m, f.volatility * a, f.shape, f.skew)
    ref_es = sk.expected_shortfall(
        0.99, f.mean + f.volatility * m, f.volatility * a, f.shape, f.skew
    )
    assert f.value_at_risk == pytest.approx(ref_var, rel=1e-10)
    assert f.expected_shortfall == pytest.approx(ref_es, rel=1e-9)
    assert f.n == r.size and f.n_dropped == 0 and f.model == "gjr"


def test_fit_garch_special_case_and_zero_mean() -> None:
    r = _index2()[-1500:]
    f = fit_gjr(r, 0.975, asymmetric=False, mean="zero")
    assert f.model == "garch"
    assert "gamma" not in f.param_names and "mu" not in f.param_names
    assert f.mean == 0.0
    assert f.expected_shortfall > f.value_at_risk > 0


def test_fit_ewma_figures() -> None:
    r = _index2()
    f = fit_ewma(r, 0.99, lam=0.94)
    s2 = ewma_variance(r, 0.94)
    z_mean, z_std = f.params[1], f.params[2]
    assert f.volatility == pytest.approx(math.sqrt(s2[-1]) * z_std, rel=1e-12)
    assert (f.value_at_risk, f.expected_shortfall) == pytest.approx(
        law_risk(0.99, f.mean, f.volatility, f.shape, f.skew)
    )
    assert 0.9 < z_std < 1.2 and abs(z_mean) < 0.2
    assert all(se > 0 for se in f.std_errors[1:])
    assert math.isnan(f.std_errors[0])


def test_blanks_dropped_and_bad_input_messages() -> None:
    r = list(_index2()[:400])
    r[10] = None
    x, dropped = clean_returns(r)
    assert dropped == 1 and x.size == 399
    with pytest.raises(InputTypeError, match="position 3"):
        clean_returns([0.1, 0.2, "x"] + [0.0] * 300)
    with pytest.raises(DomainError, match="finite"):
        clean_returns([0.1, math.inf] + [0.0] * 300)
    with pytest.raises(InsufficientDataError, match="at least 250"):
        fit_ewma([0.01, -0.01] * 50)
    with pytest.raises(DomainError, match="lambda"):
        fit_ewma(_index2()[:400], lam=1.2)
    with pytest.raises(DomainError, match="confidence"):
        fit_gjr(_index2()[:400], confidence=99)
    with pytest.raises(InputTypeError, match="mean"):
        fit_gjr(_index2()[:400], mean="ar1")


def test_convergence_problems_are_reported_not_hidden() -> None:
    # arch's ConvergenceWarning (SLSQP return code and message) becomes the warning text.
    from errdist.risk.conditional import fit_arch_quietly, gjr_model

    y = np.random.default_rng(0).standard_normal(300)
    _, warning = fit_arch_quietly(gjr_model(y), options={"maxiter": 2})
    assert "code 9" in warning and "Iteration limit" in warning
    _, clean = fit_arch_quietly(gjr_model(y))
    assert clean == ""
