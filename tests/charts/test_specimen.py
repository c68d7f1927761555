"""The specimen charts: falling head on a log head axis, constant head through the origin."""

from types import SimpleNamespace

import numpy as np
import pandas as pd
import pytest
from chart_series import sample_series

from kitchen.charts import specimen as specimen_charts
from kitchen.charts import style as chart_style
from kitchen.reduction import (
    collection_table,
    constant_head_analysis,
    falling_head_analysis,
)
from kitchen.specimen import specimen_state


@pytest.fixture(scope="module")
def clay():
    return sample_series("clay_liner")


@pytest.fixture(scope="module")
def sand():
    return sample_series("drainage_sand")


# --- per specimen ----------------------------------------------------------------------------


def test_falling_head_chart(clay):
    series, _ = clay
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    readings = series.falling_head[series.falling_head["specimen"] == "QF-01"]
    record = falling_head_analysis(readings, state.loc["QF-01"], None, (10, 50))
    figure = specimen_charts.falling_head_figure(readings, record, "cm/s")
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


def whole_record(clay, specimen: str, fit: str):
    """One specimen of the invented clay, every reading, reduced by `fit`."""
    series, _ = clay
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    readings = series.falling_head[series.falling_head["specimen"] == specimen]
    return readings, falling_head_analysis(
        readings, state.loc[specimen], window=(0, len(readings)), fit=fit
    )


def test_falling_head_chart_draws_the_log_linear_fit(clay):
    readings, result = whole_record(clay, "QF-03", "log_linear")
    figure = specimen_charts.falling_head_figure(readings, result)
    line = next(t for t in figure.data if t.mode == "lines")
    np.testing.assert_allclose(line.y, np.exp(result.line.predict(result.reference_time)))


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
    figure = specimen_charts.falling_head_figure(readings, result)
    assert all(len(t.x) <= chart_style.MAX_TRACE_POINTS for t in figure.data)
    inside = next(t for t in figure.data if t.name == "readings in the window")
    assert max(inside.y) == 2.0 and min(inside.y) == head[1000:].min()


def test_a_kept_decimation_draws_every_window_as_a_fresh_one_does():
    # a panel keeps one decimation of the record and draws each window from it: the spec is
    # the one built from scratch, the window's and the outside readings together about
    # max_points, the axis over the record's lowest and highest head; the fitted line is
    # sampled at evenly spaced readings, both ends included
    n = 100_000
    time = np.arange(n, dtype=float)
    rng = np.random.default_rng(5)
    head = 1.2 * np.exp(-time / 3e5) + rng.normal(0, 2e-4, n)
    readings = pd.DataFrame({"time": time, "head": head})
    kept = chart_style.WindowDecimation(head, 1000)
    for start, stop in [(0, n), (250, 99_000), (40_000, 40_003)]:
        result = SimpleNamespace(
            specimen="long",
            start=start,
            stop=stop,
            fitted_head=1.2 * np.exp(-time[start:stop] / 3e5),
            k_reference=1e-9,
            k_reference_low=0.9e-9,
            k_reference_high=1.1e-9,
        )
        fresh = specimen_charts.falling_head_spec(readings, result, max_points=1000)
        spec = specimen_charts.falling_head_spec(readings, result, max_points=1000, decimation=kept)
        for ours, theirs in zip(spec["data"], fresh["data"], strict=True):
            np.testing.assert_array_equal(ours["x"], theirs["x"])
            np.testing.assert_array_equal(ours["y"], theirs["y"])
        assert spec["layout"]["yaxis"] == fresh["layout"]["yaxis"]
        markers = [t for t in spec["data"] if t["mode"] == "markers"]
        assert (
            sum(len(t["x"]) for t in markers) <= 1000 + 8
        )  # ends of three ranges, two cut buckets
        low, high = spec["layout"]["yaxis"]["range"]
        assert low < np.log10(head.min()) and high > np.log10(head.max())
        thin = specimen_charts.falling_head_spec(
            readings, result, max_points=1000, decimation=kept, line_points=50
        )
        line = next(t for t in thin["data"] if t["mode"] == "lines")
        assert len(line["x"]) == min(50, stop - start)
        hours = np.asarray(line["x"]) * 3600  # the record spans 28 h: the axis is in hours
        assert hours[0] == pytest.approx(time[start]) and hours[-1] == pytest.approx(time[stop - 1])
        np.testing.assert_allclose(line["y"], 1.2 * np.exp(-hours / 3e5))
    with pytest.raises(ValueError, match="decimation of 100000 readings at 1000 points given "):
        specimen_charts.falling_head_spec(readings.iloc[:10], result, decimation=kept)


def test_constant_head_chart(sand):
    series, _ = sand
    state = specimen_state(series.specimens)
    collections = collection_table(series.constant_head, state)
    record = constant_head_analysis(
        collections, state.set_index("specimen", drop=False).loc["DL-A"]
    )
    for unit, scale in (("m/s", 1.0), ("cm/s", 100.0)):
        figure = specimen_charts.constant_head_figure(record, unit)
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


@pytest.fixture(scope="module")
def datum_fit(clay):
    """QF-04 of the invented clay, every reading, reduced by the decay to a fitted datum."""
    return whole_record(clay, "QF-04", "datum")


def test_the_datum_fit_keeps_the_head_axis_on_the_readings_and_names_h_infinity(datum_fit):
    # the readings lie between about 1.6 and 3 m and the fitted datum near 1 m (the sample's
    # results)
    readings, result = datum_fit
    assert result.asymptote > 0.5
    figure = specimen_charts.falling_head_figure(readings, result)
    low, high = figure.layout.yaxis.range  # log10 of metres
    heads = readings["head"].to_numpy()
    assert low <= np.log10(min(heads.min(), result.asymptote)) and high >= np.log10(heads.max())
    assert 10**high < 1.25 * heads.max()  # no stretch to 10 m
    datum = next(t for t in figure.data if t.name and t.name.startswith("fitted datum h∞"))
    assert f"{result.asymptote:.3f} m" in datum.name
    np.testing.assert_allclose(datum.y, [result.asymptote] * 2)
    # nothing placed in log coordinates by mistake: every annotation sits on the plot
    assert all(a.yref != "y" for a in figure.layout.annotations)


def test_a_datum_far_below_the_readings_is_named_not_drawn(datum_fit):
    readings, result = datum_fit
    far = SimpleNamespace(**{**vars_of(result), "asymptote": 0.01})
    figure = specimen_charts.falling_head_figure(readings, far)
    low, _ = figure.layout.yaxis.range
    assert 10**low > 0.5  # the axis stays on the readings
    datum = next(t for t in figure.data if t.name and t.name.startswith("fitted datum h∞"))
    assert "below the axis" in datum.name and datum.visible == "legendonly"


def vars_of(result) -> dict:
    names = ("specimen", "start", "stop", "fitted_head", "k_reference", "k_reference_low",
             "k_reference_high", "fit_kind", "time", "head")  # fmt: skip
    return {name: getattr(result, name) for name in names}


def test_every_point_names_its_specimen_on_hover(datum_fit):
    readings, result = datum_fit
    figure = specimen_charts.falling_head_figure(readings, result)
    points = [t for t in figure.data if t.mode == "markers"]
    assert points and all("<b>QF-04</b>" in t.hovertemplate for t in points)
