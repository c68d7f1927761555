"""The field-check charts: the field tests on the compaction plane over the zone, and in date order.

:func:`field_plane_figure` draws dry density against water content with the zone the
tests are judged against (hatched), the saturation lines, the line of optimums, the
laboratory specimens (small grey crosses) and each field test: its lift told by the
marker's shape, its verdict by the fill (filled: inside the zone, open: outside, pale: a
test replaced by a retest), so the chart reads in greyscale print; the tests outside are
labelled with their ids. :func:`field_distance_figure` draws the tests in order of date
with their distance from the zone's edge, in water content (top) and in dry density
(bottom): above zero outside, below zero the margin inside.
"""

from __future__ import annotations

import numpy as np
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from kitchen.display_units import density_unit

from ._series_parts import optimum_line_spec, saturation_specs
from .style import (
    EFFORT_SYMBOLS,
    INK,
    MUTED,
    ZONE,
    cached_memo_template,
)

__all__ = ["field_plane_figure", "field_distance_figure", "FIELD_FILLS"]

FIELD_FILLS = {"inside": INK, "outside": "white", "replaced": "#d5dae0"}
"""Marker fill of a field test by its verdict: filled inside, open outside, pale where a
retest replaced it."""


def _lift_symbols(check) -> dict:
    lifts = list(dict.fromkeys(check.tests["lift"]))
    return {lift: EFFORT_SYMBOLS[i % len(EFFORT_SYMBOLS)] for i, lift in enumerate(lifts)}


def _state(row) -> str:
    if not row["standing"]:
        return "replaced"
    return "inside" if row["inside"] else "outside"


def _hover(row, du) -> str:
    parts = [
        f"{row['test']} · lift {row['lift']} · {row['date']:%Y-%m-%d %H:%M} · {row['method']}",
        f"w = {100 * row['water_content']:.1f} %, ρd = {row['dry_density'] * du.factor:.3f} "
        f"{du.unit}",
        row["verdict"],
    ]
    if row["retest_of"]:
        parts.append(f"retest of {row['retest_of']}")
    if row["replaced_by"]:
        parts.append(f"replaced by {row['replaced_by']}")
    return "<br>".join(parts)


def _test_traces(check, x, y, du, axes: dict, legend: bool, labels: bool) -> list[dict]:
    """One trace per lift and verdict state; shape by lift, fill by state."""
    symbols = _lift_symbols(check)
    tests = check.tests
    states = np.array([_state(row) for _, row in tests.iterrows()])
    traces = []
    for lift, symbol in symbols.items():
        for state in ("inside", "outside", "replaced"):
            rows = np.flatnonzero((tests["lift"].to_numpy() == lift) & (states == state))
            if not rows.size:
                continue
            part = tests.iloc[rows]
            words = {"inside": "inside", "outside": "outside", "replaced": "replaced by a retest"}
            traces.append(
                dict(
                    type="scatter",
                    x=np.asarray(x)[rows],
                    y=np.asarray(y)[rows],
                    mode="markers+text" if labels and state == "outside" else "markers",
                    text=[t for t in part["test"]] if labels and state == "outside" else None,
                    textposition="top right",
                    textfont=dict(size=10, color=INK),
                    marker=dict(
                        symbol=symbol,
                        size=10,
                        color=FIELD_FILLS[state],
                        line=dict(color=INK if state != "replaced" else MUTED, width=1.4),
                    ),
                    name=f"lift {lift}: {words[state]}",
                    legendgroup=f"lift {lift}",
                    showlegend=legend,
                    hovertext=[_hover(row, du) for _, row in part.iterrows()],
                    hoverinfo="text",
                    **axes,
                )
            )
    return traces


