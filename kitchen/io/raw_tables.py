"""A series' tables as written: what each may hold, and reading them without converting.

:data:`SCHEMAS` names the columns of each table (``specimens``, ``constant_head``,
``falling_head``), their kind of quantity and whether the table needs them.
:func:`read_tables` reads a series folder of CSV files or one workbook into
:class:`RawTable` objects: internal column names, the units of the headers, the row a
person sees in the file, and the problems of the headers. Every problem is an
:class:`InputProblem` naming the file, the row and the column; a series that cannot be
used is refused with a :class:`SeriesError` listing them all. Validation and the
conversion to SI are in :mod:`kitchen.io.table_checks` and :mod:`kitchen.io.series`.

What is read is what a person sees: a text column (a specimen id, an effort) is text,
``NA`` or ``None`` there being ids like any other; a header given twice is named, not
renamed; a file that is not comma-separated UTF-8 (semicolons, tabs, UTF-16) is named with
a hint; a row with more cells than the header is named, never shifted; a hidden table
sheet, and a formula cell without the value a spreadsheet saved for it, are refused; a
workbook that would unpack to more than :data:`WORKBOOK_UNPACKED_LIMIT` is refused unread.
"""

from __future__ import annotations

import csv
import re
import threading
import warnings
import zipfile
from concurrent.futures import Future
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from .units import UnitError, split_header, time_zone_problem, to_si

__all__ = [
    "ALTERNATIVE_COLUMNS",
    "CONDITION_TABLES",
    "SCHEMAS",
    "TEXT_KINDS",
    "TABLE_NAMES",
    "ColumnSpec",
    "InputProblem",
    "SeriesError",
    "RawTable",
    "read_tables",
    "read_table",
]


TABLE_NAMES = ("specimens", "constant_head", "falling_head", "flexible_wall", "b_value_checks")

CONDITION_TABLES = ("flexible_wall", "b_value_checks")
"""Tables of a test's conditions rather than its readings: a series may leave them out, and
a specimen without a row in ``flexible_wall`` was tested in a rigid-wall cell."""


@dataclass(frozen=True)
class ColumnSpec:
    """What a column holds: its kind of quantity, and whether the table needs it."""

    kind: str  # "id", "label", "datetime", or a kind of kitchen.io.KINDS
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
        "final_height": ColumnSpec("length"),
        "final_diameter": ColumnSpec("length"),
        "final_mass": ColumnSpec("mass"),
        "final_water_content": ColumnSpec("ratio"),
        "boring": ColumnSpec("label"),
        "sample": ColumnSpec("label"),
        "depth": ColumnSpec("length"),
        "description": ColumnSpec("label"),
        "preparation": ColumnSpec("label"),
        "permeant": ColumnSpec("label"),
        "flow_direction": ColumnSpec("label"),
        "deviations": ColumnSpec("label"),
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
        "date_time": ColumnSpec("datetime"),
        "date": ColumnSpec("datetime"),
        "time_of_day": ColumnSpec("datetime"),
        "head_pressure": ColumnSpec("pressure"),
        "headwater_level": ColumnSpec("length"),
        "tailwater_level": ColumnSpec("length"),
        "headwater_pressure": ColumnSpec("pressure"),
        "tailwater_pressure": ColumnSpec("pressure"),
    },
    "flexible_wall": {
        "specimen": ColumnSpec("id", True),
        "cell_pressure": ColumnSpec("pressure", True),
        "back_pressure": ColumnSpec("pressure", True),
        "b_value": ColumnSpec("dimensionless"),
        "consolidated_height": ColumnSpec("length"),
        "height_change": ColumnSpec("length"),
        "consolidated_diameter": ColumnSpec("length"),
        "volume_change": ColumnSpec("volume"),
    },
    "b_value_checks": {
        "specimen": ColumnSpec("id", True),
        "back_pressure": ColumnSpec("pressure"),
        "cell_pressure_increment": ColumnSpec("pressure", True),
        "pore_pressure_increment": ColumnSpec("pressure", True),
    },
    "field_tests": {
        "test": ColumnSpec("id", True),
        "date": ColumnSpec("label", True),
        "lift": ColumnSpec("label", True),
        "station": ColumnSpec("length"),
        "offset": ColumnSpec("length"),
        "x": ColumnSpec("length"),
        "y": ColumnSpec("length"),
        "water_content": ColumnSpec("ratio", True),
        "dry_density": ColumnSpec("density"),
        "wet_density": ColumnSpec("density"),
        "method": ColumnSpec("label", True),
        "effort": ColumnSpec("label"),
    },
}
"""Columns each table may carry, by internal name. ``field_tests`` is not part of a
series' laboratory data: it is read on its own by :func:`read_table`
(:mod:`kitchen.field`).

In ``falling_head`` the elapsed ``time`` may be replaced by date-times (``date_time``, or
``date`` and ``time_of_day``) and the ``head`` by a pressure or by burette levels; the
columns that stand in for them are in :data:`ALTERNATIVE_COLUMNS` and turned into ``time``
and ``head`` by :mod:`kitchen.io.logger_readings`."""

