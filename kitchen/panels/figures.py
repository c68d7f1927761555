"""Figures only the panels draw, on top of the memo figures of :mod:`kitchen.charts`.

:func:`increments_figure` shows the k between successive readings of a falling-head
record with the window's k and the steady-values band, so that the engineer choosing a
reading window sees which values the criterion judges; :func:`increments_spec` is the same
figure as plain dicts, which a live figure is brought to on each move of the window.
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

__all__ = [
    "EDGE_MARKER",
    "format_elapsed",
    "increments_figure",
    "increments_spec",
    "off_scale_traces",
]


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


EDGE_MARKER = 8
"""Size of the triangles drawn on an axis's edge for the values beyond it. [px]"""


def _one_a_column(x: np.ndarray, y: np.ndarray, reach, columns: int, top: bool) -> np.ndarray:
    """Positions of the most extreme value (the largest when `top`) in each of `columns`
    equal columns of `reach` (the span of x drawn), in order of x."""
    low, high = reach
    scale = columns / (high - low) if high > low else 0.0
    column = np.minimum(((x - low) * scale).astype(np.int64), columns - 1)
    order = np.lexsort((-y if top else y, column))  # by column, the extreme first
    column = column[order]
    return np.sort(order[np.r_[True, column[1:] != column[:-1]]])


