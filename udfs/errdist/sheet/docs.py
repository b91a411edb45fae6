"""Write ``docs/functions.md``, the worksheet function reference, from the catalog.

Usage::

    python -m errdist.sheet.docs                 # rewrite docs/functions.md (from the repo root)
    python -m errdist.sheet.docs --check         # exit 1 when the file is stale
    python -m errdist.sheet.docs --out FILE      # write elsewhere

The reference is never edited by hand; a test fails when it differs from :func:`render`.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Any

from errdist.sheet._textfile import replace_text
from errdist.sheet.entry import Entry, Param

__all__ = ["DEFAULT_PATH", "example_formula", "main", "render"]

DEFAULT_PATH = Path("docs") / "functions.md"

_RESULTS = {
    "scalar": "one cell",
    "spill": "one cell when every number argument is a single cell; otherwise a spill in the "
    "broadcast shape of the number ranges (a column of x against a row of shapes gives a table)",
    "table": "a table that spills from the formula cell",
    "column": "a column that spills down from the formula cell",
}
_KINDS = {
    "number": "number or range",
    "range": "data range",
    "text": "text",
    "flag": "TRUE/FALSE",
}

_INTRO = """\
# Worksheet functions

<!-- Generated from udfs/errdist/sheet/catalog/ by `python -m errdist.sheet.docs`.
     Do not edit by hand: a test fails when this file is stale. -->

Every function is in the function wizard's category **{category}**. They work the same in
Excel through the xlwings add-in (see [install.md](install.md)) and in errdist's headless
workbook engine (`errdist check`, `errdist refresh`).

**Naming.** `ERRDIST_VAR` is **Value-at-Risk** (a loss quantile of a position); the
variance of the law is `ERRDIST_VARIANCE`. `ERRDIST_KURT` is the law's excess kurtosis, to
set beside the spreadsheet's `KURT` of the data.

## Conventions

- **Argument order** is always (x, loc, scale, shape), like `NORM.DIST(x, mean, sd, ...)`:
  loc is the centre m, scale a > 0, shape b > 0 (b = 2 the normal law with standard
  deviation a/sqrt(2), b = 1 the Laplace law, smaller b heavier tails).
- **Ranges spill.** Every number argument of a function marked *spill* also accepts a range;
  the result spills in the broadcast shape (numpy rules: a column of x against a row of
  shapes gives a table). A blank cell inside such a range leaves its result cell blank and
  shifts nothing; blank rows at the end (a whole column such as `A:A`) are left out of the
  spill. On Excel without dynamic arrays, select the output range and enter the
  formula with Ctrl+Shift+Enter.
- **Data ranges** (kind *data range*) are read row by row; blank cells are skipped and
  counted; a text, logical or error cell gives `#VALUE!` naming its position
  (`#VALUE! cell 7 of data is text 'n/a'`). Blank rows after the last number (a whole
  column such as `A:A`) are ignored.
- **Errors.** A failed call shows one text that starts with the spreadsheet error code:
  `#NUM!` for a number outside its domain (`#NUM! scale must be > 0, got -1`), `#VALUE!` for
  a value of the wrong kind, `#N/A` for too little data. Through the xlwings add-in these are
  texts (classic xlwings cannot return real error values); the headless engine writes real
  error values. `ISERROR` does not see the texts: test with `LEFT(cell, 1) = "#"`. In a
  spill, an out-of-domain element shows its error in its own cell and the others keep their
  values (spills of up to 10,000 cells; a larger spill shows the one error).
- **Confidence** levels are fractions (0.99), and VaR / Expected Shortfall are positive losses.

## Functions

