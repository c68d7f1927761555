"""The panel of the constant-head notebook: v against i for one specimen, and the spread of k.

In laminar flow the Darcy velocity is proportional to the gradient, v = k·i, so the
collections of one specimen at several heads should fall on a line through the origin
whose slope is k. The panel draws that line with the interval of its slope, lists every
collection with its own k, and says how far the single values spread about their mean.
"""

from __future__ import annotations

import html
from dataclasses import dataclass

import ipywidgets as widgets
import numpy as np
import pandas as pd
import plotly.graph_objects as go

from kitchen.charts import constant_head_figure
from kitchen.display_units import K_UNITS
from kitchen.io import Series
from kitchen.reduction import (
    ConstantHeadAnalysis,
    ConstantHeadResult,
)
from kitchen.settings import Settings, reference_label
from kitchen.workspace import Workspace

from .common import MessageArea, format_conductivity, format_number, html_table, open_workspace
from .open_series import VISCOSITY_LABELS
from .refresh import refresh_figure

__all__ = ["ConstantHeadPanel", "constant_head_panel", "collections_view_table"]


def collections_view_table(result: ConstantHeadResult, unit: str, label: str) -> pd.DataFrame:
    """The collections of one specimen as shown: heads in cm, volumes in mL, k in `unit`."""
    rows = result.collections
    factor = K_UNITS[unit].factor
    mean = rows["k_reference"].mean()
    return pd.DataFrame(
        {
            "file row": rows["source_row"],
            "head difference [cm]": rows["head_difference"] * 100,
            "flow length [cm]": rows["flow_length"] * 100,
            "gradient i": rows["gradient"],
            "duration [s]": rows["duration"],
            "volume [mL]": rows["flow_volume"] * 1e6,
            "temperature [°C]": rows["temperature"],
            f"k [{unit}]": rows["k"] * factor,
            f"{label} [{unit}]": rows["k_reference"] * factor,
            f"{label} from mean [%]": (rows["k_reference"] / mean - 1) * 100,
        }
    )


@dataclass
class ConstantHeadPanel:
    """Controls and views of the constant-head panel.

    Attributes
    ----------
    widget : ipywidgets.VBox
    specimen : ipywidgets.Dropdown
        Specimens with constant-head collections.
    k_unit : ipywidgets.ToggleButtons
        ``"m/s"`` or ``"cm/s"``.
    figure : plotly.graph_objects.FigureWidget
        v·R_T against i with the fit through the origin and its interval.
    summary : ipywidgets.HTML
        k at the reference temperature with its interval, k at the test temperature,
        the spread of the single values, the gradient range and the notes.
    collections : ipywidgets.HTML
        Every collection with its own k.
    error : MessageArea
    analysis : ConstantHeadAnalysis or None
        The core's analysis of the specimen shown (k, interval, verdicts).
    workspace : Workspace
        The series as opened (:class:`kitchen.workspace.Workspace`); the analysis shown
        is its own.
    series : Series
    settings : Settings
    """

    widget: widgets.VBox
    specimen: widgets.Dropdown
    k_unit: widgets.ToggleButtons
    figure: go.FigureWidget
    summary: widgets.HTML
    collections: widgets.HTML
    error: MessageArea
    workspace: Workspace
    series: Series
    settings: Settings
    analysis: ConstantHeadAnalysis | None = None

    def refresh(self, _change=None) -> None:
        """Reduce the chosen specimen and redraw (the controls call this)."""
        self.error.guard(f"reducing specimen {self.specimen.value}")(self._refresh)()

    def _refresh(self) -> None:
        self.analysis = self.workspace.constant_head(self.specimen.value)
        unit, label = self.k_unit.value, reference_label(self.settings)
        refresh_figure(
            self.figure,
            constant_head_figure(self.analysis, unit, self.settings.reference_temperature),
        )
        self.summary.value = _summary_html(self.analysis, unit, label, self.settings)
        self.collections.value = html_table(
            collections_view_table(self.analysis.result, unit, label),
            {
                f"k [{unit}]": lambda v: format_conductivity(v / K_UNITS[unit].factor, unit),
                f"{label} [{unit}]": lambda v: format_conductivity(v / K_UNITS[unit].factor, unit),
                f"{label} from mean [%]": lambda v: f"{v:+.1f}",
                "temperature [°C]": lambda v: "–" if pd.isna(v) else f"{v:.1f}",
            },
        )


_MARKS = {True: "✔", False: "✘", None: "–"}


