"""The effective data: the raw tables with the standing revisions applied.

A value is named by its table, its specimen, for a reading the reading's row number in the
file or sheet, and its field; it is found in the raw tables, its typed value converted to
the unit of the file's column, and put in a copy of the table. The standing revisions are
applied in the log's order between :func:`kitchen.io.raw_tables.read_tables` and
:func:`kitchen.io.build_series`, so every check of the loader runs again on them;
a revision whose old value is no longer in the raw file is named, not applied.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from kitchen.io import (
    SCHEMAS,
    TABLE_NAMES,
    TEXT_KINDS,
    RawTable,
    Series,
    UnitError,
    build_series,
    format_header,
    parse_value,
    read_tables,
    split_header,
    to_si,
)

from .log import (
    Revision,
    RevisionError,
    read_log,
    read_revisions,
    revisions_path,
    shown_or_empty,
    standing_and_withdrawn,
)

__all__ = ["EffectiveSeries", "apply_revisions", "load_effective_series"]


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

    @classmethod
    def from_log(
        cls, series: Series, revisions, log_path: Path, log_sha256: str | None
    ) -> EffectiveSeries:
        """The effective series with what cites it, from the log rows it was built with.

        Parameters
        ----------
        series : Series
            The validated effective data, built with the standing revisions of `revisions`.
        revisions : sequence of Revision
            The log rows, in the log's order (revisions and withdrawals).
        log_path : pathlib.Path
            Where the log is (or would be).
        log_sha256 : str or None
            SHA-256 (hex) of the log's bytes as read; None when there is no log.

        Returns
        -------
        EffectiveSeries
            ``applied``: the standing revisions in log order (what :func:`apply_revisions`
            applies when it raises nothing); ``withdrawn``: those a later row withdraws.
        """
        standing, withdrawn = standing_and_withdrawn(revisions)
        return cls(series, tuple(standing), tuple(withdrawn), log_path, log_sha256, len(revisions))

    @property
    def revision_count(self) -> int:
        """How many revisions were applied."""
        return len(self.applied)


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


def checked_field_name(table: str, field_text: str) -> str:
    """The column a revision's field names in `table`; a RevisionError when there is none."""
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


def checked_table_name(tables: dict[str, RawTable], table: str | None, reading: int | None) -> str:
    """The table a revision names: the one given, else the specimens table without a reading
    row, else the series' one reading table; a RevisionError when it cannot be told."""
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


def locate_row(tables, table: str, specimen: str, reading: int | None, known: dict | None = None):
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


def current_text(raw: RawTable, index, column: str) -> str:
    """The value a cell holds now, as text with its unit ("" when the column is absent)."""
    if column not in raw.frame.columns:
        return ""
    return _with_unit(_cell_text(raw.frame.at[index, column]), raw.units.get(column))


def applied_text(value: str, column: str, kind: str, unit: str | None) -> str:
    """The typed value in the column's unit (``unit`` None: the typed unit is kept)."""
    if kind in TEXT_KINDS:
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
    if kind in TEXT_KINDS:
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
    elif kind not in TEXT_KINDS and (raw.units.get(column) or None) != unit:
        return f"the column is now in {raw.units.get(column)!r}, not {unit!r} as when revised"
    if not (kind not in TEXT_KINDS and raw.frame[column].dtype.kind == "f"):
        raw.frame[column] = raw.frame[column].astype(object)
    raw.frame.at[index, column] = value
    return None


def apply_to_tables(tables: dict[str, RawTable], revisions) -> tuple[dict, list, list[str]]:
    """Apply standing revisions to copies; skip (and name) those that no longer fit.

    Only the tables a standing revision names are copied; the others are returned as given
    (nothing here writes to them)."""
    standing, _ = standing_and_withdrawn(revisions)
    named = {revision.table for revision in standing}  # only these are written to
    tables = {name: table.copy() if name in named else table for name, table in tables.items()}
    applied, problems, known = [], [], {}
    for revision in standing:
        where = f"revision {revision.id} ({revision.describe()})"
        try:
            raw, index = locate_row(
                tables, revision.table, revision.specimen, revision.reading_row, known
            )
        except RevisionError as error:
            problems.append(f"{where} no longer fits the raw data: {error}")
            continue
        current = current_text(raw, index, revision.field)
        if current != revision.old_value:
            row = int(raw.frame.at[index, "source_row"])
            problems.append(
                f"{where}: {raw.file} row {row} now holds {shown_or_empty(current)}, not "
                f"{shown_or_empty(revision.old_value)} as when it was made (was the file edited?); "
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
        From :func:`kitchen.io.raw_tables.read_tables`; not changed.
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
    effective, applied, problems = apply_to_tables(tables, revisions)
    if problems:
        raise RevisionError(problems)
    return effective, tuple(applied)


# --- the effective data ---------------------------------------------------------------------


def _load(series_path, limit: int | None = None) -> EffectiveSeries:
    source = Path(series_path)
    log = revisions_path(source)
    raw, input_files = read_tables(source)
    data, revisions = read_log(log)
    revisions = revisions if limit is None else revisions[:limit]
    tables, _ = apply_revisions(raw, revisions)
    series = build_series(tables, source, input_files)
    digest = None if data is None else hashlib.sha256(data).hexdigest()
    return EffectiveSeries.from_log(series, revisions, log, digest)


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
