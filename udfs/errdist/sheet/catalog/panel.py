"""Catalog entries of many series at once: the panel's worksheet view."""

from __future__ import annotations

from typing import Any

import numpy as np

from errdist.sheet.cells import sheet_error
from errdist.sheet.entry import Entry, data_range, flag, number, text

__all__ = ["ENTRIES"]

_EXAMPLE_BLOCK = [
    [0.0123, -0.0031],
    [-0.0089, 0.0044],
    [0.0031, None],
    [None, -0.0102],
    [-0.0245, 0.0057],
    [0.0067, -0.0018],
    [0.0154, 0.0129],
    [-0.0012, -0.0066],
    [0.0078, 0.0023],
    [-0.0301, -0.0149],
]


def _panel_table(data: np.ndarray, confidence: float, method: str, header: bool) -> list[list[Any]]:
    from errdist.panel.columns import fit_columns

    frame = fit_columns(data, confidence, method)
    rows: list[list[Any]] = []
    for rec in frame.itertuples(index=False):
        if rec.error is not None:
            err = sheet_error(rec.error)
            rows.append([rec.n, *([err] * 5)])
        else:
            rows.append([rec.n, rec.loc, rec.scale, rec.shape, rec.var, rec.es])
    return rows


ENTRIES: tuple[Entry, ...] = (
    Entry(
        name="ERRDIST_PANEL",
        core="errdist.panel.columns:fit_columns",
        call=_panel_table,
        params=(
            data_range(
                "data",
                "Block of returns, one series per column. Blank cells are skipped; text or "
                "error cells are refused.",
                example=_EXAMPLE_BLOCK,
            ),
            number(
                "confidence",
                "VaR and ES confidence as a fraction, e.g. 0.99 (default).",
                example=0.99,
                default=0.99,
                spill=False,
            ),
            text(
                "method",
                'Estimator: "mle" (maximum likelihood, default) or "moments".',
                choices=("mle", "moments"),
                default="mle",
            ),
            flag("header", "TRUE adds a row of labels above the numbers."),
        ),
        result="table",
        header=("n", "loc", "scale", "shape", "VaR", "ES"),
        call_in_wizard=False,
        summary="Fits the error distribution to each column of a block of returns; spills one "
        "row per column: n, loc, scale, shape, one-day VaR and ES (positive losses).",
        notes="Row i describes column i of the block. A column that cannot be fitted (fewer "
        "than 4 numbers, no spread) keeps its row: n, then the reason in the other cells. "
        "The same figures as the errdist panel command; see `docs/panel.md`.",
    ),
)
