"""``errdist check`` catches formulas typed over with constants, deleted, changed or added.

Each case edits the XML of a copy of the committed template the way a spreadsheet would save
the user's edit (the formula element dropped with its value kept; the cell removed; the
formula text changed; a formula put into a text cell), so the recomputed values still agree
with the stored ones - the case a value audit alone passes ("all cells match").
"""

from __future__ import annotations

import re
import zipfile
from pathlib import Path

import pytest

pytest.importorskip("openpyxl", reason="openpyxl is not installed")
pytest.importorskip("formulas", reason="formulas is not installed")

from errdist.workbook.engine import sheet_parts  # noqa: E402
from errdist.workbook.formula_map import formula_changes, normalise_formula  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "workbook_template" / "errdist-monthly-risk.xlsx"


def _edit(dst: Path, sheet: str, pattern: str, repl: str) -> Path:
    part = sheet_parts(TEMPLATE)[sheet]
    with zipfile.ZipFile(TEMPLATE) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zo:
        for item in zin.infolist():
            data = zin.read(item.filename)
            if item.filename == part:
                text, n = re.subn(pattern, repl, data.decode("utf-8"))
                assert n == 1, f"{pattern} matched {n} times"
                data = text.encode("utf-8")
            zo.writestr(item, data)
    return dst


def test_the_committed_template_has_every_formula_in_place() -> None:
    assert formula_changes(TEMPLATE) == []


def test_overridden_deleted_changed_and_added_are_listed_apart(tmp_path: Path) -> None:
    b17 = r'<c r="B31"( s="\d+")?><f>([^<]*)</f><v>([^<]*)</v></c>'
    over = _edit(tmp_path / "over.xlsx", "Risk", b17, r'<c r="B31"\1><v>\3</v></c>')
    (c,) = formula_changes(over)
    assert (c.kind, c.sheet, c.cell) == ("overridden", "Risk", "B31")
    assert c.expected.startswith("ERRDIST_VAR(") and isinstance(c.found, float)

    gone = _edit(tmp_path / "gone.xlsx", "Risk", b17, "")
    (c,) = formula_changes(gone)
    assert (c.kind, c.cell, c.found) == ("deleted", "B31", None)

    changed = _edit(
        tmp_path / "changed.xlsx",
        "Risk",
        r"<f>ERRDIST_ES\(\$A\$31,\$B\$5,\$B\$6,\$B\$7,1,",
        "<f>ERRDIST_ES($A$31,$B$5,$B$6,$B$7,2,",
    )
    (c,) = formula_changes(changed)
    assert (c.kind, c.cell) == ("changed", "C31") and ",2," in c.found

    # Prices!D1 holds a note (text); a formula typed there is "added".
    added = _edit(
        tmp_path / "added.xlsx",
        "Prices",
        r'<c r="D1"( s="\d+")? t="s"><v>\d+</v></c>',
        r'<c r="D1"\1><f>1+1</f><v>2</v></c>',
    )
    (c,) = formula_changes(added)
    assert (c.kind, c.sheet, c.cell, c.found) == ("added", "Prices", "D1", "1+1")


def test_check_exit_code_says_formulas_overridden_while_values_agree(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    from errdist.cli import main
    from errdist.workbook.commands import EXIT_FORMULAS

    b17 = r'<c r="B31"( s="\d+")?><f>([^<]*)</f><v>([^<]*)</v></c>'
    over = _edit(tmp_path / "over.xlsx", "Risk", b17, r'<c r="B31"\1><v>\3</v></c>')
    assert main(["check", str(over)]) == EXIT_FORMULAS == 4
    out = capsys.readouterr().out
    assert "1 formula cell(s) overridden:" in out and "Risk!B31" in out
    assert "formula cells match" in out  # the values alone would have passed


def test_a_book_not_built_by_errdist_is_said_to_be_not_compared(tmp_path: Path) -> None:
    xlsxwriter = pytest.importorskip("xlsxwriter")
    path = tmp_path / "plain.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Sheet1")
    ws.write_number(0, 0, 2.0)
    ws.write_formula(0, 1, "=A1*2", None, 4.0)
    wb.close()
    assert formula_changes(path) is None


def test_formula_texts_compare_without_format_prefixes_and_spaces() -> None:
    assert normalise_formula("=_xlfn.NORM.S.INV( 0.99 )") == "NORM.S.INV(0.99)"
    assert normalise_formula('=IF(A1="a b", 1, 2)') == 'IF(A1="a b",1,2)'
    assert normalise_formula("{=ERRDIST_FIT(A1:A9)}") == "ERRDIST_FIT(A1:A9)"
