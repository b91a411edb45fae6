"""errdist: the generalized normal ("error") distribution for spreadsheet risk work."""

from __future__ import annotations

__version__ = "0.1.0"
