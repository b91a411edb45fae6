"""The headless workbook engine: evaluate every formula of an .xlsx file without a spreadsheet.

Built on the PyPI package ``formulas`` (pinned 1.3.4), which compiles each formula cell into a
Python function and evaluates the whole dependency graph. errdist adds:

- **the worksheet functions**: :func:`register_functions` registers every entry of the
  catalog (``errdist.sheet.catalog``) under its name, so ``=ERRDIST_FIT(Data!C3:C1262)`` is
  computed by the same core code the add-in calls. Errors raised by a catalog call become real
  spreadsheet error values (``#NUM!``, ``#VALUE!``, ``#N/A``), with their messages kept in
  :attr:`Evaluation.messages`.
- **no silent gaps**: before anything is computed, every formula is scanned; functions the
  engine lacks (or is known to get wrong: SEQUENCE, LET, LAMBDA, AGGREGATE, UNIQUE), references to
  other workbooks, and anything ``formulas`` logs as a problem are reported as
  :class:`Problem` entries (cell, formula, reason). :func:`evaluate_workbook` raises
  :class:`EngineError` listing them.
- **safety**: the file is checked by :func:`errdist.workbook.safety.inspect_xlsx` (size, zip
  bombs, external links, XML entities) and evaluated from a private copy in a fresh temporary
  folder, so ``formulas`` cannot reach any other file.

How ``formulas`` 1.3.4 sees a workbook (observed, see ``tests/test_engine.py``):

- XlsxWriter with ``use_future_functions=True`` stores newer built-ins with the ``_xlfn.``
  prefix (``_xlfn.STDEV.S``) and unknown names such as ``ERRDIST_FIT`` with **no** prefix;
  Excel itself may store add-in functions as ``_xludf.NAME``. Both spellings are registered.
- A dynamic-array formula (``write_dynamic_array_formula``) is stored like a legacy array
  formula (``<f t="array" ref="C3:C1262">``, plus a ``cm`` attribute that ``formulas`` ignores);
  the result is spread over exactly the stored ``ref`` range: a smaller result is padded with
  ``#N/A``, a scalar (or a single error) is repeated over the range. For a dynamic-array formula
  (``cm`` present) whose whole range holds one error value, this module reports the error in the
  anchor cell and blanks elsewhere — what a dynamic-array spreadsheet shows.
- A plain formula that returns an array keeps its top-left value.
- Cells that reference an empty cell see 0, as in the spreadsheet.

Speed: ``formulas`` parses and compiles each formula cell separately, about 2.5 ms per cell
on the reference machine (plus ~0.5 ms to evaluate it). A column of 1,260 per-row formulas
costs ~3 s; the same column written as ONE dynamic-array formula (``=LN(B3:B1262/B2:B1261)``)
costs a few milliseconds. Templates should use spilled column formulas, not per-row ones.
"""

from __future__ import annotations

import functools
import logging
import math
import os
import re
import shutil
import tempfile
import time
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from errdist.workbook import safety

log = logging.getLogger(__name__)

ERROR_CODES = ("#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#N/A")

#: String literal that stands in for an omitted argument of a catalog function. ``formulas``
#: parses ``=ERRDIST_VAR(c,m,a,b,10,,"iid")`` with the empty slot as 0, while the spreadsheet
#: with xlwings passes "not given"; :func:`mark_omitted_arguments` writes this literal into
#: such slots before compiling, and the cell wrapper turns it back into ``None`` (not given).
OMITTED = "__errdist_omitted__"
_OMITTED_LITERAL = f'"{OMITTED}"'
_CATALOG_CALL = re.compile(r"(?:_xludf\.|_xlfn\.)?ERRDIST_[A-Z0-9_]*\s*\(", re.IGNORECASE)
"""Spreadsheet error values, as strings."""

UNRELIABLE_FUNCTIONS = frozenset(
    {
        "SEQUENCE",
        "_XLFN.SEQUENCE",
        "LET",
        "_XLFN.LET",
        "LAMBDA",
        "_XLFN.LAMBDA",
        "AGGREGATE",
        "_XLFN.AGGREGATE",
        "UNIQUE",
        "_XLFN.UNIQUE",
    }
)
"""Functions ``formulas`` 1.3.4 lacks or evaluates wrongly; a formula using one is a problem."""

