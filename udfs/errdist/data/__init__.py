"""Data: prices -> returns, reading and validating price files, the invented demo scenario."""

from __future__ import annotations
