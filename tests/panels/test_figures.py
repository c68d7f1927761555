"""Figures only the panels draw: the incremental k of a falling-head record."""

import numpy as np
import pytest
from series_files import SAMPLES

from kitchen.io import load_series
from kitchen.panels.figures import format_elapsed, increments_figure
from kitchen.reduction import FallingHeadRecord
from kitchen.settings import Settings
from kitchen.specimen import specimen_state
from kitchen.validity import Criteria


@pytest.fixture(scope="module")
def record():
    series = load_series(SAMPLES / "clay_liner")
    readings = series.falling_head[series.falling_head["specimen"] == "QF-05"]
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    return FallingHeadRecord(readings.reset_index(drop=True), state.loc["QF-05"])


@pytest.mark.parametrize(
    ("seconds", "text"), [(45.0, "45 s"), (600.0, "10.0 min"), (36_000.0, "10.00 h")]
)
def test_elapsed_time_in_words(seconds, text):
    assert format_elapsed(seconds) == text


def test_increments_follow_the_analysis(record):
    analysis = record.analyse((5, 41), "log_linear")
    figure = increments_figure(analysis, Settings())
    every, judged, line = figure.data[:3]
    np.testing.assert_allclose(every.y, analysis.increment_k)
    np.testing.assert_allclose(judged.y, analysis.value_k)
    assert line.y == pytest.approx((analysis.k_reference, analysis.k_reference))
    # QF-05 runs 10 h (sample_data/README.md): the time axis is in hours
    np.testing.assert_allclose(every.x, analysis.increment_time / 3600)
    window, band = figure.layout.shapes
    assert window.x0 == pytest.approx(analysis.time[5] / 3600)
    # the steady band: ±25 % of k, ±50 % below 1e-10 m/s (ASTM D5084, from memory)
    k = analysis.k_reference
    assert (band.y0, band.y1) == pytest.approx((0.75 * k, 1.25 * k))


def test_band_follows_the_criteria_setting(record):
    settings = Settings(criteria=Criteria(steady_tolerance=0.10))
    analysis = record.analyse(None, "log_linear")
    band = increments_figure(analysis, settings, "cm/s").layout.shapes[1]
    k = analysis.k_reference * 100
    assert (band.y0, band.y1) == pytest.approx((0.9 * k, 1.1 * k))
    assert "[cm/s]" in increments_figure(analysis, settings, "cm/s").layout.yaxis.title.text


@pytest.mark.parametrize("window", [(0, 41), (5, 41), None])
def test_no_increment_leaves_the_chart_silently(record, window):
    # every finite incremental k is either inside the axis or drawn on its edge and counted
    analysis = record.analyse(window, "log_linear")
    figure = increments_figure(analysis, Settings())
    bottom, top = figure.layout.yaxis.range
    values = np.asarray(analysis.increment_k, dtype=float)
    values = values[np.isfinite(values)]
    above, below = int(np.sum(values > top)), int(np.sum(values < bottom))
    edges = {t.name: t for t in figure.data[3:]}
    assert sum(1 for name in edges if "above the axis" in name) == (above > 0)
    assert sum(1 for name in edges if "below the axis" in name) == (below > 0)
    for name, trace in edges.items():
        count = above if "above" in name else below
        assert name.startswith(f"{count} value")
        assert set(trace.y) == {top if "above" in name else bottom}


def test_off_scale_values_are_counted_and_kept_on_the_edge():
    from kitchen.panels.figures import off_scale_traces

    traces = off_scale_traces([1, 2, 3, 4, 5], [1.0, 9.0, 2.0, -5.0, 12.0], 0.0, 5.0)
    above, below = traces
    assert above["name"].startswith("2 values above")
    assert list(above["customdata"]) == [9.0, 12.0]
    assert below["name"].startswith("1 value below") and list(below["y"]) == [0.0]
    assert off_scale_traces([1], [np.nan], 0.0, 5.0) == []


def test_off_scale_values_of_a_decimated_record_mark_every_bucket_and_count_every_value():
    # a noisy record of 10^5 readings, most values beyond the axis: a marker on the edge for
    # each bucket holding a value beyond it, its most extreme one; the names count them all
    from kitchen.charts import WindowDecimation
    from kitchen.panels.figures import off_scale_traces

    rng = np.random.default_rng(11)
    x = np.arange(100_000.0)
    y = rng.normal(size=x.size)
    y[[10, 20_000]] = 9.0  # in buckets 0 and 40 (200 buckets of 500 readings, 402 points)
    keep = WindowDecimation(y, 402).indices()
    above, below = off_scale_traces(x, y, -0.5, 0.5, keep)
    assert above["name"].startswith(f"{int(np.sum(y > 0.5))} values above")
    assert below["name"].startswith(f"{int(np.sum(y < -0.5))} values below")
    for trace, top in ((above, True), (below, False)):
        buckets = (np.asarray(trace["x"]) // 500).astype(int)
        assert np.array_equal(np.unique(buckets), np.arange(200))  # every bucket has one
        for bucket in (0, 40, 199):  # ...and it is the bucket's extreme, found here anew
            part = y[bucket * 500 : (bucket + 1) * 500]
            shown = np.asarray(trace["customdata"])[buckets == bucket]
            assert (part.max() if top else part.min()) in shown
    assert 9.0 in above["customdata"]


def test_off_scale_markers_one_a_column_where_they_would_crowd_an_edge():
    # 10^4 values, every one beyond the axis (above or below): with 50 columns each edge
    # gets one marker a column, the column's most extreme value, found here column by column
    from kitchen.panels.figures import off_scale_traces

    rng = np.random.default_rng(4)
    x = np.linspace(0.0, 99.99, 10_000)
    y = rng.choice([-1.0, 1.0], x.size) * (1.0 + rng.random(x.size))
    above, below = off_scale_traces(x, y, -0.5, 0.5, columns=50)
    assert above["name"].startswith(f"{int(np.sum(y > 0.5))} values above")
    for trace, top in ((above, True), (below, False)):
        assert len(trace["x"]) == 50
        column = np.minimum((np.asarray(trace["x"]) / 2).astype(int), 49)  # 2 units a column
        assert np.array_equal(column, np.arange(50))
        for c in (0, 17, 49):
            part = y[(x >= 2 * c) & (x < 2 * c + 2)] if c < 49 else y[x >= 98]
            part = part[part > 0.5] if top else part[part < -0.5]
            assert trace["customdata"][c] == (part.max() if top else part.min())
    assert len(off_scale_traces(x[:40], y[:40], -0.5, 0.5, columns=50)[0]["x"]) == np.sum(
        y[:40] > 0.5
    )  # fewer than the columns: every one
