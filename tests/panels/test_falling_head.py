"""The falling-head panel, driven without a browser, against the core's analysis."""

import html

import numpy as np
import pandas as pd
import pytest
from series_files import SAMPLES

from kitchen.charts import MAX_TRACE_POINTS
from kitchen.io import load_series
from kitchen.panels import falling_head_panel
from kitchen.panels.falling_head import LINE_POINTS, SCREEN_POINTS
from kitchen.panels.figures import format_elapsed
from kitchen.reduction import FallingHeadRecord
from kitchen.settings import Settings
from kitchen.specimen import specimen_state


@pytest.fixture(scope="module")
def clay():
    return load_series(SAMPLES / "clay_liner")


def _record(series, specimen, settings=None):
    readings = series.falling_head[series.falling_head["specimen"] == specimen]
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    return FallingHeadRecord(readings.reset_index(drop=True), state.loc[specimen], settings)


def _trace(figure, name):
    return next(trace for trace in figure.data if trace.name == name)


@pytest.fixture()
def panel(clay):
    return falling_head_panel(clay.source, specimen="QF-02")


def test_opens_on_the_window_the_core_proposes(panel, clay):
    expected = _record(clay, "QF-02").analyse(None, "log_linear")
    assert panel.error.message == ""
    assert (panel.analysis.start, panel.analysis.stop) == (expected.start, expected.stop)
    assert panel.window.value == (expected.start, expected.stop - 1)
    assert panel.window.max == 74  # QF-02 has 75 readings (sample_data/README.md)
    assert panel.analysis.k_reference == expected.k_reference
    # QF-02 starts with a transient (sample_data/README.md): the proposal leaves it out
    assert expected.start > 0 and expected.window_proposed
    assert "proposed by the tool" in panel.window_label.value
    assert panel.summary.value.count("kitchen-k'") == 1


def test_moving_the_window_refits_and_redraws(panel, clay):
    record = _record(clay, "QF-02")
    before_k = panel.analysis.k_reference
    before_fit = np.array(_trace(panel.figure, "least-squares line of ln h").y)
    panel.window.value = (0, 40)
    expected = record.analyse((0, 41), "log_linear")
    assert panel.analysis.k_reference == expected.k_reference != before_k
    used = _trace(panel.figure, "readings in the window")
    assert len(used.x) == 41
    np.testing.assert_allclose(used.x, expected.time[:41] / 3600)  # a 6.2 h record: hours
    fitted = np.array(_trace(panel.figure, "least-squares line of ln h").y)
    np.testing.assert_allclose(fitted, expected.fitted_head)
    assert fitted.shape != before_fit.shape
    assert "Readings <b>1</b> to <b>41</b>" in panel.window_label.value
    assert f"t = 0 s to {format_elapsed(expected.time[40])}" in panel.window_label.value
    shown_k = panel.summary.value.split("kitchen-k'>")[1].split("<")[0]
    assert shown_k == f"{expected.k_reference / 1e-9:.2f} × 10⁻⁹ m/s"
    # the transient in the first readings makes k of the early window higher
    assert expected.k_reference > before_k * 1.01


def test_incremental_k_and_verdicts_follow_the_window(panel, clay):
    panel.window.value = (10, 60)
    expected = _record(clay, "QF-02").analyse((10, 61), "log_linear")
    judged = next(t for t in panel.increments.data if t.name.startswith("values judged"))
    np.testing.assert_allclose(judged.y, expected.value_k)
    line = next(t for t in panel.increments.data if "of the window" in t.name)
    assert line.y == pytest.approx((expected.k_reference, expected.k_reference))
    for verdict in expected.verdicts:
        assert html.escape(verdict.sentence) in panel.summary.value


def test_switching_to_the_datum_fit(panel, clay):
    window = panel.window.value
    panel.fit_choice.value = "datum"
    expected = _record(clay, "QF-02").analyse((window[0], window[1] + 1), "datum")
    assert panel.analysis.fit_kind == "datum"
    assert panel.analysis.k_reference == expected.k_reference
    assert panel.window.value == window  # the window stays
    curve = _trace(panel.figure, "decay to a fitted datum h∞")
    np.testing.assert_allclose(curve.y, expected.fitted_head)
    assert "h∞ =" in panel.summary.value
    panel.fit_choice.value = "log_linear"
    assert panel.analysis.fit_kind == "log_linear"


