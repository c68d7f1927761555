"""Parts every panel shares: a message area, a progress bar, number formats.

Figure refresh lives in :mod:`kitchen.panels.refresh`
(:func:`~kitchen.panels.refresh.refresh_figure`).

The message area is where a panel says, in words, what went wrong in a callback: the
problems of a :class:`~kitchen.io.raw_tables.SeriesError` as a list, any other refusal as its
message, an unexpected failure with its traceback folded away. A callback error is never
lost to the kernel log. Warnings raised while a callback runs are shown there too, as notes.
"""

from __future__ import annotations

import functools
import html
import math
import shutil
import tempfile
import traceback
import warnings
from collections.abc import Callable, Iterable
from pathlib import Path

import ipywidgets as widgets
import numpy as np
import pandas as pd

from kitchen.display_units import NumberFormat, column_format, k_unit
from kitchen.io import SeriesError, UnitError
from kitchen.memo import table_markup
from kitchen.revisions import RevisionError, revisions_path
from kitchen.settings import Settings
from kitchen.workspace import Workspace

__all__ = [
    "MessageArea",
    "ProgressBar",
    "format_number",
    "format_conductivity",
    "format_fixed",
    "html_table",
    "scratch_copy",
    "open_workspace",
]

_STYLE = """<style>
.kitchen-message ul {margin: 0.2em 0 0.2em 1.2em; padding: 0;}
.kitchen-message .kitchen-problem {color: #8a1c1c;}
.kitchen-message .kitchen-note {color: #5b4a00;}
.kitchen-table {overflow-x: auto; max-width: 100%;}
.kitchen-table table {border-collapse: collapse; font-size: 12px;}
.kitchen-table th, .kitchen-table td {padding: 2px 8px; border-bottom: 1px solid #ddd;
  text-align: right; white-space: nowrap;}
.kitchen-table th {background: #f1efe8; text-align: center;}
.kitchen-table th {white-space: normal; min-width: 3em;}
.kitchen-table td.kitchen-text {text-align: left; white-space: normal; min-width: 14em;}
</style>"""


