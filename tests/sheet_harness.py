"""Replay of xlwings' classic (Windows COM) user-defined-function path, without Excel.

xlwings 0.37.8 runs a worksheet call like this: Excel calls the VBA wrapper that xlwings
generated; the wrapper calls ``XLPy.CallUDF(module, name, Array(args...), ...)``; on the
Python side ``xlwings.udfs.call_udf`` converts each argument with the options of the
function's ``@xw.arg`` decorations (``conversion.read`` on a range object or on a literal
value), calls the function, and converts the result with ``conversion.write``; pywin32 hands
the nested list back to Excel.

This module imports the real ``xlwings.udfs`` (with stub ``pythoncom``, ``pywintypes`` and
``win32com`` modules, which exist only on Windows) and runs the real ``call_udf`` and
``generate_vba_wrapper``. What stands in for Windows:

- a stand-in for ``xlwings._xlwindows`` whose value cleaning (``clean_value_data``,
  ``prepare_xl_data_element``, the table of error codes) is xlwings' own source, lifted from
  ``_xlwindows.py`` with :mod:`ast` and executed - not a re-implementation;
- :class:`ComRange`, a range object whose ``.Value`` follows the COM reading rules: a single
  cell gives a scalar, several cells a tuple of row tuples; numbers are floats, text ``str``,
  blanks ``None``, TRUE/FALSE ``bool``, error values the ``VT_ERROR`` codes
  (``-2146826246`` for ``#N/A``);
- :func:`vba_value`, the rules for literal arguments: an omitted optional argument arrives as
  ``-2147352572`` (``DISP_E_PARAMNOTFOUND``), an error literal as its code;
- :func:`excel_cells`, the rules for writing the result back: ``""`` (what xlwings writes
  for None and NaN) shows as a blank cell.

Use :func:`replay` for a context with everything installed; the stubs are removed from
``sys.modules`` again on exit.
"""

from __future__ import annotations

import ast
import contextlib
import datetime as dt
import importlib
import io
import sys
import types
from collections.abc import Iterator, Sequence
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd
import xlwings

XLWINGS_DIR = Path(xlwings.__file__).parent
MISSING_ARG = -2147352572  # DISP_E_PARAMNOTFOUND: what VBA passes for an omitted Optional
ERROR_CODES = {  # VT_ERROR codes, as in the worksheet (from xlwings' _xlwindows.cell_errors)
    "#DIV/0!": -2146826281,
    "#N/A": -2146826246,
    "#NAME?": -2146826259,
    "#NULL!": -2146826288,
    "#NUM!": -2146826252,
    "#REF!": -2146826265,
    "#VALUE!": -2146826273,
}
REPLAY_MODULE = "errdist_xlwings_replay"


class ErrorValue:
    """A worksheet error value (``ErrorValue("#N/A")``) as a cell content or a literal."""

    def __init__(self, text: str) -> None:
        self.text = text
        self.code = ERROR_CODES[text]

    def __repr__(self) -> str:
        return f"ErrorValue({self.text!r})"


class Missing:
    """An omitted optional argument, e.g. ``=ERRDIST_FIT(A1:A9,,TRUE)``."""


def com_cell(value: Any) -> Any:
    """A cell's content as COM's ``Range.Value`` reports it."""
    if isinstance(value, ErrorValue):
        return value.code
    if value is None or isinstance(value, (str, bool, dt.datetime)):
        return value
    if isinstance(value, float) and value != value:
        raise ValueError("a worksheet cell cannot hold NaN")
    return float(value)


class ComRange:
    """A worksheet range passed to a UDF (stands for the COM ``Range`` object)."""

    def __init__(self, rows: Sequence[Sequence[Any]] | np.ndarray) -> None:
        if isinstance(rows, np.ndarray):
            rows = rows.tolist()
        self.rows = [list(r) for r in rows]
        if not self.rows or any(len(r) != len(self.rows[0]) for r in self.rows):
            raise ValueError("a range is a non-empty rectangle")

    @property
    def Value(self) -> Any:  # noqa: N802 - the COM property name
        if len(self.rows) == 1 and len(self.rows[0]) == 1:
            return com_cell(self.rows[0][0])
        return tuple(tuple(com_cell(v) for v in row) for row in self.rows)

    @property
    def shape(self) -> tuple[int, int]:
        return len(self.rows), len(self.rows[0])


def column(values: Sequence[Any]) -> ComRange:
    """A one-column range."""
    return ComRange([[v] for v in values])


