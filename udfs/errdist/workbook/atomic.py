"""Atomic file writes: the target is either the complete new file or untouched.

The content goes to a temporary file in the target's own folder (same file system), is flushed
and ``fsync``-ed, and is then moved into place in one step: ``os.link`` when the target must not
be overwritten (fails if it appeared meanwhile), ``os.replace`` with ``force``. On any error the
temporary file is removed, so no partial file is ever left behind, and an existing target is
never overwritten without ``force``. The temporary file's name carries the host and process
id (``.out.xlsx.errdist-HOST-PID-XXXX.tmp``): one left by a killed process is removed by the
next write into the same folder (:mod:`errdist._tempfiles`).
"""

from __future__ import annotations

import contextlib
import os
import tempfile
from collections.abc import Callable, Iterator
from pathlib import Path

from errdist import _tempfiles


def _exists_message(target: Path) -> str:
    return f"{target} exists; use --force to overwrite"


def check_target(target: str | os.PathLike[str], *, force: bool = False) -> Path:
    """Check that ``target`` can be written: its folder exists, and it is absent unless ``force``.

    Raises
    ------
    FileExistsError
        ``"<target> exists; use --force to overwrite"``.
    FileNotFoundError
        The folder does not exist.
    IsADirectoryError
        The target is a folder.
    """
    t = Path(target)
    parent = t.parent if str(t.parent) else Path(".")
    if not parent.is_dir():
        raise FileNotFoundError(f"{parent}: folder does not exist (for {t})")
    if t.is_dir():
        raise IsADirectoryError(f"{t} is a folder, not a file")
    if t.exists() and not force:
        raise FileExistsError(_exists_message(t))
    return t


def _fsync_dir(folder: Path) -> None:
    if os.name != "posix":
        return
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _default_mode() -> int:
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


@contextlib.contextmanager
def atomic_path(target: str | os.PathLike[str], *, force: bool = False) -> Iterator[Path]:
    """Context manager yielding a temporary path to write; moved onto ``target`` on success.

    Parameters
    ----------
    target : path-like
        Final file.
    force : bool
        Overwrite an existing ``target``.

    Examples
    --------
    >>> with atomic_path("out.xlsx") as tmp:  # doctest: +SKIP
    ...     build(tmp)
    """
    t = check_target(target, force=force)
    folder = t.parent if str(t.parent) else Path(".")
    _tempfiles.sweep(folder)  # leftovers of a killed earlier run in this folder
    fd, name = tempfile.mkstemp(prefix=_tempfiles.sibling_prefix(t.name), suffix=".tmp", dir=folder)
    os.close(fd)
    tmp = Path(name)
    try:
        yield tmp
        if not tmp.exists() or tmp.stat().st_size == 0:
            raise OSError(f"nothing was written for {t}")
        os.chmod(tmp, _default_mode())
        with open(tmp, "rb+") as fh:
            os.fsync(fh.fileno())
        if force:
            os.replace(tmp, t)
        else:
            try:
                os.link(tmp, t)  # atomic, and refuses to clobber a file that appeared meanwhile
            except FileExistsError:
                raise FileExistsError(_exists_message(t)) from None
            except OSError:  # file system without hard links
                if t.exists():
                    raise FileExistsError(_exists_message(t)) from None
                os.replace(tmp, t)
        _fsync_dir(folder)
    finally:
        with contextlib.suppress(FileNotFoundError):
            tmp.unlink()


def atomic_write(
    target: str | os.PathLike[str], write: Callable[[Path], object], *, force: bool = False
) -> Path:
    """Write ``target`` atomically with ``write(tmp_path)``.

    Parameters
    ----------
    target : path-like
        Final file.
    write : callable
        Writes the whole content to the path it is given.
    force : bool
        Overwrite an existing ``target``.

    Returns
    -------
    pathlib.Path
        ``target``.
    """
    with atomic_path(target, force=force) as tmp:
        write(tmp)
    return Path(target)


def atomic_write_bytes(target: str | os.PathLike[str], data: bytes, *, force: bool = False) -> Path:
    """Write ``data`` to ``target`` atomically (see :func:`atomic_write`)."""
    return atomic_write(target, lambda p: p.write_bytes(data), force=force)
