"""``check_workbook``: stored (cached) values against the headless recomputation.

The reference workbook stores values computed with numpy/pandas (named beside each), so an
untampered file must pass and a file whose XML was edited must fail at exactly that cell.
"""

from __future__ import annotations

import math
import re
import zipfile
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

xlsxwriter = pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")
pytest.importorskip("formulas", reason="formulas not installed")

from errdist.workbook import engine  # noqa: E402
from errdist.workbook.check import Mismatch, check_report, check_workbook, compare_values  # noqa: E402

DATA = [0.004, -0.011, 0.007, 0.0, 0.013, -0.021, 0.002, 0.009, -0.003, 0.016]


def _halves(name: str, *args):
    """Stand-in worksheet function: the range's values divided by 2, same shape."""
    (rng,) = args
    return [[v / 2.0 for v in row] for row in rng]


@pytest.fixture(autouse=True)
def _registry():
    engine.register_functions(["ERRDIST_T_HALVES"], _halves)


def _reference_book(path: Path) -> Path:
    """A workbook whose cached values come from numpy/pandas, not from the engine."""
    x = pd.Series(DATA)
    wb = xlsxwriter.Workbook(str(path), {"use_future_functions": True})
    ws = wb.add_worksheet("Data")
    for i, v in enumerate(DATA):
        ws.write_number(i, 0, v)
    n = len(DATA)
    ws.write_formula("C1", f"=AVERAGE(A1:A{n})", None, float(np.mean(DATA)))  # numpy.mean
    ws.write_formula("C2", f"=STDEV.S(A1:A{n})", None, float(x.std()))  # pandas, ddof=1
    ws.write_formula("C3", f"=KURT(A1:A{n})", None, float(x.kurt()))  # pandas G2
    ws.write_formula("C4", '=IF(C1>0,"up","down")', None, "up" if np.mean(DATA) > 0 else "down")
    ws.write_formula("C5", "=C1>0", None, bool(np.mean(DATA) > 0))
    ws.write_formula("C6", "=LN(-1)", None, "#NUM!")
    # a spill: anchor value plus the other cells of the range as plain values
    ws.write_dynamic_array_formula(f"D1:D{n}", f"=ERRDIST_T_HALVES(A1:A{n})", None, DATA[0] / 2)
    for i in range(1, n):
        ws.write_number(i, 3, DATA[i] / 2)
    wb.close()
    return path


def _tamper(src: Path, dst: Path, cell: str, new_value: str) -> Path:
    """Copy ``src`` to ``dst`` with the cached <v> of ``cell`` on the first sheet replaced."""
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename == "xl/worksheets/sheet1.xml":
                text = data.decode()
                pattern = re.compile(
                    rf'(<c r="{cell}"[^>]*>(?:<f[^<]*</f>|<f[^>]*/>)?<v>)([^<]*)(</v>)'
                )
                text, count = pattern.subn(lambda m: m.group(1) + new_value + m.group(3), text)
                assert count == 1, f"cell {cell} not found"
                data = text.encode()
            zout.writestr(info, data)
    return dst


def test_untampered_workbook_passes(tmp_path):
    report = check_report(_reference_book(tmp_path / "ok.xlsx"))
    assert report.mismatches == []
    assert report.cells == 6 + len(DATA)


def test_tampered_cached_value_is_found(tmp_path):
    good = _reference_book(tmp_path / "ok.xlsx")
    kurt = float(pd.Series(DATA).kurt())
    bad = _tamper(good, tmp_path / "bad.xlsx", "C3", repr(kurt * (1 + 1e-6)))
    mismatches = check_workbook(bad)
    assert [(m.sheet, m.cell) for m in mismatches] == [("Data", "C3")]
    m = mismatches[0]
    assert m.formula == f"=KURT(A1:A{len(DATA)})"
    assert m.rel_diff == pytest.approx(1e-6, rel=1e-3)
    assert m.recomputed == pytest.approx(kurt, rel=1e-12)
    # within a looser tolerance the same file passes
    assert check_workbook(bad, tolerance=1e-5) == []


def test_tampered_spill_cell_is_found(tmp_path):
    good = _reference_book(tmp_path / "ok.xlsx")
    bad = _tamper(good, tmp_path / "bad.xlsx", "D4", "0.5")
    mismatches = check_workbook(bad)
    assert [(m.sheet, m.cell) for m in mismatches] == [("Data", "D4")]
    assert mismatches[0].formula.startswith("=ERRDIST_T_HALVES")
    assert mismatches[0].recomputed == DATA[3] / 2


def test_unsupported_formula_is_listed_not_skipped(tmp_path):
    path = tmp_path / "u.xlsx"
    wb = xlsxwriter.Workbook(str(path), {"use_future_functions": True})
    ws = wb.add_worksheet("S")
    ws.write_formula("A1", "=_xlfn.SEQUENCE(3)", None, 1)
    ws.write_formula("A2", "=1+1", None, 2)
    wb.close()
    mismatches = check_workbook(path)
    assert [(m.sheet, m.cell) for m in mismatches] == [("S", "A1")]
    assert "SEQUENCE" in mismatches[0].note and math.isnan(mismatches[0].rel_diff)
    assert "cannot recompute" in str(mismatches[0])


def test_compare_values_rule():
    assert compare_values(1.0, 1.0 + 1e-12, 1e-9) is None
    assert compare_values(1.0, 1.0 + 1e-6, 1e-9) == pytest.approx(1e-6, rel=1e-5)
    assert compare_values(0.0, 2e-17, 1e-9) is None  # zero up to rounding
    assert compare_values(None, "", 1e-9) is None
    assert compare_values(True, 1.0, 1e-9) == math.inf
    assert compare_values("#NUM!", 0.0, 1e-9) == math.inf
    assert compare_values("up", "up", 1e-9) is None


def test_bad_tolerance_refused(tmp_path):
    with pytest.raises(ValueError, match="tolerance must be"):
        check_workbook(tmp_path / "x.xlsx", tolerance=-1)


def test_mismatch_text_names_cell_and_values():
    text = str(Mismatch("Risk", "C7", "=A1*2", 1.0, 1.5, 1 / 3))
    assert text.startswith("Risk!C7 =A1*2: stored 1.0, recomputed 1.5")
