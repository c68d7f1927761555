"""Figures only the panels draw, on top of the memo figures of :mod:`kitchen.charts`.

:func:`increments_figure` shows the k between successive readings of a falling-head
record with the window's k and the steady-values band, so that the engineer choosing a
reading window sees which values the criterion judges.
"""

from __future__ import annotations

import html
import math

import numpy as np
import plotly.graph_objects as go

from kitchen import charts
from kitchen.display_units import k_unit
from kitchen.reduction import FallingHeadAnalysis
from kitchen.settings import Settings, reference_label

__all__ = ["format_elapsed", "increments_figure", "off_scale_traces"]


def format_elapsed(seconds: float) -> str:
    """Elapsed time for people: seconds, minutes or hours with three figures."""
    if not math.isfinite(seconds):
        return "–"
    if seconds < 120:
        return f"{seconds:.0f} s"
    if seconds < 3 * 3600:
        return f"{seconds / 60:.1f} min"
    return f"{seconds / 3600:.2f} h"


def _time_scale(analysis: FallingHeadAnalysis) -> tuple[str, float]:
    span = float(analysis.time[-1] - analysis.time[0])
    if span >= 3 * 3600:
        return "h", 3600.0
    if span >= 180:
        return "min", 60.0
    return "s", 1.0


def off_scale_traces(x, y, bottom: float, top: float) -> list[go.Scatter]:
    """Markers at the edge of the axis for the values beyond it, counted in their names.

    A value above `top` is drawn as an upward triangle on the top edge, one below `bottom`
    as a downward one on the bottom edge, its own value in the hover; the legend says how
    many are off the scale, so none is dropped silently (the tool's own convention).
    """
    x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
    traces = []
    for beyond, edge, symbol, side in (
        (y > top, top, "triangle-up", "above"),
        (y < bottom, bottom, "triangle-down", "below"),
    ):
        count = int(np.count_nonzero(beyond & np.isfinite(y)))
        if not count:
            continue
        keep = charts.decimation_indices(y[beyond])
        traces.append(
            go.Scatter(
                x=x[beyond][keep],
                y=np.full(keep.size, edge),
                customdata=y[beyond][keep],
                mode="markers",
                name=f"{count} value{'s' if count > 1 else ''} {side} the axis, "
                f"drawn on its {'top' if side == 'above' else 'bottom'} edge",
                marker=dict(symbol=symbol, size=8, color=charts.MUTED),
                cliponaxis=False,
                hovertemplate="t = %{x:.4g}<br>k = %{customdata:.3g} (off the scale)"
                "<extra></extra>",
            )
        )
    return traces


def increments_figure(
    analysis: FallingHeadAnalysis,
    settings: Settings,
    k_unit_name: str = "m/s",
    max_points: int | None = None,
) -> go.Figure:
    """k between successive readings against time, with the window, k and the steady band.

    Parameters
    ----------
    analysis : FallingHeadAnalysis
        One window of one specimen (:meth:`kitchen.reduction.FallingHeadRecord.analyse`).
    settings : Settings
        For the reference temperature and the steady-values band (``settings.criteria``).
    k_unit_name : {"m/s", "cm/s"}
    max_points : int, optional
        Longest trace (min/max decimation, :func:`kitchen.charts.decimation_indices`);
        default :data:`kitchen.charts.MAX_TRACE_POINTS`.

    Returns
    -------
    plotly.graph_objects.Figure
        Every incremental k (grey outside the window), the values the steady-values
        criterion judges (filled), the window's k and the band of ±25 % (±50 % below
        1×10⁻¹⁰ m/s, ASTM D5084 from memory; the limits of ``settings.criteria``) about it.
        The axis spans the values judged; incremental values beyond it are drawn on its
        edge and counted in the legend (:func:`off_scale_traces`).
    """
    unit = k_unit(k_unit_name)
    scale_name, divisor = _time_scale(analysis)
    label = reference_label(settings)
    window_start = analysis.time[analysis.start] / divisor
    window_end = analysis.time[analysis.stop - 1] / divisor
    figure = go.Figure(layout=dict(template=charts.memo_template(), height=360))
    figure.add_vrect(
        x0=window_start, x1=window_end, fillcolor="rgba(46,107,87,0.09)", line_width=0,
        layer="below",
    )  # fmt: skip
    k = analysis.k_reference
    band = settings.criteria.band(k)
    figure.add_hrect(
        y0=k * (1 - band) * unit.factor, y1=k * (1 + band) * unit.factor,
        fillcolor="rgba(29,39,49,0.07)", line_width=0, layer="below",
    )  # fmt: skip
    time = np.asarray(analysis.increment_time, dtype=float)
    values = np.asarray(analysis.increment_k, dtype=float)
    finite = np.isfinite(values)
    longest = charts.MAX_TRACE_POINTS if max_points is None else max_points
    keep = charts.decimation_indices(np.where(finite, values, np.nan), longest)
    figure.add_trace(
        go.Scatter(
            x=time[keep] / divisor,
            y=values[keep] * unit.factor,
            mode="markers",
            name="k between successive readings",
            marker=dict(symbol="circle-open", size=6, color=charts.MUTED),
            hovertemplate=f"<b>{html.escape(str(analysis.specimen))}</b><br>t = "
            + "%{x:.4g} "
            + scale_name
            + "<br>k = %{y:.3g}<extra></extra>",
        )
    )
    judged_time = np.asarray(analysis.value_time, dtype=float)
    judged = np.asarray(analysis.value_k, dtype=float)
    keep = charts.decimation_indices(judged, longest)
    step = analysis.value_step
    figure.add_trace(
        go.Scatter(
            x=judged_time[keep] / divisor,
            y=judged[keep] * unit.factor,
            mode="markers",
            name="values judged for steadiness"
            + ("" if step == 1 else f" (over {step} reading intervals)"),
            marker=dict(symbol="circle", size=7, color=charts.INK),
        )
    )
    reach = [analysis.time[0] / divisor, analysis.time[-1] / divisor]
    figure.add_trace(
        go.Scatter(
            x=reach,
            y=[k * unit.factor] * 2,
            mode="lines",
            name=f"{label} of the window, ±{100 * band:g} % shaded",
            line=dict(color=charts.VERDICT_COLOURS["does not meet"], width=1.6),
        )
    )
    inside = judged[np.isfinite(judged)]
    if inside.size:
        low, high = float(inside.min()), float(inside.max())
        low, high = min(low, k * (1 - band)), max(high, k * (1 + band))
        pad = 0.15 * (high - low)
        bottom, top = (low - pad) * unit.factor, (high + pad) * unit.factor
        figure.update_yaxes(range=[bottom, top])
        for trace in off_scale_traces(time / divisor, values * unit.factor, bottom, top):
            figure.add_trace(trace)
    figure.update_xaxes(title_text=f"elapsed time t [{scale_name}]")
    figure.update_yaxes(
        title_text=f"incremental k at {settings.reference_temperature:g} °C [{unit.unit}]",
        exponentformat="power",
    )
    figure.update_layout(
        title_text=f"Specimen {analysis.specimen}: k between readings",
        legend=dict(orientation="h", x=0.0, xanchor="left", y=-0.22, yanchor="top"),
        margin=dict(t=50, b=110),
        height=420,
    )
    return figure
