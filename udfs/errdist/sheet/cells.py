"""Cells in, cells out: spreadsheet values to arrays and results back to cells.

This module knows how worksheet values arrive and how results must leave; it knows nothing
of statistics. It accepts values the way xlwings 0.37.x hands them to a classic (Windows COM)
user-defined function, and the way the headless engine hands them over:

===============================  ==================================================
cell                             Python value
===============================  ==================================================
blank                            ``None`` (also ``NaN``, ``""``, the engine's empty token)
number                           ``float`` (``int`` from the headless engine)
text                             ``str``
TRUE / FALSE                     ``bool``
error value                      ``int`` COM code (``-2146826246`` is ``#N/A``) or
                                 the text ``'#N/A'`` (xlwings ``err_to_str=True``,
                                 or the headless engine's error token)
single cell                      a scalar (or a 1 x 1 nested list with ``ndim=2``)
range                            nested lists / tuples (rows), a flat list (``ndim=1``
                                 or squeezed), or a numpy array
date                             ``datetime.datetime`` / ``datetime.date``
===============================  ==================================================

Failures are :class:`SheetError` ``(code, message)``; :func:`cell_text` writes them as a
concise text that starts with the spreadsheet error code, e.g. ``#NUM! shape must be > 0``
(classic xlwings cannot write true error values). Core exceptions map to codes by class
(:func:`sheet_error`): ``DomainError`` -> ``#NUM!``, ``InsufficientDataError`` -> ``#N/A``,
``InputTypeError`` -> ``#VALUE!``, any other ``ValueError`` -> ``#NUM!`` (as documented in
:mod:`errdist.errors`), an ``ArithmeticError`` (overflow, division by zero) -> ``#NUM!``,
anything else -> ``#VALUE! internal error: ...``. An input cell holding an error value passes
its own code through (``#N/A`` in a data range gives ``#N/A``), as built-in functions do. A traceback never
reaches a cell.

Results go back as a scalar or a list of rows; ``NaN`` becomes a blank (``None``) in its own
place, so no other cell of a spill shifts.
"""

from __future__ import annotations

import contextlib
import datetime as _dt
import gc
import math
from collections.abc import Iterable, Iterator, Sequence
from itertools import chain
from typing import Any

import numpy as np

from errdist.errors import DomainError, ErrdistError, InputTypeError, InsufficientDataError

__all__ = [
    "COM_ERRORS",
    "ERROR_TEXTS",
    "Rows",
    "SheetError",
    "as_data",
    "as_flag",
    "as_number",
    "as_text",
    "cell_text",
    "describe",
    "is_blank",
    "sheet_error",
    "to_cells",
    "to_xlwings",
]

#: COM ``VT_ERROR`` codes of the worksheet error values, as pywin32 hands them over
#: (the same table xlwings 0.37.8 keeps in ``_xlwindows.cell_errors``).
COM_ERRORS: dict[int, str] = {
    -2146826281: "#DIV/0!",
    -2146826246: "#N/A",
    -2146826259: "#NAME?",
    -2146826288: "#NULL!",
    -2146826252: "#NUM!",
    -2146826265: "#REF!",
    -2146826273: "#VALUE!",
}

#: Error values as texts (xlwings ``err_to_str=True``, the headless engine's tokens).
ERROR_TEXTS: frozenset[str] = frozenset(
    {
        "#DIV/0!",
        "#N/A",
        "#NAME?",
        "#NULL!",
        "#NUM!",
        "#REF!",
        "#VALUE!",
        "#SPILL!",
        "#CALC!",
        "#GETTING_DATA",
        "#FIELD!",
        "#BLOCKED!",
        "#CONNECT!",
        "#BUSY!",
        "#UNKNOWN!",
    }
)

#: Codes a :class:`SheetError` may carry: errdist's own three, and the other standard error
#: values, which an input cell's error passes through unchanged (as built-in functions do).
CODES: frozenset[str] = frozenset(
    {"#NUM!", "#VALUE!", "#N/A", "#DIV/0!", "#NAME?", "#NULL!", "#REF!"}
)

_MAX_MESSAGE = 240  # cell texts stay short; Excel's own limit is far higher
_NUMERIC_TYPES = (float, int, type(None))