VOLATILE_FUNCTIONS = frozenset(
    {"RAND", "RANDBETWEEN", "_XLFN.RANDARRAY", "NOW", "TODAY", "OFFSET", "INDIRECT", "INFO"}
)
"""Functions whose value changes at each recalculation; a recomputation may differ."""

_STRING_LITERAL = re.compile(r'"(?:[^"]|"")*"')
_FUNCTION_NAME = re.compile(r"(?<![A-Za-z0-9_.!'$])([A-Za-z_][A-Za-z0-9_.]*)\s*\(")
_CM_CELL = re.compile(rb'<c\b[^>]*?\br="([A-Z]+[0-9]+)"[^>]*?\bcm="')
_CM_CELL_REV = re.compile(rb'<c\b[^>]*?\bcm="[^"]*"[^>]*?\br="([A-Z]+[0-9]+)"')


class EngineError(ValueError):
    """Some formula cells cannot be evaluated headlessly (the message lists them)."""

    def __init__(self, problems: list[Problem]) -> None:
        self.problems = problems
        shown = "; ".join(str(p) for p in problems[:8])
        more = f"; and {len(problems) - 8} more" if len(problems) > 8 else ""
        super().__init__(
            f"{len(problems)} formula cell(s) cannot be evaluated headlessly: {shown}{more}"
        )


@dataclass(frozen=True)
class Problem:
    """A formula cell the engine cannot evaluate faithfully, and why."""

    sheet: str
    cell: str
    formula: str
    reason: str

    def __str__(self) -> str:
        where = f"{self.sheet}!{self.cell}" if self.cell else (self.sheet or "workbook")
        formula = f" ({self.formula})" if self.formula else ""
        return f"{where}{formula}: {self.reason}"


@dataclass
class Evaluation:
    """Everything one evaluation produced.

    Attributes
    ----------
    values : dict
        ``(sheet, "A1") -> value`` for every formula cell, every cell of an array/spill range
        included: ``float``, ``str``, ``bool``, ``None`` (blank) or an error code such as
        ``"#NUM!"``. Sheets in workbook order, cells row by row.
    formulas : dict
        ``(sheet, "A1") -> formula text`` (with ``=``); cells of a spill carry their anchor's.
    anchors : dict
        ``(sheet, "A1") -> "A1"`` of the anchor of each cell's formula (itself if plain).
    problems : list of Problem
        Cells that could not be evaluated faithfully (unsupported functions, external
        references, errors inside the engine).
    volatile : set
        Cells whose formula uses a volatile function (RAND, TODAY, ...).
    messages : list of str
        Messages of the errors raised by worksheet-function calls (``"ERRDIST_FIT: #N/A ..."``).
    timings : dict
        Seconds spent in ``check`` (safety), ``load`` (read + parse + compile),
        ``compile`` (link the graph), ``calculate`` and ``collect``.
    """

    values: dict[tuple[str, str], Any] = field(default_factory=dict)
    formulas: dict[tuple[str, str], str] = field(default_factory=dict)
    anchors: dict[tuple[str, str], str] = field(default_factory=dict)
    problems: list[Problem] = field(default_factory=list)
    volatile: set[tuple[str, str]] = field(default_factory=set)
    messages: list[str] = field(default_factory=list)
    timings: dict[str, float] = field(default_factory=dict)


# ----------------------------------------------------------------------------------------------
# Registration of the worksheet functions


_MESSAGES: list[str] | None = None
_INTERNAL_FAILURES: list[str] | None = None
_REGISTERED: dict[str, Callable[..., Any]] = {}


def _formulas_runtime() -> tuple[Any, Any, Any, Any]:
    """Import ``formulas`` lazily (it is slow to import) and silence its progress bars."""
    import formulas.excel as fx
    import schedula as sh
    from formulas.functions import Array, get_functions
    from formulas.tokens.operand import Error

    if not getattr(fx, "_errdist_quiet", False):
        import tqdm as _tqdm

        class _QuietTqdm:
            tqdm = functools.partial(_tqdm.tqdm, disable=True)

        fx.tqdm = _QuietTqdm  # ExcelModel.complete() calls tqdm.tqdm(...) for a progress bar
        fx._errdist_quiet = True
    return get_functions(), Array, Error, sh


