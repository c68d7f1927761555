"""The pieces the series charts share: specimen markers, hover texts, the criterion, the k axis.

Each specimen is drawn with the marker shape of its compactive effort and the fill and
colour of its verdict against the criterion (or of a test not judged, not valid; without a
criterion, of its validity alone); efforts are ordered by their mean dry density. The log-k
axis spans the data and, when it lies near, the criterion line; a criterion far outside is
named in a note instead, and without a criterion no line is drawn. Used by
:mod:`kitchen.charts.compaction` and :mod:`kitchen.charts.conductivity_trend`.
"""

from __future__ import annotations

import html

import numpy as np
import pandas as pd
import plotly.graph_objects as go

from kitchen.analysis import SeriesAnalysis
from kitchen.display_units import DisplayUnit, distinct_texts, scientific
from kitchen.settings import reference_label

from .style import (
    CRITERION_DASH,
    EFFORT_DASHES,
    EFFORT_SYMBOLS,
    INK,
    MUTED,
    NO_EFFORT,
    OPTIMUM_DASH,
    SATURATION_DASHES,
    VERDICT_COLOURS,
    VERDICT_FACE,
    VERDICT_FILL,
)


def k_axis_title(unit: DisplayUnit, reference_temperature: float) -> str:
    label = reference_label(reference_temperature)
    return f"hydraulic conductivity {label} [{unit.unit}]"


def _effort_labels(specimens: pd.DataFrame) -> np.ndarray:
    """Each specimen's effort as text, :data:`NO_EFFORT` where none is given."""
    return np.array(
        [NO_EFFORT if pd.isna(e) else str(e) for e in specimens["effort"]], dtype=object
    )


def effort_order(specimens: pd.DataFrame) -> list[str]:
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


def html_escaped(value) -> str:
    """Text from the input, escaped for plotly's HTML-like labels."""
    return html.escape(str(value))


def effort_group_title(effort: str) -> str:
    if effort == NO_EFFORT:
        return "specimens (no effort given)"
    return f"effort: {html.escape(str(effort))}"


def effort_styles(specimens: pd.DataFrame, order=None) -> dict[str, tuple[str, str]]:
    """Marker symbol and line dash of each effort; `order` is its :func:`effort_order`
    when already known."""
    order = effort_order(specimens) if order is None else order
    return {
        effort: (EFFORT_SYMBOLS[i % len(EFFORT_SYMBOLS)], EFFORT_DASHES[i % len(EFFORT_DASHES)])
        for i, effort in enumerate(order)
    }


_HOVER_COLUMNS = ("specimen", "method", "water_content", "void_ratio", "k", "k_low", "k_high")


def hover_texts(rows: pd.DataFrame, unit: DisplayUnit, analysis: SeriesAnalysis) -> list[str]:
    texts = []
    columns = [rows[c].tolist() for c in (*_HOVER_COLUMNS, "verdict")]
    for specimen, method, water, void_ratio, k, k_low, k_high, verdict in zip(
        *columns, strict=True
    ):
        w = "–" if pd.isna(water) else f"{100 * water:.1f} %"
        interval = "no interval"
        if pd.notna(k_low):
            low, high = distinct_texts(unit, k_low, k_high)
            interval = f"{low} – {high}"
        texts.append(
            f"<b>{html_escaped(specimen)}</b> ({html_escaped(method).replace('_', ' ')})<br>"
            f"w = {w}, e = {void_ratio:.3f}<br>"
            f"k = {unit.number.text(k * unit.factor, html=True)} {unit.unit}<br>"
            f"{100 * analysis.confidence:g} %: {interval}<br>{verdict}"
        )
    return texts


def specimen_traces(
    analysis, x, y, unit: DisplayUnit, show_legend: bool, error_bars: float | None
) -> list[go.Scatter]:
    """One trace per effort and verdict: shape by effort, fill and colour by verdict.

    `error_bars` is None for no bars, or the shortest bar drawn in decades of k: a bar
    shorter than that would hide inside the marker and look like a dot in it.
    """
    return [
        go.Scatter(trace)
        for trace in specimen_trace_specs(analysis, x, y, unit, show_legend, error_bars)
    ]


