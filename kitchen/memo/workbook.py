"""The memo's workbook.

:func:`workbook_bytes` writes the memo's tables as one ``.xlsx`` workbook with a
``cautions`` sheet (the cautions, the criterion, the settings and the provenance), every text
cell spreadsheet-safe. The cautions are :data:`kitchen.cautions.CAUTIONS`, as on every page
and chart of the memo.
"""

from __future__ import annotations

import io
import math

import numpy as np
import pandas as pd

from kitchen import __version__
from kitchen.cautions import CAUTIONS
from kitchen.io import spreadsheet_safe

from .provenance import Provenance

__all__ = ["workbook_bytes"]


def _cell(value):
    if value is None or value is pd.NA or value is pd.NaT:
        return None
    if isinstance(value, float | np.floating):
        return None if not math.isfinite(float(value)) else float(value)
    if isinstance(value, np.integer):
        return int(value)
    if isinstance(value, np.bool_):
        return bool(value)
    if isinstance(value, list | tuple):
        return "; ".join(map(str, value))
    return value


def workbook_bytes(sheets: dict[str, pd.DataFrame], notes: pd.DataFrame) -> bytes:
    """An .xlsx workbook of the sheets given, plus a ``cautions`` sheet, as bytes.

    Every text cell is made spreadsheet-safe (:func:`kitchen.io.spreadsheet_safe`).
    """
    from openpyxl import Workbook
    from openpyxl.styles import Font

    book = Workbook()
    book.remove(book.active)
    for name, frame in {**sheets, "cautions": notes}.items():
        sheet = book.create_sheet(name)
        safe = spreadsheet_safe(frame.map(_cell) if not frame.empty else frame)
        sheet.append([str(c) for c in safe.columns])
        for cell in sheet[1]:
            cell.font = Font(bold=True)
        for row in safe.itertuples(index=False):
            sheet.append([_cell(v) for v in row])
        sheet.freeze_panes = "A2"
        for index, column in enumerate(safe.columns, start=1):
            width = max([len(str(column))] + [len(str(v)) for v in safe[column].head(200)])
            sheet.column_dimensions[sheet.cell(1, index).column_letter].width = min(width + 2, 80)
    book.properties.creator = f"kitchen {__version__}"
    book.properties.description = " ".join(CAUTIONS)
    buffer = io.BytesIO()
    book.save(buffer)
    return buffer.getvalue()


def notes_sheet(
    provenance: Provenance, criterion_text: str, counts: dict | None = None
) -> pd.DataFrame:
    """The workbook's notes sheet: the cautions, the criterion, the count of each verdict
    (`counts`, :attr:`kitchen.analysis.SeriesAnalysis.counts`: the tests not judged counted
    apart), the settings, the provenance."""
    rows = [("caution", text) for text in CAUTIONS]
    rows.append(("criterion", criterion_text))
    rows += [("verdicts", f"{verdict}: {n}") for verdict, n in (counts or {}).items()]
    rows += [("setting", f"{key} = {value}") for key, value in provenance.settings]
    rows += [("provenance", line) for line in provenance.lines()]
    return pd.DataFrame(rows, columns=["item", "text"])
