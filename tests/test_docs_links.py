"""Every relative Markdown link and image in the documentation points at something that exists.

Checked pages: README.md, DEVELOPERS.md, docs/*.md and workbook_template/README.md. A link
``[text](path)`` or image ``![alt](path)`` with a relative path must name an existing file or
folder (relative to the page); a ``#anchor`` (on its own or after a .md path) must match a
heading of the target page under GitHub's heading-anchor rule (lower case, punctuation other
than "-" and "_" dropped, spaces to "-"; from memory). Links inside code blocks and inline code
are not links and are skipped; absolute URLs (http, https, mailto) are not checked here.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
PAGES = sorted(
    [ROOT / "README.md", ROOT / "DEVELOPERS.md", ROOT / "workbook_template" / "README.md"]
    + list((ROOT / "docs").glob("*.md"))
)

_FENCE = re.compile(r"^(```|~~~).*?^\1[^\n]*$", re.MULTILINE | re.DOTALL)
_INLINE_CODE = re.compile(r"`[^`\n]*`")
_LINK = re.compile(r"!?\[[^\]\n]*\]\(\s*<?([^)\s>]+)>?(?:\s+\"[^\"]*\")?\s*\)")
_HEADING = re.compile(r"^#{1,6}\s+(.+?)\s*#*\s*$", re.MULTILINE)


def _prose(text: str) -> str:
    """The page without fenced code blocks and inline code spans."""
    return _INLINE_CODE.sub("", _FENCE.sub("", text))


def links(text: str) -> list[str]:
    """Targets of the Markdown links and images of a page, outside code."""
    return _LINK.findall(_prose(text))


def slug(heading: str) -> str:
    """GitHub's anchor for a heading (from memory): markup stripped, lower case, punctuation
    other than '-' and '_' dropped, each space a '-'."""
    text = re.sub(r"[`*]", "", heading).strip().lower()
    text = re.sub(r"[^\w\- ]", "", text)
    return text.replace(" ", "-")


def anchors(page: Path) -> set[str]:
    found: set[str] = set()
    seen: dict[str, int] = {}
    for heading in _HEADING.findall(_FENCE.sub("", page.read_text(encoding="utf-8"))):
        base = slug(heading)
        k = seen.get(base, 0)
        seen[base] = k + 1
        found.add(base if k == 0 else f"{base}-{k}")
    return found


def broken_links(page: Path) -> list[str]:
    """Relative links of ``page`` whose file or anchor does not exist."""
    bad: list[str] = []
    for target in links(page.read_text(encoding="utf-8")):
        if re.match(r"^[a-z][a-z0-9+.-]*:", target, re.IGNORECASE):
            continue  # http:, https:, mailto: ...
        path_part, _, anchor = target.partition("#")
        dest = (page.parent / path_part).resolve() if path_part else page
        if not dest.exists():
            bad.append(f"{target}: no such file")
            continue
        if anchor and dest.suffix == ".md" and anchor not in anchors(dest):
            bad.append(f"{target}: no heading with anchor #{anchor}")
    return bad


@pytest.mark.parametrize("page", PAGES, ids=[str(p.relative_to(ROOT)) for p in PAGES])
def test_relative_links_resolve(page: Path) -> None:
    assert broken_links(page) == []


def test_pages_are_found_and_have_links() -> None:
    # guards against a glob that silently finds nothing
    names = {p.relative_to(ROOT).as_posix() for p in PAGES}
    assert {"README.md", "DEVELOPERS.md", "docs/functions.md", "docs/template.md"} <= names
    assert any(links(p.read_text(encoding="utf-8")) for p in PAGES)


def test_function_reference_anchors_are_checked() -> None:
    # the generated reference links its table rows to its own headings (#errdist_pdf ...)
    page = ROOT / "docs" / "functions.md"
    targets = [t for t in links(page.read_text(encoding="utf-8")) if t.startswith("#")]
    assert "#errdist_pdf" in targets
    assert "errdist_pdf" in anchors(page)


def test_checker_reports_missing_file_and_anchor(tmp_path: Path) -> None:
    (tmp_path / "img").mkdir()
    (tmp_path / "img" / "a.png").write_bytes(b"")
    (tmp_path / "other.md").write_text("# Other page\n\n## Rolling `VaR`, forecasts\n")
    page = tmp_path / "page.md"
    page.write_text(
        "# Top\n"
        "[ok](other.md) [ok](other.md#rolling-var-forecasts) ![ok](img/a.png) [ok](#top)\n"
        "[bad](missing.md) ![bad](img/b.png) [bad](other.md#nowhere) [web](https://x.org/y)\n"
        "`[code](not-a-link.md)`\n"
        "```\n[fenced](not-a-link-either.md)\n```\n",
        encoding="utf-8",
    )
    assert broken_links(page) == [
        "missing.md: no such file",
        "img/b.png: no such file",
        "other.md#nowhere: no heading with anchor #nowhere",
    ]