| Function | Summary |
|---|---|
"""


def _arg_list(entry: Entry) -> str:
    parts = [p.name for p in entry.params if not p.optional]
    optional = [p.name for p in entry.params if p.optional]
    text = ", ".join(parts)
    for name in optional:
        text += f", [{name}]" if text else f"[{name}]"
    return text


def _cell_ref(rows: int, cols: int, first_col: str = "A") -> str:
    last_col = chr(ord(first_col) + cols - 1)
    return f"{first_col}2:{last_col}{rows + 1}"


def _literal(value: Any) -> str:
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, str):
        return '"' + value + '"'
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return repr(value) if isinstance(value, float) else str(value)


def example_formula(entry: Entry) -> str:
    """The entry's example as a worksheet formula (ranges as ``A2:A13``)."""
    args: list[str] = []
    col = "A"
    for p in entry.params:
        v = p.example
        if isinstance(v, (list, tuple)):
            rows = len(v)
            cols = len(v[0]) if rows and isinstance(v[0], (list, tuple)) else 1
            args.append(_cell_ref(rows, cols, col))
            col = chr(ord(col) + cols)
        else:
            args.append(_literal(v))
    while args and entry.params[len(args) - 1].optional:
        p = entry.params[len(args) - 1]
        if p.example != p.default:
            break
        args.pop()
    return f"={entry.name}({', '.join(args)})"


def _default(p: Param) -> str:
    if not p.optional:
        return "required"
    if p.default is None:
        return "omitted"
    return _literal(p.default)


def _kind(p: Param) -> str:
    if p.kind == "number" and not p.spill:
        return "number (single cell)"
    if p.kind == "text" and p.choices:
        return "text: " + " / ".join(f'"{c}"' for c in p.choices)
    return _KINDS[p.kind]


def _escape(text: str) -> str:
    return text.replace("|", "\\|")


def _section(entry: Entry) -> list[str]:
    lines = [
        f"### {entry.name}",
        "",
        f"`{entry.name}({_arg_list(entry)})`",
        "",
        entry.summary,
        "",
    ]
    if entry.params:
        lines += ["| Argument | Kind | Default | Description |", "|---|---|---|---|"]
        for p in entry.params:
            lines.append(f"| `{p.name}` | {_kind(p)} | {_default(p)} | {_escape(p.doc)} |")
        lines.append("")
    result = _RESULTS[entry.result]
    if entry.result == "table" and entry.header:
        labels = ", ".join(entry.header)
        result += f"; with `header` TRUE a first row of labels ({labels})"
    lines += [f"**Result:** {result}.", ""]
    if entry.notes:
        lines += [entry.notes, ""]
    lines += [
        f"**Example:** `{example_formula(entry)}`"
        + (
            " (the ranges hold the catalog's example data)"
            if any(p.kind == "range" for p in entry.params)
            else ""
        ),
        "",
        f"**Core:** `{entry.core_name}`"
        + ("" if entry.vectorized else " (evaluated cell by cell in a spill)")
        + (" · recalculated on every change (volatile)" if entry.volatile else ""),
        "",
    ]
    return lines


def render(entries: Iterable[Entry] | None = None) -> str:
    """The whole reference as Markdown."""
    if entries is None:
        from errdist.sheet.catalog import CATALOG

        entries = list(CATALOG.values())
    entries = list(entries)
    categories = sorted({e.category for e in entries}) or ["Error distribution"]
    out = [_INTRO.format(category=", ".join(categories)).rstrip("\n")]
    for e in entries:
        anchor = e.name.lower()
        out.append(f"| [`{e.name}`](#{anchor}) | {_escape(e.summary)} |")
    out.append("")
    for e in entries:
        out += _section(e)
    return "\n".join(out).rstrip("\n") + "\n"


def _write(path: Path, text: str) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    replace_text(path, text, encoding="utf-8", newline="\n", prefix=".functions-")


def main(argv: Sequence[str] | None = None) -> int:
    """Command line: write (or ``--check``) the function reference."""
    parser = argparse.ArgumentParser(prog="python -m errdist.sheet.docs", description=__doc__)
    parser.add_argument("--out", type=Path, default=DEFAULT_PATH, help="file to write")
    parser.add_argument("--check", action="store_true", help="exit 1 when the file is stale")
    args = parser.parse_args(argv)
    text = render()
    if args.check:
        current = args.out.read_text(encoding="utf-8") if args.out.exists() else ""
        if current != text:
            print(f"{args.out} is stale: run python -m errdist.sheet.docs", file=sys.stderr)
            return 1
        return 0
    _write(args.out, text)
    print(f"wrote {args.out}", file=sys.stderr)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
