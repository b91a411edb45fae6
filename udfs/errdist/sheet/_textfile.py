"""Replace a text file in one step (for the generated function reference and VBA module)."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from errdist import _tempfiles

__all__ = ["replace_text"]


def _umask() -> int:
    """The process's file-creation mask (read by setting and restoring it)."""
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def replace_text(
    path: Path,
    text: str,
    *,
    encoding: str,
    newline: str,
    prefix: str,
    overwrite: bool = True,
) -> None:
    """Write ``text`` to a temporary file beside ``path``, then move it onto ``path``.

    The folder must exist. With ``overwrite=False`` the move is ``os.link`` (atomic, and it
    fails with ``FileExistsError`` when ``path`` exists, even if it appeared meanwhile). On any
    error the temporary file is removed and ``path`` is left as it was; the error propagates.
    """
    _tempfiles.sweep(path.parent)
    fd, tmp = tempfile.mkstemp(
        prefix=_tempfiles.sibling_prefix(path.name), suffix=".tmp", dir=path.parent
    )
    try:
        with os.fdopen(fd, "w", encoding=encoding, newline=newline) as fh:
            fh.write(text)
        # mkstemp creates the file private (0600); give it the mode a plain write would have
        mode = path.stat().st_mode & 0o777 if path.exists() else 0o666 & ~_umask()
        os.chmod(tmp, mode)
        if overwrite:
            os.replace(tmp, path)
        else:
            os.link(tmp, path)  # refuses to clobber an existing file
            Path(tmp).unlink()
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
