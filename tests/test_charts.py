"""The figure builders: their data and labels (not pixels), units, and decimation."""

from pathlib import Path
from types import SimpleNamespace

import numpy as np
import pandas as pd
import plotly.graph_objects as go
import pytest

from kitchen import CAUTIONS, charts
from kitchen.compaction import zero_air_voids_dry_density
from kitchen.constant_head import collection_table, constant_head_analysis
from kitchen.falling_head import falling_head_analysis, reduce_falling_head
from kitchen.results import series_results
from kitchen.series import load_series
from kitchen.series_analysis import analyse_series
from kitchen.specimen import specimen_state
from kitchen.trends import DOES_NOT_MEET, MEETS, NOT_CONCLUSIVE

SAMPLES = Path(__file__).resolve().parents[1] / "sample_data"
# NIST SP 811 (2008), Appendix B, from the exact foot, pound and standard gravity:
KN_PER_MG = 9.80665  # 1 Mg/m3 of dry density is a dry unit weight of 9.80665 kN/m3
LBFT3_PER_MG = 62.42796  # 1 Mg/m3 = 62.428 lb/ft3


@pytest.fixture(scope="module")
def clay():
    series = load_series(SAMPLES / "clay_liner")
    return series, analyse_series(series_results(series), 1e-9)


@pytest.fixture(scope="module")
def sand():
    series = load_series(SAMPLES / "drainage_sand")
    return series, analyse_series(series_results(series), 1e-9)


@pytest.fixture(scope="module")
def wide():
    """A constructed series with wide intervals: all three verdicts, visible error bars."""
    w = np.array([0.14, 0.16, 0.18, 0.20, 0.22, 0.15, 0.17, 0.19, 0.21])
    rho = np.array([1700, 1760, 1780, 1750, 1690, 1650, 1700, 1710, 1680], dtype=float)
    k = np.array([2e-8, 5e-9, 8e-10, 3e-10, 2e-10, 4e-8, 1e-8, 1.1e-9, 5e-10])
    frame = pd.DataFrame(
        dict(
            specimen=[f"<b>W{i}</b>" if i == 0 else f"W{i}" for i in range(9)],
            method="falling_head",
            effort=["heavy"] * 5 + ["light"] * 4,
            water_content=w,
            dry_density=rho,
            void_ratio=2.7e3 / rho - 1,
            saturation=0.9,
            specific_gravity=2.7,
            d10=np.nan,
            k_reference=k,
            k_reference_low=k / 1.6,
            k_reference_high=k * 1.6,
            valid=True,
            checks=[[] for _ in w],
        )
    )
    return analyse_series(frame, 1e-9)


def traces(figure, **where):
    return [t for t in figure.data if all(getattr(t, k) == v for k, v in where.items())]


def specimen_traces(figure, axis="y"):
    return [t for t in figure.data if t.meta and "verdict" in t.meta and t.yaxis == axis]


# --- decimation ------------------------------------------------------------------------------


def test_decimation_keeps_short_records_whole():
    np.testing.assert_array_equal(charts.decimation_indices(np.arange(10.0), 10), np.arange(10))


