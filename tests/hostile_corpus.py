"""Build the hostile-workbook corpus: odd and malicious .xlsx files, made from text at test time.

No binary fixtures: every workbook starts as a small valid book written by XlsxWriter and is
then altered part by part with ``zipfile``. :func:`build_corpus` writes the corpus into a
folder, together with two "canary" files beside it (``other.xlsx``, a valid workbook, and
``bomb.xlsx``, a zip bomb) that linked books point at; ``errdist check`` must never open either.

Each :class:`Case` says what ``errdist check`` must do: ``"refused"`` (exit 2, one-line message
naming the file, nothing else read), ``"differs"`` (exit 1) or ``"match"`` (exit 0). Run this
file directly to write the corpus into a folder: ``python tests/hostile_corpus.py DIR``.
"""

from __future__ import annotations

import sys
import zipfile
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import xlsxwriter

MAIN_NS = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
REL_NS = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
LINK_TYPE = REL_NS + "/externalLink"
LINK_PATH_TYPE = REL_NS + "/externalLinkPath"


@dataclass(frozen=True)
class Case:
    """One corpus workbook and the outcome ``errdist check`` must give."""

    name: str
    path: Path
    expect: str  # "refused" | "differs" | "match"
    match: str = ""  # a phrase the message must contain


def plain_book(path: Path, *, formulas: int = 1) -> Path:
    """A valid one-sheet workbook: A2 = 2, B2 = A2*2 (cached 4), a defined name ``nm``."""
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("S")
    ws.write("A1", "label")
    ws.write_number("A2", 2.0)
    for i in range(formulas):
        ws.write_formula(1 + i, 1, "=A2*2", None, 4.0)
    wb.define_name("nm", "=S!$A$2")
    wb.close()
    return path


def rewrite(
    src: Path,
    dst: Path,
    *,
    replace: dict[str, bytes] | None = None,
    add: dict[str, bytes] | None = None,
    drop: tuple[str, ...] = (),
    edit: dict[str, Callable[[bytes], bytes]] | None = None,
) -> Path:
    """Copy the archive ``src`` to ``dst`` with parts replaced, added, dropped or edited."""
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            if info.filename in drop:
                continue
            data = (replace or {}).get(info.filename, zin.read(info))
            if info.filename in (edit or {}):
                data = edit[info.filename](data)  # type: ignore[index]
            zout.writestr(info.filename, data)
        for part, data in (add or {}).items():
            zout.writestr(part, data)
    return dst


def _link_part(sheet: str = "S") -> bytes:
    return (
        f'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>'
        f'<externalLink xmlns="{MAIN_NS}" xmlns:r="{REL_NS}"><externalBook r:id="rId1">'
        f'<sheetNames><sheetName val="{sheet}"/></sheetNames><sheetDataSet>'
        f'<sheetData sheetId="0"><row r="2"><cell r="A2"><v>2</v></cell></row></sheetData>'
        f"</sheetDataSet></externalBook></externalLink>"
    ).encode()


def _link_rels(target: str) -> bytes:
    return (
        f'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>'
        f'<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">'
        f'<Relationship Id="rId1" Type="{LINK_PATH_TYPE}" Target="{target}" '
        f'TargetMode="External"/></Relationships>'
    ).encode()


def _add_workbook_rel(target: str, rel_type: str = LINK_TYPE) -> Callable[[bytes], bytes]:
    def edit(data: bytes) -> bytes:
        rel = f'<Relationship Id="rId99" Type="{rel_type}" Target="{target}"/>'
        return data.replace(b"</Relationships>", rel.encode() + b"</Relationships>")

    return edit


def _workbook_xml(names: str, *, external: bool) -> Callable[[bytes], bytes]:
    """Add ``<externalReferences>`` (rId99) and replace the defined names."""

    def edit(data: bytes) -> bytes:
        text = data.decode()
        if external:
            text = text.replace(
                "</sheets>",
                '</sheets><externalReferences><externalReference r:id="rId99"/>'
                "</externalReferences>",
            )
        start, end = text.find("<definedNames>"), text.find("</definedNames>")
        text = text[:start] + f"<definedNames>{names}</definedNames>" + text[end + 15 :]
        return text.encode()

    return edit


def _formula_sheet(formula: str) -> Callable[[bytes], bytes]:
    """Replace B2's formula text (XML-escaped by the caller)."""

    def edit(data: bytes) -> bytes:
        return data.replace(b"<f>A2*2</f>", f"<f>{formula}</f>".encode())

    return edit


