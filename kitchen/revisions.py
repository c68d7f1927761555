"""Revisions that lose nothing: an append-only log of corrections, and the effective data.

A revision corrects one value of a series — a specimen's height re-measured after the
test, a reading typed wrong — without touching the raw files. Each revision is one row of
the series' log: ``revisions.csv`` in the series folder, or ``<stem>.revisions.csv``
beside an ``.xlsx`` workbook. A row is appended in a single write and flushed to disk;
rows are never changed or deleted, and a revision is withdrawn by a later row that names
it.

The *effective data* are the raw tables as written with the standing revisions applied in
the log's order. They are applied between :func:`kitchen.series.read_tables` and
:func:`kitchen.series.build_series`, so every check of the loader runs again on them, and a
revision the loader would refuse is refused before it is written.

A value is named by its table, its specimen, for a reading the reading's row number in the
file or sheet (the header is row 1, as in the loader's messages), and its field (the
internal column name, ``height``, ``head``…). The value is typed with its unit
(``"4.95 in"``) and converted to the unit of the file's column before it is applied.
"""

from __future__ import annotations

import csv
import hashlib
import io
import os
import re
import secrets
from dataclasses import dataclass, replace
from dataclasses import field as dataclass_field
from datetime import datetime
from pathlib import Path

import numpy as np
import pandas as pd

from .files import append_line, folder_lock
from .series import (
    SCHEMAS,
    TABLE_NAMES,
    RawTable,
    Series,
    SeriesError,
    build_series,
    read_tables,
    rebuild_series,
)
from .units import UnitError, format_header, parse_value, split_header, to_si

__all__ = [
    "LOG_COLUMNS",
    "Revision",
    "RevisionError",
    "EffectiveSeries",
    "HeldSeries",
    "file_stamps",
    "revisions_path",
    "read_revisions",
    "apply_revisions",
    "revise",
    "withdraw",
    "load_effective_series",
    "log_sha256",
    "history_table",
    "format_history",
    "what_changed",
    "revision_effect",
]

LOG_COLUMNS = (
    "id", "when", "who", "action", "table", "specimen", "reading_row", "field",
    "old_value", "new_value", "applied_value", "reason", "withdraws",
)  # fmt: skip
"""Columns of the revision log, in order."""

REVISE, WITHDRAW = "revise", "withdraw"
_ID = re.compile(r"^[0-9a-f]{8}$")
_TEXT_KINDS = ("id", "label")


class RevisionError(ValueError):
    """A revision that cannot be made or applied, or a log that cannot be read."""

    def __init__(self, problems: list[str] | str):
        self.problems = [problems] if isinstance(problems, str) else list(problems)
        if len(self.problems) == 1:
            super().__init__(self.problems[0])
        else:
            lines = [f"{len(self.problems)} problem(s) with the revisions:"]
            super().__init__("\n".join(lines + [f"  - {p}" for p in self.problems]))


@dataclass(frozen=True)
class Revision:
    """One row of the revision log (see :data:`LOG_COLUMNS` and the README).

    ``old_value`` is the value as it stood when the revision was made, in the file's unit
    (``"116.27 mm"``; empty when the cell was empty); ``new_value`` is the value as typed
    (``"4.95 in"``); ``applied_value`` is the typed value in the file's unit, which is what
    the effective data hold. A withdrawal row copies the table, specimen, reading and field
    of the revision it withdraws and names it in ``withdraws``.
    """

    id: str
    when: str
    who: str
    action: str
    table: str
    specimen: str
    reading_row: int | None
    field: str
    old_value: str
    new_value: str
    applied_value: str
    reason: str
    withdraws: str = ""
    log_row: int | None = dataclass_field(default=None, compare=False)

    def target(self) -> tuple:
        """The value this row is about: (table, specimen, reading_row, field)."""
        return (self.table, self.specimen, self.reading_row, self.field)

    def describe(self) -> str:
        """The change in words, for messages and the history."""
        where = f"{self.table} {self.specimen}"
        if self.reading_row is not None:
            where += f" reading row {self.reading_row}"
        if self.action == WITHDRAW:
            back = _shown(self.new_value)
            return f"withdraws {self.withdraws}: {where} {self.field} back to {back}"
        typed = "" if self.new_value == self.applied_value else f" (typed {self.new_value})"
        return f"{where} {self.field}: {_shown(self.old_value)} -> {self.applied_value}{typed}"


@dataclass(frozen=True)
class EffectiveSeries:
    """A series loaded with its revisions applied, and what is needed to cite them.

    Attributes
    ----------
    series : Series
        The validated effective data.
    applied : tuple of Revision
        The standing revisions, in the order applied.
    withdrawn : tuple of Revision
        The revisions withdrawn by a later row (not applied).
    log_path : pathlib.Path
        Where the log is (or would be).
    log_sha256 : str or None
        SHA-256 of the log's bytes as read (``None`` when there is no log).
    log_rows : int
        Number of rows read from the log (revisions and withdrawals).
    """

    series: Series
    applied: tuple[Revision, ...]
    withdrawn: tuple[Revision, ...]
    log_path: Path
    log_sha256: str | None
    log_rows: int

    @property
    def revision_count(self) -> int:
        """How many revisions were applied."""
        return len(self.applied)


