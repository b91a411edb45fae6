"""The monthly risk workbook: template builder, headless engine, refresh and check.

Modules: ``engine`` (evaluate workbooks headlessly with the ``formulas`` package),
``safety`` (refuse unsafe files before parsing), ``prices_io`` (read a prices file),
``atomic`` (write files atomically), ``commands`` (``errdist demo/refresh/check``) and
``template`` (the workbook layout). Import the submodules directly; this package imports
nothing heavy.
"""

from __future__ import annotations
