"""Resource limits and the far tail: bounded work, stated accuracy, messages naming the limit.

References: the "iid" horizon rule for shape 2 (the normal law, sigma = a / sqrt 2) must equal
the square-root-of-time rule, whose VaR and ES are the normal closed forms (scipy.stats.norm):
VaR = s z, ES = s phi(z) / u with s = sqrt(h) a / sqrt 2, z = Phi^-1(1 - u).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from errdist.errors import DomainError
from errdist.risk import expected_shortfall, horizon, value_at_risk
from real_series import index as real_index


@pytest.mark.parametrize("u", [1e-6, 1e-8, 1e-9])
def test_iid_es_accurate_to_1e6_down_to_the_stated_tail(u: float) -> None:
    h = 10
    s = math.sqrt(h) / math.sqrt(2.0)
    z = stats.norm.isf(u)
    es = expected_shortfall(1.0 - u, 0.0, 1.0, 2.0, h, horizon_rule="iid")
    var = value_at_risk(1.0 - u, 0.0, 1.0, 2.0, h, horizon_rule="iid")
    assert es == pytest.approx(s * stats.norm.pdf(z) / u, rel=1e-6)
    assert var == pytest.approx(s * z, rel=1e-6)


@pytest.mark.parametrize("u", [1e-10, 1e-13, 1e-15])
def test_iid_refuses_beyond_the_stated_tail(u: float) -> None:
    # ES error was 6.7e-6 at 1 - 1e-10, 0.9% at 1 - 1e-13, 85% at 1 - 1e-15 (issue 12)
    for c in (1.0 - u, u):
        with pytest.raises(DomainError, match='too far in the tail for the "iid"'):
            expected_shortfall(c, 0.0, 1.0, 2.0, 10, horizon_rule="iid")
    # the square-root rule has no such limit (closed form from the one-day law)
    assert np.isfinite(value_at_risk(1.0 - u, 0.0, 1.0, 2.0, 10))


def test_confidence_that_rounds_away_is_blamed_on_confidence() -> None:
    with pytest.raises(DomainError, match="confidence"):
        value_at_risk(1e-320, 0.0, 1.0, 2.0)


def test_horizon_cache_memory_is_capped(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(horizon, "CACHE_BYTES", 8 * 1024 * 1024)
    horizon._CACHE.clear()
    for h in range(20, 60, 2):  # 20 distinct horizons at a heavy-tailed shape
        value_at_risk(0.99, 0.0, 1.0, 0.5, h, horizon_rule="iid")
    kept = sum(map(horizon._nbytes, horizon._CACHE.values()))
    assert kept <= 8 * 1024 * 1024 and len(horizon._CACHE) >= 1
    horizon._CACHE.clear()


def test_convolution_grid_limit_is_a_clear_domain_error(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(horizon, "MAX_FFT", 1 << 16)
    horizon._CACHE.clear()
    with pytest.raises(DomainError, match="convolution grid of .* more than the limit"):
        value_at_risk(0.99, 0.0, 1.0, 0.5, 250, horizon_rule="iid")
    from errdist.sheet.catalog import evaluate
    from errdist.sheet.cells import SheetError

    with pytest.raises(SheetError) as info:
        evaluate("ERRDIST_VAR", 0.99, 0.0, 1.0, 0.5, 250, None, "iid")
    assert info.value.code == "#NUM!" and "limit" in info.value.message
    horizon._CACHE.clear()
    assert np.isfinite(value_at_risk(0.99, 0.0, 1.0, 0.5, 10, horizon_rule="iid"))


def test_prices_row_limit_names_the_variable(tmp_path, monkeypatch: pytest.MonkeyPatch) -> None:
    from errdist.data.prices_io import read_prices
    from errdist.errors import InputTypeError

    s = real_index(2).load()["Adj Close"].iloc[-200:]
    p = tmp_path / "p.csv"
    p.write_text("date,price\n" + "".join(f"{d:%Y-%m-%d},{v!r}\n" for d, v in s.items()))
    monkeypatch.setenv("ERRDIST_MAX_PRICE_ROWS", "150")
    with pytest.raises(InputTypeError, match="200 data rows.*ERRDIST_MAX_PRICE_ROWS=200"):
        read_prices(p)
    monkeypatch.setenv("ERRDIST_MAX_PRICE_ROWS", "200")
    assert len(read_prices(p)) == 200
