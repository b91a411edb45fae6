"""The worksheet functions as ``formulas`` functions: argument and result conversion.

:func:`register_functions` wraps every catalog entry so that the engine hands it cell values
the way the add-in does, and turns what it returns (or raises) into engine values and real
spreadsheet errors. While :func:`~errdist.workbook.engine.evaluate.evaluate_details` runs, the
error messages and unexpected failures of these calls are collected in :data:`CAPTURE`.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from typing import Any

import numpy as np

from errdist.workbook.engine.results import ERROR_CODES
from errdist.workbook.engine.scan import OMITTED

__all__ = ["CAPTURE", "register_functions"]


@dataclass
class _Capture:
    """Where the cell functions report, during one evaluation (None: not collecting)."""

    messages: list[str] | None = None
    failures: list[str] | None = None


CAPTURE = _Capture()
"""Messages of failed calls and unexpected exceptions of the evaluation in progress."""
_REGISTERED: dict[str, Callable[..., Any]] = {}


def formulas_runtime() -> tuple[Any, Any, Any, Any]:
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
        if CAPTURE.messages is not None:
            CAPTURE.messages.append(
                f"cell of a spilled result: {code} {getattr(value, 'message', value)}"
            )
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
                if CAPTURE.failures is not None:
                    CAPTURE.failures.append(f"{name}: {type(exc).__name__}: {exc}")
            if CAPTURE.messages is not None:
                CAPTURE.messages.append(f"{name}: {code} {message}")
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
    functions, array_cls, error, sh = formulas_runtime()
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