ALTERNATIVE_COLUMNS = {
    ("falling_head", "time"): ("date_time", "date"),
    ("falling_head", "head"): ("head_pressure", "headwater_level", "headwater_pressure"),
}
"""A required column, and the columns any one of which stands in for it."""

TEXT_KINDS = ("id", "label", "datetime")


@dataclass(frozen=True)
class InputProblem:
    """One problem in the input: where it is, and what was expected.

    ``specimen`` names the specimen the row belongs to, where the check knows it.
    """

    file: str
    row: int | None
    column: str | None
    message: str
    specimen: str | None = None
    subject: str = "specimen"

    def __str__(self) -> str:
        where = [self.file]
        if self.row is not None:
            where.append(f"row {self.row}")
        if self.column is not None:
            where.append(f"column '{self.column}'")
        if self.specimen is not None:
            where.append(f"{self.subject} {self.specimen}")
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


def _text_column(header: str, kinds=TEXT_KINDS) -> bool:
    """Whether a header as written names one of the text columns (ids, labels and
    date-times; or of the `kinds` given)."""
    if not _safe_header(header):
        return False
    name = _internal_name(split_header(header)[0])
    return any(name in schema and schema[name].kind in kinds for schema in SCHEMAS.values())


EMPTY_TEXTS = (
    *("", "#N/A", "#N/A N/A", "#NA", "-1.#IND", "-1.#QNAN", "-NaN", "-nan", "1.#IND"),
    *("1.#QNAN", "<NA>", "N/A", "NA", "NULL", "NaN", "None", "n/a", "nan", "null"),
)
"""Texts read as an empty cell in a column of numbers (the markers spreadsheets and pandas
write for a missing value). In a text column (a specimen id, an effort) only an empty cell
is empty: ``NA`` or ``None`` there is an id like any other."""

_SNIFF_BYTES = 4096
"""How much of a CSV file is looked at for its encoding before it is parsed. [bytes]"""

_FIELDS_MISMATCH = re.compile(r"Expected (\d+) fields in line (\d+), saw (\d+)")


def _encoding_problem(start: bytes) -> str | None:
    """What is wrong with the encoding of a file that begins with `start`, if anything."""
    if start.startswith((b"\xff\xfe", b"\xfe\xff")):
        return "is UTF-16 text; save it as UTF-8 CSV"
    if b"\x00" in start:
        return (
            "holds NUL bytes between its characters: it looks like UTF-16 text without a "
            "byte-order mark; save it as UTF-8 CSV"
        )
    return None


