"""Safe opening of untrusted workbook files (.xlsx).

A workbook handed to ``errdist check`` or read as a prices file may come from anyone. Before any
XML parser sees it, :func:`inspect_xlsx` checks the file as a zip archive:

- the file exists, is a regular file, and is at most :data:`MAX_FILE_BYTES` bytes on disk;
- it is a zip archive with at most :data:`MAX_ENTRIES` entries, none encrypted;
- the uncompressed sizes declared in the zip directory add up to at most
  :data:`MAX_UNCOMPRESSED_BYTES`, and no entry expands more than :data:`MAX_RATIO` times (zip
  bombs are refused before anything is decompressed; Python's ``zipfile`` never returns more
  bytes than an entry declares, so the declared sizes bound what is read);
- it holds no external links: no part in an ``externalLinks`` folder (any letter case, any
  extension) and no relationship, in any ``.rels`` part, of the external-link types
  (``…/externalLink``, ``…/externalLinkPath``, any letter case) wherever its part is stored:
  **errdist refuses workbooks that link to other files** rather than evaluating the linked
  cells as errors, so no other file is ever opened on the workbook's behalf;
- every XML part (found by its name *or* by its first bytes, so an XML part named ``.bin`` is
  scanned too) is UTF-8 or UTF-16 (what Office Open XML allows), is well-formed, and declares no
  DOCTYPE or entity (``<!DOCTYPE``, ``<!ENTITY``): Office Open XML never needs them, and they
  are how "billion laughs" entity expansion and external-entity attacks work;
- the workbook part lists at least one sheet, and every sheet part it names is in the archive;
- the worksheets hold at most :data:`MAX_FORMULA_CELLS` formula cells (see
  :func:`formula_cell_limit`; counted while scanning, before any formula is parsed).

:func:`defuse_xml` additionally calls ``defusedxml.defuse_stdlib()``, so any later stdlib XML
parsing (openpyxl, ``formulas``) refuses entities as well; openpyxl's own lxml parser does not
resolve entities.

Every refusal raises :class:`UnsafeFileError` (or its subclass :class:`UnreadableFileError`
for a damaged file), a ``ValueError`` with a one-line message that says what was found and
what to do; ``errdist check`` and ``errdist refresh`` exit with code 2 for them.
"""

from __future__ import annotations

import codecs
import os
import posixpath
import re
import zipfile
from dataclasses import dataclass
from pathlib import Path
from xml.parsers import expat

MAX_FILE_BYTES = 50 * 1024 * 1024
"""Largest workbook accepted on disk (compressed): 50 MB."""

MAX_UNCOMPRESSED_BYTES = 500 * 1024 * 1024
"""Largest total of the uncompressed sizes of all parts: 500 MB."""

MAX_RATIO = 200.0
"""Largest compression ratio of one part larger than 1 MB (XML of numbers compresses ~10-30x)."""

MAX_ENTRIES = 10_000
"""Most parts in one archive."""

MAX_FORMULA_CELLS = 50_000
"""Most formula cells in one workbook (default; environment variable
``ERRDIST_MAX_FORMULA_CELLS`` raises it). The headless engine compiles each formula cell
separately (~3 ms and ~50 kB each), so 50,000 cells take a few minutes and a few GB; errdist's
own workbooks hold a few hundred (their columns are spilled formulas)."""

FORMULA_CELLS_ENV = "ERRDIST_MAX_FORMULA_CELLS"

_RATIO_FLOOR = 1024 * 1024
_SCAN_CHUNK = 1024 * 1024
_MARKERS = ("<!doctype", "<!entity")
_LINK_DIR = re.compile(r"(^|/)externallinks/", re.IGNORECASE)
_LINK_TYPE = re.compile(rb"""Type\s*=\s*["'][^"']*/externalLink(Path)?["']""", re.IGNORECASE)
_FORMULA_TAG = re.compile(r"<(?:[a-z0-9_]+:)?f[\s>/]")
_XML_NAMES = (".xml", ".rels", ".vml")
_MAIN_NS = "{http://schemas.openxmlformats.org/spreadsheetml/2006/main}"
_REL_NS = "{http://schemas.openxmlformats.org/officeDocument/2006/relationships}"


