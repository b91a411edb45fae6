"""Sample statistics against LibreOffice Calc's own KURT, SKEW, STDEV.S, MEDIAN, AVERAGE.

LibreOffice is an independent spreadsheet engine: a small workbook with the data and the
built-in formulas is recalculated there through UNO (``tests/uno_crosscheck.py``, run with
the system Python that has python3-uno) and every result is read back as a full double.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import numpy as np
import pytest

from errdist.estimate import (
    sample_excess_kurtosis,
    sample_mean,
    sample_median,
    sample_skewness,
    sample_std,
)

pytestmark = pytest.mark.libreoffice

FORMULAS = {
    "KURT": sample_excess_kurtosis,
    "SKEW": sample_skewness,
    "STDEV.S": sample_std,
    "MEDIAN": sample_median,
    "AVERAGE": sample_mean,
}


def _samples() -> list[list[float]]:
    """Data rounded to 15 significant digits, so the numbers stored in the .xlsx are exact."""
    rng = np.random.default_rng(20261202)
    raw = [
        [3, 4, 5, 2, 3, 4, 5, 6, 4, 7],  # the vendor's KURT help example
        list(rng.standard_t(3, size=61) * 0.013 + 0.0004),
        list(rng.laplace(size=250) * 0.01),
        list(rng.normal(100.0, 0.5, size=37)),  # large mean, small spread
    ]
    return [[float(f"{v:.15g}") for v in data] for data in raw]


def test_sample_statistics_match_libreoffice(tmp_path: Path, libreoffice: Any) -> None:
    xlsxwriter = pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")

    samples = _samples()
    book = tmp_path / "stats.xlsx"
    wb = xlsxwriter.Workbook(str(book), {"use_future_functions": True})
    ws = wb.add_worksheet("Data")
    reads = []
    for col, data in enumerate(samples):
        letter = chr(ord("A") + col)
        for row, v in enumerate(data):
            ws.write_number(row, col, float(v))
        for k, name in enumerate(FORMULAS):
            ws.write_formula(300 + k, col, f"={name}({letter}1:{letter}{len(data)})")
            reads.append(["Data", f"{letter}{301 + k}"])
    wb.close()
    job = {
        "book": str(book),
        "profile": str(tmp_path / "profile"),
        "writes": [],
        "reads": reads,
        "out": str(tmp_path / "result.json"),
    }
    values = {a1: (kind, v) for _, a1, kind, v in libreoffice(job, tmp_path)["values"]}
    for col, data in enumerate(samples):
        letter = chr(ord("A") + col)
        for k, (name, ours) in enumerate(FORMULAS.items()):
            kind, lo = values[f"{letter}{301 + k}"]
            assert kind == "value", (name, col, kind, lo)
            # Reference: LibreOffice Calc's built-in worksheet function of the same name
            # (agreement is to the last bit or so, except SKEW/KURT of data with a large mean
            # and small spread, where the engines' summation orders differ near 1e-13)
            assert ours(data) == pytest.approx(lo, rel=1e-12, abs=1e-14), (name, col)
    kind, kurt_help = values["A301"]
    # Vendor's KURT help page value for 3,4,5,2,3,4,5,6,4,7
    assert kurt_help == pytest.approx(-0.151799637, abs=5e-10)