def _read_csv(path: Path, problems: list[InputProblem]) -> tuple[pd.DataFrame, list[str]] | None:
    """The table of a CSV file with positional column keys, and its header as written.

    The header is read as text, so a column named twice keeps its name twice (the parser
    would rename the second); text columns are read as text, an empty cell being their
    only missing value; a header separated by semicolons or tabs is kept whole for
    :func:`_prepare` to name.
    """
    label = path.name
    try:
        with path.open("rb") as stream:
            encoding_problem = _encoding_problem(stream.read(_SNIFF_BYTES))
        if encoding_problem is not None:
            problems.append(InputProblem(label, None, None, encoding_problem))
            return None
        first = pd.read_csv(
            path, header=None, nrows=1, dtype=str, keep_default_na=False, encoding="utf-8-sig"
        )
    except UnicodeDecodeError:
        problems.append(InputProblem(label, None, None, "is not UTF-8 text; save it as UTF-8 CSV"))
        return None
    except pd.errors.EmptyDataError:
        problems.append(InputProblem(label, None, None, "is empty; expected a header row"))
        return None
    except (pd.errors.ParserError, OSError) as error:
        problems.append(InputProblem(label, None, None, f"cannot be read as CSV ({error})"))
        return None
    written = [str(text) for text in first.iloc[0]] if len(first) else []
    if _other_separator(written) is not None:
        return pd.DataFrame({0: []}), written  # not comma-separated: the header says it all
    keys = list(range(len(written)))
    text_keys = [key for key in keys if _text_column(written[key])]
    # text columns as categories: the parser keeps one string per distinct id, not per row;
    # date-times, nearly all distinct, as plain text
    dtypes = {
        key: object if _text_column(written[key], ("datetime",)) else "category"
        for key in text_keys
    }
    empty = {key: [""] if key in text_keys else list(EMPTY_TEXTS) for key in keys}
    # rows with a cell beyond the header are found without the parser's warnings, which
    # are not reliable while another thread uses the warnings filters (read_ahead): a
    # later row wider than the first stops the parser (on_bad_lines="error"); a first row
    # wider than the header, which the parser only warns of (and after which it takes
    # rows as wide as it), is looked at here, and the file scanned when it is
    first = _first_row_beyond(path, len(keys))
    if first is not None and _cells_beyond(first, len(keys)):
        _name_torn_rows(path, label, keys, problems)
        return None
    try:
        with warnings.catch_warnings(record=True) as warned:
            warnings.simplefilter("always", pd.errors.ParserWarning)
            # index_col=False: a first row with a cell too many is not taken for an index
            # (which would shift every value of the table by one column); the parser warns
            frame = pd.read_csv(
                path,
                header=0,
                names=keys,
                index_col=False,
                encoding="utf-8-sig",
                dtype=dtypes,
                keep_default_na=False,
                na_values=empty,
                skip_blank_lines=False,
                on_bad_lines="error",
            )
    except pd.errors.ParserError as error:
        mismatch = _FIELDS_MISMATCH.search(str(error))
        if mismatch is None:
            problems.append(InputProblem(label, None, None, f"cannot be read as CSV ({error})"))
        elif not _name_torn_rows(path, label, keys, problems):
            _, line, saw = mismatch.groups()  # extra cells, every one empty
            problems.append(InputProblem(label, int(line), None, _too_many_cells(saw, keys)))
        return None
    except UnicodeDecodeError:
        problems.append(InputProblem(label, None, None, "is not UTF-8 text; save it as UTF-8 CSV"))
        return None
    except ValueError as error:
        problems.append(InputProblem(label, None, None, f"cannot be read as CSV ({error})"))
        return None
    for warning in warned:  # any other warning is passed on as it came
        if not issubclass(warning.category, pd.errors.ParserWarning):
            warnings.warn_explicit(
                warning.message, warning.category, warning.filename, warning.lineno
            )
    if first is not None:  # empty cells beyond the header: a later row may fill them
        _name_torn_rows(path, label, keys, problems)
    return frame, written


def _cells_beyond(record: list[str], width: int) -> bool:
    """Whether a row has a non-empty cell beyond the header's `width` cells."""
    return any(cell.strip() for cell in record[width:])


def _first_row_beyond(path: Path, width: int) -> list[str] | None:
    """The first row below the header when it has more than `width` cells, else None."""
    with path.open(encoding="utf-8-sig", newline="") as stream:
        reader = csv.reader(stream)
        next(reader, None)
        record = next(reader, [])
    return record if len(record) > width else None


def _name_torn_rows(path: Path, label: str, keys, problems: list[InputProblem]) -> bool:
    """Name the rows with a non-empty cell beyond the header (the first 20, and how many
    more); whether there are any."""
    torn = _rows_with_cells_beyond_the_header(path, len(keys))
    for row, cells in torn[:20]:
        problems.append(InputProblem(label, row, None, _too_many_cells(cells, keys)))
    if len(torn) > 20:
        problems.append(
            InputProblem(label, None, None, f"{len(torn) - 20} more row(s) with too many cells")
        )
    return bool(torn)


_SEPARATOR_WORDS = {";": "semicolons", "\t": "tabs"}


