"""The panel of the falling-head notebook: choose the reading window of one specimen.

The slider runs over reading numbers, not times (a float slider snaps a value set from
code to its step grid in the browser and sends the snapped value back), and the times of
the window's ends are written beside it. On release of the slider the window is refitted
with every reading in it: k at the reference temperature with its interval, the
incremental k, the fit diagnostics and the validity verdicts all follow. The fit can be
switched between ln h against time (tailwater datum known) and the decay to a fitted
datum h∞. The figures send a decimated view of long records to the browser; the fits use
all readings.
"""

from __future__ import annotations

import html
import math
from dataclasses import dataclass, field
from pathlib import Path

import ipywidgets as widgets
import pandas as pd
import plotly.graph_objects as go

from kitchen import charts
from kitchen.io import Series
from kitchen.reduction import FallingHeadAnalysis, FallingHeadRecord
from kitchen.revisions import (
    WindowChoice,
    choose_window,
    clear_window,
    standing_choices,
    windows_path,
)
from kitchen.settings import FALLING_HEAD_FITS, Settings, reference_label
from kitchen.specimen import specimen_state
from kitchen.workspace import Workspace

from .common import MessageArea, format_conductivity, format_number, open_workspace
from .figures import format_elapsed, increments_spec
from .refresh import refresh_figure

__all__ = [
    "FIT_LABELS",
    "LINE_POINTS",
    "SCREEN_POINTS",
    "FallingHeadPanel",
    "describe_test_html",
    "falling_head_panel",
]

SCREEN_POINTS = 2 * charts.PLOT_WIDTH
"""Points the panel's charts send to the browser for a record: two a pixel column of a
chart's plot area (min/max decimation keeps every peak and trough; the readings in the
window and those outside it share the record's buckets,
:class:`kitchen.charts.WindowDecimation`), so a slider move on a record of 10^6 readings
redraws under two thousand points, not tens of thousands."""
LINE_POINTS = SCREEN_POINTS // 4
"""Points of the fitted line: one every two pixel columns draws the smooth fitted curve."""

FIT_LABELS = {
    "log_linear": "ln h against time (datum known)",
    "datum": "decay to a fitted datum h∞",
}
"""How the two falling-head fits are named on the toggle."""

_MARKS = {True: "✔", False: "✘", None: "–"}


def _summary_html(analysis: FallingHeadAnalysis, settings: Settings) -> str:
    label = reference_label(settings)
    k = format_conductivity(analysis.k_reference)
    low = format_conductivity(analysis.k_reference_low)
    high = format_conductivity(analysis.k_reference_high)
    interval = analysis.interval
    confidence = f"{100 * interval.confidence:g} %"
    head = (
        f"<div class='kitchen-k-line'><b>{label}</b> = "
        f"<span class='kitchen-k'>{html.escape(k)}</span> "
        f"({html.escape(format_conductivity(analysis.k_reference, 'cm/s'))}); {confidence} "
        f"interval {html.escape(low)} to {html.escape(high)}</div>"
    )
    facts = [
        f"k at the test temperature ({format_number(analysis.temperature, 3)} °C, time-weighted "
        f"mean over the window) = {html.escape(format_conductivity(analysis.k))}",
        f"interval: {html.escape(interval.describe())}",
        f"fit: {html.escape(FIT_LABELS[analysis.fit_kind])}, {analysis.n} readings, "
        f"R² = {format_number(analysis.r_squared, 6)}",
        f"gradient {analysis.gradient_start:.3g} at the first reading of the window, "
        f"{analysis.gradient_end:.3g} at the last",
    ]
    if analysis.decay is not None:
        facts.append(
            f"h∞ = {analysis.asymptote * 1e3:.1f} mm (interval "
            f"{analysis.asymptote_low * 1e3:.1f} to {analysis.asymptote_high * 1e3:.1f} mm), "
            f"time constant {format_elapsed(analysis.decay.time_constant)}"
        )
    if analysis.curvature is not None:
        facts.append(
            f"curvature of ln h (the tool's own test): quadratic term p = "
            f"{analysis.curvature.p_value:.2g}; k changes by "
            f"{100 * analysis.curvature.change:+.1f} % across the window"
        )
    if analysis.runs is not None:
        facts.append(
            f"runs of residual signs: {analysis.runs.runs} (about "
            f"{analysis.runs.expected_runs:.0f} expected), p = {analysis.runs.p_value:.2g}"
        )
    verdicts = "".join(
        f"<li class='kitchen-verdict-{str(v.passed).lower()}'>{_MARKS[v.passed]} "
        f"{html.escape(v.sentence)}</li>"
        for v in analysis.verdicts
    )
    state = "valid: every applicable criterion passes" if analysis.valid else "not valid"
    notes = [*analysis.method_notes, *analysis.notes]
    if analysis.diagnosis:
        notes.append(analysis.diagnosis)
    note_items = "".join(f"<li>{html.escape(n)}</li>" for n in notes)
    return (
        f"<div class='kitchen-summary'>{head}<ul>"
        + "".join(f"<li>{fact}</li>" for fact in facts)
        + f"</ul><b>Validity — {state}</b><ul>{verdicts}</ul>"
        + (f"<b>Notes</b><ul>{note_items}</ul>" if note_items else "")
        + "</div>"
    )