def _shown(text: str) -> str:
    return text if text else "(empty)"


def revisions_path(series_path: str | Path) -> Path:
    """Where a series' revision log lives.

    ``<folder>/revisions.csv`` for a series folder; ``<stem>.revisions.csv`` beside an
    ``.xlsx`` workbook (``drainage_sand.revisions.csv`` for ``drainage_sand.xlsx``).
    """
    path = Path(series_path)
    if path.suffix.lower() == ".xlsx":
        return path.with_name(f"{path.stem}.revisions.csv")
    return path / "revisions.csv"


# --- the log --------------------------------------------------------------------------------


def _encode(revision: Revision) -> bytes:
    buffer = io.StringIO()
    values = [getattr(revision, name) for name in LOG_COLUMNS]
    csv.writer(buffer, lineterminator="\n").writerow(["" if v is None else v for v in values])
    return buffer.getvalue().encode("utf-8")


_HEADER = (",".join(LOG_COLUMNS) + "\n").encode("utf-8")


def _parse_log(data: bytes, label: str) -> tuple[Revision, ...]:
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise RevisionError(f"{label}: is not UTF-8 text") from None
    try:
        records = list(csv.reader(io.StringIO(text, newline="")))
    except csv.Error as error:
        raise RevisionError(f"{label}: cannot be read as CSV ({error})") from None
    if not records or [c.strip() for c in records[0]] != list(LOG_COLUMNS):
        found = ", ".join(records[0]) if records else "nothing"
        raise RevisionError(
            f"{label}, row 1: expected the columns {', '.join(LOG_COLUMNS)}; found {found}"
        )
    problems: list[str] = []
    revisions: list[Revision] = []
    by_id: dict[str, Revision] = {}
    withdrawn_by: dict[str, str] = {}
    for number, record in enumerate(records[1:], start=2):
        if not any(cell.strip() for cell in record):
            continue
        if len(record) != len(LOG_COLUMNS):
            problems.append(
                f"{label}, row {number}: expected {len(LOG_COLUMNS)} fields, found "
                f"{len(record)} (a write cut short, or an edit by hand?)"
            )
            continue
        row = dict(zip(LOG_COLUMNS, (cell.strip() for cell in record), strict=True))
        found = _check_row(row, label, number, by_id, withdrawn_by)
        if isinstance(found, str):
            problems.append(found)
            continue
        revisions.append(found)
        by_id[found.id] = found
        if found.action == WITHDRAW:
            withdrawn_by[found.withdraws] = found.id
    if problems:
        raise RevisionError(problems)
    return tuple(revisions)


def _check_row(row: dict, label: str, number: int, by_id: dict, withdrawn_by: dict):
    def problem(column: str, message: str) -> str:
        return f"{label}, row {number}, column '{column}': {message}"

    if not _ID.match(row["id"]):
        return problem("id", f"expected 8 hexadecimal digits, found {row['id']!r}")
    if row["id"] in by_id:
        first = by_id[row["id"]].log_row
        return problem("id", f"id {row['id']} is used twice (first at row {first})")
    try:
        _check_when(row["when"])
    except RevisionError as error:
        return problem("when", str(error))
    if not row["reason"]:
        return problem("reason", "every revision needs a reason")
    reading = None
    if row["action"] == REVISE:
        if row["table"] not in TABLE_NAMES:
            return problem("table", f"expected one of {', '.join(TABLE_NAMES)}")
        if row["field"] not in SCHEMAS[row["table"]] or row["field"] == "specimen":
            return problem("field", f"{row['field']!r} is not a value of {row['table']}")
        if not row["specimen"] or not row["applied_value"]:
            return problem("specimen" if not row["specimen"] else "applied_value", "empty")
        if row["table"] != "specimens":
            if not row["reading_row"].isdigit() or int(row["reading_row"]) < 2:
                return problem("reading_row", "expected the reading's row number (2 or more)")
            reading = int(row["reading_row"])
        if row["withdraws"]:
            return problem("withdraws", "a revision row withdraws nothing; leave it empty")
    elif row["action"] == WITHDRAW:
        target = by_id.get(row["withdraws"])
        if target is None:
            return problem("withdraws", f"no earlier revision {row['withdraws']!r} to withdraw")
        if target.action == WITHDRAW:
            return problem("withdraws", f"{target.id} is itself a withdrawal")
        if target.id in withdrawn_by:
            by = withdrawn_by[target.id]
            return problem("withdraws", f"{target.id} was already withdrawn by {by}")
        reading = target.reading_row
    else:
        return problem("action", f"expected {REVISE} or {WITHDRAW}, found {row['action']!r}")
    values = {name: row[name] for name in LOG_COLUMNS if name != "reading_row"}
    return Revision(**values, reading_row=reading, log_row=number)


