"""The headless engine on small hand-built workbooks.

Built-in functions are checked against numpy / pandas / scipy (named beside each check);
worksheet functions against a small stand-in registry whose results are known by construction.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
import scipy.special

xlsxwriter = pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")
pytest.importorskip("formulas", reason="formulas not installed")

from errdist.workbook import engine  # noqa: E402

DATA = [0.012, -0.034, 0.005, 0.021, -0.008, 0.0, 0.017, -0.052, 0.009, 0.003, -0.011, 0.026]


class StandInError(ValueError):
    """Like the sheet layer's SheetError: carries a spreadsheet error code."""

    def __init__(self, code: str, message: str) -> None:
        super().__init__(message)
        self.code = code
        self.message = message


CALLS: list[tuple[str, tuple]] = []


def stand_in(name: str, *args):
    """A tiny registry: results known by construction."""
    CALLS.append((name, args))
    if name == "ERRDIST_T_CUMSUM":  # same-shape spill of a column range
        (rng,) = args
        vals = [row[0] for row in rng]
        if any(not isinstance(v, float) for v in vals):
            raise StandInError("#VALUE!", "data must be numbers")
        return [[float(s)] for s in np.cumsum(vals)]
    if name == "ERRDIST_T_TABLE":  # a 2x2 table with a header row
        (rng,) = args
        vals = [v for row in rng for v in row if v is not None]
        return [["count", "max"], [float(len(vals)), float(max(vals))]]
    if name == "ERRDIST_T_SCALE":  # scalar arguments
        x, a = args
        if a <= 0:
            raise StandInError("#NUM!", f"scale must be > 0, got {a:g}")
        return x / a
    if name == "ERRDIST_T_NEEDS":
        raise StandInError("#N/A", "need at least 4 points")
    if name == "ERRDIST_T_ECHO":
        return repr(args)
    raise AssertionError(name)


NAMES = [
    "ERRDIST_T_CUMSUM",
    "ERRDIST_T_TABLE",
    "ERRDIST_T_SCALE",
    "ERRDIST_T_NEEDS",
    "ERRDIST_T_ECHO",
]


@pytest.fixture(autouse=True)
def _registry():
    engine.register_functions(NAMES, stand_in)
    CALLS.clear()
    yield


def _book(path: Path, build) -> Path:
    wb = xlsxwriter.Workbook(str(path), {"use_future_functions": True})
    build(wb)
    wb.close()
    return path


def _builtins_book(wb) -> None:
    ws = wb.add_worksheet("Data")
    ws.write("A1", "return")
    for i, v in enumerate(DATA):
        ws.write_number(i + 1, 0, v)
    ws.write("A14", "text")  # a text cell inside the range used by COUNT
    n = len(DATA) + 1
    s = wb.add_worksheet("Stats")
    s.write_formula("B1", f"=SUM(Data!A2:A{n})")
    s.write_formula("B2", f"=AVERAGE(Data!A2:A{n})")
    s.write_formula("B3", f"=KURT(Data!A2:A{n})")
    s.write_formula("B4", f"=STDEV.S(Data!A2:A{n})")
    s.write_formula("B5", f"=MEDIAN(Data!A2:A{n})")
    s.write_formula("B6", "=GAMMALN(4.5)")
    s.write_formula("B7", "=LN(1+Data!A3)")
    s.write_formula("B8", '=IF(Data!A9<-0.05,"breach","ok")')
    s.write_formula("B9", f"=INDEX(Data!A2:A{n},4)")
    s.write_formula("B10", "=COUNT(Data!A2:A14)")
    s.write_formula("B11", "=KURT(3,4,5,2,3,4,5,6,4,7)")
    s.write_formula("B12", "=LN(-1)")
    s.write_dynamic_array_formula(f"C2:C{n}", f"=LN(1+Data!A2:A{n})")