@dataclass
class FallingHeadPanel:
    """Controls and views of the falling-head panel.

    Attributes
    ----------
    widget : ipywidgets.VBox
    specimen : ipywidgets.Dropdown
        Specimens with falling-head readings.
    window : ipywidgets.IntRangeSlider
        First and last reading of the window, as positions 0 … n − 1 (inclusive). Setting
        its ``value`` refits at once.
    window_label : ipywidgets.HTML
        The window in reading numbers, file rows and times.
    fit_choice : ipywidgets.ToggleButtons
        ``"log_linear"`` or ``"datum"`` (:data:`FIT_LABELS`).
    propose : ipywidgets.Button
        Sets the window the tool proposes (the longest that meets every criterion).
    keep : ipywidgets.Button
        Records the window shown in the series' window log
        (:mod:`kitchen.revisions.window_log`), with ``reason`` and ``who``: the series chart,
        the memo pack and the command line then reduce the specimen with it.
    release : ipywidgets.Button
        Records that the specimen goes back to the tool's proposal.
    reason, who : ipywidgets.Text
        Why this window (required to keep one), and who chose it.
    choice_label : ipywidgets.HTML
        The window on record for the specimen, with who, when and why.
    figure : plotly.graph_objects.FigureWidget
        Head against time, log head axis, with the fitted curve and the window.
    increments : plotly.graph_objects.FigureWidget
        k between successive readings with the window's k and the steady band.
    summary : ipywidgets.HTML
        k and its interval, the fit diagnostics, the verdicts and the notes.
    test_view : ipywidgets.HTML
        What the test was (constant or rising tailwater), L, A, a (or a_in and a_out)
        and the formula k comes from (:func:`describe_test_html`).
    error : MessageArea
    analysis : FallingHeadAnalysis or None
        The core's analysis of the window shown.
    workspace : Workspace
        The series as opened (:class:`kitchen.workspace.Workspace`): its reductions,
        prepared records and windows on record are the ones every other view shows.
    series : Series
        The workspace's effective series.
    settings : Settings
    """

    widget: widgets.VBox
    specimen: widgets.Dropdown
    window: widgets.IntRangeSlider
    window_label: widgets.HTML
    fit_choice: widgets.ToggleButtons
    propose: widgets.Button
    keep: widgets.Button
    release: widgets.Button
    reason: widgets.Text
    who: widgets.Text
    choice_label: widgets.HTML
    figure: go.FigureWidget
    increments: go.FigureWidget
    summary: widgets.HTML
    error: MessageArea
    workspace: Workspace
    series: Series
    settings: Settings
    analysis: FallingHeadAnalysis | None = None
    test_view: widgets.HTML = field(default_factory=widgets.HTML)
    choices: tuple = ()
    windows: dict = field(default_factory=dict)
    _state: pd.DataFrame | None = None
    _readings: dict = field(default_factory=dict)
    _decimations: dict = field(default_factory=dict)
    _quiet: bool = False

    # --- data -------------------------------------------------------------------------------
    def readings(self, specimen: str | None = None) -> pd.DataFrame:
        """The falling-head rows of a specimen (the one shown by default)."""
        specimen = specimen or self.specimen.value
        if specimen not in self._readings:
            readings = self.workspace.readings(specimen, "falling_head")
            self._readings[specimen] = readings.reset_index(drop=True)
        return self._readings[specimen]

    def _head_decimation(self, readings: pd.DataFrame) -> charts.WindowDecimation:
        """The decimation of the specimen's heads, built once and kept while its readings
        are the same table: a slider move then decimates in time proportional to
        :data:`SCREEN_POINTS`, not to the record."""
        kept = self._decimations.get("head")
        if kept is None or kept[0] is not readings:
            kept = (readings, charts.WindowDecimation(readings["head"].to_numpy(), SCREEN_POINTS))
            self._decimations["head"] = kept
        return kept[1]

    def _increments(self, analysis: FallingHeadAnalysis):
        """The analysis's incremental k with their times and decimation, kept while they
        stay the same: they depend on the record's heads, capillary rise, reference times
        and scale a·L/A and on the fitted datum h∞, not on the window (the analysis forms
        them anew each time they are read, passes over the whole record)."""
        arrays = (analysis.head, analysis.reference_time)
        datum = analysis.asymptote if analysis.decay is not None else None
        terms = (analysis.capillary_rise, analysis.scale, datum)
        kept = self._decimations.get("increments")
        if (
            kept is None
            or kept[0][0] is not arrays[0]
            or kept[0][1] is not arrays[1]
            or kept[1] != terms
        ):
            values = analysis.increment_k
            kept = (
                arrays,
                terms,
                (analysis.increment_time, values),
                charts.WindowDecimation(values, SCREEN_POINTS),
            )
            self._decimations["increments"] = kept
        return kept[2], kept[3]

    def record(self, specimen: str | None = None) -> FallingHeadRecord:
        """The prepared record of a specimen: the workspace's own."""
        return self.workspace.falling_head_record(specimen or self.specimen.value)

    # --- callbacks --------------------------------------------------------------------------
    def _window_moved(self, _change=None) -> None:
        if not self._quiet:
            self.error.guard("refitting the reading window")(self._fit)(self._chosen())

    def _fit_changed(self, _change=None) -> None:
        self.error.guard("refitting with the other fit")(self._fit)(self._chosen())

    def _specimen_changed(self, _change=None) -> None:
        window = self.windows.get(self.specimen.value)
        self.error.guard(f"opening specimen {self.specimen.value}")(self._fit)(window)

    def keep_window(self, _button=None) -> None:
        """Record the window shown in the window log, with the reason typed."""
        self.error.guard("recording the window")(self._keep)()

    def release_window(self, _button=None) -> None:
        """Record that the specimen goes back to the tool's proposal, and show it."""
        self.error.guard("handing the window back to the proposal")(self._release)()

    def _keep(self) -> None:
        rows = self.readings()["source_row"].to_numpy()
        start, stop = self._chosen()
        choose_window(
            self.workspace.path,
            self.specimen.value,
            int(rows[start]),
            int(rows[stop - 1]),
            reason=self.reason.value,
            who=self.who.value,
            series=self.workspace.series,
        )
        self._reload_choices()
        self.reason.value = ""
        self._fit((start, stop))

    def _release(self) -> None:
        clear_window(
            self.workspace.path, self.specimen.value, reason=self.reason.value, who=self.who.value
        )
        self._reload_choices()
        self.reason.value = ""
        self._fit(None)

    def _reload_choices(self) -> None:
        self.workspace.sync()
        self.series = self.workspace.series
        self.choices, self.windows = self.workspace.window_choices, self.workspace.windows

    def propose_window(self, _button=None) -> None:
        """Set the window the tool proposes for the specimen and fit shown."""
        self.error.guard("proposing a window")(self._fit)(None)

    def _chosen(self) -> tuple[int, int]:
        first, last = self.window.value
        return int(first), int(last) + 1

    def _fit(self, window) -> None:
        record = self.record()
        analysis = record.analyse(window, self.fit_choice.value)
        self.analysis = analysis
        self._quiet = True
        try:
            with self.window.hold_trait_notifications():
                self.window.max = max(record.n - 1, 1)
                self.window.min = 0
                self.window.value = (analysis.start, analysis.stop - 1)
        finally:
            self._quiet = False
        self._draw()

    def _draw(self) -> None:
        # the head chart first, then the words, then the incremental k: each reaches the
        # browser as soon as it is made, in the order the engineer looks at them
        analysis = self.analysis
        readings = self.readings()
        label = reference_label(self.settings)
        figure = charts.falling_head_spec(
            readings,
            analysis,
            "m/s",
            self.settings.reference_temperature,
            SCREEN_POINTS,
            decimation=self._head_decimation(readings),
            line_points=LINE_POINTS,
        )
        refresh_figure(self.figure, figure)
        rows = readings["source_row"].to_numpy()
        first, last = analysis.start, analysis.stop - 1
        how = _window_words(analysis)
        self.window_label.value = (
            f"Readings <b>{first + 1}</b> to <b>{last + 1}</b> of {len(readings)} "
            f"(file rows {rows[first]}–{rows[last]}): "
            f"<span class='kitchen-window-times'>t = {format_elapsed(analysis.time[first])} to "
            f"{format_elapsed(analysis.time[last])}</span>, {analysis.n} readings, {how}; "
            f"{label} = {format_conductivity(analysis.k_reference)}"
        )
        increments, decimation = self._increments(analysis)
        increments = increments_spec(
            analysis,
            self.settings,
            max_points=SCREEN_POINTS,
            decimation=decimation,
            increments=increments,
        )
        refresh_figure(self.increments, increments)
        self.test_view.value = describe_test_html(self.record(), analysis)
        self.summary.value = _summary_html(analysis, self.settings)
        self.choice_label.value = _choice_html(
            standing_choices(self.choices).get(self.specimen.value),
            self.windows.get(self.specimen.value),
            (analysis.start, analysis.stop),
            windows_path(self.series.source).name,
        )


