"""Hostile command lines: never overwrite a file without --force, never a traceback.

Each case here reproduced a defect of an adversarial run (issue 12) before it was fixed.
"""

from __future__ import annotations

import argparse
from pathlib import Path

import pytest

from errdist import cli
from errdist.sheet import vba


def test_vba_refuses_to_overwrite_without_force(
    tmp_path: Path, capsys: pytest.CaptureFixture
) -> None:
    prices = tmp_path / "prices.bas"
    prices.write_bytes(b"precious")
    assert cli.main(["vba", "--out", str(prices)]) == 2
    assert "exists; use --force" in capsys.readouterr().err
    assert prices.read_bytes() == b"precious"
    assert cli.main(["vba", "--out", str(prices), "--force"]) == 0
    assert prices.read_bytes().startswith(b"Attribute VB_Name")
    assert [p.name for p in tmp_path.iterdir()] == ["prices.bas"]  # no temp file left


@pytest.mark.parametrize("name", ["prices.csv", "book.xlsx", "notes", "errdist_udfs.bas.txt"])
def test_vba_refuses_a_file_that_is_not_bas(
    tmp_path: Path, name: str, capsys: pytest.CaptureFixture
) -> None:
    target = tmp_path / name
    target.write_bytes(b"date,price\n2026-01-02,100\n")
    for force in (False, True):
        assert vba.main(argparse.Namespace(out=str(target), force=force)) == 2
        assert "must name a .bas file" in capsys.readouterr().err
        assert target.read_bytes() == b"date,price\n2026-01-02,100\n"


def test_vba_refuses_a_folder(tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    folder = tmp_path / "x.bas"
    folder.mkdir()
    assert vba.main(argparse.Namespace(out=str(folder), force=True)) == 2
    assert "is a folder" in capsys.readouterr().err
    assert folder.is_dir()


def test_ragged_range_is_refused_not_reflowed() -> None:
    # [[1, 2], [3], [4, 5, 6]] holds 6 values = 3 rows x 2: it used to be re-flowed silently.
    from errdist.sheet.cells import SheetError, as_data

    with pytest.raises(SheetError, match="row 2 has 1"):
        as_data([[1.0, 2.0], [3.0], [4.0, 5.0, 6.0]], "data")
    with pytest.raises(SheetError, match="different lengths"):
        as_data([[1.0, 2.0], 3.0, [4.0, 5.0]], "data")


@pytest.mark.parametrize("code", ["#N/A", "#DIV/0!", "#REF!", "#NAME?", "#NULL!"])
def test_input_error_code_passes_through(code: str) -> None:
    # Built-in functions pass an input's error value through (=ABS(NA()) is #N/A; common
    # practice, no source); errdist used to turn every one into #VALUE!.
    from errdist.sheet.catalog import evaluate
    from errdist.sheet.cells import SheetError

    with pytest.raises(SheetError) as info:
        evaluate("ERRDIST_CDF", code, 0.0, 1.0, 2.0)
    assert info.value.code == code
    with pytest.raises(SheetError) as info:
        evaluate("ERRDIST_FIT", [[0.01], [code], [0.02]])
    assert info.value.code == code


def test_kurtosis_and_std_of_extreme_magnitudes() -> None:
    # scipy.stats.kurtosis(bias=False) is KURT (Joanes & Gill 1998, G2); it is scale-free, so
    # data x 1e300 and x 1e-300 must give the value scipy gives for x itself.
    import numpy as np
    from scipy import stats

    from errdist.estimate.sample_stats import sample_excess_kurtosis, sample_std

    x = np.random.default_rng(3).standard_t(5, 400)
    ref = stats.kurtosis(x, bias=False)
    for factor in (1e300, 1e-300, 2.0**-1070 * 2**40):
        assert sample_excess_kurtosis(x * factor) == pytest.approx(ref, rel=1e-12)
    assert sample_std(x * 1e-300) == pytest.approx(np.std(x, ddof=1) * 1e-300, rel=1e-13)
    assert sample_std(x * 1e300) == pytest.approx(np.std(x, ddof=1) * 1e300, rel=1e-13)


def test_fit_and_compare_of_tiny_and_huge_data() -> None:
    import numpy as np
    from scipy import stats

    import errdist
    from errdist.checks.rivals import compare

    x = np.random.default_rng(4).standard_t(5, 400) * 0.01
    # scipy.stats.norm.fit is the normal MLE (mean, divisor-n sd): the reference for the
    # normal row, at any magnitude.
    loc, sd = stats.norm.fit(x)
    for factor in (1e-300, 1e-100, 1e300):
        table = compare(x * factor).set_index("law")
        assert table.loc["normal", "scale"] == pytest.approx(sd * factor, rel=1e-12)
        assert np.isfinite(table["loglik"]).all()
        f = errdist.fit(x * factor)  # used to raise ZeroDivisionError at 1e-100
        # scipy.stats.gennorm.fit (generic MLE) on the unscaled data, scaled: same shape
        b, _, a = stats.gennorm.fit(x)
        assert f.shape == pytest.approx(b, rel=2e-3)
        assert f.scale == pytest.approx(a * factor, rel=2e-3)
    # one 1e300 outlier used to make COMPARE say "no spread": now a table, the heavy-tailed
    # laws first, the generalized normal flagged at its bound
    y = x.copy()
    y[7] = 1e300
    table = compare(y)
    assert list(table["law"][:2]) == ["Student t", "Cauchy"]
    assert np.isfinite(table["loglik"]).all()
    assert bool(table.set_index("law").loc["generalized normal", "at_bound"])


def test_refresh_summary_with_na_figures_is_not_success() -> None:
    # refresh used to exit 0 when every figure was n/a; the figures it checks are the ones
    # format_summary prints (fits, 99% VaR and ES).
    from errdist.workbook.commands import missing_figures

    ok = {
        "moments": {"loc": 0.0, "scale": 0.01, "shape": 1.2},
        "mle": {"loc": 0.0, "scale": 0.01, "shape": 1.1},
        "var99": 0.03,
        "es99": 0.04,
    }
    assert missing_figures(ok) == []
    assert missing_figures({}) == [
        "the moments fit",
        "the MLE fit",
        "the 99% VaR",
        "the 99% ES",
    ]
    assert missing_figures({**ok, "var99": "#N/A", "es99": float("nan")}) == [
        "the 99% VaR",
        "the 99% ES",
    ]
