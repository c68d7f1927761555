"""Reading windows chosen by the engineer, kept in a log beside the data.

The tool proposes a falling-head reading window for every specimen (the longest ending at
the last reading that meets every criterion). Where the engineer judges otherwise — an
early transient the proposal kept, a disturbance late in the test — the window chosen is
a decision of the test's reduction, and is recorded as one: a row of the series' window
log, ``windows.csv`` in the series folder or ``<stem>.windows.csv`` beside an ``.xlsx``
workbook, with the specimen, the first and last reading of the window by their row
numbers in the readings file (the header is row 1, as in the loader's messages), who, when
and why. The last row of a specimen stands; a row with no readings hands the specimen back
to the proposal. Rows are only ever appended, so every choice and its reason stays on
record, and the memo pack lists the windows in force.

Row numbers, not positions, name the readings: they are what the engineer sees in the
file, and a revision of a reading's value never moves them.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

import numpy as np

from kitchen.io import Series

from ._logbook import LogError, append_log_row, file_sha256, log_path, read_log
from .log import reason_who_when
from .recording import fresh_id

__all__ = [
    "WINDOW_LOG_COLUMNS",
    "WindowChoice",
    "WindowLogError",
    "windows_path",
    "read_window_choices",
    "window_log_sha256",
    "choose_window",
    "clear_window",
    "standing_choices",
    "chosen_windows",
]

WINDOW_LOG_COLUMNS = ("id", "when", "who", "specimen", "first_row", "last_row", "reason")
"""Columns of the window log, in order."""


class WindowLogError(LogError):
    """A window that cannot be chosen, or a window log that cannot be read."""

    subject = "the reading windows"


@dataclass(frozen=True)
class WindowChoice:
    """One row of the window log: a specimen's window chosen, or handed back to the tool."""

    id: str
    when: str
    who: str
    specimen: str
    first_row: int | None
    """Row number of the window's first reading in the readings file; None: proposed."""
    last_row: int | None
    """Row number of the window's last reading (included); None: proposed."""
    reason: str
    log_row: int | None = None
    """The row of the log this choice was read from (the header is row 1)."""

    @property
    def proposed(self) -> bool:
        """True when this row hands the specimen back to the tool's proposal."""
        return self.first_row is None

    def describe(self) -> str:
        """The choice in words."""
        if self.proposed:
            return f"{self.specimen}: window proposed by the tool"
        return f"{self.specimen}: readings at file rows {self.first_row} to {self.last_row}"


REASON_NEEDED = (
    "a chosen window needs a reason: say why not the tool's proposal (for example 'early "
    "readings before the specimen was saturated'); nothing was written"
)


def windows_path(series_path: str | Path) -> Path:
    """Where a series' window log lives: ``windows.csv`` in a series folder,
    ``<stem>.windows.csv`` beside an ``.xlsx`` workbook."""
    return log_path(series_path, "windows")


def _check_row(row: dict, number: int):
    """The row as a WindowChoice, or (column, problem)."""
    if not row["specimen"]:
        return "specimen", "empty; expected the specimen id"
    if not row["reason"]:
        return "reason", "every choice of window needs a reason"
    given = [bool(row["first_row"]), bool(row["last_row"])]
    if given[0] != given[1]:
        missing = "last_row" if given[0] else "first_row"
        return missing, "empty; give both rows, or neither to hand back to the proposal"
    rows = [None, None]
    if all(given):
        texts = (row["first_row"], row["last_row"])
        good = [t.isdigit() and int(t) >= 2 for t in texts]
        if not all(good):
            bad = "first_row" if not good[0] else "last_row"
            return bad, f"expected a file row number (2 or more), found {row[bad]!r}"
        rows = [int(t) for t in texts]
        if rows[1] <= rows[0]:
            return "last_row", f"row {rows[1]} is not after the first row {rows[0]}"
    return WindowChoice(
        id=row["id"],
        when=row["when"],
        who=row["who"],
        specimen=row["specimen"],
        first_row=rows[0],
        last_row=rows[1],
        reason=row["reason"],
        log_row=number,
    )


def read_window_choices(series_path: str | Path) -> tuple[WindowChoice, ...]:
    """Every row of a series' window log, in order (empty when there is none).

    Raises
    ------
    WindowLogError
        Naming the log's row and column of each row that cannot be read.
    """
    return read_log(windows_path(series_path), WINDOW_LOG_COLUMNS, WindowLogError, _check_row)


def window_log_sha256(series_path: str | Path) -> str | None:
    """SHA-256 of the window log as it is on disk; None when there is none."""
    return file_sha256(windows_path(series_path))


def standing_choices(choices) -> dict[str, WindowChoice]:
    """The choice in force for each specimen: its last row in the log."""
    standing: dict[str, WindowChoice] = {}
    for choice in choices:
        standing[choice.specimen] = choice
    return standing


