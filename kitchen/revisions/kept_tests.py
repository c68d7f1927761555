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

from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

from kitchen.io import Series

from ._logbook import LogError, append_log_row, file_sha256, log_path, read_log
from .log import reason_who_when
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

REASON_NEEDED = (
    "keeping a test that failed a check needs a reason: say why the failure does not "
    "matter for this test (for example 'drift within the scatter of the series'); nothing "
    "was written"
)


class KeptTestError(LogError):
    """A test that cannot be kept (or released), or a kept-tests log that cannot be read."""

    subject = "the tests kept on record"


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
    return log_path(series_path, "kept_tests")


def _row_checker():
    """A check of the log's rows in order, as :func:`._logbook.parse_log` takes it: each row
    is checked against the rows before it (what it withdraws)."""
    by_id: dict[str, KeptTest] = {}
    withdrawn_by: dict[str, str] = {}

    def check(row: dict, number: int):
        found = _check_row(row, number, by_id, withdrawn_by)
        if isinstance(found, KeptTest):
            by_id[found.id] = found
            if found.withdrawal:
                withdrawn_by[found.withdraws] = found.id
        return found

    return check


def _check_row(row: dict, number: int, by_id: dict, withdrawn_by: dict):
    """The row as a KeptTest, or (column, problem); its id and time are checked."""
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
    return read_log(kept_tests_path(series_path), KEPT_LOG_COLUMNS, KeptTestError, _row_checker())


def kept_log_sha256(series_path: str | Path) -> str | None:
    """SHA-256 of the kept-tests log as it is on disk; None when there is none."""
    return file_sha256(kept_tests_path(series_path))


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
    return append_log_row(
        kept_tests_path(series_path),
        KEPT_LOG_COLUMNS,
        lambda: read_kept_tests(series_path),
        row_of,
        KeptTestError,
    )


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
    reason, who, when = reason_who_when(reason, who, when, REASON_NEEDED, KeptTestError)
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
    reason, who, when = reason_who_when(reason, who, when, REASON_NEEDED, KeptTestError)
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