def _window_words(analysis: FallingHeadAnalysis) -> str:
    """How the window shown came about, in words that never claim more than was met."""
    if not analysis.window_proposed:
        return "window chosen"
    if analysis.valid:
        return "window proposed by the tool (it meets every criterion)"
    if analysis.start == 0:
        return (
            "every reading: no window met every criterion, so the tool proposes none (see Validity)"
        )
    return "the tool's starting window, which does not meet every criterion (see Validity)"


def _millimetres(value: float, power: int = 1) -> str:
    """A length [m] or an area [m²] in mm or mm², four significant figures."""
    unit = "mm" if power == 1 else "mm²"
    return f"{format_number(value * 1e3**power, 4)} {unit}"


def describe_test_html(record: FallingHeadRecord, analysis: FallingHeadAnalysis) -> str:
    """What the test was: constant or rising tailwater, L, A, a (a_in, a_out), the formula.

    The formulas are those of the reduction (:mod:`kitchen.reduction.falling_head_formulas`):
    k = a·L/(A·Δt)·ln(h1/h2) with one standpipe and a constant tailwater (ASTM D5084
    Method B; Das & Sobhan, *Principles of Geotechnical Engineering*, falling-head test),
    and k = a_in·a_out·L/((a_in + a_out)·A·Δt)·ln(Δh1/Δh2) with a rising tailwater read in
    a second burette (ASTM D5084 Method C; method letters from memory). Over many
    readings k comes from the slope m of ln h against time, k = −m·a·L/A, or from the time
    constant τ of the decay to a fitted datum, k = a·L/(A·τ).
    """
    length = f"L = {_millimetres(record.height)}"
    area = f"A = {_millimetres(record.area, 2)}"
    if math.isfinite(record.outflow_area):
        kind = "falling head, <b>rising tailwater with two burettes</b> (ASTM D5084 Method C)"
        standpipes = (
            f"a_in = {_millimetres(record.inflow_area, 2)}, "
            f"a_out = {_millimetres(record.outflow_area, 2)}, "
            f"a = a_in·a_out/(a_in + a_out) = {_millimetres(record.standpipe_area, 2)}"
        )
        formula = "k = a_in·a_out·L/((a_in + a_out)·A·Δt)·ln(Δh1/Δh2)"
    else:
        kind = "falling head, <b>constant tailwater</b>, one standpipe (ASTM D5084 Method B)"
        standpipes = f"a = {_millimetres(record.standpipe_area, 2)}"
        formula = "k = a·L/(A·Δt)·ln(h1/h2)"
    if analysis.fit_kind == "datum":
        fitted = "here from the time constant τ of the decay to the fitted datum: k = a·L/(A·τ)"
    else:
        fitted = "here from the slope m of ln h against time over the window: k = −m·a·L/A"
    return (
        f"<div class='kitchen-test'>Test: {kind}; {html.escape(length)}, {html.escape(area)}, "
        f"{html.escape(standpipes)}. Formula: {html.escape(formula)}, {html.escape(fitted)}."
        "</div>"
    )


