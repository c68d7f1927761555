"""The panel of the revise notebook: correct one value, see what it moved.

A revision names a value — a specimen's height, a reading's head — and gives the new
value with its unit and the reason. It is appended to the series' revision log; the raw
files are never written. The panel then shows, for every specimen whose results moved,
the dry density, void ratio, k and verdict before and after, and the whole log with the
status of each row. A revision can be withdrawn by a later row; nothing is deleted.

The series is held open in a :class:`kitchen.workspace.Workspace`, so a revision reduces
again only the specimens it touches.
"""

from __future__ import annotations

import html
import time
from dataclasses import dataclass, field
from pathlib import Path

import ipywidgets as widgets
import numpy as np
import pandas as pd
import plotly.graph_objects as go

from kitchen import charts
from kitchen.analysis import parse_criterion
from kitchen.io import SCHEMAS, SeriesError, to_si
from kitchen.revisions import Revision, history_table
from kitchen.settings import Settings, reference_label
from kitchen.workspace import Workspace, what_changed

from .common import MessageArea, format_conductivity, format_fixed, html_table
from .refresh import live_figure, refresh_figure

__all__ = ["RevisePanel", "revise_panel", "changes_view_table", "file_value"]

TABLE_LABELS = {
    "specimens": "a specimen value",
    "falling_head": "a falling-head reading",
    "constant_head": "a constant-head collection",
}
FIRST_FIELD = {"specimens": "height", "falling_head": "head", "constant_head": "volume"}
READING_COLUMNS = {
    "falling_head": ("time", "head", "temperature"),
    "constant_head": ("head_difference", "duration", "volume", "outflow_mass", "temperature"),
}


def _from_mold(row: pd.Series) -> bool:
    return all(
        name in row.index and pd.notna(row[name]) for name in ("mold_mass", "mold_and_soil_mass")
    )


def file_value(value, table: str, column: str, unit: str | None) -> str:
    """An SI value of the series written back in the unit of the file's column."""
    if value is None or value is pd.NA or (isinstance(value, float) and np.isnan(value)):
        return "(empty)"
    kind = SCHEMAS[table][column].kind
    if kind in ("id", "label") or not unit:
        return str(value)
    offset = to_si(0.0, unit, kind)
    number = (float(value) - offset) / (to_si(1.0, unit, kind) - offset)
    return f"{number:.10g} {unit}"


def _side_by_side(before, after, show) -> str:
    old, new = show(before), show(after)
    return old if old == new else f"{old} → {new}"


def _yes_no(value) -> str:
    if value is None or value is pd.NA or (isinstance(value, float) and np.isnan(value)):
        return "–"
    return "yes" if bool(value) else "no"


def changes_view_table(changed: pd.DataFrame, label: str) -> pd.DataFrame:
    """:func:`kitchen.workspace.what_changed` as shown: each quantity "before → after".

    Dry density in Mg/m³ (three decimals), void ratio (three decimals), k in m/s (three
    figures), valid and verdict in words; a quantity that did not move shows one value.
    """
    quantities = (
        ("dry_density", "ρd [Mg/m³]", lambda v: format_fixed(v / 1000.0, 3)),
        ("void_ratio", "e", lambda v: format_fixed(v, 3)),
        ("k_reference", f"{label} [m/s]", format_conductivity),
        ("valid", "valid", _yes_no),
        ("verdict", "verdict", lambda v: "–" if v is None or v is pd.NA else str(v)),
    )
    out = pd.DataFrame(
        {
            "specimen": changed["specimen"],
            "method": changed["method"].str.replace("_", " "),
            "what moved": changed["moved"].str.replace("k_reference", label),
        }
    )
    for quantity, title, show in quantities:
        out[title] = [
            _side_by_side(before, after, show)
            for before, after in zip(
                changed[f"{quantity}_before"], changed[f"{quantity}_after"], strict=True
            )
        ]
    return out


