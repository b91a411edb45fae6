"""Safe opening of untrusted workbook files (.xlsx).

A workbook handed to ``errdist check`` or read as a prices file may come from anyone. Before any
XML parser sees it, :func:`inspect_xlsx` checks the file as a zip archive:

- the file exists, is a regular file, and is at most :data:`MAX_FILE_BYTES` bytes on disk;
- it is a zip archive with at most :data:`MAX_ENTRIES` entries, none encrypted;
- the uncompressed sizes declared in the zip directory add up to at most
  :data:`MAX_UNCOMPRESSED_BYTES`, and no entry expands more than :data:`MAX_RATIO` times (zip
  bombs are refused before anything is decompressed; Python's ``zipfile`` never returns more
  bytes than an entry declares, so the declared sizes bound what is read);
- it holds no external-link parts (``xl/externalLinks/…``): **errdist refuses workbooks that
  link to other files** rather than evaluating the linked cells as errors, so no other file is
  ever opened on the workbook's behalf;
- no XML part declares a DOCTYPE or an entity (``<!DOCTYPE``, ``<!ENTITY``): Office Open XML
  never needs them, and they are how "billion laughs" entity expansion and external-entity
  attacks work.

:func:`defuse_xml` additionally calls ``defusedxml.defuse_stdlib()``, so any later stdlib XML
parsing (openpyxl, ``formulas``) refuses entities as well; openpyxl's own lxml parser does not
resolve entities.

Every refusal raises :class:`UnsafeFileError`, a ``ValueError`` with a one-line message that says
what was found and what to do.
"""

from __future__ import annotations

import codecs
import os
import zipfile
from dataclasses import dataclass
from pathlib import Path

MAX_FILE_BYTES = 50 * 1024 * 1024
"""Largest workbook accepted on disk (compressed): 50 MB."""

MAX_UNCOMPRESSED_BYTES = 500 * 1024 * 1024
"""Largest total of the uncompressed sizes of all parts: 500 MB."""

MAX_RATIO = 200.0
"""Largest compression ratio of one part larger than 1 MB (XML of numbers compresses ~10-30x)."""

MAX_ENTRIES = 10_000
"""Most parts in one archive."""

_RATIO_FLOOR = 1024 * 1024
_SCAN_CHUNK = 1024 * 1024
_EXTERNAL_LINK_DIR = "xl/externalLinks/"
_MARKERS = ("<!doctype", "<!entity")


class UnsafeFileError(ValueError):
    """The file was refused before parsing (too large, a zip bomb, external links, entities)."""


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
    """Encoding of an XML part from its first bytes (BOM or the NUL pattern of UTF-16)."""
    if head[:3] == b"\xef\xbb\xbf":
        return "utf-8-sig"
    if head[:2] == b"\xff\xfe" or head[1:2] == b"\x00":
        return "utf-16-le" if head[:2] != b"\xff\xfe" else "utf-16"
    if head[:2] == b"\xfe\xff" or head[:1] == b"\x00":
        return "utf-16-be" if head[:2] != b"\xfe\xff" else "utf-16"
    return "utf-8"


def _scan_xml_part(archive: zipfile.ZipFile, info: zipfile.ZipInfo, path: Path) -> None:
    """Refuse an XML part that declares a DOCTYPE or an entity (streamed, bounded by its size)."""
    tail = ""
    decoder = None
    with archive.open(info) as stream:
        while True:
            chunk = stream.read(_SCAN_CHUNK)
            if not chunk:
                break
            if decoder is None:
                decoder = codecs.getincrementaldecoder(_encoding_of(chunk))(errors="ignore")
            window = (tail + decoder.decode(chunk)).lower()
            for marker in _MARKERS:
                if marker in window:
                    raise UnsafeFileError(
                        f"{path}: part {info.filename} declares a DTD or entity "
                        f"({marker.upper()}); spreadsheet files never need one, so the file "
                        "is refused (possible entity-expansion attack)"
                    )
            tail = window[-16:]


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
        links = [n for n in names if n.startswith(_EXTERNAL_LINK_DIR) and n.endswith(".xml")]
        if links and not allow_external_links:
            raise UnsafeFileError(
                f"{p}: the workbook links to other files ({len(links)} external link(s), "
                f"{links[0]}); errdist does not follow external links. Break the links "
                "(Data > Edit Links > Break Link) and save again"
            )
        for info in infos:
            if info.filename.endswith((".xml", ".rels", ".vml")):
                _scan_xml_part(archive, info, p)
    return ZipSummary(p, p.stat().st_size, total, len(infos))