class MessageArea:
    """An HTML area for what went wrong, in words, and for notes.

    Attributes
    ----------
    widget : ipywidgets.HTML
        The area shown in the panel (empty when all is well).
    message : str
        The last error as plain text; empty when the last action succeeded.
    notes : list of str
        Warnings raised during the last action, as plain text.
    exception : BaseException or None
        The last error itself, for a test or a curious engineer.
    """

    def __init__(self):
        self.widget = widgets.HTML(value="", layout=widgets.Layout(width="100%"))
        self.widget.add_class("kitchen-message")
        self.message = ""
        self.notes: list[str] = []
        self.exception: BaseException | None = None

    def clear(self) -> None:
        self.message, self.notes, self.exception = "", [], None
        self.widget.value = ""

    def show_notes(self, notes: Iterable[str]) -> None:
        """Show warnings as notes (they do not stop the panel)."""
        self.notes = list(dict.fromkeys(notes))
        self._render()

    def show_error(self, error: BaseException, doing: str, expected: tuple = ()) -> None:
        """Show `error`, raised while `doing` (for example "refitting the window").

        A SeriesError or RevisionError is listed problem by problem; a ValueError,
        OSError, KeyError or one of the `expected` types is a refusal shown in words; any
        other error is a fault, shown with its traceback folded away.
        """
        self.exception = error
        if isinstance(error, SeriesError):
            self.message = f"Could not finish {doing}: " + "; ".join(map(str, error.problems))
            items = "".join(f"<li>{html.escape(str(p))}</li>" for p in error.problems)
            body = (
                f"<b>{len(error.problems)} problem(s) with the series</b> — nothing was "
                f"changed. Correct the files and try again.<ul>{items}</ul>"
            )
        elif isinstance(error, RevisionError):  # a refusal of what was typed, or a damaged log
            self.message = f"Could not finish {doing}: " + "; ".join(map(str, error.problems))
            items = "".join(f"<li>{html.escape(str(p))}</li>" for p in error.problems)
            body = (
                f"<b>Could not finish {html.escape(doing)}</b> — nothing was written:"
                f"<ul>{items}</ul>"
            )
        elif isinstance(error, (ValueError, UnitError, OSError, KeyError, *expected)):
            text = error.args[0] if isinstance(error, KeyError) and error.args else str(error)
            self.message = f"Could not finish {doing}: {text}"
            body = f"<b>Could not finish {html.escape(doing)}:</b> {html.escape(str(text))}"
        else:
            self.message = (
                f"Unexpected failure while {doing}: {type(error).__name__}: {error}. "
                "This is a fault in kitchen, not in your data; please report it."
            )
            trace = "".join(traceback.format_exception(error))
            body = (
                f"<b>Unexpected failure while {html.escape(doing)}</b> "
                f"({html.escape(type(error).__name__)}: {html.escape(str(error))}). "
                "This is a fault in kitchen, not in your data; please report it with the "
                f"details below.<details><summary>details</summary><pre>{html.escape(trace)}"
                "</pre></details>"
            )
        self._error_html = f"<div class='kitchen-problem'>{body}</div>"
        self._render()

    def _render(self) -> None:
        parts = [_STYLE]
        if self.message:
            parts.append(self._error_html)
        if self.notes:
            items = "".join(f"<li>{html.escape(note)}</li>" for note in self.notes)
            parts.append(f"<div class='kitchen-note'><b>Notes</b><ul>{items}</ul></div>")
        self.widget.value = "".join(parts) if len(parts) > 1 else ""

    def guard(self, doing: str, expected: tuple = ()) -> Callable:
        """Decorate a callback: its errors and warnings are shown here, never lost.

        The decorated function returns its own value, or None when it raised. `expected`
        names further exception types that are refusals in words, not faults.
        """

        def decorate(function):
            @functools.wraps(function)
            def wrapper(*args, **kwargs):
                self.clear()
                with warnings.catch_warnings(record=True) as caught:
                    warnings.simplefilter("always")
                    try:
                        value = function(*args, **kwargs)
                    except Exception as error:  # shown to the engineer, in words
                        self.show_error(error, doing, expected)
                        value = None
                caught_notes = [str(w.message) for w in caught]
                self.notes = list(dict.fromkeys([*self.notes, *caught_notes]))
                self._render()
                return value

            return wrapper

        return decorate


class ProgressBar:
    """A progress bar with a line of text, for long work (loading, exporting).

    Call it as ``bar(done, total, what)``; pass it where a function takes a progress
    callback.
    """

    def __init__(self, description: str = ""):
        self.bar = widgets.IntProgress(value=0, min=0, max=1, description=description)
        self.label = widgets.Label(value="")
        self.widget = widgets.HBox([self.bar, self.label])
        self.widget.layout.visibility = "hidden"

    def __call__(self, done: int, total: int, what: str = "") -> None:
        self.widget.layout.visibility = "visible"
        self.bar.max = max(int(total), 1)
        self.bar.value = min(int(done), self.bar.max)
        self.bar.bar_style = ""
        self.label.value = f"{done} of {total}" + (f": {what}" if what else "")

    def finish(self, text: str, failed: bool = False) -> None:
        self.widget.layout.visibility = "visible"
        self.bar.value = self.bar.max if not failed else self.bar.value
        self.bar.bar_style = "danger" if failed else "success"
        self.label.value = text


def format_number(value, digits: int = 3) -> str:
    """A number for people: ``digits`` significant figures, or "–" when not a number."""
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "–"
    if isinstance(value, (int, np.integer)):
        return str(int(value))
    return f"{float(value):.{digits}g}"


def format_fixed(value, decimals: int) -> str:
    """A number with a fixed count of decimals, or "–" when not a number."""
    if value is None or value is pd.NA or not math.isfinite(float(value)):
        return "–"
    return f"{float(value):.{decimals}f}"


def format_conductivity(value, unit: str = "m/s", digits: int = 3) -> str:
    """A conductivity as ``7.56 × 10⁻⁹ m/s`` (``unit`` is "m/s" or "cm/s"; value in m/s):
    the digits of :data:`kitchen.display_units.CONDUCTIVITY_FORMAT`, the one format of k,
    spaced for a sentence."""
    if value is None or not math.isfinite(float(value)):
        return "–"
    shown = float(value) * k_unit(unit).factor
    if shown == 0:
        return f"0 {unit}"
    text = NumberFormat("scientific", digits).text(shown)
    return f"{text.replace('×', ' × ')} {unit}"