def specimen_trace_specs(
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
    """The traces of :func:`specimen_traces` as plain dicts (validated when a figure is
    built from them), each with `axes` (``xaxis``, ``yaxis``) added; `order` is the
    :func:`effort_order` of the specimens and `hover` their texts (:func:`hover_texts`), when
    already known."""
    frame = analysis.specimens
    order = effort_order(frame) if order is None else order
    styles = effort_styles(frame, order)
    labels = _effort_labels(frame)
    verdicts = frame["verdict"].to_numpy(dtype=object)
    is_verdict = {v: verdicts == v for v in analysis.verdicts}
    if hover is None:
        hover = np.array(hover_texts(frame, unit, analysis), dtype=object)
    names = np.array([html_escaped(v) for v in frame["specimen"]], dtype=object)
    k_all, k_low_all, k_high_all = (frame[c].to_numpy() for c in ("k", "k_low", "k_high"))
    x, y = np.asarray(x), np.asarray(y)
    traces = []
    for effort in order:
        for verdict in analysis.verdicts:
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
                    legendgrouptitle=dict(text=effort_group_title(effort)),
                    showlegend=show_legend,
                    marker=dict(
                        symbol=styles[effort][0] + VERDICT_FILL[verdict],
                        size=11,
                        color=VERDICT_FACE[verdict],
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


def criterion_trace(analysis, x_range, unit: DisplayUnit, show_legend=True) -> go.Scatter:
    return go.Scatter(criterion_spec(analysis, x_range, unit, show_legend))


def criterion_spec(analysis, x_range, unit: DisplayUnit, show_legend=True) -> dict:
    """The criterion line as a trace's properties (the analysis must have a criterion)."""
    value = analysis.criterion * unit.factor
    return dict(
        type="scatter",
        x=list(x_range),
        y=[value, value],
        mode="lines",
        name=f"criterion k {analysis.criterion.symbol} {scientific(value, html=True)} {unit.unit}",
        legendgroup="criterion",
        showlegend=show_legend,
        line=dict(color=INK, width=1.8, dash=CRITERION_DASH),
        hoverinfo="name",
    )


def saturation_specs(analysis: SeriesAnalysis, w, unit: DisplayUnit, **extra) -> list[dict]:
    """The saturation lines of the series' Gs (zero-air-voids first, then
    :data:`kitchen.analysis.SATURATION_LINES`) over the water contents `w` (fractions), as
    plain scatter specs in the density unit, each with its own line code
    (:data:`~kitchen.charts.style.SATURATION_DASHES`); `extra` is added to every spec. The
    line itself is :meth:`kitchen.analysis.SeriesAnalysis.saturation_line`. [-]"""
    from kitchen.analysis import SATURATION_LINES

    specs = []
    for saturation in SATURATION_LINES:
        rho = np.asarray(analysis.saturation_line(w, saturation)) * unit.factor
        name = "zero-air-voids (S = 100 %)" if saturation == 1 else f"S = {100 * saturation:.0f} %"
        specs.append(
            dict(
                type="scatter",
                x=np.asarray(w) * 100.0,
                y=rho,
                mode="lines",
                name=f"{name}, Gs = {analysis.specific_gravity:g}",
                legendgroup="saturation",
                legendgrouptitle=dict(text="saturation lines"),
                line=dict(
                    color=MUTED,
                    width=1.5 if saturation == 1 else 1.1,
                    dash=SATURATION_DASHES.get(saturation, "1px,5px"),
                ),
                hoverinfo="name",
                **extra,
            )
        )
    return specs


def optimum_line_spec(line, w, unit: DisplayUnit, **extra) -> dict:
    """The line of optimums (:class:`kitchen.analysis.LineOfOptimums`, with a slope) over
    the water contents `w` (fractions), as a plain scatter spec in the density unit with
    its own line code (:data:`~kitchen.charts.style.OPTIMUM_DASH`); `extra` is added."""
    w = np.asarray(w, dtype=float)
    return dict(
        type="scatter",
        x=w * 100.0,
        y=np.asarray(line.dry_density(w)) * unit.factor,
        mode="lines",
        name="line of optimums",
        line=dict(color=INK, width=1.3, dash=OPTIMUM_DASH),
        hoverinfo="name",
        **extra,
    )


def padded_range(values, fraction=0.06):
    values = np.asarray(values, dtype=float)
    values = values[np.isfinite(values)]
    low, high = float(values.min()), float(values.max())
    pad = (high - low) * fraction or abs(high) * fraction or 1.0
    return low - pad, high + pad


ERROR_BAR_FRACTION = 0.03
"""Error bars shorter than this fraction of the log-k axis are left out (hidden by markers)."""
CRITERION_REACH = 2.0
"""The criterion line is drawn when it lies within this many decades of the data."""


def k_axis_layout(analysis, unit: DisplayUnit, extra=()) -> tuple[dict, str]:
    """Log k axis over the data (and the criterion when near); a note when it is left off.

    `extra` holds more values to keep in range, already in the display unit. Without a
    criterion the axis spans the data alone, with no note.
    """
    values = np.concatenate(
        [analysis.specimens[c].to_numpy(float) * unit.factor for c in ("k", "k_low", "k_high")]
        + [np.asarray(extra, dtype=float).ravel()]
    )
    values = values[np.isfinite(values) & (values > 0)]
    low, high = float(np.log10(values.min())), float(np.log10(values.max()))
    note = ""
    if analysis.criterion is not None:  # without one, the axis spans the data alone
        criterion = float(np.log10(analysis.criterion * unit.factor))
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


def note_spec(text: str) -> dict:
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


def add_note(figure: go.Figure, text: str, **where) -> None:
    if text:
        figure.add_annotation(**note_spec(text), **where)
