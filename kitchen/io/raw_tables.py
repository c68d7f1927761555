"""A series' tables as written: what each may hold, and reading them without converting.

:data:`SCHEMAS` names the columns of each table (``specimens``, ``constant_head``,
``falling_head``), their kind of quantity and whether the table needs them.
:func:`read_tables` reads a series folder of CSV files or one workbook into
:class:`RawTable` objects: internal column names, the units of the headers, the row a
person sees in the file, and the problems of the headers. Every problem is an
:class:`InputProblem` naming the file, the row and the column; a series that cannot be
used is refused with a :class:`SeriesError` listing them all. Validation and the
conversion to SI are in :mod:`kitchen.io.table_checks` and :mod:`kitchen.io.series`.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from .units import UnitError, split_header, to_si

__all__ = [
    "SCHEMAS",
    "TEXT_KINDS",
    "TABLE_NAMES",
    "ColumnSpec",
    "InputProblem",
    "SeriesError",
    "RawTable",
    "read_tables",
]


TABLE_NAMES = ("specimens", "constant_head", "falling_head")


@dataclass(frozen=True)
class ColumnSpec:
    """What a column holds: its kind of quantity, and whether the table needs it."""

    kind: str  # "id", "label", or a kind of kitchen.io.KINDS
    required: bool = False


SCHEMAS: dict[str, dict[str, ColumnSpec]] = {
    "specimens": {
        "specimen": ColumnSpec("id", True),
        "diameter": ColumnSpec("length", True),
        "height": ColumnSpec("length", True),
        "dry_mass": ColumnSpec("mass"),
        "mold_mass": ColumnSpec("mass"),
        "mold_and_soil_mass": ColumnSpec("mass"),
        "specific_gravity": ColumnSpec("dimensionless", True),
        "water_content": ColumnSpec("ratio"),
        "effort": ColumnSpec("label"),
        "d10": ColumnSpec("length"),
        "standpipe_diameter": ColumnSpec("length"),
        "standpipe_area": ColumnSpec("area"),
        "tailwater_standpipe_diameter": ColumnSpec("length"),
        "tailwater_standpipe_area": ColumnSpec("area"),
    },
    "constant_head": {
        "specimen": ColumnSpec("id", True),
        "head_difference": ColumnSpec("length", True),
        "duration": ColumnSpec("time", True),
        "volume": ColumnSpec("volume"),
        "outflow_mass": ColumnSpec("mass"),
        "temperature": ColumnSpec("temperature"),
        "flow_length": ColumnSpec("length"),
    },
    "falling_head": {
        "specimen": ColumnSpec("id", True),
        "time": ColumnSpec("time", True),
        "head": ColumnSpec("length", True),
        "temperature": ColumnSpec("temperature"),
        "inflow_volume": ColumnSpec("volume"),
        "outflow_volume": ColumnSpec("volume"),
    },
}
"""Columns each table may carry, by internal name."""


TEXT_KINDS = ("id", "label")


@dataclass(frozen=True)
class InputProblem:
    """One problem in the input: where it is, and what was expected."""

    file: str
    row: int | None
    column: str | None
    message: str

    def __str__(self) -> str:
        where = [self.file]
        if self.row is not None:
            where.append(f"row {self.row}")
        if self.column is not None:
            where.append(f"column '{self.column}'")
        return f"{', '.join(where)}: {self.message}"


class SeriesError(ValueError):
    """A series that cannot be used, with every problem found in it."""

    def __init__(self, problems: list[InputProblem]):
        self.problems = list(problems)
        lines = [f"{len(self.problems)} problem(s) in the series:"]
        lines += [f"  - {problem}" for problem in self.problems]
        super().__init__("\n".join(lines))


@dataclass
class RawTable:
    """A table as written: numbers in the file's units, one row per data line.

    ``frame`` has the internal column names; ``units`` maps each to the unit text of its
    header (``None`` for text columns); ``headers`` to the header as written;
    ``source_row`` (a column of ``frame``) is the row number a person sees in the file or
    sheet (the header is row 1).
    """

    name: str
    file: str
    frame: pd.DataFrame
    units: dict[str, str | None] = field(default_factory=dict)
    headers: dict[str, str] = field(default_factory=dict)
    problems: list[InputProblem] = field(default_factory=list)

    def copy(self) -> RawTable:
        return RawTable(
            self.name,
            self.file,
            self.frame.copy(),
            dict(self.units),
            dict(self.headers),
            list(self.problems),
        )


def _internal_name(header_name: str) -> str:
    return "_".join(header_name.replace("-", " ").split())


def _read_csv(path: Path, problems: list[InputProblem]) -> pd.DataFrame | None:
    label = path.name
    try:
        header = pd.read_csv(path, nrows=0, encoding="utf-8-sig")
    except UnicodeDecodeError:
        problems.append(InputProblem(label, None, None, "is not UTF-8 text; save it as UTF-8 CSV"))
        return None
    except pd.errors.EmptyDataError:
        problems.append(InputProblem(label, None, None, "is empty; expected a header row"))
        return None
    except (pd.errors.ParserError, OSError) as error:
        problems.append(InputProblem(label, None, None, f"cannot be read as CSV ({error})"))
        return None
    text_columns = {}
    for raw in header.columns:
        try:
            name = _internal_name(split_header(raw)[0])
        except UnitError:
            continue
        if name in ("specimen", "effort"):
            # as categories: the parser keeps one string per distinct id, not one per row
            text_columns[raw] = "category"
    try:
        return pd.read_csv(path, encoding="utf-8-sig", dtype=text_columns, skip_blank_lines=False)
    except (UnicodeDecodeError, pd.errors.ParserError, ValueError) as error:
        problems.append(InputProblem(label, None, None, f"cannot be read as CSV ({error})"))
        return None


def _prepare(name: str, label: str, frame: pd.DataFrame, problems: list[InputProblem]):
    """Map headers to internal names and units; collect header problems."""
    schema = SCHEMAS[name]
    units: dict[str, str | None] = {}
    headers: dict[str, str] = {}
    rename: dict[str, str] = {}
    for raw in frame.columns:
        raw_text = str(raw)
        if raw_text.startswith("Unnamed:") and frame[raw].isna().all():
            continue
        try:
            header_name, unit = split_header(raw_text)
        except UnitError as error:
            problems.append(InputProblem(label, 1, raw_text, str(error)))
            continue
        internal = _internal_name(header_name)
        if internal not in schema:
            continue  # extra columns (notes, operator) are carried by the file, not used
        if internal in rename.values():
            problems.append(InputProblem(label, 1, raw_text, f"column '{internal}' given twice"))
            continue
        spec = schema[internal]
        if spec.kind in TEXT_KINDS:
            if unit:
                problems.append(
                    InputProblem(label, 1, raw_text, f"'{internal}' is text and takes no unit")
                )
        elif spec.kind == "dimensionless":
            if unit not in (None, "", "-", "1"):
                problems.append(
                    InputProblem(
                        label, 1, raw_text, f"'{internal}' is dimensionless; drop the unit"
                    )
                )
        elif not unit:
            problems.append(
                InputProblem(
                    label,
                    1,
                    raw_text,
                    f"'{internal}' has a dimension ({spec.kind}) but no unit; write it as "
                    f"'{internal} [unit]', for example {_EXAMPLE_UNITS[spec.kind]}",
                )
            )
            continue
        else:
            try:
                to_si(1.0, unit, spec.kind)
            except UnitError as error:
                problems.append(InputProblem(label, 1, raw_text, str(error)))
                continue
        rename[raw] = internal
        units[internal] = unit if spec.kind not in TEXT_KINDS else None
        headers[internal] = raw_text
    for column, spec in schema.items():
        if spec.required and column not in rename.values():
            if column in [
                _internal_name(split_header(str(c))[0]) for c in frame.columns if _safe_header(c)
            ]:
                continue  # present but refused above; already reported
            hint = ""
            if len(frame.columns) == 1 and ";" in str(frame.columns[0]):
                hint = " (the header has semicolons: save the file comma-separated)"
            found = ", ".join(str(c) for c in frame.columns) or "none"
            problems.append(
                InputProblem(
                    label, 1, column, f"required column missing{hint}; columns found: {found}"
                )
            )
    kept = frame[list(rename)].rename(columns=rename)
    source_row = np.arange(2, len(frame) + 2)
    blank = frame.isna().all(axis=1).to_numpy()
    if blank.any():
        kept, source_row = kept.loc[~blank], source_row[~blank]
    kept = kept.reset_index(drop=True)
    kept["source_row"] = source_row
    return kept, units, headers


def _safe_header(raw) -> bool:
    try:
        split_header(str(raw))
    except UnitError:
        return False
    return True


_EXAMPLE_UNITS = {
    "length": "[mm], [cm], [in]",
    "area": "[mm^2], [cm^2]",
    "volume": "[mL], [cm^3]",
    "mass": "[g], [kg]",
    "time": "[s], [min], [h]",
    "temperature": "[degC]",
    "ratio": "[%] or [-]",
}


def read_tables(path: str | Path) -> tuple[dict[str, RawTable], tuple[Path, ...]]:
    """Read a series folder or workbook as written, without converting units.

    Parameters
    ----------
    path : str or pathlib.Path
        A folder holding ``specimens.csv`` and one or both of ``constant_head.csv`` and
        ``falling_head.csv``; or an ``.xlsx`` workbook with sheets of those names.

    Returns
    -------
    tables : dict of str to RawTable
        The tables found, by name.
    input_files : tuple of pathlib.Path
        The files read (for provenance hashes).

    Raises
    ------
    SeriesError
        When files or sheets are missing or unreadable. Problems with headers (a missing
        column, a missing or unknown unit) are kept in each table's ``problems`` and
        reported by :func:`~kitchen.io.build_series` together with the problems in the values.
    """
    path = Path(path)
    problems: list[InputProblem] = []
    frames: dict[str, tuple[str, pd.DataFrame]] = {}
    if path.is_dir():
        files = []
        for name in TABLE_NAMES:
            file = path / f"{name}.csv"
            if file.exists():
                frame = _read_csv(file, problems)
                files.append(file)
                if frame is not None:
                    frames[name] = (file.name, frame)
        label_of = {name: f"{name}.csv" for name in TABLE_NAMES}
        input_files = tuple(files)
    elif path.suffix.lower() == ".xlsx" and path.exists():
        try:
            sheets = pd.read_excel(path, sheet_name=None, dtype=object)
        except Exception as error:  # openpyxl raises many kinds for a damaged file
            problem = InputProblem(path.name, None, None, f"cannot be read ({error})")
            raise SeriesError([problem]) from error
        for name in TABLE_NAMES:
            if name in sheets:
                frame = sheets[name]
                for column in frame.columns:
                    if _safe_header(column) and _internal_name(split_header(str(column))[0]) in (
                        "specimen",
                        "effort",
                    ):
                        frame[column] = frame[column].map(_cell_text)
                frames[name] = (f"{path.name} [{name}]", frame)
        label_of = {name: f"{path.name} [{name}]" for name in TABLE_NAMES}
        input_files = (path,)
    else:
        raise SeriesError(
            [InputProblem(str(path), None, None, "not found: expected a series folder or .xlsx")]
        )
    if "specimens" not in frames and not any(p.file == label_of["specimens"] for p in problems):
        problems.append(
            InputProblem(label_of["specimens"], None, None, "missing: every series needs it")
        )
    if not ({"constant_head", "falling_head"} & set(frames)) and not problems:
        problems.append(
            InputProblem(
                str(path.name),
                None,
                None,
                "has no test data: expected constant_head.csv or falling_head.csv "
                "(or sheets of those names)",
            )
        )
    if problems:
        raise SeriesError(problems)
    tables: dict[str, RawTable] = {}
    for name, (label, frame) in frames.items():
        header_problems: list[InputProblem] = []
        kept, units, headers = _prepare(name, label, frame, header_problems)
        tables[name] = RawTable(name, label, kept, units, headers, header_problems)
    return tables, input_files


def _cell_text(value):
    if value is None or (isinstance(value, float) and np.isnan(value)):
        return np.nan
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value)