def _other_separator(written: list[str]) -> str | None:
    """The separator of a header the parser read as one cell (a semicolon or a tab, in
    that order), or None: a file saved with it is not comma-separated."""
    if len(written) == 1:
        for mark in _SEPARATOR_WORDS:
            if mark in written[0]:
                return mark
    return None


def _rows_with_cells_beyond_the_header(path: Path, width: int) -> list[tuple[int, int]]:
    """The rows (as a spreadsheet counts them) with a non-empty cell beyond the header's
    `width` cells, and how many cells they have; read only when the parser found one."""
    torn = []
    with path.open(encoding="utf-8-sig", newline="") as stream:
        reader = csv.reader(stream)
        for record in reader:
            if reader.line_num > 1 and _cells_beyond(record, width):
                torn.append((reader.line_num, len(record)))
    return torn


def _too_many_cells(cells, keys) -> str:
    return (
        f"{cells} cells where the header has {len(keys)}: is there a comma in a value (a "
        "decimal comma, or text to put in quotes)?"
    )


def column_letters(position: int) -> str:
    """The spreadsheet letters of the column at `position` (0 → ``A``, 26 → ``AA``)."""
    letters = ""
    position += 1
    while position:
        position, rest = divmod(position - 1, 26)
        letters = chr(ord("A") + rest) + letters
    return letters


def _prepare(
    name: str, label: str, frame: pd.DataFrame, written: list[str], problems: list[InputProblem]
):
    """Map headers to internal names and units; collect header problems.

    ``frame`` has one column per header cell, in order; ``written`` holds the headers as
    written (a header given twice is there twice)."""
    schema = SCHEMAS[name]
    units: dict[str, str | None] = {}
    headers: dict[str, str] = {}
    rename: dict = {}
    first_at: dict[str, int] = {}
    separator = _other_separator(written)  # a header not comma-separated: kept whole
    for position, (raw, raw_text) in enumerate(zip(frame.columns, written, strict=True)):
        if not raw_text.strip() or separator is not None:
            continue  # no header (an empty column, notes beside the table), or not CSV
        try:
            header_name, unit = split_header(raw_text)
        except UnitError as error:
            problems.append(InputProblem(label, 1, raw_text, str(error)))
            continue
        internal = _internal_name(header_name)
        if internal not in schema:
            continue  # extra columns (notes, operator) are carried by the file, not used
        if internal in first_at:
            problems.append(
                InputProblem(
                    label,
                    1,
                    raw_text,
                    f"column '{internal}' given twice (columns "
                    f"{column_letters(first_at[internal])} and {column_letters(position)}); "
                    "keep one",
                )
            )
            continue
        first_at[internal] = position
        spec = schema[internal]
        if spec.kind == "datetime":
            zone_problem = time_zone_problem(unit)
            if zone_problem is not None:
                problems.append(InputProblem(label, 1, raw_text, zone_problem))
                continue
        elif spec.kind in TEXT_KINDS:
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
        units[internal] = unit if spec.kind not in TEXT_KINDS or spec.kind == "datetime" else None
        headers[internal] = raw_text
    for column, spec in schema.items():
        if spec.required and column not in rename.values():
            if column in first_at:
                continue  # present but refused above; already reported
            if any(other in first_at for other in ALTERNATIVE_COLUMNS.get((name, column), ())):
                continue  # stood in for by another column (checked with the values)
            hint = (
                f" (the header has {_SEPARATOR_WORDS[separator]}: save the file comma-separated)"
                if separator is not None
                else ""
            )
            found = ", ".join(written) or "none"
            problems.append(
                InputProblem(
                    label, 1, column, f"required column missing{hint}; columns found: {found}"
                )
            )
    kept = frame[list(rename)].rename(columns=rename)
    source_row = np.arange(2, len(frame) + 2, dtype=np.int32)  # rows of a file, never 2^31
    blank = np.ones(len(frame), dtype=bool)  # a row with no cell, column by column
    for column in frame.columns:
        blank &= frame[column].isna().to_numpy()
        if not blank.any():
            break  # every row has a cell in the columns seen: none is blank
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
    "density": "[Mg/m^3], [kg/m^3], [lb/ft^3]",
    "ratio": "[%] or [-]",
    "pressure": "[kPa], [psi]",
}


