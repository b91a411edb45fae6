"""``errdist check`` over the hostile-workbook corpus (tests/hostile_corpus.py).

For every corpus workbook: the exit code is the promised one (0 match, 1 differs, 2 refused or
unreadable), the message is one line naming the file or cell and what is wrong, no traceback
is printed, and no file is opened but the checked one and errdist's own private copies (a
Python audit hook logs every ``open``). Canary files beside the corpus (a valid workbook, a
zip bomb, a workbook in a folder named by absolute path) are what linked books point at.
"""

from __future__ import annotations

import os
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")
pytest.importorskip("formulas", reason="formulas not installed")

sys.path.insert(0, str(Path(__file__).parent))
from errdist import cli  # noqa: E402
from errdist.workbook import engine, safety  # noqa: E402
from hostile_corpus import Case, build_corpus, plain_book  # noqa: E402

_OPENED: list[str] | None = None


def _audit(event: str, args: tuple) -> None:
    if _OPENED is not None and event == "open" and args:
        target = args[0]
        if isinstance(target, (str, bytes, os.PathLike)):
            _OPENED.append(os.fsdecode(target))


sys.addaudithook(_audit)  # inert unless _OPENED is a list


@pytest.fixture(scope="module")
def corpus(tmp_path_factory: pytest.TempPathFactory) -> tuple[list[Case], list[Path]]:
    return build_corpus(tmp_path_factory.mktemp("corpus"))


def _case_ids() -> list[str]:
    import tempfile

    with tempfile.TemporaryDirectory() as tmp:
        return [c.name for c in build_corpus(Path(tmp))[0]]


CASE_IDS = _case_ids()
EXIT = {"match": 0, "differs": 1, "refused": 2}


@pytest.mark.parametrize("name", CASE_IDS)
def test_check_of_corpus_workbook(
    name: str, corpus: tuple[list[Case], list[Path]], capsys: pytest.CaptureFixture
) -> None:
    global _OPENED
    cases, canaries = corpus
    case = next(c for c in cases if c.name == name)
    before = {p: p.read_bytes() for p in case.path.parent.glob("*.xlsx")}
    _OPENED = []
    try:
        code = cli.main(["check", str(case.path)])
    finally:
        opened, _OPENED = _OPENED, None
    out, err = capsys.readouterr()
    assert code == EXIT[case.expect], (out, err)
    assert "Traceback" not in out + err
    text = out + err
    assert case.match in text
    if case.expect == "refused":
        assert err.count("\n") == 1 and str(case.path) in err  # one line, names the file
    # Nothing but the checked file and errdist's private copies was opened as a workbook.
    books = {Path(o).resolve() for o in opened if o.lower().endswith(".xlsx")}
    for book in books:
        assert book == case.path.resolve() or book.name == "book.xlsx", book
    for canary in canaries:
        assert canary.resolve() not in {Path(o).resolve() for o in opened}
    # No input file changed.
    assert {p: p.read_bytes() for p in before} == before


def test_engine_model_refuses_a_second_book(tmp_path: Path) -> None:
    # Last line of defence: even if a reference got past every scan, the engine's model
    # refuses to load any workbook but the private copy it was given.
    other = plain_book(tmp_path / "other.xlsx")
    book = plain_book(tmp_path / "book.xlsx")
    model = engine.evaluate._model_class()()
    model.add_book(str(book))
    with pytest.raises(engine.evaluate.PrivateBookOnly, match="another workbook"):
        model.add_book(str(other))


def test_utf16_xml_parts_still_accepted(tmp_path: Path) -> None:
    # Office Open XML allows UTF-16 parts (ECMA-376 Part 2, 8.1.4 / XML 1.0 section 4.3.3):
    # only UTF-32 and malformed XML are refused.
    base = plain_book(tmp_path / "base.xlsx")
    dst = tmp_path / "utf16.xlsx"
    with zipfile.ZipFile(base) as zin, zipfile.ZipFile(dst, "w") as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename == "xl/worksheets/sheet1.xml":
                text = data.decode().replace('encoding="UTF-8"', 'encoding="UTF-16"')
                data = text.encode("utf-16")
            zout.writestr(info.filename, data)
    assert safety.inspect_xlsx(dst).entries > 3


def test_formula_cell_limit_names_the_variable(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    book = plain_book(tmp_path / "many.xlsx", formulas=30)
    monkeypatch.setenv(safety.FORMULA_CELLS_ENV, "20")
    with pytest.raises(safety.UnsafeFileError, match="ERRDIST_MAX_FORMULA_CELLS=30"):
        safety.inspect_xlsx(book)
    monkeypatch.setenv(safety.FORMULA_CELLS_ENV, "30")
    assert safety.inspect_xlsx(book).entries > 3
    monkeypatch.setenv(safety.FORMULA_CELLS_ENV, "lots")
    with pytest.raises(ValueError, match="must be a positive integer"):
        safety.inspect_xlsx(book)


def test_unreadable_book_exit_code_differs_from_differs_code(tmp_path: Path) -> None:
    # Subprocess: the real command line, its exit code and no traceback on standard error.
    bad = tmp_path / "bad.xlsx"
    base = plain_book(tmp_path / "base.xlsx")
    with zipfile.ZipFile(base) as zin, zipfile.ZipFile(bad, "w") as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename == "xl/workbook.xml":
                data = data[:-20]
            zout.writestr(info.filename, data)
    env = {**os.environ, "PYTHONPATH": str(Path(__file__).parents[1] / "udfs")}
    run = subprocess.run(
        [sys.executable, "-m", "errdist.cli", "check", str(bad)],
        capture_output=True,
        text=True,
        env=env,
        timeout=120,
    )
    assert run.returncode == 2
    assert "not well-formed" in run.stderr and "Traceback" not in run.stderr


def test_spill_collapsed_to_one_error_stores_blanks_not_zeros(tmp_path: Path) -> None:
    # A dynamic-array result that is one error shows the error in the anchor and blanks
    # elsewhere (what a dynamic-array spreadsheet shows, common practice, no source). Refresh
    # used to store 0 in the other cells, so its own workbook then failed `errdist check`.
    from errdist.workbook.layout import Plan
    from errdist.workbook.writer import write_plan

    plan = Plan(title="t")
    sheet = plan.add_sheet("S")
    sheet.number("A1", 1.0)
    sheet.number("A2", 2.0)
    sheet.spill("B1", 2, 2, '=ERRDIST_FIT(A1:A2,"mle")')  # 2 numbers: #N/A for the whole
    values = engine.evaluate_details(write_plan(plan, tmp_path / "first.xlsx")).values
    assert values[("S", "B1")] == "#N/A" and values[("S", "C2")] is None
    book = write_plan(plan, tmp_path / "book.xlsx", values)
    from errdist.workbook.check import check_workbook, stored_values

    stored = stored_values(book)
    assert stored[("S", "B1")] == "#N/A"
    assert ("S", "C2") not in stored and ("S", "B2") not in stored  # blank, not 0
    assert check_workbook(book) == []
