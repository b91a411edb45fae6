"""The numbers of each panel row: errdist's single-series functions, and outside references.

Real data: index 2 and index 1 daily closes shipped in the ``arch`` package
(``arch.data``), plus invented simulated series.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import integrate, stats

import errdist
from errdist.panel import compute_panel, default_options, read_panel, series_seed
from errdist.panel.job import columns, series_row
from panel_data import real_wide, simulated_wide, write

OPTS = default_options(gof_samples=19)


@pytest.fixture(scope="module")
def real_panel(tmp_path_factory):
    path = write(real_wide(600), tmp_path_factory.mktemp("real") / "indices.csv")
    panel = read_panel(path)
    table = compute_panel(panel, OPTS, workers=0)
    return panel, table


def _row(table, name):
    return table[table["series"] == name].iloc[0]


@pytest.mark.parametrize("name", ["INDEX2", "INDEX1"])
def test_fit_is_at_least_as_good_as_scipy_gennorm(real_panel, name):
    """scipy.stats.gennorm is the same law (beta = shape): its own fit must not reach a higher
    log-likelihood than the panel's MLE, and the panel's log-likelihood is scipy's logpdf sum."""
    panel, table = real_panel
    x = next(s for s in panel.series if s.name == name).returns
    row = _row(table, name)
    ll_ours = stats.gennorm.logpdf(x, row.mle_shape, row.mle_loc, row.mle_scale).sum()
    np.testing.assert_allclose(row.mle_loglik, ll_ours, rtol=1e-11)
    beta, loc, scale = stats.gennorm.fit(x)
    ll_scipy = stats.gennorm.logpdf(x, beta, loc, scale).sum()
    assert ll_scipy <= row.mle_loglik + 1e-9 * abs(row.mle_loglik)
    # Index returns have fat tails: shape below 2 (common practice, no source).
    assert 0.5 < row.mle_shape < 2.0


@pytest.mark.parametrize("name", ["INDEX2", "INDEX1"])
def test_var_and_es_match_scipy(real_panel, name):
    """VaR = -gennorm.ppf(1 - c) (scipy); ES = -E[X | X <= -VaR] by numerical integration of
    scipy's gennorm density; 10-day figures by the square-root rule
    q_h = h m + sqrt(h) (q_1 - m) (common practice, no source)."""
    _, table = real_panel
    row = _row(table, name)
    law = (row.mle_shape, row.mle_loc, row.mle_scale)
    for c in OPTS.confidences:
        tag = f"{100 * c:.10g}"
        q = stats.gennorm.ppf(1 - c, *law)
        np.testing.assert_allclose(row[f"var_{tag}_1d"], -q, rtol=1e-10)
        tail, _ = integrate.quad(
            lambda t: t * stats.gennorm.pdf(t, *law), -np.inf, q, epsabs=1e-14, epsrel=1e-12
        )
        es = -tail / (1 - c)
        np.testing.assert_allclose(row[f"es_{tag}_1d"], es, rtol=1e-7)
        h, m = OPTS.horizon, row.mle_loc
        np.testing.assert_allclose(
            row[f"var_{tag}_{h}d"], -(h * m + math.sqrt(h) * (q - m)), rtol=1e-10
        )


def test_backtest_columns_match_published_formulas(real_panel):
    """Kupiec (1995) POF: LR = -2 ln[(1-p)^(n-x) p^x / ((1-x/n)^(n-x) (x/n)^x)] ~ chi2(1);
    Basel (1996) zones for 250 days at 99 %: green 0-4, yellow 5-9, red >= 10."""
    panel, table = real_panel
    for s in panel.series:
        row = _row(table, s.name)
        n, x, p = int(row.uncond_forecasts), int(row.uncond_exceptions), 0.01
        assert n == s.returns.size - OPTS.window
        phat = x / n
        lr = -2 * (
            (n - x) * math.log(1 - p)
            + x * math.log(p)
            - (n - x) * math.log(1 - phat)
            - (x * math.log(phat) if x else 0.0)
        )
        np.testing.assert_allclose(row.uncond_pof_pvalue, stats.chi2.sf(lr, 1), rtol=1e-9)
        last = int(row.uncond_exceptions_last)
        zone = "green" if last <= 4 else "yellow" if last <= 9 else "red"
        assert row.uncond_zone == zone


