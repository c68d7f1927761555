"""Revisions that lose nothing: the append-only logs of corrections and of reading windows.

A revision corrects one value of a series — a specimen's height re-measured after the
test, a reading typed wrong — without touching the raw files. Each is one row of the
series' log (``revisions.csv`` in the series folder, or ``<stem>.revisions.csv`` beside an
``.xlsx`` workbook), appended in one write under the folder lock and checked first against
the data it would give; rows are never changed or deleted, and a revision is withdrawn by a
later row that names it. The *effective data* are the raw tables as written with the
standing revisions applied in the log's order, between :func:`kitchen.io.read_tables` and
:func:`kitchen.io.build_series`, so every check of the loader runs again on them. The
reading windows the engineer chooses for falling-head records are kept the same way, in a
window log with who, when and why; and so are the tests the engineer keeps on record
despite a failed check, which the series analysis then judges like valid ones.

Modules:

- :mod:`.log`: the revision log: its columns, its rows, reading and checking it back.
- :mod:`.effective`: the raw tables with the standing revisions applied, and loading them.
- :mod:`.recording`: :func:`revise` and :func:`withdraw`, checked, then appended in one write.
- :mod:`.history`: the log as a table and in words, each row with its status.
- :mod:`.window_log`: reading windows chosen by the engineer, and the windows in force.
- :mod:`.kept_tests`: tests kept on record despite a failed check, and the keeps in force.

The public face, which other subpackages import from :mod:`kitchen.revisions` and never
from its modules: :class:`Revision`, :class:`RevisionError`, :data:`LOG_COLUMNS`,
:func:`revisions_path`, :func:`read_revisions` and :func:`log_sha256` (the log);
:func:`apply_revisions`, :func:`load_effective_series` and :class:`EffectiveSeries`;
:func:`revise`, :func:`withdraw`, :class:`HeldSeries` and :func:`file_stamps`;
:func:`history_table` and :func:`format_history`; :class:`WindowChoice`,
:class:`WindowLogError`, :data:`WINDOW_LOG_COLUMNS`, :func:`windows_path`,
:func:`read_window_choices`, :func:`window_log_sha256`, :func:`standing_choices`,
:func:`chosen_windows`, :func:`choose_window` and :func:`clear_window` (the window log);
:class:`KeptTest`, :class:`KeptTestError`, :data:`KEPT_LOG_COLUMNS`, :data:`KEPT_METHODS`,
:func:`kept_tests_path`, :func:`read_kept_tests`, :func:`kept_log_sha256`,
:func:`standing_kept`, :func:`keep_test` and :func:`withdraw_kept_test` (the kept-tests log);
:func:`readable_part` (a log's last row cut short by a full disk: named, left out, and no
row appended after it until it is mended).
What a revision changed in the results is worked out in :mod:`kitchen.workspace`.

References
----------
ISO 8601, for the time of every row of both logs (a date and time with a time zone).
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "readable_part": "_logbook",
        "EffectiveSeries": "effective",
        "apply_revisions": "effective",
        "load_effective_series": "effective",
        "format_history": "history",
        "history_table": "history",
        "KEPT_LOG_COLUMNS": "kept_tests",
        "KEPT_METHODS": "kept_tests",
        "KeptTest": "kept_tests",
        "KeptTestError": "kept_tests",
        "keep_test": "kept_tests",
        "kept_log_sha256": "kept_tests",
        "kept_tests_path": "kept_tests",
        "read_kept_tests": "kept_tests",
        "standing_kept": "kept_tests",
        "withdraw_kept_test": "kept_tests",
        "LOG_COLUMNS": "log",
        "Revision": "log",
        "RevisionError": "log",
        "log_sha256": "log",
        "read_revisions": "log",
        "revisions_path": "log",
        "HeldSeries": "recording",
        "file_stamps": "recording",
        "revise": "recording",
        "withdraw": "recording",
        "WINDOW_LOG_COLUMNS": "window_log",
        "WindowChoice": "window_log",
        "WindowLogError": "window_log",
        "choose_window": "window_log",
        "chosen_windows": "window_log",
        "clear_window": "window_log",
        "read_window_choices": "window_log",
        "standing_choices": "window_log",
        "window_log_sha256": "window_log",
        "windows_path": "window_log",
    },
)

__all__ = [
    "apply_revisions",
    "choose_window",
    "chosen_windows",
    "clear_window",
    "EffectiveSeries",
    "file_stamps",
    "format_history",
    "HeldSeries",
    "history_table",
    "keep_test",
    "KEPT_LOG_COLUMNS",
    "kept_log_sha256",
    "KEPT_METHODS",
    "kept_tests_path",
    "KeptTest",
    "KeptTestError",
    "load_effective_series",
    "LOG_COLUMNS",
    "log_sha256",
    "read_kept_tests",
    "read_revisions",
    "read_window_choices",
    "readable_part",
    "revise",
    "Revision",
    "RevisionError",
    "revisions_path",
    "standing_choices",
    "standing_kept",
    "WINDOW_LOG_COLUMNS",
    "window_log_sha256",
    "WindowChoice",
    "WindowLogError",
    "windows_path",
    "withdraw",
    "withdraw_kept_test",
]
