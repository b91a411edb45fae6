"""Build the xlwings functions from the catalog: real signatures, xlwings decorations.

Each catalog entry becomes a plain Python function with the entry's name, its parameters as
real positional parameters (optional ones with their defaults) and the summary as its
docstring, generated as source so that :func:`inspect.signature` - which xlwings uses to write
the VBA wrappers - sees exactly the worksheet signature. The functions are then decorated with
the decorators passed in (``xlwings.func``, ``xlwings.arg``, ``xlwings.ret`` in production;
``xlwings.udfs.xlfunc``/``xlarg``/``xlret`` in the harness):

- ``func(category=..., volatile=..., call_in_wizard=...)``;
- ``arg(name, doc=..., **ARG_OPTIONS[kind])`` per parameter: ranges arrive as lists of rows
  (``ndim=2``) so a column keeps its orientation, and error cells arrive as ``'#N/A'``-style
  texts (``err_to_str=True``) instead of the blank xlwings would otherwise make of them;
- ``ret()``: the default value conversion; a returned list of rows spills on dynamic-array
  Excel.

The body of every function calls :func:`xl_call`, which never raises: a failure comes back as
the coded text (``"#NUM! shape must be > 0, got 0"``).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from typing import Any

from errdist.sheet import cells
from errdist.sheet.cells import SheetError
from errdist.sheet.entry import Entry

__all__ = ["ARG_OPTIONS", "RET_OPTIONS", "build", "make_function", "xl_call", "xl_options"]

#: xlwings conversion options per parameter kind.
ARG_OPTIONS: dict[str, dict[str, Any]] = {
    "number": {"ndim": 2, "err_to_str": True},
    "range": {"ndim": 2, "err_to_str": True},
    "text": {"err_to_str": True},
    "flag": {"err_to_str": True},
}
#: xlwings conversion options of every result.
RET_OPTIONS: dict[str, Any] = {}

Decorator = Callable[..., Callable[[Callable[..., Any]], Callable[..., Any]]]


def xl_call(entry: Entry, args: tuple[Any, ...]) -> Any:
    """Evaluate ``entry`` on cell arguments for xlwings; failures become coded texts."""
    try:
        return cells.to_xlwings(entry.evaluate(args))
    except SheetError as exc:
        return exc.text
    except Exception as exc:  # never a traceback in a cell
        return cells.sheet_error(exc).text


def xl_options(entry: Entry) -> dict[str, Any]:
    """The keyword arguments of ``xlwings.func`` for ``entry``."""
    return {
        "category": entry.category,
        "volatile": entry.volatile,
        "call_in_wizard": entry.call_in_wizard,
    }


def _fast_checks(entry: Entry) -> list[str] | None:
    """Type tests under which the plain-float fast path applies, or None (no fast path)."""
    if entry.result not in ("spill", "scalar") or not entry.params:
        return None
    checks = []
    for p in entry.params:
        if p.kind == "number":
            checks.append(f"type({p.name}) is _float")
        elif p.kind == "flag":
            checks.append(f"type({p.name}) is _bool")
        else:
            return None
    return checks


def _source(entry: Entry) -> str:
    sig = []
    for i, p in enumerate(entry.params):
        sig.append(f"{p.name}=_d{i}" if p.optional else p.name)
    names = ", ".join(p.name for p in entry.params)
    call_args = f"({names},)" if entry.params else "()"
    lines = [f"def {entry.name}({', '.join(sig)}):"]
    checks = _fast_checks(entry)
    if checks:
        # Plain floats (a Python caller, or single cells): call the core directly and keep
        # a finite float result; anything else takes the full path, which also words errors.
        lines += [
            f"    if {' and '.join(checks)}:",
            "        try:",
            f"            r = _fast({names})",
            "        except Exception:",
            "            pass",
            "        else:",
            "            if type(r) is _float and r - r == 0.0:",
            "                return r",
        ]
    lines.append(f"    return _xl_call(_entry, {call_args})")
    return "\n".join(lines) + "\n"


def _fast_callable(entry: Entry) -> Callable[..., Any]:
    if entry.call is not None:
        return entry.call
    try:
        return entry.function
    except (ImportError, AttributeError) as exc:  # reported by the full path, in the cell
        message = f"{entry.core_name} is not available: {exc}"

        def unavailable(*_: Any) -> Any:
            raise RuntimeError(message)

        return unavailable


def make_function(entry: Entry) -> Callable[..., Any]:
    """The undecorated Python function of ``entry`` (real signature, summary as docstring)."""
    namespace: dict[str, Any] = {
        "_xl_call": xl_call,
        "_entry": entry,
        "_fast": _fast_callable(entry),
        "_float": float,
        "_bool": bool,
    }
    for i, p in enumerate(entry.params):
        if p.optional:
            namespace[f"_d{i}"] = p.default
    code = compile(_source(entry), f"<errdist.sheet.udfs:{entry.name}>", "exec")
    exec(code, namespace)  # noqa: S102 - source built from validated identifiers only
    fn = namespace[entry.name]
    fn.__doc__ = entry.summary
    fn.__module__ = "errdist.sheet.xlwings_udfs"
    fn.__qualname__ = entry.name
    fn.__errdist_entry__ = entry
    return fn


def build(
    func: Decorator | None = None,
    arg: Decorator | None = None,
    ret: Decorator | None = None,
    *,
    entries: Iterable[Entry] | None = None,
) -> dict[str, Callable[..., Any]]:
    """Name -> decorated function for every catalog entry (or the given ``entries``)."""
    if entries is None:
        from errdist.sheet.catalog import CATALOG

        entries = CATALOG.values()
    out: dict[str, Callable[..., Any]] = {}
    for entry in entries:
        fn = make_function(entry)
        if arg is not None:
            for p in entry.params:
                fn = arg(p.name, doc=p.doc, **ARG_OPTIONS[p.kind])(fn)
        if ret is not None:
            fn = ret(**RET_OPTIONS)(fn)
        if func is not None:
            fn = func(**xl_options(entry))(fn)
        out[entry.name] = fn
    return out