_AHEAD: dict[Path, tuple[tuple, Future]] = {}
"""CSV files parsed ahead (:func:`read_ahead`), by path: the file's identity when it was
read and the future of what :func:`_read_csv` made of it. Each is taken once."""


def _file_identity(path: Path) -> tuple:
    """What changes when a file is written again: its inode, size and modification time."""
    stat = path.stat()
    return stat.st_ino, stat.st_size, stat.st_mtime_ns


def read_ahead(path: str | Path) -> threading.Thread | None:
    """Start parsing the CSV files of a series folder on a thread, and return it at once.

    ``python -m kitchen report`` calls this first, before it imports the modules that
    check and reduce the series: the parser works outside the interpreter's lock, so a
    long logger record is parsed while they are imported. :func:`read_tables` then takes
    each file's parsed table, and the problems found in it, in place of parsing the file
    itself, if the file is unchanged since (same inode, size and modification time); a
    file written again in between is parsed again. A workbook, or a path that is no
    folder, is left to :func:`read_tables` (None is returned). The thread imports nothing
    (the reader's codec is looked up here first), so it never waits on an import of the
    caller's; rows with a cell too many are found without the parser's warnings
    (:func:`_read_csv`), which pandas makes unreliable while two threads use them: it sets
    and restores the warnings filters on every call, and one thread's restore can undo
    the other's (the caller restores them once the thread is joined).

    scipy's OpenBLAS, which the reduction loads through ``scipy.special``, is loaded here
    first: it reserves its buffers when loaded and, when the address space is short (a
    parse of 10⁷ readings under a memory limit), retries for ever holding the interpreter,
    where Python itself would raise MemoryError.
    """
    import codecs

    import scipy.special  # noqa: F401  (loads OpenBLAS before the parse takes the memory)

    folder = Path(path)
    if not folder.is_dir():
        return None
    codecs.lookup("utf-8-sig")
    files = []
    for file in _table_files(folder):
        try:
            identity = _file_identity(file)
        except OSError:
            continue
        future: Future = Future()
        future.set_running_or_notify_cancel()
        _AHEAD[file] = (identity, future)
        files.append((file, future))

    def parse() -> None:
        for file, future in files:
            problems: list[InputProblem] = []
            try:
                read = _read_csv(file, problems)
            except BaseException as error:  # raised where the table is taken
                future.set_exception(error)
            else:
                future.set_result((read, problems))

    thread = threading.Thread(target=parse, name="kitchen-read-ahead", daemon=True)
    thread.start()
    return thread


def _table_files(folder: Path) -> list[Path]:
    """The CSV files of a series folder that hold its tables, in the order of TABLE_NAMES."""
    return [file for name in TABLE_NAMES if (file := folder / f"{name}.csv").exists()]


def _read_csv_once(path: Path, problems: list[InputProblem]):
    """:func:`_read_csv` of `path`, or what :func:`read_ahead` made of it while unchanged."""
    ahead = _AHEAD.pop(path, None)
    if ahead is not None:
        identity, future = ahead
        read, found = future.result()
        try:
            unchanged = _file_identity(path) == identity
        except OSError:
            unchanged = False
        if unchanged:
            problems.extend(found)
            return read
    return _read_csv(path, problems)


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
    frames: dict[str, tuple[str, pd.DataFrame, list[str]]] = {}
    if path.is_dir():
        files = []
        for file in _table_files(path):
            read = _read_csv_once(file, problems)
            files.append(file)
            if read is not None:
                frames[file.stem] = (file.name, *read)
        label_of = {name: f"{name}.csv" for name in TABLE_NAMES}
        input_files = tuple(files)
    elif path.suffix.lower() == ".xlsx" and path.exists():
        frames = _read_workbook(path, problems)
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
    for name, (label, frame, written) in frames.items():
        header_problems: list[InputProblem] = []
        kept, units, headers = _prepare(name, label, frame, written, header_problems)
        tables[name] = RawTable(name, label, kept, units, headers, header_problems)
    _name_empty_tables(tables)
    return tables, input_files


