"""errdist's worksheet functions for the xlwings add-in (classic, Windows Excel).

Name this module in the xlwings ribbon's "UDF Modules" box (or the ``UDF Modules`` row of an
``xlwings.conf`` sheet) as ``errdist.sheet.xlwings_udfs`` and click "Import Functions". The
functions are built at import from :mod:`errdist.sheet.catalog` by :mod:`errdist.sheet.udfs`,
one per catalog entry, each with its real worksheet signature and its ``@xw.func``,
``@xw.arg`` and ``@xw.ret`` decorations, so xlwings writes the VBA wrappers and Excel's
function wizard shows the descriptions. On platforms where xlwings' decorators are no-ops the
functions are still plain callables (the headless engine uses
:func:`errdist.sheet.catalog.evaluate` instead).
"""

from __future__ import annotations

from typing import Any

import xlwings as xw

from errdist.sheet.udfs import build

_FUNCTIONS = build(xw.func, xw.arg, xw.ret)
globals().update(_FUNCTIONS)

__all__ = sorted(_FUNCTIONS)


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_FUNCTIONS))


def __getattr__(name: str) -> Any:
    try:
        return _FUNCTIONS[name]
    except KeyError:
        raise AttributeError(name) from None