class SheetError(Exception):
    """A worksheet failure: a spreadsheet error ``code`` and a short ``message``.

    Parameters
    ----------
    code : str
        ``"#NUM!"``, ``"#VALUE!"`` or ``"#N/A"``.
    message : str
        What went wrong, e.g. ``"shape must be > 0, got 0"``.
    """

    def __init__(self, code: str, message: str) -> None:
        if code not in CODES:
            raise ValueError(f"unknown spreadsheet error code {code!r}")
        message = " ".join(str(message).split())
        if len(message) > _MAX_MESSAGE:
            message = message[: _MAX_MESSAGE - 3] + "..."
        super().__init__(code, message)
        self.code = code
        self.message = message

    @property
    def text(self) -> str:
        """The cell text, e.g. ``'#NUM! shape must be > 0, got 0'``."""
        return f"{self.code} {self.message}" if self.message else self.code

    def __str__(self) -> str:
        return self.text

    def __repr__(self) -> str:
        return f"SheetError({self.code!r}, {self.message!r})"

    def __eq__(self, other: object) -> bool:
        return (
            isinstance(other, SheetError)
            and other.code == self.code
            and other.message == self.message
        )

    def __hash__(self) -> int:
        return hash((self.code, self.message))


def sheet_error(exc: BaseException) -> SheetError:
    """Map an exception to a :class:`SheetError` (never raises).

    ``DomainError`` -> ``#NUM!``, ``InsufficientDataError`` -> ``#N/A``,
    ``InputTypeError`` -> ``#VALUE!``, another ``ErrdistError`` -> its ``code``,
    a plain ``ValueError`` or an ``ArithmeticError`` -> ``#NUM!``, anything else ->
    ``#VALUE! internal error: ...``.
    """
    if isinstance(exc, SheetError):
        return exc
    message = _first_line(exc)
    if isinstance(exc, DomainError):
        return SheetError("#NUM!", message)
    if isinstance(exc, InsufficientDataError):
        return SheetError("#N/A", message)
    if isinstance(exc, InputTypeError):
        return SheetError("#VALUE!", message)
    if isinstance(exc, ErrdistError):
        code = exc.code if exc.code in CODES else "#NUM!"
        return SheetError(code, message)
    if isinstance(exc, ValueError):
        return SheetError("#NUM!", message)
    if isinstance(exc, RuntimeWarning) and any(
        w in message for w in ("overflow", "divide by zero", "underflow")
    ):  # numpy's floating-point warnings, raised as errors while a function runs
        exc = OverflowError(message) if "divide" not in message else ZeroDivisionError(message)
    if isinstance(exc, ArithmeticError):  # overflow, division by zero: out of double range
        what = {"ZeroDivisionError": "division by zero", "OverflowError": "numeric overflow"}
        kind = what.get(type(exc).__name__, "floating-point error")
        return SheetError(
            "#NUM!", f"{kind}: the inputs are too extreme to compute in double precision"
        )
    name = type(exc).__name__
    return SheetError("#VALUE!", f"internal error: {name}: {message}" if message else name)


def _first_line(exc: BaseException) -> str:
    try:
        text = str(exc)
    except Exception:  # a broken __str__ must not escape either
        text = ""
    return text.strip().splitlines()[0] if text.strip() else ""


# --------------------------------------------------------------------------- cell kinds


def _is_token(value: object) -> bool:
    """A ``str`` subclass: the headless engine's error and empty tokens."""
    return isinstance(value, str) and type(value) is not str


def is_blank(value: object) -> bool:
    """True for the values that stand for a blank cell."""
    if value is None:
        return True
    t = type(value)
    if t is float:
        return value != value  # NaN
    if t is str:
        return value == ""
    if _is_token(value):
        return str(value).lower() == "empty"
    if isinstance(value, np.floating):
        return bool(np.isnan(value))
    return False


def error_text(value: object) -> str | None:
    """The error value a cell holds (``'#N/A'``), or None when it is not an error."""
    t = type(value)
    if t is int:
        return COM_ERRORS.get(value)  # type: ignore[call-overload]
    if isinstance(value, str):
        text = str(value).strip().upper()
        return text if text in ERROR_TEXTS else None
    if isinstance(value, BaseException):  # e.g. an engine's error object
        text = str(value).strip().upper()
        return text if text in ERROR_TEXTS else "#VALUE!"
    return None