def _linked(base: Path, dst: Path, part: str, target: str, via_name: bool) -> Path:
    """A book whose B2 reads cell A2 of ``target`` through an external-link part at ``part``."""
    rels_dir, leaf = part.rsplit("/", 1)
    rel_target = part.removeprefix("xl/")
    names = '<definedName name="nm">[1]S!$A$2</definedName>' if via_name else ""
    formula = "nm*10" if via_name else "[1]S!A2*10"
    return rewrite(
        base,
        dst,
        add={part: _link_part(), f"{rels_dir}/_rels/{leaf}.rels": _link_rels(target)},
        edit={
            "xl/_rels/workbook.xml.rels": _add_workbook_rel(rel_target),
            "xl/workbook.xml": _workbook_xml(names, external=True),
            "xl/worksheets/sheet1.xml": _formula_sheet(formula),
        },
    )


def _zip_bomb(path: Path) -> Path:
    return rewrite(
        plain_book(path.with_suffix(".tmpbase.xlsx")),
        path,
        add={"xl/media/pad.bin": bytes(8 << 20)},
    )


BILLION_LAUGHS = (
    b'<?xml version="1.0" encoding="UTF-8"?><!DOCTYPE z [<!ENTITY a "aaaaaaaaaa">'
    b'<!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;&a;&a;">]><sst xmlns="' + MAIN_NS.encode() + b'">'
    b"<si><t>&b;</t></si></sst>"
)


