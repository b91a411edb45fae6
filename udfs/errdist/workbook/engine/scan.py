"""Reading formulas before evaluation: omitted arguments, unsupported functions, sheets.

Nothing here runs ``formulas``: the scan decides what the engine may evaluate faithfully and
prepares catalog calls so that an empty argument slot means "not given".
"""

from __future__ import annotations

import os
import re
from collections.abc import Callable
from pathlib import Path

__all__ = [
    "OMITTED",
    "UNRELIABLE_FUNCTIONS",
    "VOLATILE_FUNCTIONS",
    "formula_problems",
    "mark_omitted_arguments",
    "sheet_parts",
]

#: String literal that stands in for an omitted argument of a catalog function. ``formulas``
#: parses ``=ERRDIST_VAR(c,m,a,b,10,,"iid")`` with the empty slot as 0, while the spreadsheet
#: with xlwings passes "not given"; :func:`mark_omitted_arguments` writes this literal into
#: such slots before compiling, and the cell wrapper turns it back into ``None`` (not given).
OMITTED = "__errdist_omitted__"
_OMITTED_LITERAL = f'"{OMITTED}"'
_CATALOG_CALL = re.compile(r"(?:_xludf\.|_xlfn\.)?ERRDIST_[A-Z0-9_]*\s*\(", re.IGNORECASE)

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


def strip_strings(formula: str) -> str:
    """The formula with every string literal emptied (names inside quotes are not calls)."""
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
    body = strip_strings(formula)
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


def dynamic_anchors(path: Path, sheet_parts: dict[str, str]) -> dict[str, set[str]]:
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
