"""Bad input never escapes: every catalog function, every parameter, every kind of bad cell.

Parametrised over the whole catalog, so entries added later are covered without edits. Each
case replaces one argument of the entry's valid example with a bad value and checks that
(1) nothing raises through xlwings' own conversion (the replay harness), through the
production xlwings function called directly, or through the headless registry (which may
only raise ``SheetError``); (2) every text that looks like an error is coded
(``#NUM! ...``, ``#VALUE! ...``, ``#N/A ...``); (3) for inputs that are never valid - text or
an error value where a number or data is needed, a blank required number - the whole result
is that coded text. Speed of the large cases is measured in tests/benchmarks/bench_sheet.py;
the bound below only guards against a hang.
"""

from __future__ import annotations

import math
import re
import time
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as hs

import sheet_harness as h
from errdist.sheet import xlwings_udfs as production
from errdist.sheet.catalog import CATALOG, evaluate
from errdist.sheet.cells import COM_ERRORS, SheetError
from errdist.sheet.entry import Entry

CODED = re.compile(r"^#(NUM!|VALUE!|N/A|DIV/0!|NAME\?|NULL!|REF!) \S")
HANG_GUARD_SECONDS = 20.0
MILLION = 1_000_000

_NUMBERS_THEN_BLANKS = [[0.001 * ((i * 7919) % 41 - 20)] for i in range(1000)] + [[None]] * (
    MILLION - 1000
)
_NUMBER_COLUMN = [[0.5 + 0.001 * (i % 97)] for i in range(MILLION)]

# (label, excel argument, value as xlwings hands it over, never valid for number/data)
BAD: dict[str, list[tuple[str, Any, bool]]] = {
    "number": [
        ("blank cell", h.ComRange([[None]]), False),
        ("text", "abc", True),
        ("numeric text", "0.5", True),
        ("error cell", h.ComRange([[h.ErrorValue("#N/A")]]), True),
        ("error literal", h.ErrorValue("#DIV/0!"), True),
        ("logical", True, False),
        ("negative", -1.0, False),
        ("zero", 0.0, False),
        ("p above 1", 1.5, False),
        ("kurtosis below -1.2", -1.3, False),
        ("huge", 1e308, False),
        ("2-D range", h.ComRange([[0.5, 1.0], [2.0, 3.0]]), False),
        ("range with text", h.column([0.5, "x", 1.0]), True),
    ],
    "range": [
        ("blank cell", h.ComRange([[None]]), False),
        ("all blank", h.column([None] * 6), False),
        ("text cell", h.column([0.01, 0.02, "n/a", 0.03, -0.01]), True),
        ("error cell", h.column([0.01, h.ErrorValue("#N/A"), 0.03, -0.01, 0.0]), True),
        ("logical cell", h.column([0.01, True, 0.03, -0.01, 0.0]), False),
        ("three points", h.column([0.01, -0.02, 0.03]), False),
        ("constant", h.column([0.5] * 8), False),
        ("zero and negative", h.column([1.0, 0.0, -2.0, 3.0, 1.5]), False),
        ("2-D range", h.ComRange([[0.01, 0.02], [0.03, -0.01], [0.0, 0.02], [0.05, -0.04]]), False),
        ("scalar", 0.5, False),
    ],
    "text": [
        ("number", 3.0, False),
        ("unknown option", "bogus", False),
        ("error literal", h.ErrorValue("#N/A"), False),
        ("range", h.column(["mle", "moments"]), False),
    ],
    "flag": [
        ("text", "maybe", False),
        ("number", 2.0, False),
        ("error literal", h.ErrorValue("#N/A"), False),
        ("range", h.column([True, False]), False),
    ],
}
# Values no worksheet cell holds but the headless engine or a Python caller may pass.
BAD_PYTHON: dict[str, list[tuple[str, Any]]] = {
    "number": [("nan", math.nan), ("+inf", math.inf), ("-inf", -math.inf)],
    "range": [
        ("nan inside", [[0.01], [math.nan], [0.02], [0.03], [-0.01]]),
        ("inf inside", [[0.01], [math.inf], [0.02], [0.03], [-0.01]]),
    ],
    "text": [("none", None)],
    "flag": [("nan", math.nan)],
}


@pytest.fixture(scope="module")
def xl() -> Any:
    with h.replay() as r:
        yield r


