"""The charts of one specimen: a falling-head record, and a constant-head test.

Head against time on a log head axis with the fitted line and the reading window (also
as a plain-dict spec, :func:`falling_head_spec`, that a live figure is brought to), and
Darcy velocity against gradient with the fit through the origin.
"""

from __future__ import annotations

import html

import numpy as np
import pandas as pd
import plotly.graph_objects as go

from kitchen.analysis import DOES_NOT_MEET
from kitchen.display_units import distinct_texts, k_unit
from kitchen.settings import reference_label

from .style import (
    INK,
    MAX_TRACE_POINTS,
    MUTED,
    VERDICT_COLOURS,
    ZONE,
    WindowDecimation,
    cached_memo_template,
    memo_template,
)

__all__ = ["falling_head_figure", "falling_head_spec", "constant_head_figure"]


def _time_unit(span_seconds: float) -> tuple[str, float]:
    if span_seconds >= 3 * 3600:
        return "h", 3600.0
    if span_seconds >= 180:
        return "min", 60.0
    return "s", 1.0


def _fitted_head(result) -> np.ndarray:
    """Fitted head over the window, from a FallingHeadAnalysis. [m]"""
    return np.asarray(result.fitted_head, dtype=float)


DATUM_REACH = 0.5
"""A fitted datum h∞ is drawn on the head axis when it lies no lower than this fraction of the
lowest reading; further down it is named in the legend only, and the axis stays on the
readings (the tool's own choice)."""


def _positive_extremes(values) -> tuple[float, float] | None:
    """The least and the greatest finite positive value, or None (no copy when every value
    is one: a record of 10^6 heads is scanned, not copied)."""
    values = np.asarray(values, float).ravel()
    usable = np.isfinite(values) & (values > 0)
    if not usable.all():
        values = values[usable]
    if not values.size:
        return None
    return float(values.min()), float(values.max())


def head_axis(head, fitted, datum: float | None = None) -> dict:
    """The log head axis over the readings and the fitted line, and over the fitted datum
    h∞ where it lies near them (:data:`DATUM_REACH`); never stretched by a label.

    Parameters
    ----------
    head, fitted : array_like
        The readings' heads and the fitted heads. [m]
    datum : float, optional
        The fitted datum h∞ of a datum fit. [m]

    Returns
    -------
    dict
        The axis's properties: a log axis, its range in log10 of metres, its title.
    """
    extremes = [_positive_extremes(values) for values in (head, fitted)]
    extremes = [pair for pair in extremes if pair is not None]
    low, high = (
        (min(pair[0] for pair in extremes), max(pair[1] for pair in extremes))
        if extremes
        else (0.1, 1.0)
    )
    if datum is not None and datum > 0 and datum >= DATUM_REACH * low:
        low = min(low, datum)
    span = np.log10(high) - np.log10(low)
    pad = max(0.02, 0.06 * span)
    return dict(
        title=dict(text="head difference h [m]"),
        type="log",
        exponentformat="power",
        range=[float(np.log10(low) - pad), float(np.log10(high) + pad)],
    )


def falling_head_figure(
    readings: pd.DataFrame | None,
    result,
    k_unit_name: str = "m/s",
    reference_temperature: float = 20.0,
    max_points: int = MAX_TRACE_POINTS,
    decimation: WindowDecimation | None = None,
    line_points: int | None = None,
) -> go.Figure:
    """Head against time on a log head axis, with the fitted line and the reading window.

    Parameters
    ----------
    readings : pandas.DataFrame or None
        The specimen's rows of the ``falling_head`` table, ``time`` [s] and ``head`` [m];
        None to take every reading from `result` (a FallingHeadAnalysis carries them).
    result : kitchen.reduction.FallingHeadAnalysis
        The reduction: ``start``, ``stop`` (the window, positions in the readings), the
        fitted head over the window (``fitted_head``), ``k_reference`` with
        ``k_reference_low`` and ``k_reference_high``.
    k_unit_name : {"m/s", "cm/s"}
    reference_temperature : float
        For the label of k. [degC]
    max_points : int
        Longest trace; longer records are decimated: the readings in the window and those
        outside it on buckets fixed along the record (:class:`WindowDecimation`), together
        about `max_points` points.
    decimation : WindowDecimation, optional
        The decimation of these readings' heads with `max_points`, built once and kept by a
        caller that draws many windows of one record (a panel's slider), so that each
        window costs time in proportion to `max_points`, not to the record; built here by
        default.
    line_points : int, optional
        Most points of the fitted line, taken at evenly spaced readings of the window
        (both ends included); `max_points` by default. The fitted curves are smooth and
        monotone (an exponential decay, to zero or to a datum), so a few hundred points
        draw them as well as every reading does.

    Returns
    -------
    plotly.graph_objects.Figure

    References
    ----------
    ASTM D5084, Methods B and C: ln h falls linearly with time (from memory).
    """
    return go.Figure(
        falling_head_spec(
            readings,
            result,
            k_unit_name,
            reference_temperature,
            max_points,
            decimation=decimation,
            line_points=line_points,
        )
    )