def _cell_arg(value: Any, sh: Any) -> Any:
    """One value as the engine passes it -> the catalog's cell value (float/str/bool/None)."""
    if value is sh.EMPTY or value is None:
        return None
    if isinstance(value, str) and value == OMITTED:
        return None  # an omitted argument: the catalog applies the parameter's default
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, str):  # XlError is a str subclass: pass its code as text
        return str(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        return float(value)
    return value


def _to_catalog_arg(value: Any, sh: Any) -> Any:
    """A formula argument -> scalar or 2-D list of cell values (a 1x1 range becomes a scalar)."""
    if isinstance(value, np.ndarray):
        if value.ndim == 0:
            return _cell_arg(value.item(), sh)
        arr = value if value.ndim == 2 else np.atleast_2d(value)
        if arr.shape == (1, 1):
            return _cell_arg(arr[0, 0], sh)
        return [[_cell_arg(v, sh) for v in row] for row in arr.tolist()]
    return _cell_arg(value, sh)


def _to_engine_value(value: Any, error: Any) -> Any:
    """A catalog result cell -> the engine's value (blank/NaN -> "", error texts -> errors)."""
    if value is None:
        return ""
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        v = float(value)
        return "" if math.isnan(v) else v
    if isinstance(value, str) and value in ERROR_CODES:
        return error.errors[value]
    if isinstance(value, BaseException):  # a spill cell out of its domain (SheetError)
        code = _error_code(value) or "#VALUE!"
        if _MESSAGES is not None:
            _MESSAGES.append(f"cell of a spilled result: {code} {getattr(value, 'message', value)}")
        return error.errors[code]
    return value


def _error_code(exc: BaseException) -> str | None:
    """The spreadsheet error code an exception stands for, or None for an unexpected one."""
    code = getattr(exc, "code", None)
    if isinstance(code, str):
        for known in ERROR_CODES:
            if code.startswith(known):
                return known
    if isinstance(exc, ValueError):
        return "#NUM!"  # errors.py: a plain ValueError is shown as #NUM!
    return None


def _make_cell_function(
    name: str, call: Callable[..., Any], array_cls: Any, error: Any, sh: Any
) -> Callable[..., Any]:
    """Wrap ``call(name, *cell_args)`` as a ``formulas`` function."""

    def cell_function(*args: Any) -> Any:
        try:
            result = call(name, *(_to_catalog_arg(a, sh) for a in args))
        except Exception as exc:
            code = _error_code(exc)
            message = getattr(exc, "message", None) or str(exc)
            if code is None:
                code = "#VALUE!"
                if _INTERNAL_FAILURES is not None:
                    _INTERNAL_FAILURES.append(f"{name}: {type(exc).__name__}: {exc}")
            if _MESSAGES is not None:
                _MESSAGES.append(f"{name}: {code} {message}")
            return error.errors[code]
        if isinstance(result, (list, tuple, np.ndarray)):
            arr = np.array(result, dtype=object)
            if arr.ndim == 0:
                return _to_engine_value(arr.item(), error)
            arr = np.atleast_2d(arr)
            out = np.empty(arr.shape, dtype=object)
            for idx, v in np.ndenumerate(arr):
                out[idx] = _to_engine_value(v, error)
            return out.view(array_cls)
        return _to_engine_value(result, error)

    cell_function.__name__ = name
    return cell_function


def _catalog_registry() -> tuple[list[str], Callable[..., Any]] | None:
    """The catalog's function names and its ``evaluate(name, *args)``, or None if absent."""
    try:
        from errdist.sheet import catalog
    except ImportError:
        return None
    names: Iterable[str] | None = None
    for attr in ("names", "function_names", "all_names"):
        f = getattr(catalog, attr, None)
        if callable(f):
            names = f()
            break
    if names is None:
        for attr in ("CATALOG", "ENTRIES", "FUNCTIONS", "catalog"):
            obj = getattr(catalog, attr, None)
            if obj is None or callable(obj) and not hasattr(obj, "__iter__"):
                continue
            obj = obj() if callable(obj) else obj
            names = list(obj) if isinstance(obj, dict) else [e.name for e in obj]
            break
    if names is None:
        f = getattr(catalog, "entries", None)
        if callable(f):
            names = [e.name for e in f()]
    if names is None or not hasattr(catalog, "evaluate"):
        raise ImportError(
            "errdist.sheet.catalog lists no function names or has no evaluate(); "
            "the headless engine cannot register the worksheet functions"
        )
    return [str(n) for n in names], catalog.evaluate


def register_functions(
    names: Iterable[str] | None = None, call: Callable[..., Any] | None = None
) -> list[str]:
    """Register the worksheet functions with ``formulas`` (idempotent).

    Parameters
    ----------
    names, call : optional
        A function registry to use instead of the catalog: the names, and
        ``call(name, *cell_args)`` returning a scalar or 2-D list and raising an exception
        with a ``code`` attribute (``"#NUM!"`` ...) on bad input. Default: the names listed by
        ``errdist.sheet.catalog`` and ``errdist.sheet.catalog.evaluate``.

    Returns
    -------
    list of str
        The names registered (each also under ``_XLUDF.`` and ``_XLFN.`` prefixes).
    """
    functions, array_cls, error, sh = _formulas_runtime()
    from formulas.functions import wrap_func

    if names is None or call is None:
        registry = _catalog_registry()
        if registry is None:
            return []
        names, call = registry
    done = []
    for name in names:
        upper = name.upper()
        if _REGISTERED.get(upper) is call and upper in functions:
            done.append(upper)
            continue
        wrapped = wrap_func(_make_cell_function(upper, call, array_cls, error, sh))
        for key in (upper, "_XLUDF." + upper, "_XLFN." + upper):
            functions[key] = wrapped
        _REGISTERED[upper] = call
        done.append(upper)
    return done


# ----------------------------------------------------------------------------------------------
# Scanning formulas before evaluation


def _last_significant(out: list[str]) -> str:
    """Last non-blank character written so far ("" at the start)."""
    for chunk in reversed(out):
        stripped = chunk.rstrip()
        if stripped:
            return stripped[-1]
    return ""


def mark_omitted_arguments(formula: str) -> str:
    """Write :data:`OMITTED` into the empty argument slots of catalog function calls.

    ``=ERRDIST_VAR(A1,B1,C1,D1,10,,"iid")`` becomes
    ``=ERRDIST_VAR(A1,B1,C1,D1,10,"__errdist_omitted__","iid")``; a trailing empty slot
    (``f(a,)``) is marked too; ``f()`` is left alone. Built-in functions keep the
    spreadsheet's own rule (an empty argument is 0). String literals, quoted sheet names and
    array constants (``{1,2}``) are skipped.
    """
    if "ERRDIST_" not in formula.upper():
        return formula
    out: list[str] = []
    stack: list[bool] = []  # one entry per open "(" or "{": True for a catalog call
    i, n = 0, len(formula)
    while i < n:
        ch = formula[i]
        if ch in "\"'":  # string literal or quoted sheet name: copy through its end
            j = i + 1
            while j < n:
                if formula[j] == ch:
                    if j + 1 < n and formula[j + 1] == ch:
                        j += 2
                        continue
                    break
                j += 1
            out.append(formula[i : j + 1])
            i = j + 1
            continue
        call = _CATALOG_CALL.match(formula, i)
        if call and (i == 0 or not (formula[i - 1].isalnum() or formula[i - 1] in "._")):
            out.append(call.group(0))
            stack.append(True)
            i = call.end()
            continue
        if ch in "({":
            stack.append(False)
        elif ch in ")}":
            if ch == ")" and stack and stack[-1] and _last_significant(out) == ",":
                out.append(_OMITTED_LITERAL)
            if stack:
                stack.pop()
        elif ch == "," and stack and stack[-1] and _last_significant(out) in "(,":
            out.append(_OMITTED_LITERAL)
        out.append(ch)
        i += 1
    return "".join(out)


def _strip_strings(formula: str) -> str:
    return _STRING_LITERAL.sub('""', formula)


def formula_problems(formula: str, known: Callable[[str], bool]) -> tuple[list[str], bool]:
    """Reasons a formula cannot be evaluated headlessly, and whether it is volatile.

    Parameters
    ----------
    formula : str
        Formula text (with or without ``=``).
    known : callable
        ``known(NAME)`` -> True when the engine has the function.
    """
    body = _strip_strings(formula)
    reasons = []
    if "[" in body:
        reasons.append("references another workbook or a table ([...]); not followed")
    volatile = False
    for raw in _FUNCTION_NAME.findall(body):
        name = raw.upper()
        if name in UNRELIABLE_FUNCTIONS:
            reasons.append(f"function {raw} is not evaluated correctly by the headless engine")
        elif not known(name):
            reasons.append(f"function {raw} is not known to the headless engine")
        if name in VOLATILE_FUNCTIONS or name.removeprefix("_XLUDF.") in _volatile_catalog():
            volatile = True
    return list(dict.fromkeys(reasons)), volatile


def _volatile_catalog() -> frozenset[str]:
    """Catalog functions marked volatile (e.g. random draws without a seed)."""
    try:
        from errdist.sheet import catalog
    except ImportError:
        return frozenset()
    entries = getattr(catalog, "CATALOG", {})
    values = entries.values() if isinstance(entries, dict) else entries
    return frozenset(str(e.name).upper() for e in values if getattr(e, "volatile", False))


def _dynamic_anchors(path: Path, sheet_parts: dict[str, str]) -> dict[str, set[str]]:
    """Cells carrying a ``cm`` attribute (dynamic-array anchors), per sheet name."""
    import zipfile

    out: dict[str, set[str]] = {}
    with zipfile.ZipFile(path) as z:
        for sheet, part in sheet_parts.items():
            try:
                data = z.read(part)
            except KeyError:
                continue
            cells = {m.decode() for m in _CM_CELL.findall(data)}
            cells |= {m.decode() for m in _CM_CELL_REV.findall(data)}
            out[sheet] = cells
    return out


def sheet_parts(path: str | os.PathLike[str]) -> dict[str, str]:
    """Map each worksheet's name to its part path in the archive (``xl/worksheets/sheet1.xml``).

    Parses ``xl/workbook.xml`` and its relationships with defusedxml.
    """
    import posixpath
    import zipfile

    from defusedxml import ElementTree

    ns_main = "{http://schemas.openxmlformats.org/spreadsheetml/2006/main}"
    ns_rel = "{http://schemas.openxmlformats.org/officeDocument/2006/relationships}"
    with zipfile.ZipFile(path) as z:
        names = set(z.namelist())
        wb_part = "xl/workbook.xml"
        rels_part = "xl/_rels/workbook.xml.rels"
        if wb_part not in names or rels_part not in names:
            return {}
        wb = ElementTree.fromstring(z.read(wb_part))
        rels = ElementTree.fromstring(z.read(rels_part))
    targets = {}
    for rel in rels:
        target = rel.get("Target", "")
        if target.startswith("/"):
            target = target[1:]
        else:
            target = posixpath.normpath(posixpath.join("xl", target))
        targets[rel.get("Id")] = target
    out = {}
    sheets = wb.find(f"{ns_main}sheets")
    for s in sheets if sheets is not None else ():
        rid = s.get(f"{ns_rel}id")
        if rid in targets:
            out[s.get("name")] = targets[rid]
    return out


# ----------------------------------------------------------------------------------------------
# Evaluation


def _plain(value: Any, sh: Any) -> Any:
    """An engine value -> float / str / bool / None / error-code string."""
    if value is sh.EMPTY or value is None:
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, str):
        return str(value)  # XlError -> "#NUM!", text stays text
    if isinstance(value, (int, float, np.integer, np.floating)):
        v = float(value)
        return "#NUM!" if not math.isfinite(v) else v
    if isinstance(value, np.ndarray):
        return _plain(value.ravel()[0], sh) if value.size else None
    return value


