"""Files the worksheet layer writes (the .bas module) get ordinary permissions."""

from __future__ import annotations

import os
import stat
import sys
from pathlib import Path

import pytest

from errdist.sheet._textfile import replace_text


@pytest.mark.skipif(sys.platform == "win32", reason="POSIX permission bits")
def test_new_file_gets_the_umask_mode_not_private(tmp_path: Path) -> None:
    old = os.umask(0o022)
    try:
        target = tmp_path / "module.bas"
        replace_text(target, "x", encoding="utf-8", newline="\n", prefix="t")
    finally:
        os.umask(old)
    assert stat.S_IMODE(target.stat().st_mode) == 0o644
    assert target.read_text() == "x"
    assert list(tmp_path.iterdir()) == [target]  # no temporary file left


@pytest.mark.skipif(sys.platform == "win32", reason="POSIX permission bits")
def test_existing_file_keeps_its_mode(tmp_path: Path) -> None:
    target = tmp_path / "functions.md"
    target.write_text("old")
    target.chmod(0o664)
    replace_text(target, "new", encoding="utf-8", newline="\n", prefix="t")
    assert stat.S_IMODE(target.stat().st_mode) == 0o664
    assert target.read_text() == "new"
