"""Temporary files that can be told apart and cleaned up, even after ``kill -9``.

Every temporary name errdist makes carries the host and the process id of its maker:

- the per-run folder ``<tmp>/errdist-run-<host>-<pid>-XXXX/``: :func:`run_folder` makes it at
  the start of a command and points :data:`tempfile.tempdir` at it, so every temporary file of
  the run (errdist's own, and those of the libraries it calls) lands inside; it is removed when
  the command ends, also on Ctrl+C and SIGTERM;
- a file being written next to its destination, ``.<name>.errdist-<host>-<pid>-XXXX.tmp``
  (:func:`sibling_prefix`), moved into place in one step or removed.

Only SIGKILL (or a power cut) can leave one behind. :func:`sweep` removes leftovers of this
host whose process is gone: the next command run in the same folder (or using the same
temporary folder) calls it, so they never pile up. A leftover of a process still running, or
of another host (a shared network folder), is left alone.
"""

from __future__ import annotations

import contextlib
import os
import re
import shutil
import socket
import tempfile
from collections.abc import Iterator
from pathlib import Path

_HOST = re.sub(r"[^A-Za-z0-9]", "", socket.gethostname())[:24] or "host"
_RUN = re.compile(r"^errdist-run-(?P<host>[A-Za-z0-9]+)-(?P<pid>\d+)-")
_SIBLING = re.compile(r"^\..*\.errdist-(?P<host>[A-Za-z0-9]+)-(?P<pid>\d+)-[^.]*\.tmp$")


def sibling_prefix(name: str) -> str:
    """Prefix of a temporary file written beside ``name`` (pass to ``tempfile.mkstemp``)."""
    return f".{name}.errdist-{_HOST}-{os.getpid()}-"


def _gone(host: str, pid: str) -> bool:
    """True when the maker of a leftover was this host's process ``pid`` and it has ended."""
    if host != _HOST:
        return False
    try:
        os.kill(int(pid), 0)
    except ProcessLookupError:
        return True
    except (PermissionError, OverflowError, ValueError):
        return False
    return False


def sweep(folder: str | os.PathLike[str] | None = None) -> list[Path]:
    """Remove leftovers of ended errdist processes from ``folder`` (default: the system's
    temporary folder); returns what was removed. Never raises."""
    base = Path(folder) if folder is not None else Path(_system_tmp())
    removed: list[Path] = []
    try:
        entries = list(os.scandir(base))
    except OSError:
        return removed
    for entry in entries:
        m = _RUN.match(entry.name) or _SIBLING.match(entry.name)
        if not m or not _gone(m["host"], m["pid"]):
            continue
        path = Path(entry.path)
        with contextlib.suppress(OSError):
            if entry.is_dir(follow_symlinks=False):
                shutil.rmtree(path)
            else:
                path.unlink()
            removed.append(path)
    return removed


_SYSTEM_TMP: str | None = None


def _system_tmp() -> str:
    return _SYSTEM_TMP or tempfile.gettempdir()


@contextlib.contextmanager
def run_folder() -> Iterator[Path]:
    """A private temporary folder for one command; every temporary file goes inside.

    Sweeps leftovers of killed runs first, then sets :data:`tempfile.tempdir` to the new
    folder until the block ends, and removes the folder (whatever is in it) at the end.
    """
    global _SYSTEM_TMP
    previous = tempfile.tempdir
    _SYSTEM_TMP = tempfile.gettempdir()
    sweep(_SYSTEM_TMP)
    folder = Path(tempfile.mkdtemp(prefix=f"errdist-run-{_HOST}-{os.getpid()}-"))
    tempfile.tempdir = str(folder)
    try:
        yield folder
    finally:
        tempfile.tempdir = previous
        _SYSTEM_TMP = None
        shutil.rmtree(folder, ignore_errors=True)
