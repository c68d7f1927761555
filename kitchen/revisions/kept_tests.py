"""Tests kept on record despite a failed check, in a log beside the data.

A test that fails a validity check is not judged against the criterion: it neither meets
nor fails it, and it is left out of the acceptable zone and the series' fits. Where the
engineer judges the failure immaterial (a drift well inside the scatter of the series, a
check the project does not require), the test may be kept on record, and is then judged
like a valid one. That decision is recorded as one: a row of the series' kept-tests log,
``kept_tests.csv`` in the series folder or ``<stem>.kept_tests.csv`` beside an ``.xlsx``
workbook, with the specimen, the test method, who, when and why. A keep is withdrawn by a
later row that names it in ``withdraws``. Rows are only ever appended, one whole row per
write under the folder lock, so every decision and its reason stays on record; the memo
pack lists them. The data files are never touched.
"""

from __future__ import annotations

import csv
import hashlib
import io
import re
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

from kitchen.io import Series, append_line, folder_lock

from .log import checked_when, free_text, when_text
from .recording import fresh_id

__all__ = [
    "KEPT_LOG_COLUMNS",
    "KEPT_METHODS",
    "KeptTest",
    "KeptTestError",
    "kept_tests_path",
    "read_kept_tests",
    "kept_log_sha256",
    "standing_kept",
    "keep_test",
    "withdraw_kept_test",
]

KEPT_LOG_COLUMNS = ("id", "when", "who", "specimen", "method", "withdraws", "reason")
"""Columns of the kept-tests log, in order."""

KEPT_METHODS = ("constant_head", "falling_head")
"""The test methods a row may name, as in the results table's ``method`` column."""

_ID = re.compile(r"^[0-9a-f]{8}$")
_HEADER = (",".join(KEPT_LOG_COLUMNS) + "\n").encode("utf-8")

REASON_NEEDED = (
    "keeping a test that failed a check needs a reason: say why the failure does not "
    "matter for this test (for example 'drift within the scatter of the series'); nothing "
    "was written"
)


class KeptTestError(ValueError):
    """A test that cannot be kept (or released), or a kept-tests log that cannot be read."""

    def __init__(self, problems: list[str] | str):
        self.problems = [problems] if isinstance(problems, str) else list(problems)
        if len(self.problems) == 1:
            super().__init__(self.problems[0])
        else:
            lines = [f"{len(self.problems)} problem(s) with the tests kept on record:"]
            super().__init__("\n".join(lines + [f"  - {p}" for p in self.problems]))


@dataclass(frozen=True)
class KeptTest:
    """One row of the kept-tests log: a test kept on record, or the withdrawal of a keep."""

    id: str
    when: str
    who: str
    specimen: str
    method: str
    withdraws: str
    """The id of the keep this row withdraws; "" for a keep."""
    reason: str
    log_row: int | None = None
    """The row of the log this was read from (the header is row 1)."""

    @property
    def withdrawal(self) -> bool:
        """True when this row withdraws an earlier keep."""
        return bool(self.withdraws)

    @property
    def record(self) -> str:
        """The keep in words, as the series analysis notes it: id, who, when, why."""
        who = f"{self.who}, " if self.who else ""
        return f"kept {self.id}, {who}{self.when}: {self.reason}"

    def describe(self) -> str:
        """The row in words."""
        test = f"{self.specimen} {self.method.replace('_', ' ')} test"
        if self.withdrawal:
            return f"{test}: keep {self.withdraws} withdrawn, the test is judged by its checks"
        return f"{test}: kept on record despite a failed check"


def kept_tests_path(series_path: str | Path) -> Path:
    """Where a series' kept-tests log lives: ``kept_tests.csv`` in a series folder,
    ``<stem>.kept_tests.csv`` beside an ``.xlsx`` workbook."""
    path = Path(series_path)
    if path.suffix.lower() == ".xlsx":
        return path.with_name(f"{path.stem}.kept_tests.csv")
    return path / "kept_tests.csv"