def _summary_html(analysis: ConstantHeadAnalysis, unit: str, label: str, settings: Settings) -> str:
    result = analysis.result
    k = format_conductivity(analysis.k_reference, unit)
    low = format_conductivity(analysis.k_reference_low, unit)
    high = format_conductivity(analysis.k_reference_high, unit)
    interval = analysis.interval
    lines = [
        f"k at the test temperature ({format_number(result.temperature, 3)} °C mean) = "
        f"{html.escape(format_conductivity(result.k, unit))}",
        f"interval: {html.escape(interval.describe())}",
        f"{result.n} collection(s) at gradients {result.gradient_min:.3g} to "
        f"{result.gradient_max:.3g}; the single values of {label} spread up to "
        f"{100 * result.spread:.1f} % from their mean",
    ]
    if result.fit is not None:
        lines.append(
            f"fit of v·R_T on i through the origin: r² (uncentred) = {result.fit.r_squared:.5f}"
        )
    if analysis.line is not None:
        line = analysis.line
        lines.append(
            f"v·R_T on i with an intercept (the test of k against gradient): intercept "
            f"{html.escape(format_conductivity(line.intercept, unit))} "
            f"({100 * line.confidence:g} %: "
            f"{html.escape(format_conductivity(line.intercept_low, unit))} to "
            f"{html.escape(format_conductivity(line.intercept_high, unit))})"
        )
    if np.isfinite(analysis.reynolds):
        lines.append(f"largest Reynolds number on d10: {analysis.reynolds:.3g}")
    verdicts = "".join(
        f"<li class='kitchen-verdict-{str(v.passed).lower()}'>{_MARKS[v.passed]} "
        f"{html.escape(v.sentence)}</li>"
        for v in analysis.verdicts
    )
    state = "valid: every applicable criterion passes" if analysis.valid else "not valid"
    notes = "".join(f"<li>{html.escape(n)}</li>" for n in (*analysis.method_notes, *analysis.notes))
    items = "".join(f"<li>{line}</li>" for line in lines)
    return (
        f"<div class='kitchen-summary'><div class='kitchen-k-line'><b>{label}</b> = "
        f"<span class='kitchen-k'>{html.escape(k)}</span> "
        f"({100 * interval.confidence:g} % interval {html.escape(low)} to {html.escape(high)})"
        f"</div><ul>{items}</ul><b>Validity — {state}</b><ul>{verdicts}</ul>"
        f"<b>Notes</b><ul>{notes}</ul>"
        f"<small>Corrected to {settings.reference_temperature:g} °C with the water viscosity "
        f"of {html.escape(VISCOSITY_LABELS.get(settings.viscosity, settings.viscosity))}."
        "</small></div>"
    )


def constant_head_panel(
    series: Series | str,
    settings: Settings | None = None,
    specimen: str | None = None,
) -> ConstantHeadPanel:
    """Build the constant-head panel.

    Parameters
    ----------
    series : Workspace or str or pathlib.Path
        A series already open, or the path of a series folder or workbook (opened with
        its revisions applied, :func:`open_workspace`).
    settings : Settings, optional
        Reference temperature and viscosity method.
    specimen : str, optional
        The specimen shown first; the first with collections by default.

    Returns
    -------
    ConstantHeadPanel

    Raises
    ------
    ValueError
        When the series has no constant-head collections.
    """
    workspace = open_workspace(series, settings)
    series, settings = workspace.series, workspace.settings
    if series.constant_head.empty:
        raise ValueError(
            f"series {series.name} has no constant-head collections (constant_head.csv)"
        )
    ids = [
        name for name in workspace.specimen_ids() if workspace.has_readings(name, "constant_head")
    ]
    if specimen is not None and specimen not in ids:
        raise ValueError(
            f"specimen {specimen!r} has no constant-head collections; choose one of "
            f"{', '.join(ids)}"
        )
    choose = widgets.Dropdown(options=ids, value=specimen or ids[0], description="Specimen")
    unit = widgets.ToggleButtons(options=list(K_UNITS), value="m/s", description="k in")
    unit.style.button_width = "60px"
    panel = ConstantHeadPanel(
        widget=widgets.VBox(),
        specimen=choose,
        k_unit=unit,
        figure=go.FigureWidget(),
        summary=widgets.HTML(),
        collections=widgets.HTML(),
        error=MessageArea(),
        workspace=workspace,
        series=series,
        settings=settings,
    )
    panel.refresh()
    panel.widget.children = [
        widgets.HBox([choose, unit]),
        panel.error.widget,
        panel.figure,
        panel.summary,
        widgets.HTML("<b>Collections</b>"),
        panel.collections,
    ]
    choose.observe(panel.refresh, names="value")
    unit.observe(panel.refresh, names="value")
    return panel
