"""``errdist freeze``: the values copy keeps every value, format and chart, and no formula.

The values are checked with openpyxl (an independent reader of the file format): every cell
of the copy equals the live book's stored value, and the copy holds no formula. The rendering
is checked with LibreOffice (no errdist installed in its profile, as a recipient has it): the
live book shows ``#NAME?`` in its spilled ERRDIST_ cells, the copy shows no error text and
draws the four charts. PDF text layer by ``pdftotext``, pages by ``pdftoppm`` (poppler-utils);
the PNGs are kept under ``test-artifacts/libreoffice/`` for a person to look at.
"""

from __future__ import annotations

import shutil
import subprocess
import zipfile
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("openpyxl", reason="openpyxl is not installed")

from openpyxl import load_workbook  # noqa: E402

from errdist.workbook.freeze import freeze_workbook  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "workbook_template" / "errdist-monthly-risk.xlsx"
ARTIFACTS = ROOT / "test-artifacts" / "libreoffice"
# The Guide explains, in words, what a reader without the add-in sees; that sentence is text.
GUIDE_SENTENCE = "show #NAME? as soon"


@pytest.fixture(scope="module")
def frozen(tmp_path_factory: pytest.TempPathFactory) -> Path:
    out = tmp_path_factory.mktemp("frozen") / "frozen.xlsx"
    return freeze_workbook(TEMPLATE, out, date="2026-12-02")


def test_every_value_kept_and_no_formula_left(frozen: Path) -> None:
    live = load_workbook(TEMPLATE, data_only=True)
    copy = load_workbook(frozen, data_only=False)
    assert copy.sheetnames == live.sheetnames
    compared = 0
    for ws in copy.worksheets:
        src = live[ws.title]
        for row in ws.iter_rows():
            for c in row:
                v = c.value
                assert not (isinstance(v, str) and v.startswith("=")), (ws.title, c.coordinate)
                if ws.title == "Guide" and c.coordinate == "A4":
                    continue  # the frozen-copy note
                want = src[c.coordinate].value
                assert (v in (None, "") and want in (None, "")) or v == want, (
                    ws.title,
                    c.coordinate,
                    want,
                    v,
                )
                compared += 1
    assert compared > 40_000
    note = copy["Guide"]["A4"].value
    assert note.startswith("Frozen copy of errdist-monthly-risk.xlsx") and "2026-12-02" in note


def test_formats_charts_and_other_parts_are_copied_unchanged(frozen: Path) -> None:
    with zipfile.ZipFile(TEMPLATE) as a, zipfile.ZipFile(frozen) as b:
        names = a.namelist()
        assert b.namelist() == names
        for name in names:
            if name.startswith("xl/worksheets/sheet"):
                continue
            assert a.read(name) == b.read(name), name
    live = load_workbook(TEMPLATE)
    copy = load_workbook(frozen)
    for ws in copy.worksheets:
        src = live[ws.title]
        assert ws.merged_cells.ranges == src.merged_cells.ranges or set(
            map(str, ws.merged_cells.ranges)
        ) == set(map(str, src.merged_cells.ranges))
        assert ws.print_area == src.print_area
        for row in ws.iter_rows(max_row=60):
            for c in row:
                assert c.number_format == src[c.coordinate].number_format


def test_freeze_refuses_to_overwrite_and_the_live_book_itself(frozen: Path) -> None:
    with pytest.raises(FileExistsError):
        freeze_workbook(TEMPLATE, frozen)
    with pytest.raises(ValueError, match="another file"):
        freeze_workbook(TEMPLATE, TEMPLATE, force=True)


# ------------------------------------------------------------------ rendered by LibreOffice


def _need_tools() -> None:
    for tool in ("soffice", "pdftotext", "pdftoppm"):
        if shutil.which(tool) is None:
            pytest.skip(f"{tool} is not installed (libreoffice-calc, poppler-utils)")


