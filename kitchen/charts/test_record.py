"""One test's record over its course: k against time and pore volumes, outflow/inflow.

:func:`flow_record_figure` draws, from a :class:`kitchen.reduction.FlowRecord`, three panels
one above the other: k at the reference temperature against elapsed time (log axis), the same
k against the cumulative flow in pore volumes, and the ratio of outflow to inflow over each
interval against time with the band the criterion allows (0.75–1.25 by default). A panel
whose quantity was not measured says so in words rather than staying empty.
"""

from __future__ import annotations

import numpy as np
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from kitchen.display_units import k_unit as k_display_unit

from .style import INK, MUTED, WIDTH, decimation_indices, memo_template

__all__ = ["flow_record_figure"]


def _thin(x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    finite = np.isfinite(x) & np.isfinite(y)
    x, y = x[finite], y[finite]
    keep = decimation_indices(y)
    return x[keep], y[keep]


def flow_record_figure(
    flow,
    title: str,
    k_unit: str = "m/s",
    reference: str = "k20",
    ratio_band: tuple[float, float] = (0.75, 1.25),
) -> go.Figure:
    """k against time and pore volumes of flow, and outflow/inflow against time.

    Parameters
    ----------
    flow : FlowRecord
        The test's flow record (:meth:`kitchen.workspace.Workspace.flow_record`).
    title : str
        The figure's title.
    k_unit : {"m/s", "cm/s"}
        Unit of the k axes.
    reference : str
        Name of the corrected k (``k20``).
    ratio_band : tuple of float
        The outflow/inflow limits drawn as a band (ASTM D5084: 0.75 and 1.25, from memory).

    Returns
    -------
    plotly.graph_objects.Figure

    References
    ----------
    ASTM D5084, report: k against time (or pore volumes of flow) and outflow/inflow against
    time (from memory).
    """
    unit = k_display_unit(k_unit)
    hours = 3600.0
    figure = make_subplots(
        rows=3,
        cols=1,
        vertical_spacing=0.11,
        subplot_titles=(
            f"{reference} against time",
            f"{reference} against pore volumes of flow",
            "outflow/inflow against time",
        ),
    )
    positive = flow.k > 0
    for row, (x_values, symbol) in enumerate(
        ((flow.k_time[positive] / hours, "circle"), (flow.k_pore_volumes[positive], "square")),
        start=1,
    ):
        x, y = _thin(x_values, flow.k[positive] * unit.factor)
        figure.add_trace(
            go.Scatter(
                x=x,
                y=y,
                mode="markers+lines",
                name=f"{reference} [{unit.unit}]",
                marker={"color": INK, "size": 6, "symbol": symbol},
                line={"color": MUTED, "width": 1},
            ),
            row=row,
            col=1,
        )
    if flow.ratio.size:
        x, y = _thin(flow.ratio_time / hours, flow.ratio)
        figure.add_trace(
            go.Scatter(
                x=x,
                y=y,
                mode="markers",
                name="outflow/inflow",
                marker={"color": INK, "size": 6, "symbol": "diamond"},
            ),
            row=3,
            col=1,
        )
        figure.add_hrect(
            y0=ratio_band[0],
            y1=ratio_band[1],
            fillcolor="#2e6b57",
            opacity=0.08,
            line_width=0,
            row=3,
            col=1,
        )
    else:
        figure.add_annotation(
            text="outflow/inflow not measured (no inflow and outflow readings)",
            showarrow=False,
            xref="x3 domain",
            yref="y3 domain",
            x=0.5,
            y=0.5,
            font={"color": MUTED},
        )
    for row in (1, 2):  # powers of ten as the other k axes, not SI prefixes ("520p")
        figure.update_yaxes(
            type="log",
            title_text=f"{reference} [{unit.unit}]",
            exponentformat="power",
            showexponent="all",
            row=row,
            col=1,
        )
    figure.update_yaxes(title_text="outflow/inflow [-]", row=3, col=1)
    figure.update_xaxes(title_text="elapsed time [h]", row=1, col=1)
    figure.update_xaxes(title_text="pore volumes of flow [-]", row=2, col=1)
    figure.update_xaxes(title_text="elapsed time [h]", row=3, col=1)
    figure.update_layout(
        template=memo_template(), title={"text": title}, width=WIDTH, height=900, showlegend=False
    )
    return figure