def _read_log(log: Path) -> tuple[bytes | None, tuple[Revision, ...]]:
    try:
        data = log.read_bytes()
    except FileNotFoundError:
        return None, ()
    return data, _parse_log(data, log.name)


def read_revisions(series_path: str | Path) -> tuple[Revision, ...]:
    """Every row of a series' revision log, in order (empty when there is no log).

    Raises
    ------
    RevisionError
        Naming the log's row and column for each row that cannot be read.
    """
    return _read_log(revisions_path(series_path))[1]


def log_sha256(series_path: str | Path) -> str | None:
    """SHA-256 (hex) of a series' revision log as it is now; ``None`` when there is none."""
    log = revisions_path(series_path)
    try:
        return hashlib.sha256(log.read_bytes()).hexdigest()
    except FileNotFoundError:
        return None


def _standing(revisions) -> tuple[list[Revision], list[Revision]]:
    withdrawn_ids = {r.withdraws for r in revisions if r.action == WITHDRAW}
    changes = [r for r in revisions if r.action == REVISE]
    return (
        [r for r in changes if r.id not in withdrawn_ids],
        [r for r in changes if r.id in withdrawn_ids],
    )


# --- values in the raw tables ---------------------------------------------------------------


def _cell_text(value) -> str:
    if value is None or (np.ndim(value) == 0 and pd.isna(value)):
        return ""
    if isinstance(value, float | np.floating):
        return f"{float(value):.15g}"
    if isinstance(value, int | np.integer) and not isinstance(value, bool):
        return str(int(value))
    return " ".join(str(value).split())


def _with_unit(text: str, unit: str | None) -> str:
    return f"{text} {unit}" if text and unit else text


def _field_name(table: str, field_text: str) -> str:
    name = "_".join(split_header(str(field_text))[0].replace("-", " ").split())
    fields = [f for f in SCHEMAS[table] if f != "specimen"]
    if name == "specimen":
        raise RevisionError(
            "the specimen id names the revision and cannot itself be revised; "
            f"the values of {table} are: {', '.join(fields)}"
        )
    if name not in SCHEMAS[table]:
        elsewhere = [other for other in TABLE_NAMES if other != table and name in SCHEMAS[other]]
        if elsewhere:
            raise RevisionError(
                f"{name!r} is a value of {' and '.join(elsewhere)}, not of {table}: name the "
                "reading by its row number in the file (and the table, if the series has both)"
            )
        raise RevisionError(
            f"unknown field {field_text!r} in {table}; its values are: {', '.join(fields)}"
        )
    return name


def _table_name(tables: dict[str, RawTable], table: str | None, reading: int | None) -> str:
    if table is not None:
        if table not in TABLE_NAMES:
            raise RevisionError(f"unknown table {table!r}; expected {', '.join(TABLE_NAMES)}")
        if table not in tables:
            raise RevisionError(f"the series has no {table} table ({', '.join(tables)} only)")
        if table == "specimens" and reading is not None:
            raise RevisionError("a specimen value takes no reading; drop the reading row")
        return table
    if reading is None:
        return "specimens"
    readings = [name for name in ("constant_head", "falling_head") if name in tables]
    if not readings:
        raise RevisionError("the series has no readings; a reading row names nothing")
    if len(readings) > 1:
        raise RevisionError(
            "the series has constant_head and falling_head readings; name the table"
        )
    return readings[0]


def _locate(tables, table: str, specimen: str, reading: int | None, known: dict | None = None):
    """The table and frame index of a value; a RevisionError naming what is not there.

    ``known`` keeps, between calls, the specimen ids of the specimens table and the row
    numbers of a readings table (neither is ever revised).
    """
    raw = tables.get(table)
    if raw is None:
        raise RevisionError(f"the series has no {table} table")
    known = {} if known is None else known
    column = raw.frame["specimen"] if "specimen" in raw.frame else pd.Series([], dtype=object)
    if table == "specimens":
        if table not in known:
            known[table] = column.map(_cell_text)
        ids = known[table]
        matches = np.flatnonzero(ids.to_numpy(dtype=object) == specimen)
        if len(matches) == 0:
            known = sorted(set(ids) - {""})
            more = f"... ({len(known)} in all)" if len(known) > 12 else ""
            listed = ", ".join(known[:12]) + more
            raise RevisionError(f"unknown specimen {specimen!r}: {raw.file} lists {listed}")
        if len(matches) > 1:
            rows = ", ".join(str(r) for r in raw.frame["source_row"].iloc[matches])
            raise RevisionError(f"specimen {specimen!r} is in {raw.file} twice (rows {rows})")
        return raw, raw.frame.index[matches[0]]
    if reading is None:
        raise RevisionError(
            f"a value of {table} needs its reading: the reading's row number in {raw.file}"
        )
    if table not in known:
        known[table] = raw.frame["source_row"].to_numpy()
    rows = known[table]
    matches = np.flatnonzero(rows == reading)
    if len(matches) == 0:
        span = f"rows {rows.min()}-{rows.max()}" if len(rows) else "no rows"
        raise RevisionError(f"{raw.file} has no reading at row {reading} (its readings: {span})")
    index = raw.frame.index[matches[0]]
    owner = _cell_text(column.iloc[matches[0]])  # only this row's id is read
    if owner != specimen:
        raise RevisionError(
            f"{raw.file} row {reading} is a reading of specimen {owner!r}, not of {specimen!r}"
        )
    return raw, index


