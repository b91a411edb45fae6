"""``errdist freeze``: a values copy of a workbook for recipients without the add-in.

The live book's ERRDIST_ formulas need the add-in (xlwings in Windows Excel, errdist's Calc
front end in LibreOffice). A recipient without it sees ``#NAME?`` as soon as the spreadsheet
recalculates: Excel recalculates every formula on opening a file whose ``calcPr calcId`` is
older than its own calculation engine (ECMA-376 Part 1, 18.2.2 ``calcPr``: ``calcId`` "the
version of the calculation engine used to calculate values in the workbook"; a newer engine
recalculates; the file's ``fullCalcOnLoad`` asks for the same explicitly; from memory), and
LibreOffice 7.4 with default settings recalculates the spilled (array) ranges on opening
(measured: 7,049 ``#NAME?`` cells in the demo book's PDF). A frozen copy has no formula left,
so nothing can recalculate into an error.

:func:`freeze_workbook` edits the file's XML, nothing else: in every worksheet each formula
element ``<f>`` is removed and its cached value ``<v>`` kept (a text result becomes an inline
string, as a constant text cell is written), the dynamic-array marker ``cm`` goes, and a
calculation chain, if any, is dropped. Styles, number formats, column widths, merged cells,
print settings, the native charts (their series point at the same cells, which now hold
constants) and every other part are copied byte for byte. A note is written on the Guide sheet:
"Frozen copy of <book> (values only, ...)". The copy is written atomically.
"""

from __future__ import annotations

import os
import re
import zipfile
from pathlib import Path
from xml.sax.saxutils import escape

from errdist.workbook import safety
from errdist.workbook.atomic import atomic_path

__all__ = ["FROZEN_NOTE", "freeze_workbook"]

FROZEN_NOTE = (
    "Frozen copy of {book} (values only: every formula was replaced by its value on "
    "{date}; the live book has the formulas)."
)

_F = re.compile(r"<f(?:\s[^>]*)?/>|<f(?:\s[^>]*)?>.*?</f>", re.DOTALL)
_CM = re.compile(r'(<c\s[^>]*?)\s+cm="\d+"')
_STR = re.compile(r'<c(\s[^>]*?)\s+t="str"([^>]*)>\s*<v>(.*?)</v>\s*</c>', re.DOTALL)
_STR_EMPTY = re.compile(r'<c(\s[^>]*?)\s+t="str"([^>]*?)(/>|>\s*</c>)')
_GUIDE_SHEET = "Guide"


def _unfreeze_cells(xml: str) -> str:
    xml = _F.sub("", xml)
    xml = _CM.sub(r"\1", xml)
    xml = _STR.sub(
        lambda m: (
            f'<c{m.group(1)} t="inlineStr"{m.group(2)}><is><t xml:space="preserve">'
            f"{m.group(3)}</t></is></c>"
        ),
        xml,
    )
    return _STR_EMPTY.sub(lambda m: f"<c{m.group(1)}{m.group(2)}{m.group(3)}", xml)


def _sheet_parts(archive: zipfile.ZipFile) -> dict[str, str]:
    """Sheet name -> part name, from workbook.xml and its relationships."""
    book = archive.read("xl/workbook.xml").decode("utf-8")
    rels = archive.read("xl/_rels/workbook.xml.rels").decode("utf-8")
    targets = {
        m.group(1): m.group(2)
        for m in re.finditer(r'<Relationship\s+Id="([^"]+)"[^>]*?Target="([^"]+)"', rels)
    }
    targets.update(
        {
            m.group(2): m.group(1)
            for m in re.finditer(r'<Relationship\s+Target="([^"]+)"[^>]*?Id="([^"]+)"', rels)
        }
    )
    out = {}
    for m in re.finditer(r'<sheet\s+name="([^"]+)"[^>]*?r:id="([^"]+)"', book):
        target = targets.get(m.group(2), "")
        part = target.lstrip("/") if target.startswith("/") else "xl/" + target
        out[m.group(1).replace("&amp;", "&")] = part
    return out


def _add_note(xml: str, text: str) -> str:
    """Write ``text`` into column A of the first empty row from row 3 on (the Guide's
    first free line under its title), in the subtitle's style."""
    used = {int(r) for r in re.findall(r'<row\s+r="(\d+)"', xml)}
    row = 3
    while row in used:
        row += 1
    style = re.search(r'<c\s+r="A2"[^>]*?\ss="(\d+)"', xml)
    s_attr = f' s="{style.group(1)}"' if style else ""
    cell = (
        f'<row r="{row}"><c r="A{row}"{s_attr} t="inlineStr"><is><t xml:space="preserve">'
        f"{escape(text)}</t></is></c></row>"
    )
    after = [m for m in re.finditer(r'<row\s+r="(\d+)"', xml) if int(m.group(1)) > row]
    if after:
        i = after[0].start()
        return xml[:i] + cell + xml[i:]
    if "<sheetData/>" in xml:
        return xml.replace("<sheetData/>", f"<sheetData>{cell}</sheetData>")
    return xml.replace("</sheetData>", cell + "</sheetData>")


def freeze_workbook(
    book: str | os.PathLike[str],
    out: str | os.PathLike[str],
    *,
    force: bool = False,
    date: str | None = None,
) -> Path:
    """Write a values copy of ``book`` to ``out`` (see the module docstring).

    Parameters
    ----------
    book : path-like
        The live workbook (.xlsx), refused if unsafe (:mod:`errdist.workbook.safety`).
    out : path-like
        The copy to write (.xlsx); an existing file only with ``force``.
    force : bool
        Overwrite ``out``.
    date : str, optional
        The date shown in the Guide note (default today, ISO format).

    Returns
    -------
    Path
        ``out``.
    """
    import datetime as _dt

    src = Path(book)
    if Path(out).suffix.lower() != ".xlsx":
        raise ValueError(f"the values copy must be an .xlsx file, got {out}")
    if src.resolve() == Path(out).resolve():
        raise ValueError("the values copy must be another file than the live book")
    safety.inspect_xlsx(src)
    note = FROZEN_NOTE.format(book=src.name, date=date or _dt.date.today().isoformat())
    with zipfile.ZipFile(src) as zin:
        parts = _sheet_parts(zin)
        sheets = set(parts.values())
        guide = parts.get(_GUIDE_SHEET) or next(iter(parts.values()), None)
        with atomic_path(out, force=force) as tmp:
            with zipfile.ZipFile(tmp, "w", zipfile.ZIP_DEFLATED) as zout:
                for item in zin.infolist():
                    name = item.filename
                    if name == "xl/calcChain.xml":
                        continue
                    data = zin.read(name)
                    if name in sheets:
                        xml = _unfreeze_cells(data.decode("utf-8"))
                        if name == guide:
                            xml = _add_note(xml, note)
                        data = xml.encode("utf-8")
                    elif name in ("[Content_Types].xml", "xl/_rels/workbook.xml.rels"):
                        text = data.decode("utf-8")
                        text = re.sub(r"<[^<>]*calcChain[^<>]*/>", "", text)
                        data = text.encode("utf-8")
                    zout.writestr(item, data)
    return Path(out)
