"""The history of a series' revisions: the log as a table and in words, each row with
its status (in force, withdrawn, a withdrawal).
"""

from __future__ import annotations

import pandas as pd

from .log import LOG_COLUMNS, WITHDRAW

__all__ = ["history_table", "format_history"]


def history_table(revisions) -> pd.DataFrame:
    """The log as a table, with each row's ``status``: in force, withdrawn by…, withdraws…."""
    withdrawn_by = {r.withdraws: r.id for r in revisions if r.action == WITHDRAW}
    rows = []
    for revision in revisions:
        row = {name: getattr(revision, name) for name in LOG_COLUMNS}
        if revision.action == WITHDRAW:
            row["status"] = f"withdraws {revision.withdraws}"
        elif revision.id in withdrawn_by:
            row["status"] = f"withdrawn by {withdrawn_by[revision.id]}"
        else:
            row["status"] = "in force"
        rows.append(row)
    frame = pd.DataFrame(rows, columns=[*LOG_COLUMNS, "status"])
    frame["reading_row"] = frame["reading_row"].astype("Int64")
    return frame


def format_history(revisions) -> str:
    """The log in words, one line a row: id, when, who, status, change, reason."""
    if not revisions:
        return "no revisions"
    table = history_table(revisions)
    columns = {
        "id": table["id"],
        "when": table["when"],
        "who": table["who"].replace("", "-"),
        "status": table["status"],
        "change": [revision.describe() for revision in revisions],
        "reason": table["reason"],
    }
    widths = {name: max(len(name), *map(len, map(str, v))) for name, v in columns.items()}
    lines = ["  ".join(name.ljust(widths[name]) for name in columns).rstrip()]
    for values in zip(*columns.values(), strict=True):
        cells = (str(v).ljust(widths[name]) for name, v in zip(columns, values, strict=True))
        lines.append("  ".join(cells).rstrip())
    return "\n".join(lines)
