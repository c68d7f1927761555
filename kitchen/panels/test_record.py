"""The panel of the test-record notebook: one test's report items and its course over time.

For the test chosen, the panel shows what the memo pack's test report page holds: every
item ASTM D5084 and ISO 17892-11 ask a test report to hold, stated or marked "not
recorded" (:func:`kitchen.memo.report_items`), the B-value checks of a flexible-wall test,
and k against elapsed time and against pore volumes of flow with outflow/inflow against
time (:func:`kitchen.charts.flow_record_figure`).
"""

from __future__ import annotations

import html
from dataclasses import dataclass

import ipywidgets as widgets
import pandas as pd
import plotly.graph_objects as go

from kitchen.charts import flow_record_figure
from kitchen.display_units import K_UNITS, k_unit
from kitchen.memo import NOT_RECORDED, report_items
from kitchen.settings import Settings, reference_label
from kitchen.specimen import final_state
from kitchen.workspace import Workspace

from .common import MessageArea, open_workspace
from .refresh import refresh_figure

__all__ = ["RecordPanel", "record_panel"]


@dataclass
class RecordPanel:
    """Controls and views of the test-record panel.

    Attributes
    ----------
    widget : ipywidgets.VBox
    test : ipywidgets.Dropdown
        The tests of the series, ``(specimen, method)``.
    k_unit : ipywidgets.ToggleButtons
    figure : plotly.graph_objects.FigureWidget
        k against time and pore volumes of flow, outflow/inflow against time.
    items : ipywidgets.HTML
        The report items, each stated or marked "not recorded".
    error : MessageArea
    workspace : Workspace
    settings : Settings
    shown : list of ReportItem
        The items shown for the test chosen.
    """

    widget: widgets.VBox
    test: widgets.Dropdown
    k_unit: widgets.ToggleButtons
    figure: go.FigureWidget
    items: widgets.HTML
    error: MessageArea
    workspace: Workspace
    settings: Settings
    shown: list | None = None

    def refresh(self, _change=None) -> None:
        """Show the test chosen (the controls call this)."""
        self.error.guard(f"showing test {self.test.value}")(self._refresh)()

    def _refresh(self) -> None:
        specimen, method = self.test.value
        unit, label = self.k_unit.value, reference_label(self.settings)
        results = self.workspace.results()
        row = results[(results["specimen"] == specimen) & (results["method"] == method)]
        analysis = (
            self.workspace.falling_head(specimen)
            if method == "falling_head"
            else self.workspace.constant_head(specimen)
        )
        flow = self.workspace.flow_record(specimen, method)
        finals = final_state(self.workspace.series.specimens).set_index("specimen")
        self.shown = report_items(
            self.workspace,
            specimen,
            method,
            row.iloc[0].to_dict(),
            analysis,
            flow,
            finals.loc[specimen],
            k_unit(unit),
            label,
        )
        criteria = self.settings.criteria
        refresh_figure(
            self.figure,
            flow_record_figure(
                flow,
                f"{specimen}: the test over time",
                unit,
                label,
                (criteria.flow_ratio_low, criteria.flow_ratio_high),
            ),
        )
        self.items.value = _items_html(self.shown)


def _items_html(items) -> str:
    rows = []
    section = None
    for item in items:
        if item.section != section:
            section = item.section
            rows.append(f'<tr><th colspan="2">{html.escape(section)}</th></tr>')
        value = html.escape(item.value)
        if item.value == NOT_RECORDED or item.value.startswith("not applicable"):
            value = f"<em>{value}</em>"
        rows.append(f"<tr><td>{html.escape(item.item)}</td><td>{value}</td></tr>")
    return f"<table>{''.join(rows)}</table>"


def record_panel(
    series: Workspace | str,
    settings: Settings | None = None,
    specimen: str | None = None,
) -> RecordPanel:
    """Build the test-record panel.

    Parameters
    ----------
    series : Workspace or str or pathlib.Path
        A series already open, or the path of a series folder or workbook.
    settings : Settings, optional
    specimen : str, optional
        The specimen shown first (its first test); the first test by default.

    Returns
    -------
    RecordPanel
    """
    workspace = open_workspace(series, settings)
    results = workspace.results()
    tests = [
        (f"{specimen_id} · {method.replace('_', ' ')}", (specimen_id, method))
        for specimen_id, method in zip(results["specimen"], results["method"], strict=True)
    ]
    if not tests:
        raise ValueError(f"series {workspace.series.name} has no tests to show")
    first = tests[0][1]
    if specimen is not None:
        chosen = [value for _, value in tests if value[0] == specimen]
        if not chosen:
            raise ValueError(
                f"specimen {specimen!r} has no test; choose one of "
                f"{', '.join(pd.unique(results['specimen']))}"
            )
        first = chosen[0]
    choose = widgets.Dropdown(options=tests, value=first, description="Test")
    unit = widgets.ToggleButtons(options=list(K_UNITS), value="m/s", description="k in")
    unit.style.button_width = "60px"
    panel = RecordPanel(
        widget=widgets.VBox(),
        test=choose,
        k_unit=unit,
        figure=go.FigureWidget(),
        items=widgets.HTML(),
        error=MessageArea(),
        workspace=workspace,
        settings=workspace.settings,
    )
    panel.refresh()
    panel.widget.children = [
        widgets.HBox([choose, unit]),
        panel.error.widget,
        panel.figure,
        widgets.HTML("<b>The test report's items</b>"),
        panel.items,
    ]
    choose.observe(panel.refresh, names="value")
    unit.observe(panel.refresh, names="value")
    return panel