def test_row_equals_errdist_single_series_functions():
    """Every column is what errdist's own functions give on that series alone."""
    w = simulated_wide(n_series=1, n_prices=320)
    x = np.diff(np.log(w["S00"].to_numpy()))
    row = series_row("S00", x, OPTS)
    mle, mom = errdist.fit(x), errdist.fit(x, "moments")
    assert (row["mle_loc"], row["mle_scale"], row["mle_shape"]) == (mle.loc, mle.scale, mle.shape)
    assert (row["moments_loc"], row["moments_scale"], row["moments_shape"]) == (
        mom.loc,
        mom.scale,
        mom.shape,
    )
    for c in OPTS.confidences:
        tag = f"{100 * c:.10g}"
        assert row[f"var_{tag}_1d"] == errdist.value_at_risk(c, mle.loc, mle.scale, mle.shape)
        assert row[f"es_{tag}_10d"] == errdist.expected_shortfall(
            c, mle.loc, mle.scale, mle.shape, 10
        )
    seed = series_seed(OPTS.seed, "S00")
    assert row["gof_seed"] == seed
    assert row["gof_pvalue"] == errdist.goodness_of_fit(x, samples=19, seed=seed).pvalue
    # The seed column reproduces the p-value in a worksheet: ERRDIST_GOF with the seed as a
    # cell value (a double).
    from errdist.sheet.catalog import evaluate

    table = evaluate(
        "ERRDIST_GOF", x.reshape(-1, 1).tolist(), None, None, None, "ad", 19, float(seed)
    )
    assert dict((r[0], r[1]) for r in table)["p-value"] == row["gof_pvalue"]
    assert row["best_law"] == errdist.compare(x)["law"].iloc[0]
    var = errdist.rolling_var(x, 250, 0.99)
    bt = errdist.backtest(x[250:], var[250:], 0.99)
    assert row["uncond_exceptions"] == bt.exceptions
    assert row["uncond_cc_pvalue"] == bt.conditional_coverage.pvalue
    assert set(row) == set(columns(OPTS))


def test_seed_depends_on_the_name_only():
    assert series_seed(1, "A") == series_seed(1, "A")
    assert series_seed(1, "A") != series_seed(1, "B")
    assert series_seed(1, "A") != series_seed(2, "A")
    # A worksheet cell holds 15 digits exactly (IEEE double, common practice, no source).
    assert all(0 <= series_seed(k, n) < 10**15 for k in range(5) for n in "ABCDEFG")


def test_failed_steps_become_notes_and_short_series_skip_the_backtest():
    rng = np.random.default_rng(3)
    x = rng.uniform(-0.01, 0.01, 60)  # kurtosis near -1.2 and too short for the backtest
    row = series_row("U", x, default_options(gof_samples=0))
    assert row["status"] == "ok"
    assert "uncond backtest: needs more than the 250-return window, got 60" in row["notes"]
    assert math.isnan(row["uncond_exceptions"])
    flat = series_row("F", np.zeros(40), OPTS)
    assert flat["status"] == "failed"
    assert flat["reason"].startswith("maximum-likelihood fit:")


def test_table_ranks_by_es_and_keeps_failed_series_last(tmp_path):
    w = simulated_wide(n_series=4, n_prices=60).astype(object)
    w.loc[20, "S01"] = None
    panel = read_panel(write(w, tmp_path / "w.csv"))
    table = compute_panel(panel, default_options(gof_samples=0, models=()), workers=0)
    ok = table[table.status == "ok"]
    assert list(ok["rank"]) == [1, 2, 3]
    assert list(ok["es_99_1d"]) == sorted(ok["es_99_1d"], reverse=True)
    last = table.iloc[-1]
    assert last.series == "S01" and last.status == "failed" and "row 22" in last.reason
    assert table["rank"].isna().iloc[-1]


def test_conditional_models_are_listed_and_backtested_like_their_own_forecasts():
    """ewma / gjr come from errdist.risk.forecasts; the panel backtests their VaR column."""
    from errdist.risk.forecasts import rolling_forecasts

    rng = np.random.default_rng(21)
    x = errdist.rvs(1060, 0.0, 0.01, 1.3, seed=rng)
    opts = default_options(gof_samples=0, rivals=False, models=("uncond", "ewma"))
    assert default_options().models == ("uncond",)
    row = series_row("E", x, opts)
    var = rolling_forecasts(x, "ewma", 0.99).var
    bt = errdist.backtest(x[250:], var[250:], 0.99)
    assert row["ewma_forecasts"] == bt.n == 60
    assert row["ewma_exceptions"] == bt.exceptions
    assert row["ewma_cc_pvalue"] == bt.conditional_coverage.pvalue
    assert row["uncond_forecasts"] == 1060 - 250
