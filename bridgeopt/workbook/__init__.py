"""The workbook: plotly figures of designs (``plots``) and of study tables (``charts``),
the notebook helpers (``notebook``), the span-and-form explorer (``explorer``) and the
self-contained HTML report (``report``).  Draws; never solves except through
:mod:`bridgeopt.study`."""