def _current(raw: RawTable, index, column: str) -> str:
    if column not in raw.frame.columns:
        return ""
    return _with_unit(_cell_text(raw.frame.at[index, column]), raw.units.get(column))


def _applied_text(value: str, column: str, kind: str, unit: str | None) -> str:
    """The typed value in the column's unit (``unit`` None: the typed unit is kept)."""
    if kind in _TEXT_KINDS:
        return " ".join(value.split())
    try:
        parsed = parse_value(value, kind)
    except UnitError as error:
        raise RevisionError(f"{column}: value {value!r}: {error}; nothing was written") from None
    if not np.isfinite(parsed.si):
        raise RevisionError(f"{column}: value {value!r}: expected a finite number")
    if unit is None:
        if kind == "dimensionless":
            return f"{parsed.si:.15g}"
        return f"{parsed.magnitude:.15g} {parsed.unit}"
    offset = to_si(0.0, unit, kind)
    magnitude = (parsed.si - offset) / (to_si(1.0, unit, kind) - offset)
    return f"{magnitude:.15g} {unit}"


def _set(raw: RawTable, index, column: str, applied: str) -> str | None:
    """Put an applied value into a raw table; a message when it no longer fits."""
    kind = SCHEMAS[raw.name][column].kind
    if kind in _TEXT_KINDS:
        value, unit = applied, None
    else:
        number, _, unit_text = applied.partition(" ")
        try:
            value = float(number)
        except ValueError:
            return f"applied value {applied!r} is not a number followed by a unit"
        unit = unit_text or None
    if column not in raw.frame.columns:
        raw.frame[column] = pd.Series(np.nan, index=raw.frame.index, dtype=object)
        raw.units[column] = unit
        raw.headers[column] = format_header(column, unit)
    elif kind not in _TEXT_KINDS and (raw.units.get(column) or None) != unit:
        return f"the column is now in {raw.units.get(column)!r}, not {unit!r} as when revised"
    if not (kind not in _TEXT_KINDS and raw.frame[column].dtype.kind == "f"):
        raw.frame[column] = raw.frame[column].astype(object)
    raw.frame.at[index, column] = value
    return None


def _apply(tables: dict[str, RawTable], revisions) -> tuple[dict, list, list[str]]:
    """Apply standing revisions to copies; skip (and name) those that no longer fit.

    Only the tables a standing revision names are copied; the others are returned as given
    (nothing here writes to them)."""
    standing, _ = _standing(revisions)
    named = {revision.table for revision in standing}  # only these are written to
    tables = {name: table.copy() if name in named else table for name, table in tables.items()}
    applied, problems, known = [], [], {}
    for revision in standing:
        where = f"revision {revision.id} ({revision.describe()})"
        try:
            raw, index = _locate(
                tables, revision.table, revision.specimen, revision.reading_row, known
            )
        except RevisionError as error:
            problems.append(f"{where} no longer fits the raw data: {error}")
            continue
        current = _current(raw, index, revision.field)
        if current != revision.old_value:
            row = int(raw.frame.at[index, "source_row"])
            problems.append(
                f"{where}: {raw.file} row {row} now holds {_shown(current)}, not "
                f"{_shown(revision.old_value)} as when it was made (was the file edited?); "
                f"withdraw it with: revise SERIES --withdraw {revision.id} --reason ..."
            )
            continue
        trouble = _set(raw, index, revision.field, revision.applied_value)
        if trouble:
            problems.append(f"{where}: {trouble}")
            continue
        applied.append(revision)
    return tables, applied, problems


