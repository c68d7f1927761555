"""The memo chart of the compaction plane above log k against molding water content.

Top panel: dry density against water content with the zero-air-voids and
constant-saturation lines, each effort's compaction curve, the line of optimums and the
acceptable zone; bottom panel: each specimen's k with its interval and the criterion line,
on the same water-content axis. Also as a plain-dict spec
(:func:`compaction_conductivity_spec`) that a live figure is brought to.
"""

from __future__ import annotations

import copy
from dataclasses import replace
from functools import lru_cache

import numpy as np
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from kitchen.analysis import SATURATION_LINES, SeriesAnalysis
from kitchen.display_units import density_unit, k_unit, scientific

from ._series_parts import (
    ERROR_BAR_FRACTION,
    criterion_spec,
    effort_group_title,
    effort_order,
    effort_styles,
    hover_texts,
    html_escaped,
    k_axis_layout,
    k_axis_title,
    note_spec,
    optimum_line_spec,
    padded_range,
    saturation_specs,
    specimen_trace_specs,
)
from .style import (
    DRAWN_ZONE_DASH,
    FITTED_ZONE_DASH,
    INK,
    MUTED,
    ZONE,
    cached_memo_template,
)

__all__ = ["compaction_conductivity_figure", "compaction_conductivity_spec"]


@lru_cache(maxsize=1)
def _two_panel_grid() -> dict:
    """The axes of the compaction-conductivity grid (two rows sharing the x axis), built once."""
    layout = make_subplots(
        rows=2, cols=1, shared_xaxes=True, vertical_spacing=0.05, row_heights=[0.58, 0.42]
    ).layout.to_plotly_json()
    return {key: layout[key] for key in ("xaxis", "yaxis", "xaxis2", "yaxis2")}


def _two_panel_axes() -> dict:
    """A copy of :func:`_two_panel_grid`, free to change."""
    return copy.deepcopy(_two_panel_grid())


def _closed(corners: np.ndarray) -> np.ndarray:
    return np.vstack([corners, corners[:1]])


def _zone_specs(analysis: SeriesAnalysis, frame, density_factor: float, axes: dict) -> list[dict]:
    """The traces of both zones on the compaction plane, told apart in the legend and in
    greyscale: the drawn zone hatched (/) in green, its edge a dash and two dots
    (:data:`DRAWN_ZONE_DASH`); the fitted zone of each effort dotted (.) in ink, its edge
    three dots and a dash (:data:`FITTED_ZONE_DASH`), the extent of its fit a thin grey
    outline and its criterion line a thick grey one in the same code. No compaction curve
    or saturation line uses either code.

    The drawn zone is the hull of the specimens that meet with no other specimen inside
    (Daniel & Benson 1990, J. Geotech. Eng. 116(12):1811, draw it by judgement); the fitted
    zone, the criterion line and the next specimen come from
    :func:`kitchen.analysis.fit_zone` (the tool's own construction).
    """
    specs = []
    zone = analysis.acceptable_zone
    if zone is not None and zone.kind != "empty":
        polygon = zone.kind == "polygon"
        corners = _closed(zone.vertices) if polygon else zone.vertices
        specs.append(
            dict(
                type="scatter",
                x=corners[:, 0] * 100.0,
                y=corners[:, 1] * density_factor,
                mode="lines" if zone.kind != "point" else "markers",
                fill="toself" if polygon else None,
                fillcolor="rgba(46,107,87,0.10)",
                fillpattern=dict(shape="/", fgcolor="rgba(46,107,87,0.45)", size=9, solidity=0.12)
                if polygon
                else None,
                line=dict(color=ZONE, width=1.6, dash=DRAWN_ZONE_DASH),
                name=f"drawn zone ({zone.kind}): hull of specimens that meet (k "
                f"{analysis.criterion.bound} the criterion), no other inside",
                legendgroup="zone",
                hoverinfo="name",
                **axes,
            )
        )
    fitted = analysis.fitted_zone
    if fitted is None:
        return specs
    group = dict(legendgroup="fitted zone", legendgrouptitle=dict(text="fitted zone (tool's own)"))
    end = "upper" if fitted.criterion.kind == "maximum" else "lower"
    for part in fitted.zones:
        own = f" ({html_escaped(part.effort)})" if part.effort is not None else ""
        dash = FITTED_ZONE_DASH
        if part.extent.size:
            extent = _closed(part.extent)
            specs.append(
                dict(
                    type="scatter",
                    x=extent[:, 0] * 100.0,
                    y=extent[:, 1] * density_factor,
                    mode="lines",
                    line=dict(color=MUTED, width=0.8, dash=dash),
                    name=f"extent of the fit{own}: hull of the tested states",
                    hoverinfo="name",
                    **group,
                    **axes,
                )
            )
        if part.region.size:
            region = _closed(part.region)
            specs.append(
                dict(
                    type="scatter",
                    x=region[:, 0] * 100.0,
                    y=region[:, 1] * density_factor,
                    mode="lines",
                    fill="toself",
                    fillcolor="rgba(29,39,49,0.04)",
                    fillpattern=dict(
                        shape=".", fgcolor="rgba(29,39,49,0.55)", size=7, solidity=0.2
                    ),
                    line=dict(color=INK, width=1.4, dash=dash),
                    name=f"fitted zone{own}: {end} {100 * fitted.confidence:g} % prediction "
                    "bound meets the criterion",
                    hoverinfo="name",
                    **group,
                    **axes,
                )
            )
        if part.criterion_line is not None:
            specs.append(
                dict(
                    type="scatter",
                    x=part.criterion_line[:, 0] * 100.0,
                    y=part.criterion_line[:, 1] * density_factor,
                    mode="lines",
                    line=dict(color=MUTED, width=2.2, dash=dash),
                    name=f"fitted{own}: prediction = criterion",
                    hoverinfo="name",
                    **group,
                    **axes,
                )
            )
    spot = fitted.next_specimen
    if spot is not None:
        effort = f", {html_escaped(spot.effort)} effort" if spot.effort is not None else ""
        specs.append(
            dict(
                type="scatter",
                x=[spot.water_content * 100.0],
                y=[spot.dry_density * density_factor],
                mode="markers",
                marker=dict(
                    symbol="x-thin-open", size=13, color=INK, line=dict(color=INK, width=2.0)
                ),
                name="fitted: one more specimen here narrows the boundary most",
                text=[f"next specimen{effort}"],
                hoverinfo="text+x+y",
                **group,
                **axes,
            )
        )
    return specs


