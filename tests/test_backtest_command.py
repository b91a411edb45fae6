"""``errdist backtest``: output formats, field names, progress, and messages for bad input.

The statistics themselves are tested in test_forecasts.py / test_es_backtest.py; here the
command is checked against errdist.checks.model_backtest.backtest_models run directly, and the JSON
field names against docs/backtesting.md.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from errdist import cli

pytest.importorskip("arch", reason="the arch package is not installed")

DOCS = Path(__file__).resolve().parents[1] / "docs" / "backtesting.md"
FAST = ["--window", "100", "--fit-window", "250", "--refit", "50", "--simulations", "50"]


def _prices_file(tmp_path: Path, n: int = 420, seed: int = 9) -> Path:
    # invented, seeded price path with volatility clustering
    rng = np.random.default_rng(seed)
    r = np.empty(n - 1)
    s2 = 1e-4
    for t in range(n - 1):
        r[t] = np.sqrt(s2) * rng.standard_t(5) / np.sqrt(5 / 3)
        s2 = 2e-6 + 0.08 * r[t] ** 2 + 0.9 * s2
    prices = 100 * np.exp(np.r_[0.0, np.cumsum(r)])
    dates = pd.bdate_range("2020-01-01", periods=n)
    path = tmp_path / "fund.csv"
    pd.DataFrame({"Date": dates.strftime("%Y-%m-%d"), "Close": prices}).to_csv(path, index=False)
    return path


def test_json_output_keys_and_values(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    from errdist.checks.model_backtest import backtest_models

    path = _prices_file(tmp_path)
    code = cli.main(
        ["backtest", "--prices", str(path), "--models", "symmetric,ewma,gjr", "--format", "json"]
        + FAST
    )
    out = capsys.readouterr()
    assert code == 0
    data = json.loads(out.out)
    assert list(data) == ["symmetric", "ewma", "gjr"]
    fields = set(data["gjr"])
    for key in (
        "n",
        "exceptions",
        "exception_rate",
        "kupiec_pvalue",
        "independence_pvalue",
        "conditional_coverage_pvalue",
        "es_statistic",
        "es_pvalue",
        "zone",
    ):
        assert key in fields
    # the command reports what the library computes on the same returns
    prices = pd.read_csv(path)["Close"].to_numpy()
    direct = backtest_models(
        np.diff(np.log(prices)),
        ["symmetric", "ewma", "gjr"],
        0.99,
        window=100,
        fit_window=250,
        refit=50,
        simulations=50,
    )
    for name, res in direct.items():
        assert data[name]["exceptions"] == res.exceptions
        assert data[name]["kupiec_pvalue"] == pytest.approx(res.kupiec_pvalue)
        assert data[name]["es_pvalue"] == pytest.approx(res.es_pvalue)
        assert data[name]["n"] == 419 - 250
    assert "forecasting" in out.err and "done in" in out.err
    # every JSON field is documented in docs/backtesting.md
    doc = DOCS.read_text(encoding="utf-8")
    missing = [k for k in fields if not re.search(rf"`{k}`", doc)]
    assert not missing, f"fields not documented in docs/backtesting.md: {missing}"


def test_table_output(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = _prices_file(tmp_path)
    code = cli.main(["backtest", "--prices", str(path), "--models", "skewed, garch"] + FAST)
    out = capsys.readouterr().out
    assert code == 0
    assert "Kupiec p" in out and "zone 250d" in out
    lines = [ln for ln in out.splitlines() if ln.startswith(("skewed", "garch"))]
    assert len(lines) == 2


@pytest.mark.parametrize(
    ("extra", "message"),
    [
        (["--confidence", "99"], "--confidence must be a fraction"),
        (["--confidence", "abc"], "--confidence must be a number"),
        (["--models", "symmetric,egarch"], "unknown model 'egarch'"),
        (["--refit", "0"], "--refit must be at least 1"),
        (["--refit", "2.5"], "--refit must be a whole number"),
        (["--fit-window", "5000"], "needs 5,000 earlier returns"),
        (["--lambda", "1.5"], "--lambda must be in"),
    ],
)
def test_bad_input_is_one_line_without_traceback(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], extra: list[str], message: str
) -> None:
    path = _prices_file(tmp_path)
    args = ["backtest", "--prices", str(path)] + FAST + extra
    code = cli.main(args)
    err = capsys.readouterr().err
    assert code == 2
    assert message in err
    assert "Traceback" not in err


def test_missing_file(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code = cli.main(["backtest", "--prices", str(tmp_path / "nope.csv")])
    err = capsys.readouterr().err
    assert code == 2 and "no such file" in err and "Traceback" not in err
