"""The parts of a catalog entry and how an entry turns cell arguments into result cells.

An :class:`Entry` is one worksheet function: its name, the core callable, its parameters
(:class:`Param`), the shape of its result, a summary and a category. :meth:`Entry.evaluate`
is the single path from cell values to result cells used by every front end (xlwings, the
headless engine, the harness):

1. each argument is read by its kind (:mod:`errdist.sheet.cells`): ``number`` -> float or a
   2-D array for a range, ``range`` -> 2-D float array with NaN for blanks, ``text`` -> a
   lower-case option, ``flag`` -> bool; a missing or blank optional argument takes its
   default;
2. the number arguments broadcast like numpy (a column of x against a row of shapes spills
   a table); a blank cell inside a number range leaves its result cell blank and shifts
   nothing;
3. the entry's ``call`` (or the core callable itself) runs on the converted arguments;
   errdist's exceptions become :class:`~errdist.sheet.cells.SheetError`; when one element of
   a spill is out of its domain, that cell alone shows the error (spills of up to
   :data:`PER_CELL_LIMIT` cells; a larger spill shows the one error);
4. the result becomes cells (:func:`~errdist.sheet.cells.to_cells`).

Result shapes: ``"scalar"`` (one cell), ``"spill"`` (one cell per broadcast element: a
single cell when every number argument is a single cell), ``"table"`` (rows; a ``header``
flag adds :attr:`Entry.header` as a first row), ``"column"`` (a column of values, or rows
the call shapes itself).
"""

from __future__ import annotations

import importlib
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np

from errdist.errors import ErrdistError
from errdist.sheet import cells
from errdist.sheet.cells import SheetError

__all__ = [
    "CATEGORY",
    "KINDS",
    "MISSING",
    "PER_CELL_LIMIT",
    "RESULTS",
    "REQUIRED",
    "Entry",
    "Param",
    "flag",
    "number",
    "data_range",
    "text",
]

CATEGORY = "Error distribution"
KINDS = ("number", "range", "text", "flag")
RESULTS = ("scalar", "spill", "table", "column")
#: Largest spill evaluated cell by cell when one element is out of its domain.
PER_CELL_LIMIT = 10_000
#: Largest spill of an entry whose core is not vectorised (``vectorized=False``).
LOOP_LIMIT = 20_000
_DESCRIPTION_LIMIT = 255


class _Sentinel:
    def __init__(self, name: str) -> None:
        self._name = name

    def __repr__(self) -> str:
        return self._name


#: Default of a required parameter.
REQUIRED: Any = _Sentinel("REQUIRED")
#: An argument left out of a call (the headless engine may pass it explicitly).
MISSING: Any = _Sentinel("MISSING")


@dataclass(frozen=True)
class Param:
    """One parameter of a worksheet function.

    Parameters
    ----------
    name : str
        Python identifier, also the argument name Excel's function wizard shows.
    kind : {"number", "range", "text", "flag"}
        ``number``: a number, or a range that spills (``spill=True``); ``range``: a data range
        (blanks skipped by the core, text/error cells refused); ``text``: an option such as
        ``"mle"``; ``flag``: TRUE/FALSE.
    doc : str
        Description for the function wizard, at most 255 characters.
    default : object
        Default of an optional parameter (``REQUIRED`` when it must be given).
    example : object
        A valid cell value, used by the docs, the harness and the bad-input tests.
    choices : tuple of str
        Allowed values of a ``text`` parameter (lower case).
    spill : bool
        For ``number``: whether a range is accepted and spills (False: a single cell only).
    """

    name: str
    kind: Literal["number", "range", "text", "flag"]
    doc: str
    default: Any = REQUIRED
    example: Any = None
    choices: tuple[str, ...] = ()
    spill: bool = True

    def __post_init__(self) -> None:
        if self.kind not in KINDS:
            raise ValueError(f"{self.name}: kind must be one of {KINDS}, got {self.kind!r}")
        if not self.name.isidentifier() or self.name == "caller":
            raise ValueError(f"{self.name!r} cannot be a parameter name")
        if len(self.doc) > _DESCRIPTION_LIMIT:
            raise ValueError(f"{self.name}: description longer than 255 characters")
        if self.example is None:
            raise ValueError(f"{self.name}: give a valid example value")

    @property
    def optional(self) -> bool:
        """Whether the parameter has a default."""
        return self.default is not REQUIRED

    def read(self, value: Any) -> Any:
        """Convert one cell argument by this parameter's kind."""
        if value is MISSING or (self.optional and cells.is_blank(_single(value))):
            if not self.optional:
                raise SheetError("#VALUE!", f"{self.name} is missing")
            return self.default
        kind = self.kind
        if kind == "number":
            return cells.as_number(value, self.name, spill=self.spill)
        if kind == "range":
            return cells.as_data(value, self.name)
        if kind == "text":
            return cells.as_text(value, self.name, choices=self.choices)
        return cells.as_flag(value, self.name, default=bool(self.default))


