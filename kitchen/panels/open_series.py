"""The panel of the first notebook: open a series, see its specimens and results.

A path box and a load button; the reference temperature and the viscosity method; the
results table (one row per specimen and method, the specimen state beside the corrected
conductivity), the specimens as read, and every check that did not pass, listed in words.
A series that cannot be used shows its problems as a list, never a traceback.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

import ipywidgets as widgets
import pandas as pd

from kitchen.io import Series
from kitchen.revisions import EffectiveSeries
from kitchen.settings import Settings
from kitchen.water import VISCOSITY_METHODS
from kitchen.workspace import Workspace

from .common import MessageArea, ProgressBar, html_table

__all__ = ["SeriesPanel", "series_panel", "VISCOSITY_LABELS", "COMPACT_COLUMNS", "results_columns"]

VISCOSITY_LABELS = {
    "kestin": "Kestin, Sokolov & Wakeham (1978)",
    "iapws": "IAPWS 2008 (Huber et al. 2009)",
    "d5084": "ASTM D5084 equation for R_T",
}
"""How the viscosity methods are named in the panels."""


COMPACT_COLUMNS = (
    "specimen",
    "method",
    "water_content [%]",
    "dry_density [Mg/m3]",
    "void_ratio",
    "saturation [%]",
    "valid",
    "notes",
)
"""The columns of the results table's compact view, with the corrected k and its interval
(``k20 [m/s]``, ``k20_low [m/s]``, ``k20_high [m/s]``, whatever the reference temperature);
every column is one click away."""

VIEWS = ("compact", "all columns")
"""The views of the results table."""

TEXT_COLUMNS = ("notes", "checks", "check that did not pass")
"""Columns of sentences: left-aligned and wrapped."""


def results_columns(table: pd.DataFrame, view: str) -> list[str]:
    """The columns of the results `table` shown in `view` (one of :data:`VIEWS`)."""
    if view not in VIEWS:
        raise ValueError(f"results view {view!r}: expected one of {', '.join(VIEWS)}")
    if view == "all columns":
        return list(table.columns)
    corrected = re.compile(r"^k\d[\d_]*(?P<end>_low|_high)? \[")  # k20, k27_5_low...
    shown = []
    for column in table.columns:
        match = corrected.match(column)
        if column in COMPACT_COLUMNS or match is not None:
            shown.append(column)
    return shown


def specimens_as_read(series: Series) -> pd.DataFrame:
    """The specimens table in the units a laboratory sheet uses (mm, g, mm²)."""
    table = series.specimens
    return pd.DataFrame(
        {
            "specimen": table["specimen"],
            "effort": table["effort"],
            "diameter [mm]": table["diameter"] * 1e3,
            "height [mm]": table["height"] * 1e3,
            "dry_mass [g]": table["dry_mass"] * 1e3,
            "specific_gravity": table["specific_gravity"],
            "water_content [%]": table["water_content"] * 100,
            "standpipe_area [mm2]": table["standpipe_area"] * 1e6,
            "tailwater_standpipe_area [mm2]": table["tailwater_standpipe_area"] * 1e6,
            "d10 [mm]": table["d10"] * 1e3,
            "file row": table["source_row"],
        }
    )


@dataclass
class SeriesPanel:
    """Controls and views of the open-a-series panel.

    Attributes
    ----------
    widget : ipywidgets.VBox
        What the notebook displays.
    path : ipywidgets.Text
        The series folder or workbook.
    load : ipywidgets.Button
        Loads (or reloads) the series at ``path``.
    reference_temperature : ipywidgets.BoundedFloatText
        Temperature k is corrected to. [degC]
    viscosity : ipywidgets.Dropdown
        Water viscosity method.
    results_view, specimens_view, checks_view : ipywidgets.HTML
        The results table, the specimens as read, and the checks that did not pass.
    columns : ipywidgets.ToggleButtons
        The results table's view: ``compact`` (:data:`COMPACT_COLUMNS`, what fits the
        notebook) or ``all columns``.
    error : MessageArea
        Problems with the series, or a failure, in words.
    progress : ProgressBar
    workspace : Workspace or None
        The series loaded last, opened as every view opens one
        (:class:`kitchen.workspace.Workspace`: revisions applied, reading windows on
        record); None until one loads.
    series : Series or None
        The workspace's effective series.
    effective : EffectiveSeries or None
        The series with the revisions applied and withdrawn, for provenance.
    results : pandas.DataFrame or None
        The workspace's results with ``settings`` (:meth:`Workspace.results`).
    table : pandas.DataFrame or None
        The exported results table of ``results`` (what is shown), the one
        ``python -m kitchen report`` writes.
    settings : Settings
    """

    widget: widgets.VBox
    path: widgets.Text
    load: widgets.Button
    reference_temperature: widgets.BoundedFloatText
    viscosity: widgets.Dropdown
    results_view: widgets.HTML
    specimens_view: widgets.HTML
    checks_view: widgets.HTML
    columns: widgets.ToggleButtons
    error: MessageArea
    progress: ProgressBar
    settings: Settings
    workspace: Workspace | None = None
    series: Series | None = None
    effective: EffectiveSeries | None = None
    results: pd.DataFrame | None = None
    table: pd.DataFrame | None = None

    def reload(self) -> None:
        """Load the series at ``path`` again (the load button does the same)."""
        self._load()

    def _load(self) -> None:
        self.error.guard(f"loading {self.path.value!r}")(self._load_now)()

    def _load_now(self) -> None:
        self.workspace = self.series = self.effective = self.results = self.table = None
        for view in (self.results_view, self.specimens_view, self.checks_view):
            view.value = ""
        path = Path(self.path.value.strip())
        self.progress(0, 2, f"reading and checking {path.name}")
        try:
            workspace = Workspace(path, self.settings)
        except Exception:
            self.progress.finish("the series could not be read (problems listed below)", True)
            raise
        self.workspace, self.series = workspace, workspace.series
        self.effective = effective = workspace.effective
        self.progress(1, 2, "reducing the tests")
        self._recompute()
        series = self.series
        count = effective.revision_count
        revised = f"; {count} revision(s) applied" if count else ""
        self.progress.finish(
            f"{series.name}: {len(series.specimens)} specimens, "
            f"{len(series.falling_head)} falling-head readings, "
            f"{len(series.constant_head)} constant-head collections{revised}"
        )

    def _settings_changed(self, change) -> None:
        if self.series is not None:
            self.error.guard("recomputing with the new settings")(self._recompute)()

    def _recompute(self) -> None:
        self.settings = self.settings.with_changes(
            reference_temperature=float(self.reference_temperature.value),
            viscosity=self.viscosity.value,
        )
        self.workspace.set_settings(self.settings)
        self.results = self.workspace.results()
        self.table = self.workspace.results_table()
        self._show_results()
        self.specimens_view.value = html_table(specimens_as_read(self.series))
        failed = self.results[self.results["checks"].map(len) > 0]
        if failed.empty:
            self.checks_view.value = "<p>Every check passed for every specimen.</p>"
        else:
            rows = pd.DataFrame(
                {
                    "specimen": failed["specimen"],
                    "method": failed["method"].str.replace("_", " "),
                    "check that did not pass": failed["checks"].map("; ".join),
                }
            )
            self.checks_view.value = html_table(rows, text_columns=TEXT_COLUMNS)

    def _show_results(self, _change=None) -> None:
        if self.table is None:
            return
        shown = self.table.drop(columns=["checks"])
        shown = shown[[c for c in results_columns(shown, self.columns.value)]]
        self.results_view.value = html_table(shown, text_columns=TEXT_COLUMNS)


def series_panel(
    path: str | Path, settings: Settings | None = None, choose: bool = True
) -> SeriesPanel:
    """Build the open-a-series panel and load the series at `path`.

    Parameters
    ----------
    path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook, shown in the path box.
    settings : Settings, optional
        Starting reference temperature and viscosity method.
    choose : bool, default True
        Show the path box and the load button; False where a series chooser above the
        panel chooses the series (:func:`kitchen.panels.workbook_panel`).

    Returns
    -------
    SeriesPanel
    """
    settings = settings or Settings()
    path_box = widgets.Text(
        value=str(path),
        description="Series",
        placeholder="folder of CSV files, or a .xlsx workbook",
        layout=widgets.Layout(width="60%"),
    )
    load = widgets.Button(description="Load", icon="folder-open", button_style="primary")
    reference = widgets.BoundedFloatText(
        value=settings.reference_temperature,
        min=0.5,
        max=99.5,
        step=0.5,
        description="Reference T [°C]",
        style={"description_width": "initial"},
        layout=widgets.Layout(width="200px"),
    )
    viscosity = widgets.Dropdown(
        options=[(VISCOSITY_LABELS.get(name, name), name) for name in VISCOSITY_METHODS],
        value=settings.viscosity,
        description="Viscosity",
        layout=widgets.Layout(width="380px"),
    )
    results_view, specimens_view, checks_view = widgets.HTML(), widgets.HTML(), widgets.HTML()
    columns = widgets.ToggleButtons(
        options=list(VIEWS),
        value="compact",
        description="Show",
        tooltips=["what fits: state, k with its interval, validity, notes", "every column"],
        style={"button_width": "110px"},
    )
    tabs = widgets.Tab(
        children=[
            widgets.VBox([columns, results_view]),
            widgets.VBox([checks_view]),
            specimens_view,
        ]
    )
    for index, title in enumerate(("Results", "Checks", "Specimens as read")):
        tabs.set_title(index, title)
    error, progress = MessageArea(), ProgressBar()
    box = widgets.VBox(
        [
            *([widgets.HBox([path_box, load])] if choose else []),
            widgets.HBox([reference, viscosity]),
            progress.widget,
            error.widget,
            tabs,
        ]
    )
    panel = SeriesPanel(
        widget=box,
        path=path_box,
        load=load,
        reference_temperature=reference,
        viscosity=viscosity,
        results_view=results_view,
        specimens_view=specimens_view,
        checks_view=checks_view,
        columns=columns,
        error=error,
        progress=progress,
        settings=settings,
    )
    load.on_click(lambda _button: panel._load())
    reference.observe(panel._settings_changed, names="value")
    viscosity.observe(panel._settings_changed, names="value")
    columns.observe(panel._show_results, names="value")
    panel._load()
    return panel