def test_propose_button_and_specimen_choice(panel, clay):
    panel.window.value = (0, 74)
    assert not panel.analysis.window_proposed
    panel.propose.click()
    assert panel.analysis.window_proposed
    panel.specimen.value = "QF-14"
    expected = _record(clay, "QF-14").analyse(None, "log_linear")
    assert panel.window.max == 26  # 27 readings
    assert panel.window.value == (expected.start, expected.stop - 1)
    assert panel.analysis.specimen == "QF-14"
    assert panel.figure.layout.title.text.startswith("Specimen QF-14")


def test_a_window_too_short_is_refused_in_words(panel):
    k = panel.analysis.k_reference
    panel.window.value = (5, 5)
    assert "needs at least two" in panel.error.message
    assert panel.analysis.k_reference == k  # the last good analysis stays shown
    panel.window.value = (5, 30)
    assert panel.error.message == ""


def test_settings_reach_the_analysis(clay):
    settings = Settings(reference_temperature=10.0)
    panel = falling_head_panel(clay.source, settings=settings, specimen="QF-01")
    expected = _record(clay, "QF-01", settings).analyse(None, "log_linear")
    assert panel.analysis.k_reference == expected.k_reference
    assert "<b>k10</b>" in panel.summary.value


def test_bad_choices_are_refused():
    with pytest.raises(ValueError, match="no falling-head readings"):
        falling_head_panel(SAMPLES / "drainage_sand")
    with pytest.raises(ValueError, match="choose one of QF-01"):
        falling_head_panel(SAMPLES / "clay_liner", specimen="DL-A")


@pytest.fixture(scope="module")
def logged(tmp_path_factory):
    """A logger-scale record: 60 000 readings, one a second, an exact exponential fall."""
    folder = tmp_path_factory.mktemp("logged")
    (folder / "specimens.csv").write_text(
        "specimen,diameter [mm],height [mm],dry_mass [g],specific_gravity,"
        "water_content [%],standpipe_diameter [mm]\n"
        "LG-1,101.6,116.4,1580.0,2.70,18.0,2.0\n"
    )
    time = np.arange(60_000, dtype=float)
    head = 1.5 * np.exp(-time / 200_000.0)  # time constant 200 000 s
    pd.DataFrame(
        {"specimen": "LG-1", "time [s]": time, "head [m]": head, "temperature [degC]": 20.0}
    ).to_csv(folder / "falling_head.csv", index=False, float_format="%.12g")
    return folder


def test_large_record_is_drawn_decimated_and_fitted_in_full(logged):
    panel = falling_head_panel(logged)
    panel.window.value = (1_000, 59_999)
    assert panel.analysis.n == 59_000
    for figure in (panel.figure, panel.increments):
        assert max(len(trace.x) for trace in figure.data) <= MAX_TRACE_POINTS
    # two points a pixel column of the plot: the readings in the window and those outside
    # it share the record's buckets
    markers = [t for t in panel.figure.data if t.mode == "markers"]
    assert sum(len(t.x) for t in markers) <= SCREEN_POINTS + 8
    line = next(t for t in panel.figure.data if t.mode == "lines")
    assert len(line.x) == LINE_POINTS
    # ln h falls at rate k·A/(a·L) (ASTM D5084 Method B): k = a·L/(A·τ); at 20 degC R_T = 1
    a, area = np.pi * 0.002**2 / 4, np.pi * 0.1016**2 / 4
    assert panel.analysis.k_reference == pytest.approx(a * 0.1164 / (area * 200_000.0), rel=1e-6)