def falling_head_spec(
    readings: pd.DataFrame | None,
    result,
    k_unit_name: str = "m/s",
    reference_temperature: float = 20.0,
    max_points: int = MAX_TRACE_POINTS,
    decimation: WindowDecimation | None = None,
    line_points: int | None = None,
) -> dict:
    """The figure of :func:`falling_head_figure` as a spec: plain dicts, not validated.

    Returns
    -------
    dict
        ``{"data": [trace dicts], "layout": {...}}``; ``plotly.graph_objects.Figure(spec)``
        is the figure, and :func:`kitchen.panels.refresh.refresh_figure` brings a live
        figure to it sending only what changed.
    """
    ku = k_unit(k_unit_name)
    source = result if readings is None else readings
    time = np.asarray(source.time if readings is None else readings["time"], dtype=float)
    head = np.asarray(source.head if readings is None else readings["head"], dtype=float)
    unit, divisor = _time_unit(float(time[-1] - time[0]) if time.size else 0.0)
    start, stop = int(result.start), int(result.stop)
    if decimation is None:
        decimation = WindowDecimation(head, max_points)
    elif decimation.n != head.size or decimation.max_points != max_points:
        raise ValueError(
            f"decimation of {decimation.n} readings at {decimation.max_points} points given "
            f"for {head.size} readings at {max_points} points: build it from these readings"
        )
    # the traces, shapes and annotations are gathered as plain dicts and validated once
    shapes = [
        dict(
            type="rect",
            x0=time[start] / divisor,
            x1=time[stop - 1] / divisor,
            xref="x",
            y0=0,
            y1=1,
            yref="y domain",
            fillcolor="rgba(46,107,87,0.09)",
            line=dict(width=0),
            layer="below",
        )
    ]
    annotations = [
        dict(
            text="reading window",
            font=dict(size=11, color=ZONE),
            showarrow=False,
            x=min(shapes[0]["x0"], shapes[0]["x1"]),
            xanchor="left",
            xref="x",
            y=1,
            yanchor="top",
            yref="y domain",
        )
    ]
    markers = (
        (
            decimation.outside(start, stop),
            "readings outside the window",
            dict(symbol="circle-open", size=6, color=MUTED, line=dict(width=1.2)),
        ),
        (
            decimation.indices(start, stop),
            "readings in the window",
            dict(symbol="circle", size=5, color=INK),
        ),
    )
    data = []
    drawn = []
    for keep, name, marker in markers:
        if keep.size:
            drawn.append(head[keep])
            data.append(
                dict(
                    type="scatter",
                    x=time[keep] / divisor,
                    y=head[keep],
                    mode="markers",
                    name=name,
                    marker=marker,
                    hovertemplate=f"<b>{html.escape(str(result.specimen))}</b><br>"
                    + "t = %{x:.4g} "
                    + unit
                    + "<br>h = %{y:.4g} m<extra></extra>",
                )
            )
    at = getattr(result, "fitted_head_at", None)  # an analysis forms only the points drawn
    fitted = None if at is not None else _fitted_head(result)
    size = stop - start if fitted is None else fitted.size
    if size == stop - start:
        count = min(size, max_points if line_points is None else max(2, line_points))
        keep = np.unique(np.linspace(0, size - 1, count).round().astype(np.int64))
        t, fitted = time[start + keep], (at(keep) if fitted is None else fitted[keep])
    else:
        t = time[[start, stop - 1]]
    datum = getattr(result, "fit_kind", "log_linear") == "datum"
    data.append(
        dict(
            type="scatter",
            x=t / divisor,
            y=fitted,
            mode="lines",
            name="decay to a fitted datum h∞" if datum else "least-squares line of ln h",
            line=dict(color=VERDICT_COLOURS[DOES_NOT_MEET], width=2),
            hoverinfo="name",
        )
    )
    asymptote = float(getattr(result, "asymptote", 0.0) or 0.0)
    # over the points drawn: min/max decimation keeps the record's lowest and highest head
    y_axis = head_axis(
        np.concatenate(drawn) if drawn else head[:0], fitted, asymptote if datum else None
    )
    if datum:
        reach = [time[0] / divisor, time[-1] / divisor]
        shown = asymptote > 0 and np.log10(asymptote) >= y_axis["range"][0]
        where = "" if shown else " (below the axis)"
        data.append(
            dict(
                type="scatter",
                x=reach,
                y=[asymptote, asymptote],
                mode="lines",
                name=f"fitted datum h∞ = {asymptote:.3f} m{where}",
                line=dict(color=MUTED, dash="dot", width=1.2),
                hoverinfo="name",
                visible=True if shown else "legendonly",
            )
        )
    k_text, low, high = distinct_texts(
        ku, result.k_reference, result.k_reference_low, result.k_reference_high
    )
    label = reference_label(reference_temperature)
    layout = dict(
        template=cached_memo_template(),
        shapes=shapes,
        annotations=annotations,
        xaxis=dict(title=dict(text=f"elapsed time t [{unit}]")),
        yaxis=y_axis,
        title=dict(
            text=f"Specimen {html.escape(str(result.specimen))}: falling head<br><sup>"
            f"{label} = {k_text} {ku.unit} (95 %: {low} – {high}), readings {start + 1}–{stop} "
            f"of {time.size}</sup>"
        ),
        legend=dict(x=0.99, xanchor="right", y=0.99, yanchor="top"),
    )
    return dict(data=data, layout=layout)


