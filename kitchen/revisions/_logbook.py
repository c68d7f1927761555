"""What the logs kept beside a series' data have in common.

The window log and the kept-tests log are both CSV files beside the data, one row a
decision, rows only ever appended one whole row per write under the folder lock. Each row
has an id of eight hexadecimal digits, used once, and a time in ISO 8601 with a time zone.
This module reads such a log (checking its header, the number of fields of each row, the
id and the time, and naming the row and column of each row that cannot be read), takes its
SHA-256, and appends a row to it; the logs themselves keep their columns, the checks of
their own columns and their words. The revision log (:mod:`.log`) is read by its own
reader, with its own words for a file that cannot be read, and shares the rest: its path,
SHA-256, error, the check of a row's time, and the appender.
"""

from __future__ import annotations

import csv
import hashlib
import io
import re
import warnings
from collections.abc import Callable, Sequence
from datetime import datetime
from pathlib import Path

from kitchen.io import append_line, folder_lock

__all__ = [
    "LogError",
    "readable_part",
    "whole_rows",
    "log_path",
    "read_log",
    "parse_log",
    "file_sha256",
    "append_log_row",
    "checked_when",
]

_ID = re.compile(r"^[0-9a-f]{8}$")


class LogError(ValueError):
    """A row that cannot be written, or a log that cannot be read; ``problems`` lists each.

    A log's own error names what the problems are with in ``subject``.
    """

    subject = "the log"

    def __init__(self, problems: list[str] | str):
        self.problems = [problems] if isinstance(problems, str) else list(problems)
        if len(self.problems) == 1:
            super().__init__(self.problems[0])
        else:
            lines = [f"{len(self.problems)} problem(s) with {self.subject}:"]
            super().__init__("\n".join(lines + [f"  - {p}" for p in self.problems]))


def readable_part(data: bytes, label: str) -> tuple[bytes, str | None]:
    """A log's bytes without a last row cut short, and the notice naming that row.

    Every row the tool appends ends with a line feed, written in the same ``write``, so a
    log whose last line has none holds a row cut short (a full disk, the machine stopped
    mid-write). That torn row, and only it, is left out and named in a warning; every row
    before it is read. Appending is refused until a person mends it
    (:func:`append_log_row`), so no new row is ever glued onto it.

    Returns
    -------
    (bytes, str or None)
        The bytes up to the last whole line, and the notice (None when nothing was torn).
    """
    if not data or data.endswith(b"\n"):
        return data, None
    kept = data[: data.rfind(b"\n") + 1]
    row = kept.count(b"\n") + 1
    notice = (
        f"{label}, row {row}: the last row is cut short (a write that did not finish: a full "
        "disk, or the machine stopped) and is left out; the rows before it are read. No row "
        "is added until it is mended: complete that line or delete it, by hand"
    )
    return kept, notice


def whole_rows(data: bytes, label: str) -> bytes:
    """`data` without a torn last row (:func:`readable_part`), warning where one was."""
    kept, notice = readable_part(data, label)
    if notice is not None:
        warnings.warn(notice, stacklevel=3)
    return kept


def log_path(series_path: str | Path, name: str) -> Path:
    """Where a series' log `name` lives: ``<name>.csv`` in a series folder,
    ``<stem>.<name>.csv`` beside an ``.xlsx`` workbook."""
    path = Path(series_path)
    if path.suffix.lower() == ".xlsx":
        return path.with_name(f"{path.stem}.{name}.csv")
    return path / f"{name}.csv"


