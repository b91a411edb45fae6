"""A progress bar on standard error: series done / total, elapsed time and time left.

On a terminal the bar is redrawn in place (carriage return); in a log file (not a terminal)
a line is written at most every ``LOG_EVERY`` seconds and at the end, so logs stay short.
The estimate of time left is the elapsed time per series done so far times the series left.
"""

from __future__ import annotations

import sys
import time
from typing import TextIO

__all__ = ["LOG_EVERY", "Progress", "format_seconds"]

LOG_EVERY = 10.0
"""Seconds between progress lines when standard error is not a terminal."""

_WIDTH = 28


def format_seconds(s: float) -> str:
    """``75`` -> ``"1:15"``, ``3725`` -> ``"1:02:05"``."""
    s = max(0, int(round(s)))
    h, rest = divmod(s, 3600)
    m, sec = divmod(rest, 60)
    return f"{h}:{m:02d}:{sec:02d}" if h else f"{m}:{sec:02d}"


class Progress:
    """Counts series done and draws the bar.

    Parameters
    ----------
    total : int
        Number of series to do.
    stream : text stream, optional
        Where to draw (default standard error).
    label : str
        Text before the bar.
    """

    def __init__(self, total: int, stream: TextIO | None = None, label: str = "panel") -> None:
        self.total = int(total)
        self.done = 0
        self.stream = stream if stream is not None else sys.stderr
        self.label = label
        self.t0 = time.perf_counter()
        self._last_log = -1e9
        self._tty = bool(getattr(self.stream, "isatty", lambda: False)())

    def text(self) -> str:
        """The current progress line."""
        elapsed = time.perf_counter() - self.t0
        frac = self.done / self.total if self.total else 1.0
        filled = int(round(_WIDTH * frac))
        bar = "#" * filled + "." * (_WIDTH - filled)
        if 0 < self.done < self.total:
            eta = f"  about {format_seconds(elapsed / self.done * (self.total - self.done))} left"
        else:
            eta = ""
        return (
            f"{self.label} [{bar}] {self.done:,}/{self.total:,} series {100 * frac:3.0f}%  "
            f"{format_seconds(elapsed)} elapsed{eta}"
        )

    def update(self, k: int = 1) -> None:
        """``k`` more series done."""
        self.done = min(self.total, self.done + int(k))
        now = time.perf_counter()
        if self._tty:
            print("\r" + self.text(), end="", file=self.stream, flush=True)
        elif now - self._last_log >= LOG_EVERY or self.done == self.total:
            self._last_log = now
            print(self.text(), file=self.stream, flush=True)

    def close(self) -> None:
        """End the bar's line (on a terminal)."""
        if self._tty:
            print(file=self.stream, flush=True)