def build_corpus(folder: Path) -> tuple[list[Case], list[Path]]:
    """Write the corpus into ``folder``; return the cases and the canary files.

    The canaries (``other.xlsx``, ``bomb.xlsx`` and ``secret.xlsx`` in a sub-folder named by
    absolute path) must never be opened by a check of any case.
    """
    folder.mkdir(parents=True, exist_ok=True)
    src = folder / "src"
    src.mkdir(exist_ok=True)
    canaries = [plain_book(folder / "other.xlsx"), _zip_bomb(folder / "bomb.xlsx")]
    secret_dir = folder / "secret"
    secret_dir.mkdir(exist_ok=True)
    canaries.append(plain_book(secret_dir / "secret.xlsx"))
    (folder / "bomb.tmpbase.xlsx").unlink()
    base = plain_book(src / "base.xlsx")
    cases: list[Case] = []

    def add(name: str, expect: str, match: str, make: Callable[[Path], Path]) -> None:
        cases.append(Case(name, make(folder / f"{name}.xlsx"), expect, match))

    add("plain", "match", "", lambda p: plain_book(p))
    links = "links to other files"
    for part, tag in (
        ("xl/externalLinks/externalLink1.xml", "link_std"),
        ("xl/externalLinks/externalLink1.XML", "link_upper_ext"),
        ("xl/EXTERNALLINKS/externalLink1.xml", "link_upper_dir"),
        ("xl/elsewhere/lnk.xml", "link_elsewhere"),
        ("xl/lnk.bin", "link_not_xml"),
    ):
        for target, tname in (
            (str(folder / "other.xlsx"), "other"),
            ("file:///" + str(folder / "bomb.xlsx").lstrip("/"), "bomb"),
        ):
            for via_name in (False, True):
                how = "name" if via_name else "cell"
                add(
                    f"{tag}_{tname}_{how}",
                    "refused",
                    links,
                    lambda p, a=part, t=target, v=via_name: _linked(base, p, a, t, v),
                )
    # a link relationship whose part is missing: still a link, still refused
    add(
        "link_rel_only",
        "refused",
        links,
        lambda p: rewrite(
            base, p, edit={"xl/_rels/workbook.xml.rels": _add_workbook_rel("externalLinks/x.xml")}
        ),
    )
    # a link relationship type written in another case
    add(
        "link_rel_case",
        "refused",
        links,
        lambda p: rewrite(
            base,
            p,
            add={"xl/ext/l.xml": _link_part()},
            edit={"xl/_rels/workbook.xml.rels": _add_workbook_rel("ext/l.xml", LINK_TYPE.upper())},
        ),
    )
    # defined names holding paths to other files (no link part at all)
    absolute = str(secret_dir).replace("\\", "/")
    for i, ref in enumerate(
        (
            f"'{absolute}/[secret.xlsx]S'!$A$2",
            "'[other.xlsx]S'!$A$2",
            f"'file:///{absolute}/[secret.xlsx]S'!$A$2",
            "[other.xlsx]S!$A$2",
            f"'{absolute}/secret.xlsx'!nm",
        )
    ):
        add(
            f"name_path_{i}",
            "differs",
            "another workbook",
            lambda p, r=ref: rewrite(
                base,
                p,
                edit={
                    "xl/workbook.xml": _workbook_xml(
                        f'<definedName name="nm">{r.replace("&", "&amp;")}</definedName>',
                        external=False,
                    ),
                    "xl/worksheets/sheet1.xml": _formula_sheet("nm*10"),
                },
            ),
        )
    # a formula naming another workbook by absolute path
    add(
        "cell_abs_path",
        "differs",
        "another workbook",
        lambda p: rewrite(
            base,
            p,
            edit={"xl/worksheets/sheet1.xml": _formula_sheet(f"'{absolute}/[secret.xlsx]S'!A2*10")},
        ),
    )
    # damaged or odd structure
    add(
        "no_worksheets",
        "refused",
        "no worksheet",
        lambda p: rewrite(
            base,
            p,
            drop=("xl/worksheets/sheet1.xml",),
            edit={
                "xl/workbook.xml": lambda d: d.replace(
                    b'<sheet name="S" sheetId="1" r:id="rId1"/>', b""
                ),
                "xl/_rels/workbook.xml.rels": lambda d: d.replace(
                    b'<Relationship Id="rId1" Type="'
                    + REL_NS.encode()
                    + b'/worksheet" Target="worksheets/sheet1.xml"/>',
                    b"",
                ),
            },
        ),
    )
    add(
        "missing_sheet_part",
        "refused",
        "sheet1.xml",
        lambda p: rewrite(base, p, drop=("xl/worksheets/sheet1.xml",)),
    )
    add(
        "malformed_sheet",
        "refused",
        "not well-formed",
        lambda p: rewrite(base, p, edit={"xl/worksheets/sheet1.xml": lambda d: d[: len(d) // 2]}),
    )
    add(
        "malformed_workbook",
        "refused",
        "not well-formed",
        lambda p: rewrite(
            base, p, edit={"xl/workbook.xml": lambda d: d.replace(b"</sheets>", b"</sheetz>")}
        ),
    )
    add(
        "utf32_sheet",
        "refused",
        "UTF-32",
        lambda p: rewrite(
            base,
            p,
            edit={
                "xl/worksheets/sheet1.xml": lambda d: (
                    d.replace(b'encoding="UTF-8"', b'encoding="UTF-32"').decode().encode("utf-32")
                )
            },
        ),
    )
    add(
        "utf32_doctype",
        "refused",
        "UTF-32",
        lambda p: rewrite(
            base,
            p,
            replace={
                "xl/sharedStrings.xml": BILLION_LAUGHS.replace(
                    b'encoding="UTF-8"', b'encoding="UTF-32"'
                )
                .decode()
                .encode("utf-32")
            },
        ),
    )
    add(
        "sheet_not_xml_name",
        "match",
        "",
        lambda p: rewrite(
            base,
            p,
            drop=("xl/worksheets/sheet1.xml",),
            add={
                "xl/worksheets/sheet1.dat": zipfile.ZipFile(base).read("xl/worksheets/sheet1.xml")
            },
            edit={
                "xl/_rels/workbook.xml.rels": lambda d: d.replace(
                    b"worksheets/sheet1.xml", b"worksheets/sheet1.dat"
                )
            },
        ),
    )
    add(
        "doctype",
        "refused",
        "DTD or entity",
        lambda p: rewrite(base, p, replace={"xl/sharedStrings.xml": BILLION_LAUGHS}),
    )
    add("zip_bomb", "refused", "zip bomb", lambda p: _zip_bomb(p))
    add("not_zip", "refused", "not a zip", lambda p: (p.write_text("date,price\n"), p)[1])
    add("empty", "refused", "empty", lambda p: (p.write_bytes(b""), p)[1])
    add(
        "truncated",
        "refused",
        "",
        lambda p: (p.write_bytes(base.read_bytes()[: base.stat().st_size // 2]), p)[1],
    )
    add(
        "no_content_types",
        "refused",
        "not an .xlsx",
        lambda p: rewrite(base, p, drop=("[Content_Types].xml",)),
    )
    # heavy formulas: fail fast naming the limit
    add(
        "long_formula",
        "refused",
        "ERRDIST_MAX_FORMULA_LENGTH",
        lambda p: rewrite(
            base, p, edit={"xl/worksheets/sheet1.xml": _formula_sheet("+".join(["A2"] * 16000))}
        ),
    )
    add(
        "deep_formula",
        "refused",
        "ERRDIST_MAX_FORMULA_DEPTH",
        lambda p: rewrite(
            base,
            p,
            edit={"xl/worksheets/sheet1.xml": _formula_sheet("(" * 3000 + "A2" + ")" * 3000)},
        ),
    )
    # a tampered cached value: the check runs and reports it
    add(
        "tampered",
        "differs",
        "B2",
        lambda p: rewrite(
            base,
            p,
            edit={"xl/worksheets/sheet1.xml": lambda d: d.replace(b"<v>4.0</v>", b"<v>5.0</v>")},
        ),
    )
    return cases, canaries


if __name__ == "__main__":
    out = Path(sys.argv[1] if len(sys.argv) > 1 else "hostile-corpus")
    found, _ = build_corpus(out)
    for c in found:
        print(f"{c.expect:8} {c.path}")