def constant_head_figure(
    result, k_unit_name: str = "m/s", reference_temperature: float = 20.0
) -> go.Figure:
    """Darcy velocity against gradient, with the fit through the origin (slope k).

    Parameters
    ----------
    result : kitchen.reduction.ConstantHeadAnalysis or ConstantHeadResult
        The reduction: its ``collections`` (``gradient``, ``darcy_velocity`` [m/s],
        ``viscosity_ratio``), the fit of the corrected velocity on the gradient through
        the origin, and ``k_reference`` with ``k_reference_low`` and ``k_reference_high``
        (the interval drawn as a band).
    k_unit_name : {"m/s", "cm/s"}
        Unit of k, and so of the velocity.
    reference_temperature : float
        For the labels. [degC]

    Returns
    -------
    plotly.graph_objects.Figure

    References
    ----------
    Darcy's law v = k·i; ASTM D2434 (establish the laminar range, from memory).
    """
    ku = k_unit(k_unit_name)
    plain = getattr(result, "result", result)
    rows = plain.collections
    i = rows["gradient"].to_numpy(float)
    v = rows["darcy_velocity"].to_numpy(float) * rows["viscosity_ratio"].to_numpy(float)
    reach = np.array([0.0, 1.1 * float(i.max())])
    figure = go.Figure(layout=dict(template=memo_template()))
    k, low, high = result.k_reference, result.k_reference_low, result.k_reference_high
    if high > low:
        figure.add_trace(
            go.Scatter(
                x=reach,
                y=low * reach * ku.factor,
                mode="lines",
                line=dict(width=0),
                showlegend=False,
                hoverinfo="skip",
            )
        )
        figure.add_trace(
            go.Scatter(
                x=reach,
                y=high * reach * ku.factor,
                mode="lines",
                line=dict(width=0),
                fill="tonexty",
                fillcolor="rgba(29,39,49,0.11)",
                hoverinfo="skip",
                name="95 % interval of k",
            )
        )
    figure.add_trace(
        go.Scatter(
            x=reach,
            y=k * reach * ku.factor,
            mode="lines",
            name="v = k·i through the origin",
            line=dict(color=VERDICT_COLOURS[DOES_NOT_MEET], width=2),
        )
    )
    figure.add_trace(
        go.Scatter(
            x=i,
            y=v * ku.factor,
            mode="markers",
            name="timed collections",
            marker=dict(symbol="square", size=10, color=INK),
            hovertemplate=f"<b>{html.escape(str(result.specimen))}</b><br>"
            + "i = %{x:.3g}<br>v = %{y:.3g} "
            + ku.unit
            + "<extra></extra>",
        )
    )
    label = reference_label(reference_temperature)
    figure.update_xaxes(title_text="hydraulic gradient i [–]", rangemode="tozero")
    figure.update_yaxes(
        title_text=f"Darcy velocity at {reference_temperature:g} °C, v·R<sub>T</sub> [{ku.unit}]",
        rangemode="tozero",
        exponentformat="power",
    )
    k_text, low_text, high_text = distinct_texts(ku, k, low, high)
    figure.update_layout(
        title_text=f"Specimen {html.escape(str(result.specimen))}: constant head<br><sup>"
        f"{label} = {k_text} {ku.unit} (95 %: {low_text} – {high_text}), {result.n} "
        "collection(s)</sup>",
        legend=dict(x=0.01, xanchor="left", y=0.99, yanchor="top"),
    )
    return figure