def compaction_conductivity_figure(
    analysis: SeriesAnalysis, k_unit_name: str = "m/s", density_unit_name: str = "Mg/m³"
) -> go.Figure:
    """The memo chart: the compaction plane above log k against water content.

    Parameters
    ----------
    analysis : SeriesAnalysis
        From :func:`kitchen.analysis.analyse_series`; needs specimens with a
        molding water content.
    k_unit_name : {"m/s", "cm/s"}, default "m/s"
    density_unit_name : {"Mg/m³", "kN/m³", "lb/ft³"}, default "Mg/m³"
        ASCII spellings (``"kN/m3"``) are accepted.

    Returns
    -------
    plotly.graph_objects.Figure
        Top: dry density against molding water content with the zero-air-voids and
        constant-saturation lines, the compaction curve of each effort, the line of
        optimums and the acceptable zone; bottom: k on a log axis against the same water
        content, with the criterion line. The two panels share the water-content axis.

    References
    ----------
    Daniel, D. E. and Benson, C. H. (1990), J. Geotech. Eng. 116(12), 1811–1830: the
    acceptable zone drawn on the compaction plane from the specimens that meet the
    criterion.
    """
    return go.Figure(compaction_conductivity_spec(analysis, k_unit_name, density_unit_name))


def _key(analysis: SeriesAnalysis, ku) -> str:
    """The subtitle: the criterion and what the marker fills mean (validity alone when no
    criterion was given)."""
    if analysis.criterion is None:
        return (
            "no criterion given: no verdicts and no acceptable zone; solid: valid, "
            "pale: not judged (test not valid)"
        )
    return (
        f"criterion k {analysis.criterion.symbol} "
        f"{scientific(analysis.criterion * ku.factor, html=True)} "
        f"{ku.unit}; filled: meets, open: does not meet, dotted: not conclusive, "
        "pale: not judged (test not valid)"
    )