class UnsafeFileError(ValueError):
    """The file was refused before parsing (too large, a zip bomb, external links, entities)."""


class UnreadableFileError(UnsafeFileError):
    """The file is damaged: malformed XML, an unsupported encoding, a missing part."""


def env_limit(name: str, default: int) -> int:
    """A limit from the environment variable ``name`` (a positive integer), else ``default``.

    Raises
    ------
    ValueError
        The variable is set but is not a positive integer.
    """
    raw = os.environ.get(name, "").strip().replace("_", "")
    if not raw:
        return default
    try:
        value = int(raw)
    except ValueError:
        value = 0
    if value <= 0:
        raise ValueError(f"environment variable {name}={raw!r} must be a positive integer")
    return value


def formula_cell_limit() -> int:
    """The formula-cell limit in force: ``ERRDIST_MAX_FORMULA_CELLS`` or
    :data:`MAX_FORMULA_CELLS`."""
    return env_limit(FORMULA_CELLS_ENV, MAX_FORMULA_CELLS)


@dataclass(frozen=True)
class ZipSummary:
    """What :func:`inspect_xlsx` found in an accepted archive."""

    path: Path
    file_bytes: int
    uncompressed_bytes: int
    entries: int


_DEFUSED = False


def defuse_xml() -> None:
    """Make the standard library's XML parsers refuse entities (idempotent).

    Calls ``defusedxml.defuse_stdlib()`` once per process.
    """
    global _DEFUSED
    if not _DEFUSED:
        import warnings

        with warnings.catch_warnings():
            warnings.simplefilter("ignore", DeprecationWarning)  # defusedxml.cElementTree
            import defusedxml

            defusedxml.defuse_stdlib()
        _DEFUSED = True


def check_file_size(path: str | os.PathLike[str], *, limit: int = MAX_FILE_BYTES) -> Path:
    """Check that ``path`` is an existing regular file of at most ``limit`` bytes.

    Returns
    -------
    pathlib.Path
        The path.

    Raises
    ------
    FileNotFoundError
        When there is no such file.
    UnsafeFileError
        When it is not a regular file or is larger than ``limit``.
    """
    p = Path(path)
    if not p.exists():
        raise FileNotFoundError(f"{p}: no such file")
    if not p.is_file():
        raise UnsafeFileError(f"{p}: not a regular file")
    size = p.stat().st_size
    if size > limit:
        raise UnsafeFileError(
            f"{p}: file is {size / 1e6:.1f} MB, larger than the {limit / 1e6:.0f} MB limit"
        )
    return p


def _encoding_of(head: bytes) -> str:
    """Encoding of an XML part from its first bytes (BOM or the NUL pattern of UTF-16/32)."""
    if head[:4] in (b"\xff\xfe\x00\x00", b"\x00\x00\xfe\xff") or (
        len(head) >= 4 and (head[1:4] == b"\x00\x00\x00" or head[:3] == b"\x00\x00\x00")
    ):
        return "utf-32"
    if head[:3] == b"\xef\xbb\xbf":
        return "utf-8-sig"
    if head[:2] == b"\xff\xfe" or head[1:2] == b"\x00":
        return "utf-16-le" if head[:2] != b"\xff\xfe" else "utf-16"
    if head[:2] == b"\xfe\xff" or head[:1] == b"\x00":
        return "utf-16-be" if head[:2] != b"\xfe\xff" else "utf-16"
    return "utf-8"


def _looks_like_xml(head: bytes) -> bool:
    """True when a part's first bytes are XML text, whatever the part is called."""
    if head[:2] in (b"\xff\xfe", b"\xfe\xff") or head[:3] == b"\xef\xbb\xbf":
        return True
    if head[:4] in (b"\x00\x00\xfe\xff",) or head[:1] == b"\x00" or head[1:2] == b"\x00":
        return head.replace(b"\x00", b"").lstrip()[:1] == b"<"
    return head.lstrip()[:1] == b"<"


