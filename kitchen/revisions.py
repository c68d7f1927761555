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

The log, its rows and their reading are in :mod:`kitchen.revision_log`; applying the
revisions and loading the effective data in :mod:`kitchen.effective_data`; recording a
revision or a withdrawal in :mod:`kitchen.revision_recording`; the history and what a
revision changed in :mod:`kitchen.revision_history`. Their names are importable from here.
"""

from __future__ import annotations

from .effective_data import EffectiveSeries, apply_revisions, load_effective_series
from .revision_history import format_history, history_table, revision_effect, what_changed
from .revision_log import (
    LOG_COLUMNS,
    Revision,
    RevisionError,
    log_sha256,
    read_revisions,
    revisions_path,
)
from .revision_log import REVISE as REVISE
from .revision_log import WITHDRAW as WITHDRAW
from .revision_recording import HeldSeries, file_stamps, revise, withdraw

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
