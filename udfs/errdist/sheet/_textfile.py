"""Replace a text file in one step (for the generated function reference and VBA module)."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

__all__ = ["replace_text"]


def replace_text(path: Path, text: str, *, encoding: str, newline: str, prefix: str) -> None:
    """Write ``text`` to a temporary file beside ``path``, then move it onto ``path``.

    The folder must exist. On any error the temporary file is removed and ``path`` is left as
    it was; the error propagates.
    """
    fd, tmp = tempfile.mkstemp(prefix=prefix, suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "w", encoding=encoding, newline=newline) as fh:
            fh.write(text)
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
