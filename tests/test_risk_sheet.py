"""ERRDIST_VAR, ERRDIST_ES, ERRDIST_BACKTEST, ERRDIST_ROLLING_VAR called as Excel calls them.

Calls go through the replay of xlwings 0.37.8's own conversion code (tests/sheet_harness.py).
References: scipy.stats.gennorm / norm (VaR, ES), scipy.stats.power_divergence (Kupiec's G
statistic), scipy.stats.binom (BCBS cumulative probabilities), and the core functions for the
layout of tables and columns.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pytest
from scipy import stats

import sheet_harness as h
from errdist.checks.rolling import rolling_var
from errdist.sheet.catalog import evaluate


@pytest.fixture(scope="module")
def xl() -> Any:
    with h.replay() as r:
        yield r


def test_var_column_of_confidences_matches_scipy(xl: Any) -> None:
    conf = [0.95, 0.99, 0.995]
    got = xl.cells("ERRDIST_VAR", h.column(conf), 0.0004, 0.011, 1.3)
    want = -stats.gennorm.ppf(1 - np.array(conf), 1.3, loc=0.0004, scale=0.011)  # reference
    np.testing.assert_allclose([r[0] for r in got], want, rtol=1e-10)


def test_es_normal_case_in_money_with_horizon(xl: Any) -> None:
    # shape 2, sigma = a / sqrt 2; 10 days by the sqrt rule is exact for the normal:
    # ES = amount * (sd phi(z_u)/u - mean) with mean 10 mu, sd sqrt(10) sigma (scipy.stats.norm).
    mu, sigma, amount = 0.0002, 0.01, 5e6
    sd = math.sqrt(10) * sigma
    want = amount * (sd * stats.norm.pdf(stats.norm.ppf(0.01)) / 0.01 - 10 * mu)
    got = xl.cells("ERRDIST_ES", 0.99, mu, sigma * math.sqrt(2), 2.0, 10, amount, "sqrt")
    assert got[0][0] == pytest.approx(want, rel=1e-10)
    iid = xl.cells("ERRDIST_ES", 0.99, mu, sigma * math.sqrt(2), 2.0, 10, amount, "iid")
    assert iid[0][0] == pytest.approx(want, rel=1e-6)


@pytest.mark.parametrize(
    ("args", "start"),
    [
        ((1.5, 0.0, 0.01, 1.3), "#NUM! confidence must be a fraction in (0, 1)"),
        ((0.99, 0.0, 0.01, 1.3, 2.5, h.Missing(), "iid"), "#NUM! horizon must be a whole number"),
        ((0.99, 0.0, 0.01, 1.3, 0.5), "#NUM! horizon must be >= 1 day"),
        ((0.99, 0.0, 0.01, 1.3, 1, h.Missing(), "cube"), "#VALUE! horizon_rule must be one of"),
        ((0.99, 0.0, 0.01, 1.3, 1, -100.0), "#NUM! amount must be > 0"),
    ],
)
def test_var_bad_arguments_give_coded_text(xl: Any, args: tuple, start: str) -> None:
    got = xl.cells("ERRDIST_VAR", *args)
    assert got[0][0].startswith(start), got


def test_backtest_table_through_xlwings(xl: Any) -> None:
    rng = np.random.default_rng(11)
    r = 0.01 * rng.standard_normal(250)
    r[[20, 90, 91, 200, 230, 240]] = -0.05  # six exceptions, two in a row
    var = [0.03] * 250
    got = xl.cells("ERRDIST_BACKTEST", h.column(list(r)), h.column(var), 0.99, True)
    assert got[0] == ["measure", "value"]
    table = dict((row[0], row[1]) for row in got[1:])
    assert table["observations"] == 250 and table["exceptions"] == 6
    assert table["pairs dropped"] == 0
    ref = stats.power_divergence([6, 244], [2.5, 247.5], lambda_="log-likelihood")  # Kupiec
    assert table["LR POF (Kupiec)"] == pytest.approx(float(ref.statistic), rel=1e-10)
    assert table["p-value CC"] == pytest.approx(
        stats.chi2.sf(table["LR POF (Kupiec)"] + table["LR IND (Christoffersen)"], 2), rel=1e-10
    )
    # BCBS (1996): 6 exceptions in 250 days at 99% is yellow, plus factor 0.50 (from memory)
    assert table["zone"] == "yellow" and table["plus factor"] == 0.5


def test_backtest_blanks_and_unequal_heights(xl: Any) -> None:
    r = [-0.03, 0.01, None, -0.002, 0.004, -0.05]
    v = [0.02, 0.02, 0.02, None, 0.02]  # one row shorter: its last pair is dropped
    got = xl.cells("ERRDIST_BACKTEST", h.column(r), h.column(v), 0.99)
    table = dict((row[0], row[1]) for row in got)
    assert table["observations"] == 3 and table["pairs dropped"] == 3
    assert table["exceptions"] == 1
    assert table["plus factor"].startswith("none")


def test_rolling_var_column_is_aligned_with_blank_first_window(xl: Any) -> None:
    r = list(0.01 * stats.t.rvs(4, size=60, random_state=np.random.default_rng(5)))
    r[30] = None
    got = xl.cells("ERRDIST_ROLLING_VAR", h.column(r), 20, 0.99)
    assert len(got) == 60 and all(len(row) == 1 for row in got)
    assert all(row[0] == "" or row[0] is None for row in got[:20])  # blank cells
    core = rolling_var(np.array([math.nan if v is None else v for v in r]), 20, 0.99)
    np.testing.assert_allclose([row[0] for row in got[20:]], core[20:], rtol=1e-12)


def test_rolling_then_backtest_through_the_engine() -> None:
    # The engine path (errdist.sheet.catalog.evaluate) chains the two functions as a workbook
    # does: the rolling column's blank first window shows up as dropped pairs.
    r = (0.01 * stats.t.rvs(4, size=300, random_state=np.random.default_rng(9))).reshape(-1, 1)
    col = evaluate("ERRDIST_ROLLING_VAR", r.tolist(), 100, 0.99)
    table = dict((row[0], row[1]) for row in evaluate("ERRDIST_BACKTEST", r.tolist(), col, 0.99))
    assert table["pairs dropped"] == 100 and table["observations"] == 200
    cum = stats.binom.cdf(table["exceptions"], 200, 0.01)  # rule behind the zones
    assert table["zone"] == ("green" if cum < 0.95 else "yellow" if cum < 0.9999 else "red")