def _to_pdf(book: Path, folder: Path) -> Path:
    """``soffice --convert-to pdf`` with a private profile (nothing of errdist in it)."""
    profile = (folder / "profile").resolve().as_uri()
    subprocess.run(
        [
            "soffice",
            "--headless",
            "--norestore",
            f"-env:UserInstallation={profile}",
            "--convert-to",
            "pdf",
            "--outdir",
            str(folder),
            str(book),
        ],
        stdin=subprocess.DEVNULL,
        capture_output=True,
        timeout=300,
        check=True,
    )
    pdf = folder / (book.stem + ".pdf")
    assert pdf.exists()
    return pdf


def _pages(pdf: Path) -> list[str]:
    text = subprocess.run(
        ["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True, check=True
    ).stdout
    return text.split("\f")


def _error_texts(pages: list[str]) -> int:
    n = 0
    for page in pages:
        for line in page.splitlines():
            if GUIDE_SENTENCE in line:
                continue
            n += line.count("#NAME?") + line.count("Err:") + line.count("#VALUE!")
    return n


@pytest.mark.libreoffice
def test_live_book_shows_name_errors_and_the_copy_none_with_every_chart(
    frozen: Path, tmp_path: Path
) -> None:
    _need_tools()
    live_pages = _pages(_to_pdf(TEMPLATE, tmp_path / "live"))
    # Without the add-in LibreOffice recalculates the spilled ERRDIST_ ranges into #NAME?
    # (measured: 238 on the printed pages, whose data sheets print their notes only).
    assert _error_texts(live_pages) > 100
    pdf = _to_pdf(frozen, tmp_path / "frozen")
    pages = _pages(pdf)
    assert _error_texts(pages) == 0
    charts = 5  # ECDF, histogram, QQ, loss tail, returns against VaR
    chart_pages = {
        k: i + 1
        for i, p in enumerate(pages)
        for k in range(1, charts + 1)
        if f"Chart {k} of {charts}" in p
    }
    assert sorted(chart_pages) == list(range(1, charts + 1)), chart_pages
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    for k, page in chart_pages.items():
        stem = ARTIFACTS / f"frozen-chart-{k}"
        for fmt in ([], ["-png"]):
            subprocess.run(
                ["pdftoppm", "-r", "50", "-f", str(page), "-l", str(page), "-singlefile", *fmt]
                + [str(pdf), str(stem)],
                check=True,
                timeout=60,
            )
        img = _read_ppm(stem.with_suffix(".ppm"))
        stem.with_suffix(".ppm").unlink()
        r, b = img[..., 0], img[..., 2]
        # Every chart draws blue data (points, bars, the return line) and a red fitted line;
        # measured: the copy's charts 0.27-3.7 % blue and 0.13-0.45 % red pixels at 50 dpi,
        # the live book without the add-in 0 % blue on the QQ chart and 0 % red on chart 1.
        blue, red = float(((b - r) > 40).mean()), float(((r - b) > 60).mean())
        assert blue > 0.001 and red > 0.0007, (k, blue, red)


def _read_ppm(path: Path) -> np.ndarray:
    data = path.read_bytes()
    head = data.split(maxsplit=4)
    assert head[0] == b"P6", head[0]
    w, h = int(head[1]), int(head[2])
    return np.frombuffer(data[-w * h * 3 :], dtype=np.uint8).reshape(h, w, 3).astype(int)


def test_demo_writes_a_values_copy_beside_the_live_book(tmp_path: Path) -> None:
    from errdist.cli import main

    live, copy = tmp_path / "demo.xlsx", tmp_path / "demo-values.xlsx"
    assert main(["demo", "--out", str(live), "--values-copy", str(copy)]) == 0
    with zipfile.ZipFile(live) as a, zipfile.ZipFile(copy) as b:
        sheets = [n for n in a.namelist() if n.startswith("xl/worksheets/sheet")]
        assert any(b"<f" in a.read(n) for n in sheets)
        assert not any(b"<f>" in b.read(n) or b"<f " in b.read(n) for n in sheets)
    # Refused up front when the copy would overwrite the live book: nothing is written.
    other = tmp_path / "other.xlsx"
    assert main(["demo", "--out", str(other), "--values-copy", str(other)]) == 2
    assert not other.exists()
