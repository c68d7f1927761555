"""The panel of the field-checks notebook: field tests of the built liner against the zone.

Type the series (its acceptable zone is the memo's; in the notebook it is chosen in the
series row above the panel, :func:`kitchen.panels.workbook_panel`) and the field tests (the
series' own ``field_tests.csv``, another CSV file, or a workbook's sheet); choose the zone
(drawn or fitted). The panel shows the summary, the counts per lift, the tests outside,
every test with its verdict and distances, and the two charts (the tests over the zone;
their distance from it by date). As tests are added to the field-tests file, **Re-read
field tests** judges them again; **Try a state** places a typed water content and dry
density against the zone without saving anything. **Export check report** writes the report
(:func:`kitchen.memo.export_field_check`). The files are read, never written.
"""

from __future__ import annotations

import html
from dataclasses import dataclass, field
from pathlib import Path

import ipywidgets as widgets
import numpy as np
import plotly.graph_objects as go

from kitchen.cautions import FIELD_CAUTIONS
from kitchen.charts import field_distance_figure, field_plane_figure
from kitchen.field import ZONES, FieldCheck, check_field_tests, read_field_tests
from kitchen.memo import export_field_check, field_tests_table, lifts_table
from kitchen.workspace import Workspace

from .common import MessageArea, ProgressBar, html_table, open_workspace

__all__ = ["FieldChecksPanel", "field_checks_panel"]


@dataclass
class FieldChecksPanel:
    """Controls and views of the field-checks panel.

    Attributes
    ----------
    widget : ipywidgets.VBox
    series_path, field_tests_path : ipywidgets.Text
        The series (its zone) and the field tests (empty: the series' own).
    zone : ipywidgets.ToggleButtons
        ``drawn`` (the memo's acceptable zone) or ``fitted``.
    open_button, reread : ipywidgets.Button
        Open the series and judge the tests; judge the field tests again after rows were
        added to the file.
    summary, lifts, outside, tests : ipywidgets.HTML
    figures : dict of str to plotly.graph_objects.Figure
        ``"plane"`` and ``"by_date"``, as last drawn.
    charts : ipywidgets.Output
        Shows the figures (redrawn whole on each change, so every view stays right).
    trial_water_content, trial_dry_density : ipywidgets.BoundedFloatText
        A state to try against the zone [%], [Mg/m³]; nothing is saved.
    trial : ipywidgets.HTML
        Where the typed state lies.
    export_folder : ipywidgets.Text
    export : ipywidgets.Button
    progress : ProgressBar
    exported : list of pathlib.Path
    images : bool
    error : MessageArea
    workspace : Workspace or None
    check : FieldCheck or None
    """

    widget: widgets.VBox
    series_path: widgets.Text
    field_tests_path: widgets.Text
    zone: widgets.ToggleButtons
    open_button: widgets.Button
    reread: widgets.Button
    summary: widgets.HTML
    lifts: widgets.HTML
    outside: widgets.HTML
    tests: widgets.HTML
    charts: widgets.Output
    trial_water_content: widgets.BoundedFloatText
    trial_dry_density: widgets.BoundedFloatText
    trial: widgets.HTML
    export_folder: widgets.Text
    export: widgets.Button
    progress: ProgressBar
    error: MessageArea
    images: bool = False
    figures: dict = field(default_factory=dict)
    exported: list = field(default_factory=list)
    workspace: Workspace | None = None
    check: FieldCheck | None = None

    def field_tests_source(self) -> Path:
        """The field tests read: the path typed, else the series itself."""
        typed = self.field_tests_path.value.strip()
        return Path(typed) if typed else Path(self.series_path.value.strip())


def _show(panel: FieldChecksPanel) -> None:
    """Judge the field tests again and redraw every view."""
    workspace = panel.workspace
    analysis = workspace.analysis()
    tests = read_field_tests(panel.field_tests_source())
    check = check_field_tests(tests, analysis, series=workspace.series.name, zone=panel.zone.value)
    panel.check = check
    panel.summary.value = f"<p><b>{html.escape(check.summary)}.</b></p>" + "".join(
        f"<p><i>{html.escape(text)}</i></p>" for text in FIELD_CAUTIONS
    )
    panel.lifts.value = html_table(lifts_table(check))
    table = field_tests_table(check)
    panel.outside.value = (
        html_table(table[~check.tests["inside"].to_numpy(dtype=bool)], text_columns=("side",))
        if not check.tests["inside"].all()
        else "<p>No test outside the zone.</p>"
    )
    panel.tests.value = html_table(table, text_columns=("side", "saturation_band"))
    panel.figures = {
        "plane": field_plane_figure(check, analysis),
        "by_date": field_distance_figure(check),
    }
    panel.charts.clear_output()
    with panel.charts:
        for figure in panel.figures.values():
            go.Figure(figure).show()
    panel.error.show_notes(check.notes)