def _scan_xml_part(
    archive: zipfile.ZipFile, info: zipfile.ZipInfo, path: Path, *, by_name: bool
) -> int:
    """Scan one part; return its number of formula cells (``<f>`` elements).

    Refuses, streamed and bounded by the part's declared size: a DOCTYPE or entity
    declaration, an encoding other than UTF-8/UTF-16, malformed XML. A part that is not named
    as XML is scanned only when its first bytes are XML text.
    """
    tail = ""
    decoder = None
    parser = None
    formulas = 0
    with archive.open(info) as stream:
        while True:
            chunk = stream.read(_SCAN_CHUNK)
            if not chunk:
                break
            if decoder is None:
                if not by_name and not _looks_like_xml(chunk[:64]):
                    return 0
                encoding = _encoding_of(chunk)
                if encoding == "utf-32":
                    raise UnreadableFileError(
                        f"{path}: part {info.filename} is encoded in UTF-32; spreadsheet files "
                        "use UTF-8 or UTF-16, so the file is refused (save it again from the "
                        "spreadsheet)"
                    )
                decoder = codecs.getincrementaldecoder(encoding)(errors="ignore")
                parser = expat.ParserCreate()
            window = (tail + decoder.decode(chunk)).lower()
            for marker in _MARKERS:
                if marker in window:
                    raise UnsafeFileError(
                        f"{path}: part {info.filename} declares a DTD or entity "
                        f"({marker.upper()}); spreadsheet files never need one, so the file "
                        "is refused (possible entity-expansion attack)"
                    )
            formulas += len(_FORMULA_TAG.findall(window)) - len(_FORMULA_TAG.findall(tail))
            tail = window[-16:]
            _feed(parser, chunk, info, path, final=False)
    if parser is not None:
        _feed(parser, b"", info, path, final=True)
    return formulas


def _feed(
    parser: expat.XMLParserType, data: bytes, info: zipfile.ZipInfo, path: Path, *, final: bool
) -> None:
    try:
        parser.Parse(data, final)
    except expat.ExpatError as exc:
        raise UnreadableFileError(
            f"{path}: part {info.filename} is not well-formed XML "
            f"({expat.ErrorString(exc.code)}, line {exc.lineno}); the file is damaged: save it "
            "again from the spreadsheet"
        ) from None


def _check_links(archive: zipfile.ZipFile, infos: list[zipfile.ZipInfo], path: Path) -> None:
    """Refuse external-link parts and relationships, wherever stored and however spelled."""
    found = [i.filename for i in infos if _LINK_DIR.search(i.filename)]
    for info in infos:
        if info.filename.lower().endswith(".rels") and not found:
            with archive.open(info) as stream:
                data = stream.read(16 * 1024 * 1024)
            text = data.decode("utf-16") if data[:2] in (b"\xff\xfe", b"\xfe\xff") else data
            if isinstance(text, str):
                text = text.encode("utf-8", "replace")
            if _LINK_TYPE.search(text):
                found.append(f"a link relationship in {info.filename}")
    if found:
        raise UnsafeFileError(
            f"{path}: the workbook links to other files ({len(found)} external link(s), "
            f"{found[0]}); errdist does not follow external links. Break the links "
            "(Data > Edit Links > Break Link) and save again"
        )


def _check_sheets(archive: zipfile.ZipFile, names: set[str], path: Path) -> None:
    """The workbook part lists at least one sheet, and each listed sheet part exists."""
    from defusedxml import ElementTree

    try:
        wb = ElementTree.fromstring(archive.read("xl/workbook.xml"))
        rels_data = archive.read("xl/_rels/workbook.xml.rels")
        rels = ElementTree.fromstring(rels_data)
    except KeyError as exc:
        raise UnreadableFileError(
            f"{path}: the workbook has no part {exc.args[0]}; the file is damaged"
        ) from None
    except ElementTree.ParseError as exc:
        raise UnreadableFileError(
            f"{path}: the workbook part is not well-formed XML ({exc})"
        ) from None
    targets = {}
    for rel in rels:
        target = rel.get("Target", "")
        if target.startswith("/"):
            target = target[1:]
        else:
            target = posixpath.normpath(posixpath.join("xl", target))
        targets[rel.get("Id")] = target
    sheets = wb.find(f"{_MAIN_NS}sheets")
    listed = list(sheets) if sheets is not None else []
    if not listed:
        raise UnreadableFileError(
            f"{path}: the workbook has no worksheet; there is nothing to check"
        )
    for sheet in listed:
        rid = sheet.get(f"{_REL_NS}id")
        part = targets.get(rid)
        if part is None or part not in names:
            raise UnreadableFileError(
                f"{path}: sheet {sheet.get('name')!r} has no part in the archive "
                f"({part or 'no relationship ' + str(rid)} is missing); the file is damaged"
            )


