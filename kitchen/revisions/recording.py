"""Recording a revision or a withdrawal: checked against the effective data, then appended.

:func:`revise` and :func:`withdraw` read the log and the raw tables under the folder lock,
make the new row, check that the effective data would still load with it, and append it in
one write; a row the loader would refuse is refused before anything is written. A caller
that holds the series open (:class:`HeldSeries`) spares reading and validating again what
has not changed.
"""

from __future__ import annotations

import os
import secrets
from dataclasses import dataclass, replace
from datetime import datetime
from pathlib import Path

from kitchen.io import (
    SCHEMAS,
    RawTable,
    Series,
    SeriesError,
    build_series,
    read_tables,
    rebuild_series,
    split_header,
)

from ._logbook import append_log_row
from .effective import (
    applied_text,
    apply_to_tables,
    checked_field_name,
    checked_table_name,
    current_text,
    locate_row,
)
from .log import (
    LOG_COLUMNS,
    REVISE,
    WITHDRAW,
    Revision,
    RevisionError,
    read_log,
    reason_who_when,
    revisions_path,
    standing_and_withdrawn,
)

__all__ = ["HeldSeries", "file_stamps", "revise", "withdraw"]


REASON_NEEDED = (
    "a revision needs a reason: say why the value changes (for example 're-measured after "
    "test'); nothing was written"
)


def fresh_id(existing) -> str:
    """Eight random hex digits that no row of `existing` holds as its id."""
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
    names are validated again (:func:`kitchen.io.rebuild_series`); the held series
    loaded, so nothing is refused for a problem already there.
    """
    source = Path(series_path)
    log = revisions_path(source)

    def checked(existing) -> Revision:
        usable = held is not None and held.current(existing)
        if usable:
            raw, input_files = held.tables, held.input_files
        else:
            raw, input_files = read_tables(source)
        before, _, before_trouble = apply_to_tables(raw, existing)
        revision = make(before, existing)
        if revision.action == REVISE:  # it applies on top of the rest
            after, _, after_trouble = apply_to_tables(before, (revision,))
            after_trouble = before_trouble + after_trouble
        else:
            after, _, after_trouble = apply_to_tables(raw, (*existing, revision))
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
        return revision

    return append_log_row(log, LOG_COLUMNS, lambda: read_log(log)[1], checked, RevisionError)


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
    reason, who, when = reason_who_when(reason, who, when, REASON_NEEDED, RevisionError)
    specimen = " ".join(str(specimen).split())
    if not str(value).strip():
        raise RevisionError("the new value is empty; type a number and its unit (4.95 in)")
    reading = None if reading is None else int(reading)

    def make(tables, existing) -> Revision:
        name = checked_table_name(tables, table, reading)
        column = checked_field_name(name, field)
        raw, index = locate_row(tables, name, specimen, reading)
        if column not in raw.frame.columns:
            for problem in getattr(raw, "problems", []):
                header = split_header(problem.column)[0] if problem.column else ""
                if "_".join(header.split()) == column:
                    raise RevisionError(f"fix the header in the file first: {problem}")
        unit = raw.units.get(column) if column in raw.frame.columns else None
        applied = applied_text(str(value), column, SCHEMAS[name][column].kind, unit)
        old = current_text(raw, index, column)
        if applied == old:
            raise RevisionError(f"{specimen} {column} is already {old}; nothing to revise")
        return Revision(
            id=fresh_id(existing),
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
        The id of the revision to withdraw (see :func:`~kitchen.revisions.read_revisions`,
        ``history``).
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
    reason, who, when = reason_who_when(reason, who, when, REASON_NEEDED, RevisionError)
    wanted = str(revision_id).strip().lower()

    def make(tables, existing) -> Revision:
        by_id = {revision.id: revision for revision in existing}
        target = by_id.get(wanted)
        if target is None:
            raise RevisionError(f"no revision {revision_id!r} in {revisions_path(series_path)}")
        if target.action == WITHDRAW:
            raise RevisionError(f"{target.id} is a withdrawal; make the revision again instead")
        standing, _ = standing_and_withdrawn(existing)
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
            id=fresh_id(existing),
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