def apply_revisions(
    tables: dict[str, RawTable], revisions
) -> tuple[dict[str, RawTable], tuple[Revision, ...]]:
    """Apply the standing revisions to raw tables, in order.

    Parameters
    ----------
    tables : dict of str to RawTable
        From :func:`kitchen.series.read_tables`; not changed.
    revisions : sequence of Revision
        Log rows, in the log's order (withdrawn revisions are skipped).

    Returns
    -------
    tables : dict of str to RawTable
        New tables holding the effective data, in the file's units.
    applied : tuple of Revision
        The revisions applied.

    Raises
    ------
    RevisionError
        When a revision no longer fits the raw data: its value is gone, or the raw file
        holds something other than the revision's old value (the file was edited after the
        revision was made).
    """
    effective, applied, problems = _apply(tables, revisions)
    if problems:
        raise RevisionError(problems)
    return effective, tuple(applied)


# --- making and withdrawing revisions -------------------------------------------------------


def _free_text(text, name: str, required: bool) -> str:
    words = " ".join(str(text or "").split())
    if required and not words:
        raise RevisionError(
            f"a revision needs a {name}: say why the value changes "
            "(for example 're-measured after test'); nothing was written"
        )
    if words.startswith(("=", "+", "@")):
        raise RevisionError(
            f"the {name} starts with {words[0]!r}, which a spreadsheet would run as a formula; "
            "start it with a word"
        )
    return words


def _check_when(text: str) -> str:
    try:
        moment = datetime.fromisoformat(text)
    except (TypeError, ValueError):
        raise RevisionError(
            f"{text!r} is not an ISO 8601 date and time (for example 2025-05-02T14:30:00+02:00)"
        ) from None
    if moment.tzinfo is None:
        raise RevisionError(f"{text!r} has no time zone; add one (for example +02:00 or Z)")
    return text


def _when(when) -> str:
    if when is None:
        return datetime.now().astimezone().isoformat(timespec="seconds")
    if isinstance(when, datetime):
        when = when.isoformat(timespec="seconds")
    return _check_when(str(when).strip())


def _new_id(existing) -> str:
    taken = {revision.id for revision in existing}
    while (candidate := secrets.token_hex(4)) in taken:
        pass
    return candidate


def _load_problems(tables, source: Path, input_files) -> list[str]:
    try:
        build_series(tables, source, input_files)
    except SeriesError as error:
        return [str(problem) for problem in error.problems]
    return []


def file_stamps(files) -> tuple[tuple[int, int], ...]:
    """Size and modification time (ns) of each file: what tells that a file was rewritten."""
    return tuple((status.st_size, status.st_mtime_ns) for status in map(os.stat, files))


@dataclass(frozen=True)
class HeldSeries:
    """A series a caller holds open (:class:`kitchen.workspace.Workspace`): what recording
    a revision would otherwise read and validate again.

    Used only while every input file still has its `stamps` and the log holds exactly
    `revisions`; otherwise the files are read again, as without it.
    """

    tables: dict[str, RawTable]
    """The raw tables as read (never written to)."""
    input_files: tuple[Path, ...]
    stamps: tuple[tuple[int, int], ...]
    """:func:`file_stamps` of `input_files`, taken when they were read."""
    revisions: tuple[Revision, ...]
    """The log rows `series` was built with."""
    series: Series
    """The effective series of `tables` with `revisions` applied."""

    def current(self, existing) -> bool:
        """Whether the files are as read and the log holds `existing` as when held."""
        if tuple(existing) != self.revisions:
            return False
        try:
            return file_stamps(self.input_files) == self.stamps
        except OSError:
            return False


def _record(series_path, make, held: HeldSeries | None = None) -> Revision:
    """Read, make a row, check the effective data still load, append — under one lock.

    With `held` current, the raw tables are not read again and only the tables the log
    names are validated again (:func:`kitchen.series.rebuild_series`); the held series
    loaded, so nothing is refused for a problem already there.
    """
    source = Path(series_path)
    log = revisions_path(source)
    with folder_lock(log.parent):
        _, existing = _read_log(log)
        usable = held is not None and held.current(existing)
        if usable:
            raw, input_files = held.tables, held.input_files
        else:
            raw, input_files = read_tables(source)
        before, _, before_trouble = _apply(raw, existing)
        revision = make(before, existing)
        if revision.action == REVISE:  # it applies on top of the rest
            after, _, after_trouble = _apply(before, (revision,))
            after_trouble = before_trouble + after_trouble
        else:
            after, _, after_trouble = _apply(raw, (*existing, revision))
        new = [problem for problem in after_trouble if problem not in before_trouble]
        if usable:
            changed = {r.table for r in (*existing, revision)}
            try:
                rebuild_series(held.series, after, changed)
                loads_after = []
            except SeriesError as error:
                loads_after = [str(problem) for problem in error.problems]
        else:
            loads_after = _load_problems(after, source, input_files)
        if loads_after:  # refuse only what this row adds to problems already there
            loads_before = set() if usable else set(_load_problems(before, source, input_files))
            new += [
                f"the effective data would not load: {problem}"
                for problem in loads_after
                if problem not in loads_before
            ]
        if new:
            new[-1] += "; nothing was written"
            raise RevisionError(new)
        append_line(log, _encode(revision), header=_HEADER)
    return revision