def test_a_slider_step_sends_only_what_changed(logged):
    # one reading later: the head chart's traces and the window's shapes change; the k
    # between readings of a fit of ln h does not depend on the window and is not sent again
    panel = falling_head_panel(logged)
    panel.window.value = (1_000, 59_999)
    sent = {}
    for name in ("figure", "increments"):
        widget = getattr(panel, name)
        plain = widget._send_update_msg

        def record(restyle_data, relayout_data, trace_indexes=None, name=name, plain=plain, **kw):
            sent[name] = (dict(restyle_data), dict(relayout_data), list(trace_indexes or []))
            return plain(restyle_data, relayout_data, trace_indexes, **kw)

        widget._send_update_msg = record
    every = panel.increments.data[0].y
    panel.window.value = (1_001, 59_999)
    assert not panel.error.widget.value  # nothing went wrong on the way
    style, layout, traces = sent["increments"]
    assert 0 not in traces and panel.increments.data[0].y is every
    assert "shapes" in layout  # the window drawn where it now starts
    assert panel.increments.layout.shapes[0].x0 == pytest.approx(1_001 / 3600)
    style, layout, traces = sent["figure"]
    assert set(style) == {"x", "y"} and "title" in layout
    inside = _trace(panel.figure, "readings in the window")
    assert inside.x[0] == pytest.approx(1_001 / 3600)  # the record spans 16.7 h


def _standpipe_area(diameter_mm):
    return np.pi * diameter_mm**2 / 4  # A = πD²/4 (Das & Sobhan, phase relations) [mm²]


def test_the_panel_says_what_the_test_was_with_two_burettes(clay):
    # QF-09: standpipe 1.2 mm, tailwater burette 1.5 mm, height 116.52 mm, diameter from
    # sample_data/clay_liner/specimens.csv
    panel = falling_head_panel(clay.source, specimen="QF-09")
    text = html.unescape(panel.test_view.value)
    a_in, a_out = _standpipe_area(1.2), _standpipe_area(1.5)
    a = a_in * a_out / (a_in + a_out)  # ASTM D5084 Method C (from memory)
    assert "rising tailwater with two burettes" in text
    assert f"a_in = {a_in:.4g} mm²" in text and f"a_out = {a_out:.4g} mm²" in text
    assert f"a = a_in·a_out/(a_in + a_out) = {a:.4g} mm²" in text
    assert "L = 116.5 mm" in text
    row = clay.specimens.set_index("specimen").loc["QF-09"]
    assert f"A = {np.pi * (row['diameter'] * 1e3) ** 2 / 4:.4g} mm²" in text
    assert "k = a_in·a_out·L/((a_in + a_out)·A·Δt)·ln(Δh1/Δh2)" in text
    assert "k = −m·a·L/A" in text
    panel.fit_choice.value = "datum"
    assert "k = a·L/(A·τ)" in html.unescape(panel.test_view.value)


def test_the_panel_says_what_the_test_was_with_one_standpipe(clay):
    panel = falling_head_panel(clay.source, specimen="QF-01")  # standpipe 5.0 mm, no burette
    text = html.unescape(panel.test_view.value)
    assert "constant tailwater" in text and "a_in" not in text
    assert f"a = {_standpipe_area(5.0):.4g} mm²" in text
    assert "k = a·L/(A·Δt)·ln(h1/h2)" in text


def test_no_window_proposed_is_claimed_when_none_met_every_criterion(clay):
    # QF-04 drifts over its whole record (sample_data/README.md): no window is valid
    panel = falling_head_panel(clay.source, specimen="QF-04")
    assert not panel.analysis.valid and panel.analysis.window_proposed
    assert "window proposed by the tool" not in panel.window_label.value
    assert "no window met every criterion" in panel.window_label.value
    assert "proposed by the tool (it meets every criterion)" in (
        falling_head_panel(clay.source, specimen="QF-02").window_label.value
    )


def test_no_internal_option_name_in_the_text(clay):
    from kitchen.panels import constant_head_panel
    from kitchen.settings import Settings

    for viscosity in ("kestin", "iapws", "d5084"):
        settings = Settings(viscosity=viscosity)
        falling = falling_head_panel(clay.source, settings, specimen="QF-09")
        constant = constant_head_panel(SAMPLES / "drainage_sand", settings)
        shown = (falling.window_label, falling.test_view, falling.summary, falling.choice_label)
        for text in (*(view.value for view in shown), constant.summary.value):
            assert f"{viscosity} viscosity" not in text
            assert "log_linear" not in text and "first_order" not in text
