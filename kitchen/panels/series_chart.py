"""The panel of the series-chart notebook: conductivity against compaction, for the memo.

The criterion is the series' own (its project table) unless one is typed with its unit
(``1e-9 m/s``, ``1e-7 cm/s``); every specimen is marked as meeting it, not meeting it, or
not conclusive — or, where its test is not valid (and not kept on record by the engineer),
as not judged. Where no criterion is typed and the series has none, the box stays empty,
no verdict is drawn and the panel says so. The charts follow: the
compaction–conductivity chart (the compaction plane above log k against water content)
and log k against void ratio and against dry density with their trends. The k and
density units of the charts can be switched. An export button writes the memo pack.
"""

from __future__ import annotations

import html
from dataclasses import dataclass, field
from pathlib import Path

import ipywidgets as widgets
import pandas as pd

from kitchen import charts
from kitchen.analysis import Criterion, SeriesAnalysis, parse_criterion
from kitchen.display_units import DENSITY_UNITS, K_UNITS, density_unit, restate_conductivities
from kitchen.io import Series, SeriesError
from kitchen.settings import Settings, reference_label
from kitchen.workspace import Workspace

from .common import (
    MessageArea,
    ProgressBar,
    format_conductivity,
    html_table,
    open_workspace,
)
from .refresh import live_figure, refresh_figure

__all__ = ["SeriesChartPanel", "series_chart_panel", "CHARTS"]

CHARTS = (
    ("compaction", "Compaction and k"),
    ("void_ratio", "k and void ratio"),
    ("dry_density", "k and dry density"),
)
"""The panel's charts: key and tab title."""


def verdict_table(
    analysis: SeriesAnalysis, unit: str, label: str, density: str = "Mg/m³"
) -> pd.DataFrame:
    """One row per specimen: state, k with its interval, its validity beside the verdict;
    k in `unit` and the dry density (or unit weight) in `density`, as the charts show them."""
    rows = analysis.specimens
    factor = K_UNITS[unit].factor
    shown = density_unit(density)
    return pd.DataFrame(
        {
            "specimen": rows["specimen"],
            "effort": rows["effort"],
            "method": rows["method"].str.replace("_", " "),
            "w [%]": rows["water_content"] * 100,
            f"{shown.symbol} [{shown.unit}]": rows["dry_density"] * shown.factor,
            "e": rows["void_ratio"],
            f"{label} [{unit}]": rows["k"] * factor,
            f"low [{unit}]": rows["k_low"] * factor,
            f"high [{unit}]": rows["k_high"] * factor,
            "valid": [
                "yes" if ok else ("no, kept on record" if kept else "no")
                for ok, kept in zip(rows["valid"], rows["kept_on_record"], strict=True)
            ],
            "verdict": rows["verdict"],
            "in acceptable zone": analysis.zone_membership(),  # "–" where none is drawn
        }
    )


