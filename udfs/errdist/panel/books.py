"""``--book-per-series DIR``: one monthly risk workbook per usable series, as refresh builds it.

Each book is :func:`errdist.workbook.template.build_workbook` on the series' validated prices
(the refresh code, with its headless evaluation: 10-25 s a book). The books are built in a
hidden staging folder inside ``DIR`` and moved into place only when every book is done, so
Ctrl-C leaves ``DIR`` as it was. A series too short for the monthly book (it needs a
250-return backtest window) gets no book and the reason instead.
"""

from __future__ import annotations

import os
import re
import shutil
import tempfile
from collections.abc import Callable
from pathlib import Path

from errdist.panel.inputs import PanelInput
from errdist.workbook.atomic import check_target

__all__ = ["book_names", "write_books"]


def _safe(name: str) -> str:
    stem = re.sub(r"[^A-Za-z0-9._ -]+", "_", name).strip(" ._") or "series"
    return stem[:100]


def book_names(panel: PanelInput) -> dict[str, str]:
    """File name of each usable series' book: its name made safe, unique within the panel."""
    out: dict[str, str] = {}
    used: set[str] = set()
    for s in panel.usable:
        stem = _safe(s.name)
        name, k = f"{stem}.xlsx", 2
        while name.casefold() in used:
            name, k = f"{stem} ({k}).xlsx", k + 1
        used.add(name.casefold())
        out[s.name] = name
    return out


def check_books(panel: PanelInput, folder: str | os.PathLike[str], *, force: bool) -> None:
    """Refuse, before any work, a missing folder or books that exist (without ``force``)."""
    d = Path(folder)
    if not d.is_dir():
        raise FileNotFoundError(f"--book-per-series {d}: folder does not exist")
    for name in book_names(panel).values():
        check_target(d / name, force=force)


def write_books(
    panel: PanelInput,
    folder: str | os.PathLike[str],
    *,
    force: bool = False,
    on_done: Callable[[int], None] | None = None,
) -> dict[str, str]:
    """Build one monthly workbook per usable series into ``folder``.

    Returns
    -------
    dict
        Series name -> the book's file name, or ``"no book: <reason>"``.
    """
    from errdist.workbook import template

    d = Path(folder)
    check_books(panel, d, force=force)
    names = book_names(panel)
    result: dict[str, str] = {}
    staging = Path(tempfile.mkdtemp(prefix=".errdist-books-", dir=d))
    try:
        for s in panel.usable:
            try:
                template.build_workbook(
                    s.prices, staging / names[s.name], fund_name=s.name, as_of=panel.as_of
                )
                result[s.name] = names[s.name]
            except ValueError as exc:
                result[s.name] = f"no book: {exc}"
            if on_done:
                on_done(1)
        for s in panel.usable:
            if not result[s.name].startswith("no book"):
                os.replace(staging / names[s.name], d / names[s.name])
    finally:
        shutil.rmtree(staging, ignore_errors=True)
    return result
