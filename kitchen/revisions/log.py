"""The revision log: its columns, its rows, and reading it back.

Each revision is one row of the series' log: ``revisions.csv`` in the series folder, or
``<stem>.revisions.csv`` beside an ``.xlsx`` workbook (:func:`revisions_path`). Reading the
log checks every row (its id, time, table, field and what it withdraws) and names the row
and column of each one that cannot be read. The time of a row is ISO 8601 with a time
zone; the helpers that check and make it are shared with the window and kept-tests logs.
"""

from __future__ import annotations

from dataclasses import dataclass
from dataclasses import field as dataclass_field
from datetime import datetime
from pathlib import Path

from kitchen.io import SCHEMAS, TABLE_NAMES, printable

from ._logbook import LogError, checked_when, file_sha256, log_path, parse_log

__all__ = [
    "LOG_COLUMNS",
    "Revision",
    "RevisionError",
    "revisions_path",
    "read_revisions",
    "log_sha256",
]


LOG_COLUMNS = (
    "id", "when", "who", "action", "table", "specimen", "reading_row", "field",
    "old_value", "new_value", "applied_value", "reason", "withdraws",
)  # fmt: skip
"""Columns of the revision log, in order."""

REVISE, WITHDRAW = "revise", "withdraw"


class RevisionError(LogError):
    """A revision that cannot be made or applied, or a log that cannot be read."""

    subject = "the revisions"


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
            back = shown_or_empty(self.new_value)
            return f"withdraws {self.withdraws}: {where} {self.field} back to {back}"
        typed = "" if self.new_value == self.applied_value else f" (typed {self.new_value})"
        return (
            f"{where} {self.field}: {shown_or_empty(self.old_value)} -> {self.applied_value}{typed}"
        )


def shown_or_empty(text: str) -> str:
    """A logged value for a message: the text, or "(empty)"."""
    return text if text else "(empty)"


def revisions_path(series_path: str | Path) -> Path:
    """Where a series' revision log lives.

    ``<folder>/revisions.csv`` for a series folder; ``<stem>.revisions.csv`` beside an
    ``.xlsx`` workbook (``drainage_sand.revisions.csv`` for ``drainage_sand.xlsx``).
    """
    return log_path(series_path, "revisions")


# --- the log --------------------------------------------------------------------------------


def _parse_log(data: bytes, label: str) -> tuple[Revision, ...]:
    """The revisions of a log's bytes, read by the logs' one reader
    (:func:`kitchen.revisions._logbook.parse_log`: header, field counts, ids and times), each
    row then checked against the rows before it (a withdrawal names an earlier revision)."""
    by_id: dict[str, Revision] = {}
    withdrawn_by: dict[str, str] = {}

    def check(row: dict, number: int):
        found = _check_row(row, number, by_id, withdrawn_by)
        if isinstance(found, Revision):
            by_id[found.id] = found
            if found.action == WITHDRAW:
                withdrawn_by[found.withdraws] = found.id
        return found

    return parse_log(data, label, LOG_COLUMNS, RevisionError, check)


def _check_row(row: dict, number: int, by_id: dict, withdrawn_by: dict):
    """The row's :class:`Revision`, or ``(column, problem)`` (its id and time are checked)."""
    if not row["reason"]:
        return "reason", "every revision needs a reason"
    reading = None
    if row["action"] == REVISE:
        if row["table"] not in TABLE_NAMES:
            return "table", f"expected one of {', '.join(TABLE_NAMES)}"
        if row["field"] not in SCHEMAS[row["table"]] or row["field"] == "specimen":
            return "field", f"{row['field']!r} is not a value of {row['table']}"
        if not row["specimen"] or not row["applied_value"]:
            return ("specimen" if not row["specimen"] else "applied_value"), "empty"
        if row["table"] != "specimens":
            if not row["reading_row"].isdigit() or int(row["reading_row"]) < 2:
                return "reading_row", "expected the reading's row number (2 or more)"
            reading = int(row["reading_row"])
        if row["withdraws"]:
            return "withdraws", "a revision row withdraws nothing; leave it empty"
    elif row["action"] == WITHDRAW:
        target = by_id.get(row["withdraws"])
        if target is None:
            return "withdraws", f"no earlier revision {row['withdraws']!r} to withdraw"
        if target.action == WITHDRAW:
            return "withdraws", f"{target.id} is itself a withdrawal"
        if target.id in withdrawn_by:
            return "withdraws", f"{target.id} was already withdrawn by {withdrawn_by[target.id]}"
        reading = target.reading_row
    else:
        return "action", f"expected {REVISE} or {WITHDRAW}, found {row['action']!r}"
    values = {name: row[name] for name in LOG_COLUMNS if name != "reading_row"}
    return Revision(**values, reading_row=reading, log_row=number)


def read_log(log: Path) -> tuple[bytes | None, tuple[Revision, ...]]:
    """The log's bytes and its rows; ``(None, ())`` when there is no log."""
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
    return read_log(revisions_path(series_path))[1]


def log_sha256(series_path: str | Path) -> str | None:
    """SHA-256 (hex) of a series' revision log as it is now; ``None`` when there is none."""
    return file_sha256(revisions_path(series_path))


def standing_and_withdrawn(revisions) -> tuple[list[Revision], list[Revision]]:
    """The changes no row withdraws, and those a row withdraws, each in log order."""
    withdrawn_ids = {r.withdraws for r in revisions if r.action == WITHDRAW}
    changes = [r for r in revisions if r.action == REVISE]
    return (
        [r for r in changes if r.id not in withdrawn_ids],
        [r for r in changes if r.id in withdrawn_ids],
    )


# --- the time of a row -----------------------------------------------------------------------


def free_text(text, name: str, missing: str | None, error: type[Exception]) -> str:
    """A free-text field of a log row (a reason, who) as it is written.

    White space is folded to single spaces. The text is refused when it is required and
    empty, when it holds a control character or an invisible mark (an escape code a
    terminal would act on), and when it starts as a spreadsheet formula would (``=``,
    ``+``, ``@``), so that a log opened in a spreadsheet runs nothing.

    Parameters
    ----------
    text : str or None
        As typed.
    name : str
        The field's name, for the message (``"reason"``).
    missing : str or None
        The message when the field is required and empty; None when it may be empty.
    error : type of Exception
        Raised with the message (the log's own error type).
    """
    words = " ".join(str(text or "").split())
    if missing is not None and not words:
        raise error(missing)
    if printable(words) != words:
        raise error(
            f"the {name} holds a control character or an invisible mark "
            f"({printable(words)!r}); type it as plain text"
        )
    if words.startswith(("=", "+", "@")):
        raise error(
            f"the {name} starts with {words[0]!r}, which a spreadsheet would run as a formula; "
            "start it with a word"
        )
    return words


def reason_who_when(
    reason, who, when, reason_needed: str, error: type[Exception]
) -> tuple[str, str, str]:
    """The reason, who and when of a new row, as they are written.

    The reason is required (`reason_needed` is the message when it is empty); who may be
    empty; both are checked as :func:`free_text` checks them, and
    raise `error`. The time is :func:`when_text` of `when`.
    """
    reason = free_text(reason, "reason", reason_needed, error)
    who = free_text(who, "who", None, error)
    return reason, who, when_text(when)


def when_text(when) -> str:
    """The time of a row as ISO 8601 text: now (local, to the second) when `when` is None."""
    if when is None:
        return datetime.now().astimezone().isoformat(timespec="seconds")
    if isinstance(when, datetime):
        when = when.isoformat(timespec="seconds")
    return checked_when(str(when).strip(), RevisionError)