def _code_for(value: object) -> str:
    """The code of the error a bad input cell causes: its own error value when it holds one
    of the standard ones (``#N/A`` stays ``#N/A``, as built-in functions pass it), else
    ``#VALUE!``."""
    err = error_text(value)
    return err if err in CODES else "#VALUE!"


def describe(value: object) -> str:
    """Say what kind of cell a non-number value is, for messages ("is text 'abc'")."""
    err = error_text(value)
    if err is not None:
        return f"is an error value {err}"
    if is_blank(value):
        return "is blank"
    if isinstance(value, (bool, np.bool_)):
        return f"is a logical value {'TRUE' if value else 'FALSE'}"
    if isinstance(value, str):
        shown = value if len(value) <= 20 else value[:17] + "..."
        return f"is text {shown!r}"
    if isinstance(value, (_dt.date, _dt.time)):
        return "is a date or time"
    if isinstance(value, (list, tuple, np.ndarray)):
        return "is a range"
    return f"is a value of type {type(value).__name__}"


def _scalar_float(value: object) -> float | None:
    """A number cell as float, a blank as NaN, anything else None."""
    t = type(value)
    if t is float:
        return value  # type: ignore[return-value]
    if value is None:
        return math.nan
    if t is int:
        return None if value in COM_ERRORS else float(value)  # type: ignore[arg-type]
    if isinstance(value, (np.floating, np.integer)) and not isinstance(value, np.bool_):
        return float(value)
    if is_blank(value):
        return math.nan
    return None


# --------------------------------------------------------------------------- ranges


def _grid(value: object, name: str) -> tuple[list[Any] | np.ndarray, int, int]:
    """Flatten a range (row-major) and give its shape; a 1-D sequence is a column."""
    if isinstance(value, np.ndarray):
        if value.ndim == 0:
            return [value.item()], 1, 1
        if value.ndim == 1:
            return value, value.shape[0], 1
        if value.ndim == 2:
            return value.ravel(), value.shape[0], value.shape[1]
        raise SheetError("#VALUE!", f"{name} must be a range of rows and columns")
    if isinstance(value, (list, tuple)):
        if len(value) == 0:
            raise SheetError("#VALUE!", f"{name} is an empty range")
        first = value[0]
        if isinstance(first, (list, tuple, np.ndarray)):
            ncols = len(first)
            rows = value
            if ncols == 0:
                raise SheetError("#VALUE!", f"{name} is an empty range")
            for i, row in enumerate(rows):
                if not isinstance(row, (list, tuple, np.ndarray)) or len(row) != ncols:
                    got = len(row) if isinstance(row, (list, tuple, np.ndarray)) else 1
                    raise SheetError(
                        "#VALUE!",
                        f"{name} has rows of different lengths: row 1 has {ncols} cells, "
                        f"row {i + 1} has {got}",
                    )
            flat = list(chain.from_iterable(rows))
            return flat, len(rows), ncols
        return list(value), len(value), 1
    return [value], 1, 1


def _floats(flat: list[Any] | np.ndarray, name: str, what: str) -> np.ndarray:
    """Row-major cell values -> float64 array with NaN for blanks; other cells -> #VALUE!.

    ``what`` names the range in messages ("cell 7 of data is text 'n/a'").
    """
    if isinstance(flat, np.ndarray):
        if flat.dtype.kind in "fiu":
            return flat.astype(np.float64, copy=False)
        flat = flat.tolist()
    types = set(map(type, flat))
    if types.issubset(_NUMERIC_TYPES) and (int not in types or not _has_com_error(flat)):
        if type(None) in types:  # faster than numpy's own None -> NaN conversion
            nan = math.nan
            return np.array([nan if v is None else v for v in flat], dtype=np.float64)
        return np.array(flat, dtype=np.float64)
    out = np.empty(len(flat), dtype=np.float64)
    for i, v in enumerate(flat):
        f = _scalar_float(v)
        if f is None:
            raise SheetError(_code_for(v), f"cell {i + 1} of {what} {describe(v)}")
        out[i] = f
    return out


