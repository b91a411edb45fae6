"""Every catalog function called the way Excel calls it, through xlwings' own code.

The harness (tests/sheet_harness.py) imports the real ``xlwings.udfs`` 0.37.8 with stub
Windows modules and runs its ``call_udf`` (argument conversion by the ``@xw.arg`` options,
result conversion) and ``generate_vba_wrapper``. These tests are parametrised over the
catalog: a new entry is tested without edits here.
"""

from __future__ import annotations

import inspect
import io
import math
from typing import Any

import numpy as np
import pytest

import sheet_harness as h
from errdist.sheet import cells, vba
from errdist.sheet import xlwings_udfs as production
from errdist.sheet.catalog import CATALOG, evaluate
from errdist.sheet.entry import Entry

NAMES = list(CATALOG)


@pytest.fixture(scope="module")
def xl() -> Any:
    with h.replay() as r:
        yield r


def excel_args(entry: Entry) -> list[Any]:
    """The entry's example arguments as worksheet arguments (ranges as range objects)."""
    out: list[Any] = []
    for p in entry.params:
        v = p.example
        out.append(h.ComRange(v) if isinstance(v, (list, tuple, np.ndarray)) else v)
    return out


def as_excel_shows(value: Any) -> list[list[Any]]:
    """``evaluate``'s result as the cells would show it through xlwings."""
    shown = cells.to_xlwings(value)
    return shown if isinstance(shown, list) else [[shown]]


def assert_cells_close(got: list[list[Any]], want: list[list[Any]], rel: float = 1e-12) -> None:
    assert len(got) == len(want) and all(len(a) == len(b) for a, b in zip(got, want, strict=True))
    for row_got, row_want in zip(got, want, strict=True):
        for a, b in zip(row_got, row_want, strict=True):
            if isinstance(b, float):
                assert isinstance(a, float) and math.isclose(a, b, rel_tol=rel, abs_tol=1e-300)
            else:
                assert a == b


@pytest.mark.parametrize("name", NAMES)
def test_example_call_through_xlwings_matches_direct_evaluation(xl: Any, name: str) -> None:
    entry = CATALOG[name]
    got = xl.cells(name, *excel_args(entry))
    want = as_excel_shows(evaluate(name, *entry.example))
    assert_cells_close(got, want)
    flat = [v for row in got for v in row]
    assert not any(isinstance(v, str) and v[:1] == "#" for v in flat), got


@pytest.mark.parametrize("name", [n for n in NAMES if CATALOG[n].required < len(CATALOG[n].params)])
def test_omitted_optional_arguments_take_their_defaults(xl: Any, name: str) -> None:
    entry = CATALOG[name]
    args = excel_args(entry)
    n = entry.required
    with_missing = xl.cells(name, *args[:n], *[h.Missing()] * (len(args) - n))
    cut_short = xl.cells(name, *args[:n])
    defaults = [*args[:n], *(p.default for p in entry.params[n:])]
    want = xl.cells(name, *defaults)
    # An omitted seed means fresh random draws (ERRDIST_RAND, ERRDIST_GOF's bootstrap): two
    # calls then agree only in shape. Decided from the catalog, not by comparing two calls,
    # which coincide now and then (a bootstrap p-value takes few distinct values).
    unseeded = any(p.name == "seed" and p.default is None for p in entry.params[n:])
    if unseeded:
        assert [len(r) for r in with_missing] == [len(r) for r in want]
        assert [len(r) for r in cut_short] == [len(r) for r in want]
        # With the seed given, the other omitted arguments must take their defaults exactly.
        tail = entry.params[n:]
        seeded = [a if p.name == "seed" else p.default for p, a in zip(tail, args[n:], strict=True)]
        omitted = [
            a if p.name == "seed" else h.Missing() for p, a in zip(tail, args[n:], strict=True)
        ]
        assert_cells_close(xl.cells(name, *args[:n], *omitted), xl.cells(name, *args[:n], *seeded))
        return
    assert_cells_close(with_missing, want)
    assert_cells_close(cut_short, want)


@pytest.mark.parametrize("name", NAMES)
def test_production_module_has_the_catalog_signatures(xl: Any, name: str) -> None:
    entry = CATALOG[name]
    fn = getattr(production, name)
    replayed = getattr(xl.module, name)
    assert inspect.signature(fn) == inspect.signature(replayed)
    assert list(inspect.signature(fn).parameters) == [p.name for p in entry.params]
    assert fn.__doc__ == entry.summary
    info = replayed.__xlfunc__  # what xlwings' decorators recorded
    assert info["category"] == "Error distribution"
    assert info["ret"]["doc"] == entry.summary
    assert [a["name"] for a in info["args"]] == [p.name for p in entry.params]
    for a, p in zip(info["args"], entry.params, strict=True):
        assert a["doc"] == p.doc and len(a["doc"]) <= 255
        assert ("optional" in a) == p.optional
        assert a["options"]["err_to_str"] is True


@pytest.mark.parametrize("name", NAMES)
def test_vba_wrapper_matches_xlwings_generator(xl: Any, name: str) -> None:
    entry = CATALOG[name]
    ours = io.StringIO()
    vba.write_function(entry, ours)
    theirs = xl.vba(name)
    if name == "ERRDIST_RAND":  # documented difference: volatile only without a seed
        first, rest = theirs.split("\n", 1)
        theirs = f"{first}\n    If IsMissing(seed) Then Application.Volatile\n{rest}"
    assert ours.getvalue() == theirs
    head = theirs.splitlines()[0]
    for p in entry.params:
        assert (f"Optional {p.name}" in head) == p.optional


def test_whole_vba_module_lists_every_function(xl: Any) -> None:
    text = vba.vba_module()
    assert text.isascii()
    for name, entry in CATALOG.items():
        assert f"Function {name}(" in text
        assert f'Macro:="{name}"' in text
        assert len(entry.summary) <= 255
    assert xl.vba().count("\nEnd Function") == len(CATALOG)  # xlwings finds them all


def test_error_cells_arrive_as_error_text_not_blank(xl: Any) -> None:
    # Without err_to_str xlwings turns error cells into None (blank) - _xlwindows.py
    # _clean_value_data_element; the decoration must keep them visible.
    got = xl.cells("ERRDIST_PDF", h.column([0.1, h.ErrorValue("#DIV/0!")]), 0.0, 1.0, 2.0)
    assert got == [["#VALUE! cell 2 of x is an error value #DIV/0!"]]


def test_column_and_row_keep_their_orientation(xl: Any) -> None:
    col = xl.cells("ERRDIST_KURT", h.column([1.0, 2.0]))
    row = xl.cells("ERRDIST_KURT", h.ComRange([[1.0, 2.0]]))
    assert len(col) == 2 and len(col[0]) == 1
    assert len(row) == 1 and len(row[0]) == 2
