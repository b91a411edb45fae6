"""Small layout helpers the sheet modules share: page headings and result-table formats.

The catalog functions return labelled tables (label / value rows, or a header row over
columns); these helpers give each result cell its number format from its row label or column
header, a true/false value always ``bool`` and text none.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np

from errdist.workbook.layout import SheetPlan

__all__ = ["column_fmts", "heading", "label_value_fmts", "value_fmt"]


def value_fmt(value: object, fmt: str) -> str:
    """The format of one result cell: ``bool`` for a true/false value, else ``fmt``.

    Text keeps the default (left) alignment whatever number format its row has.
    """
    return "bool" if isinstance(value, (bool, np.bool_)) else fmt


def label_value_fmts(
    rows: Sequence[Sequence[object]], fmts: Mapping[str, str], head_rows: int = 0
) -> list[list[str]]:
    """Cell formats of a label / value table: labels plain, each value by its row's label."""
    out: list[list[str]] = []
    for i, row in enumerate(rows):
        if i < head_rows:
            out.append(["head"] + ["head_r"] * (len(row) - 1))
            continue
        label = str(row[0])
        out.append([""] + [value_fmt(v, fmts.get(label, "gen")) for v in row[1:]])
    return out


def column_fmts(rows: Sequence[Sequence[object]], fmts: Mapping[str, str]) -> list[list[str]]:
    """Cell formats of a table with a header row: each column by its header."""
    heads = [str(h) for h in rows[0]]
    out = [["head"] + ["head_r"] * (len(heads) - 1)]
    for row in rows[1:]:
        out.append(
            ["" if j == 0 else value_fmt(v, fmts.get(heads[j], "gen")) for j, v in enumerate(row)]
        )
    return out


def heading(sp: SheetPlan, title: str, subtitle: str) -> None:
    """The title (A1) and subtitle (A2) of a sheet."""
    sp.text("A1", title, "title")
    sp.text("A2", subtitle, "subtitle")