@dataclass
class SeriesChartPanel:
    """Controls and views of the series-chart panel.

    Attributes
    ----------
    widget : ipywidgets.VBox
    criterion : ipywidgets.Text
        The criterion with its unit: the largest k allowed (``1e-9 m/s``), or the
        smallest required (``≥ 1e-4 m/s``); see :func:`kitchen.analysis.parse_criterion`.
        It opens on the series' own (its project table), empty when the series has none;
        empty, the series' own is used, and where there is none no verdict is drawn.
    criterion_source : str
        Where the criterion in force comes from, in words (the series' project table,
        typed in the panel, or none given).
    k_unit, density_unit : ipywidgets.ToggleButtons
        Units of the charts.
    figures : dict of str to plotly.graph_objects.FigureWidget or None
        ``"compaction"``, ``"void_ratio"``, ``"dry_density"`` (see :data:`CHARTS`); None
        for a chart not drawn yet (each is made whole the first time it is drawn).
    chart_choice : ipywidgets.ToggleButtons
        Which chart the chart box shows.
    chart_box : ipywidgets.VBox
        Every chart's pane (``panes``), only the chosen one shown: its figure, or why it
        is not drawn (``shown_chart``).
    panes : dict of str to ipywidgets.VBox
    drawn : dict of str to bool
        Whether each chart could be drawn for the series.
    verdicts : ipywidgets.HTML
        The count of each verdict and the geometric mean.
    table : ipywidgets.HTML
        Each specimen with its k, interval and verdict.
    export_folder : ipywidgets.Text
    export : ipywidgets.Button
        Writes the memo pack to ``export_folder``.
    progress : ProgressBar
    exported : list of pathlib.Path
        The files the last export wrote.
    images : bool
        Whether the export writes PNG and SVG beside each chart (needs Chromium).
    error : MessageArea
    analysis : SeriesAnalysis or None
    workspace : Workspace
        The series as opened (:class:`kitchen.workspace.Workspace`): revisions, reading
        windows on record and reductions, as the command line's report has them; the memo
        pack is exported from it.
    results : pandas.DataFrame
        The workspace's results table.
    series : Series
    settings : Settings
    """

    widget: widgets.VBox
    criterion: widgets.Text
    k_unit: widgets.ToggleButtons
    density_unit: widgets.ToggleButtons
    figures: dict
    verdicts: widgets.HTML
    table: widgets.HTML
    export_folder: widgets.Text
    export: widgets.Button
    progress: ProgressBar
    error: MessageArea
    workspace: Workspace
    series: Series
    settings: Settings
    results: pd.DataFrame
    images: bool = True
    analysis: SeriesAnalysis | None = None
    exported: list | None = None
    chart_choice: widgets.ToggleButtons | None = None
    chart_box: widgets.Box | None = None
    missing: dict = field(default_factory=dict)
    drawn: dict = field(default_factory=dict)
    criterion_source: str = ""
    panes: dict = field(default_factory=dict)
    """Each chart's pane in the chart box: its figure (in a box) and why it is not drawn."""
    own_text: str = ""
    """The series' own criterion as its project table writes it ("" when it has none)."""

    def _show_chart(self, _change=None) -> None:
        """Show the chosen chart (or why it is not drawn); hide the others, keeping them.

        Every figure stays in the chart box from the start, each in a pane of its own, and
        a choice only hides or shows panes. A figure taken out of the page and put back
        gets a new view, while its old view keeps listening for updates to a plot that is
        gone; the first update then fails in the browser before it reaches the new view,
        and the chart shown stops following the controls. Hidden panes keep their views
        (laid out at no height, so plotly still measures the legend and titles right).
        """
        key = self.chart_choice.value
        for name, pane in self.panes.items():
            chosen, drawn = name == key, bool(self.drawn.get(name))
            _set_visible(pane, chosen)
            _set_visible(pane.children[0], chosen and drawn)
            _set_visible(pane.children[1], chosen and not drawn)

    @property
    def shown_chart(self):
        """What the chart box shows now: the chosen figure, or why it is not drawn."""
        key = self.chart_choice.value
        return self.figures[key] if self.drawn.get(key) else self.missing[key]

    @property
    def criterion_value(self) -> Criterion | None:
        """The criterion in m/s, as typed; None when the box is empty (then the series'
        own is used, and where it has none no verdict is drawn). [m/s]"""
        text = self.criterion.value.strip()
        return parse_criterion(text) if text else None

    def _criterion_in_force(self) -> tuple[Criterion | None, Criterion | None, str]:
        """(given, in force, source): the criterion to hand the workspace (None for the
        series' own), the one the verdicts are drawn against, and where it comes from."""
        given = self.criterion_value
        own = bool(self.own_text) and self.criterion.value.strip() == self.own_text
        in_force, source = self.workspace.criterion_in_force(None if own else given)
        if given is not None and not own:
            source = "typed in the panel"
        return (None if own else given), in_force, source

    def refresh(self, _change=None) -> None:
        """Analyse with the criterion and redraw every chart (the controls call this)."""
        self.error.guard("drawing the series charts")(self._refresh)()

    def _refresh(self) -> None:
        given, criterion, self.criterion_source = self._criterion_in_force()
        self.analysis = self.workspace.analysis(given)
        unit, density = self.k_unit.value, self.density_unit.value
        label = reference_label(self.settings)
        not_drawn = []
        for key, title in CHARTS:
            figure = self.figures[key]
            try:
                if key == "compaction":
                    new = charts.compaction_conductivity_spec(self.analysis, unit, density)
                else:
                    new = charts.conductivity_trend_figure(self.analysis, key, unit, density)
            except ValueError as error:
                not_drawn.append(f"{title}: not drawn — {error}")
                words = f"{html.escape(title)}: not drawn — {html.escape(str(error))}"
                self.missing[key].value = f"<i>{words}</i>"
                self.drawn[key] = False
                continue
            self.drawn[key] = True
            if figure is None:  # first drawn: opened whole (see live_figure)
                self.figures[key] = live_figure(new)
                self.panes[key].children[0].children = (self.figures[key],)
            else:
                refresh_figure(figure, new)
        self._show_chart()
        counts = self.analysis.counts
        mean = self.analysis.geometric_mean
        parts = [f"{html.escape(v)}: {counts[v]}" for v in self.analysis.verdicts]
        of = f" (of {len(self.analysis.specimens)} specimens)."
        if criterion is None:
            line = (
                "<b>No criterion given</b> (none typed, none in the series' project table): "
                "no verdicts and no acceptable zone; type one in the box. " + ", ".join(parts) + of
            )
        else:
            line = (
                f"Against <b>{label} {criterion.symbol} "
                f"<span class='kitchen-criterion'>{format_conductivity(criterion, unit)}</span>"
                f"</b> ({html.escape(criterion.words)}, {html.escape(self.criterion_source)}): "
                + ", ".join(parts)
                + of
            )
        if mean is not None:
            line += (
                f" Geometric mean {format_conductivity(mean.geometric_mean, unit)} "
                f"({100 * mean.confidence:g} %: {format_conductivity(mean.low, unit)} to "
                f"{format_conductivity(mean.high, unit)})."
            )
        self.verdicts.value = line
        self.table.value = html_table(verdict_table(self.analysis, unit, label, density))
        self.error.show_notes(
            [restate_conductivities(note, unit) for note in not_drawn + list(self.analysis.notes)]
        )

    def write_memo_pack(self, _button=None) -> None:
        """Export the memo pack to ``export_folder`` (the export button calls this)."""
        from kitchen.memo import ImageExportUnavailable

        doing = f"exporting to {self.export_folder.value!r}"
        self.error.guard(doing, expected=(ImageExportUnavailable,))(self._export)()

    def _export(self) -> None:
        from kitchen import memo

        folder = Path(self.export_folder.value.strip())
        self.exported = None
        self.export.disabled = True
        given, _, source = self._criterion_in_force()
        try:
            written = memo.export_memo_pack(
                self.workspace,
                folder,
                criterion=given,
                criterion_source=source,
                k_unit=self.k_unit.value,
                density_unit=self.density_unit.value,
                images=self.images,
                progress=self.progress,
            )
        except Exception:
            self.progress.finish("the export stopped: see the message below", failed=True)
            raise
        finally:
            self.export.disabled = False
        self.exported = list(written)
        self.progress.finish(
            f"{len(self.exported)} file(s) written to {folder} in {written.seconds:.0f} s; "
            "open report.html there"
        )