def _trial(panel: FieldChecksPanel) -> None:
    check = panel.check
    if check is None or check.zone is None:
        panel.trial.value = "<p>No zone to try a state against.</p>"
        return
    w = panel.trial_water_content.value / 100.0
    rho = panel.trial_dry_density.value * 1000.0
    where = {k: v[0] for k, v in check.zone.distances([w], [rho]).items()}
    if where["inside"]:
        words = (
            f"inside the {check.zone.name}: margins {100 * -where['water_content_distance']:.2f} "
            f"% points in w, {-where['dry_density_distance'] / 1000:.3f} Mg/m³ in ρd"
        )
    else:
        moves = []
        if np.isfinite(where["water_content_change"]):
            moves.append(f"change w by {100 * where['water_content_change']:+.2f} % points")
        if np.isfinite(where["dry_density_change"]):
            moves.append(f"change ρd by {where['dry_density_change'] / 1000:+.3f} Mg/m³")
        words = f"outside the {check.zone.name}: " + (
            " or ".join(moves) or "no change of w or ρd alone brings it in"
        )
    panel.trial.value = f"<p>{html.escape(words)} (typed, not saved)</p>"


def field_checks_panel(
    series: Workspace | str | Path,
    field_tests: str | Path | None = None,
    export_folder: str | Path = "field_check",
    images: bool = False,
    choose: bool = True,
) -> FieldChecksPanel:
    """Build the field-checks panel.

    Parameters
    ----------
    series : Workspace or str or pathlib.Path
        The series whose acceptable zone the tests are held to (opened as every panel
        opens one, :func:`kitchen.panels.common.open_workspace`).
    field_tests : str or pathlib.Path, optional
        The field tests; default the series' own ``field_tests.csv`` (or sheet).
    export_folder : str or pathlib.Path, default "field_check"
        Where the export button writes the check report.
    images : bool, default False
        Write PNG and SVG charts, and put them in the ``.docx`` (needs Chromium).
    choose : bool, default True
        Show the series box and **Open and check**; False where a series chooser above the
        panel chooses the series (:func:`kitchen.panels.workbook_panel`): the field-tests
        box and **Re-read field tests** stay.

    Returns
    -------
    FieldChecksPanel
    """
    workspace = open_workspace(series) if series is not None else None
    source = workspace.path if workspace is not None else ""
    series_path = widgets.Text(value=str(source), description="series")
    field_path = widgets.Text(
        value="" if field_tests is None else str(field_tests),
        description="field tests",
        placeholder="empty: the series' own field_tests.csv",
    )
    zone = widgets.ToggleButtons(options=list(ZONES), value="drawn", description="zone")
    open_button = widgets.Button(description="Open and check", button_style="primary")
    reread = widgets.Button(description="Re-read field tests")
    trial_w = widgets.BoundedFloatText(value=19.5, min=0.0, max=100.0, step=0.1,
                                       description="w [%]")  # fmt: skip
    trial_rho = widgets.BoundedFloatText(value=1.710, min=0.5, max=3.0, step=0.001,
                                         description="ρd [Mg/m³]")  # fmt: skip
    panel = FieldChecksPanel(
        widget=widgets.VBox(),
        series_path=series_path,
        field_tests_path=field_path,
        zone=zone,
        open_button=open_button,
        reread=reread,
        summary=widgets.HTML(),
        lifts=widgets.HTML(),
        outside=widgets.HTML(),
        tests=widgets.HTML(),
        charts=widgets.Output(),
        trial_water_content=trial_w,
        trial_dry_density=trial_rho,
        trial=widgets.HTML(),
        export_folder=widgets.Text(value=str(export_folder), description="export to"),
        export=widgets.Button(description="Export check report"),
        progress=ProgressBar(),
        error=MessageArea(),
        images=images,
        workspace=workspace,
    )

    @panel.error.guard("opening the series and checking the field tests")
    def on_open(_=None):
        panel.workspace = open_workspace(Path(panel.series_path.value.strip()))
        _show(panel)
        _trial(panel)

    @panel.error.guard("checking the field tests again")
    def on_reread(_=None):
        if panel.workspace is None:
            raise ValueError("open a series first")
        _show(panel)
        _trial(panel)

    @panel.error.guard("placing the typed state against the zone")
    def on_trial(_=None):
        _trial(panel)

    @panel.error.guard("exporting the check report")
    def on_export(_=None):
        if panel.workspace is None:
            raise ValueError("open a series first")
        report = export_field_check(
            panel.workspace,
            panel.field_tests_source(),
            Path(panel.export_folder.value.strip()),
            zone=panel.zone.value,
            images=panel.images,
            progress=panel.progress,
        )
        panel.exported = list(report.files)
        panel.progress.finish(f"{len(report.files)} file(s) written to {report.folder}")

    open_button.on_click(on_open)
    reread.on_click(on_reread)
    panel.export.on_click(on_export)
    zone.observe(on_reread, names="value")
    for box in (trial_w, trial_rho):
        box.observe(on_trial, names="value")
    panel.widget.children = [
        widgets.HBox([series_path, field_path] if choose else [field_path]),
        widgets.HBox([zone, open_button, reread] if choose else [zone, reread]),
        panel.error.widget,
        panel.summary,
        widgets.HTML("<h4>Per lift</h4>"),
        panel.lifts,
        widgets.HTML("<h4>Tests outside the zone</h4>"),
        panel.outside,
        panel.charts,
        widgets.HTML("<h4>Try a state (nothing is saved)</h4>"),
        widgets.HBox([trial_w, trial_rho]),
        panel.trial,
        widgets.HTML("<h4>Every test</h4>"),
        panel.tests,
        widgets.HBox([panel.export_folder, panel.export]),
        panel.progress.widget,
    ]
    if workspace is not None:
        on_open()
    return panel
