"""The project's own settings for a series: a small table of named values beside the data.

A series may carry, in ``project.csv`` in its folder (or a sheet ``project`` of its
workbook), the settings that belong to the project rather than to the laboratory: today
the conductivity criterion the specification sets. The table has two columns,
``setting`` and ``value``, one setting a row::

    setting,value
    criterion,1e-9 m/s

A criterion is written as a largest k allowed (``1e-9 m/s``, ``<= 1e-7 cm/s``) or a
smallest k required (``>= 1e-4 m/s``), with its unit. This module reads the table as
written and names each problem by file, row and column; the criterion's words are parsed
where the criterion is understood (:func:`kitchen.analysis.parse_criterion`), by the
workspace that opens the series. The file is read, never written.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import pandas as pd

from .raw_tables import InputProblem, SeriesError

__all__ = ["PROJECT_SETTINGS", "ProjectSetting", "project_settings_path", "read_project_settings"]

PROJECT_SETTINGS = {
    "criterion": (
        "the conductivity criterion of the specification, with its unit: a largest k "
        "allowed ('1e-9 m/s') or a smallest k required ('>= 1e-4 m/s')"
    ),
    "minimum_effective_stress": (
        "the lowest effective stress the specification allows across a flexible-wall "
        "specimen during permeation, with its unit ('10 kPa')"
    ),
    "maximum_effective_stress": (
        "the highest effective stress the specification allows across a flexible-wall "
        "specimen during permeation, with its unit ('50 kPa')"
    ),
    "project": "the project's name, as the report pages show it",
}
"""The settings a project table may hold, and what each value is."""


@dataclass(frozen=True)
class ProjectSetting:
    """One setting of the project table, as written, and where it was read."""

    name: str
    value: str
    file: str
    row: int

    @property
    def where(self) -> str:
        """File, row and column, as the loader names a place."""
        return f"{self.file}, row {self.row}, column 'value'"


def project_settings_path(series_path: str | Path) -> tuple[Path, str | None]:
    """Where a series' project table is: ``(file, sheet)``.

    ``project.csv`` in a series folder (sheet None); for a workbook, the workbook and the
    sheet ``project``.
    """
    path = Path(series_path)
    if path.suffix.lower() == ".xlsx":
        return path, "project"
    return path / "project.csv", None


def read_project_settings(series_path: str | Path) -> dict[str, ProjectSetting]:
    """Read a series' project table; none there is no settings.

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook.

    Returns
    -------
    dict of str to ProjectSetting
        The settings given, by name (empty when the series has no project table).

    Raises
    ------
    SeriesError
        Every problem at once, by file, row and column: a table without the columns
        ``setting`` and ``value``, an unknown setting, one given twice, an empty value.
    """
    file, sheet = project_settings_path(series_path)
    label = file.name if sheet is None else f"{file.name} [{sheet}]"
    if not file.exists():
        return {}
    try:
        if sheet is None:
            frame = pd.read_csv(file, dtype=str, keep_default_na=False, encoding="utf-8-sig")
        else:
            with pd.ExcelFile(file) as book:
                if sheet not in book.sheet_names:
                    return {}
                frame = pd.read_excel(book, sheet_name=sheet, dtype=str, keep_default_na=False)
    except (UnicodeDecodeError, ValueError, OSError, pd.errors.ParserError) as error:
        raise SeriesError([InputProblem(label, None, None, f"cannot be read ({error})")]) from None
    columns = {str(c).strip().lower(): c for c in frame.columns}
    missing = [name for name in ("setting", "value") if name not in columns]
    if missing:
        found = ", ".join(str(c) for c in frame.columns) or "none"
        raise SeriesError(
            [
                InputProblem(label, 1, name, f"required column missing; columns found: {found}")
                for name in missing
            ]
        )
    settings: dict[str, ProjectSetting] = {}
    problems: list[InputProblem] = []
    names = frame[columns["setting"]].map(lambda v: str(v).strip().lower())
    values = frame[columns["value"]].map(lambda v: " ".join(str(v).split()))
    for offset, (name, value) in enumerate(zip(names, values, strict=True)):
        row = offset + 2  # the header is row 1, as in every message of the loader
        if not name and not value:
            continue
        if name not in PROJECT_SETTINGS:
            known = ", ".join(PROJECT_SETTINGS)
            problems.append(
                InputProblem(label, row, "setting", f"unknown setting {name!r}; expected {known}")
            )
        elif name in settings:
            problems.append(
                InputProblem(
                    label, row, "setting", f"{name} given twice (first in row {settings[name].row})"
                )
            )
        elif not value:
            problems.append(
                InputProblem(label, row, "value", f"{name} has no value: {PROJECT_SETTINGS[name]}")
            )
        else:
            settings[name] = ProjectSetting(name, value, label, row)
    if problems:
        raise SeriesError(problems)
    return settings
