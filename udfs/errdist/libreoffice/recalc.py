"""Recalculate a workbook live in headless LibreOffice Calc and return every formula's value.

:func:`recalculate` copies the workbook into a temporary folder, installs the Calc functions
(:mod:`errdist.libreoffice.install`) into a private LibreOffice profile there, and runs
``uno_recalc.py`` with the Python that has LibreOffice's ``uno`` module. That script starts
``soffice --headless`` on a private pipe (no network port), opens the copy, calls
``calculateAll()`` - every ERRDIST_ formula runs through the Basic wrappers and errdist's
Python, every built-in through Calc's own engine - reads every formula cell as a full double
through UNO, and stops LibreOffice (killed by its process id if it does not exit). The
temporary folder, profile included, is removed at the end; the user's own profile is not used.

Needs ``soffice``, LibreOffice's Python bridge and its Python script provider (Debian:
``apt-get install libreoffice-calc python3-uno libreoffice-script-provider-python``); when one
is missing :class:`LibreOfficeUnavailable` says which.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from errdist.libreoffice.install import install

__all__ = [
    "ERROR_CODES",
    "LibreOfficeFailed",
    "LibreOfficeUnavailable",
    "Recalculation",
    "recalculate",
    "uno_python",
]

#: LibreOffice's error numbers -> the spreadsheet error codes they are shown as in .xlsx.
ERROR_CODES: dict[int, str] = {
    503: "#NUM!",
    519: "#VALUE!",
    32767: "#N/A",
    525: "#NAME?",
    532: "#DIV/0!",
    524: "#REF!",
    521: "#NULL!",
}

_SCRIPT = Path(__file__).with_name("uno_recalc.py")
_PROVIDER = "/usr/lib/libreoffice/program/pythonscript.py"


class LibreOfficeUnavailable(OSError):
    """LibreOffice or one of its Python parts is missing (the message names it)."""


class LibreOfficeFailed(OSError):
    """LibreOffice did not finish the recalculation (the message says how it ended)."""


@dataclass(frozen=True)
class Recalculation:
    """Every formula cell of a workbook as LibreOffice recalculated it.

    Attributes
    ----------
    values : dict
        ``(sheet, "A1") -> value``: float, str, None (blank) or an error code such as
        ``"#NUM!"`` (``"Err:504"`` for LibreOffice's own errors without an Excel code).
    version : str
        LibreOffice's name and version.
    timings : dict
        Seconds: ``start``, ``load``, ``calculate``, ``read`` (inside LibreOffice) and
        ``total`` (this call, install and clean-up included).
    """

    values: dict[tuple[str, str], Any]
    version: str
    timings: dict[str, float] = field(default_factory=dict)


def uno_python() -> str:
    """The Python that can import LibreOffice's ``uno`` (``ERRDIST_UNO_PYTHON`` or
    ``/usr/bin/python3``).

    Raises
    ------
    LibreOfficeUnavailable
        No soffice, no ``uno`` module, or no Python script provider.
    """
    if shutil.which("soffice") is None:
        raise LibreOfficeUnavailable(
            "LibreOffice (soffice) is not installed; on Debian/Ubuntu: apt-get install "
            "libreoffice-calc python3-uno libreoffice-script-provider-python"
        )
    exe = os.environ.get("ERRDIST_UNO_PYTHON", "/usr/bin/python3")
    try:
        ok = (
            subprocess.run([exe, "-c", "import uno"], capture_output=True, timeout=60).returncode
            == 0
        )
    except (OSError, subprocess.TimeoutExpired):
        ok = False
    if not ok:
        raise LibreOfficeUnavailable(
            f"{exe} cannot import LibreOffice's uno module; on Debian/Ubuntu: apt-get install "
            "python3-uno (or set ERRDIST_UNO_PYTHON to the Python that has it)"
        )
    if Path("/usr/lib/libreoffice/program").is_dir() and not Path(_PROVIDER).exists():
        raise LibreOfficeUnavailable(
            "LibreOffice's Python script provider is missing; on Debian/Ubuntu: apt-get "
            "install libreoffice-script-provider-python"
        )
    return exe


def _value(kind: str, value: Any) -> Any:
    if kind == "value":
        return float(value)
    if kind == "text":
        return str(value)
    if kind == "error":
        return ERROR_CODES.get(int(value), f"Err:{int(value)}")
    return None


def recalculate(
    book: str | os.PathLike[str],
    *,
    venv: str | os.PathLike[str] | None = None,
    pdf: str | os.PathLike[str] | None = None,
    timeout: float = 600.0,
) -> Recalculation:
    """Open a copy of ``book`` in headless LibreOffice, recalculate everything, read it back.

    Parameters
    ----------
    book : path-like
        The workbook (.xlsx or .ods); only a copy is opened.
    venv : path-like, optional
        Virtual environment for LibreOffice's Python (see
        :func:`errdist.libreoffice.install.install`); default the running one.
    pdf : path-like, optional
        Also export the recalculated copy to this PDF file.
    timeout : float
        Seconds before LibreOffice is stopped and the call fails.

    Returns
    -------
    Recalculation
    """
    t0 = time.perf_counter()
    exe = uno_python()
    with tempfile.TemporaryDirectory(prefix="errdist-lo-") as tmp:
        tmpdir = Path(tmp)
        copy = tmpdir / ("book" + Path(book).suffix.lower())
        shutil.copyfile(book, copy)
        profile = tmpdir / "profile"
        install(profile, venv)
        job = {
            "book": str(copy),
            "profile": str(profile),
            "out": str(tmpdir / "result.json"),
        }
        if pdf is not None:
            job["pdf"] = str(Path(pdf).resolve())
        (tmpdir / "job.json").write_text(json.dumps(job), encoding="utf-8")
        proc = subprocess.Popen(
            [exe, str(_SCRIPT), str(tmpdir / "job.json")],
            env=_clean_env(),
            stdin=subprocess.DEVNULL,
            stdout=subprocess.PIPE,
            stderr=subprocess.PIPE,
            text=True,
            start_new_session=True,
        )
        try:
            _, err = proc.communicate(timeout=timeout)
        except subprocess.TimeoutExpired:
            _stop_group(proc)
            raise LibreOfficeFailed(f"LibreOffice did not finish within {timeout:g} s") from None
        if proc.returncode != 0 or not (tmpdir / "result.json").exists():
            last = (err or "").strip().splitlines()[-1:] or ["no message"]
            raise LibreOfficeFailed(f"LibreOffice recalculation failed: {last[0]}")
        result = json.loads((tmpdir / "result.json").read_text(encoding="utf-8"))
    values = {(s, a1): _value(kind, v) for s, a1, kind, v in result["cells"]}
    timings = {k: float(v) for k, v in result["timings"].items()}
    timings["total"] = time.perf_counter() - t0
    return Recalculation(values, str(result["version"]), timings)


def _clean_env() -> dict[str, str]:
    """The environment for LibreOffice without this Python's settings: with PYTHONPATH set,
    LibreOffice's Python could not import errdist.libreoffice (measured on 7.4); the user
    script adds the folders it needs itself. The environment is built from a short list of
    names (home, user, locale, temporary folders) and the system's PATH: with a virtual
    environment's or pyenv's ``python3`` on PATH, LibreOffice's embedded Python failed to start
    ("can't import __main__ module", measured on 7.4)."""
    keep = ("HOME", "USER", "LOGNAME", "LANG", "LANGUAGE", "TMPDIR", "TMP", "TEMP", "TZ")
    env = {
        k: v
        for k, v in os.environ.items()
        if k in keep or k.startswith(("LC_", "XDG_", "SAL_", "SOFFICE", "ERRDIST_"))
    }
    # Only the system's folders on PATH (plus soffice's own): an activated or pyenv Python
    # found there makes LibreOffice's embedded Python fail to start.
    system = ["/usr/local/bin", "/usr/bin", "/bin", "/usr/local/sbin", "/usr/sbin", "/sbin"]
    soffice = shutil.which("soffice")
    if soffice:
        system.insert(0, os.path.dirname(os.path.realpath(soffice)))
    env["PATH"] = os.pathsep.join(dict.fromkeys(system))
    return env


def _stop_group(proc: subprocess.Popen[str]) -> None:
    """Stop the driver and the soffice it started (its own process group), by id."""
    import signal

    try:
        os.killpg(proc.pid, signal.SIGTERM)
        proc.wait(timeout=10)
    except (ProcessLookupError, subprocess.TimeoutExpired):
        try:
            os.killpg(proc.pid, signal.SIGKILL)
        except ProcessLookupError:
            pass
        proc.wait()
