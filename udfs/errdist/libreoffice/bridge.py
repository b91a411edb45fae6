"""The Python side of the Calc functions: cell values from Basic in, result cells out.

Runs inside LibreOffice's embedded Python. The Basic wrapper of each worksheet function
(:mod:`errdist.libreoffice.basic`) calls the user script written by
:mod:`errdist.libreoffice.install`, which calls :func:`call` with the function's name and its
arguments as Calc handed them to Basic and Basic handed them to UNO:

===============================  ==================================================
argument in the cell formula     value arriving here
===============================  ==================================================
left out / blank                 ``None`` (the wrapper passes Basic ``Empty``)
number, date, TRUE/FALSE         ``float`` (Calc has no separate logical type)
text                             ``str``
range                            tuple of rows (tuples), blanks as ``None``
===============================  ==================================================

The arguments go through the catalog entry's :meth:`~errdist.sheet.entry.Entry.evaluate`,
the same path as every other front end, and the result comes back as a scalar or a tuple of
rows. Failures come back as the same coded texts as in Excel through xlwings
(``"#NUM! shape must be > 0, got 0"``, :mod:`errdist.sheet.cells`): :func:`call` never raises.
A blank result cell is the empty text ``""`` (Basic cannot hand ``Empty`` back inside an
array result).
"""

from __future__ import annotations

from typing import Any

from errdist.sheet import cells
from errdist.sheet.cells import SheetError

__all__ = ["call", "to_basic"]


def _arg(value: Any) -> Any:
    """One argument from UNO as a cell value (ranges as lists of rows)."""
    if isinstance(value, tuple):
        if value and isinstance(value[0], tuple):
            return [list(row) for row in value]
        return [list(value)]
    return value


def _out(value: Any) -> Any:
    if value is None:
        return ""
    if isinstance(value, SheetError):
        return value.text
    if isinstance(value, bool):
        return 1.0 if value else 0.0
    if isinstance(value, (int, float, str)):
        return value
    return str(value)


def to_basic(result: Any) -> Any:
    """Result cells (from :func:`errdist.sheet.cells.to_cells`) as Basic can take them."""
    if isinstance(result, list):
        return tuple(tuple(_out(v) for v in row) for row in result)
    return _out(result)


def call(name: str, args: tuple[Any, ...]) -> Any:
    """Evaluate worksheet function ``name`` on Calc's arguments; failures as coded texts.

    Parameters
    ----------
    name : str
        ``"ERRDIST_CDF"`` etc.
    args : tuple
        The arguments in worksheet order, as described in the module docstring.

    Returns
    -------
    float, str or tuple of tuples
        The result cells; a failure of the whole call is its coded text.
    """
    try:
        from errdist.sheet.catalog import get

        entry = get(name)
        values = [_arg(a) for a in args]
        while values and values[-1] is None:  # trailing omitted arguments
            values.pop()
        return to_basic(entry.evaluate(values))
    except SheetError as exc:
        return exc.text
    except Exception as exc:  # never a traceback in a cell
        return cells.sheet_error(exc).text