def _set_visible(box: widgets.Box, visible: bool) -> None:
    """Show a box, or hide it while keeping it laid out (no height, nothing drawn)."""
    box.layout.visibility = "visible" if visible else "hidden"
    box.layout.height = None if visible else "0px"
    box.layout.overflow = None if visible else "hidden"


def series_chart_panel(
    series: Workspace | str | Path,
    settings: Settings | None = None,
    criterion: str | None = None,
    export_folder: str | Path = "memo_pack",
    images: bool = True,
) -> SeriesChartPanel:
    """Build the series-chart panel.

    Parameters
    ----------
    series : Workspace or str or pathlib.Path
        A series already open, or the path of a series folder or workbook (opened with
        its revisions and reading windows on record, :func:`open_workspace`; the memo
        pack's provenance records both).
    settings : Settings, optional
        Reference temperature and viscosity method.
    criterion : str, optional
        A starting criterion, typed with its unit; it overrides the series' own. It comes
        from the project specification: 1×10⁻⁹ m/s is common for compacted clay liners
        (US 40 CFR 258.40; EU Directive 1999/31/EC, Annex I). None (the default): the
        criterion of the series' project table; where the series has none, the box is
        empty and no verdict is drawn until one is typed.
    export_folder : str or pathlib.Path, default "memo_pack"
        Where the export button writes the memo pack.
    images : bool, default True
        Write PNG and SVG beside each chart's HTML (through kaleido and Chromium).

    Returns
    -------
    SeriesChartPanel
    """
    workspace = open_workspace(series, settings)
    series, settings, results = workspace.series, workspace.settings, workspace.results()
    own = ""
    try:  # a criterion of the project table that does not read is shown by the refresh
        if workspace.criterion is not None:
            own = workspace.project_settings["criterion"].value
    except SeriesError:
        pass
    criterion_box = widgets.Text(
        value=own if criterion is None else str(criterion),
        description="k criterion",
        placeholder="none given: 1e-9 m/s (largest) or ≥ 1e-4 m/s (smallest)",
        continuous_update=False,
        style={"description_width": "initial"},
        layout=widgets.Layout(width="280px"),
    )
    k_unit = widgets.ToggleButtons(options=list(K_UNITS), value="m/s", description="k in")
    density = widgets.ToggleButtons(
        options=list(DENSITY_UNITS), value="Mg/m³", description="density in"
    )
    for toggle in (k_unit, density):
        toggle.style.button_width = "64px"
    figures = dict.fromkeys(key for key, _ in CHARTS)  # made when first drawn
    export_box = widgets.Text(
        value=str(export_folder),
        description="Memo pack folder",
        style={"description_width": "initial"},
        layout=widgets.Layout(width="420px"),
    )
    export = widgets.Button(
        description="Export memo pack", icon="download", layout=widgets.Layout(width="200px")
    )
    panel = SeriesChartPanel(
        widget=widgets.VBox(),
        criterion=criterion_box,
        k_unit=k_unit,
        density_unit=density,
        figures=figures,
        verdicts=widgets.HTML(),
        table=widgets.HTML(),
        export_folder=export_box,
        export=export,
        progress=ProgressBar("Export"),
        error=MessageArea(),
        workspace=workspace,
        series=series,
        settings=settings,
        results=results,
        images=images,
        own_text=own,
    )
    panel.missing = {key: widgets.HTML() for key, _ in CHARTS}
    # every figure stays in the page, one pane shown at a time (see _show_chart)
    panel.chart_choice = widgets.ToggleButtons(
        options=[(title, key) for key, title in CHARTS],
        value=CHARTS[0][0],
        description="Chart",
        layout=widgets.Layout(width="auto"),
    )
    panel.chart_choice.style.button_width = "150px"
    panel.panes = {key: widgets.VBox([widgets.Box(), panel.missing[key]]) for key, _ in CHARTS}
    panel.chart_box = widgets.VBox(list(panel.panes.values()))
    panel.chart_box.add_class("kitchen-chart-box")
    panel.refresh()
    first = next((key for key, _ in CHARTS if panel.drawn.get(key)), CHARTS[0][0])
    panel.chart_choice.value = first
    panel._show_chart()
    panel.chart_choice.observe(panel._show_chart, names="value")
    panel.widget.children = [
        widgets.HBox([criterion_box, k_unit, density]),
        panel.verdicts,
        panel.error.widget,
        panel.chart_choice,
        panel.chart_box,
        widgets.HTML("<b>Specimens against the criterion</b>"),
        panel.table,
        widgets.HBox([export_box, export]),
        panel.progress.widget,
    ]
    for control in (criterion_box, k_unit, density):
        control.observe(panel.refresh, names="value")
    export.on_click(panel.write_memo_pack)
    return panel
