"""The LibreOffice Calc front end, generated from the catalog.

- :mod:`~errdist.libreoffice.basic`: the Basic wrappers (one per catalog entry) that Calc
  finds by their bare ``ERRDIST_`` names, in .ods and .xlsx alike;
- :mod:`~errdist.libreoffice.script`: the Python user script those wrappers call;
- :mod:`~errdist.libreoffice.bridge`: cell values in, result cells out (inside LibreOffice's
  Python), through the catalog entry like every other front end;
- :mod:`~errdist.libreoffice.install`: ``errdist libreoffice install`` / ``uninstall``;
- :mod:`~errdist.libreoffice.recalc`: recalculate a workbook live in headless LibreOffice
  (``errdist check --engine libreoffice``).
"""