def test_decimation_caps_points_and_keeps_every_bucket_extreme():
    rng = np.random.default_rng(7)
    y = np.cumsum(rng.normal(size=50_003))
    cap = 1000
    kept = charts.decimation_indices(y, cap)
    assert kept.size <= cap and np.all(np.diff(kept) > 0)
    assert {0, y.size - 1, int(np.argmin(y)), int(np.argmax(y))} <= set(kept.tolist())
    # The same buckets computed one by one: each one's minimum and maximum are kept.
    buckets = (cap - 2) // 2
    size = -(-y.size // buckets)
    for start in range(0, y.size, size):
        part = y[start : start + size]
        assert start + int(np.argmin(part)) in kept and start + int(np.argmax(part)) in kept


def test_decimation_ignores_nan_and_refuses_a_tiny_cap():
    y = np.sin(np.linspace(0, 20, 100_000))
    y[::7] = np.nan
    kept = charts.decimation_indices(y, 500)
    assert kept.size <= 500 and not np.isnan(y[kept[1:-1]]).any()
    with pytest.raises(ValueError, match="max_points: expected an integer of at least 4"):
        charts.decimation_indices(y, 3)


# --- the compaction–conductivity chart ------------------------------------------------------


def test_compaction_chart_axes_share_water_content(clay):
    figure = charts.compaction_conductivity_figure(clay[1])
    layout = figure.layout
    assert layout.xaxis.matches == "x2"  # the two panels share the w axis
    assert layout.xaxis2.title.text == "molding water content w [%]"
    assert layout.yaxis.title.text == "dry density ρd [Mg/m³]"
    assert layout.yaxis2.title.text == "hydraulic conductivity k20 [m/s]"
    assert layout.yaxis2.type == "log"


def test_compaction_chart_points_and_lines(clay):
    series, analysis = clay
    figure = charts.compaction_conductivity_figure(analysis)
    rows = analysis.specimens.set_index("specimen")
    top, bottom = specimen_traces(figure, "y"), specimen_traces(figure, "y2")
    for panel, column, scale in ((top, "dry_density", 1e-3), (bottom, "k", 1.0)):
        shown = {name: (x, y) for t in panel for name, x, y in zip(t.text, t.x, t.y, strict=True)}
        assert sorted(shown) == sorted(rows.index)
        for name, (x, y) in shown.items():
            assert x == pytest.approx(100 * rows.at[name, "water_content"])
            assert y == pytest.approx(rows.at[name, column] * scale)
    zav = next(t for t in figure.data if t.name.startswith("zero-air-voids"))
    expected = zero_air_voids_dry_density(np.asarray(zav.x) / 100, 2.71) / 1000
    np.testing.assert_allclose(zav.y, expected, rtol=1e-12)
    for effort, curve in analysis.compaction_curves.items():
        line = next(
            t
            for t in figure.data
            if t.legendgroup == f"effort {effort}" and t.name.startswith("compaction")
        )
        np.testing.assert_allclose(line.y, curve.dry_density(np.asarray(line.x) / 100) / 1000)
    zone = next(t for t in figure.data if t.legendgroup == "zone")
    np.testing.assert_allclose(
        np.asarray(zone.x)[:-1] / 100, analysis.acceptable_zone.vertices[:, 0]
    )
    criterion = next(t for t in figure.data if t.legendgroup == "criterion")
    assert list(criterion.y) == [1e-9, 1e-9]


def test_markers_tell_effort_by_shape_and_verdict_by_fill(wide):
    figure = charts.compaction_conductivity_figure(wide)
    shapes = {}
    for trace in specimen_traces(figure):
        effort, verdict = trace.meta["effort"], trace.meta["verdict"]
        symbol = trace.marker.symbol
        suffix = {MEETS: "", DOES_NOT_MEET: "-open", NOT_CONCLUSIVE: "-open-dot"}[verdict]
        assert symbol.endswith(suffix) if suffix else "-open" not in symbol
        shapes.setdefault(effort, set()).add(symbol.removesuffix(suffix))
    assert all(len(s) == 1 for s in shapes.values())  # one shape per effort
    assert len(set().union(*shapes.values())) == len(shapes)  # a different one for each
    verdicts = {t.meta["verdict"] for t in specimen_traces(figure)}
    assert verdicts == {MEETS, DOES_NOT_MEET, NOT_CONCLUSIVE}


def test_compaction_chart_unit_switch(clay):
    analysis = clay[1]
    base = charts.compaction_conductivity_figure(analysis)
    switched = charts.compaction_conductivity_figure(analysis, "cm/s", "kN/m3")
    assert switched.layout.yaxis.title.text == "dry unit weight γd [kN/m³]"
    assert switched.layout.yaxis2.title.text == "hydraulic conductivity k20 [cm/s]"
    assert len(base.data) == len(switched.data)
    for before, after in zip(base.data, switched.data, strict=True):
        scale = KN_PER_MG if before.yaxis == "y" else 100.0  # 1 m/s = 100 cm/s
        np.testing.assert_allclose(after.y, np.asarray(before.y) * scale, rtol=1e-12)
        np.testing.assert_allclose(after.x, before.x)


def test_compaction_chart_needs_water_contents(sand):
    with pytest.raises(ValueError, match="no specimen has a molding water content"):
        charts.compaction_conductivity_figure(sand[1])


def test_input_text_is_escaped_in_labels(wide):
    figure = charts.compaction_conductivity_figure(wide)
    hover = " ".join(h for t in specimen_traces(figure) for h in t.hovertext)
    assert "&lt;b&gt;W0&lt;/b&gt;" in hover and "<b>W0</b>" not in hover


# --- trends ----------------------------------------------------------------------------------


def test_void_ratio_trend_line_band_and_error_bars(wide):
    figure = charts.conductivity_trend_figure(wide, "void_ratio")
    assert figure.layout.xaxis.title.text == "void ratio e [–]"
    assert figure.layout.yaxis.title.text == "hydraulic conductivity k20 [m/s]"
    fit = wide.void_ratio_trend.fit
    line = next(t for t in figure.data if t.name and t.name.startswith("Tavenas line"))
    np.testing.assert_allclose(line.y, 10 ** (fit.intercept + fit.slope * np.asarray(line.x)))
    band = [t for t in figure.data if t.legendgroup == "fit" and t.name != line.name]
    low, high = fit.band(np.asarray(band[0].x))
    np.testing.assert_allclose(band[0].y, 10**low)
    np.testing.assert_allclose(band[1].y, 10**high)
    rows = wide.specimens.set_index("specimen")
    for trace in specimen_traces(figure):
        names = [n.replace("&lt;", "<").replace("&gt;", ">") for n in trace.text]  # escaped
        k = rows.loc[names, "k"].to_numpy()
        np.testing.assert_allclose(trace.error_y.array, 0.6 * k)  # k·1.6 − k
        np.testing.assert_allclose(trace.error_y.arrayminus, k - k / 1.6)


def test_dry_density_trend_in_pounds_per_cubic_foot(clay):
    analysis = clay[1]
    figure = charts.conductivity_trend_figure(analysis, "dry_density", "m/s", "lb/ft3")
    assert figure.layout.xaxis.title.text == "dry density ρd [lb/ft³]"
    rows = analysis.specimens.set_index("specimen")
    for trace in specimen_traces(figure):
        expected = rows.loc[list(trace.text), "dry_density"] / 1000 * LBFT3_PER_MG
        np.testing.assert_allclose(trace.x, expected, rtol=1e-6)


def test_water_content_trend_is_relative_to_optimum(clay):
    analysis = clay[1]
    figure = charts.conductivity_trend_figure(analysis, "water_content_from_optimum", "cm/s")
    assert figure.layout.xaxis.title.text == "water content relative to optimum w − w_opt [%]"
    rows = analysis.specimens.set_index("specimen")
    for trace in specimen_traces(figure):
        names = list(trace.text)
        np.testing.assert_allclose(trace.x, 100 * rows.loc[names, "water_content_from_optimum"])
        np.testing.assert_allclose(trace.y, 100 * rows.loc[names, "k"])


def test_grading_predictions_are_labelled_as_such(sand):
    analysis = sand[1]
    figure = charts.conductivity_trend_figure(analysis, "void_ratio")
    hazen = next(t for t in figure.data if t.name == "Hazen (1892) prediction")
    chapuis = next(t for t in figure.data if t.name == "Chapuis (2004) prediction")
    grading = analysis.grading.set_index("specimen")
    np.testing.assert_allclose(hazen.y, grading.loc[list(hazen.text), "hazen_k"])
    np.testing.assert_allclose(chapuis.y, grading.loc[list(chapuis.text), "chapuis_k"])
    assert hazen.legendgrouptitle.text == "predictions (not measurements)"
    assert any((t.name or "").startswith("Kozeny–Carman") for t in figure.data)
    # The criterion of 1e-9 m/s is five decades below the sand: said, not drawn.
    assert not traces(figure, legendgroup="criterion")
    assert "lies far below the plotted range" in figure.layout.annotations[0].text


def test_trend_refuses_an_unknown_variable(clay):
    with pytest.raises(ValueError, match="against: expected one of void_ratio"):
        charts.conductivity_trend_figure(clay[1], "porosity")


# --- per specimen ----------------------------------------------------------------------------


def test_falling_head_chart(clay):
    series, _ = clay
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    readings = series.falling_head[series.falling_head["specimen"] == "QF-01"]
    record = falling_head_analysis(readings, state.loc["QF-01"], None, (10, 50))
    figure = charts.falling_head_figure(readings, record, "cm/s")
    assert figure.layout.yaxis.type == "log"
    assert figure.layout.yaxis.title.text == "head difference h [m]"
    assert figure.layout.xaxis.title.text == "elapsed time t [h]"  # the record spans hours
    outside = next(t for t in figure.data if t.name == "readings outside the window")
    inside = next(t for t in figure.data if t.name == "readings in the window")
    assert len(outside.x) == len(readings) - 40 and len(inside.x) == 40
    np.testing.assert_allclose(inside.y, readings["head"].to_numpy()[10:50])
    line = next(t for t in figure.data if t.mode == "lines")
    np.testing.assert_allclose(line.y, record.fitted_head)
    window = figure.layout.shapes[0]
    time = readings["time"].to_numpy()
    assert (window.x0, window.x1) == pytest.approx((time[10] / 3600, time[49] / 3600))
    assert "cm/s" in figure.layout.title.text


def test_falling_head_chart_takes_the_plain_reduction_too(clay):
    series, _ = clay
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    readings = series.falling_head[series.falling_head["specimen"] == "QF-03"]
    result = reduce_falling_head(readings, state.loc["QF-03"])
    figure = charts.falling_head_figure(readings, result)
    line = next(t for t in figure.data if t.mode == "lines")
    np.testing.assert_allclose(line.y, np.exp(result.fit.predict(result.reference_time)))


def test_long_records_are_decimated():
    n = 200_000
    time = np.linspace(0.0, 4e5, n)
    rng = np.random.default_rng(3)
    head = 1.5 * np.exp(-time / 2e5) + rng.normal(0, 1e-3, n)
    head[123_457] = 2.0  # a spike that must survive
    readings = pd.DataFrame({"time": time, "head": head})
    result = SimpleNamespace(
        specimen="long",
        start=1000,
        stop=n,
        fitted_head=1.5 * np.exp(-time[1000:] / 2e5),
        k_reference=1e-9,
        k_reference_low=0.9e-9,
        k_reference_high=1.1e-9,
    )
    figure = charts.falling_head_figure(readings, result)
    assert all(len(t.x) <= charts.MAX_TRACE_POINTS for t in figure.data)
    inside = next(t for t in figure.data if t.name == "readings in the window")
    assert max(inside.y) == 2.0 and min(inside.y) == head[1000:].min()


def test_constant_head_chart(sand):
    series, _ = sand
    state = specimen_state(series.specimens)
    collections = collection_table(series.constant_head, state)
    record = constant_head_analysis(
        collections, state.set_index("specimen", drop=False).loc["DL-A"]
    )
    for unit, scale in (("m/s", 1.0), ("cm/s", 100.0)):
        figure = charts.constant_head_figure(record, unit)
        assert figure.layout.xaxis.title.text == "hydraulic gradient i [–]"
        assert (
            figure.layout.yaxis.title.text == f"Darcy velocity at 20 °C, v·R<sub>T</sub> [{unit}]"
        )
        points = next(t for t in figure.data if t.name == "timed collections")
        rows = record.result.collections
        np.testing.assert_allclose(points.x, rows["gradient"])
        expected = rows["darcy_velocity"] * rows["viscosity_ratio"] * scale
        np.testing.assert_allclose(points.y, expected)
        line = next(t for t in figure.data if t.name == "v = k·i through the origin")
        np.testing.assert_allclose(line.y, record.k_reference * np.asarray(line.x) * scale)


# --- style and captions ----------------------------------------------------------------------


def test_caption_carries_the_cautions_on_a_copy(clay):
    figure = charts.conductivity_trend_figure(clay[1], "void_ratio")
    captioned = charts.add_caption(figure, CAUTIONS)
    assert len(figure.layout.annotations) == 0 and len(captioned.layout.annotations) == 1
    text = captioned.layout.annotations[0].text.replace("<br>", " ")
    for caution in CAUTIONS:
        assert caution in text
    assert captioned.layout.height > (figure.layout.height or charts.HEIGHT)


def test_memo_style_is_applied(clay):
    figure = charts.conductivity_trend_figure(clay[1], "dry_density")
    assert isinstance(figure, go.Figure)
    assert "DejaVu Serif" in figure.layout.template.layout.font.family
    assert figure.layout.template.layout.legend.traceorder == "grouped"


def test_caption_goes_above_the_plot_when_the_legend_is_below(clay):
    figure = charts.compaction_conductivity_figure(clay[1])
    captioned = charts.add_caption(figure, CAUTIONS)
    note = captioned.layout.annotations[-1]
    assert (note.y, note.yanchor) == (1.0, "bottom")  # between the title and the plot
    assert captioned.layout.margin.t > figure.layout.margin.t
    assert captioned.layout.margin.b == figure.layout.margin.b
