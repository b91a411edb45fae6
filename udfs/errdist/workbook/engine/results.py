"""What one evaluation of a workbook returns: values, problems, and the error raised."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

__all__ = ["ERROR_CODES", "EngineError", "Evaluation", "Problem"]

ERROR_CODES = ("#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#N/A")
"""Spreadsheet error values, as strings."""


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
