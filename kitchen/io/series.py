"""Read a soil series — a folder of CSV files or one workbook — into validated SI tables.

A series holds ``specimens`` (one row per specimen) and at least one of
``constant_head`` (one row per timed collection) and ``falling_head`` (one row per
reading). Every problem in the input is collected, each naming the file, the row and the
column, before the series is refused with a :class:`SeriesError`.

Reading is split in two so that revisions can be applied in between:
:func:`read_tables` returns the raw tables as written (numbers in the file's units), and
:func:`build_series` validates them and converts them to SI. :func:`load_series` does both.

This module assembles the validated :class:`Series`; the schemas and the reading of the
raw tables are in :mod:`kitchen.io.raw_tables`, the checks of the values and their
conversion in :mod:`kitchen.io.table_checks`.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from .condition_checks import check_b_value_checks, check_flexible_wall, check_record_texts
from .logger_readings import derive_readings
from .raw_tables import SCHEMAS, TABLE_NAMES, InputProblem, RawTable, SeriesError, read_tables
from .table_checks import (
    TextCodes,
    check_known_specimens,
    check_readings,
    check_specimens,
    convert_table,
    report_rows,
)

__all__ = ["Series", "build_series", "rebuild_series", "load_series"]


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
    flexible_wall: pd.DataFrame = None
    """One row per specimen tested in a flexible-wall cell (empty: every test rigid-wall)."""
    b_value_checks: pd.DataFrame = None
    """The B-value checks during saturation, one row per check (may be empty)."""

    def __post_init__(self):
        for name in ("flexible_wall", "b_value_checks"):
            if getattr(self, name) is None:
                object.__setattr__(self, name, _empty_readings(name))

    def specimen_ids(self) -> list[str]:
        return list(self.specimens["specimen"])


def _tested(frame: pd.DataFrame) -> set:
    """Specimen ids of a validated readings table (each specimen's readings are together)."""
    ids = frame["specimen"].to_numpy(dtype=object)
    starts = np.flatnonzero(np.r_[True, ids[1:] != ids[:-1]]) if ids.size else []
    return set(ids[starts])


def _empty_readings(name: str) -> pd.DataFrame:
    columns = {
        column: np.empty(0) for column, spec in SCHEMAS[name].items() if spec.kind != "datetime"
    }
    columns["specimen"] = pd.array([], dtype="string")
    columns["source_row"] = np.empty(0, dtype=int)
    return pd.DataFrame(columns)


def _assemble(tables, source, input_files, previous: Series | None, changed) -> Series:
    """Validate the tables named in `changed` and convert them; take the rest from `previous`."""
    problems: list[InputProblem] = [p for name in changed for p in tables[name].problems]
    converted, ids = {}, {}
    for name in changed:
        converted[name], ids[name] = convert_table(tables[name], problems)
    if "specimens" in changed:
        specimens = check_specimens(tables["specimens"], converted["specimens"], problems)
        check_record_texts(tables["specimens"], specimens, problems)
    else:
        specimens = previous.specimens
    known = set(specimens["specimen"].dropna())
    same_ids = previous is not None and known == set(previous.specimens["specimen"].dropna())
    if "specimen" not in tables["specimens"].frame.columns:
        known = None  # the header lacks it (named there): no id can be looked up
    for name in ("constant_head", "falling_head", "flexible_wall", "b_value_checks"):
        if name in changed and name == "falling_head":
            derive_readings(tables[name], converted[name], ids[name], specimens, problems)
        if name in changed and name == "flexible_wall":
            check_flexible_wall(
                tables[name], converted[name], ids[name], specimens, known, problems
            )
        elif name in changed and name == "b_value_checks":
            check_b_value_checks(tables[name], converted[name], ids[name], known, problems)
        elif name in changed:
            check_readings(tables[name], converted[name], ids[name], known, problems)
        elif name in tables:  # validated before: only the specimen ids may have gone stale
            converted[name] = getattr(previous, name)
            if not same_ids and known is not None:
                check_known_specimens(
                    tables[name], TextCodes.of(converted[name]["specimen"]), known, problems
                )
        else:
            converted[name] = _empty_readings(name)
    if "falling_head" in tables:
        no_standpipe = specimens["standpipe_area"].isna()
        if no_standpipe.any():
            tested = _tested(converted["falling_head"])
            report_rows(
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
        flexible_wall=converted["flexible_wall"],
        b_value_checks=converted["b_value_checks"],
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
    changed = set(changed)
    if "specimens" in changed and "falling_head" in tables:
        levels = {"headwater_level", "tailwater_level"} & set(tables["falling_head"].frame.columns)
        if levels:  # the volumes are the burettes' levels times their areas, in specimens
            changed.add("falling_head")
    changed = tuple(name for name in TABLE_NAMES if name in changed)
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
