"""Cells in, cells out: the value rules of xlwings 0.37.x and the headless engine."""

from __future__ import annotations

import math

import numpy as np
import pytest

from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.sheet import cells
from errdist.sheet.cells import SheetError

# COM VT_ERROR code of #N/A, as pywin32 hands it over (xlwings 0.37.8 _xlwindows.cell_errors).
NA_CODE = -2146826246


def test_error_classes_map_to_codes() -> None:
    # The mapping is the contract in errdist/errors.py and docs (common practice, no source).
    assert cells.sheet_error(DomainError("shape must be > 0, got 0")).text == (
        "#NUM! shape must be > 0, got 0"
    )
    assert cells.sheet_error(InsufficientDataError("need 4")).code == "#N/A"
    assert cells.sheet_error(InputTypeError("text")).code == "#VALUE!"
    assert cells.sheet_error(ValueError("plain")).code == "#NUM!"
    # Overflow and division by zero are numbers out of range: #NUM!, as the spreadsheet
    # reports =EXP(1000) (common practice, no source).
    err = cells.sheet_error(ZeroDivisionError("float division by zero"))
    assert err.text.startswith("#NUM! division by zero")
    assert cells.sheet_error(OverflowError("math range error")).text.startswith(
        "#NUM! numeric overflow"
    )
    assert cells.sheet_error(KeyError("x")).text.startswith("#VALUE! internal error: KeyError")


def test_long_and_multiline_messages_stay_short() -> None:
    err = cells.sheet_error(RuntimeError("line one\nTraceback (most recent call last):\n  x"))
    assert "Traceback" not in err.text and "\n" not in err.text
    assert len(SheetError("#NUM!", "x" * 1000).text) <= 250


@pytest.mark.parametrize(
    ("value", "expected"),
    [
        (None, "is blank"),
        ("abc", "is text 'abc'"),
        ("#N/A", "is an error value #N/A"),
        (NA_CODE, "is an error value #N/A"),
        (True, "is a logical value TRUE"),
    ],
)
def test_describe(value: object, expected: str) -> None:
    assert cells.describe(value) == expected


def test_number_scalar_and_range() -> None:
    assert cells.as_number(0.5, "x") == 0.5
    assert cells.as_number(3, "x") == 3.0
    assert cells.as_number([[0.25]], "x") == 0.25  # a 1x1 range is a single cell
    arr = cells.as_number([[1.0, None], [2.0, 3.0]], "x")
    assert arr.shape == (2, 2) and math.isnan(arr[0, 1])
    col = cells.as_number([1.0, 2.0, 3.0], "x")  # a squeezed (ndim=None) column
    assert col.shape == (3, 1)


@pytest.mark.parametrize(
    ("value", "message"),
    [
        (None, "#VALUE! x is blank; a number is needed"),
        ("abc", "#VALUE! x is text 'abc'; a number is needed"),
        # an input's error value passes through, as in built-ins (common practice, no source)
        ("#DIV/0!", "#DIV/0! x is an error value #DIV/0!; a number is needed"),
        (NA_CODE, "#N/A x is an error value #N/A; a number is needed"),
        (True, "#VALUE! x is a logical value TRUE; a number is needed"),
        ([[1.0], ["n/a"]], "#VALUE! cell 2 of x is text 'n/a'"),
        ([[1.0], [NA_CODE]], "#N/A cell 2 of x is an error value #N/A"),
        (
            [[1.0, 2.0], [3.0]],
            "#VALUE! x has rows of different lengths: row 1 has 2 cells, row 2 has 1",
        ),
        ([], "#VALUE! x is an empty range"),
    ],
)
def test_number_refusals(value: object, message: str) -> None:
    with pytest.raises(SheetError) as info:
        cells.as_number(value, "x")
    assert info.value.text == message


def test_number_single_cell_only() -> None:
    with pytest.raises(SheetError, match="count must be a single cell, got a 2x1 range"):
        cells.as_number([[1.0], [2.0]], "count", spill=False)


def test_data_keeps_positions_and_trims_trailing_blank_rows() -> None:
    arr = cells.as_data([[1.0], [None], [2.0], [None], [None]], "data")
    assert arr.shape == (3, 1)
    assert np.isnan(arr[1, 0]) and arr[2, 0] == 2.0
    with pytest.raises(SheetError, match="cell 7 of data is text 'n/a'"):
        cells.as_data([[float(i)] for i in range(6)] + [["n/a"]], "data")
    with pytest.raises(SheetError, match="cell 2 of data is an error value #N/A"):
        cells.as_data([[1.0], ["#N/A"]], "data")


def test_data_from_numpy_and_engine_tokens() -> None:
    class Token(str):
        """Stands for the headless engine's str-subclass tokens (errors, empty)."""

    arr = cells.as_data(np.array([[1.0], [2.0]]), "data")
    assert arr.tolist() == [[1.0], [2.0]]
    arr = cells.as_data(np.array([[1.0], [Token("empty")], [3.0]], dtype=object), "data")
    assert np.isnan(arr[1, 0]) and arr[2, 0] == 3.0
    with pytest.raises(SheetError, match="error value #NUM!"):
        cells.as_data(np.array([[1.0], [Token("#NUM!")]], dtype=object), "data")


def test_text_and_flag() -> None:
    assert cells.as_text(" MLE ", "method", choices=("mle", "moments")) == "mle"
    with pytest.raises(SheetError, match='method must be one of "mle", "moments"'):
        cells.as_text("fast", "method", choices=("mle", "moments"))
    assert cells.as_flag(None, "upper") is False
    assert cells.as_flag(1.0, "upper") is True  # spreadsheet rule: nonzero is TRUE
    assert cells.as_flag("TRUE", "upper") is True
    with pytest.raises(SheetError, match="upper is text 'maybe'; TRUE or FALSE is needed"):
        cells.as_flag("maybe", "upper")


def test_results_to_cells() -> None:
    out = cells.to_cells(np.array([[1.0, np.nan], [np.inf, 2.0]]))
    assert out[0] == [1.0, None]
    assert isinstance(out[1][0], SheetError) and out[1][0].code == "#NUM!"
    assert cells.to_xlwings(out)[1][0] == "#NUM! the result is infinite"
    assert cells.to_cells(np.array([1.0, 2.0])) == [[1.0], [2.0]]  # 1-D is a column
    assert cells.to_cells(np.float64(0.5)) == 0.5
    assert type(cells.to_cells(np.float64(0.5))) is float


def test_million_row_column_is_converted() -> None:
    # A whole-column reference: 1,000,000 one-element rows (speed is measured in
    # tests/benchmarks/bench_sheet.py; here only the result).
    rows = [[None]] * 1_000_000
    rows = [[0.01 * (i % 7 - 3)] for i in range(500)] + rows[500:]
    arr = cells.as_data(rows, "data")
    assert arr.shape == (500, 1)


def test_numpy_floating_point_warnings_are_num_errors() -> None:
    # numpy's overflow / divide warnings (raised as errors inside a call) are numbers out of
    # range: #NUM!, like the spreadsheet's =EXP(1000) (common practice, no source)
    err = cells.sheet_error(RuntimeWarning("overflow encountered in power"))
    assert err.text.startswith("#NUM! numeric overflow")
    assert cells.sheet_error(RuntimeWarning("divide by zero encountered")).code == "#NUM!"
    assert "internal error" in cells.sheet_error(RuntimeWarning("something else")).text