def revise(
    series_path: str | Path,
    *,
    specimen: str,
    field: str,
    value: str,
    reason: str,
    reading: int | None = None,
    table: str | None = None,
    who: str = "",
    when: str | datetime | None = None,
    held: HeldSeries | None = None,
) -> Revision:
    """Record a revision of one value of a series; the raw files are not touched.

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook.
    specimen : str
        Specimen id.
    field : str
        Internal column name: ``height``, ``diameter``, ``dry_mass``, ``water_content``…
        for a specimen; ``time``, ``head``, ``temperature``… for a reading.
    value : str
        The new value with its unit, ``"4.95 in"``, ``"116.3 mm"``, ``"18.2 %"``; a bare
        number for a dimensionless value (``specific_gravity``); text for ``effort``.
    reason : str
        Why the value changes. Required.
    reading : int, optional
        For a reading: its row number in the file or sheet (the header is row 1).
    table : str, optional
        ``specimens``, ``constant_head`` or ``falling_head``. Default: ``specimens``
        without a reading, else the series' one reading table.
    who : str, optional
        Who makes the revision (free text).
    when : str or datetime, optional
        ISO 8601 with a time zone; default now, in the local time zone.
    held : HeldSeries, optional
        The series as a caller holds it open; while its files and log are unchanged the
        raw files are not read again (the checks are the same).

    Returns
    -------
    Revision
        The row appended to the log.

    Raises
    ------
    RevisionError
        Unknown specimen, reading or field, a value of the wrong dimension, a missing
        reason, an unchanged value, or a value the loader would refuse. Nothing is written.
    """
    reason = _free_text(reason, "reason", required=True)
    who = _free_text(who, "who", required=False)
    when = _when(when)
    specimen = " ".join(str(specimen).split())
    if not str(value).strip():
        raise RevisionError("the new value is empty; type a number and its unit (4.95 in)")
    reading = None if reading is None else int(reading)

    def make(tables, existing) -> Revision:
        name = _table_name(tables, table, reading)
        column = _field_name(name, field)
        raw, index = _locate(tables, name, specimen, reading)
        if column not in raw.frame.columns:
            for problem in getattr(raw, "problems", []):
                header = split_header(problem.column)[0] if problem.column else ""
                if "_".join(header.split()) == column:
                    raise RevisionError(f"fix the header in the file first: {problem}")
        unit = raw.units.get(column) if column in raw.frame.columns else None
        applied = _applied_text(str(value), column, SCHEMAS[name][column].kind, unit)
        old = _current(raw, index, column)
        if applied == old:
            raise RevisionError(f"{specimen} {column} is already {old}; nothing to revise")
        return Revision(
            id=_new_id(existing),
            when=when,
            who=who,
            action=REVISE,
            table=name,
            specimen=specimen,
            reading_row=reading if name != "specimens" else None,
            field=column,
            old_value=old,
            new_value=" ".join(str(value).split()),
            applied_value=applied,
            reason=reason,
        )

    return _record(series_path, make, held)


def withdraw(
    series_path: str | Path,
    revision_id: str,
    *,
    reason: str,
    who: str = "",
    when: str | datetime | None = None,
    held: HeldSeries | None = None,
) -> Revision:
    """Withdraw a revision by appending a row that names it; the log loses nothing.

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook.
    revision_id : str
        The id of the revision to withdraw (see :func:`read_revisions`, ``history``).
    reason, who, when, held
        As for :func:`revise`.

    Returns
    -------
    Revision
        The withdrawal row appended.

    Raises
    ------
    RevisionError
        Unknown id, a withdrawal named, a revision already withdrawn, a later standing
        revision of the same value (withdraw that first), or a value the loader would
        then refuse. Nothing is written.
    """
    reason = _free_text(reason, "reason", required=True)
    who = _free_text(who, "who", required=False)
    when = _when(when)
    wanted = str(revision_id).strip().lower()

    def make(tables, existing) -> Revision:
        by_id = {revision.id: revision for revision in existing}
        target = by_id.get(wanted)
        if target is None:
            raise RevisionError(f"no revision {revision_id!r} in {revisions_path(series_path)}")
        if target.action == WITHDRAW:
            raise RevisionError(f"{target.id} is a withdrawal; make the revision again instead")
        standing, _ = _standing(existing)
        if target not in standing:
            by = next(r.id for r in existing if r.withdraws == target.id)
            raise RevisionError(f"revision {target.id} was already withdrawn by {by}")
        later = [r for r in standing[standing.index(target) + 1 :] if r.target() == target.target()]
        if later:
            raise RevisionError(
                f"revision {later[-1].id} changes the same value after {target.id}; "
                f"withdraw {later[-1].id} first"
            )
        return replace(
            target,
            id=_new_id(existing),
            when=when,
            who=who,
            action=WITHDRAW,
            old_value=target.applied_value,
            new_value=target.old_value,
            applied_value="",
            reason=reason,
            withdraws=target.id,
            log_row=None,
        )

    return _record(series_path, make, held)


