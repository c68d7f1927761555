"""Figures for the series memo: plain plotly figures, drawn the same way in notebook and print.

Every builder returns a new :class:`plotly.graph_objects.Figure` and leaves its inputs
alone. Axis titles carry their units; the conductivity unit (m/s, cm/s) and the density
unit (Mg/m³, kN/m³, lb/ft³) are options. The look is the memo style of this package: a
serif face, a dark ink, and three verdict colours that are never the only cue — compactive
effort is told by marker shape and line dash, the verdict by marker fill (filled: meets,
open: does not meet, open with a dot: not conclusive), so a chart still reads in
greyscale print.
"""

from __future__ import annotations

import copy
import html
import textwrap
from dataclasses import replace
from functools import lru_cache

import numpy as np
import pandas as pd
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from .display_units import DisplayUnit, density_unit, distinct_texts, k_unit, scientific
from .results import reference_label
from .series_analysis import SATURATION_LINES, VERDICTS, SeriesAnalysis
from .trends import DOES_NOT_MEET, MEETS, NOT_CONCLUSIVE

__all__ = [
    "MAX_TRACE_POINTS",
    "memo_template",
    "decimation_indices",
    "add_caption",
    "compaction_conductivity_figure",
    "compaction_conductivity_spec",
    "conductivity_trend_figure",
    "falling_head_figure",
    "falling_head_spec",
    "constant_head_figure",
]

MAX_TRACE_POINTS = 10_000
"""No trace carries more points than this; longer records are decimated."""

FONT = "'DejaVu Serif', 'Liberation Serif', Georgia, serif"
INK = "#1d2731"
MUTED = "#69737d"
GRID = "#e4e7ea"
ZONE = "#2e6b57"
VERDICT_COLOURS = {MEETS: "#2e6b57", DOES_NOT_MEET: "#a33b20", NOT_CONCLUSIVE: "#a87a12"}
VERDICT_FILL = {MEETS: "", DOES_NOT_MEET: "-open", NOT_CONCLUSIVE: "-open-dot"}
EFFORT_SYMBOLS = ("circle", "square", "diamond", "triangle-up", "triangle-down", "pentagon")
EFFORT_DASHES = ("solid", "dash", "dot", "dashdot", "longdash", "longdashdot")
SATURATION_DASHES = {1.0: "solid", 0.9: "dash", 0.8: "dot"}
NO_EFFORT = "no effort given"
WIDTH, HEIGHT = 980, 620


def memo_template() -> go.layout.Template:
    """The memo style as a plotly template (not registered globally)."""
    axis = dict(
        showline=True,
        linecolor=INK,
        linewidth=1,
        mirror=True,
        ticks="outside",
        tickcolor=INK,
        gridcolor=GRID,
        zeroline=False,
        title_standoff=8,
        automargin=True,
    )
    return go.layout.Template(
        layout=dict(
            font=dict(family=FONT, size=13, color=INK),
            paper_bgcolor="white",
            plot_bgcolor="white",
            xaxis=axis,
            yaxis=axis,
            legend=dict(
                bgcolor="rgba(255,255,255,0.9)",
                bordercolor=GRID,
                borderwidth=1,
                font=dict(size=11),
                groupclick="toggleitem",
                traceorder="grouped",
                tracegroupgap=6,
            ),
            title=dict(x=0.0, xanchor="left", xref="paper", font=dict(size=16)),
            hoverlabel=dict(font=dict(family=FONT)),
            margin=dict(l=80, r=20, t=80, b=70),
            width=WIDTH,
            height=HEIGHT,
        )
    )


@lru_cache(maxsize=1)
def _template() -> go.layout.Template:
    """The memo template built once; figures copy it when it is set on their layout."""
    return memo_template()


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