def vba_value(arg: Any) -> Any:
    """An argument as the VBA wrapper's ``Array(...)`` hands it to Python."""
    if isinstance(arg, ComRange):
        return arg
    if isinstance(arg, Missing) or arg is Missing:
        return MISSING_ARG
    if isinstance(arg, ErrorValue):
        return arg.code
    if isinstance(arg, (list, tuple)):  # an array constant {1,2;3,4}
        return tuple(tuple(com_cell(v) for v in row) for row in arg)
    return com_cell(arg)


def excel_cells(xl_result: Any) -> list[list[Any]]:
    """What the cells show after xlwings' result goes back (``""`` shows as blank)."""
    rows = xl_result if isinstance(xl_result, list) else [[xl_result]]
    return [[None if v == "" and isinstance(v, str) else v for v in row] for row in rows]


# --------------------------------------------------------------------------- stubs


def _windows_cleaning_namespace() -> dict[str, Any]:
    """Execute xlwings' own Windows value-cleaning code (from _xlwindows.py) on Linux."""
    source = (XLWINGS_DIR / "_xlwindows.py").read_text(encoding="utf-8")
    tree = ast.parse(source)
    wanted_functions = {
        "_clean_value_data_element",
        "_com_time_to_datetime",
        "_datetime_to_com_time",
    }
    wanted_assigns = {"cell_errors", "time_types"}
    body: list[ast.stmt] = []
    for node in tree.body:
        if isinstance(node, ast.FunctionDef) and node.name in wanted_functions:
            body.append(node)
        elif isinstance(node, ast.ClassDef) and node.name == "Engine":
            body.append(node)
        elif isinstance(node, ast.Assign) and any(
            isinstance(t, ast.Name) and t.id in wanted_assigns for t in node.targets
        ):
            body.append(node)
    found = {getattr(n, "name", None) for n in body} | {
        t.id for n in body if isinstance(n, ast.Assign) for t in n.targets
    }
    missing = (wanted_functions | wanted_assigns | {"Engine"}) - found
    if missing:
        raise RuntimeError(f"xlwings' _xlwindows.py no longer defines {sorted(missing)}")
    module = ast.Module(body=body, type_ignores=[])
    namespace: dict[str, Any] = {
        "dt": dt,
        "np": np,
        "pd": pd,
        "pywintypes": sys.modules["pywintypes"],
        "win32timezone": types.SimpleNamespace(
            TimeZoneInfo=types.SimpleNamespace(utc=lambda: dt.timezone.utc)
        ),
        "base_classes": None,
        "Apps": None,
    }
    exec(compile(module, str(XLWINGS_DIR / "_xlwindows.py"), "exec"), namespace)  # noqa: S102
    return namespace


def _stub_modules() -> dict[str, types.ModuleType]:
    pythoncom = types.ModuleType("pythoncom")
    pythoncom.CoInitialize = lambda: None  # type: ignore[attr-defined]
    pythoncom.IID_IDispatch = object()  # type: ignore[attr-defined]

    pywintypes = types.ModuleType("pywintypes")

    class com_error(Exception):  # noqa: N801 - pywin32's name
        pass

    pywintypes.com_error = com_error  # type: ignore[attr-defined]
    pywintypes.TimeType = dt.datetime  # type: ignore[attr-defined]
    pywintypes.IID = lambda s: s  # type: ignore[attr-defined]

    win32com = types.ModuleType("win32com")
    client = types.ModuleType("win32com.client")

    def Dispatch(obj: Any, *a: Any, **k: Any) -> Any:  # noqa: N802 - pywin32's name
        return obj

    client.Dispatch = Dispatch  # type: ignore[attr-defined]
    win32com.client = client  # type: ignore[attr-defined]
    com_server = types.ModuleType("xlwings.com_server")
    com_server.loop = None  # type: ignore[attr-defined]
    return {
        "pythoncom": pythoncom,
        "pywintypes": pywintypes,
        "win32com": win32com,
        "win32com.client": client,
        "xlwings.com_server": com_server,
    }