@dataclass
class RevisePanel:
    """Controls and views of the revise panel.

    Attributes
    ----------
    widget : ipywidgets.VBox
    series_path : pathlib.Path
        The series revised (its log is ``revisions.csv`` beside the data).
    workspace : Workspace
        The series held open, its results cached per specimen.
    table_choice : ipywidgets.ToggleButtons
        ``specimens``, ``falling_head`` or ``constant_head``.
    specimen, field : ipywidgets.Dropdown
        What to revise.
    reading : ipywidgets.BoundedIntText
        For a reading: its row number in the file (the header is row 1).
    current : ipywidgets.HTML
        The value as it stands (revisions applied), in the unit of the file.
    value, reason, who : ipywidgets.Text
        The new value with its unit (``116.5 mm``), why (required), who (optional). The
        value and the reason are emptied once the revision is recorded: the next one gets
        a reason of its own.
    criterion : ipywidgets.Text
        For the verdicts of the before/after table and the series chart (``1e-9 m/s``):
        opens on the series' own (its project table), empty when it has none; empty, the
        series' own is used, and where there is none no verdict is drawn.
    record : ipywidgets.Button
        Appends the revision to the log and shows what it moved.
    withdraw_choice : ipywidgets.Dropdown
        Revisions in force (the latest chosen).
    withdraw_reason : ipywidgets.Text
        Why the chosen revision no longer stands (required; never the revision's own
        reason, which has a box of its own).
    withdraw_confirm : ipywidgets.Checkbox
        "I withdraw revision N": ticked to confirm, unticked again whenever another
        revision is chosen and after each withdrawal.
    withdraw : ipywidgets.Button
        Withdraws the chosen revision, with ``withdraw_reason``, by a new row.
    withdraw_error : MessageArea
        Why a withdrawal was refused, shown beside its button.
    changes : ipywidgets.HTML
        What the last revision (or withdrawal) moved.
    history : ipywidgets.HTML
        The revision log, each row with its status.
    series_chart : plotly.graph_objects.FigureWidget or None
        Compaction and k of the series as it stands (the memo's series chart), made whole
        when first drawn (None before), then redrawn after each revision by sending only
        what moved.
    specimen_chart : plotly.graph_objects.FigureWidget or None
        Head against time of the specimen in the form, when it has falling-head readings.
    chart_note : ipywidgets.HTML
        Why a chart is not drawn, when it is not.
    chart_boxes : tuple of ipywidgets.Box
        The boxes of the specimen chart and the series chart (hidden when not drawn).
    timings : dict of str to float
        Seconds spent in each stage of the last revision or withdrawal, recording first.
    error : MessageArea
        Why a revision was refused (beside **Record revision**), or a chart not drawn.
    changed : pandas.DataFrame or None
        :func:`kitchen.workspace.what_changed` of the last action.
    last : Revision or None
        The row the last action appended.
    results : pandas.DataFrame
        The results of the series as it now stands.
    """

    widget: widgets.VBox
    series_path: Path
    workspace: Workspace
    table_choice: widgets.ToggleButtons
    specimen: widgets.Dropdown
    field: widgets.Dropdown
    reading: widgets.BoundedIntText
    current: widgets.HTML
    value: widgets.Text
    reason: widgets.Text
    who: widgets.Text
    criterion: widgets.Text
    record: widgets.Button
    withdraw_choice: widgets.Dropdown
    withdraw: widgets.Button
    changes: widgets.HTML
    history: widgets.HTML
    error: MessageArea
    series_chart: go.FigureWidget | None = None
    specimen_chart: go.FigureWidget | None = None
    chart_note: widgets.HTML | None = None
    chart_boxes: tuple = ()
    withdraw_reason: widgets.Text | None = None
    withdraw_confirm: widgets.Checkbox | None = None
    withdraw_error: MessageArea | None = None
    timings: dict = field(default_factory=dict)
    results: pd.DataFrame | None = None
    changed: pd.DataFrame | None = None
    last: Revision | None = None

    @property
    def settings(self) -> Settings:
        return self.workspace.settings

    def criterion_in_force(self):
        """The criterion typed (None when the box is empty) and the one in force: typed,
        else the series' own (:meth:`kitchen.workspace.Workspace.criterion_in_force`)."""
        text = self.criterion.value.strip()
        given = parse_criterion(text) if text else None
        return given, self.workspace.criterion_in_force(given)[0]

    # --- the series as it stands ------------------------------------------------------------
    def _frame(self, table: str) -> pd.DataFrame:
        return (
            self.workspace.series.specimens
            if table == "specimens"
            else getattr(self.workspace.series, table)
        )

    def _unit(self, table: str, column: str) -> str | None:
        return self.workspace.series.units.get(table, {}).get(column)

    def _in_file(self, table: str, column: str) -> bool:
        return column in self.workspace.series.units.get(table, {})

    def _refresh_log(self) -> None:
        self.results = self.workspace.results()
        self.history.value = _history_html(self.workspace.revisions)
        standing = list(self.workspace.effective.applied)
        keep = self.withdraw_choice.value
        self.withdraw_choice.options = [(f"{r.id}: {r.describe()}", r.id) for r in standing]
        ids = [r.id for r in standing]
        self.withdraw_choice.value = keep if keep in ids else (ids[-1] if ids else None)
        self.withdraw.disabled = not standing
        self._withdraw_chosen()

    def _withdraw_chosen(self, _change=None) -> None:
        """Untick the confirmation and name the revision it confirms."""
        chosen = self.withdraw_choice.value
        self.withdraw_confirm.value = False
        self.withdraw_confirm.description = (
            f"I withdraw revision {chosen}" if chosen else "no revision in force"
        )
        self.withdraw_confirm.disabled = not chosen

    def redraw(self, _change=None) -> None:
        """Draw the series chart and the chart of the specimen in the form, as they stand."""
        self.error.guard("drawing the charts")(self._redraw)()

    def _redraw(self) -> None:
        notes = []
        given, _ = self.criterion_in_force()
        analysis = self.workspace.analysis(given)
        try:
            self.series_chart = self._draw_in(
                1, self.series_chart, charts.compaction_conductivity_spec(analysis)
            )
            self.chart_boxes[1].layout.display = ""
        except ValueError as error:
            notes.append(f"Series chart not drawn: {error}")
            self.chart_boxes[1].layout.display = "none"
        specimen = self.specimen.value
        drawn = specimen is not None and self.workspace.has_readings(specimen)
        self.chart_boxes[0].layout.display = "" if drawn else "none"
        if drawn:
            spec = charts.falling_head_spec(
                None,
                self.workspace.falling_head(specimen),
                "m/s",
                self.settings.reference_temperature,
            )
            self.specimen_chart = self._draw_in(0, self.specimen_chart, spec)
        elif specimen is not None:
            notes.append(f"Specimen {specimen} has no falling-head readings: no head chart.")
        self.chart_note.value = "".join(f"<p><i>{html.escape(n)}</i></p>" for n in notes)

    def _draw_in(self, box: int, figure, spec):
        """Refresh a chart, or make it whole in its box the first time it is drawn."""
        if figure is None:
            figure = live_figure(spec)
            self.chart_boxes[box].children = (figure,)
        else:
            refresh_figure(figure, spec)
        return figure

    def _choose_table(self, _change=None) -> None:
        table = self.table_choice.value
        frame = self._frame(table)
        ids = list(pd.unique(frame["specimen"].dropna().astype(str)))
        keep = self.specimen.value if self.specimen.value in ids else (ids[0] if ids else None)
        self.specimen.options = ids
        self.specimen.value = keep
        fields = [name for name in SCHEMAS[table] if name != "specimen"]
        labels = []
        for name in fields:
            unit = self._unit(table, name)
            labels.append((f"{name} [{unit}]" if unit else name, name))
        keep_field = self.field.value if self.field.value in fields else FIRST_FIELD[table]
        self.field.options = labels
        self.field.value = keep_field
        self._choose_specimen()

    def _choose_specimen(self, _change=None) -> None:
        table = self.table_choice.value
        reading_table = table != "specimens"
        self.reading.layout.display = "" if reading_table else "none"
        if reading_table and self.specimen.value is not None:
            rows = self.workspace.readings(self.specimen.value, table)["source_row"]
            first, last = int(rows.min()), int(rows.max())
            with self.reading.hold_trait_notifications():
                self.reading.min, self.reading.max = first, last
                if not first <= self.reading.value <= last:
                    self.reading.value = first
        self._show_current()

    def _show_current(self, _change=None) -> None:
        table, field = self.table_choice.value, self.field.value
        if self.specimen.value is None or field is None:
            self.current.value = ""
            return
        frame = self._frame(table)
        rows = frame["specimen"].astype(str) == self.specimen.value
        where = ""
        if table != "specimens":
            rows &= frame["source_row"] == self.reading.value
            if not rows.any():
                specimen = html.escape(self.specimen.value)
                self.current.value = f"Row {self.reading.value} is not a reading of {specimen}"
                return
            row = frame.loc[rows].iloc[0]
            parts = [
                f"{name} {file_value(row[name], table, name, self._unit(table, name))}"
                for name in READING_COLUMNS[table]
                if self._in_file(table, name)
            ]
            where = f" (row {self.reading.value}: {html.escape(', '.join(parts))})"
        if not self._in_file(table, field):
            text = "(not a column of the file)"
        else:
            row = frame.loc[rows].iloc[0]
            text = file_value(row[field], table, field, self._unit(table, field))
            if field == "dry_mass" and _from_mold(row):
                text += " (from the mold masses: the dry_mass cell is empty)"
        self.current.value = f"Now: <b>{html.escape(text)}</b>{where}"

    # --- actions ----------------------------------------------------------------------------
    def record_revision(self, _button=None) -> None:
        """Append the revision typed in the form and show what it moved."""
        self.withdraw_error.clear()
        self.error.guard("recording the revision")(self._record)()

    def _record(self) -> None:
        table = self.table_choice.value
        before, started = self.results, time.perf_counter()
        self.last = self.workspace.revise(
            specimen=self.specimen.value,
            field=self.field.value,
            value=self.value.value,
            reason=self.reason.value,
            reading=self.reading.value if table != "specimens" else None,
            table=table,
            who=self.who.value,
        )
        self._after(before, f"Revision {self.last.id} recorded: {self.last.describe()}.", started)
        self.value.value = ""
        self.reason.value = ""  # the next revision says its own why
        self.withdraw_choice.value = self.last.id  # the one just recorded, to withdraw

    def withdraw_revision(self, _button=None) -> None:
        """Withdraw the revision chosen in ``withdraw_choice``, with ``withdraw_reason``,
        once ``withdraw_confirm`` is ticked."""
        self.error.clear()
        self.withdraw_error.guard("withdrawing the revision")(self._withdraw)()

    def _withdraw(self) -> None:
        chosen = self.withdraw_choice.value
        if not chosen:
            raise ValueError("there is no revision in force to withdraw")
        reason = self.withdraw_reason.value.strip()
        if not reason:
            raise ValueError(
                f"a withdrawal needs a reason: say why revision {chosen} no longer stands "
                "(for example 'the first measurement was right'); nothing was written"
            )
        if not self.withdraw_confirm.value:
            raise ValueError(
                f"tick 'I withdraw revision {chosen}' to confirm the withdrawal; "
                "nothing was written"
            )
        before, started = self.results, time.perf_counter()
        self.last = self.workspace.withdraw(chosen, reason=reason, who=self.who.value)
        self.withdraw_reason.value = ""
        self._after(before, f"Withdrawal {self.last.id} recorded: {self.last.describe()}.", started)

    def _after(self, before: pd.DataFrame, headline: str, started: float) -> None:
        clock = [started]

        def lap(stage: str) -> None:
            now = time.perf_counter()
            self.timings[stage], clock[0] = now - clock[0], now

        self.timings = {}
        self.timings.update(self.workspace.last_timings)
        clock[0] = time.perf_counter()
        self._refresh_log()
        lap("results and log")
        self._show_current()
        self._redraw()
        lap("charts")
        _, criterion = self.criterion_in_force()
        self.changed = what_changed(before, self.results, criterion, self.workspace.kept)
        label = reference_label(self.settings)
        if self.changed.empty:
            body = "<p>No result moved.</p>"
        else:
            body = html_table(changes_view_table(self.changed, label), text_columns=("what moved",))
        lap("what moved")
        moved = ", ".join(self.workspace.last_moved) or "none"
        took = 1e3 * (time.perf_counter() - started)
        self.changes.value = (
            f"<p>{html.escape(headline)}</p>{body}"
            f"<p><small>Reduced again: {html.escape(moved)}; every other specimen's results "
            f"came from the cache. Recorded, reduced and redrawn in {took:.0f} ms.</small></p>"
        )


