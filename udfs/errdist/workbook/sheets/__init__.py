"""One module per sheet of the monthly risk workbook.

Every sheet module holds:

- ``NAME`` - the sheet's name in the workbook;
- ``layout(plan, ctx)`` - adds the sheet to the :class:`~errdist.workbook.layout.Plan`
  (or leaves it out when the worksheet functions it needs are missing), reading the key cells
  earlier sheets published in ``ctx.keys`` and publishing its own;
- optionally ``LAYOUT_LAST = True`` - laid out after the others (the Guide, whose key figures
  point at cells on later sheets).

The order of the workbook is the list in :data:`errdist.workbook.template.SHEET_MODULES`:
adding a sheet is adding one module here and listing it there. Shared pieces:
:mod:`~errdist.workbook.sheets.context` (the layout context and catalog calls) and
:mod:`~errdist.workbook.sheets.tables` (headings, result-table formats); the cell model, the
xlsx writer and the chart definitions are :mod:`errdist.workbook.layout`,
:mod:`errdist.workbook.writer` and :mod:`errdist.workbook.charts`.
"""
