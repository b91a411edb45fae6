"""The Guide sheet's install steps agree with docs/install.md.

Both are read as a user reads them: the Guide from the committed template (openpyxl), the
install page as text. Each claim checked here was once contradicted between the two.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

pytest.importorskip("openpyxl", reason="openpyxl is not installed")

from openpyxl import load_workbook  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "workbook_template" / "errdist-monthly-risk.xlsx"
INSTALL = ROOT / "docs" / "install.md"


@pytest.fixture(scope="module")
def guide() -> str:
    ws = load_workbook(TEMPLATE, read_only=True)["Guide"]
    cells = [c for row in ws.iter_rows(values_only=True) for c in row if isinstance(c, str)]
    return "\n".join(cells)


@pytest.fixture(scope="module")
def install() -> str:
    return INSTALL.read_text(encoding="utf-8")


def _install_section(guide: str) -> str:
    start = guide.index("Live formulas: installing the add-in")
    return guide[start : guide.index("Cautions", start)]


def test_both_say_the_xlsx_holds_no_functions_and_the_wrappers_are_imported(
    guide: str, install: str
) -> None:
    steps = _install_section(guide)
    # The old Guide said the functions "load with" the workbook; install.md says import them.
    assert "load with it" not in guide
    for text in (steps, install):
        assert ".xlsm" in text and "Import Functions" in text and "errdist vba" in text
        assert re.search(r"\.xlsx.{0,40}no macros", text, re.S), text[:200]
        assert "errdist.sheet.xlwings_udfs" in text
    assert "xlwings addin install" in steps and "xlwings addin install" in install


def test_both_say_how_a_refreshed_book_gets_its_functions(guide: str, install: str) -> None:
    steps = _install_section(guide)
    for text in (steps, install):
        assert "errdist refresh" in text
        assert ".xlam" in text  # the wrappers once, in an add-in
        assert "errdist libreoffice install" in text  # or the functions in the profile
    assert "#each-months-new-workbook" in install and "### Each month's new workbook" in install