def compaction_conductivity_spec(
    analysis: SeriesAnalysis, k_unit_name: str = "m/s", density_unit_name: str = "Mg/m³"
) -> dict:
    """The figure of :func:`compaction_conductivity_figure` as a spec: plain dicts, not validated.

    Returns
    -------
    dict
        ``{"data": [trace dicts], "layout": {...}}``; ``plotly.graph_objects.Figure(spec)``
        is the figure, and :func:`kitchen.panels.refresh.refresh_figure` brings a live
        figure to it sending only what changed.
    """
    ku, du = k_unit(k_unit_name), density_unit(density_unit_name)
    frame = analysis.specimens[analysis.specimens["on_compaction_plane"]]
    if frame.empty:
        raise ValueError("no specimen has a molding water content: no compaction plane to draw")
    plane = replace(analysis, specimens=frame)
    w_pct = frame["water_content"].to_numpy() * 100.0
    x_range = padded_range(w_pct, 0.08)
    # the traces and the layout are gathered as plain dicts and validated once, when the
    # figure is built: adding them one at a time re-validates the whole figure each time
    top, bottom = dict(xaxis="x", yaxis="y"), dict(xaxis="x2", yaxis="y2")
    data, annotations = [], []
    y_values = [frame["dry_density"].to_numpy()]
    data += _zone_specs(analysis, frame, du.factor, top)
    order = effort_order(frame)
    styles = effort_styles(frame, order)
    for effort in order:
        curve = analysis.compaction_curves.get(effort)
        if curve is None:
            continue
        w = np.linspace(curve.tested_water_content.min(), curve.tested_water_content.max(), 60)
        rho = np.asarray(curve.dry_density(w))
        y_values.append(rho)
        data.append(
            dict(
                type="scatter",
                x=w * 100.0,
                y=rho * du.factor,
                mode="lines",
                name=f"compaction curve ({curve.method})",
                legendgroup=f"effort {effort}",
                legendgrouptitle=dict(text=effort_group_title(effort)),
                line=dict(color=INK, width=1.5, dash=styles.get(effort, ("", "solid"))[1]),
                hoverinfo="name",
                **top,
            )
        )
    line = analysis.line_of_optimums
    if line is not None and line.optimum_water_content.size:
        w_opt = line.optimum_water_content
        data.append(
            dict(
                type="scatter",
                x=w_opt * 100.0,
                y=line.maximum_dry_density * du.factor,
                mode="markers",
                name="optimum of each effort",
                legendgroup="optimums",
                marker=dict(symbol="star", size=13, color="white", line=dict(color=INK, width=1.4)),
                text=[html_escaped(v) for v in line.efforts],
                hoverinfo="text+x+y",
                **top,
            )
        )
        if line.slope is not None:
            w = np.array(padded_range(w_opt, 0.35))
            data.append(optimum_line_spec(line, w, du, legendgroup="optimums", **top))
    y_low, y_high = padded_range(np.concatenate(y_values) * du.factor, 0.10)
    if analysis.specific_gravity is not None:
        w = np.linspace(x_range[0], x_range[1], 80) / 100.0
        w = w[w >= 0]
        for saturation, spec in zip(
            SATURATION_LINES, saturation_specs(analysis, w, du, **top), strict=True
        ):
            rho = spec["y"]
            data.append(spec)
            inside = np.flatnonzero((rho >= y_low) & (rho <= y_high))
            if inside.size:
                last = inside[-1]
                annotations.append(
                    dict(
                        x=w[last] * 100.0,
                        y=rho[last],
                        text=f"S = {100 * saturation:.0f} %",
                        showarrow=False,
                        xanchor="right",
                        yanchor="bottom",
                        font=dict(size=10, color=MUTED),
                        xref="x",
                        yref="y",
                    )
                )
    k_axis, note = k_axis_layout(plane, ku)
    shortest = ERROR_BAR_FRACTION * (k_axis["range"][1] - k_axis["range"][0])
    density = frame["dry_density"] * du.factor
    hover = np.array(hover_texts(frame, ku, plane), dtype=object)
    data += specimen_trace_specs(plane, w_pct, density, ku, True, None, order, hover, **top)
    data += specimen_trace_specs(
        plane, w_pct, frame["k"] * ku.factor, ku, False, shortest, order, hover, **bottom
    )
    if not note and analysis.criterion is not None:
        data.append(dict(criterion_spec(analysis, x_range, ku), **bottom))
    if note:
        annotations.append(dict(note_spec(note), xref="x2 domain", yref="y2 domain"))
    axes = _two_panel_axes()
    k_title = k_axis_title(ku, analysis.reference_temperature)
    layout = dict(
        template=cached_memo_template(),
        xaxis=dict(axes["xaxis"], range=list(x_range)),
        yaxis=dict(axes["yaxis"], title=dict(text=du.title()), range=[y_low, y_high]),
        xaxis2=dict(
            axes["xaxis2"], range=list(x_range), title=dict(text="molding water content w [%]")
        ),
        yaxis2=dict(axes["yaxis2"], title=dict(text=k_title), **k_axis),
        title=dict(
            text=f"Compaction and hydraulic conductivity<br><sup>{_key(analysis, ku)}</sup>"
        ),
        margin=dict(t=95, b=60),
        legend=dict(orientation="h", x=0.0, xanchor="left", y=-0.075, yanchor="top"),
        height=1120,
    )
    if annotations:
        layout["annotations"] = annotations
    return dict(data=data, layout=layout)