@functools.lru_cache(maxsize=1)
def _model_class() -> type:
    """``formulas.ExcelModel`` that does not compile blank cells or non-anchor spill cells.

    ``ExcelModel.push`` parses every cell of the sheet's used rectangle into a ``Cell`` (about
    0.1 ms each), blanks included, and then drops the blanks (they add no node) and the cells
    inside an array/spill range (their values come from the anchor's formula). Skipping both
    before parsing gives the same model and saves most of the load time of a workbook with
    long columns.
    """
    import formulas
    import schedula as sh
    from openpyxl.utils.cell import range_boundaries

    class Model(formulas.ExcelModel):
        def push(self, worksheet: Any, context: Any) -> Any:
            worksheet, context = self.add_sheet(worksheet, context)
            references = self.references
            formula_references = self.formula_references(context)
            formula_ranges = self.formula_ranges(context)
            ctx = {"external_links": self.external_links(context)}
            ctx.update(context)
            covered: set[tuple[int, int]] = set()
            for anchor, ref in formula_references.items():
                min_col, min_row, max_col, max_row = range_boundaries(ref)
                covered.update(
                    (r, c) for r in range(min_row, max_row + 1) for c in range(min_col, max_col + 1)
                )
                a_col, a_row = _col_row(anchor)
                covered.discard((a_row, a_col))
            cells = []
            for row in worksheet.iter_rows():
                for c in row:
                    if getattr(c, "value", None) is None or (c.row, c.column) in covered:
                        continue  # blank (adds nothing to the model) or filled by a spill
                    if c.data_type == "f":
                        _mark_cell(c)
                    cells.append(self.compile_cell(c, ctx, references, formula_references))
            for cell in cells:
                self.add_cell(sh.await_result(cell), ctx, formula_ranges)
            return self

    return Model