def field_plane_figure(check, analysis, density_unit_name: str = "Mg/m³") -> go.Figure:
    """The field tests on the compaction plane over the zone they are judged against.

    Parameters
    ----------
    check : kitchen.field.FieldCheck
    analysis : kitchen.analysis.SeriesAnalysis
        The series the zone comes from (saturation lines, line of optimums, specimens).
    density_unit_name : {"Mg/m³", "kN/m³", "lb/ft³"}, default "Mg/m³"

    Returns
    -------
    plotly.graph_objects.Figure

    References
    ----------
    Daniel, D. E. and Benson, C. H. (1990), J. Geotech. Eng. 116(12), 1811–1830: field
    tests held to the acceptable zone on the compaction plane (from memory).
    """
    du = density_unit(density_unit_name)
    tests = check.tests
    data: list[dict] = []
    w_all = [tests["water_content"].to_numpy()]
    rho_all = [tests["dry_density"].to_numpy()]
    if check.zone is not None:
        for i, corners in enumerate(check.zone.polygons):
            closed = np.vstack([corners, corners[:1]])
            data.append(
                dict(
                    type="scatter",
                    x=closed[:, 0] * 100.0,
                    y=closed[:, 1] * du.factor,
                    mode="lines",
                    fill="toself" if len(corners) > 2 else None,
                    fillcolor="rgba(46,107,87,0.10)",
                    fillpattern=dict(shape="/", fgcolor="rgba(46,107,87,0.45)", size=9),
                    line=dict(color=ZONE, width=1.8),
                    name=check.zone.name,
                    legendgroup="zone",
                    showlegend=i == 0,
                    hoverinfo="name",
                )
            )
            w_all.append(corners[:, 0])
            rho_all.append(corners[:, 1])
    lab = analysis.specimens[analysis.specimens["on_compaction_plane"]]
    if not lab.empty:
        data.append(
            dict(
                type="scatter",
                x=lab["water_content"] * 100.0,
                y=lab["dry_density"] * du.factor,
                mode="markers",
                marker=dict(symbol="x-thin-open", size=8, color=MUTED, line=dict(width=1.2)),
                name="laboratory specimens",
                text=list(lab["specimen"]),
                hoverinfo="text+x+y",
            )
        )
        w_all.append(lab["water_content"].to_numpy())
        rho_all.append(lab["dry_density"].to_numpy())
    w_all, rho_all = np.concatenate(w_all), np.concatenate(rho_all)
    w_low, w_high = np.nanmin(w_all), np.nanmax(w_all)
    pad = 0.08 * max(w_high - w_low, 0.01)
    w_line = np.linspace(max(w_low - pad, 0.0), w_high + pad, 80)
    rho_low, rho_high = np.nanmin(rho_all), np.nanmax(rho_all)
    rho_pad = 0.10 * max(rho_high - rho_low, 20.0)
    y_range = [(rho_low - rho_pad) * du.factor, (rho_high + rho_pad) * du.factor]
    if analysis.specific_gravity is not None:
        data += saturation_specs(analysis, w_line, du)
    line = analysis.line_of_optimums
    if line is not None and line.slope is not None:
        data.append(optimum_line_spec(line, w_line, du))
    data += _test_traces(
        check,
        tests["water_content"] * 100.0,
        tests["dry_density"] * du.factor,
        du,
        {},
        True,
        True,
    )
    zone_words = check.zone.name if check.zone is not None else "no zone"
    layout = dict(
        template=cached_memo_template(),
        title=dict(
            text=f"Field tests against the {zone_words}<br><sup>shape: lift; filled: inside "
            "(the edge counts as inside), open: outside, pale: replaced by a retest</sup>"
        ),
        xaxis=dict(
            title=dict(text="water content w [%]"),
            range=[(w_low - pad) * 100, (w_high + pad) * 100],
        ),
        yaxis=dict(title=dict(text=du.title()), range=y_range),
        legend=dict(orientation="h", x=0.0, xanchor="left", y=-0.14, yanchor="top"),
        margin=dict(t=95, b=60),
        height=760,
    )
    return go.Figure(dict(data=data, layout=layout))


def field_distance_figure(check, density_unit_name: str = "Mg/m³") -> go.Figure:
    """The field tests in order of date with their distance from the zone's edge.

    Top: the distance in water content at the test's dry density [percentage points];
    bottom: in dry density at its water content. Above zero a test is outside (by that
    much), below zero inside (its margin to the nearest edge). A test whose line misses the
    zone altogether has no distance along that axis: it is counted in a note, not left out
    silently.
    """
    du = density_unit(density_unit_name)
    tests = check.tests
    figure = make_subplots(rows=2, cols=1, shared_xaxes=True, vertical_spacing=0.08)
    dates = tests["date"]
    top, bottom = dict(xaxis="x", yaxis="y"), dict(xaxis="x2", yaxis="y2")
    w_distance = tests["water_content_distance"].to_numpy() * 100.0
    rho_distance = tests["dry_density_distance"].to_numpy() * du.factor
    data = _test_traces(check, dates, w_distance, du, top, True, True)
    data += _test_traces(check, dates, rho_distance, du, bottom, False, False)
    spec = figure.to_plotly_json()
    layout = spec["layout"]
    annotations = []
    for name, values, yref in (
        ("water content", w_distance, "y"),
        ("dry density", rho_distance, "y2"),
    ):
        missing = tests["test"][np.isnan(values)]
        if len(missing):
            annotations.append(
                dict(
                    text=f"not drawn, no {name} at their other coordinate reaches the zone: "
                    + ", ".join(missing),
                    xref="paper",
                    yref=f"{yref} domain",
                    x=0.0,
                    y=1.0,
                    xanchor="left",
                    yanchor="bottom",
                    showarrow=False,
                    font=dict(size=10, color=MUTED),
                )
            )
    shapes = [
        dict(type="line", xref="paper", x0=0, x1=1, yref=axis, y0=0, y1=0,
             line=dict(color=ZONE, width=1.6))
        for axis in ("y", "y2")
    ]  # fmt: skip
    layout.update(
        template=cached_memo_template(),
        title=dict(
            text="Field tests in order of date: distance from the zone's edge<br><sup>above "
            "zero outside, below zero the margin inside; shape: lift; filled: inside, open: "
            "outside, pale: replaced by a retest</sup>"
        ),
        shapes=shapes,
        annotations=annotations,
        height=760,
        margin=dict(t=95, b=60),
        legend=dict(orientation="h", x=0.0, xanchor="left", y=-0.1, yanchor="top"),
    )
    layout["yaxis"].update(title=dict(text="Δw to the edge [% points]"))
    layout["yaxis2"].update(title=dict(text=f"Δρd to the edge [{du.unit}]"))
    layout["xaxis2"].update(title=dict(text="date of the test"))
    return go.Figure(dict(data=data, layout=layout))