def test_builtins_match_reference_libraries(tmp_path):
    values = engine.evaluate_workbook(_book(tmp_path / "b.xlsx", _builtins_book))
    x = pd.Series(DATA)
    # numpy / pandas as the reference for the descriptive statistics
    assert values[("Stats", "B1")] == pytest.approx(float(np.sum(DATA)), rel=1e-12)
    assert values[("Stats", "B2")] == pytest.approx(float(np.mean(DATA)), rel=1e-12)
    # pandas Series.kurt: bias-adjusted G2 (Joanes & Gill 1998), the spreadsheet's KURT
    assert values[("Stats", "B3")] == pytest.approx(float(x.kurt()), rel=1e-10)
    # pandas Series.std: ddof=1, the spreadsheet's STDEV.S
    assert values[("Stats", "B4")] == pytest.approx(float(x.std()), rel=1e-12)
    assert values[("Stats", "B5")] == pytest.approx(float(np.median(DATA)), rel=1e-12)
    # scipy.special.gammaln for GAMMALN
    assert values[("Stats", "B6")] == pytest.approx(float(scipy.special.gammaln(4.5)), rel=1e-12)
    assert values[("Stats", "B7")] == pytest.approx(math.log1p(DATA[1]), rel=1e-12)
    assert values[("Stats", "B8")] == "breach"  # DATA[7] = -0.052 < -0.05
    assert values[("Stats", "B9")] == DATA[3]
    assert values[("Stats", "B10")] == float(len(DATA))  # COUNT skips the text cell
    # The spreadsheet vendor's KURT help page: 3,4,5,2,3,4,5,6,4,7 -> -0.151799637
    assert values[("Stats", "B11")] == pytest.approx(-0.151799637, abs=1e-9)
    assert values[("Stats", "B12")] == "#NUM!"
    # A spilled built-in column: every cell of the range is reported (numpy.log1p reference)
    for i, v in enumerate(DATA):
        assert values[("Stats", f"C{i + 2}")] == pytest.approx(math.log1p(v), rel=1e-12)


def _catalog_book(wb) -> None:
    ws = wb.add_worksheet("Fit")
    for i, v in enumerate([1.0, 2.0, 3.5, 4.0]):
        ws.write_number(i, 0, v)
    ws.write_dynamic_array_formula("B1:B4", "=ERRDIST_T_CUMSUM(A1:A4)")
    ws.write_dynamic_array_formula("C1:D2", "=ERRDIST_T_TABLE(A1:A6)")
    ws.write_formula("E1", "=ERRDIST_T_SCALE(A2, 4)")
    ws.write_formula("E2", "=ERRDIST_T_SCALE(A2, -1)")
    ws.write_formula("E3", "=ERRDIST_T_NEEDS(A1:A4)")
    ws.write_formula("E4", "=_xludf.ERRDIST_T_SCALE(A4, A2)")
    ws.write_formula("E5", "=E1*10")
    ws.write("A7", "oops")
    ws.write_dynamic_array_formula("F1:F7", "=ERRDIST_T_CUMSUM(A1:A7)")
    ws.write_formula("G1", '=ERRDIST_T_ECHO(A1:B2, "x")')


def test_catalog_functions_and_spills(tmp_path):
    ev = engine.evaluate_details(_book(tmp_path / "c.xlsx", _catalog_book))
    assert ev.problems == []
    v = ev.values
    # same-shape spill: cumulative sums 1, 3, 6.5, 10.5 (by construction)
    assert [v[("Fit", f"B{r}")] for r in range(1, 5)] == [1.0, 3.0, 6.5, 10.5]
    # table with header row; A5:A6 are blank and skipped by the stand-in
    assert v[("Fit", "C1")] == "count" and v[("Fit", "D1")] == "max"
    assert v[("Fit", "C2")] == 4.0 and v[("Fit", "D2")] == 4.0
    assert v[("Fit", "E1")] == 0.5
    assert v[("Fit", "E4")] == 2.0  # the _xludf. spelling resolves to the same function
    assert v[("Fit", "E5")] == 5.0  # a built-in using a worksheet function's result
    # errors raised by the registry become real error values
    assert v[("Fit", "E2")] == "#NUM!"
    assert v[("Fit", "E3")] == "#N/A"
    assert any("scale must be > 0, got -1" in m for m in ev.messages)
    # a dynamic-array formula that fails: error in the anchor, blanks below
    assert v[("Fit", "F1")] == "#VALUE!"
    assert all(v[("Fit", f"F{r}")] is None for r in range(2, 8))
    # cell values as the registry receives them: 2-D lists, blanks as None, text as str
    echo = v[("Fit", "G1")]
    assert echo == repr(([[1.0, 1.0], [2.0, 3.0]], "x"))


def test_unsupported_function_is_reported_not_silent(tmp_path):
    def build(wb):
        ws = wb.add_worksheet("S")
        ws.write_number("A1", 1.0)
        ws.write_formula("B1", "=NOSUCHFUNC(A1)")
        ws.write_formula("B2", "=_xlfn.SEQUENCE(3)")
        ws.write_formula("B3", "=A1+1")

    path = _book(tmp_path / "u.xlsx", build)
    with pytest.raises(engine.EngineError) as info:
        engine.evaluate_workbook(path)
    msg = str(info.value)
    assert "S!B1" in msg and "NOSUCHFUNC" in msg
    assert "S!B2" in msg and "SEQUENCE" in msg
    assert "S!B3" not in msg
    ev = engine.evaluate_details(path)
    assert {(p.sheet, p.cell) for p in ev.problems} == {("S", "B1"), ("S", "B2")}
    assert ev.values[("S", "B3")] == 2.0