def example_args(entry: Entry) -> list[Any]:
    return [
        h.ComRange(p.example) if isinstance(p.example, (list, tuple)) else p.example
        for p in entry.params
    ]


def handed_over(arg: Any) -> Any:
    """An Excel argument as xlwings hands it to the function (ndim=2, err_to_str=True)."""
    if isinstance(arg, h.ComRange):
        return [[_err(v) for v in row] for row in arg.rows]
    return _err(arg)


def _err(v: Any) -> Any:
    return v.text if isinstance(v, h.ErrorValue) else v


def check_cells(value: Any) -> list[Any]:
    rows = value if isinstance(value, list) else [[value]]
    flat = [v for row in rows for v in row]
    for v in flat:
        assert v is None or isinstance(v, (float, int, str, bool)), repr(v)
        if isinstance(v, str) and v.startswith("#"):
            assert CODED.match(v), v
        if isinstance(v, float):
            assert math.isfinite(v), v
    return flat


def check_evaluate(name: str, args: list[Any]) -> Any:
    try:
        out = evaluate(name, *args)
    except SheetError as exc:
        assert CODED.match(exc.text), exc.text
        return exc
    rows = out if isinstance(out, list) else [[out]]
    for row in rows:
        for v in row:
            assert v is None or isinstance(v, (float, int, str, bool, SheetError)), repr(v)
    return out


CASES = [
    (name, i, label, arg, never_valid)
    for name, entry in CATALOG.items()
    for i, p in enumerate(entry.params)
    for label, arg, never_valid in BAD[p.kind]
]


@pytest.mark.parametrize(
    ("name", "index", "label", "arg", "never_valid"),
    CASES,
    ids=[f"{c[0]}-{CATALOG[c[0]].params[c[1]].name}-{c[2]}" for c in CASES],
)
def test_bad_cell_gives_a_coded_text(
    xl: Any, name: str, index: int, label: str, arg: Any, never_valid: bool
) -> None:
    entry = CATALOG[name]
    args = example_args(entry)
    args[index] = arg
    flat = check_cells(xl.cells(name, *args))  # through xlwings' own conversion
    direct = [handed_over(a) for a in args]
    check_cells(getattr(production, name)(*direct))
    check_evaluate(name, direct)
    p = entry.params[index]
    if never_valid and p.kind in ("number", "range"):
        # An error cell passes its own code through, as the spreadsheet's built-in functions
        # do (common practice, no source): =NORM.DIST(NA(),0,1,TRUE) is #N/A.
        code = "#N/A " if "error cell" in label else "#DIV/0! " if "error" in label else "#VALUE! "
        assert len(flat) == 1 and flat[0].startswith(code), flat
    if label == "blank cell" and p.kind == "number" and not p.optional:
        assert len(flat) == 1 and flat[0].startswith("#VALUE! "), flat


PY_CASES = [
    (name, i, label, value)
    for name, entry in CATALOG.items()
    for i, p in enumerate(entry.params)
    for label, value in BAD_PYTHON[p.kind]
]


@pytest.mark.parametrize(
    ("name", "index", "label", "value"),
    PY_CASES,
    ids=[f"{c[0]}-{CATALOG[c[0]].params[c[1]].name}-{c[2]}" for c in PY_CASES],
)
def test_values_no_cell_holds_are_handled(name: str, index: int, label: str, value: Any) -> None:
    entry = CATALOG[name]
    args = [handed_over(a) for a in example_args(entry)]
    args[index] = value
    check_cells(getattr(production, name)(*args))
    check_evaluate(name, args)


def _first_array_param(entry: Entry) -> int | None:
    for i, p in enumerate(entry.params):
        if p.kind in ("number", "range"):
            return i
    return None


# Per entry: its first number or data argument given a whole column (1000 numbers, then
# blanks to row 1,000,000); plus one fully numeric million-row spill.
MILLION_CASES = [
    (name, i, "numbers then blanks")
    for name, entry in CATALOG.items()
    if (i := _first_array_param(entry)) is not None
] + [("ERRDIST_PDF", 0, "numbers")]