def _single(value: Any) -> Any:
    """The value of a one-cell range (``[[v]]``), else ``value`` itself."""
    if isinstance(value, (list, tuple)) and len(value) == 1:
        inner = value[0]
        if isinstance(inner, (list, tuple)):
            return inner[0] if len(inner) == 1 else value
        return inner
    if isinstance(value, np.ndarray) and value.size == 1:
        return value.reshape(-1)[0]
    return value


def number(
    name: str, doc: str, *, example: Any, default: Any = REQUIRED, spill: bool = True
) -> Param:
    """A number parameter (a range spills a same-shaped result when ``spill``)."""
    return Param(name, "number", doc, default=default, example=example, spill=spill)


def data_range(name: str, doc: str, *, example: Any) -> Param:
    """A data range parameter (blank cells skipped; text or error cells refused)."""
    return Param(name, "range", doc, example=example)


def text(name: str, doc: str, *, choices: Sequence[str], default: Any = REQUIRED) -> Param:
    """A text option parameter, one of ``choices`` (case-insensitive)."""
    example = default if default is not REQUIRED else choices[0]
    return Param(name, "text", doc, default=default, example=example, choices=tuple(choices))


def flag(name: str, doc: str, *, default: bool = False) -> Param:
    """A TRUE/FALSE parameter."""
    return Param(name, "flag", doc, default=default, example=default)


def _resolve(target: Callable[..., Any] | str) -> Callable[..., Any]:
    if callable(target):
        return target
    module, _, attr = target.partition(":")
    return getattr(importlib.import_module(module), attr)


