"""THE catalog of errdist's worksheet functions.

One :class:`~errdist.sheet.entry.Entry` per worksheet function: its name, the core callable,
its parameters (name, kind ``number | range | text | flag``, default, description of at most
255 characters, a valid example), the shape of its result, a summary of at most 255
characters and the category "Error distribution". Everything else is derived from this table,
never typed twice:

- ``errdist.sheet.xlwings_udfs`` - the xlwings functions with real signatures and
  ``@xw.func`` / ``@xw.arg`` / ``@xw.ret`` decorations (built by :mod:`errdist.sheet.udfs`);
- ``errdist vba`` - the VBA module text for manual import (:mod:`errdist.sheet.vba`);
- ``docs/functions.md`` - the function reference (``python -m errdist.sheet.docs``);
- :func:`evaluate` - the registry the headless workbook engine calls;
- the harness, bad-input and fuzz tests, which are parametrised over :data:`CATALOG`.

The entries live in one module per subject, assembled here in this order into the ONE
ordered :data:`CATALOG`: :mod:`~errdist.sheet.catalog.law` (density, probabilities, quantiles,
draws, moments, solvers), :mod:`~errdist.sheet.catalog.estimate` (fits),
:mod:`~errdist.sheet.catalog.data` (returns), :mod:`~errdist.sheet.catalog.about` (versions),
:mod:`~errdist.sheet.catalog.risk` (VaR, ES), :mod:`~errdist.sheet.catalog.checks`
(backtests, goodness of fit, rival laws, chart points), :mod:`~errdist.sheet.catalog.skewed`
(the skewed error law), :mod:`~errdist.sheet.catalog.conditional` (conditional volatility
models, rolling forecasts, the ES backtest) and :mod:`~errdist.sheet.catalog.panel` (many
series: one row per column). Shared parameter descriptions and
examples are in :mod:`~errdist.sheet.catalog.shared`.

Adding a worksheet function
---------------------------
Write the core function first (in the module that holds its subject). Then add ONE entry at
the end of ``ENTRIES`` in the catalog module of the same subject (a new subject: a new module
with its ``ENTRIES``, listed in :data:`SUBJECTS`)::

    Entry(
        name="ERRDIST_MYFUNC",
        core="errdist.mymodule:my_function",     # or the callable itself
        params=(
            number("x", "Where to evaluate ...", example=0.5),
            number("scale", "Scale a > 0 ...", example=1.0),
            flag("upper", "TRUE gives ...", default=False),
        ),
        result="spill",           # "scalar" | "spill" | "table" | "column"
        summary="One sentence for the function wizard.",
        # call=_adapter,          # only when the core is not called as core(*args)
        # header=("a", "b"),      # tables: labels shown when the `header` flag is TRUE
        # vectorized=False,       # when the core takes scalars only
    ),

Rules the tests enforce for every entry: the name starts with ``ERRDIST_``; descriptions and
summary are at most 255 characters; every parameter has a valid ``example`` (the harness calls
the function with the examples, and the bad-input matrix replaces one example at a time);
optional parameters come last; number parameters of a non-``spill`` entry are ``spill=False``.
Then run ``python -m errdist.sheet.docs`` to regenerate ``docs/functions.md``. Nothing else
needs editing: xlwings functions, VBA wrappers, the engine registry and the tests pick the
entry up by themselves.

The helpers beside each subject's entries (``_cdf``, ``_fit_row``...) adapt converted cell
arguments to the core's signatures; they hold no statistics.
"""

from __future__ import annotations

from types import ModuleType
from typing import Any

from errdist.sheet.catalog import (
    about,
    checks,
    conditional,
    data,
    estimate,
    law,
    panel,
    risk,
    skewed,
)
from errdist.sheet.cells import SheetError
from errdist.sheet.entry import (
    CATEGORY,
    MISSING,
    REQUIRED,
    Entry,
    Param,
    data_range,
    flag,
    number,
    text,
)

__all__ = [
    "CATALOG",
    "CATEGORY",
    "MISSING",
    "REQUIRED",
    "SUBJECTS",
    "Entry",
    "Param",
    "SheetError",
    "add",
    "data_range",
    "evaluate",
    "flag",
    "get",
    "names",
    "number",
    "text",
]

SUBJECTS: tuple[ModuleType, ...] = (
    law,
    estimate,
    data,
    about,
    risk,
    checks,
    skewed,
    conditional,
    panel,
)
"""The catalog modules, in the order of the function reference."""

#: Name -> entry, in the order of the function reference.
CATALOG: dict[str, Entry] = {}


def add(entry: Entry) -> Entry:
    """Add ``entry`` to :data:`CATALOG` (names are unique)."""
    if entry.name in CATALOG:
        raise ValueError(f"{entry.name} is already in the catalog")
    CATALOG[entry.name] = entry
    return entry


def get(name: str) -> Entry:
    """The entry of worksheet function ``name`` (case-insensitive)."""
    try:
        return CATALOG[name.upper()]
    except KeyError:
        raise SheetError("#VALUE!", f"unknown function {name}") from None


def names() -> list[str]:
    """The worksheet function names, in catalog order."""
    return list(CATALOG)


def evaluate(name: str, *cell_args: Any) -> Any:
    """Evaluate worksheet function ``name`` on cell values, as the headless engine does.

    Parameters
    ----------
    name : str
        ``"ERRDIST_PDF"`` etc. (case-insensitive).
    *cell_args
        Cell values as the engine hands them over: scalars (float, int, str, bool, None for a
        blank), 2-D lists or numpy arrays for ranges, error values as ``'#N/A'``-style texts;
        :data:`MISSING` (or fewer arguments) for omitted optional arguments.

    Returns
    -------
    scalar or list of rows
        NaN results are ``None`` (a blank cell). A spill in which single cells are out of
        their domain holds :class:`SheetError` objects in those cells.

    Raises
    ------
    SheetError
        The call as a whole fails; ``code`` is ``"#NUM!"``, ``"#VALUE!"`` or ``"#N/A"``.
    """
    return get(name).evaluate(cell_args)


for _subject in SUBJECTS:
    for _entry in _subject.ENTRIES:
        add(_entry)
del _subject, _entry
