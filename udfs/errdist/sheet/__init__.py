"""The worksheet layer: errdist's functions as spreadsheet formulas.

- :mod:`errdist.sheet.catalog` - THE table of worksheet functions and :func:`evaluate`;
- :mod:`errdist.sheet.entry` - what an entry is and how it evaluates cell arguments;
- :mod:`errdist.sheet.cells` - cell values to arrays, results and errors back to cells;
- :mod:`errdist.sheet.udfs` - builds the xlwings functions from the catalog;
- :mod:`errdist.sheet.xlwings_udfs` - the module named in xlwings' "UDF Modules";
- :mod:`errdist.sheet.vba` - the VBA module text (``errdist vba``);
- :mod:`errdist.sheet.docs` - writes ``docs/functions.md`` from the catalog.

The layer knows nothing of statistics: every number comes from the core.
"""

from __future__ import annotations