def inspect_xlsx(
    path: str | os.PathLike[str],
    *,
    max_file_bytes: int = MAX_FILE_BYTES,
    max_uncompressed_bytes: int = MAX_UNCOMPRESSED_BYTES,
    max_ratio: float = MAX_RATIO,
    allow_external_links: bool = False,
) -> ZipSummary:
    """Check an .xlsx file before any XML in it is parsed.

    Parameters
    ----------
    path : path-like
        The workbook.
    max_file_bytes, max_uncompressed_bytes, max_ratio : number
        Limits (see the module constants).
    allow_external_links : bool
        Accept external-link parts (the caller then must not follow them). Default False.

    Returns
    -------
    ZipSummary
        Sizes of the accepted archive.

    Raises
    ------
    FileNotFoundError
        No such file.
    UnsafeFileError
        Not an .xlsx zip archive, too large, a zip bomb, encrypted parts, external links, or an
        XML part with a DTD/entity declaration.
    """
    p = check_file_size(path, limit=max_file_bytes)
    if p.stat().st_size == 0:
        raise UnsafeFileError(f"{p}: the file is empty (0 bytes), not an .xlsx workbook")
    if not zipfile.is_zipfile(p):
        raise UnsafeFileError(
            f"{p}: not an .xlsx workbook (not a zip archive); save it as Excel Workbook (.xlsx)"
        )
    try:
        archive = zipfile.ZipFile(p)
    except (zipfile.BadZipFile, OSError) as exc:
        raise UnsafeFileError(f"{p}: damaged zip archive ({exc})") from exc
    with archive:
        infos = archive.infolist()
        if len(infos) > MAX_ENTRIES:
            raise UnsafeFileError(f"{p}: {len(infos)} parts, more than the {MAX_ENTRIES} limit")
        total = 0
        for info in infos:
            if info.flag_bits & 0x1:
                raise UnsafeFileError(
                    f"{p}: part {info.filename} is encrypted; remove the password and retry"
                )
            total += info.file_size
            if total > max_uncompressed_bytes:
                raise UnsafeFileError(
                    f"{p}: uncompressed content exceeds {max_uncompressed_bytes / 1e6:.0f} MB "
                    "(possible zip bomb); refused before decompressing"
                )
            if info.file_size > _RATIO_FLOOR and info.file_size > max_ratio * max(
                info.compress_size, 1
            ):
                raise UnsafeFileError(
                    f"{p}: part {info.filename} expands {info.file_size / 1e6:.0f} MB from "
                    f"{info.compress_size / 1e3:.0f} kB (ratio over {max_ratio:.0f}; "
                    "possible zip bomb); refused before decompressing"
                )
        names = [i.filename for i in infos]
        if "[Content_Types].xml" not in names or not any(
            n.startswith("xl/workbook") for n in names
        ):
            raise UnsafeFileError(f"{p}: not an .xlsx workbook (no xl/workbook part)")
        if not allow_external_links:
            _check_links(archive, infos, p)
        formulas = 0
        for info in infos:
            by_name = info.filename.lower().endswith(_XML_NAMES)
            formulas += _scan_xml_part(archive, info, p, by_name=by_name)
        limit = formula_cell_limit()
        if formulas > limit:
            raise UnsafeFileError(
                f"{p}: {formulas:,} formula cells, more than the limit of {limit:,} "
                f"(each takes ~3 ms and ~50 kB to recompute); to check it anyway, raise the "
                f"limit with the environment variable {FORMULA_CELLS_ENV}={formulas}"
            )
        _check_sheets(archive, set(names), p)
    return ZipSummary(p, p.stat().st_size, total, len(infos))
