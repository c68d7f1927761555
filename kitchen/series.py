"""Read a soil series — a folder of CSV files or one workbook — into validated SI tables.

A series holds ``specimens`` (one row per specimen) and at least one of
``constant_head`` (one row per timed collection) and ``falling_head`` (one row per
reading). Every problem in the input is collected, each naming the file, the row and the
column, before the series is refused with a :class:`SeriesError`.

Reading is split in two so that revisions can be applied in between:
:func:`read_tables` returns the raw tables as written (numbers in the file's units), and
:func:`build_series` validates them and converts them to SI. :func:`load_series` does both.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from .units import UnitError, split_header, to_si

__all__ = [
    "SCHEMAS",
    "TABLE_NAMES",
    "InputProblem",
    "SeriesError",
    "RawTable",
    "Series",
    "read_tables",
    "build_series",
    "rebuild_series",
    "load_series",
]

TABLE_NAMES = ("specimens", "constant_head", "falling_head")


@dataclass(frozen=True)
class ColumnSpec:
    """What a column holds: its kind of quantity, and whether the table needs it."""

    kind: str  # "id", "label", or a kind of kitchen.units.KINDS
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

_TEXT_KINDS = ("id", "label")
_POSITIVE = {
    "specimens": (
        "diameter",
        "height",
        "dry_mass",
        "specific_gravity",
        "d10",
        "standpipe_diameter",
        "standpipe_area",
        "tailwater_standpipe_diameter",
        "tailwater_standpipe_area",
    ),
    "constant_head": ("head_difference", "duration", "volume", "outflow_mass", "flow_length"),
    "falling_head": ("head",),
}
_NON_NEGATIVE = {
    "specimens": ("water_content", "mold_mass"),
    "falling_head": ("time", "inflow_volume", "outflow_volume"),
}
_LEFT_OUT_WHEN_ABSENT = {"falling_head": ("inflow_volume", "outflow_volume")}
"""Optional columns the SI table leaves out when the file has none (a logger record rarely
carries volumes; an empty column of 10⁶ readings would cost 8 MB)."""
HEAD_RISE_TOLERANCE = 0.002
"""A falling-head reading may rise this much above the one before it (resolution). [m]"""


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


@dataclass(frozen=True)
class Series:
    """A validated soil series in SI units (see the nomenclature in :mod:`kitchen`)."""

    name: str
    source: Path
    specimens: pd.DataFrame
    constant_head: pd.DataFrame
    falling_head: pd.DataFrame
    input_files: tuple[Path, ...]
    units: dict[str, dict[str, str | None]]

    def specimen_ids(self) -> list[str]:
        return list(self.specimens["specimen"])


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
        if spec.kind in _TEXT_KINDS:
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
        units[internal] = unit if spec.kind not in _TEXT_KINDS else None
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
        reported by :func:`build_series` together with the problems in the values.
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


def _numeric_column(table: RawTable, column: str, problems: list[InputProblem]) -> np.ndarray:
    """The column as a new array of floats in SI; bad cells are reported and become NaN."""
    values = table.frame[column]
    if values.dtype.kind in "fiu":
        numbers = values.to_numpy(dtype=float)
    else:
        numbers = pd.to_numeric(values, errors="coerce").to_numpy(dtype=float)
        bad = np.flatnonzero(np.isnan(numbers) & values.notna().to_numpy())
        rows = table.frame["source_row"].to_numpy()
        for index in bad:
            problems.append(
                InputProblem(
                    table.file,
                    int(rows[index]),
                    table.headers[column],
                    f"expected a number, found {values.iloc[index]!r}",
                )
            )
    kind = SCHEMAS[table.name][column].kind
    unit = table.units.get(column)
    if kind == "dimensionless" or not unit:
        return numbers.copy()  # never a view of the raw table
    if to_si(0.0, unit, kind) != 0.0:  # an offset unit (degF, K)
        return to_si(numbers, unit, kind)
    return np.multiply(numbers, to_si(1.0, unit, kind))  # one pass, one new array


def _report(problems, table: RawTable, mask: np.ndarray, column: str, message: str, limit=20):
    if not mask.any():
        return
    rows = table.frame["source_row"].to_numpy()[mask]
    header = table.headers.get(column, column)
    for row in rows[:limit]:
        problems.append(InputProblem(table.file, int(row), header, message))
    if len(rows) > limit:
        problems.append(
            InputProblem(table.file, None, header, f"{len(rows) - limit} more row(s): {message}")
        )


@dataclass(frozen=True)
class _Labels:
    """A text column as codes into its distinct values: ``values[codes]``, -1 where empty."""

    codes: np.ndarray
    values: np.ndarray  # distinct stripped texts (object array of str)

    @classmethod
    def of(cls, column: pd.Series) -> _Labels:
        """Codes of a text column; each distinct text is stripped once, not once per row."""
        if isinstance(column.dtype, pd.CategoricalDtype):
            codes = column.cat.codes.to_numpy()
            texts = column.cat.categories.to_numpy(dtype=object)
        else:
            codes, texts = pd.factorize(column.to_numpy(dtype=object))
        stripped = np.array([str(text).strip() for text in texts], dtype=object)
        merged, values = pd.factorize(stripped)  # " A1" and "A1" are one specimen
        merged = np.where(values[merged] == "", -1, merged)
        if np.array_equal(merged, np.arange(len(texts))):
            return cls(codes, values)  # nothing merged or emptied: the codes stand
        return cls(np.append(merged, -1)[codes], values)  # code -1 stays -1

    def strings(self) -> pd.arrays.StringArray:
        """The column as pandas strings, ``<NA>`` where empty."""
        return pd.array(self.values, dtype="string").take(self.codes, allow_fill=True)

    def present(self) -> np.ndarray:
        """Which of `values` occur in the column."""
        counts = np.bincount(self.codes + 1, minlength=len(self.values) + 1)
        return counts[1:].astype(bool)


def _convert(table: RawTable, problems: list[InputProblem]) -> tuple[pd.DataFrame, _Labels]:
    """The table in SI with its value problems reported, and its specimen ids as codes."""
    schema = SCHEMAS[table.name]
    rows = table.frame["source_row"].to_numpy(dtype=np.int32)  # a new array, not a view
    n = rows.size
    columns: dict[str, object] = {"source_row": rows}
    ids = None
    for column, spec in schema.items():
        present = column in table.frame.columns
        if spec.kind in _TEXT_KINDS:
            if present:
                labels = _Labels.of(table.frame[column])
                columns[column] = labels.strings()
                ids = labels if column == "specimen" else ids
                if spec.required:
                    _report(problems, table, labels.codes < 0, column, "value missing")
            else:
                columns[column] = pd.array([pd.NA] * n, dtype="string")
            continue
        if not present:
            if column not in _LEFT_OUT_WHEN_ABSENT.get(table.name, ()):
                columns[column] = np.full(n, np.nan)
            continue
        values = _numeric_column(table, column, problems)
        columns[column] = values
        finite = np.isfinite(values)
        if spec.required:
            empty = table.frame[column].isna().to_numpy()
            _report(problems, table, empty, column, "value missing; expected a number")
        if column in _POSITIVE.get(table.name, ()):
            _report(problems, table, finite & (values <= 0), column, "must be greater than zero")
        if column in _NON_NEGATIVE.get(table.name, ()):
            _report(problems, table, finite & (values < 0), column, "must not be negative")
    # every column is a new array: the frame takes them as they are (no copy, no consolidation)
    return pd.DataFrame(columns, copy=False), ids


def _check_specimens(
    table: RawTable, frame: pd.DataFrame, problems: list[InputProblem]
) -> pd.DataFrame:
    """Checks across the columns of the specimens table; fills the dry mass from the mold
    masses and the standpipe areas from their diameters. Takes the frame `_convert` made
    (new arrays, owned here) and returns it with the diameters left out."""

    def column(name: str) -> np.ndarray:
        return frame[name].to_numpy(dtype=float)

    ids = frame["specimen"]
    duplicated = (ids.duplicated(keep=False) & ids.notna()).to_numpy()
    _report(problems, table, duplicated, "specimen", "specimen id given more than once")
    dry, mold, full = column("dry_mass"), column("mold_mass"), column("mold_and_soil_mass")
    has_dry = ~np.isnan(dry)
    has_mold = ~np.isnan(mold) & ~np.isnan(full)
    _report(
        problems,
        table,
        ~has_dry & ~has_mold,
        "dry_mass",
        "no dry mass: give dry_mass, or both mold_mass and mold_and_soil_mass",
    )
    by_mold = ~has_dry & has_mold
    soil = full - mold
    _report(
        problems,
        table,
        by_mold & (soil <= 0),
        "mold_and_soil_mass",
        "must be greater than mold_mass (the difference is the dry soil)",
    )
    if by_mold.any():
        frame["dry_mass"] = np.where(by_mold, soil, dry)
    gs = column("specific_gravity")
    with np.errstate(invalid="ignore"):
        odd = ~np.isnan(gs) & ((gs < 1.5) | (gs > 4.0))
    _report(
        problems,
        table,
        odd,
        "specific_gravity",
        "expected a specific gravity of soil solids between 1.5 and 4.0 (typically 2.6-2.8)",
    )
    for prefix in ("", "tailwater_"):
        diameter_name, area_name = f"{prefix}standpipe_diameter", f"{prefix}standpipe_area"
        diameter, area = column(diameter_name), column(area_name)
        has_diameter, has_area = ~np.isnan(diameter), ~np.isnan(area)
        _report(
            problems,
            table,
            has_diameter & has_area,
            area_name,
            f"give {diameter_name} or {area_name}, not both",
        )
        from_diameter = has_diameter & ~has_area
        if from_diameter.any():
            frame[area_name] = np.where(from_diameter, np.pi * diameter**2 / 4, area)
        del frame[diameter_name]
    return frame


def _check_known(table: RawTable, ids: _Labels, known: set, problems):
    unknown_value = np.array([value not in known for value in ids.values], dtype=bool)
    if not unknown_value.any() or not (unknown_value & ids.present()).any():
        return
    names = ", ".join(sorted(ids.values[unknown_value & ids.present()])[:5])
    _report(
        problems,
        table,
        np.append(unknown_value, False)[ids.codes],
        "specimen",
        f"unknown specimen (not in specimens): {names}",
    )


def _check_readings(table: RawTable, frame: pd.DataFrame, ids: _Labels, known: set, problems):
    _check_known(table, ids, known, problems)
    if table.name == "constant_head":
        neither = frame["volume"].isna() & frame["outflow_mass"].isna()
        both = frame["volume"].notna() & frame["outflow_mass"].notna()
        _report(problems, table, neither.to_numpy(), "volume", "give volume or outflow_mass")
        _report(problems, table, both.to_numpy(), "volume", "give volume or outflow_mass, not both")
        return
    codes = ids.codes
    same = np.zeros(codes.size, dtype=bool)  # the reading before is of the same specimen
    np.equal(codes[1:], codes[:-1], out=same[1:])
    time = frame["time"].to_numpy()
    head = frame["head"].to_numpy()
    _report(
        problems,
        table,
        same & np.r_[False, np.diff(time) <= 0],
        "time",
        "time does not increase from the reading before",
    )
    _report(
        problems,
        table,
        same & np.r_[False, np.diff(head) > HEAD_RISE_TOLERANCE],
        "head",
        f"head rises from the reading before by more than {HEAD_RISE_TOLERANCE * 1e3:g} mm "
        "(in a falling-head test it only falls; was the standpipe refilled?)",
    )
    first_row = {}
    rows = frame["source_row"].to_numpy()
    for index in np.flatnonzero(~same):  # once per run of one specimen's readings
        specimen = ids.values[codes[index]] if codes[index] >= 0 else ""
        if specimen in first_row:
            problems.append(
                InputProblem(
                    table.file,
                    int(rows[index]),
                    table.headers["specimen"],
                    f"readings of specimen {specimen} are split (they also start at row "
                    f"{first_row[specimen]}); keep each specimen's readings together",
                )
            )
        else:
            first_row[specimen] = int(rows[index])


def _tested(frame: pd.DataFrame) -> set:
    """Specimen ids of a validated readings table (each specimen's readings are together)."""
    ids = frame["specimen"].to_numpy(dtype=object)
    starts = np.flatnonzero(np.r_[True, ids[1:] != ids[:-1]]) if ids.size else []
    return set(ids[starts])


def _empty_readings(name: str) -> pd.DataFrame:
    columns = {column: np.empty(0) for column in SCHEMAS[name]}
    columns["specimen"] = pd.array([], dtype="string")
    columns["source_row"] = np.empty(0, dtype=int)
    return pd.DataFrame(columns)


def _assemble(tables, source, input_files, previous: Series | None, changed) -> Series:
    """Validate the tables named in `changed` and convert them; take the rest from `previous`."""
    problems: list[InputProblem] = [p for name in changed for p in tables[name].problems]
    converted, ids = {}, {}
    for name in changed:
        converted[name], ids[name] = _convert(tables[name], problems)
    if "specimens" in changed:
        specimens = _check_specimens(tables["specimens"], converted["specimens"], problems)
    else:
        specimens = previous.specimens
    known = set(specimens["specimen"].dropna())
    same_ids = previous is not None and known == set(previous.specimens["specimen"].dropna())
    for name in ("constant_head", "falling_head"):
        if name in changed:
            _check_readings(tables[name], converted[name], ids[name], known, problems)
        elif name in tables:  # validated before: only the specimen ids may have gone stale
            converted[name] = getattr(previous, name)
            if not same_ids:
                _check_known(tables[name], _Labels.of(converted[name]["specimen"]), known, problems)
        else:
            converted[name] = _empty_readings(name)
    if "falling_head" in tables:
        no_standpipe = specimens["standpipe_area"].isna()
        if no_standpipe.any():
            tested = _tested(converted["falling_head"])
            _report(
                problems,
                tables["specimens"],
                (specimens["specimen"].isin(tested) & no_standpipe).to_numpy(),
                "standpipe_area",
                "specimen has falling-head readings but no standpipe_diameter or standpipe_area",
            )
    if problems:
        raise SeriesError(problems)
    source = Path(source)
    units = {name: dict(table.units) for name, table in tables.items()}
    return Series(
        name=source.stem if source.suffix else source.name,
        source=source,
        specimens=specimens,
        constant_head=converted["constant_head"],
        falling_head=converted["falling_head"],
        input_files=tuple(input_files),
        units=units,
    )


def build_series(
    tables: dict[str, RawTable], source: str | Path, input_files: tuple[Path, ...] = ()
) -> Series:
    """Validate raw tables and convert them to SI.

    Parameters
    ----------
    tables : dict of str to RawTable
        As returned by :func:`read_tables` (possibly with revisions applied).
    source : str or pathlib.Path
        The series folder or workbook, for its name.
    input_files : tuple of pathlib.Path, optional
        The files the tables came from.

    Returns
    -------
    Series

    Raises
    ------
    SeriesError
        Listing every problem found (file, row, column, what was expected).

    Notes
    -----
    Text columns are handled by their distinct values (a specimen id is stripped and
    looked up once, however many readings carry it), and every check of the readings is
    a vectorised pass over the table: a table of 10⁶ readings is validated in a fraction
    of the time the CSV parser takes to read it.
    """
    return _assemble(tables, source, input_files, None, tuple(tables))


def rebuild_series(series: Series, tables: dict[str, RawTable], changed) -> Series:
    """Build a series again after some of its tables changed, validating only those.

    Parameters
    ----------
    series : Series
        Built from `tables` as they stood before the change.
    tables : dict of str to RawTable
        The tables now; only those named in `changed` differ from before.
    changed : iterable of str
        Names of the tables that changed (a revision changes the table it names).

    Returns
    -------
    Series
        The same as :func:`build_series` on `tables` (with the source and input files of
        `series`); the frames of the unchanged tables are those of `series`.

    Raises
    ------
    SeriesError
        Listing every problem found, as :func:`build_series` does.

    Notes
    -----
    An unchanged readings table was valid before; against a changed specimens table only
    its specimen ids are checked again, and only when the ids in the specimens table
    changed. After a revision of one specimen's height the cost is that of the
    specimens table alone, whatever the number of readings.
    """
    changed = tuple(name for name in TABLE_NAMES if name in set(changed))
    unknown = [name for name in changed if name not in tables]
    if unknown:
        raise ValueError(f"changed tables {', '.join(unknown)} are not among the tables given")
    if set(tables) != set(series.units):
        return build_series(tables, series.source, series.input_files)  # a table came or went
    return _assemble(tables, series.source, series.input_files, series, changed)


def load_series(path: str | Path) -> Series:
    """Read and validate a series folder or workbook.

    Parameters
    ----------
    path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook.

    Returns
    -------
    Series

    Raises
    ------
    SeriesError
        Listing every problem found.
    """
    tables, input_files = read_tables(path)
    return build_series(tables, path, input_files)