def _name_empty_tables(tables: dict[str, RawTable]) -> None:
    """A table with its header and no rows below it: the specimens table always, the readings
    tables when none of them has a row (one empty readings table beside a full one is a
    method not used)."""
    readings = [tables[name] for name in ("constant_head", "falling_head") if name in tables]
    empty = [
        table
        for table in tables.values()
        if len(table.frame) == 0 and table.name not in CONDITION_TABLES
    ]
    for table in empty:
        complete = all(
            column in table.frame.columns
            for column, spec in SCHEMAS[table.name].items()
            if spec.required
        )
        if not complete:
            continue  # a required column is missing: that problem is named already
        if table.name == "specimens":
            what = "no specimens below the header: one row per specimen expected"
        elif all(len(other.frame) == 0 for other in readings):
            what = "no readings below the header: one row per reading or collection expected"
        else:
            continue
        table.problems.append(InputProblem(table.file, 2, None, what))


def read_table(path: str | Path, name: str) -> RawTable:
    """Read one table of :data:`SCHEMAS` as written, without converting units.

    Parameters
    ----------
    path : str or pathlib.Path
        A CSV file holding the table; a folder holding ``NAME.csv``; or an ``.xlsx``
        workbook with a sheet ``NAME``.
    name : str
        The table's name in :data:`SCHEMAS` (``"field_tests"``).

    Returns
    -------
    RawTable
        With the problems of its header in ``problems`` (a missing column, a missing or
        unknown unit), to report with those of its values.

    Raises
    ------
    SeriesError
        When the file or sheet is missing or cannot be read.
    """
    path = Path(path)
    problems: list[InputProblem] = []
    if path.is_dir():
        path = path / f"{name}.csv"
    if path.suffix.lower() == ".xlsx" and path.exists():
        read = _read_workbook(path, problems, (name,)).get(name)
        if read is None and not problems:
            problems.append(InputProblem(path.name, None, None, f"has no sheet '{name}'"))
    elif path.is_file():
        frame = _read_csv(path, problems)
        read = None if frame is None else (path.name, *frame)
    else:
        raise SeriesError(
            [InputProblem(str(path), None, None, f"not found: expected {name}.csv or a workbook")]
        )
    if problems or read is None:
        raise SeriesError(problems)
    label, frame, written = read
    header_problems: list[InputProblem] = []
    kept, units, headers = _prepare(name, label, frame, written, header_problems)
    table = RawTable(name, label, kept, units, headers, header_problems)
    if len(kept) == 0 and not header_problems:
        header_problems.append(InputProblem(label, 2, None, "no rows below the header"))
    return table


WORKBOOK_UNPACKED_LIMIT = 64 * 2**20
"""The most a workbook may unpack to (about 1.5 × 10⁶ cells, some 20 s to read); a longer
logger record belongs in a CSV file. A larger workbook is refused before it is unpacked,
so a compressed bomb costs nothing. [bytes]"""

_FORMULA_ELEMENT = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?f[\s>/]")
"""A formula element of a worksheet part (``<f>``, ``<f t="shared" …/>``, ``<x:f>``)."""


def _has_formulas(archive: zipfile.ZipFile) -> bool:
    """Whether any worksheet part of the workbook holds a formula (one streaming pass)."""
    for member in archive.infolist():
        if not member.filename.startswith("xl/worksheets/"):
            continue
        tail = b""
        with archive.open(member) as stream:
            while chunk := stream.read(2**20):
                if _FORMULA_ELEMENT.search(tail + chunk):
                    return True
                tail = chunk[-64:]
    return False


def _workbook_problem(path: Path, message: str) -> SeriesError:
    return SeriesError([InputProblem(path.name, None, None, message)])


