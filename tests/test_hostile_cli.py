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
