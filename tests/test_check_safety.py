"""Untrusted workbooks: zip bombs, external links and XML entity expansion are refused."""

from __future__ import annotations

import zipfile
from pathlib import Path

import pytest

xlsxwriter = pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")
pytest.importorskip("formulas", reason="formulas not installed")

from errdist.data.prices_io import read_prices  # noqa: E402
from errdist.workbook import engine, safety  # noqa: E402
from errdist.workbook.check import check_workbook  # noqa: E402


def _plain_book(path: Path) -> Path:
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("S")
    ws.write("A1", "label")
    ws.write_number("A2", 2.0)
    ws.write_formula("B2", "=A2*2", None, 4.0)
    wb.close()
    return path


def _tampered_book(
    tmp_path: Path,
    name: str,
    replace: dict[str, bytes] | None = None,
    add: dict[str, bytes] | None = None,
) -> Path:
    """The plain workbook saved as ``name`` with the parts in ``replace`` swapped, ``add`` added."""
    src, dst = _plain_book(tmp_path / "ok.xlsx"), tmp_path / name
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            zout.writestr(info, (replace or {}).get(info.filename, zin.read(info)))
        for part, data in (add or {}).items():
            zout.writestr(part, data)
    return dst


def test_plain_workbook_accepted(tmp_path):
    summary = safety.inspect_xlsx(_plain_book(tmp_path / "ok.xlsx"))
    assert summary.entries > 3
    assert check_workbook(tmp_path / "ok.xlsx") == []


def test_highly_compressed_entry_refused_before_decompressing(tmp_path):
    # 8 MB of zeros deflates to a few kB: a ratio far above MAX_RATIO, as in a zip bomb.
    bomb = _tampered_book(tmp_path, "bomb.xlsx", add={"xl/media/pad.bin": bytes(8 << 20)})
    with pytest.raises(safety.UnsafeFileError, match="zip bomb"):
        safety.inspect_xlsx(bomb)
    with pytest.raises(safety.UnsafeFileError, match="zip bomb"):
        engine.evaluate_workbook(bomb)


def test_uncompressed_total_limit(tmp_path):
    book = _tampered_book(tmp_path, "big.xlsx", add={"xl/media/pad.bin": bytes(3 << 20)})
    with pytest.raises(safety.UnsafeFileError, match="uncompressed content exceeds"):
        safety.inspect_xlsx(book, max_uncompressed_bytes=2 << 20, max_ratio=1e9)


def test_file_size_limit(tmp_path):
    book = _plain_book(tmp_path / "ok.xlsx")
    with pytest.raises(safety.UnsafeFileError, match="larger than"):
        safety.inspect_xlsx(book, max_file_bytes=100)


def test_not_a_zip_refused(tmp_path):
    p = tmp_path / "fake.xlsx"
    p.write_text("date,price\n")
    with pytest.raises(safety.UnsafeFileError, match="not an .xlsx workbook"):
        check_workbook(p)


def test_empty_file_refused_as_empty(tmp_path):
    p = tmp_path / "book.xlsx"
    p.write_bytes(b"")
    with pytest.raises(safety.UnsafeFileError, match=r"the file is empty \(0 bytes\)"):
        check_workbook(p)


def test_external_link_part_refused(tmp_path):
    link = (
        b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>'
        b'<externalLink xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
        b"<externalBook/></externalLink>"
    )
    book = _tampered_book(tmp_path, "linked.xlsx", add={"xl/externalLinks/externalLink1.xml": link})
    with pytest.raises(safety.UnsafeFileError, match="links to other files"):
        check_workbook(book)


def test_formula_reference_to_other_workbook_not_followed(tmp_path):
    # A valid workbook next to the checked one, which a formula names: it must not be opened.
    _plain_book(tmp_path / "other.xlsx")
    path = tmp_path / "refers.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("S")
    ws.write_formula("A1", "='[other.xlsx]S'!A2*10", None, 20.0)
    ws.write_formula("A2", "=1+1", None, 2.0)
    wb.close()
    ev = engine.evaluate_details(path)
    assert [(p.sheet, p.cell) for p in ev.problems] == [("S", "A1")]
    assert "another workbook" in ev.problems[0].reason
    assert ev.values == {}  # nothing was compiled or calculated
    with pytest.raises(engine.EngineError, match="another workbook"):
        engine.evaluate_workbook(path)
    mismatches = check_workbook(path)
    assert ("S", "A1") in {(m.sheet, m.cell) for m in mismatches}


BILLION_LAUGHS = b"""<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<!DOCTYPE lolz [
 <!ENTITY lol "lol">
 <!ENTITY lol2 "&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;">
 <!ENTITY lol3 "&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;">
 <!ENTITY lol4 "&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;">
]>
<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" count="1" uniqueCount="1">
<si><t>&lol4;</t></si></sst>"""


def test_entity_expansion_in_shared_strings_refused(tmp_path):
    book = _tampered_book(tmp_path, "laughs.xlsx", replace={"xl/sharedStrings.xml": BILLION_LAUGHS})
    with pytest.raises(safety.UnsafeFileError, match="DTD or entity"):
        check_workbook(book)
    with pytest.raises(safety.UnsafeFileError, match="DTD or entity"):
        engine.evaluate_workbook(book)
    with pytest.raises(safety.UnsafeFileError, match="sharedStrings"):
        read_prices(book)


def test_entity_declaration_in_utf16_part_refused(tmp_path):
    utf16 = (
        BILLION_LAUGHS.replace(b'encoding="UTF-8"', b'encoding="UTF-16"').decode().encode("utf-16")
    )
    book = _tampered_book(tmp_path, "laughs16.xlsx", replace={"xl/sharedStrings.xml": utf16})
    with pytest.raises(safety.UnsafeFileError, match="DTD or entity"):
        safety.inspect_xlsx(book)


def test_defused_stdlib_refuses_entities_too():
    # Second layer: after defuse_xml(), the stdlib parser itself refuses entity declarations.
    safety.defuse_xml()
    import xml.etree.ElementTree as ET

    import defusedxml

    with pytest.raises(defusedxml.EntitiesForbidden):
        ET.fromstring(BILLION_LAUGHS)