def decimation_indices(values, max_points: int = MAX_TRACE_POINTS) -> np.ndarray:
    """Indices of the points to draw so a trace keeps at most `max_points` points.

    Parameters
    ----------
    values : array_like
        The values the shape of the trace depends on (the y of a time record).
    max_points : int, default MAX_TRACE_POINTS
        Largest number of indices returned, at least 4.

    Returns
    -------
    numpy.ndarray of int
        Sorted indices: all of them when there are at most `max_points` values; otherwise
        the first and last, and the smallest and the largest value of each of
        ``(max_points - 2) // 2`` equal buckets, so every peak and trough survives.

    Notes
    -----
    Min–max decimation per bucket is common practice for plotting long records (no
    source). NaN values are never chosen unless a whole bucket is NaN.
    """
    if not isinstance(max_points, int | np.integer) or max_points < 4:
        raise ValueError(f"max_points: expected an integer of at least 4, got {max_points!r}")
    y = np.asarray(values, dtype=float).ravel()
    n = y.size
    if n <= max_points:
        return np.arange(n)
    buckets = (max_points - 2) // 2
    size = -(-n // buckets)
    buckets = -(-n // size)
    # one padded copy, NaN and padding set to +inf for the minima, then to -inf for the maxima
    nan = np.flatnonzero(np.isnan(y))
    padded = np.empty(buckets * size)
    padded[:n] = y
    padded[nan] = padded[n:] = np.inf
    start = np.arange(buckets) * size
    lows = start + np.argmin(padded.reshape(buckets, size), axis=1)
    padded[nan] = padded[n:] = -np.inf
    highs = start + np.argmax(padded.reshape(buckets, size), axis=1)
    # the buckets are in order, so the sorted union needs no sort: the smaller of each
    # bucket's two indices, then the larger, with repeats dropped
    pairs = np.empty(2 * buckets + 2, dtype=lows.dtype)
    pairs[0], pairs[-1] = 0, n - 1
    np.minimum(lows, highs, out=pairs[1:-1:2])
    np.maximum(lows, highs, out=pairs[2:-1:2])
    chosen = pairs[np.concatenate(([True], pairs[1:] != pairs[:-1]))]
    return chosen[chosen < n]


def add_caption(figure: go.Figure, lines, width: int = 160) -> go.Figure:
    """A copy of `figure` with `lines` of small text (cautions, provenance) in its margin.

    The text goes below the plot, or between the title and the plot when the legend sits
    below it; the figure grows by the height of the text.
    """
    out = go.Figure(figure)
    wrapped = []
    for line in lines:
        wrapped.extend(textwrap.wrap(str(line), width) or [""])
    height = out.layout.height or HEIGHT
    extra = 14 * len(wrapped) + 16
    legend_below = out.layout.legend.y is not None and out.layout.legend.y < 0
    text = dict(
        text="<br>".join(wrapped),
        xref="paper",
        yref="paper",
        x=0.0,
        xanchor="left",
        align="left",
        showarrow=False,
        font=dict(size=10, color=MUTED),
    )
    if legend_below:
        top = out.layout.margin.t if out.layout.margin.t is not None else 80
        out.add_annotation(y=1.0, yanchor="bottom", yshift=10, **text)
        out.update_layout(
            margin=dict(t=top + extra),
            height=height + extra,
            title=dict(yref="container", y=1.0, yanchor="top", pad=dict(t=24)),
        )
    else:
        bottom = out.layout.margin.b if out.layout.margin.b is not None else 70
        out.add_annotation(y=0.0, yanchor="top", yshift=-(bottom - 8), **text)
        out.update_layout(margin=dict(b=bottom + extra), height=height + extra)
    return out


# --- shared pieces ---------------------------------------------------------------------------


def _k_title(unit: DisplayUnit, reference_temperature: float) -> str:
    label = reference_label(reference_temperature)
    return f"hydraulic conductivity {label} [{unit.unit}]"


def _effort_labels(specimens: pd.DataFrame) -> np.ndarray:
    """Each specimen's effort as text, :data:`NO_EFFORT` where none is given."""
    return np.array(
        [NO_EFFORT if pd.isna(e) else str(e) for e in specimens["effort"]], dtype=object
    )


def _effort_order(specimens: pd.DataFrame) -> list[str]:
    """The efforts by their specimens' mean dry density, lowest first (ties: as they come)."""
    labels = _effort_labels(specimens)
    density = specimens["dry_density"].to_numpy(dtype=float)
    sums: dict[str, list[float]] = {}
    for label, value in zip(labels, density, strict=True):
        total = sums.setdefault(label, [0.0, 0])
        if not np.isnan(value):
            total[0] += value
            total[1] += 1
    means = {label: total / count if count else np.nan for label, (total, count) in sums.items()}
    return sorted(means, key=lambda label: (np.isnan(means[label]), means[label]))


def _escaped(value) -> str:
    """Text from the input, escaped for plotly's HTML-like labels."""
    return html.escape(str(value))


def _group_title(effort: str) -> str:
    if effort == NO_EFFORT:
        return "specimens (no effort given)"
    return f"effort: {html.escape(str(effort))}"


def _effort_styles(specimens: pd.DataFrame, order=None) -> dict[str, tuple[str, str]]:
    """Marker symbol and line dash of each effort; `order` is its :func:`_effort_order`
    when already known."""
    order = _effort_order(specimens) if order is None else order
    return {
        effort: (EFFORT_SYMBOLS[i % len(EFFORT_SYMBOLS)], EFFORT_DASHES[i % len(EFFORT_DASHES)])
        for i, effort in enumerate(order)
    }


_HOVER_COLUMNS = ("specimen", "method", "water_content", "void_ratio", "k", "k_low", "k_high")


def _hover(rows: pd.DataFrame, unit: DisplayUnit, analysis: SeriesAnalysis) -> list[str]:
    texts = []
    columns = [rows[c].tolist() for c in (*_HOVER_COLUMNS, "verdict")]
    for specimen, method, water, void_ratio, k, k_low, k_high, verdict in zip(
        *columns, strict=True
    ):
        w = "–" if pd.isna(water) else f"{100 * water:.1f} %"
        interval = "no interval"
        if pd.notna(k_low):
            interval = (
                f"{scientific(k_low * unit.factor, html=True)} – "
                f"{scientific(k_high * unit.factor, html=True)}"
            )
        texts.append(
            f"<b>{_escaped(specimen)}</b> ({_escaped(method).replace('_', ' ')})<br>"
            f"w = {w}, e = {void_ratio:.3f}<br>"
            f"k = {scientific(k * unit.factor, html=True)} {unit.unit}<br>"
            f"{100 * analysis.confidence:g} %: {interval}<br>{verdict}"
        )
    return texts


def _specimen_traces(
    analysis, x, y, unit: DisplayUnit, show_legend: bool, error_bars: float | None
) -> list[go.Scatter]:
    """One trace per effort and verdict: shape by effort, fill and colour by verdict.

    `error_bars` is None for no bars, or the shortest bar drawn in decades of k: a bar
    shorter than that would hide inside the marker and look like a dot in it.
    """
    return [
        go.Scatter(trace)
        for trace in _specimen_trace_specs(analysis, x, y, unit, show_legend, error_bars)
    ]


def _specimen_trace_specs(
    analysis,
    x,
    y,
    unit: DisplayUnit,
    show_legend: bool,
    error_bars: float | None,
    order=None,
    hover=None,
    **axes,
) -> list[dict]:
    """The traces of :func:`_specimen_traces` as plain dicts (validated when a figure is
    built from them), each with `axes` (``xaxis``, ``yaxis``) added; `order` is the
    :func:`_effort_order` of the specimens and `hover` their :func:`_hover` texts, when
    already known."""
    frame = analysis.specimens
    order = _effort_order(frame) if order is None else order
    styles = _effort_styles(frame, order)
    labels = _effort_labels(frame)
    verdicts = frame["verdict"].to_numpy(dtype=object)
    is_verdict = {v: verdicts == v for v in VERDICTS}
    if hover is None:
        hover = np.array(_hover(frame, unit, analysis), dtype=object)
    names = np.array([_escaped(v) for v in frame["specimen"]], dtype=object)
    k_all, k_low_all, k_high_all = (frame[c].to_numpy() for c in ("k", "k_low", "k_high"))
    x, y = np.asarray(x), np.asarray(y)
    traces = []
    for effort in order:
        for verdict in VERDICTS:
            mask = (labels == effort) & is_verdict[verdict]
            if not mask.any():
                continue
            error = None
            if error_bars is not None:
                k = k_all[mask] * unit.factor
                k_high = k_high_all[mask] * unit.factor
                k_low = k_low_all[mask] * unit.factor
                with np.errstate(invalid="ignore", divide="ignore"):
                    shown = np.log10(k_high / k_low) >= error_bars
                error = dict(
                    type="data",
                    array=np.where(shown, k_high - k, 0.0),
                    symmetric=False,
                    arrayminus=np.where(shown, k - k_low, 0.0),
                    color=VERDICT_COLOURS[verdict],
                    thickness=1.2,
                    width=0,
                )
            traces.append(
                dict(
                    type="scatter",
                    x=x[mask],
                    y=y[mask],
                    mode="markers",
                    name=verdict,
                    legendgroup=f"effort {effort}",
                    legendgrouptitle=dict(text=_group_title(effort)),
                    showlegend=show_legend,
                    marker=dict(
                        symbol=styles[effort][0] + VERDICT_FILL[verdict],
                        size=11,
                        color=VERDICT_COLOURS[verdict],
                        line=dict(width=1.6, color=VERDICT_COLOURS[verdict]),
                    ),
                    error_y=error,
                    text=names[mask].tolist(),
                    hovertext=hover[mask].tolist(),
                    hoverinfo="text",
                    meta={"verdict": verdict, "effort": effort},
                    **axes,
                )
            )
    return traces


def _criterion_trace(analysis, x_range, unit: DisplayUnit, show_legend=True) -> go.Scatter:
    return go.Scatter(_criterion_spec(analysis, x_range, unit, show_legend))


def _criterion_spec(analysis, x_range, unit: DisplayUnit, show_legend=True) -> dict:
    """The criterion line as a trace's properties."""
    value = analysis.criterion * unit.factor
    return dict(
        type="scatter",
        x=list(x_range),
        y=[value, value],
        mode="lines",
        name=f"criterion k {analysis.criterion.symbol} {scientific(value, html=True)} {unit.unit}",
        legendgroup="criterion",
        showlegend=show_legend,
        line=dict(color=INK, width=1.8, dash="longdash"),
        hoverinfo="name",
    )


def _padded(values, fraction=0.06):
    values = np.asarray(values, dtype=float)
    values = values[np.isfinite(values)]
    low, high = float(values.min()), float(values.max())
    pad = (high - low) * fraction or abs(high) * fraction or 1.0
    return low - pad, high + pad


ERROR_BAR_FRACTION = 0.03
"""Error bars shorter than this fraction of the log-k axis are left out (hidden by markers)."""
CRITERION_REACH = 2.0
"""The criterion line is drawn when it lies within this many decades of the data."""


def _k_axis(analysis, unit: DisplayUnit, extra=()) -> tuple[dict, str]:
    """Log k axis over the data (and the criterion when near); a note when it is left off.

    `extra` holds more values to keep in range, already in the display unit.
    """
    values = np.concatenate(
        [analysis.specimens[c].to_numpy(float) * unit.factor for c in ("k", "k_low", "k_high")]
        + [np.asarray(extra, dtype=float).ravel()]
    )
    values = values[np.isfinite(values) & (values > 0)]
    low, high = float(np.log10(values.min())), float(np.log10(values.max()))
    criterion = float(np.log10(analysis.criterion * unit.factor))
    note = ""
    if low - CRITERION_REACH <= criterion <= high + CRITERION_REACH:
        low, high = min(low, criterion), max(high, criterion)
    else:
        side = "below" if criterion < low else "above"
        note = (
            f"criterion k {analysis.criterion.symbol} "
            f"{scientific(analysis.criterion * unit.factor, html=True)} "
            f"{unit.unit} lies far {side} the plotted range"
        )
    pad = max(0.15, 0.06 * (high - low))
    axis = dict(
        type="log", range=[low - pad, high + pad], exponentformat="power", showexponent="all"
    )
    if high - low >= 1.5:
        axis.update(
            dtick=1, minor=dict(ticks="outside", dtick="D1", showgrid=True, gridcolor="#f1f3f4")
        )
    return axis, note


def _note_spec(text: str) -> dict:
    """A note in the top left corner of a panel, as an annotation's properties."""
    return dict(
        text=text,
        xref="x domain",
        yref="y domain",
        x=0.01,
        y=0.99,
        xanchor="left",
        yanchor="top",
        showarrow=False,
        font=dict(size=11, color=MUTED),
        bgcolor="rgba(255,255,255,0.85)",
    )


def _note(figure: go.Figure, text: str, **where) -> None:
    if text:
        figure.add_annotation(**_note_spec(text), **where)


def compaction_conductivity_figure(
    analysis: SeriesAnalysis, k_unit_name: str = "m/s", density_unit_name: str = "Mg/m³"
) -> go.Figure:
    """The memo chart: the compaction plane above log k against water content.

    Parameters
    ----------
    analysis : SeriesAnalysis
        From :func:`kitchen.series_analysis.analyse_series`; needs specimens with a
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
    x_range = _padded(w_pct, 0.08)
    # the traces and the layout are gathered as plain dicts and validated once, when the
    # figure is built: adding them one at a time re-validates the whole figure each time
    top, bottom = dict(xaxis="x", yaxis="y"), dict(xaxis="x2", yaxis="y2")
    data, annotations = [], []
    y_values = [frame["dry_density"].to_numpy()]
    zone = analysis.acceptable_zone
    if zone is not None and zone.kind != "empty":
        vertices = zone.vertices
        closed = np.vstack([vertices, vertices[:1]]) if zone.kind == "polygon" else vertices
        data.append(
            dict(
                type="scatter",
                x=closed[:, 0] * 100.0,
                y=closed[:, 1] * du.factor,
                mode="lines" if zone.kind != "point" else "markers",
                fill="toself" if zone.kind == "polygon" else None,
                fillcolor="rgba(46,107,87,0.10)",
                fillpattern=dict(shape="/", fgcolor="rgba(46,107,87,0.45)", size=9, solidity=0.12)
                if zone.kind == "polygon"
                else None,
                line=dict(color=ZONE, width=1.6, dash="dot"),
                name=f"acceptable zone ({zone.kind}: hull of specimens that meet)",
                legendgroup="zone",
                hoverinfo="name",
                **top,
            )
        )
    order = _effort_order(frame)
    styles = _effort_styles(frame, order)
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
                legendgrouptitle=dict(text=_group_title(effort)),
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
                text=[_escaped(v) for v in line.efforts],
                hoverinfo="text+x+y",
                **top,
            )
        )
        if line.slope is not None:
            w = np.array(_padded(w_opt, 0.35))
            data.append(
                dict(
                    type="scatter",
                    x=w * 100.0,
                    y=np.asarray(line.dry_density(w)) * du.factor,
                    mode="lines",
                    name="line of optimums",
                    legendgroup="optimums",
                    line=dict(color=INK, width=1.3, dash="dashdot"),
                    hoverinfo="name",
                    **top,
                )
            )
    y_low, y_high = _padded(np.concatenate(y_values) * du.factor, 0.10)
    if analysis.specific_gravity is not None:
        w = np.linspace(x_range[0], x_range[1], 80) / 100.0
        w = w[w >= 0]
        for saturation in SATURATION_LINES:
            rho = np.asarray(analysis.saturation_line(w, saturation)) * du.factor
            name = (
                "zero-air-voids (S = 100 %)" if saturation == 1 else f"S = {100 * saturation:.0f} %"
            )
            data.append(
                dict(
                    type="scatter",
                    x=w * 100.0,
                    y=rho,
                    mode="lines",
                    name=f"{name}, Gs = {analysis.specific_gravity:g}",
                    legendgroup="saturation",
                    legendgrouptitle=dict(text="saturation lines"),
                    line=dict(
                        color=MUTED,
                        width=1.5 if saturation == 1 else 1.1,
                        dash=SATURATION_DASHES.get(saturation, "dot"),
                    ),
                    hoverinfo="name",
                    **top,
                )
            )
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
    k_axis, note = _k_axis(plane, ku)
    shortest = ERROR_BAR_FRACTION * (k_axis["range"][1] - k_axis["range"][0])
    density = frame["dry_density"] * du.factor
    hover = np.array(_hover(frame, ku, plane), dtype=object)
    data += _specimen_trace_specs(plane, w_pct, density, ku, True, None, order, hover, **top)
    data += _specimen_trace_specs(
        plane, w_pct, frame["k"] * ku.factor, ku, False, shortest, order, hover, **bottom
    )
    if not note:
        data.append(dict(_criterion_spec(analysis, x_range, ku), **bottom))
    if note:
        annotations.append(dict(_note_spec(note), xref="x2 domain", yref="y2 domain"))
    axes = _two_panel_axes()
    k_title = _k_title(ku, analysis.reference_temperature)
    layout = dict(
        template=_template(),
        xaxis=dict(axes["xaxis"], range=list(x_range)),
        yaxis=dict(axes["yaxis"], title=dict(text=du.title()), range=[y_low, y_high]),
        xaxis2=dict(
            axes["xaxis2"], range=list(x_range), title=dict(text="molding water content w [%]")
        ),
        yaxis2=dict(axes["yaxis2"], title=dict(text=k_title), **k_axis),
        title=dict(
            text="Compaction and hydraulic conductivity"
            f"<br><sup>criterion k {analysis.criterion.symbol} "
            f"{scientific(analysis.criterion * ku.factor, html=True)} "
            f"{ku.unit}; filled: meets, open: does not meet, dotted: not conclusive</sup>"
        ),
        margin=dict(t=95, b=60),
        legend=dict(orientation="h", x=0.0, xanchor="left", y=-0.075, yanchor="top"),
        height=1120,
    )
    if annotations:
        layout["annotations"] = annotations
    return dict(data=data, layout=layout)


# --- trends against void ratio, dry density, water content ---------------------------------

_AGAINST = {
    "void_ratio": ("void_ratio", "void_ratio_trend"),
    "dry_density": ("dry_density", "dry_density_trend"),
    "water_content_from_optimum": ("water_content_from_optimum", "water_content_trend"),
}


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
    :mod:`kitchen.trends`.
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
    x_range = _padded(x * scale, 0.08)
    figure = go.Figure(layout=dict(template=memo_template()))
    trend = getattr(analysis, attribute)
    if trend is not None:
        grid = np.linspace(x.min(), x.max(), 80)
        low, high = trend.band(grid)
        figure.add_trace(
            go.Scatter(
                x=grid * scale,
                y=np.asarray(low) * ku.factor,
                mode="lines",
                line=dict(width=0),
                showlegend=False,
                legendgroup="fit",
                hoverinfo="skip",
            )
        )
        figure.add_trace(
            go.Scatter(
                x=grid * scale,
                y=np.asarray(high) * ku.factor,
                mode="lines",
                line=dict(width=0),
                fill="tonexty",
                fillcolor="rgba(29,39,49,0.11)",
                legendgroup="fit",
                name=f"{100 * trend.confidence:g} % confidence band of the line",
                hoverinfo="skip",
            )
        )
        figure.add_trace(
            go.Scatter(
                x=grid * scale,
                y=np.asarray(trend.conductivity(grid)) * ku.factor,
                mode="lines",
                line=dict(color=INK, width=1.8),
                name=_trend_name(against, trend, du),
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
    k_axis, note = _k_axis(plotted, ku, np.concatenate(drawn) if drawn else ())
    shortest = ERROR_BAR_FRACTION * (k_axis["range"][1] - k_axis["range"][0])
    for trace in _specimen_traces(plotted, x * scale, frame["k"] * ku.factor, ku, True, shortest):
        figure.add_trace(trace)
    if not note:
        figure.add_trace(_criterion_trace(analysis, x_range, ku))
    _note(figure, note)
    figure.update_xaxes(title_text=title, range=list(x_range))
    figure.update_yaxes(title_text=_k_title(ku, analysis.reference_temperature), **k_axis)
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
                    text=[_escaped(v) for v in rows["specimen"]],
                    hovertemplate="%{text}: %{y:.3g} " + ku.unit + f"<extra>{name}</extra>",
                )
            )


# --- per specimen ----------------------------------------------------------------------------


def _time_unit(span_seconds: float) -> tuple[str, float]:
    if span_seconds >= 3 * 3600:
        return "h", 3600.0
    if span_seconds >= 180:
        return "min", 60.0
    return "s", 1.0


def _fitted_head(result) -> np.ndarray:
    """Fitted head over the window, for a FallingHeadAnalysis or a FallingHeadResult. [m]"""
    if hasattr(result, "fitted_head"):
        return np.asarray(result.fitted_head, dtype=float)
    fit = getattr(result, "fit", None)
    if fit is None:
        return np.asarray(result.head, dtype=float)[[0, -1]]
    return np.exp(fit.predict(np.asarray(result.reference_time, dtype=float)))


def falling_head_figure(
    readings: pd.DataFrame | None,
    result,
    k_unit_name: str = "m/s",
    reference_temperature: float = 20.0,
    max_points: int = MAX_TRACE_POINTS,
) -> go.Figure:
    """Head against time on a log head axis, with the fitted line and the reading window.

    Parameters
    ----------
    readings : pandas.DataFrame or None
        The specimen's rows of the ``falling_head`` table, ``time`` [s] and ``head`` [m];
        None to take every reading from `result` (a FallingHeadAnalysis carries them).
    result : kitchen.falling_head.FallingHeadAnalysis or FallingHeadResult
        The reduction: ``start``, ``stop`` (the window, positions in the readings), the
        fit (``fitted_head``, or ``fit`` and ``reference_time``), ``k_reference`` with
        ``k_reference_low`` and ``k_reference_high``.
    k_unit_name : {"m/s", "cm/s"}
    reference_temperature : float
        For the label of k. [degC]
    max_points : int
        Longest trace; longer records are decimated (:func:`decimation_indices`).

    Returns
    -------
    plotly.graph_objects.Figure

    References
    ----------
    ASTM D5084, Methods B and C: ln h falls linearly with time (from memory).
    """
    return go.Figure(
        falling_head_spec(readings, result, k_unit_name, reference_temperature, max_points)
    )


def falling_head_spec(
    readings: pd.DataFrame | None,
    result,
    k_unit_name: str = "m/s",
    reference_temperature: float = 20.0,
    max_points: int = MAX_TRACE_POINTS,
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
    outside = (
        (np.concatenate((time[:start], time[stop:])), np.concatenate((head[:start], head[stop:])))
        if start > 0 or stop < time.size
        else (time[:0], head[:0])
    )
    markers = (
        (
            outside,
            "readings outside the window",
            dict(symbol="circle-open", size=6, color=MUTED, line=dict(width=1.2)),
        ),
        (
            (time[start:stop], head[start:stop]),
            "readings in the window",
            dict(symbol="circle", size=5, color=INK),
        ),
    )
    data = []
    for (t, h), name, marker in markers:
        if t.size:
            keep = decimation_indices(h, max_points)
            data.append(
                dict(
                    type="scatter",
                    x=t[keep] / divisor,
                    y=h[keep],
                    mode="markers",
                    name=name,
                    marker=marker,
                    hovertemplate="t = %{x:.4g} " + unit + "<br>h = %{y:.4g} m<extra></extra>",
                )
            )
    fitted = _fitted_head(result)
    t = time[start:stop] if fitted.size == stop - start else time[[start, stop - 1]]
    keep = decimation_indices(fitted, max_points)
    datum = getattr(result, "fit_kind", "log_linear") == "datum"
    data.append(
        dict(
            type="scatter",
            x=t[keep] / divisor,
            y=fitted[keep],
            mode="lines",
            name="decay to a fitted datum h∞" if datum else "least-squares line of ln h",
            line=dict(color=VERDICT_COLOURS[DOES_NOT_MEET], width=2),
            hoverinfo="name",
        )
    )
    asymptote = float(getattr(result, "asymptote", 0.0) or 0.0)
    if datum and asymptote > 0:
        shapes.append(
            dict(
                type="line",
                x0=0,
                x1=1,
                xref="x domain",
                y0=asymptote,
                y1=asymptote,
                yref="y",
                line=dict(color=MUTED, dash="dot", width=1.2),
            )
        )
        annotations.append(
            dict(
                text=f"h∞ = {asymptote:.4g} m",
                showarrow=False,
                x=1,
                xanchor="right",
                xref="x domain",
                y=asymptote,
                yanchor="top",
                yref="y",
            )
        )
    k_text, low, high = distinct_texts(
        ku, result.k_reference, result.k_reference_low, result.k_reference_high
    )
    label = reference_label(reference_temperature)
    layout = dict(
        template=_template(),
        shapes=shapes,
        annotations=annotations,
        xaxis=dict(title=dict(text=f"elapsed time t [{unit}]")),
        yaxis=dict(title=dict(text="head difference h [m]"), type="log", exponentformat="power"),
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
    result : kitchen.constant_head.ConstantHeadAnalysis or ConstantHeadResult
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
            hovertemplate="i = %{x:.3g}<br>v = %{y:.3g} " + ku.unit + "<extra></extra>",
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
