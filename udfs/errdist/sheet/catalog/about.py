"""Catalog entries about the add-in itself: the versions in use (for audit trails)."""

from __future__ import annotations

import sys

from errdist.sheet.entry import Entry

__all__ = ["ENTRIES"]


def _version() -> str:
    import numpy
    import scipy

    import errdist

    try:
        from importlib.metadata import version

        xlwings_version = version("xlwings")
    except Exception:  # not installed: the headless engine still works
        xlwings_version = "not installed"
    py = ".".join(map(str, sys.version_info[:3]))
    return (
        f"errdist {errdist.__version__}; numpy {numpy.__version__}; scipy {scipy.__version__}; "
        f"xlwings {xlwings_version}; Python {py}"
    )


ENTRIES: tuple[Entry, ...] = (
    Entry(
        name="ERRDIST_VERSION",
        core=_version,
        params=(),
        result="scalar",
        summary="The versions of errdist, numpy, scipy, xlwings and Python in use, as one "
        "text (for audit trails).",
    ),
)
"""This subject's worksheet functions, in catalog order."""
