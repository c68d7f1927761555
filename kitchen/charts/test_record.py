"""One test's record over its course: k against time and pore volumes, outflow/inflow.

:func:`flow_record_figure` draws, from a :class:`kitchen.reduction.FlowRecord`, three panels
one above the other: k at the reference temperature against elapsed time (log axis), the same
k against the cumulative flow in pore volumes, and the ratio of outflow to inflow over each
interval against time with the band the criterion allows (0.75–1.25 by default). A panel
whose quantity was not measured says so in words rather than staying empty.
"""

from __future__ import annotations

import copy
import functools

import numpy as np
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from kitchen.display_units import k_unit as k_display_unit

from .style import INK, MUTED, WIDTH, cached_memo_template, decimation_indices

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
    # the figure gathered as plain dicts and validated once (make_subplots' grid, built
    # once a title set): a pack of many tests draws one of these a test
    layout = copy.deepcopy(_grid(reference))
    data = []
    positive = flow.k > 0
    for row, (x_values, symbol) in enumerate(
        ((flow.k_time[positive] / hours, "circle"), (flow.k_pore_volumes[positive], "square")),
        start=1,
    ):
        x, y = _thin(x_values, flow.k[positive] * unit.factor)
        data.append(
            dict(
                type="scatter",
                x=x,
                y=y,
                mode="markers+lines",
                name=f"{reference} [{unit.unit}]",
                marker={"color": INK, "size": 6, "symbol": symbol},
                line={"color": MUTED, "width": 1},
                xaxis=_AXES[row][0],
                yaxis=_AXES[row][1],
            )
        )
    if flow.ratio.size:
        x, y = _thin(flow.ratio_time / hours, flow.ratio)
        data.append(
            dict(
                type="scatter",
                x=x,
                y=y,
                mode="markers",
                name="outflow/inflow",
                marker={"color": INK, "size": 6, "symbol": "diamond"},
                xaxis="x3",
                yaxis="y3",
            )
        )
        layout["shapes"] = [
            dict(
                type="rect",
                x0=0,
                x1=1,
                xref="x3 domain",
                y0=ratio_band[0],
                y1=ratio_band[1],
                yref="y3",
                fillcolor="#2e6b57",
                opacity=0.08,
                line={"width": 0},
            )
        ]
    else:
        # placed on the page at the third panel's middle: a panel with no trace is not drawn,
        # and a note tied to its axes would land in the first panel and stretch its ranges
        low, high = layout["yaxis3"]["domain"]
        layout["annotations"].append(
            dict(
                text="outflow/inflow not measured (no inflow and outflow readings)",
                showarrow=False,
                xref="paper",
                yref="paper",
                x=0.5,
                y=(low + high) / 2,
                font={"color": MUTED},
            )
        )
    k_title = f"{reference} [{unit.unit}]"
    for axis in ("yaxis", "yaxis2"):  # powers of ten as the other k axes, not SI prefixes
        layout[axis].update(
            type="log", title={"text": k_title}, exponentformat="power", showexponent="all"
        )
    layout["yaxis3"]["title"] = {"text": "outflow/inflow [-]"}
    layout["xaxis"]["title"] = {"text": "elapsed time [h]"}
    layout["xaxis2"]["title"] = {"text": "pore volumes of flow [-]"}
    layout["xaxis3"]["title"] = {"text": "elapsed time [h]"}
    layout.update(
        template=cached_memo_template(),
        title={"text": title},
        width=WIDTH,
        height=900,
        showlegend=False,
    )
    return go.Figure({"data": data, "layout": layout})


_AXES = {1: ("x", "y"), 2: ("x2", "y2"), 3: ("x3", "y3")}
"""The axes of each panel, top to bottom."""


@functools.lru_cache(maxsize=8)
def _grid(reference: str) -> dict:
    """The three panels' axes and titles as :func:`plotly.subplots.make_subplots` lays them
    out (one column, vertical spacing 0.11), as a plain dict; built once a k name."""
    layout = make_subplots(
        rows=3,
        cols=1,
        vertical_spacing=0.11,
        subplot_titles=(
            f"{reference} against time",
            f"{reference} against pore volumes of flow",
            "outflow/inflow against time",
        ),
    ).layout.to_plotly_json()
    layout.pop("template", None)  # the memo's own is set on each figure
    return layout
