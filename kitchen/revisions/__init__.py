"""FACE-DOCSTRING"""

from .effective import (
    EffectiveSeries,
    apply_revisions,
    load_effective_series,
)
from .history import (
    format_history,
    history_table,
)
from .log import (
    LOG_COLUMNS,
    Revision,
    RevisionError,
    log_sha256,
    read_revisions,
    revisions_path,
)
from .recording import (
    HeldSeries,
    file_stamps,
    revise,
    withdraw,
)
from .window_log import (
    WINDOW_LOG_COLUMNS,
    WindowChoice,
    WindowLogError,
    choose_window,
    chosen_windows,
    clear_window,
    read_window_choices,
    standing_choices,
    window_choice_table,
    window_log_sha256,
    windows_path,
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
    "load_effective_series",
    "LOG_COLUMNS",
    "log_sha256",
    "read_revisions",
    "read_window_choices",
    "revise",
    "Revision",
    "RevisionError",
    "revisions_path",
    "standing_choices",
    "window_choice_table",
    "WINDOW_LOG_COLUMNS",
    "window_log_sha256",
    "WindowChoice",
    "WindowLogError",
    "windows_path",
    "withdraw",
]