def _parse(data: bytes, label: str) -> tuple[KeptTest, ...]:
    try:
        records = list(csv.reader(io.StringIO(data.decode("utf-8-sig"), newline="")))
    except (UnicodeDecodeError, csv.Error) as error:
        raise KeptTestError(f"{label}: cannot be read as UTF-8 CSV ({error})") from None
    if not records or [c.strip() for c in records[0]] != list(KEPT_LOG_COLUMNS):
        found = ", ".join(records[0]) if records else "nothing"
        raise KeptTestError(
            f"{label}, row 1: expected the columns {', '.join(KEPT_LOG_COLUMNS)}; found {found}"
        )
    problems: list[str] = []
    rows: list[KeptTest] = []
    by_id: dict[str, KeptTest] = {}
    withdrawn_by: dict[str, str] = {}
    for number, record in enumerate(records[1:], start=2):
        if not any(cell.strip() for cell in record):
            continue
        if len(record) != len(KEPT_LOG_COLUMNS):
            problems.append(
                f"{label}, row {number}: expected {len(KEPT_LOG_COLUMNS)} fields, found "
                f"{len(record)} (a write cut short, or an edit by hand?)"
            )
            continue
        row = dict(zip(KEPT_LOG_COLUMNS, (c.strip() for c in record), strict=True))
        found = _check_row(row, number, by_id, withdrawn_by)
        if isinstance(found, tuple):
            column, message = found
            problems.append(f"{label}, row {number}, column '{column}': {message}")
            continue
        rows.append(found)
        by_id[found.id] = found
        if found.withdrawal:
            withdrawn_by[found.withdraws] = found.id
    if problems:
        raise KeptTestError(problems)
    return tuple(rows)


def _check_row(row: dict, number: int, by_id: dict, withdrawn_by: dict):
    """The row as a KeptTest, or (column, problem)."""
    if not _ID.match(row["id"]):
        return "id", f"expected 8 hexadecimal digits, found {row['id']!r}"
    if row["id"] in by_id:
        return "id", f"id {row['id']} is used twice (first at row {by_id[row['id']].log_row})"
    try:
        checked_when(row["when"])
    except ValueError as error:
        return "when", str(error)
    if not row["specimen"]:
        return "specimen", "empty; expected the specimen id"
    if row["method"] not in KEPT_METHODS:
        return "method", f"expected one of {', '.join(KEPT_METHODS)}, found {row['method']!r}"
    if not row["reason"]:
        return "reason", "every row needs a reason"
    if row["withdraws"]:
        target = by_id.get(row["withdraws"])
        if target is None:
            return "withdraws", f"no earlier keep {row['withdraws']!r} to withdraw"
        if target.withdrawal:
            return "withdraws", f"{target.id} is itself a withdrawal"
        if target.id in withdrawn_by:
            return "withdraws", f"{target.id} was already withdrawn by {withdrawn_by[target.id]}"
        if (target.specimen, target.method) != (row["specimen"], row["method"]):
            return (
                "specimen",
                f"{target.id} kept {target.specimen} {target.method}, not "
                f"{row['specimen']} {row['method']}",
            )
    return KeptTest(**row, log_row=number)


def read_kept_tests(series_path: str | Path) -> tuple[KeptTest, ...]:
    """Every row of a series' kept-tests log, in order (empty when there is none).

    Raises
    ------
    KeptTestError
        Naming the log's row and column of each row that cannot be read.
    """
    log = kept_tests_path(series_path)
    try:
        data = log.read_bytes()
    except FileNotFoundError:
        return ()
    return _parse(data, log.name)


def kept_log_sha256(series_path: str | Path) -> str | None:
    """SHA-256 of the kept-tests log as it is on disk; None when there is none."""
    try:
        return hashlib.sha256(kept_tests_path(series_path).read_bytes()).hexdigest()
    except FileNotFoundError:
        return None


