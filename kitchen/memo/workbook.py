"""The memo's workbook.

:func:`workbook_bytes` writes the memo's tables as one ``.xlsx`` workbook with a
``cautions`` sheet (the cautions, the criterion, the settings and the provenance), every text
cell spreadsheet-safe. The cautions are :data:`kitchen.cautions.CAUTIONS`, as on every page
and chart of the memo. Each number keeps its full value in its cell and is shown in its
column's one format (:func:`kitchen.display_units.column_format`), as the report page and
the panels write it. :func:`setting_texts` writes the settings with their units.
"""

from __future__ import annotations

import io
import math

import numpy as np
import pandas as pd

from kitchen import __version__
from kitchen.cautions import CAUTIONS
from kitchen.display_units import column_format
from kitchen.io import spreadsheet_safe

from .provenance import Provenance

__all__ = ["workbook_bytes", "setting_texts", "SETTING_UNITS"]

SETTING_UNITS = {
    "reference_temperature": "°C",
    "criteria.low_k_threshold": "m/s",
    "criteria.datum_tolerance": "m",
    "resolutions.caliper": "m",
    "resolutions.balance": "kg",
    "resolutions.timer": "s",
    "resolutions.head_scale": "m",
    "resolutions.volume_scale": "m³",
    "resolutions.thermometer": "°C",
}
"""The unit of each setting that has one (the others are counts, fractions or names), as
the settings' docstrings give them (:class:`kitchen.settings.Settings`)."""


def _setting_value(name: str, value) -> str:
    if name.endswith("gradient_table") and isinstance(value, list | tuple):
        parts = []
        for low, high, gradient in value:
            if low > 0:
                parts.append(f"k from {low:g} to {high:g} m/s: largest gradient {gradient:g}")
            else:
                parts.append(f"k below {high:g} m/s: largest gradient {gradient:g}")
        return "; ".join(parts)
    if isinstance(value, list | tuple):
        return ", ".join(map(_plain, value))
    return _plain(value)


def _plain(value) -> str:
    if isinstance(value, float | np.floating):
        return f"{float(value):g}"
    return str(value)


def setting_texts(settings: dict) -> dict[str, str]:
    """The settings as a person reads them: each name with its unit in brackets
    (:data:`SETTING_UNITS`), each value as text (``reference_temperature [°C]`` → ``20``),
    the gradient table in words, never a Python tuple.

    Parameters
    ----------
    settings : dict
        Setting name (``criteria.steady_count``) to value.

    Returns
    -------
    dict of str to str
    """
    out = {}
    for name, value in settings.items():
        unit = SETTING_UNITS.get(name)
        key = f"{name} [{unit}]" if unit else name
        out[key] = _setting_value(name, value)
    return out


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

    Every text cell is made spreadsheet-safe (:func:`kitchen.io.spreadsheet_safe`); every
    number keeps its value and is shown in its column's format
    (:func:`kitchen.display_units.column_format`: ``0.00E+00`` for k, ``0.000`` for ρd).
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
        formats = [column_format(c) for c in safe.columns]
        units = list(safe.columns).index("unit") if "unit" in safe.columns else None
        for row in safe.itertuples(index=False):
            sheet.append([_cell(v) for v in row])
            # a table of one quantity a row (the fits) formats its numbers by the row's unit
            by_row = column_format(f"value [{row[units]}]") if units is not None else None
            for cell, style in zip(sheet[sheet.max_row], formats, strict=True):
                style = style or by_row
                if style is not None and isinstance(cell.value, float | int):
                    cell.number_format = style.spreadsheet
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