def _read_workbook(
    path: Path, problems: list[InputProblem], names: tuple[str, ...] = TABLE_NAMES
) -> dict[str, tuple[str, pd.DataFrame, list[str]]]:
    """The table sheets of a workbook: positional column keys, the headers as written.

    A workbook that unpacks to more than :data:`WORKBOOK_UNPACKED_LIMIT` is refused unread.
    A hidden table sheet, and a formula cell without a value saved by the spreadsheet that
    last calculated it, are named in `problems`: what the tool reads must be what a person
    sees. A true/false cell is kept as it is, for the checks to refuse where a number
    belongs; text columns are read as text, an empty cell being their only missing value.
    """
    import openpyxl

    try:
        with zipfile.ZipFile(path) as archive:
            unpacked = sum(member.file_size for member in archive.infolist())
            if unpacked > WORKBOOK_UNPACKED_LIMIT:
                raise _workbook_problem(
                    path,
                    f"unpacks to {unpacked / 2**20:.0f} MB, more than the "
                    f"{WORKBOOK_UNPACKED_LIMIT / 2**20:.0f} MB a workbook may hold here; "
                    "save a long record of readings as CSV",
                )
            formulas = _has_formulas(archive)
        book = openpyxl.load_workbook(path, read_only=True, data_only=True)
    except SeriesError:
        raise
    except zipfile.BadZipFile:
        raise _workbook_problem(path, "cannot be read: not an .xlsx workbook") from None
    except Exception as error:  # openpyxl raises many kinds for a damaged file
        raise _workbook_problem(path, f"cannot be read ({error})") from None
    read: dict[str, tuple[str, pd.DataFrame, list[str]]] = {}
    rows_of: dict[str, list[tuple]] = {}
    try:
        for name in names:
            if name not in book.sheetnames:
                continue
            sheet = book[name]
            label = f"{path.name} [{name}]"
            if sheet.sheet_state != "visible":
                problems.append(
                    InputProblem(
                        label,
                        None,
                        None,
                        f"the sheet is {sheet.sheet_state.replace('veryH', 'very h')}: unhide "
                        "it and check what it holds, or remove it; a hidden sheet is not read",
                    )
                )
                continue
            sheet.reset_dimensions()  # the stored dimensions may be wrong: read every row
            rows = list(sheet.iter_rows(values_only=True))
            rows_of[name] = rows
            read[name] = (label, *_sheet_frame(rows))
    except Exception as error:  # a damaged sheet part
        raise _workbook_problem(path, f"cannot be read ({error})") from None
    finally:
        book.close()
    if formulas and rows_of:
        _name_formulas_without_values(path, rows_of, read, problems)
    return read


def _sheet_frame(rows: list[tuple]) -> tuple[pd.DataFrame, list[str]]:
    """A sheet's rows as a frame with positional keys, and its header (row 1) as written."""
    width = max((len(row) for row in rows), default=0)
    header = list(rows[0]) + [None] * (width - len(rows[0])) if rows else []
    written = [_header_text(cell) for cell in header]
    text_keys = {key for key, text in enumerate(written) if _text_column(text)}
    columns: dict[int, list] = {key: [] for key in range(width)}
    for row in rows[1:]:
        for key in range(width):
            value = row[key] if key < len(row) else None
            columns[key].append(value)
    frame = pd.DataFrame(
        {
            key: pd.Series(
                [_cell_text(v) for v in values]
                if key in text_keys
                else [_number_cell(v) for v in values],
                dtype=object,
            )
            for key, values in columns.items()
        },
        index=pd.RangeIndex(len(rows) - 1 if rows else 0),
    )
    return frame, written


def _header_text(value) -> str:
    if value is None:
        return ""
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value)


def _number_cell(value):
    """A cell of a column of numbers: an empty marker (``NA``, ``#N/A``) is an empty cell."""
    if value is None or (isinstance(value, str) and value.strip() in EMPTY_TEXTS):
        return np.nan
    return value


def _name_formulas_without_values(path, rows_of, read, problems) -> None:
    """Name the formula cells of the table sheets that have no saved value."""
    import openpyxl

    book = openpyxl.load_workbook(path, read_only=True, data_only=False)
    try:
        for name, rows in rows_of.items():
            sheet = book[name]
            sheet.reset_dimensions()
            label, _, written = read[name]
            for row_index, cells in enumerate(sheet.iter_rows()):
                values = rows[row_index] if row_index < len(rows) else ()
                for key, cell in enumerate(cells):
                    if getattr(cell, "data_type", None) != "f":
                        continue
                    if key < len(values) and values[key] is not None:
                        continue
                    where = f"{column_letters(key)}{row_index + 1}"
                    header = written[key] if key < len(written) and written[key] else where
                    problems.append(
                        InputProblem(
                            label,
                            row_index + 1,
                            header,
                            f"cell {where} holds a formula with no saved value (the program "
                            "that wrote the workbook did not calculate it): open and save it "
                            "in a spreadsheet, or type the value",
                        )
                    )
    finally:
        book.close()


def _cell_text(value):
    if value is None or (isinstance(value, float) and np.isnan(value)):
        return np.nan
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    if isinstance(value, str) and not value.strip():
        return np.nan
    return str(value)