def _has_com_error(flat: Iterable[Any]) -> bool:
    return any(type(v) is int and v in COM_ERRORS for v in flat)


def _trim_trailing_blank_rows(arr: np.ndarray) -> np.ndarray:
    """Drop all-blank rows at the end (a whole-column reference such as A:A)."""
    if arr.shape[0] == 0 or not np.isnan(arr[-1]).all():
        return arr
    filled = ~np.isnan(arr).all(axis=1)
    last = np.flatnonzero(filled)
    return arr[: last[-1] + 1] if last.size else arr[:0]


# --------------------------------------------------------------------------- arguments


def as_number(value: object, name: str, *, spill: bool = True) -> float | np.ndarray:
    """A number argument: a float, or (when ``spill``) a 2-D float array for a range.

    A single cell (also a 1 x 1 range) gives a float; a blank single cell is a ``#VALUE!``.
    In a range, blank cells become NaN (their result cell is left blank); text, logical,
    error or date cells are a ``#VALUE!`` naming the first one.
    """
    if type(value) is float and value == value:
        return value  # type: ignore[return-value]
    if not isinstance(value, (list, tuple, np.ndarray)):
        f = _scalar_float(value)
        if f is None or f != f:
            raise SheetError(_code_for(value), f"{name} {describe(value)}; a number is needed")
        return f
    flat, nrows, ncols = _grid(value, name)
    if nrows * ncols == 1:
        return as_number(flat[0], name, spill=spill)
    if not spill:
        raise SheetError("#VALUE!", f"{name} must be a single cell, got a {nrows}x{ncols} range")
    return _floats(flat, name, name).reshape(nrows, ncols)


def as_data(value: object, name: str) -> np.ndarray:
    """A data range: a 2-D float64 array in the range's shape, NaN for blank cells.

    Trailing all-blank rows are dropped (whole-column references). Text, logical, error and
    date cells are a ``#VALUE!`` naming the first one in row-major order, e.g.
    ``#VALUE! cell 7 of data is text 'n/a'``.
    """
    if not isinstance(value, (list, tuple, np.ndarray)):
        f = _scalar_float(value)
        if f is None:
            raise SheetError(_code_for(value), f"cell 1 of {name} {describe(value)}")
        return np.array([[f]])
    flat, nrows, ncols = _grid(value, name)
    arr = _floats(flat, name, name).reshape(nrows, ncols)
    return _trim_trailing_blank_rows(arr)


def _single_cell(value: object, name: str) -> object:
    """The cell of a one-cell range (a larger range is a ``#VALUE!``); other values as they are."""
    if isinstance(value, (list, tuple, np.ndarray)):
        flat, nrows, ncols = _grid(value, name)
        if nrows * ncols != 1:
            raise SheetError(
                "#VALUE!", f"{name} must be a single cell, got a {nrows}x{ncols} range"
            )
        return flat[0]
    return value


def as_text(
    value: object, name: str, *, choices: Sequence[str] = (), default: str | None = None
) -> str:
    """A text option (case-insensitive); blank gives ``default``."""
    value = _single_cell(value, name)
    if is_blank(value):
        if default is None:
            raise SheetError("#VALUE!", f"{name} is blank; a text is needed")
        return default
    if error_text(value) is not None or not isinstance(value, str):
        raise SheetError(_code_for(value), f"{name} {describe(value)}; a text is needed")
    text = value.strip().lower()
    if choices and text not in choices:
        allowed = ", ".join(f'"{c}"' for c in choices)
        raise SheetError("#VALUE!", f"{name} must be one of {allowed}, got {value.strip()!r}")
    return text


_TRUE_TEXTS = frozenset({"true", "yes", "1"})
_FALSE_TEXTS = frozenset({"false", "no", "0"})


def as_flag(value: object, name: str, *, default: bool = False) -> bool:
    """A TRUE/FALSE option; blank gives ``default``; numbers follow the spreadsheet (0 is
    FALSE, any other number TRUE); the texts TRUE/FALSE are accepted."""
    value = _single_cell(value, name)
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if is_blank(value):
        return default
    f = _scalar_float(value)
    if f is not None:
        return f != 0.0
    if isinstance(value, str) and error_text(value) is None:
        text = value.strip().lower()
        if text in _TRUE_TEXTS:
            return True
        if text in _FALSE_TEXTS:
            return False
    raise SheetError(_code_for(value), f"{name} {describe(value)}; TRUE or FALSE is needed")


