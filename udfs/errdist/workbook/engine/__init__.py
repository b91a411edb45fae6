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

The engine is split by stage: :mod:`~errdist.workbook.engine.register` (the worksheet
functions as ``formulas`` functions), :mod:`~errdist.workbook.engine.scan` (reading formulas
before evaluation: omitted arguments, unsupported functions, the archive's sheets),
:mod:`~errdist.workbook.engine.evaluate` (loading, calculating, collecting the values) and
:mod:`~errdist.workbook.engine.results` (what an evaluation returns).
"""

from __future__ import annotations

from errdist.workbook.engine.evaluate import evaluate_details, evaluate_workbook
from errdist.workbook.engine.register import register_functions
from errdist.workbook.engine.results import ERROR_CODES, EngineError, Evaluation, Problem
from errdist.workbook.engine.scan import (
    OMITTED,
    UNRELIABLE_FUNCTIONS,
    VOLATILE_FUNCTIONS,
    formula_problems,
    mark_omitted_arguments,
    sheet_parts,
)

__all__ = [
    "ERROR_CODES",
    "OMITTED",
    "UNRELIABLE_FUNCTIONS",
    "VOLATILE_FUNCTIONS",
    "EngineError",
    "Evaluation",
    "Problem",
    "evaluate_details",
    "evaluate_workbook",
    "formula_problems",
    "mark_omitted_arguments",
    "register_functions",
    "sheet_parts",
]
