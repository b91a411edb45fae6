"""The ERRDIST_ functions live in LibreOffice Calc, and ``errdist check --engine libreoffice``.

The live tests install the generated Calc front end (:mod:`errdist.libreoffice`) into a
private LibreOffice profile, open a COPY of the committed template and of ``errdist demo``'s
output in headless LibreOffice (started by the code on a private pipe, stopped by its process
id), recalculate everything - the built-ins by Calc's own engine, every ERRDIST_ formula
through the Basic wrappers and errdist's Python - and read every formula cell back through UNO
as a full double. Each ERRDIST_ cell must equal the Python core called directly
(``tests/template_reference.py``: ``errdist.estimate.fit``, ``errdist.risk.value_at_risk`` ...,
from the cached values of its inputs) to 1e-12 relative, and the audit must find every cell
in agreement with the stored values.

LibreOffice's Python (Debian: the system ``/usr/bin/python3``) needs numpy/scipy/pandas of
errdist's versions. When the test environment runs the same Python minor version its
site-packages are used; otherwise a virtual environment is made with ``/usr/bin/python3 -m
venv`` and the wheels installed with pip (``ERRDIST_LO_VENV`` names a ready one). Without
soffice, python3-uno or the Python script provider the tests skip and say why.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
from pathlib import Path
from typing import Any

import numpy as np
import pytest

pytest.importorskip("openpyxl", reason="openpyxl is not installed")
pytest.importorskip("formulas", reason="formulas is not installed")

from errdist.libreoffice import basic, install  # noqa: E402
from template_reference import close, core_expected, read_book  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "workbook_template" / "errdist-monthly-risk.xlsx"
SYSTEM_PYTHON = "/usr/bin/python3"


# ------------------------------------------------------------------ generated text, install


def test_basic_module_has_one_wrapper_per_catalog_entry() -> None:
    from errdist.sheet.catalog import CATALOG

    text = basic.basic_module()
    for entry in CATALOG.values():
        params = ", ".join(f"Optional {p.name} As Variant" for p in entry.params)
        assert f"Function {entry.name}({params}) As Variant\n" in text, entry.name
        assert f'ErrdistCall("{entry.name}", Array(' in text
    assert text.count("\nFunction ERRDIST_") + text.startswith("Function ERRDIST_") == len(CATALOG)
    assert text.isascii()
    assert (
        "&lt;" not in text
        and "<" not in basic.module_xml(text).split(">", 3)[-1].split("</script:module>")[0]
    )


_XLB = """<?xml version="1.0" encoding="UTF-8"?>
<!DOCTYPE library:library PUBLIC "-//OpenOffice.org//DTD OfficeDocument 1.0//EN" "library.dtd">
<library:library xmlns:library="http://openoffice.org/2000/library" library:name="Standard" library:readonly="false" library:passwordprotected="false">
 <library:element library:name="Module1"/>