# --------------------------------------------------------------------------- results


def _cell(v: object) -> object:
    """One result value as a cell value (NaN -> blank, inf -> #NUM!)."""
    t = type(v)
    if t is float:
        if v != v:  # noqa: PLR0124 - NaN test
            return None
        if v in (math.inf, -math.inf):
            return SheetError("#NUM!", "the result is infinite")
        return v
    if v is None or t is str or t is bool or isinstance(v, SheetError):
        return v
    if t is int:
        return float(v)  # type: ignore[arg-type]
    if isinstance(v, np.generic):
        return _cell(v.item())
    if isinstance(v, BaseException):
        return sheet_error(v)
    if isinstance(v, (_dt.date, _dt.time)):
        return v
    return str(v)


class Rows(list):  # type: ignore[type-arg]
    """Result rows (a list of lists) that know whether any cell holds a SheetError."""

    has_errors: bool = False


def _rows(rows: list[Any], has_errors: bool) -> Rows:
    out = Rows(rows)
    out.has_errors = has_errors
    return out


def to_cells(result: object) -> object:
    """A core result as cells: a scalar, or a list of rows (a 1-D result is a column).

    NaN becomes a blank (``None``) in its own place, ±inf a ``#NUM!`` cell; numpy types
    become Python floats. Cells may hold :class:`SheetError` objects (per-cell failures);
    lists come back as :class:`Rows` whose ``has_errors`` says so.
    """
    if isinstance(result, Rows):
        return result
    if isinstance(result, np.ndarray):
        if result.ndim == 0:
            return _cell(result.item())
        if result.ndim == 1:
            result = result.reshape(-1, 1)
        elif result.ndim > 2:
            raise SheetError("#VALUE!", "internal error: result has more than 2 dimensions")
        with _gc_paused(result.size):
            if result.dtype.kind == "f":
                finite = np.isfinite(result)
                if finite.all():
                    return _rows(result.tolist(), False)
                obj = result.astype(object)
                obj[np.isnan(result)] = None
                infinite = np.isinf(result)
                if infinite.any():
                    obj[infinite] = SheetError("#NUM!", "the result is infinite")
                return _rows(obj.tolist(), bool(infinite.any()))
            rows = [[_cell(v) for v in row] for row in result.tolist()]
            return _rows(rows, _any_error(rows))
    if isinstance(result, (list, tuple)):
        if not result:
            return _rows([[None]], False)
        if isinstance(result[0], (list, tuple, np.ndarray)):
            rows = [[_cell(v) for v in row] for row in result]
        else:
            rows = [[_cell(v)] for v in result]
        return _rows(rows, _any_error(rows))
    return _cell(result)


def _any_error(rows: list[list[Any]]) -> bool:
    return SheetError in set(map(type, chain.from_iterable(rows)))


@contextlib.contextmanager
def _gc_paused(size: int) -> Iterator[None]:
    """Pause the cyclic garbage collector while a large result's rows are built.

    Building a million one-cell row lists triggers many collections of a large heap (3-5x
    the time); the rows hold no cycles, so nothing is lost by pausing.
    """
    if size < 5_000 or not gc.isenabled():
        yield
        return
    gc.disable()
    try:
        yield
    finally:
        gc.enable()


def cell_text(value: object) -> object:
    """A cell value for xlwings: a :class:`SheetError` becomes its coded text."""
    if isinstance(value, SheetError):
        return value.text
    return value


def to_xlwings(cells: object) -> object:
    """Cells (from :func:`to_cells`) as xlwings writes them: SheetErrors as coded texts.

    Lists come back as plain lists of rows.
    """
    if isinstance(cells, list):
        errors = cells.has_errors if isinstance(cells, Rows) else _any_error(cells)
        if not errors:
            return list(cells) if type(cells) is not list else cells
        return [[cell_text(v) for v in row] for row in cells]
    return cell_text(cells)