def _fake_xlwindows(cleaning: dict[str, Any]) -> types.ModuleType:
    engine_cls = cleaning["Engine"]
    engine = engine_cls()

    class _App:
        pass

    class _Book:
        pass

    class _Sheet:
        pass

    app, book, sheet = _App(), _Book(), _Sheet()
    app.engine = engine  # type: ignore[attr-defined]
    app.pid = 4242  # type: ignore[attr-defined]
    book.app = app  # type: ignore[attr-defined]
    sheet.book = book  # type: ignore[attr-defined]

    class Range:
        """Stand-in for ``xlwings._xlwindows.Range`` around a :class:`ComRange`."""

        max_cells_per_read = None
        max_cells_per_write = None

        def __init__(self, xl: Any = None) -> None:
            self.xl = xl
            self.options: dict[str, Any] = {}
            self.sheet = sheet

        @property
        def raw_value(self) -> Any:
            return self.xl.Value if self.xl is not None else None

        @property
        def api(self) -> Any:
            return self.xl

    module = types.ModuleType("xlwings._xlwindows")
    module.Range = Range  # type: ignore[attr-defined]
    module.is_range_instance = lambda x: isinstance(x, ComRange)  # type: ignore[attr-defined]
    module.engine = engine  # type: ignore[attr-defined]
    module.cell_errors = cleaning["cell_errors"]  # type: ignore[attr-defined]
    module.BOOK_CALLER = None  # type: ignore[attr-defined]
    return module


class Replay:
    """Handle returned by :func:`replay`."""

    def __init__(self, udfs: types.ModuleType, module: types.ModuleType) -> None:
        self.udfs = udfs
        self.module = module
        self.module_name = module.__name__

    def call(self, name: str, *args: Any) -> Any:
        """Raw ``call_udf`` result (a list of rows) for worksheet arguments ``args``."""
        vba_args = tuple(vba_value(a) for a in args)
        return self.udfs.call_udf(self.module_name, name, vba_args, None, None)

    def cells(self, name: str, *args: Any) -> list[list[Any]]:
        """What the spilled cells show for ``=name(args...)``."""
        return excel_cells(self.call(name, *args))

    def vba(self, name: str | None = None, workbook_name: str = "Book1.xlsm") -> str:
        """xlwings' own VBA wrapper text for the module (or one function of it)."""
        out = io.StringIO()
        book = types.SimpleNamespace(Name=workbook_name)
        module = self.module
        if name is not None:
            module = types.SimpleNamespace(**{name: getattr(self.module, name)})
        self.udfs.generate_vba_wrapper("errdist.sheet.xlwings_udfs", module, out, book)
        return out.getvalue()


@contextlib.contextmanager
def replay() -> Iterator[Replay]:
    """Install the stand-ins, import ``xlwings.udfs`` and decorate errdist's functions."""
    saved = {k: sys.modules.get(k) for k in (*_stub_modules(), "xlwings._xlwindows")}
    saved_udfs = sys.modules.pop("xlwings.udfs", None)
    stubs = _stub_modules()
    sys.modules.update(stubs)
    engine_added = False
    try:
        cleaning = _windows_cleaning_namespace()
        fake = _fake_xlwindows(cleaning)
        sys.modules["xlwings._xlwindows"] = fake
        xlwings._xlwindows = fake  # type: ignore[attr-defined]
        engines = xlwings.engines
        if "excel" not in engines.engines_by_name:
            engines.add(xlwings.main.Engine(impl=fake.engine))
            engine_added = True
        udfs = importlib.import_module("xlwings.udfs")

        from errdist.sheet.udfs import build

        module = types.ModuleType(REPLAY_MODULE)
        module.__file__ = str(Path(__file__).with_name("__no_such_file__.py"))
        for fname, fn in build(udfs.xlfunc, udfs.xlarg, udfs.xlret).items():
            setattr(module, fname, fn)
        sys.modules[REPLAY_MODULE] = module
        udfs.udf_modules.pop(REPLAY_MODULE, None)
        yield Replay(udfs, module)
    finally:
        sys.modules.pop(REPLAY_MODULE, None)
        sys.modules.pop("xlwings.udfs", None)
        if saved_udfs is not None:
            sys.modules["xlwings.udfs"] = saved_udfs
        for key, value in saved.items():
            if value is None:
                sys.modules.pop(key, None)
            else:
                sys.modules[key] = value
        if hasattr(xlwings, "_xlwindows") and saved.get("xlwings._xlwindows") is None:
            with contextlib.suppress(AttributeError):
                delattr(xlwings, "_xlwindows")
        if engine_added:
            engines = xlwings.engines
            eng = engines.engines_by_name.pop("excel", None)
            if eng is not None and eng in engines.engines:
                engines.engines.remove(eng)