</library:library>
"""


def _fake_profile(folder: Path) -> Path:
    std = folder / "user" / "basic" / "Standard"
    std.mkdir(parents=True)
    (std / "script.xlb").write_text(_XLB, encoding="utf-8")
    (std / "Module1.xba").write_text("user's own module", encoding="utf-8")
    return folder


def test_install_is_idempotent_and_uninstall_removes_only_its_own(tmp_path: Path) -> None:
    prof = _fake_profile(tmp_path / "profile")
    venv = tmp_path / "venv"
    (venv / "lib" / "python3.11" / "site-packages").mkdir(parents=True)
    first = install.install(prof, venv)
    second = install.install(prof, venv)
    assert first == second
    xlb = (prof / "user/basic/Standard/script.xlb").read_text(encoding="utf-8")
    assert xlb.count('library:name="ErrdistFunctions"') == 1
    assert xlb.count('library:name="Module1"') == 1
    script = first.script.read_text(encoding="utf-8")
    compile(script, str(first.script), "exec")  # valid Python for LibreOffice's Python
    assert str((venv / "lib/python3.11/site-packages").resolve()) in script
    removed = install.uninstall(prof)
    assert sorted(removed) == sorted([first.script, first.module])
    xlb = (prof / "user/basic/Standard/script.xlb").read_text(encoding="utf-8")
    assert "ErrdistFunctions" not in xlb and 'library:name="Module1"' in xlb
    assert (prof / "user/basic/Standard/Module1.xba").read_text() == "user's own module"
    assert install.uninstall(prof) == []


def test_install_refuses_a_running_profile_and_a_venv_without_site_packages(
    tmp_path: Path,
) -> None:
    prof = _fake_profile(tmp_path / "profile")
    with pytest.raises(install.InstallError, match="site-packages"):
        install.install(prof, tmp_path / "not-a-venv")
    (prof / ".lock").write_text("")
    with pytest.raises(install.InstallError, match="close LibreOffice"):
        install.install(prof, tmp_path)


# ------------------------------------------------------------------ live in LibreOffice


def _skip_without_libreoffice() -> None:
    from errdist.libreoffice.recalc import LibreOfficeUnavailable, uno_python

    try:
        uno_python()
    except LibreOfficeUnavailable as exc:
        pytest.skip(str(exc))


@pytest.fixture(scope="session")
def lo_venv(tmp_path_factory: pytest.TempPathFactory) -> str | None:
    """The venv for LibreOffice's Python: None (this one) when the Python minor versions
    agree, else a fresh ``/usr/bin/python3`` venv with numpy/scipy/pandas from pip."""
    _skip_without_libreoffice()
    if os.environ.get("ERRDIST_LO_VENV"):
        return os.environ["ERRDIST_LO_VENV"]
    lo = install.libreoffice_python()
    here = f"{sys.version_info[0]}.{sys.version_info[1]}"
    if lo in (None, here):
        return None
    venv = tmp_path_factory.mktemp("lo-venv") / "venv"
    made = subprocess.run([SYSTEM_PYTHON, "-m", "venv", str(venv)], capture_output=True)
    if made.returncode != 0:
        pytest.skip(f"{SYSTEM_PYTHON} -m venv failed (python3-venv missing?)")
    pip = subprocess.run(
        [str(venv / "bin" / "pip"), "install", "-q", "numpy>=1.24", "scipy>=1.11", "pandas>=2.0"],
        capture_output=True,
        text=True,
        timeout=900,
    )
    if pip.returncode != 0:
        pytest.skip(
            f"pip could not install numpy/scipy/pandas for LibreOffice's Python: "
            f"{pip.stderr.strip().splitlines()[-1:]}"
        )
    return str(venv)


@pytest.fixture(scope="module")
def demo_book(tmp_path_factory: pytest.TempPathFactory) -> Path:
    from errdist.cli import main

    out = tmp_path_factory.mktemp("demo") / "demo.xlsx"
    assert main(["demo", "--out", str(out)]) == 0
    return out


def _a1(r: int, c: int) -> str:
    from openpyxl.utils.cell import get_column_letter

    return f"{get_column_letter(c)}{r}"


def _errdist_cells_agree_with_core(book_path: Path, venv: str | None) -> int:
    """Recalculate live in LibreOffice; every ERRDIST_ cell == the core called directly."""
    from errdist.libreoffice.recalc import recalculate

    rec = recalculate(book_path, venv=venv)
    book = read_book(book_path)
    compared, bad = 0, []
    for f in book.formulas:
        if not f.name.startswith("ERRDIST_"):
            continue
        if f.name == "ERRDIST_VERSION":
            got = rec.values[(f.sheet, f.anchor)]
            # The live cell names LibreOffice's Python, not the one that built the file.
            assert str(got).startswith("errdist ") and "Python 3." in str(got), got
            continue
        want = np.asarray(core_expected(book, f), dtype=object)
        rows, cols = f.shape
        for (i, j), expected in np.ndenumerate(want.reshape(rows, cols)):
            r, c = f.cells()[i * cols + j]
            key = (f.sheet, _a1(r, c))
            compared += 1
            # The core reference is the independent check (1e-12 relative, through UNO).
            if not close(rec.values.get(key), expected, rel=1e-12):
                bad.append((key, f.text, rec.values.get(key), expected))
    assert not bad, f"{len(bad)} ERRDIST_ cells differ from the core, first: {bad[:5]}"
    assert rec.version.startswith("LibreOffice")
    return compared


@pytest.mark.libreoffice
def test_template_errdist_cells_live_in_libreoffice_equal_the_core(lo_venv: Any) -> None:
    assert _errdist_cells_agree_with_core(TEMPLATE, lo_venv) > 5000


@pytest.mark.libreoffice
def test_demo_errdist_cells_live_in_libreoffice_equal_the_core(
    lo_venv: Any, demo_book: Path
) -> None:
    assert _errdist_cells_agree_with_core(demo_book, lo_venv) > 5000


@pytest.mark.libreoffice
def test_check_engine_libreoffice_passes_the_demo_and_catches_a_changed_value(
    lo_venv: Any, demo_book: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    from errdist.cli import main

    args = ["check", str(demo_book), "--engine", "libreoffice"]
    if lo_venv:
        args += ["--venv", lo_venv]
    assert main(args) == 0
    out = capsys.readouterr().out
    assert re.search(r"all [\d,]{5,} formula cells match", out) and "LibreOffice" in out
    # A stored value edited in the XML (the cached ES of Risk!C31) must be caught.
    edited = tmp_path / "edited.xlsx"
    _edit_cached(demo_book, edited, "Risk", "C31", "0.05")
    args[1] = str(edited)
    assert main(args) == 1
    assert "Risk!C31" in capsys.readouterr().out


def _sheet_part(book: Path, sheet: str) -> str:
    from errdist.workbook.engine import sheet_parts

    return sheet_parts(book)[sheet]


def _edit_cached(src: Path, dst: Path, sheet: str, cell: str, value: str) -> None:
    import zipfile

    part = _sheet_part(src, sheet)
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        for item in zin.infolist():
            data = zin.read(item.filename)
            if item.filename == part:
                text = data.decode("utf-8")
                text, n = re.subn(
                    rf'(<c r="{cell}"[^>]*>(?:<f>[^<]*</f>)?<v>)[^<]*(</v>)',
                    rf"\g<1>{value}\g<2>",
                    text,
                )
                assert n == 1
                data = text.encode("utf-8")
            zout.writestr(item, data)


def test_check_without_libreoffice_says_what_to_install(
    monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    from errdist.cli import main

    monkeypatch.setattr(shutil, "which", lambda name: None)
    assert main(["check", str(TEMPLATE), "--engine", "libreoffice"]) == 2
    err = capsys.readouterr().err
    assert "apt-get install" in err and "libreoffice-calc" in err
