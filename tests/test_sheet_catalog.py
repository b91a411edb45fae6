"""The catalog's rules, and the files derived from it (function reference, VBA module)."""

from __future__ import annotations

import argparse
import keyword
from pathlib import Path

import pytest

from errdist.sheet import docs, vba
from errdist.sheet.catalog import CATALOG, evaluate
from errdist.sheet.entry import CATEGORY, Entry, Param

ROOT = Path(__file__).resolve().parents[1]
# Words VBA reserves (a parameter named like one breaks the generated wrapper); from memory.
VBA_RESERVED = {
    "and", "as", "boolean", "byref", "byte", "byval", "call", "case", "const", "currency",
    "date", "dim", "do", "double", "each", "else", "end", "erase", "error", "exit", "false",
    "for", "function", "get", "global", "goto", "if", "in", "integer", "is", "let", "like",
    "long", "loop", "me", "mod", "new", "next", "not", "nothing", "object", "on", "option",
    "optional", "or", "paramarray", "private", "property", "public", "redim", "resume",
    "return", "select", "set", "single", "static", "step", "stop", "string", "sub", "then",
    "to", "true", "type", "until", "variant", "wend", "while", "with", "xor", "array",
    "caller",
}  # fmt: skip


@pytest.mark.parametrize("name", list(CATALOG))
def test_entry_rules(name: str) -> None:
    entry = CATALOG[name]
    assert name.startswith("ERRDIST_") and name == entry.name
    assert entry.category == CATEGORY == "Error distribution"
    assert 0 < len(entry.summary) <= 255 and entry.summary.isascii()
    for p in entry.params:
        assert 0 < len(p.doc) <= 255 and p.doc.isascii(), p.name
        assert p.name.lower() not in VBA_RESERVED and not keyword.iskeyword(p.name)
    evaluate(name, *entry.example)  # the examples are valid: no SheetError


def test_entry_validation_refuses_bad_definitions() -> None:
    good = Param("x", "number", "x", example=1.0)
    with pytest.raises(ValueError, match="ERRDIST_"):
        Entry(name="MYFUNC", core=abs, params=(good,), result="spill", summary="s")
    with pytest.raises(ValueError, match="255"):
        Entry(name="ERRDIST_X", core=abs, params=(good,), result="spill", summary="s" * 256)
    with pytest.raises(ValueError, match="after an optional"):
        Entry(
            name="ERRDIST_X",
            core=abs,
            params=(Param("a", "flag", "a", default=False, example=False), good),
            result="spill",
            summary="s",
        )
    with pytest.raises(ValueError, match="spill=False"):
        Entry(name="ERRDIST_X", core=abs, params=(good,), result="table", summary="s")
    with pytest.raises(ValueError, match="example"):
        Param("x", "number", "x")


def test_function_reference_is_current() -> None:
    path = ROOT / "docs" / "functions.md"
    assert path.read_text(encoding="utf-8") == docs.render(), (
        "docs/functions.md is stale: run python -m errdist.sheet.docs"
    )


def test_function_reference_content() -> None:
    text = docs.render()
    for name in CATALOG:
        assert f"### {name}" in text
    # The naming trap: VaR is Value-at-Risk, the law's variance is ERRDIST_VARIANCE.
    assert "`ERRDIST_VAR` is **Value-at-Risk**" in text
    assert "variance of the law is `ERRDIST_VARIANCE`" in text


def test_docs_check_mode(tmp_path: Path) -> None:
    out = tmp_path / "functions.md"
    assert docs.main(["--out", str(out), "--check"]) == 1
    assert docs.main(["--out", str(out)]) == 0
    assert docs.main(["--out", str(out), "--check"]) == 0


def test_vba_command_writes_crlf_ascii_file(tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    out = tmp_path / "errdist_udfs.bas"
    assert vba.main(argparse.Namespace(out=str(out))) == 0
    raw = out.read_bytes()
    assert raw.startswith(b'Attribute VB_Name = "errdist_udfs"\r\n')
    assert b"\n" not in raw.replace(b"\r\n", b"")  # the VBA editor wants CRLF
    raw.decode("ascii")
    assert vba.main(argparse.Namespace(out=None)) == 0
    assert capsys.readouterr().out == raw.decode("ascii").replace("\r\n", "\n")
    bad = tmp_path / "no" / "such" / "dir" / "x.bas"
    assert vba.main(argparse.Namespace(out=str(bad))) == 2
    assert "cannot write" in capsys.readouterr().err


def test_vba_continuation_limit() -> None:
    # VBA allows at most 24 line continuations in one statement (from memory).
    statement_lines = 0
    for line in vba.vba_module().splitlines():
        if line.endswith(" _"):
            statement_lines += 1
            assert statement_lines <= 24
        else:
            statement_lines = 0
