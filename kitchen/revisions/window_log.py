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

import csv
import hashlib
import io
import re
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

import numpy as np

from kitchen.io import Series, append_line, folder_lock

from .log import checked_when, free_text, when_text
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

_ID = re.compile(r"^[0-9a-f]{8}$")
_HEADER = (",".join(WINDOW_LOG_COLUMNS) + "\n").encode("utf-8")


class WindowLogError(ValueError):
    """A window that cannot be chosen, or a window log that cannot be read."""

    def __init__(self, problems: list[str] | str):
        self.problems = [problems] if isinstance(problems, str) else list(problems)
        if len(self.problems) == 1:
            super().__init__(self.problems[0])
        else:
            lines = [f"{len(self.problems)} problem(s) with the reading windows:"]
            super().__init__("\n".join(lines + [f"  - {p}" for p in self.problems]))


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
    path = Path(series_path)
    if path.suffix.lower() == ".xlsx":
        return path.with_name(f"{path.stem}.windows.csv")
    return path / "windows.csv"


def _parse(data: bytes, label: str) -> tuple[WindowChoice, ...]:
    try:
        text = data.decode("utf-8-sig")
        records = list(csv.reader(io.StringIO(text, newline="")))
    except (UnicodeDecodeError, csv.Error) as error:
        raise WindowLogError(f"{label}: cannot be read as UTF-8 CSV ({error})") from None
    if not records or [c.strip() for c in records[0]] != list(WINDOW_LOG_COLUMNS):
        found = ", ".join(records[0]) if records else "nothing"
        raise WindowLogError(
            f"{label}, row 1: expected the columns {', '.join(WINDOW_LOG_COLUMNS)}; found {found}"
        )
    problems, choices, seen = [], [], {}
    for number, record in enumerate(records[1:], start=2):
        if not any(cell.strip() for cell in record):
            continue

        def problem(column: str, message: str, number=number) -> None:
            problems.append(f"{label}, row {number}, column '{column}': {message}")

        if len(record) != len(WINDOW_LOG_COLUMNS):
            problems.append(
                f"{label}, row {number}: expected {len(WINDOW_LOG_COLUMNS)} fields, found "
                f"{len(record)} (a write cut short, or an edit by hand?)"
            )
            continue
        row = dict(zip(WINDOW_LOG_COLUMNS, (c.strip() for c in record), strict=True))
        if not _ID.match(row["id"]):
            problem("id", f"expected 8 hexadecimal digits, found {row['id']!r}")
            continue
        if row["id"] in seen:
            problem("id", f"id {row['id']} is used twice (first at row {seen[row['id']]})")
            continue
        try:
            checked_when(row["when"])
        except ValueError as error:
            problem("when", str(error))
            continue
        if not row["specimen"]:
            problem("specimen", "empty; expected the specimen id")
            continue
        if not row["reason"]:
            problem("reason", "every choice of window needs a reason")
            continue
        given = [bool(row["first_row"]), bool(row["last_row"])]
        if given[0] != given[1]:
            missing = "last_row" if given[0] else "first_row"
            problem(missing, "empty; give both rows, or neither to hand back to the proposal")
            continue
        rows = [None, None]
        if all(given):
            texts = (row["first_row"], row["last_row"])
            good = [t.isdigit() and int(t) >= 2 for t in texts]
            if not all(good):
                bad = "first_row" if not good[0] else "last_row"
                problem(bad, f"expected a file row number (2 or more), found {row[bad]!r}")
                continue
            rows = [int(t) for t in texts]
            if rows[1] <= rows[0]:
                problem("last_row", f"row {rows[1]} is not after the first row {rows[0]}")
                continue
        seen[row["id"]] = number
        choices.append(
            WindowChoice(
                id=row["id"],
                when=row["when"],
                who=row["who"],
                specimen=row["specimen"],
                first_row=rows[0],
                last_row=rows[1],
                reason=row["reason"],
                log_row=number,
            )
        )
    if problems:
        raise WindowLogError(problems)
    return tuple(choices)


def read_window_choices(series_path: str | Path) -> tuple[WindowChoice, ...]:
    """Every row of a series' window log, in order (empty when there is none).

    Raises
    ------
    WindowLogError
        Naming the log's row and column of each row that cannot be read.
    """
    log = windows_path(series_path)
    try:
        data = log.read_bytes()
    except FileNotFoundError:
        return ()
    return _parse(data, log.name)


def window_log_sha256(series_path: str | Path) -> str | None:
    """SHA-256 of the window log as it is on disk; None when there is none."""
    try:
        return hashlib.sha256(windows_path(series_path).read_bytes()).hexdigest()
    except FileNotFoundError:
        return None


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
    with folder_lock(log.parent):
        existing = read_window_choices(series_path)
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
        buffer = io.StringIO()
        values = [getattr(choice, name) for name in WINDOW_LOG_COLUMNS]
        csv.writer(buffer, lineterminator="\n").writerow(["" if v is None else v for v in values])
        append_line(log, buffer.getvalue().encode("utf-8"), header=_HEADER)
    return choice


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
    reason = free_text(reason, "reason", REASON_NEEDED, WindowLogError)
    who = free_text(who, "who", None, WindowLogError)
    when = when_text(when)
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
    reason = free_text(reason, "reason", REASON_NEEDED, WindowLogError)
    who = free_text(who, "who", None, WindowLogError)
    when = when_text(when)
    specimen = " ".join(str(specimen).split())
    return _append(
        series_path,
        lambda existing: WindowChoice(fresh_id(existing), when, who, specimen, None, None, reason),
        None,
    )