# --- the effective data ---------------------------------------------------------------------


def _load(series_path, limit: int | None = None) -> EffectiveSeries:
    source = Path(series_path)
    log = revisions_path(source)
    raw, input_files = read_tables(source)
    data, revisions = _read_log(log)
    revisions = revisions if limit is None else revisions[:limit]
    tables, applied = apply_revisions(raw, revisions)
    series = build_series(tables, source, input_files)
    return EffectiveSeries(
        series=series,
        applied=applied,
        withdrawn=tuple(_standing(revisions)[1]),
        log_path=log,
        log_sha256=None if data is None else hashlib.sha256(data).hexdigest(),
        log_rows=len(revisions),
    )


def _position(revisions, revision_id: str, log: Path) -> int:
    for position, revision in enumerate(revisions):
        if revision.id == str(revision_id).strip().lower():
            return position
    raise RevisionError(f"no revision {revision_id!r} in {log}")


def load_effective_series(series_path: str | Path, as_of: str | None = None) -> EffectiveSeries:
    """Load a series with its standing revisions applied.

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook.
    as_of : str, optional
        A revision id: use the log as it stood once that row was written.

    Returns
    -------
    EffectiveSeries
        The validated effective series, the revisions applied and withdrawn, and the
        log's path and SHA-256 for provenance.

    Raises
    ------
    SeriesError
        When the effective data do not load (every problem, by file, row and column).
    RevisionError
        When the log cannot be read or a revision no longer fits the raw data.
    """
    if as_of is None:
        return _load(series_path)
    revisions = read_revisions(series_path)
    return _load(series_path, _position(revisions, as_of, revisions_path(series_path)) + 1)


def history_table(revisions) -> pd.DataFrame:
    """The log as a table, with each row's ``status``: in force, withdrawn by…, withdraws…."""
    withdrawn_by = {r.withdraws: r.id for r in revisions if r.action == WITHDRAW}
    rows = []
    for revision in revisions:
        row = {name: getattr(revision, name) for name in LOG_COLUMNS}
        if revision.action == WITHDRAW:
            row["status"] = f"withdraws {revision.withdraws}"
        elif revision.id in withdrawn_by:
            row["status"] = f"withdrawn by {withdrawn_by[revision.id]}"
        else:
            row["status"] = "in force"
        rows.append(row)
    frame = pd.DataFrame(rows, columns=[*LOG_COLUMNS, "status"])
    frame["reading_row"] = frame["reading_row"].astype("Int64")
    return frame


def format_history(revisions) -> str:
    """The log in words, one line a row: id, when, who, status, change, reason."""
    if not revisions:
        return "no revisions"
    table = history_table(revisions)
    columns = {
        "id": table["id"],
        "when": table["when"],
        "who": table["who"].replace("", "-"),
        "status": table["status"],
        "change": [revision.describe() for revision in revisions],
        "reason": table["reason"],
    }
    widths = {name: max(len(name), *map(len, map(str, v))) for name, v in columns.items()}
    lines = ["  ".join(name.ljust(widths[name]) for name in columns).rstrip()]
    for values in zip(*columns.values(), strict=True):
        cells = (str(v).ljust(widths[name]) for name, v in zip(columns, values, strict=True))
        lines.append("  ".join(cells).rstrip())
    return "\n".join(lines)


# --- what a revision changed ----------------------------------------------------------------

_COMPARED = ("dry_density", "void_ratio", "k_reference", "valid")
_NUMBERS = ("dry_density", "void_ratio", "k_reference")
_RELATIVE = 1e-12


def _verdicts(results: pd.DataFrame, criterion) -> np.ndarray:
    from .trends import classify_against_criterion

    out = np.full(len(results), pd.NA, dtype=object)
    if criterion is None:
        return out
    k, low, high = (
        pd.to_numeric(results[c], errors="coerce").to_numpy(dtype=float)
        for c in ("k_reference", "k_reference_low", "k_reference_high")
    )
    with np.errstate(invalid="ignore"):
        usable = np.isfinite(k) & np.isfinite(low) & np.isfinite(high)
        usable &= (k > 0) & (low > 0) & (high > 0)
    out[~usable] = "no result"
    if usable.any():
        out[usable] = classify_against_criterion(k[usable], low[usable], high[usable], criterion)
    return out