def off_scale_traces(x, y, bottom: float, top: float, keep=None, columns=None) -> list[dict]:
    """Markers at the edge of the axis for the values beyond it, counted in their names.

    A value above `top` is drawn as an upward triangle on the top edge, one below `bottom`
    as a downward one on the bottom edge, its own value in the hover; the legend says how
    many are off the scale, so none is dropped silently (the tool's own convention).

    Parameters
    ----------
    x, y : array_like
        Positions and values, every one of them.
    bottom, top : float
        The axis's range.
    keep : array_like of int, optional
        Positions of the values drawn when the record is decimated (min/max decimation,
        :class:`kitchen.charts.WindowDecimation`): the markers are those of them beyond the
        axis. A bucket holding any value beyond an edge keeps its most extreme one, so
        every bucket with a value off the scale has its marker there. Every value by
        default.
    columns : int, optional
        Where more markers than this would lie on one edge, the span of the x drawn is cut into
        `columns` equal columns and each column with a value beyond the edge gets one
        marker, its most extreme value: with columns half as wide as a marker
        (:data:`EDGE_MARKER`), the edge looks as it would with every marker. The names
        still count every value.

    Returns
    -------
    list of dict
        Plotly scatter traces as plain dicts: the values above the axis, then those below,
        each only where there is one.
    """
    x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
    finite = np.isfinite(y)
    drawn = np.arange(y.size) if keep is None else np.asarray(keep, dtype=np.int64)
    drawn_x, drawn_y = x[drawn], y[drawn]
    drawn_finite = np.isfinite(drawn_y) & np.isfinite(drawn_x)
    traces = []
    for beyond, shown, edge, symbol, side in (
        (y > top, drawn_y > top, top, "triangle-up", "above"),
        (y < bottom, drawn_y < bottom, bottom, "triangle-down", "below"),
    ):
        count = int(np.count_nonzero(beyond & finite))
        if not count:
            continue
        chosen = np.flatnonzero(shown & drawn_finite)
        if columns is not None and chosen.size > columns:
            reach = (float(drawn_x[drawn_finite].min()), float(drawn_x[drawn_finite].max()))
            chosen = chosen[
                _one_a_column(drawn_x[chosen], drawn_y[chosen], reach, columns, side == "above")
            ]
        traces.append(
            dict(
                type="scatter",
                x=drawn_x[chosen],
                y=np.full(chosen.size, edge),
                customdata=drawn_y[chosen],
                mode="markers",
                name=f"{count} value{'s' if count > 1 else ''} {side} the axis, "
                f"drawn on its {'top' if side == 'above' else 'bottom'} edge",
                marker=dict(symbol=symbol, size=EDGE_MARKER, color=charts.MUTED),
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
    return go.Figure(increments_spec(analysis, settings, k_unit_name, max_points))


def increments_spec(
    analysis: FallingHeadAnalysis,
    settings: Settings,
    k_unit_name: str = "m/s",
    max_points: int | None = None,
    decimation: charts.WindowDecimation | None = None,
    increments: tuple[np.ndarray, np.ndarray] | None = None,
) -> dict:
    """The figure of :func:`increments_figure` as a spec: plain dicts, not validated.

    Parameters
    ----------
    analysis, settings, k_unit_name, max_points
        As for :func:`increments_figure`.
    decimation : kitchen.charts.WindowDecimation, optional
        The decimation of the incremental k with `max_points`, kept by a caller that draws
        many windows of one record (the k between readings of a fit of ln h does not depend
        on the window); built here by default. The values drawn on the edges of the axis
        are the decimated ones beyond it, one a half marker's width of the plot
        (:func:`off_scale_traces`).
    increments : tuple of numpy.ndarray, optional
        ``(analysis.increment_time, analysis.increment_k)`` as the caller read them (the
        analysis forms them anew on each reading); read here by default.

    Returns
    -------
    dict
        ``{"data": [trace dicts], "layout": {...}}``, for
        :func:`kitchen.panels.refresh.refresh_figure`.
    """
    unit = k_unit(k_unit_name)
    scale_name, divisor = _time_scale(analysis)
    label = reference_label(settings)
    window_start = analysis.time[analysis.start] / divisor
    window_end = analysis.time[analysis.stop - 1] / divisor
    k = analysis.k_reference
    band = settings.criteria.band(k)
    shapes = [
        dict(
            type="rect", x0=window_start, x1=window_end, xref="x", y0=0, y1=1,
            yref="y domain", fillcolor="rgba(46,107,87,0.09)", line=dict(width=0),
            layer="below",
        ),
        dict(
            type="rect", x0=0, x1=1, xref="x domain", y0=k * (1 - band) * unit.factor,
            y1=k * (1 + band) * unit.factor, yref="y", fillcolor="rgba(29,39,49,0.07)",
            line=dict(width=0), layer="below",
        ),
    ]  # fmt: skip
    if increments is None:
        increments = (analysis.increment_time, analysis.increment_k)
    time, values = (np.asarray(array, dtype=float) for array in increments)
    longest = charts.MAX_TRACE_POINTS if max_points is None else max_points
    if decimation is None:
        decimation = charts.WindowDecimation(values, longest)
    elif decimation.n != values.size or decimation.max_points != longest:
        raise ValueError(
            f"decimation of {decimation.n} values at {decimation.max_points} points given "
            f"for {values.size} incremental k at {longest} points: build it from these values"
        )
    keep = decimation.indices()
    data = [
        dict(
            type="scatter",
            x=time[keep] / divisor,
            y=values[keep] * unit.factor,
            mode="markers",
            name="k between successive readings",
            # plotly.js draws, of a trace with maxdisplayed, only the points inside the axes
            # (every one while they number no more than this): the values beyond the axis
            # are drawn on its edges below, and not twice
            marker=dict(
                symbol="circle-open", size=6, color=charts.MUTED, maxdisplayed=max(keep.size, 1)
            ),
            hovertemplate=f"<b>{html.escape(str(analysis.specimen))}</b><br>t = "
            + "%{x:.4g} "
            + scale_name
            + "<br>k = %{y:.3g}<extra></extra>",
        )
    ]
    judged_time = np.asarray(analysis.value_time, dtype=float)
    judged = np.asarray(analysis.value_k, dtype=float)
    keep = charts.decimation_indices(judged, longest)
    step = analysis.value_step
    data.append(
        dict(
            type="scatter",
            x=judged_time[keep] / divisor,
            y=judged[keep] * unit.factor,
            mode="markers",
            name="values judged for steadiness"
            + ("" if step == 1 else f" (over {step} reading intervals)"),
            marker=dict(symbol="circle", size=7, color=charts.INK),
        )
    )
    reach = [analysis.time[0] / divisor, analysis.time[-1] / divisor]
    data.append(
        dict(
            type="scatter",
            x=reach,
            y=[k * unit.factor] * 2,
            mode="lines",
            name=f"{label} of the window, ±{100 * band:g} % shaded",
            line=dict(color=charts.VERDICT_COLOURS["does not meet"], width=1.6),
        )
    )
    y_axis = dict(
        title=dict(text=f"incremental k at {settings.reference_temperature:g} °C [{unit.unit}]"),
        exponentformat="power",
    )
    inside = judged[np.isfinite(judged)]
    if inside.size:
        low, high = float(inside.min()), float(inside.max())
        low, high = min(low, k * (1 - band)), max(high, k * (1 + band))
        pad = 0.15 * (high - low)
        bottom, top = (low - pad) * unit.factor, (high + pad) * unit.factor
        y_axis["range"] = [bottom, top]
        every = decimation.indices()
        columns = 2 * charts.PLOT_WIDTH // EDGE_MARKER  # one marker a half marker's width
        data.extend(
            off_scale_traces(time / divisor, values * unit.factor, bottom, top, every, columns)
        )
    layout = dict(
        template=charts.cached_memo_template(),
        shapes=shapes,
        xaxis=dict(title=dict(text=f"elapsed time t [{scale_name}]")),
        yaxis=y_axis,
        title=dict(text=f"Specimen {analysis.specimen}: k between readings"),
        legend=dict(orientation="h", x=0.0, xanchor="left", y=-0.22, yanchor="top"),
        margin=dict(t=50, b=110),
        height=420,
    )
    return dict(data=data, layout=layout)