def _positions(series: Series, choice: WindowChoice, label: str) -> tuple[int, int]:
    """The window of a choice as positions (start, stop) in the specimen's readings."""
    table = series.falling_head
    rows = table.loc[table["specimen"] == choice.specimen, "source_row"].to_numpy()
    where = f"{label}, row {choice.log_row}" if choice.log_row else label
    if rows.size == 0:
        raise WindowLogError(
            f"{where}: specimen {choice.specimen!r} has no falling-head readings in {series.name}"
        )
    found = []
    for column, number in (("first_row", choice.first_row), ("last_row", choice.last_row)):
        at = np.flatnonzero(rows == number)
        if at.size == 0:
            raise WindowLogError(
                f"{where}, column '{column}': specimen {choice.specimen} has no reading at "
                f"file row {number} (its readings: rows {rows.min()}-{rows.max()})"
            )
        found.append(int(at[0]))
    start, last = found
    if last - start < 1:
        raise WindowLogError(f"{where}: a window needs at least two readings")
    return start, last + 1


def chosen_windows(series: Series, choices=None) -> dict[str, tuple[int, int]]:
    """The windows in force, as :func:`kitchen.reduction.results.series_results` takes them.

    Parameters
    ----------
    series : Series
        The (effective) series the choices were made on; its ``source`` names the log.
    choices : sequence of WindowChoice, optional
        The log's rows; read from beside the series when not given.

    Returns
    -------
    dict of str to (int, int)
        ``{specimen: (start, stop)}``, positions in each specimen's falling-head readings
        (stop excluded); specimens handed back to the proposal are left out.

    Raises
    ------
    WindowLogError
        When a standing choice names a specimen or a row the readings do not hold.
    """
    if choices is None:
        choices = read_window_choices(series.source)
    label = windows_path(series.source).name
    problems, windows = [], {}
    for specimen, choice in standing_choices(choices).items():
        if choice.proposed:
            continue
        try:
            windows[specimen] = _positions(series, choice, label)
        except WindowLogError as error:
            problems.extend(error.problems)
    if problems:
        raise WindowLogError(problems)
    return windows


def _append(series_path, choice_of, series: Series | None) -> WindowChoice:
    log = windows_path(series_path)

    def checked_choice(existing) -> WindowChoice:
        choice = choice_of(existing)
        if not choice.proposed:
            if series is None:
                raise ValueError(
                    "a chosen window is checked against the series' readings: pass the "
                    "series as opened (kitchen.workspace.Workspace(...).series)"
                )
            try:
                _positions(series, choice, log.name)
            except WindowLogError as error:
                *first, last = error.problems
                raise WindowLogError([*first, f"{last}; nothing was written"]) from None
        return choice

    return append_log_row(
        log,
        WINDOW_LOG_COLUMNS,
        lambda: read_window_choices(series_path),
        checked_choice,
        WindowLogError,
    )


def choose_window(
    series_path: str | Path,
    specimen: str,
    first_row: int,
    last_row: int,
    *,
    reason: str,
    who: str = "",
    when: str | datetime | None = None,
    series: Series,
) -> WindowChoice:
    """Record the reading window chosen for a specimen; the data files are not touched.

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook; the log is appended beside it.
    specimen : str
        Specimen id.
    first_row, last_row : int
        Row numbers, in the falling-head readings file, of the window's first and last
        reading (both included; the header is row 1).
    reason : str
        Why this window and not the tool's proposal. Required.
    who : str, optional
        Who chose it (free text).
    when : str or datetime, optional
        ISO 8601 with a time zone; default now, in the local time zone.
    series : Series
        The series as opened (``kitchen.workspace.Workspace(series_path).series``): the
        rows are checked against its readings before anything is written.

    Returns
    -------
    WindowChoice
        The row appended.

    Raises
    ------
    WindowLogError, ValueError
        A missing reason, rows not of the specimen's readings, fewer than two readings, or
        a log that cannot be read. Nothing is written.
    """
    reason, who, when = reason_who_when(reason, who, when, REASON_NEEDED, WindowLogError)
    specimen = " ".join(str(specimen).split())
    first, last = int(first_row), int(last_row)
    if last <= first:
        raise WindowLogError(f"last row {last} is not after the first row {first}")
    return _append(
        series_path,
        lambda existing: WindowChoice(fresh_id(existing), when, who, specimen, first, last, reason),
        series,
    )


def clear_window(
    series_path: str | Path,
    specimen: str,
    *,
    reason: str,
    who: str = "",
    when: str | datetime | None = None,
) -> WindowChoice:
    """Hand a specimen back to the tool's proposed window, by a new row of the log."""
    reason, who, when = reason_who_when(reason, who, when, REASON_NEEDED, WindowLogError)
    specimen = " ".join(str(specimen).split())
    return _append(
        series_path,
        lambda existing: WindowChoice(fresh_id(existing), when, who, specimen, None, None, reason),
        None,
    )
