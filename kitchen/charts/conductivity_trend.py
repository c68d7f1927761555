"""The chart of log k against void ratio, dry density or water content relative to optimum.

The specimens with error bars from their k intervals, the fitted line of
:mod:`kitchen.analysis.trends` with its confidence band, the criterion line, and the predictions
from grading and the Kozeny–Carman line, labelled as predictions.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import plotly.graph_objects as go

from kitchen.analysis import SeriesAnalysis
from kitchen.display_units import DisplayUnit, density_unit, k_unit

from ._series_parts import (
    ERROR_BAR_FRACTION,
    add_note,
    criterion_trace,
    html_escaped,
    k_axis_layout,
    k_axis_title,
    padded_range,
    specimen_traces,
)
from .style import INK, MUTED, memo_template

__all__ = ["conductivity_trend_figure"]


_AGAINST = {
    "void_ratio": ("void_ratio", "void_ratio_trend"),
    "dry_density": ("dry_density", "dry_density_trend"),
    "water_content_from_optimum": ("water_content_from_optimum", "water_content_trend"),
}


WEAK_FIT_R_SQUARED = 0.25
"""Below this r² a trend line explains less than a quarter of the scatter of log k: it is drawn
faint, without its band, and its legend says so with its r² (the tool's own threshold)."""


def _x_axis(against: str, du: DisplayUnit):
    if against == "void_ratio":
        return "void ratio e [–]", 1.0
    if against == "dry_density":
        return du.title(), du.factor
    return "water content relative to optimum w − w_opt [%]", 100.0


def _trend_name(against, trend, du: DisplayUnit) -> str:
    fit = trend.fit
    if against == "void_ratio":
        if np.isfinite(trend.change_index_high):
            return (
                f"Tavenas line, Ck = {trend.change_index:.3g} "
                f"({trend.change_index_low:.3g}–{trend.change_index_high:.3g}), r² = "
                f"{fit.r_squared:.2f}"
            )
        return f"Tavenas line, Ck not bounded, r² = {fit.r_squared:.2f}"
    per = "%" if against != "dry_density" else du.unit
    scale = 100.0 if against != "dry_density" else du.factor
    return f"log-linear fit, {fit.slope / scale:.3g} decades per {per}, r² = {fit.r_squared:.2f}"


def conductivity_trend_figure(
    analysis: SeriesAnalysis,
    against: str = "void_ratio",
    k_unit_name: str = "m/s",
    density_unit_name: str = "Mg/m³",
) -> go.Figure:
    """log k against void ratio, dry density or water content relative to optimum.

    Parameters
    ----------
    analysis : SeriesAnalysis
    against : {"void_ratio", "dry_density", "water_content_from_optimum"}
    k_unit_name : {"m/s", "cm/s"}, default "m/s"
    density_unit_name : {"Mg/m³", "kN/m³", "lb/ft³"}, default "Mg/m³"

    Returns
    -------
    plotly.graph_objects.Figure
        The specimens with error bars from their k intervals, the fitted line with its
        confidence band, the criterion line, and — where a d10 is given, on the void-ratio
        and dry-density charts — the predictions from grading, labelled as predictions.

    References
    ----------
    Tavenas, F. et al. (1983), Can. Geotech. J. 20(4), 645–660 (e–log k); Chapuis, R. P.
    (2004), Can. Geotech. J. 41(5), 787–795; Hazen (1892) and Kozeny–Carman as in
    :mod:`kitchen.analysis.trends`.
    """
    if against not in _AGAINST:
        raise ValueError(f"against: expected one of {', '.join(_AGAINST)}, got {against!r}")
    ku, du = k_unit(k_unit_name), density_unit(density_unit_name)
    column, attribute = _AGAINST[against]
    frame = analysis.specimens[analysis.specimens[column].notna()]
    if frame.empty:
        raise ValueError(f"no specimen has a {column.replace('_', ' ')}: nothing to draw")
    title, scale = _x_axis(against, du)
    plotted = replace(analysis, specimens=frame)
    x = frame[column].to_numpy(float)
    x_range = padded_range(x * scale, 0.08)
    figure = go.Figure(layout=dict(template=memo_template()))
    trend = getattr(analysis, attribute)
    if trend is not None:
        grid = np.linspace(x.min(), x.max(), 80)
        weak = not trend.fit.r_squared >= WEAK_FIT_R_SQUARED
        if not weak:
            low, high = trend.band(grid)
            band_edge = dict(mode="lines", line=dict(width=0), legendgroup="fit", hoverinfo="skip")
            figure.add_trace(
                go.Scatter(x=grid * scale, y=np.asarray(low) * ku.factor, showlegend=False,
                           **band_edge)
            )  # fmt: skip
            figure.add_trace(
                go.Scatter(
                    x=grid * scale,
                    y=np.asarray(high) * ku.factor,
                    fill="tonexty",
                    fillcolor="rgba(29,39,49,0.11)",
                    name=f"{100 * trend.confidence:g} % confidence band of the line",
                    **band_edge,
                )
            )
        name = _trend_name(against, trend, du)
        if weak:
            name += f"<br>weak fit (r² below {WEAK_FIT_R_SQUARED:g}): drawn faint, no band"
        figure.add_trace(
            go.Scatter(
                x=grid * scale,
                y=np.asarray(trend.conductivity(grid)) * ku.factor,
                mode="lines",
                line=dict(color=INK, width=1.0 if weak else 1.8),
                opacity=0.3 if weak else 1.0,
                name=name,
                legendgroup="fit",
                hoverinfo="name",
            )
        )
    if analysis.kozeny_carman_reference is not None and against == "void_ratio":
        grid = np.linspace(x.min(), x.max(), 60)
        figure.add_trace(
            go.Scatter(
                x=grid,
                y=analysis.kozeny_carman_conductivity(grid) * ku.factor,
                mode="lines",
                line=dict(color=MUTED, width=1.5, dash="dot"),
                legendgroup="predictions",
                legendgrouptitle_text="predictions (not measurements)",
                name="Kozeny–Carman e³/(1+e) through the geometric mean",
                hoverinfo="name",
            )
        )
    if analysis.grading is not None and against in ("void_ratio", "dry_density"):
        _add_predictions(figure, analysis, frame, column, scale, ku)
    drawn = [np.asarray(trace.y, dtype=float) for trace in figure.data]
    k_axis, note = k_axis_layout(plotted, ku, np.concatenate(drawn) if drawn else ())
    shortest = ERROR_BAR_FRACTION * (k_axis["range"][1] - k_axis["range"][0])
    for trace in specimen_traces(plotted, x * scale, frame["k"] * ku.factor, ku, True, shortest):
        figure.add_trace(trace)
    if not note and analysis.criterion is not None:
        figure.add_trace(criterion_trace(analysis, x_range, ku))
    add_note(figure, note)
    figure.update_xaxes(title_text=title, range=list(x_range))
    figure.update_yaxes(title_text=k_axis_title(ku, analysis.reference_temperature), **k_axis)
    subject = {
        "void_ratio": "void ratio",
        "dry_density": du.quantity,
        "water_content_from_optimum": "water content relative to optimum",
    }[against]
    figure.update_layout(title_text=f"Hydraulic conductivity against {subject}")
    return figure


def _add_predictions(figure, analysis, frame, column, scale, ku):
    grading = analysis.grading.merge(
        frame[["specimen", column]].rename(columns={column: "_x"}), on="specimen", how="inner"
    )
    for method, symbol in (("hazen", "x-thin"), ("chapuis", "cross-thin")):
        label = {"hazen": "Hazen (1892)", "chapuis": "Chapuis (2004)"}[method]
        for inside in (True, False):
            rows = grading[
                grading[f"{method}_k"].notna() & (grading[f"{method}_within_range"] == inside)
            ]
            if rows.empty:
                continue
            name = f"{label} prediction" + ("" if inside else ", outside its validity range")
            figure.add_trace(
                go.Scatter(
                    x=rows["_x"] * scale,
                    y=rows[f"{method}_k"] * ku.factor,
                    mode="markers",
                    name=name,
                    legendgroup="predictions",
                    legendgrouptitle_text="predictions (not measurements)",
                    marker=dict(
                        symbol=symbol,
                        size=11,
                        color=MUTED if inside else "#b0b7bd",
                        line=dict(width=2, color=MUTED if inside else "#b0b7bd"),
                    ),
                    text=[html_escaped(v) for v in rows["specimen"]],
                    hovertemplate="%{text}: %{y:.3g} " + ku.unit + f"<extra>{name}</extra>",
                )
            )
