"""Pieces the catalog's subject modules share: parameter descriptions, examples, checks.

Nothing here is a worksheet function; the subject modules (law, estimate, data, risk, checks)
build their entries from these.
"""

from __future__ import annotations

import math

from errdist.sheet.cells import SheetError
from errdist.sheet.entry import Param, number

__all__ = [
    "CONFIDENCE_DOC",
    "DATA_DOC",
    "EXAMPLE_DATA",
    "LOC_DOC",
    "MAX_ROWS",
    "SCALE_DOC",
    "SHAPE_DOC",
    "law_params",
    "loc_param",
    "scale_param",
    "shape_param",
    "whole_number",
]

LOC_DOC = "Location m: the centre (mean and median) of the law, in the units of the data."
SCALE_DOC = (
    "Scale a > 0, in the units of the data. For shape 2 the standard deviation is a/sqrt(2)."
)
SHAPE_DOC = "Shape b > 0: 2 is the normal law, 1 the Laplace law; below 2 the tails are heavier."
DATA_DOC = (
    "Range of numbers (e.g. returns). Blank cells are skipped; text or error cells are refused."
)
CONFIDENCE_DOC = "Confidence as a fraction strictly between 0 and 1, e.g. 0.99 for 99%."


def loc_param(example: float = 0.0, *, spill: bool = True) -> Param:
    return number("loc", LOC_DOC, example=example, spill=spill)


def scale_param(example: float = 1.0, *, spill: bool = True) -> Param:
    return number("scale", SCALE_DOC, example=example, spill=spill)


def shape_param(example: float = 1.5, *, spill: bool = True) -> Param:
    return number("shape", SHAPE_DOC, example=example, spill=spill)


def law_params(
    loc: float = 0.0, scale: float = 1.0, shape: float = 1.5, *, spill: bool = True
) -> tuple[Param, Param, Param]:
    """The law's parameters ``loc, scale, shape`` with these examples."""
    return (
        loc_param(loc, spill=spill),
        scale_param(scale, spill=spill),
        shape_param(shape, spill=spill),
    )


EXAMPLE_DATA = [
    [0.0123],
    [-0.0089],
    [0.0031],
    [None],
    [-0.0245],
    [0.0067],
    [0.0154],
    [-0.0012],
    [0.0078],
    [-0.0301],
    [0.0019],
    [0.0042],
]


def whole_number(value: float, name: str, low: int, high: int) -> int:
    """``value`` as an int, refused (#NUM!) unless a whole number in [low, high]."""
    if not math.isfinite(value) or value != math.floor(value):
        raise SheetError("#NUM!", f"{name} must be a whole number, got {value:g}")
    if not low <= value <= high:
        raise SheetError("#NUM!", f"{name} must be between {low} and {high}, got {value:g}")
    return int(value)


MAX_ROWS = 1_048_576
"""Rows of a worksheet."""
