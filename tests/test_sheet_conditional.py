"""The skewed-law, conditional-model, forecast and ES-backtest worksheet functions.

Each cell is checked against the core function it wraps AND an outside reference:
scipy.stats.laplace_asymmetric (the skewed law at shape 1), scipy.stats.gennorm (each half of
the two-piece law), the arch package (GJR-GARCH with its own skew-t law), the published
recursions (GJR: Glosten, Jagannathan & Runkle 1993; EWMA: RiskMetrics Technical Document
1996, eq. 5.3) and the Acerbi & Szekely (2014) Z2 formula computed by hand. Data: arch.data
index2 (index 2 daily, shipped with arch).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pytest
from scipy import integrate, optimize, stats

import sheet_harness as h
from errdist.law import skewed


@pytest.fixture(scope="module")
def xl() -> Any:
    with h.replay() as r:
        yield r


def _index2(n: int) -> np.ndarray:
    from real_series import index as real_index

    p = real_index(2).load()["Adj Close"].to_numpy()
    return np.diff(np.log(p))[-n:]


def _laplace(loc: float, scale: float, skew: float) -> Any:
    """The two-piece law at shape 1 as scipy's asymmetric Laplace: left scale a(1-l) = s k,
    right scale a(1+l) = s/k, so k^2 = (1-l)/(1+l) and s = a sqrt(1-l^2)."""
    kappa = math.sqrt((1 - skew) / (1 + skew))
    return stats.laplace_asymmetric(kappa, loc=loc, scale=scale * math.sqrt(1 - skew**2))


# ------------------------------------------------------------------ skewed law


@pytest.mark.parametrize("skew", [-0.4, -0.1, 0.25])
def test_skew_pdf_cdf_inv_match_scipy_asymmetric_laplace(xl: Any, skew: float) -> None:
    ref = _laplace(0.001, 0.012, skew)  # scipy.stats.laplace_asymmetric
    x = [-0.05, -0.012, 0.0, 0.001, 0.02, 0.08]
    pdf = [r[0] for r in xl.cells("ERRDIST_SKEW_PDF", h.column(x), 0.001, 0.012, 1.0, skew)]
    cdf = [r[0] for r in xl.cells("ERRDIST_SKEW_CDF", h.column(x), 0.001, 0.012, 1.0, skew)]
    up = [r[0] for r in xl.cells("ERRDIST_SKEW_CDF", h.column(x), 0.001, 0.012, 1.0, skew, True)]
    np.testing.assert_allclose(pdf, ref.pdf(x), rtol=1e-12)
    np.testing.assert_allclose(cdf, ref.cdf(x), rtol=1e-12)
    np.testing.assert_allclose(up, ref.sf(x), rtol=1e-12)
    p = [1e-6, 0.01, 0.3, 0.7, 0.999]
    inv = [r[0] for r in xl.cells("ERRDIST_SKEW_INV", h.column(p), 0.001, 0.012, 1.0, skew)]
    np.testing.assert_allclose(inv, ref.ppf(p), rtol=1e-12)
    # the cells are the core's values
    assert pdf == list(skewed.pdf(np.array(x), 0.001, 0.012, 1.0, skew))


def test_skew_var_es_match_scipy_integration_at_shape_1(xl: Any) -> None:
    loc, scale, skew, c = 0.0004, 0.009, -0.2, 0.975
    ref = _laplace(loc, scale, skew)
    q = ref.ppf(1 - c)
    tail, _ = integrate.quad(lambda x: x * ref.pdf(x), -np.inf, q, epsabs=1e-14)  # scipy
    var = xl.cells("ERRDIST_SKEW_VAR", c, loc, scale, 1.0, skew)[0][0]
    es = xl.cells("ERRDIST_SKEW_ES", c, loc, scale, 1.0, skew)[0][0]
    assert var == pytest.approx(-q, rel=1e-12)
    assert es == pytest.approx(-tail / (1 - c), rel=1e-9)
    assert var == skewed.value_at_risk(c, loc, scale, 1.0, skew)
    money = xl.cells("ERRDIST_SKEW_ES", c, loc, scale, 1.0, skew, 1, 2e6)[0][0]
    assert money == pytest.approx(2e6 * es, rel=1e-14)


def test_skew_functions_at_skew_0_are_the_symmetric_ones(xl: Any) -> None:
    # Skew 0 is the symmetric law: the same cells as ERRDIST_VAR / ERRDIST_CDF, bit for bit.
    a = xl.cells("ERRDIST_SKEW_VAR", h.column([0.95, 0.99]), 0.0003, 0.01, 1.3, 0.0)
    b = xl.cells("ERRDIST_VAR", h.column([0.95, 0.99]), 0.0003, 0.01, 1.3)
    assert a == b
    a = xl.cells("ERRDIST_SKEW_CDF", h.column([-0.03, 0.01]), 0.0, 0.01, 0.8, 0.0, True)
    b = xl.cells("ERRDIST_CDF", h.column([-0.03, 0.01]), 0.0, 0.01, 0.8, True)
    assert a == b


def test_skew_fit_row_matches_core_and_scipy_likelihood(xl: Any) -> None:
    r = _index2(750)
    got = xl.cells("ERRDIST_SKEW_FIT", h.column(list(r)), True)
    assert got[0] == [
        "loc",
        "scale",
        "shape",
        "skew",
        "n",
        "loglik",
        "aic",
        "at_bound",
        "warning",
    ]
    loc, scale, shape, skew, n, ll, aic, at_bound, warning = got[1]
    f = skewed.fit_skewed(r)
    assert (loc, scale, shape, skew, ll) == (f.loc, f.scale, f.shape, f.skew, f.loglik)
    assert n == 750 and at_bound is False and warning == "none"

    # Reference likelihood from scipy.stats.gennorm: each half of the two-piece law is
    # (1 -+ skew) x gennorm(shape, loc, scale (1 -+ skew)).
    def loglik(t: np.ndarray) -> float:
        m, a, b, lam = t
        if a <= 0 or b <= 0 or not -1 < lam < 1:
            return -np.inf
        left = r < m
        s = np.where(left, a * (1 - lam), a * (1 + lam))
        w = np.where(left, 1 - lam, 1 + lam)
        return float(np.sum(np.log(w) + stats.gennorm.logpdf(r, b, loc=m, scale=s)))

    assert ll == pytest.approx(loglik(np.array([loc, scale, shape, skew])), rel=1e-12)
    assert aic == pytest.approx(8 - 2 * ll, rel=1e-14)
    # No better point nearby: a scipy Nelder-Mead search from the fit does not gain 1e-6.
    start = np.array([loc, scale, shape, skew])
    res = optimize.minimize(
        lambda t: -loglik(start * (1 + t)),
        np.zeros(4),
        method="Nelder-Mead",
        options={"xatol": 1e-9, "fatol": 1e-10, "maxiter": 4000},
    )
    assert -res.fun <= ll + 1e-6


# ------------------------------------------------------------------ conditional models


def test_cond_gjr_cells_match_core_arch_and_the_gjr_recursion(xl: Any) -> None:
    from errdist.risk.conditional import fit_gjr

    r = _index2(2000)
    col = h.column(list(r))
    table = xl.cells("ERRDIST_COND_PARAMS", col, "gjr", 0.99, h.Missing(), True)
    rows = {row[0]: row[1:] for row in table[1:]}
    assert table[0] == ["item", "value", "std_error"]
    f = fit_gjr(r, 0.99)
    var = xl.cells("ERRDIST_COND_VAR", col, 0.99, "gjr")[0][0]
    es975 = xl.cells("ERRDIST_COND_ES", col, 0.975, "gjr")[0][0]
    assert var == f.value_at_risk  # the core's figure, bit for bit
    assert es975 == fit_gjr(r, 0.975).expected_shortfall
    assert rows["VaR 1 day"][0] == f.value_at_risk and rows["ES 1 day"][0] == f.expected_shortfall
    for name, value, se in zip(f.param_names, f.params, f.std_errors, strict=True):
        assert rows[name] == [value, se]
    # Glosten, Jagannathan & Runkle (1993) recursion by hand with the table's parameters:
    # s2_t = omega + (alpha + gamma 1[e<0]) e^2 + beta s2_{t-1}; started at the sample
    # variance, the start is forgotten (beta^2000 ~ 0) by the last day.
    mu, om, al, ga, be = (rows[k][0] for k in ("mu", "omega", "alpha", "gamma", "beta"))
    s2 = float(np.var(r))
    for e in r - mu:
        s2 = om + (al + ga * (e < 0)) * e * e + be * s2
    assert rows["volatility tomorrow"][0] == pytest.approx(math.sqrt(s2), rel=1e-6)
    # The log-likelihood in return units, by hand: sum of log f(z_t) - log sigma_t with the
    # same recursion (its start differs from arch's backcast: 1e-3 relative).
    nu, lam = rows["nu"][0], rows["skew"][0]
    m, a = skewed.standardized_params(nu, lam)
    s2, ll = float(np.var(r)), 0.0
    for e in r - mu:
        sd = math.sqrt(s2)
        ll += float(skewed.logpdf(e / sd, m, a, nu, lam)) - math.log(sd)
        s2 = om + (al + ga * (e < 0)) * e * e + be * s2
    assert rows["log-likelihood"][0] == pytest.approx(ll, rel=1e-3)
    # arch's own GJR-GARCH with its skew-t law on the same data (another innovation law, so
    # loose bounds): the same volatility dynamics.
    from arch import arch_model

    ref = arch_model(100 * r, p=1, o=1, q=1, dist="skewt").fit(disp="off")
    pers = al + ga / 2 + be
    ref_pers = ref.params["alpha[1]"] + ref.params["gamma[1]"] / 2 + ref.params["beta[1]"]
    assert pers == pytest.approx(ref_pers, abs=0.02)
    ref_vol = math.sqrt(ref.forecast(horizon=1, reindex=False).variance.to_numpy()[-1, 0]) / 100
    assert rows["volatility tomorrow"][0] == pytest.approx(ref_vol, rel=0.05)


def test_cond_ewma_cells_match_the_riskmetrics_recursion(xl: Any) -> None:
    r = _index2(1200)
    col = h.column(list(r))
    table = {row[0]: row[1:] for row in xl.cells("ERRDIST_COND_PARAMS", col, "ewma", 0.99, 0.97)}
    assert table["lambda"] == [0.97, "set by the user"]
    # RiskMetrics (1996) eq. 5.3 by hand, seeded with the first 75 days' mean square.
    s2 = float(np.mean(r[:75] ** 2))
    for x in r[75:]:
        s2 = 0.97 * s2 + 0.03 * x * x
    vol = table["volatility tomorrow"][0]
    assert vol == pytest.approx(math.sqrt(s2) * table["z_std"][0], rel=1e-10)
    var = xl.cells("ERRDIST_COND_VAR", col, 0.99, "ewma", 0.97)[0][0]
    assert var == table["VaR 1 day"][0] > 0


def test_cond_bad_inputs_are_coded(xl: Any) -> None:
    short = h.column(list(_index2(100)))
    assert xl.cells("ERRDIST_COND_VAR", short, 0.99)[0][0].startswith("#N/A ")
    col = h.column(list(_index2(300)))
    assert xl.cells("ERRDIST_COND_VAR", col, 0.3)[0][0].startswith("#NUM! confidence")
    assert xl.cells("ERRDIST_COND_VAR", col, 0.99, "arima")[0][0].startswith("#VALUE! ")
    assert xl.cells("ERRDIST_COND_ES", col, 0.99, "ewma", 1.5)[0][0].startswith("#NUM! lambda")


# ------------------------------------------------------------------ forecasts, ES backtest


def test_forecasts_align_with_returns_and_do_not_look_ahead(xl: Any) -> None:
    from errdist.risk.forecasts import rolling_forecasts

    r = _index2(400)
    cells = xl.cells("ERRDIST_FORECASTS", h.column(list(r)), "ewma", 0.99, 250, 300, 21)
    assert len(cells) == 400 and all(len(row) == 6 for row in cells)
    assert all(v is None for row in cells[:300] for v in row)
    path = rolling_forecasts(r, "ewma", 0.99, window=250, fit_window=300, refit=21)
    got = np.array(cells[300:], dtype=float)
    np.testing.assert_array_equal(got[:, 0], path.var[300:])
    np.testing.assert_array_equal(got[:, 1], path.es[300:])
    # No look-ahead: changing the last 50 returns leaves the forecasts before them unchanged.
    r2 = r.copy()
    r2[350:] *= -3.0
    cells2 = xl.cells("ERRDIST_FORECASTS", h.column(list(r2)), "ewma", 0.99, 250, 300, 21)
    assert cells2[:351] == cells[:351] and cells2[-1] != cells[-1]
    # A blank return gives a blank row and shifts nothing.
    with_blank = [*r[:320], None, *r[320:]]
    cells3 = xl.cells("ERRDIST_FORECASTS", h.column(with_blank), "ewma", 0.99, 250, 300, 21)
    assert cells3[320] == [None] * 6 and cells3[321:] == cells[320:]


def test_es_backtest_z2_by_hand_and_core_pvalue(xl: Any) -> None:
    from errdist.checks.es_backtest import es_backtest

    rng = np.random.default_rng(5)
    n = 500
    sd = np.full(n, 0.01)
    z = skewed.rvs(n, 0.0, 1.0, 1.2, -0.1, seed=rng)  # invented returns
    m, a = skewed.standardized_params(1.2, -0.1)
    x = sd * (m + a * z) * 1.3  # 30% more volatile than forecast: ES too small
    var = skewed.value_at_risk(0.975, sd * m, sd * a, 1.2, -0.1)
    es = skewed.expected_shortfall(0.975, sd * m, sd * a, 1.2, -0.1)
    fc = np.column_stack([var, es, np.zeros(n), sd, np.full(n, 1.2), np.full(n, -0.1)])
    got = xl.cells("ERRDIST_ES_BACKTEST", h.column(list(x)), h.ComRange(fc.tolist()), 0.975)
    rows = {row[0]: row[1] for row in got}
    # Acerbi & Szekely (2014): Z2 = sum X_t I_t / (T alpha ES_t) + 1
    hit = x + var < 0
    want = np.sum(np.where(hit, x / es, 0.0)) / (n * 0.025) + 1
    assert rows["Z2 statistic"] == pytest.approx(want, rel=1e-12)
    assert rows["exceptions"] == hit.sum() and rows["days"] == n
    ref = es_backtest(x, var, es, 0.975, law=(fc[:, 2], sd, fc[:, 4], fc[:, 5]))
    assert rows["p-value"] == ref.pvalue < 0.05  # the too-small ES is caught
    # Two columns only: the statistic, and a text instead of a p-value.
    two = xl.cells("ERRDIST_ES_BACKTEST", h.column(list(x)), h.ComRange(fc[:, :2].tolist()), 0.975)
    rows2 = {row[0]: row[1] for row in two}
    assert rows2["Z2 statistic"] == rows["Z2 statistic"]
    assert rows2["p-value"].startswith("none")
    bad = xl.cells("ERRDIST_ES_BACKTEST", h.column(list(x)), h.ComRange(fc[:, :3].tolist()), 0.975)
    assert bad[0][0].startswith("#VALUE! forecasts must have 2 columns")