def standing_kept(rows) -> dict[tuple[str, str], KeptTest]:
    """The keeps in force, ``{(specimen, method): KeptTest}``: those no later row withdraws
    (the last, where a hand-edited log keeps one test twice)."""
    withdrawn = {row.withdraws for row in rows if row.withdrawal}
    return {
        (row.specimen, row.method): row
        for row in rows
        if not row.withdrawal and row.id not in withdrawn
    }


def _append(series_path, row_of) -> KeptTest:
    log = kept_tests_path(series_path)
    with folder_lock(log.parent):
        existing = read_kept_tests(series_path)
        row = row_of(existing)
        buffer = io.StringIO()
        values = [getattr(row, name) for name in KEPT_LOG_COLUMNS]
        csv.writer(buffer, lineterminator="\n").writerow(values)
        append_line(log, buffer.getvalue().encode("utf-8"), header=_HEADER)
    return row


def keep_test(
    series_path: str | Path,
    specimen: str,
    method: str,
    *,
    reason: str,
    who: str = "",
    when: str | datetime | None = None,
    series: Series,
) -> KeptTest:
    """Keep a test on record despite a failed check; the data files are not touched.

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook; the log is appended beside it.
    specimen : str
        Specimen id.
    method : {"constant_head", "falling_head"}
        The test kept, as in the results table.
    reason : str
        Why the failed check does not matter for this test. Required.
    who : str, optional
        Who keeps it (free text).
    when : str or datetime, optional
        ISO 8601 with a time zone; default now, in the local time zone.
    series : Series
        The series as opened (``kitchen.workspace.Workspace(series_path).series``): the
        specimen's test is looked for in it before anything is written.

    Returns
    -------
    KeptTest
        The row appended.

    Raises
    ------
    KeptTestError
        A missing reason, an unknown method, a specimen without that test, a test already
        kept, or a log that cannot be read. Nothing is written.
    """
    reason = free_text(reason, "reason", REASON_NEEDED, KeptTestError)
    who = free_text(who, "who", None, KeptTestError)
    when = when_text(when)
    specimen = " ".join(str(specimen).split())
    if method not in KEPT_METHODS:
        raise KeptTestError(
            f"method {method!r}: expected one of {', '.join(KEPT_METHODS)}; nothing was written"
        )
    table = getattr(series, method)
    if table.empty or not (table["specimen"] == specimen).any():
        raise KeptTestError(
            f"specimen {specimen!r} has no {method.replace('_', ' ')} test in {series.name}; "
            "nothing was written"
        )

    def row_of(existing) -> KeptTest:
        held = standing_kept(existing).get((specimen, method))
        if held is not None:
            raise KeptTestError(
                f"{specimen} {method.replace('_', ' ')} test is already kept on record "
                f"({held.id}, row {held.log_row}); nothing was written"
            )
        return KeptTest(fresh_id(existing), when, who, specimen, method, "", reason)

    return _append(series_path, row_of)


def withdraw_kept_test(
    series_path: str | Path,
    kept_id: str,
    *,
    reason: str,
    who: str = "",
    when: str | datetime | None = None,
) -> KeptTest:
    """Withdraw a keep by a new row of the log: the test is judged by its checks again."""
    reason = free_text(reason, "reason", REASON_NEEDED, KeptTestError)
    who = free_text(who, "who", None, KeptTestError)
    when = when_text(when)
    wanted = str(kept_id).strip().lower()

    def row_of(existing) -> KeptTest:
        standing = {row.id: row for row in standing_kept(existing).values()}
        target = standing.get(wanted)
        if target is None:
            raise KeptTestError(
                f"no keep {kept_id!r} in force in {kept_tests_path(series_path).name}; "
                "nothing was written"
            )
        return KeptTest(
            fresh_id(existing), when, who, target.specimen, target.method, target.id, reason
        )

    return _append(series_path, row_of)