def parse_log(
    data: bytes,
    label: str,
    columns: Sequence[str],
    error: type[LogError],
    check: Callable[[dict[str, str], int], object],
) -> tuple:
    """The rows of a log's bytes, each as `check` makes it, in order.

    Parameters
    ----------
    data : bytes
        The log as read (UTF-8, with or without a byte-order mark).
    label : str
        The log's name, for the messages.
    columns : sequence of str
        The log's columns, in order; the first line must name them.
    error : type of LogError
        The log's own error, raised with every problem found.
    check : callable
        ``check(row, number)`` with the row as ``{column: text}`` (stripped) and its row
        number in the file (the header is row 1), once its id and time are checked: the
        row's entry, or ``(column, problem)`` when the row cannot be read. Called only for
        rows in order; an entry returned is taken.

    Raises
    ------
    LogError
        Of type `error`: naming the log's row and column of each row that cannot be read.
    """
    data = whole_rows(data, label)
    try:
        records = list(csv.reader(io.StringIO(data.decode("utf-8-sig"), newline="")))
    except (UnicodeDecodeError, csv.Error) as problem:
        raise error(f"{label}: cannot be read as UTF-8 CSV ({problem})") from None
    if not records or [c.strip() for c in records[0]] != list(columns):
        found = ", ".join(records[0]) if records else "nothing"
        raise error(f"{label}, row 1: expected the columns {', '.join(columns)}; found {found}")
    problems: list[str] = []
    entries: list = []
    first_at: dict[str, int] = {}
    for number, record in enumerate(records[1:], start=2):
        if not any(cell.strip() for cell in record):
            continue
        if len(record) != len(columns):
            problems.append(
                f"{label}, row {number}: expected {len(columns)} fields, found "
                f"{len(record)} (a write cut short, or an edit by hand?)"
            )
            continue
        row = dict(zip(columns, (c.strip() for c in record), strict=True))
        found = _check_id_and_time(row, first_at) or check(row, number)
        if isinstance(found, tuple):
            column, message = found
            problems.append(f"{label}, row {number}, column '{column}': {message}")
            continue
        first_at[row["id"]] = number
        entries.append(found)
    if problems:
        raise error(problems)
    return tuple(entries)


def checked_when(text: str, error: type[Exception] = ValueError) -> str:
    """`text` when it is an ISO 8601 date and time with a time zone; else `error`."""
    try:
        moment = datetime.fromisoformat(text)
    except (TypeError, ValueError):
        raise error(
            f"{text!r} is not an ISO 8601 date and time (for example 2025-05-02T14:30:00+02:00)"
        ) from None
    if moment.tzinfo is None:
        raise error(f"{text!r} has no time zone; add one (for example +02:00 or Z)")
    return text


def _check_id_and_time(row: dict[str, str], first_at: dict[str, int]):
    """``(column, problem)`` for a row's id or time; None when both are good."""
    if not _ID.match(row["id"]):
        return "id", f"expected 8 hexadecimal digits, found {row['id']!r}"
    if row["id"] in first_at:
        return "id", f"id {row['id']} is used twice (first at row {first_at[row['id']]})"
    try:
        checked_when(row["when"])
    except ValueError as problem:
        return "when", str(problem)
    return None


def read_log(
    log: Path,
    columns: Sequence[str],
    error: type[LogError],
    check: Callable[[dict[str, str], int], object],
) -> tuple:
    """The rows of the log at `log`, as :func:`parse_log` reads them, named by the log's file
    name; empty when there is no log."""
    try:
        data = log.read_bytes()
    except FileNotFoundError:
        return ()
    return parse_log(data, log.name, columns, error, check)


def file_sha256(path: Path) -> str | None:
    """SHA-256 (hex) of a file as it is on disk; None when there is none."""
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except FileNotFoundError:
        return None


def append_log_row(
    log: Path, columns: Sequence[str], read_rows, row_of, error: type[LogError] = LogError
):
    """Append one row to a log under the folder lock, and return it.

    ``row_of(existing)`` makes the row from the log's rows as read (`read_rows()`) inside
    the lock, so that reading, checking and appending are one step; it raises to write
    nothing. The row's attributes named by `columns` are written in order, None as empty.
    A log that cannot be read, or whose last row is cut short (:func:`readable_part`), is
    not appended to: `error` is raised naming it, and nothing is written.
    """
    with folder_lock(log.parent):
        try:
            data = log.read_bytes()
        except FileNotFoundError:
            data = b""
        _, torn = readable_part(data, log.name)
        if torn is not None:
            raise error(f"{torn}; nothing was written")
        row = row_of(read_rows())
        buffer = io.StringIO()
        values = [getattr(row, name) for name in columns]
        csv.writer(buffer, lineterminator="\n").writerow(["" if v is None else v for v in values])
        header = (",".join(columns) + "\n").encode("utf-8")
        append_line(log, buffer.getvalue().encode("utf-8"), header=header)
    return row
