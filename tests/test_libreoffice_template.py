"""LibreOffice as the outside reference engine for the template's built-in cells and charts.

LibreOffice does not know the ERRDIST_ functions (it shows ``#NAME?`` for them). Through UNO
(``tests/uno_crosscheck.py``, run with the system Python that has python3-uno) a COPY of the
committed template is opened, the Python core's values are written in place of every ERRDIST_
result, ``calculateAll()`` recalculates, and every built-in formula cell is read back as a full
double. Each must equal the headless engine's value (the cached value, which
``tests/test_template.py`` ties to the engine) and the pandas/scipy reference, to 1e-12
relative.

The same run exports the recalculated copy to PDF (LibreOffice's ``calc_pdf_Export`` filter,
the one ``soffice --convert-to pdf`` uses); the chart pages are rendered with ``pdftoppm -r 60``
and must not be blank. The PNGs are kept under ``test-artifacts/libreoffice/`` for a person to
look at.
"""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path
from typing import Any

import numpy as np
import pytest

pytest.importorskip("openpyxl", reason="openpyxl is not installed")

from template_reference import (  # noqa: E402
    Book,
    builtin_expected,
    close,
    core_expected,
    read_book,
)

pytestmark = pytest.mark.libreoffice

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "workbook_template" / "errdist-monthly-risk.xlsx"
ARTIFACTS = ROOT / "test-artifacts" / "libreoffice"
CHART_PAGES = 5


def _a1(r: int, c: int) -> str:
    from openpyxl.utils.cell import get_column_letter

    return f"{get_column_letter(c)}{r}"


@pytest.fixture(scope="module")
def lo_run(tmp_path_factory: pytest.TempPathFactory, libreoffice: Any) -> tuple[Book, dict, Path]:
    """Fill the ERRDIST_ cells of a copy with the core's values, recalculate, read, export."""
    tmp = tmp_path_factory.mktemp("libreoffice")
    book = read_book(TEMPLATE)
    copy = tmp / "template-copy.xlsx"
    shutil.copyfile(TEMPLATE, copy)
    writes, reads = [], []
    for f in book.formulas:
        if f.name.startswith("ERRDIST_"):
            rows = [[_jsonable(v) for v in row] for row in core_expected(book, f)]
            writes.append([f.sheet, f.ref, rows])
        else:
            reads += [[f.sheet, _a1(r, c)] for r, c in f.cells()]
    job = {
        "book": str(copy),
        "profile": str(tmp / "profile"),
        "writes": writes,
        "reads": reads,
        "pdf": str(tmp / "template.pdf"),
        "out": str(tmp / "result.json"),
    }
    return book, libreoffice(job, tmp), tmp / "template.pdf"


def _jsonable(v: object) -> object:
    if v is None:
        return None
    if isinstance(v, (bool, np.bool_)):
        return bool(v)
    if isinstance(v, (int, float, np.integer, np.floating)):
        x = float(v)
        return None if np.isnan(x) else x
    return str(v)


def _lo_value(kind: str, value: object) -> object:
    if kind == "value":
        return float(value)  # type: ignore[arg-type]
    if kind == "text":
        return value
    if kind == "error":
        return float("nan")  # #N/A gaps (NA()) and the like
    return None


def test_builtin_cells_agree_with_libreoffice(lo_run) -> None:
    """Every built-in cell: LibreOffice == headless engine (cached) == pandas/scipy."""
    book, result, _ = lo_run
    values = {(s, a1): _lo_value(kind, v) for s, a1, kind, v in result["values"]}
    assert len(values) > 1000
    expected_by_cell: dict[tuple[str, str], object] = {}
    for f in book.formulas:
        if f.name.startswith("ERRDIST_"):
            continue
        ref = np.asarray(builtin_expected(book, f), dtype=object)
        shape = f.shape
        ref = np.full(shape, ref.item(), dtype=object) if ref.ndim == 0 else ref.reshape(shape)
        for (i, j), want in np.ndenumerate(ref):
            r, c = f.cells()[i * shape[1] + j]
            expected_by_cell[(f.sheet, _a1(r, c))] = (want, f.text)
    bad = []
    for key, lo in values.items():
        want, text = expected_by_cell[key]
        cached = book.values.get(key)
        # Bisection/Newton residuals g(t) ~ 1e-15 of terms ~ 2, and the "relative
        # difference" check cells (=ABS(x-y)/y, ~1e-15), are judged absolutely: LibreOffice
        # rounds the difference of two nearly equal numbers to 0 (its approxSub).
        abs_tol = 1e-13 if "GAMMALN" in text and "-$B$" in text else 0.0
        if text.startswith("=ABS("):
            abs_tol = 1e-13
        if not close(lo, cached, rel=1e-12, abs_tol=abs_tol):
            bad.append((key, text, "LibreOffice", lo, "engine", cached))
        elif not close(lo, want, rel=1e-12, abs_tol=abs_tol):
            bad.append((key, text, "LibreOffice", lo, "pandas/scipy", want))
    assert not bad, f"{len(bad)} cells disagree, first: {bad[:5]}"
    assert result["version"].startswith("LibreOffice")