@pytest.mark.parametrize(
    ("name", "index", "kind"),
    MILLION_CASES,
    ids=[f"{c[0]}-{CATALOG[c[0]].params[c[1]].name}-{c[2]}" for c in MILLION_CASES],
)
def test_million_row_column(name: str, index: int, kind: str) -> None:
    # A whole-column reference (A:A) as xlwings hands it over: a list of 1e6 one-cell rows.
    entry = CATALOG[name]
    args = [handed_over(a) for a in example_args(entry)]
    if entry.params[index].kind == "range":
        args[index] = _NUMBERS_THEN_BLANKS
    else:
        args[index] = _NUMBER_COLUMN if kind == "numbers" else _NUMBERS_THEN_BLANKS
    start = time.perf_counter()
    out = getattr(production, name)(*args)
    assert time.perf_counter() - start < HANG_GUARD_SECONDS
    rows = out if isinstance(out, list) else [[out]]
    assert len(rows) in (1, 2) or len(rows) >= 999 or entry.result == "table", len(rows)
    if len(rows) == 1 and len(rows[0]) == 1:
        check_cells(rows)
    else:
        check_cells(rows[:5] + rows[-5:])


def test_too_many_arguments() -> None:
    for name, entry in CATALOG.items():
        args = [handed_over(a) for a in example_args(entry)] + [1.0]
        with pytest.raises(SheetError, match=r"takes at most"):
            evaluate(name, *args)


# --------------------------------------------------------------------------- fuzzing

_cell = hs.one_of(
    hs.none(),
    hs.floats(allow_nan=True, allow_infinity=True),
    hs.floats(min_value=-5, max_value=5),
    hs.integers(min_value=-3, max_value=12),
    hs.booleans(),
    hs.text(max_size=4),
    hs.sampled_from(sorted(COM_ERRORS)),
    hs.sampled_from(["#N/A", "#DIV/0!", "#VALUE!", "mle", "moments", "log", "simple", ""]),
)


@hs.composite
def _range(draw: Any) -> list[list[Any]]:
    rows = draw(hs.integers(min_value=1, max_value=8))
    cols = draw(hs.integers(min_value=1, max_value=3))
    return [[draw(_cell) for _ in range(cols)] for _ in range(rows)]


_arg = hs.one_of(_cell, _range())


@pytest.mark.parametrize("name", list(CATALOG))
@settings(
    max_examples=25,
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture],
)
@given(data=hs.data())
def test_fuzz_nothing_escapes(name: str, data: Any) -> None:
    entry = CATALOG[name]
    n = data.draw(hs.integers(min_value=0, max_value=len(entry.params)), label="n args")
    args = [data.draw(_arg, label=f"arg {i}") for i in range(n)]
    if n < len(entry.params):  # Python callers must give the required ones
        args += [p.example if p.optional else None for p in entry.params[n:]]
        args = args[: len(entry.params)]
        args = [
            a if i < n or not entry.params[i].optional else entry.params[i].default
            for i, a in enumerate(args)
        ]
    check_cells(getattr(production, name)(*args))
    check_evaluate(name, args)


@pytest.mark.parametrize("name", list(CATALOG))
@settings(
    max_examples=8,
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture],
)
@given(data=hs.data())
def test_fuzz_through_xlwings_conversion(xl: Any, name: str, data: Any) -> None:
    entry = CATALOG[name]
    excel_cell = hs.one_of(
        hs.none(),
        hs.floats(min_value=-1e6, max_value=1e6),
        hs.booleans(),
        hs.text(max_size=4),
        hs.sampled_from([h.ErrorValue(t) for t in ("#N/A", "#DIV/0!", "#REF!")]),
    )
    args: list[Any] = []
    for p in entry.params:
        choice = data.draw(hs.integers(min_value=0, max_value=3), label=f"{p.name} form")
        if choice == 0:
            args.append(p.example if not isinstance(p.example, list) else h.ComRange(p.example))
        elif choice == 1:
            args.append(data.draw(excel_cell, label=p.name))
        elif choice == 2:
            rows = data.draw(hs.integers(min_value=1, max_value=6), label="rows")
            args.append(h.column([data.draw(excel_cell) for _ in range(rows)]))
        else:
            args.append(h.Missing() if p.optional else h.ComRange([[None]]))
    check_cells(xl.cells(name, *args))


def test_numpy_arrays_as_ranges() -> None:
    # The headless engine hands ranges over as 2-D numpy arrays.
    for name, entry in CATALOG.items():
        args = [
            np.array(p.example, dtype=object) if isinstance(p.example, list) else p.example
            for p in entry.params
        ]
        check_evaluate(name, args)
