"""Shared fixtures."""

from __future__ import annotations

import json
import shutil
import subprocess
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest

#: The system Python that has python3-uno (the venv's Python cannot import ``uno``).
SYSTEM_PYTHON = "/usr/bin/python3"
#: Runs one job in LibreOffice through UNO: see its docstring for the job's keys.
UNO_SCRIPT = Path(__file__).resolve().parent / "uno_crosscheck.py"


def _run_uno_job(job: dict[str, Any], folder: Path) -> dict[str, Any]:
    """Write ``job`` to ``folder/job.json``, run it in LibreOffice, return the result JSON."""
    job_path = folder / "job.json"
    job_path.write_text(json.dumps(job))
    proc = subprocess.run(
        [SYSTEM_PYTHON, str(UNO_SCRIPT), str(job_path)],
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert proc.returncode == 0, proc.stderr[-2000:]
    return json.loads(Path(job["out"]).read_text())


@pytest.fixture(scope="session")
def libreoffice() -> Callable[[dict[str, Any], Path], dict[str, Any]]:
    """``run(job, folder) -> result``: a UNO job in LibreOffice (``tests/uno_crosscheck.py``).

    Skips, with the reason, when LibreOffice (soffice) or python3-uno is not installed.
    """
    if shutil.which("soffice") is None:
        pytest.skip("LibreOffice (soffice) is not installed")
    if not Path(SYSTEM_PYTHON).exists():
        pytest.skip(f"{SYSTEM_PYTHON} is not installed (needed for python3-uno)")
    probe = subprocess.run([SYSTEM_PYTHON, "-c", "import uno"], capture_output=True)
    if probe.returncode != 0:
        pytest.skip("python3-uno is not installed (import uno fails in /usr/bin/python3)")
    return _run_uno_job