def _history_html(revisions) -> str:
    if not revisions:
        return "<p>No revisions yet: the effective data are the raw files as written.</p>"
    table = history_table(revisions)
    shown = pd.DataFrame(
        {
            "id": table["id"],
            "when": table["when"],
            "who": table["who"],
            "status": table["status"],
            "change": [revision.describe() for revision in revisions],
            "reason": table["reason"],
        }
    )
    return html_table(shown, text_columns=("change", "reason"))


def revise_panel(
    series_path: str | Path, settings: Settings | None = None, criterion: str | None = None
) -> RevisePanel:
    """Build the revise panel for the series at `series_path`.

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook. Its revision log is appended to; the raw
        files are never written. To try revisions without touching a series, revise a
        copy (:func:`kitchen.panels.common.scratch_copy`).
    settings : Settings, optional
        Reference temperature and viscosity method of the before/after comparison.
    criterion : str, optional
        A criterion for the verdicts before and after, overriding the series' own: the
        largest k allowed (``1e-9 m/s``) or the smallest required (``≥ 1e-4 m/s``). None
        (the default): the criterion of the series' project table; where it has none, the
        box is empty and the verdicts are left out until one is typed.

    Returns
    -------
    RevisePanel
    """
    path = Path(series_path)
    workspace = Workspace(path, settings)
    series = workspace.series
    own = ""
    try:  # a criterion of the project table that does not read is shown by the redraw
        if workspace.criterion is not None:
            own = workspace.project_settings["criterion"].value
    except SeriesError:
        pass
    present = [
        name for name in TABLE_LABELS if name == "specimens" or not getattr(series, name).empty
    ]
    wide = {"style": {"description_width": "initial"}}
    panel = RevisePanel(
        widget=widgets.VBox(),
        series_path=path,
        workspace=workspace,
        table_choice=widgets.ToggleButtons(
            options=[(TABLE_LABELS[name], name) for name in present],
            value="specimens",
            description="Revise",
            layout=widgets.Layout(width="auto"),
            style={"button_width": "200px"},
        ),
        specimen=widgets.Dropdown(description="Specimen"),
        field=widgets.Dropdown(description="Field"),
        reading=widgets.BoundedIntText(
            value=2, min=2, max=2, description="File row", layout=widgets.Layout(width="200px")
        ),
        current=widgets.HTML(),
        value=widgets.Text(description="New value", placeholder="with its unit: 116.5 mm"),
        reason=widgets.Text(
            description="Reason",
            placeholder="required: re-measured after test",
            layout=widgets.Layout(width="460px"),
        ),
        who=widgets.Text(description="Who", placeholder="optional"),
        criterion=widgets.Text(
            value=own if criterion is None else str(criterion),
            description="k criterion",
            placeholder="none given: 1e-9 m/s or ≥ 1e-4 m/s",
            **wide,
        ),
        record=widgets.Button(description="Record revision", button_style="primary"),
        withdraw_choice=widgets.Dropdown(
            description="In force", layout=widgets.Layout(width="620px")
        ),
        withdraw=widgets.Button(description="Withdraw it", icon="undo"),
        changes=widgets.HTML(),
        history=widgets.HTML(),
        error=MessageArea(),
        chart_note=widgets.HTML(),
    )
    panel.chart_boxes = (widgets.Box(), widgets.Box())  # each chart made when first drawn
    panel.withdraw_reason = widgets.Text(
        description="Why withdraw",
        placeholder="required: the first measurement was right",
        layout=widgets.Layout(width="460px"),
        **wide,
    )
    panel.withdraw_confirm = widgets.Checkbox(value=False, indent=False)
    panel.withdraw_error = MessageArea()
    panel._refresh_log()
    panel._choose_table()
    panel.table_choice.observe(panel._choose_table, names="value")
    panel.specimen.observe(panel._choose_specimen, names="value")
    panel.field.observe(panel._show_current, names="value")
    panel.reading.observe(panel._show_current, names="value")
    panel.record.on_click(panel.record_revision)
    panel.withdraw.on_click(panel.withdraw_revision)
    panel.withdraw_choice.observe(panel._withdraw_chosen, names="value")
    panel.redraw()
    panel.specimen.observe(panel.redraw, names="value")
    panel.criterion.observe(panel.redraw, names="value")
    panel.widget.children = [
        widgets.HTML(f"Series: <code>{html.escape(str(path))}</code>"),
        panel.table_choice,
        widgets.HBox([panel.specimen, panel.field, panel.reading]),
        panel.current,
        widgets.HBox([panel.value, panel.reason, panel.who]),
        widgets.HBox([panel.record, panel.criterion]),
        panel.error.widget,
        widgets.HTML("<b>What moved</b>"),
        panel.changes,
        panel.chart_note,
        *panel.chart_boxes,
        widgets.HTML("<b>Revision log</b>"),
        panel.history,
        widgets.HTML("<b>Withdraw a revision</b> (a later row says it no longer stands)"),
        panel.withdraw_choice,
        widgets.HBox([panel.withdraw_reason, panel.withdraw_confirm, panel.withdraw]),
        panel.withdraw_error.widget,
    ]
    return panel