def _mark_cell(cell: Any) -> None:
    """Apply :func:`mark_omitted_arguments` to an openpyxl formula cell in place."""
    value = cell.value
    if isinstance(value, str):
        marked = mark_omitted_arguments(value)
        if marked != value:
            cell.value = marked
    elif hasattr(value, "text") and isinstance(value.text, str):
        value.text = mark_omitted_arguments(value.text)


class _ProblemLog(logging.Handler):
    def __init__(self) -> None:
        super().__init__(logging.WARNING)
        self.records: list[str] = []

    def emit(self, record: logging.LogRecord) -> None:
        self.records.append(record.getMessage().replace("\n", " ").strip())


def _col_row(coord: str) -> tuple[int, int]:
    from openpyxl.utils.cell import column_index_from_string, coordinate_from_string

    col, row = coordinate_from_string(coord)
    return column_index_from_string(col), row


def evaluate_details(path: str | os.PathLike[str]) -> Evaluation:
    """Evaluate every formula of a workbook and return values, problems and timings.

    Parameters
    ----------
    path : path-like
        The .xlsx workbook (checked by :func:`errdist.workbook.safety.inspect_xlsx` first).

    Returns
    -------
    Evaluation
        See :class:`Evaluation`. Never raises for unsupported formulas: they are listed in
        ``problems`` (use :func:`evaluate_workbook` to raise).
    """
    global _MESSAGES, _INTERNAL_FAILURES
    from openpyxl.utils.cell import get_column_letter, range_boundaries

    ev = Evaluation()
    t0 = time.perf_counter()
    safety.inspect_xlsx(path)
    safety.defuse_xml()
    functions, _array, _error, sh = _formulas_runtime()
    register_functions()  # the catalog's functions (cheap when already registered)

    def known(name: str) -> bool:
        return name in functions

    ev.timings["check"] = time.perf_counter() - t0
    handler = _ProblemLog()
    flog = logging.getLogger("formulas")
    flog.addHandler(handler)
    _MESSAGES, _INTERNAL_FAILURES = ev.messages, []
    try:
        with tempfile.TemporaryDirectory(prefix="errdist-engine-") as tmp:
            local = Path(tmp) / "book.xlsx"
            shutil.copyfile(path, local)
            parts = sheet_parts(local)
            dynamic = _dynamic_anchors(local, parts)

            t1 = time.perf_counter()
            model = _model_class()()
            book, context = model.add_book(str(local))
            # Scan every formula before compiling anything.
            scans: list[tuple[str, str, str, str | None]] = []  # sheet, anchor, text, ref
            upper_to_sheet = {ws.title.upper(): ws.title for ws in book.worksheets}
            for ws in book.worksheets:
                for row in ws.iter_rows():
                    for c in row:
                        if getattr(c, "data_type", None) != "f":
                            continue
                        val = c.value
                        text = val if isinstance(val, str) else getattr(val, "text", "")
                        ref = None if isinstance(val, str) else getattr(val, "ref", None)
                        if text and not text.startswith("="):
                            text = "=" + text
                        scans.append((ws.title, c.coordinate, text, ref))
            for dn in getattr(book.defined_names, "values", lambda: [])():
                if "[" in _strip_strings(str(dn.value)):
                    ev.problems.append(
                        Problem(
                            "",
                            "",
                            f"name {dn.name}",
                            "defined name refers to another workbook; not followed",
                        )
                    )
            blocked: set[tuple[str, str]] = set()
            for sheet, anchor, text, _ref in scans:
                reasons, volatile = formula_problems(text, known)
                if volatile:
                    ev.volatile.add((sheet, anchor))
                for reason in reasons:
                    ev.problems.append(Problem(sheet, anchor, text, reason))
                if any("another workbook" in r for r in reasons):
                    blocked.add((sheet, anchor))
            if blocked:
                # Never let formulas try to open another file: refuse before compiling.
                return ev
            model.pushes(*book.worksheets, context=context)
            t2 = time.perf_counter()
            ev.timings["load"] = t2 - t1
            model.finish()
            t3 = time.perf_counter()
            ev.timings["compile"] = t3 - t2
            solution = model.calculate()
            t4 = time.perf_counter()
            ev.timings["calculate"] = t4 - t3

            index: dict[tuple[str, int, int], tuple[str, Any]] = {}
            for out, cell in model.cells.items():
                if getattr(cell, "func", None) is None or cell.range is None:
                    continue
                rng = cell.range.ranges[0]
                sheet = upper_to_sheet.get(str(rng.get("sheet", "")).upper())
                if sheet is None:
                    continue
                index[(sheet, int(rng["r1"]), int(rng["n1"]))] = (out, rng)
            for sheet, anchor, text, ref in scans:
                col, row = _col_row(anchor)
                entry = index.get((sheet, row, col))
                if ref:
                    min_col, min_row, max_col, max_row = range_boundaries(ref)
                else:
                    min_col, min_row, max_col, max_row = col, row, col, row
                value = None
                if entry is not None:
                    value = solution.get(entry[0])
                if entry is None or value is None:
                    ev.problems.append(Problem(sheet, anchor, text, "not computed by the engine"))
                    arr = np.full((max_row - min_row + 1, max_col - min_col + 1), None, object)
                else:
                    arr = np.asarray(getattr(value, "value", value), dtype=object)
                    if arr.ndim < 2:
                        arr = np.atleast_2d(arr)
                cells = []
                for r in range(min_row, max_row + 1):
                    for c in range(min_col, max_col + 1):
                        i, j = r - min_row, c - min_col
                        v = arr[i, j] if i < arr.shape[0] and j < arr.shape[1] else None
                        cells.append((f"{get_column_letter(c)}{r}", _plain(v, sh)))
                is_dynamic = anchor in dynamic.get(sheet, set())
                if is_dynamic and len(cells) > 1:
                    first = cells[0][1]
                    if (
                        isinstance(first, str)
                        and first in ERROR_CODES
                        and all(v == first for _, v in cells)
                    ):
                        cells = [cells[0]] + [(k, None) for k, _ in cells[1:]]
                for coord, v in cells:
                    ev.values[(sheet, coord)] = v
                    ev.formulas[(sheet, coord)] = text
                    ev.anchors[(sheet, coord)] = anchor
            ev.timings["collect"] = time.perf_counter() - t4
    finally:
        flog.removeHandler(handler)
        failures = _INTERNAL_FAILURES or []
        _MESSAGES, _INTERNAL_FAILURES = None, None
    for msg in failures:
        ev.problems.append(Problem("", "", "", f"internal error in {msg}"))
    for msg in handler.records:
        ev.problems.append(Problem("", "", "", f"engine warning: {msg}"))
    return ev


def evaluate_workbook(path: str | os.PathLike[str]) -> dict[tuple[str, str], Any]:
    """Evaluate every formula of a workbook headlessly.

    Parameters
    ----------
    path : path-like
        The .xlsx workbook.

    Returns
    -------
    dict
        ``(sheet name, "A1") -> value`` for every formula cell, every cell of an array/spill
        range included: ``float``, ``str``, ``bool``, ``None`` (blank) or an error code string
        (``"#NUM!"``, ``"#VALUE!"``, ``"#N/A"``, ...).

    Raises
    ------
    EngineError
        When any formula cannot be evaluated faithfully (unsupported or unreliable function,
        reference to another workbook, an internal failure); the message lists the cells.
    safety.UnsafeFileError, FileNotFoundError
        When the file is refused (see :mod:`errdist.workbook.safety`).
    """
    ev = evaluate_details(path)
    if ev.problems:
        raise EngineError(ev.problems)
    return ev.values