@dataclass(frozen=True)
class Entry:
    """One worksheet function of the catalog.

    Parameters
    ----------
    name : str
        ``ERRDIST_...`` (upper case).
    core : callable or str
        The core function it exposes, or ``"module:function"`` resolved on first use.
    params : tuple of Param
        In the order of the worksheet arguments; optional ones last.
    result : {"scalar", "spill", "table", "column"}
        The shape of the result.
    summary : str
        One sentence for the function wizard (at most 255 characters).
    call : callable, optional
        ``call(*converted_args)`` -> result, when the core callable is not called directly
        with the converted arguments in order.
    header : tuple of str
        Labels of a ``table`` result's columns, shown as a first row when the argument
        named ``header`` is TRUE.
    vectorized : bool
        Whether ``call`` broadcasts over array number arguments (False: one call per cell).
    volatile : bool
        Recalculate on every worksheet change (xlwings ``volatile``).
    call_in_wizard : bool
        Whether Excel's function wizard may run it while arguments are typed.
    notes : str
        Extra text for ``docs/functions.md`` (not shown in Excel).
    category : str
        The function wizard category.
    """

    name: str
    core: Callable[..., Any] | str
    params: tuple[Param, ...]
    result: Literal["scalar", "spill", "table", "column"]
    summary: str
    call: Callable[..., Any] | None = None
    header: tuple[str, ...] = ()
    vectorized: bool = True
    volatile: bool = False
    call_in_wizard: bool = True
    notes: str = ""
    category: str = CATEGORY
    _spill_index: tuple[int, ...] = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        if not self.name.startswith("ERRDIST_") or self.name != self.name.upper():
            raise ValueError(f"worksheet function names are ERRDIST_... in capitals: {self.name}")
        if not self.name.isidentifier():
            raise ValueError(f"{self.name} is not an identifier")
        if self.result not in RESULTS:
            raise ValueError(f"{self.name}: result must be one of {RESULTS}")
        if len(self.summary) > _DESCRIPTION_LIMIT:
            raise ValueError(f"{self.name}: summary longer than 255 characters")
        names = [p.name for p in self.params]
        if len(set(names)) != len(names):
            raise ValueError(f"{self.name}: parameter names repeat")
        seen_optional = False
        for p in self.params:
            if p.optional:
                seen_optional = True
            elif seen_optional:
                raise ValueError(f"{self.name}: required {p.name} after an optional parameter")
        spill_index = tuple(i for i, p in enumerate(self.params) if p.kind == "number" and p.spill)
        if spill_index and self.result != "spill":
            raise ValueError(
                f"{self.name}: only a 'spill' result broadcasts; give its number "
                "parameters spill=False"
            )
        object.__setattr__(self, "_spill_index", spill_index)

    # ------------------------------------------------------------------ introspection

    @property
    def function(self) -> Callable[..., Any]:
        """The core callable."""
        return _resolve(self.core)

    @property
    def core_name(self) -> str:
        """Dotted name of the core callable, for the docs."""
        if isinstance(self.core, str):
            return self.core.replace(":", ".")
        return f"{self.core.__module__}.{self.core.__qualname__}"

    @property
    def example(self) -> tuple[Any, ...]:
        """Valid example arguments (one per parameter)."""
        return tuple(p.example for p in self.params)

    @property
    def required(self) -> int:
        """Number of required parameters."""
        return sum(not p.optional for p in self.params)

    # ------------------------------------------------------------------ evaluation

    def evaluate(self, args: Sequence[Any]) -> Any:
        """Cell arguments -> result cells (a scalar or a list of rows).

        Raises
        ------
        SheetError
            When the call as a whole fails. Per-cell failures of a spill are returned as
            :class:`SheetError` objects in their cells.
        """
        params = self.params
        n = len(args)
        if n > len(params):
            raise SheetError("#VALUE!", f"{self.name} takes at most {len(params)} arguments")
        if n < len(params):
            args = (*args, *([MISSING] * (len(params) - n)))
        values = [p.read(a) for p, a in zip(params, args, strict=True)]
        try:
            if self._spill_index:
                return self._spill(values)
            return self._finish(self._run(values), values)
        except SheetError:
            raise
        except Exception as exc:  # every failure becomes a coded text
            raise cells.sheet_error(exc) from None

    def _run(self, values: Sequence[Any]) -> Any:
        fn = self.call if self.call is not None else self.function
        return fn(*values)

    def _finish(self, result: Any, values: Sequence[Any]) -> Any:
        out = cells.to_cells(result)
        if self.result == "table" and self.header and "header" in self._names():
            if values[self._names().index("header")]:
                body = out if isinstance(out, list) else [[out]]
                return [list(self.header), *body]
        return out

    def _names(self) -> list[str]:
        return [p.name for p in self.params]

    def _spill(self, values: list[Any]) -> Any:
        idx = self._spill_index
        arrays = [values[i] for i in idx if isinstance(values[i], np.ndarray)]
        if not arrays:
            return self._finish(self._run(values), values)
        try:
            shape = np.broadcast_shapes(*(a.shape for a in arrays))
        except ValueError:
            shapes = ", ".join(
                f"{self.params[i].name} {values[i].shape[0]}x{values[i].shape[1]}"
                for i in idx
                if isinstance(values[i], np.ndarray)
            )
            raise SheetError("#VALUE!", f"ranges do not line up: {shapes}") from None
        blank = np.zeros(shape, dtype=bool)
        for a in arrays:
            blank |= np.isnan(a)
        any_blank = bool(blank.any())
        rows = shape[0]
        if any_blank and blank[-1].all():  # blank rows at the end (A:A) are left out
            used = np.flatnonzero(~blank.all(axis=1))
            rows = int(used[-1]) + 1 if used.size else 1
            blank = blank[:rows]
        filled = list(values)
        for i in idx:
            if isinstance(values[i], np.ndarray):
                filled[i] = np.broadcast_to(values[i], shape)[:rows]
        shape = (rows, *shape[1:])
        size = int(np.prod(shape))
        if not self.vectorized:
            if size > LOOP_LIMIT:
                raise SheetError(
                    "#VALUE!",
                    f"{self.name} spills at most {LOOP_LIMIT} cells, asked for {size}",
                )
            return cells.to_cells(self._per_cell(filled, shape, blank))
        args = filled
        keep = None
        if any_blank:  # evaluate only the cells that are not blank, then put them back
            keep = ~blank
            args = [
                v[keep] if i in idx and isinstance(v, np.ndarray) else v
                for i, v in enumerate(filled)
            ]
        try:
            if keep is not None and not keep.any():
                computed = np.empty(0)
            else:
                computed = np.asarray(self._run(args), dtype=np.float64)
        except ErrdistError as exc:
            if size > PER_CELL_LIMIT:
                raise cells.sheet_error(exc) from None
            return cells.to_cells(self._per_cell(filled, shape, blank))
        if keep is None:
            result = np.broadcast_to(computed, shape)
        else:
            result = np.full(shape, np.nan)
            result[keep] = computed
        return cells.to_cells(result)

    def _per_cell(self, filled: list[Any], shape: tuple[int, ...], blank: np.ndarray) -> Any:
        idx = set(self._spill_index)
        out = np.empty(shape, dtype=object)
        for pos in np.ndindex(*shape):
            if blank[pos]:
                out[pos] = None
                continue
            args = [
                (float(v[pos]) if isinstance(v, np.ndarray) else v) if i in idx else v
                for i, v in enumerate(filled)
            ]
            try:
                out[pos] = cells.to_cells(self._run(args))
            except Exception as exc:
                out[pos] = cells.sheet_error(exc)
        return out