def _moved(old: np.ndarray, new: np.ndarray, number: bool) -> np.ndarray:
    if number:
        old, new = old.astype(float), new.astype(float)
        same = np.isclose(old, new, rtol=_RELATIVE, atol=0.0) | (np.isnan(old) & np.isnan(new))
        return ~same
    gone_old, gone_new = pd.isna(old), pd.isna(new)
    equal = np.array(
        [not (a or b) and x == y for x, y, a, b in zip(old, new, gone_old, gone_new, strict=True)],
        dtype=bool,
    )
    return ~(equal | (gone_old & gone_new))


def what_changed(
    before: pd.DataFrame, after: pd.DataFrame, criterion: float | None = None
) -> pd.DataFrame:
    """Every specimen whose results moved, old and new side by side.

    Parameters
    ----------
    before, after : pandas.DataFrame
        From :func:`kitchen.results.series_results`, before and after a revision. Needs
        ``specimen``, ``method``, ``dry_density``, ``void_ratio``, ``k_reference``,
        ``k_reference_low``, ``k_reference_high`` and ``valid``.
    criterion : float or Criterion, optional
        Largest conductivity allowed (a number), or a :class:`kitchen.trends.Criterion` of
        either kind; when given, each side's verdict from
        :func:`kitchen.trends.classify_against_criterion`. [m/s]

    Returns
    -------
    pandas.DataFrame
        One row per specimen and method that moved: ``specimen``, ``method``, ``moved``
        (the quantities that moved, in words), then ``<quantity>_before`` and
        ``<quantity>_after`` for ``dry_density`` [kg/m3], ``void_ratio``,
        ``k_reference`` [m/s] (k20 at the default reference temperature), ``valid`` and
        ``verdict`` (``<NA>`` without a criterion; ``"no result"`` where k is missing).
        Rows in the order of `before`, then those of `after` alone.

    Notes
    -----
    Numbers count as moved when they differ by more than one part in 10¹²; a specimen
    present on one side only counts as moved. The two tables are aligned on (specimen,
    method) with arrays: the tables hold one row per test, so this is quick beside the
    reductions it compares.
    """
    needed = ["specimen", "method", *_COMPARED, "k_reference_low", "k_reference_high"]
    for name, frame in (("before", before), ("after", after)):
        missing = [c for c in needed if c not in frame.columns]
        if missing:
            raise ValueError(f"{name}: results table lacks the columns {', '.join(missing)}")
    quantities = [*_COMPARED, "verdict"]
    sides = []
    for frame in (before, after):
        values = {q: frame[q].to_numpy(dtype=object) for q in _COMPARED}
        values["verdict"] = _verdicts(frame, criterion)
        keys = list(zip(frame["specimen"], frame["method"], strict=True))
        sides.append((dict(zip(keys, range(len(keys)), strict=True)), values))
    (old_at, old), (new_at, new) = sides
    keys = list(old_at) + [key for key in new_at if key not in old_at]

    def aligned(at, values, q):
        out = np.full(len(keys), np.nan if q in _NUMBERS else pd.NA, dtype=object)
        for i, key in enumerate(keys):
            if key in at:
                out[i] = values[q][at[key]]
        return out

    columns = {"specimen": [key[0] for key in keys], "method": [key[1] for key in keys]}
    moved = {}
    for q in quantities:
        columns[f"{q}_before"] = aligned(old_at, old, q)
        columns[f"{q}_after"] = aligned(new_at, new, q)
        moved[q] = _moved(columns[f"{q}_before"], columns[f"{q}_after"], q in _NUMBERS)
    one_side = np.array([(key in old_at) != (key in new_at) for key in keys], dtype=bool)
    words = [
        ", ".join(q for q in quantities if moved[q][i]) or "present on one side only"
        for i in range(len(keys))
    ]
    keep = np.logical_or.reduce([*moved.values(), one_side]) if keys else np.zeros(0, bool)
    table = {"specimen": columns["specimen"], "method": columns["method"], "moved": words}
    for q in quantities:
        for side in ("before", "after"):
            values = columns[f"{q}_{side}"]
            table[f"{q}_{side}"] = values.astype(float) if q in _NUMBERS else values
    return pd.DataFrame(table).loc[keep].reset_index(drop=True)


def revision_effect(
    series_path: str | Path, revision_id: str, settings=None, criterion: float | None = None
) -> pd.DataFrame:
    """What one row of the log changed: :func:`what_changed` across that row.

    Compares the results with the log as it stood just before the row and just after it
    (for a withdrawal, what withdrawing changed).

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook.
    revision_id : str
        The row's id.
    settings : kitchen.results.Settings, optional
        Reference temperature and viscosity method.
    criterion : float, optional
        Largest conductivity allowed. [m/s]
    """
    from .results import series_results

    revisions = read_revisions(series_path)
    position = _position(revisions, revision_id, revisions_path(series_path))
    before = series_results(_load(series_path, position).series, settings)
    after = series_results(_load(series_path, position + 1).series, settings)
    return what_changed(before, after, criterion)