def html_table(frame: pd.DataFrame, formats: dict | None = None, text_columns=()) -> str:
    """A DataFrame as a compact HTML table (values escaped; NaN shown as "–").

    ``formats`` maps a column to a function from value to text; other numbers are written
    in their column's one format (:func:`kitchen.display_units.column_format`: k to three
    significant figures, a density, a water content or a void ratio to fixed decimals), or
    to three significant figures. ``text_columns`` are left-aligned and wrap. The markup is that of
    the memo's pages (:func:`kitchen.memo.table_markup`), in the panels' style.
    """
    formats = formats or {}
    head = [html.escape(str(c)) for c in frame.columns]
    classes = {i: "kitchen-text" for i, c in enumerate(frame.columns) if c in text_columns}
    rows = []
    for _, row in frame.iterrows():
        cells = []
        for column in frame.columns:
            value = row[column]
            if column in formats:
                text = formats[column](value)
            elif isinstance(value, (bool, np.bool_)):
                text = "yes" if value else "no"
            elif isinstance(value, (float, np.floating)):
                style = column_format(column)
                text = style.text(value) if style else format_number(float(value))
            elif value is None or value is pd.NA:
                text = "–"
            else:
                text = str(value)
            cells.append(html.escape(text))
        rows.append(cells)
    return f"{_STYLE}<div class='kitchen-table'>{table_markup(head, rows, classes=classes)}</div>"


SCRATCH_FOLDER = Path(tempfile.gettempdir()) / "kitchen-scratch"
"""Where :func:`scratch_copy` puts its copies unless told otherwise."""


def scratch_copy(path: str | Path, folder: str | Path | None = None) -> Path:
    """Copy a series folder (or a workbook with its revision log) to a scratch folder.

    Parameters
    ----------
    path : str or pathlib.Path
        A series folder, or an ``.xlsx`` workbook.
    folder : str or pathlib.Path, optional
        Where to put the copy; :data:`SCRATCH_FOLDER` by default.

    Returns
    -------
    pathlib.Path
        The copy, to revise without touching the original. A scratch copy made before
        under the same name is replaced (with its revisions), so running a notebook again
        starts from the series as it is and leaves one copy, not one per run.
    """
    source = Path(path)
    if not source.exists():
        raise FileNotFoundError(f"{source}: not found; expected a series folder or .xlsx")
    target_root = Path(folder) if folder is not None else SCRATCH_FOLDER
    target_root.mkdir(parents=True, exist_ok=True)
    target = target_root / source.name
    log = revisions_path(source)
    if target.resolve() == source.resolve():
        raise ValueError(f"{source}: the scratch copy would replace the series itself")
    if target.is_dir():
        shutil.rmtree(target)
    elif target.exists():
        target.unlink()
    if source.is_dir():
        shutil.copytree(source, target)
    else:
        shutil.copy2(source, target)
        copied_log = revisions_path(target)
        if log.exists():
            shutil.copy2(log, copied_log)
        elif copied_log.exists():
            copied_log.unlink()  # an earlier copy's revisions, not the series'
    return target


def open_workspace(series: Workspace | str | Path, settings: Settings | None = None) -> Workspace:
    """The series a panel works on, opened the one way every view opens one.

    Parameters
    ----------
    series : Workspace or str or pathlib.Path
        A series already open (several panels may share one), or the path of a series
        folder or ``.xlsx`` workbook, opened with its revisions and reading windows on
        record (:class:`kitchen.workspace.Workspace`).
    settings : Settings, optional
        Settings to compute with; an open workspace is switched to them.
    """
    if isinstance(series, Workspace):
        if settings is not None and settings != series.settings:
            series.set_settings(settings)
        return series
    if not isinstance(series, str | Path):
        raise TypeError(
            f"expected a series folder, an .xlsx workbook or a Workspace, got "
            f"{type(series).__name__}"
        )
    return Workspace(series, settings)