def _choice_html(choice: WindowChoice | None, kept, shown, log: str) -> str:
    """What the window log holds for the specimen, beside the window shown."""
    if choice is None or choice.proposed:
        held = (
            "No window on record: the series chart and the memo use the tool's window (its "
            "proposal, or every reading where no window meets every criterion)."
        )
        if choice is not None:
            held = (
                f"Handed back to the tool's proposal ({html.escape(choice.when)}"
                f"{', ' + html.escape(choice.who) if choice.who else ''}: "
                f"{html.escape(choice.reason)})."
            )
    else:
        who = f", {html.escape(choice.who)}" if choice.who else ""
        held = (
            f"On record in <code>{html.escape(log)}</code>: file rows {choice.first_row}–"
            f"{choice.last_row} ({html.escape(choice.when)}{who}: {html.escape(choice.reason)})."
        )
        if tuple(shown) != tuple(kept):
            held += " <b>The window shown is not the one on record.</b>"
    return f"<div class='kitchen-window-choice'>{held}</div>"


def falling_head_panel(
    series: Workspace | str | Path,
    settings: Settings | None = None,
    specimen: str | None = None,
    fit: str | None = None,
) -> FallingHeadPanel:
    """Build the falling-head panel.

    Parameters
    ----------
    series : Workspace or str or pathlib.Path
        A series already open, or the path of a series folder or workbook (opened with
        its revisions and reading windows on record, :func:`open_workspace`).
    settings : Settings, optional
        Reference temperature, viscosity, criteria and resolutions.
    specimen : str, optional
        The specimen shown first; the first with readings by default.
    fit : {"log_linear", "datum"}, optional
        The fit shown first; the settings' choice by default.

    Returns
    -------
    FallingHeadPanel
        Showing the window the tool proposes for the first specimen.

    Raises
    ------
    ValueError
        When the series has no falling-head readings, or `specimen` has none.
    """
    workspace = open_workspace(series, settings)
    series, settings = workspace.series, workspace.settings
    if series.falling_head.empty:
        raise ValueError(f"series {series.name} has no falling-head readings (falling_head.csv)")
    tested = list(pd.unique(series.falling_head["specimen"]))
    if specimen is not None and specimen not in tested:
        raise ValueError(
            f"specimen {specimen!r} has no falling-head readings; choose one of {', '.join(tested)}"
        )
    fit = fit or getattr(settings, "falling_head_fit", "log_linear")
    if fit not in FALLING_HEAD_FITS:
        raise ValueError(f"unknown fit {fit!r}; choose one of {', '.join(FALLING_HEAD_FITS)}")
    state = specimen_state(series.specimens)
    by_id = state.set_index("specimen")
    options = []
    for name in tested:
        effort = by_id.at[name, "effort"]
        water = by_id.at[name, "water_content"]
        parts = [str(effort)] if pd.notna(effort) else []
        if pd.notna(water):
            parts.append(f"w = {100 * water:.1f} %")
        options.append((f"{name} ({', '.join(parts)})" if parts else name, name))
    panel = FallingHeadPanel(
        widget=widgets.VBox(),
        specimen=widgets.Dropdown(
            options=options,
            value=specimen or tested[0],
            description="Specimen",
            layout=widgets.Layout(width="320px"),
        ),  # fmt: skip
        window=widgets.IntRangeSlider(
            min=0,
            max=1,
            value=(0, 1),
            step=1,
            description="Readings",
            continuous_update=False,
            readout=False,
            layout=widgets.Layout(width="70%"),
        ),  # fmt: skip
        window_label=widgets.HTML(),
        fit_choice=widgets.ToggleButtons(
            options=[(FIT_LABELS[name], name) for name in FALLING_HEAD_FITS],
            value=fit,
            description="Fit",
            layout=widgets.Layout(width="auto"),
        ),
        propose=widgets.Button(description="Propose a window", icon="magic"),
        keep=widgets.Button(description="Keep this window", icon="check"),
        release=widgets.Button(description="Back to the proposal", icon="undo"),
        reason=widgets.Text(
            description="Reason",
            placeholder="required to keep a window: early readings before saturation",
            layout=widgets.Layout(width="520px"),
        ),
        who=widgets.Text(description="Who", placeholder="optional"),
        choice_label=widgets.HTML(),
        figure=go.FigureWidget(),
        increments=go.FigureWidget(),
        summary=widgets.HTML(),
        error=MessageArea(),
        workspace=workspace,
        series=series,
        settings=settings,
        _state=state,
    )
    panel.fit_choice.style.button_width = "250px"
    for button in (panel.propose, panel.keep, panel.release):
        button.layout.width = "190px"
    panel._reload_choices()
    panel._specimen_changed()
    panel.widget.children = [
        widgets.HBox([panel.specimen, panel.propose]),
        panel.fit_choice,
        panel.window,
        panel.window_label,
        panel.test_view,
        widgets.HBox([panel.keep, panel.release, panel.reason, panel.who]),
        panel.choice_label,
        panel.error.widget,
        panel.figure,
        panel.summary,
        panel.increments,
    ]
    panel.widget.add_class("kitchen-falling-head")
    panel.specimen.observe(panel._specimen_changed, names="value")
    panel.window.observe(panel._window_moved, names="value")
    panel.fit_choice.observe(panel._fit_changed, names="value")
    panel.propose.on_click(panel.propose_window)
    panel.keep.on_click(panel.keep_window)
    panel.release.on_click(panel.release_window)
    return panel