def _page_texts(pdf: Path) -> list[str]:
    n = int(
        next(
            line.split()[-1]
            for line in subprocess.run(
                ["pdfinfo", str(pdf)], capture_output=True, text=True, check=True
            ).stdout.splitlines()
            if line.startswith("Pages:")
        )
    )
    out = []
    for p in range(1, n + 1):
        t = subprocess.run(
            ["pdftotext", "-f", str(p), "-l", str(p), str(pdf), "-"],
            capture_output=True,
            text=True,
            check=True,
        ).stdout
        out.append(t)
    return out


def _read_ppm(path: Path) -> np.ndarray:
    """A binary PPM (P6) image as an (h, w, 3) uint8 array."""
    data = path.read_bytes()
    parts, pos = [], 0
    while len(parts) < 4:
        while data[pos : pos + 1].isspace():
            pos += 1
        if data[pos : pos + 1] == b"#":
            pos = data.index(b"\n", pos) + 1
            continue
        end = pos
        while not data[end : end + 1].isspace():
            end += 1
        parts.append(data[pos:end])
        pos = end
    assert parts[0] == b"P6", parts[0]
    w, h = int(parts[1]), int(parts[2])
    pixels = np.frombuffer(data[pos + 1 : pos + 1 + w * h * 3], dtype=np.uint8)
    return pixels.reshape(h, w, 3)


def test_chart_pages_are_drawn(lo_run) -> None:
    """The five chart pages exist, are not blank, and show the red fitted/VaR lines."""
    for tool in ("pdftoppm", "pdftotext", "pdfinfo"):
        if shutil.which(tool) is None:
            pytest.skip(f"{tool} (poppler-utils) is not installed")
    _, _, pdf = lo_run
    texts = _page_texts(pdf)
    pages = {}
    for i, t in enumerate(texts, start=1):
        for k in range(1, CHART_PAGES + 1):
            if f"Chart {k} of {CHART_PAGES}" in t:
                pages[k] = i
    assert sorted(pages) == list(range(1, CHART_PAGES + 1)), pages
    assert all("#NAME?" not in texts[p - 1] for p in pages.values())
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    shutil.copyfile(pdf, ARTIFACTS / "template.pdf")
    measures = {}
    for k, p in pages.items():
        stem = ARTIFACTS / f"chart-{k}"
        for fmt in ("-png", None):
            args = ["pdftoppm", "-r", "60", "-f", str(p), "-l", str(p), "-singlefile"]
            args += [fmt] if fmt else []
            subprocess.run([*args, str(pdf), str(stem)], check=True, timeout=60)
        img = _read_ppm(stem.with_suffix(".ppm")).astype(int)
        stem.with_suffix(".ppm").unlink()
        measures[k] = {
            "pdf_page": p,
            "ink": float((img.sum(axis=2) < 600).mean()),  # share of non-white pixels
            "coloured": int(((img.max(axis=2) - img.min(axis=2)) > 60).sum()),
            "red": int(((img[..., 0] > 150) & (img[..., 1] < 90) & (img[..., 2] < 90)).sum()),
        }
    (ARTIFACTS / "chart-measures.json").write_text(json.dumps(measures, indent=1))
    for k, m in measures.items():
        # An empty chart frame (axes, gridlines, legend) has ~0.5% ink and few coloured
        # pixels; a drawn series adds thousands. Every chart draws a red series: the fitted
        # law, the 45° line or the -VaR line.
        assert m["ink"] > 0.01, f"chart {k} looks blank: {m}"
        assert m["coloured"] > 1000, f"chart {k} draws no coloured series: {m}"
        assert m["red"] > 250, f"chart {k} has no red series: {m}"
