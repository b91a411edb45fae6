"""Kupiec, Christoffersen and traffic-light backtests against outside references.

References (named beside each check):
* Kupiec's LR_POF is the likelihood-ratio (G) statistic of the observed counts (x, n - x)
  against the expected (n p, n (1 - p)): scipy.stats.power_divergence(lambda_="log-likelihood").
* Christoffersen's LR_IND is the G statistic of independence of the 2 x 2 transition table
  [[n00, n01], [n10, n11]]: scipy.stats.chi2_contingency(lambda_="log-likelihood",
  correction=False) (row-conditional binomials vs a common probability: same likelihoods).
* p-values: scipy.stats.chi2.
* Kupiec (1995), J. Derivatives 3(2):73-84, table of non-rejection regions at the 5 % level
  (from memory): p = 1 %: T = 510 -> 1 < N < 11, T = 1000 -> 4 < N < 17, T = 255 -> N < 7;
  p = 5 %: T = 255 -> 6 < N < 21, T = 510 -> 16 < N < 36, T = 1000 -> 37 < N < 65.
* BCBS (1996) backtesting framework: cumulative binomial probabilities for 250 days at 99 %,
  zones green 0-4 / yellow 5-9 / red >= 10, plus factors 0.40, 0.50, 0.65, 0.75, 0.85, 1.00
  (plus factors from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from errdist.checks.backtest import backtest, christoffersen, kupiec, traffic_light
from errdist.errors import DomainError, InputTypeError, InsufficientDataError


@pytest.mark.parametrize(
    ("x", "n", "c"),
    [
        (0, 250, 0.99),
        (1, 250, 0.99),
        (4, 250, 0.99),
        (12, 250, 0.99),
        (250, 250, 0.99),
        (37, 500, 0.95),
        (3, 1000, 0.995),
        (60, 60, 0.5),
    ],
)
def test_kupiec_matches_g_test(x: int, n: int, c: float) -> None:
    # Reference: scipy.stats.power_divergence, log-likelihood (G) statistic, 1 degree of freedom.
    p = 1 - c
    ref = stats.power_divergence([x, n - x], [n * p, n * (1 - p)], lambda_="log-likelihood")
    got = kupiec(x, n, c)
    assert got.statistic == pytest.approx(float(ref.statistic), rel=1e-10, abs=1e-12)
    assert got.pvalue == pytest.approx(float(stats.chi2.sf(ref.statistic, 1)), rel=1e-10)
    assert got.df == 1


def test_kupiec_boundary_cases_hand_derived() -> None:
    # Kupiec's formula with 0 ln 0 = 0: x = 0 gives -2 n ln(1 - p); x = n gives -2 n ln p.
    assert kupiec(0, 250, 0.99).statistic == pytest.approx(-2 * 250 * math.log(0.99), rel=1e-13)
    assert kupiec(250, 250, 0.99).statistic == pytest.approx(-2 * 250 * math.log(0.01), rel=1e-13)
    # exactly the expected count: statistic 0, p-value 1
    res = kupiec(5, 500, 0.99)
    assert res.statistic == pytest.approx(0.0, abs=1e-12) and res.pvalue == pytest.approx(1.0)


@pytest.mark.parametrize(
    ("n", "c", "lo", "hi"),
    [
        (510, 0.99, 1, 11),
        (1000, 0.99, 4, 17),
        (255, 0.95, 6, 21),
        (510, 0.95, 16, 36),
        (1000, 0.95, 37, 65),
    ],
)
def test_kupiec_non_rejection_regions(n: int, c: float, lo: int, hi: int) -> None:
    # Kupiec (1995) table of 5 % non-rejection regions lo < N < hi (from memory).
    for x in range(0, hi + 5):
        accepted = kupiec(x, n, c).pvalue > 0.05
        assert accepted == (lo < x < hi), x


def test_kupiec_255_days_upper_bound() -> None:
    # Kupiec (1995), p = 1 %, T = 255: N < 7 (from memory); 6 accepted, 7 rejected.
    assert kupiec(6, 255, 0.99).pvalue > 0.05
    assert kupiec(7, 255, 0.99).pvalue < 0.05


def _transitions(hits: np.ndarray) -> list[list[int]]:
    prev, curr = hits[:-1], hits[1:]
    return [
        [int(np.sum((prev == 0) & (curr == 0))), int(np.sum((prev == 0) & (curr == 1)))],
        [int(np.sum((prev == 1) & (curr == 0))), int(np.sum((prev == 1) & (curr == 1)))],
    ]


@pytest.mark.parametrize("seed", [1, 2, 3, 4])
def test_christoffersen_matches_contingency_g_test(seed: int) -> None:
    rng = np.random.default_rng(seed)
    # clustered hits: a two-state Markov chain (so the independence statistic is not ~0)
    hits = np.zeros(500, dtype=int)
    for t in range(1, 500):
        hits[t] = rng.random() < (0.25 if hits[t - 1] else 0.02)
    table = _transitions(hits)
    assert min(min(row) for row in table) > 0
    ref = stats.chi2_contingency(table, lambda_="log-likelihood", correction=False)
    got = christoffersen(hits, 0.99)
    assert got.independence.statistic == pytest.approx(float(ref.statistic), rel=1e-10)
    assert got.independence.pvalue == pytest.approx(float(ref.pvalue), rel=1e-9)
    assert (got.n00, got.n01, got.n10, got.n11) == tuple(table[0] + table[1])
    # LR_CC = LR_POF + LR_IND with chi2(2) (Christoffersen 1998)
    pof = kupiec(int(hits.sum()), hits.size, 0.99)
    assert got.pof.statistic == pytest.approx(pof.statistic, rel=1e-12)
    cc = pof.statistic + float(ref.statistic)
    assert got.conditional_coverage.statistic == pytest.approx(cc, rel=1e-10)
    assert got.conditional_coverage.pvalue == pytest.approx(float(stats.chi2.sf(cc, 2)), rel=1e-9)
    assert got.conditional_coverage.df == 2


def test_christoffersen_single_isolated_exception() -> None:
    # Table [[n-3, 1], [1, 0]]: one empty cell (0 ln 0 = 0); scipy's G test handles it too.
    hits = np.zeros(250, dtype=int)
    hits[100] = 1
    ref = stats.chi2_contingency([[247, 1], [1, 0]], lambda_="log-likelihood", correction=False)
    got = christoffersen(hits, 0.99)
    assert got.independence.statistic == pytest.approx(float(ref.statistic), rel=1e-10)


def test_christoffersen_edge_cases_without_transitions() -> None:
    # No exceptions: pi01 = pi11 = pi = 0 -> LR_IND = 0 (hand-derived, 0 ln 0 = 0).
    none = christoffersen(np.zeros(250), 0.99)
    assert none.independence.statistic == 0.0 and none.independence.pvalue == 1.0
    assert none.pof.statistic == pytest.approx(-2 * 250 * math.log(0.99), rel=1e-13)
    # All exceptions: only 1 -> 1 transitions, pi11 = pi = 1 -> LR_IND = 0.
    every = christoffersen(np.ones(40), 0.99)
    assert every.independence.statistic == 0.0
    assert every.pof.statistic == pytest.approx(-2 * 40 * math.log(0.01), rel=1e-13)
    # One exception on the last day: no transition out of state 1; pi01 = pi -> LR_IND = 0.
    last = np.zeros(100)
    last[-1] = 1
    assert christoffersen(last, 0.99).independence.statistic == pytest.approx(0.0, abs=1e-12)
    # Two consecutive exceptions and nothing else: hand-derived from Christoffersen's formula,
    # 99 transitions: n00 = 96, n01 = 1, n10 = 1, n11 = 1 (hits on days 50 and 51 of 100).
    pair = np.zeros(100)
    pair[50:52] = 1
    pi, pi01, pi11 = 2 / 99, 1 / 97, 1 / 2
    lr = -2 * (97 * math.log(1 - pi) + 2 * math.log(pi)) + 2 * (
        96 * math.log(1 - pi01) + math.log(pi01) + math.log(1 - pi11) + math.log(pi11)
    )
    assert christoffersen(pair, 0.99).independence.statistic == pytest.approx(lr, rel=1e-12)


BCBS_CUMULATIVE = [8.11, 28.58, 54.32, 75.81, 89.22, 95.88, 98.63, 99.60, 99.89, 99.97, 99.99]
BCBS_PLUS = [0.0] * 5 + [0.40, 0.50, 0.65, 0.75, 0.85] + [1.0]


@pytest.mark.parametrize("k", range(11))
def test_traffic_light_matches_bcbs_table(k: int) -> None:
    # BCBS (1996): cumulative probabilities (%, 2 decimals), zones, plus factors (from memory);
    # the probabilities are also checked against scipy.stats.binom.
    light = traffic_light(k)
    assert round(light.cumulative_probability * 100, 2) == BCBS_CUMULATIVE[k]
    assert light.cumulative_probability == pytest.approx(stats.binom.cdf(k, 250, 0.01), rel=1e-12)
    assert light.zone == ("green" if k <= 4 else "yellow" if k <= 9 else "red")
    assert light.plus_factor == BCBS_PLUS[k]


def test_traffic_light_other_sizes_follow_cumulative_rule() -> None:
    # Rule behind the BCBS table: green while P(X <= k) < 95 %, yellow while < 99.99 %
    # (X ~ Binomial(n, 1 - c), scipy.stats.binom); no plus-factor table off 250 days at 99 %.
    for n, c in [(500, 0.99), (1000, 0.99), (250, 0.975), (260, 0.99)]:
        for k in range(0, 40):
            cum = stats.binom.cdf(k, n, 1 - c)
            light = traffic_light(k, n, c)
            assert light.zone == ("green" if cum < 0.95 else "yellow" if cum < 0.9999 else "red")
            assert light.plus_factor is None
    assert traffic_light(30, 250).zone == "red" and traffic_light(30, 250).plus_factor == 1.0


def test_backtest_counts_exceptions_strictly_and_drops_blanks() -> None:
    # An exception is return < -VaR: a loss equal to the VaR is not one.
    returns = [-0.03, 0.01, -0.02, None, -0.025, float("nan"), 0.0, -0.05, 0.002, -0.001]
    var = [0.02, 0.02, 0.02, 0.02, 0.02, 0.02, float("nan"), 0.02, None, 0.02]
    res = backtest(returns, var, 0.99)
    # kept pairs: days 1, 2, 3, 5, 8, 10 -> returns -0.03, 0.01, -0.02, -0.025, -0.05, -0.001
    assert res.n_dropped == 4
    assert res.n == 6
    assert res.hits.tolist() == [1, 0, 0, 1, 1, 0]
    assert res.exceptions == 3
    assert res.expected == pytest.approx(0.06)
    ref = stats.power_divergence([3, 3], [0.06, 5.94], lambda_="log-likelihood")
    assert res.pof.statistic == pytest.approx(float(ref.statistic), rel=1e-10)
    ch = christoffersen([1, 0, 0, 1, 1, 0], 0.99)
    assert res.independence == ch.independence
    assert res.conditional_coverage == ch.conditional_coverage
    assert res.zone == "red" and res.plus_factor is None
    labels = [label for label, _ in res.rows()]
    assert labels[:4] == ["observations", "exceptions", "expected exceptions", "pairs dropped"]
    assert labels[-2:] == ["zone", "plus factor"]


def test_backtest_on_250_days_gives_bcbs_plus_factor() -> None:
    returns = np.full(250, 0.001)
    returns[[10, 50, 90, 130, 170, 210]] = -0.05
    res = backtest(returns, np.full(250, 0.02), 0.99)
    assert res.exceptions == 6 and res.zone == "yellow" and res.plus_factor == 0.50
    assert res.n_dropped == 0


@pytest.mark.parametrize(
    ("args", "error", "message"),
    [
        (([0.1, "x"], [0.02, 0.02], 0.99), InputTypeError, "returns must be numbers"),
        (([0.1, 0.2, 0.3], [0.02, 0.02], 0.99), InputTypeError, "same number of cells"),
        (([0.1, float("inf")], [0.02, 0.02], 0.99), DomainError, "returns must be finite"),
        (([0.1, None, 0.2], [0.02, 0.02, None], 0.99), InsufficientDataError, "at least 2"),
        (([0.1, 0.2], [0.02, 0.02], 99), DomainError, "confidence must be a fraction"),
        (([0.1, 0.2], [0.02, 0.02], "high"), InputTypeError, "confidence must be a number"),
    ],
)
def test_backtest_bad_inputs(args: tuple, error: type, message: str) -> None:
    with pytest.raises(error, match=message):
        backtest(*args)


@pytest.mark.parametrize(
    ("call", "error", "message"),
    [
        (lambda: kupiec(11, 10, 0.99), DomainError, "cannot exceed observations"),
        (lambda: kupiec(-1, 10, 0.99), DomainError, "exceptions must be >= 0"),
        (lambda: kupiec(2.5, 10, 0.99), DomainError, "whole number"),
        (lambda: kupiec(1, 0, 0.99), DomainError, "observations must be >= 1"),
        (lambda: kupiec(1, 10, 1.0), DomainError, "confidence"),
        (lambda: traffic_light("four"), InputTypeError, "whole number"),
        (lambda: christoffersen([0, 2, 1], 0.99), DomainError, "hits must be 0 or 1, got 2"),
        (lambda: christoffersen([1], 0.99), InsufficientDataError, "at least 2 days"),
        (lambda: christoffersen([0, None, 1], 0.99), InputTypeError, "blank at position 2"),
    ],
)
def test_test_functions_bad_inputs(call, error: type, message: str) -> None:
    with pytest.raises(error, match=message):
        call()


def test_result_vocabulary_and_deprecated_aliases() -> None:
    # One vocabulary across results: n / n_dropped / confidence as in Fit and GofResult; the
    # old names still answer for one release, with a DeprecationWarning.
    r = np.array([0.01, -0.05, 0.0, np.nan, 0.02, -0.001])
    v = np.full(r.size, 0.03)
    res = backtest(r, v, 0.99)
    assert (res.n, res.n_dropped, res.confidence) == (5, 1, 0.99)
    with pytest.warns(DeprecationWarning, match="use .n"):
        assert res.observations == 5
    with pytest.warns(DeprecationWarning, match="use .n_dropped"):
        assert res.dropped == 1
    light = traffic_light(3, 250, 0.99)
    assert (light.n, light.confidence) == (250, 0.99)
    with pytest.warns(DeprecationWarning):
        assert light.observations == 250
