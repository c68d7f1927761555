"""The constant-head panel, driven without a browser, against the core's reduction."""

import html

import numpy as np
import pytest
from series_files import SAMPLES

from kitchen.io import load_series
from kitchen.panels import constant_head_panel
from kitchen.reduction import collection_table, constant_head_analysis
from kitchen.specimen import specimen_state


@pytest.fixture(scope="module")
def sand():
    return load_series(SAMPLES / "drainage_sand")


@pytest.fixture(scope="module")
def collections(sand):
    return collection_table(sand.constant_head, specimen_state(sand.specimens))


@pytest.fixture()
def panel(sand):
    return constant_head_panel(sand.source)


def _trace(panel, name):
    return next(trace for trace in panel.figure.data if trace.name == name)


def _expected(sand, collections, specimen):
    state = specimen_state(sand.specimens).set_index("specimen", drop=False)
    return constant_head_analysis(collections, state.loc[specimen])


def test_first_specimen_shows_the_core_fit(panel, sand, collections):
    expected = _expected(sand, collections, "DL-A")
    assert panel.error.message == ""
    assert panel.analysis.k_reference == expected.k_reference
    assert panel.analysis.k_reference_high == expected.k_reference_high
    points = _trace(panel, "timed collections")
    rows = expected.result.collections
    np.testing.assert_allclose(points.x, rows["gradient"])
    np.testing.assert_allclose(points.y, rows["darcy_velocity"] * rows["viscosity_ratio"])
    line = _trace(panel, "v = k·i through the origin")
    assert line.y[1] / line.x[1] == pytest.approx(expected.k_reference, rel=1e-12)
    assert "2.63 × 10⁻⁴ m/s" in panel.summary.value  # the generator's DL-A: 2.63e-04 m/s


def test_choosing_a_specimen_redraws_in_place(panel, sand, collections):
    before = panel.figure.data[-1]
    panel.specimen.value = "DL-C"
    expected = _expected(sand, collections, "DL-C")
    assert panel.analysis.k_reference == expected.k_reference
    assert len(_trace(panel, "timed collections").x) == expected.n == 8
    assert panel.figure.data[-1] is before  # same traces, new data
    assert f"spread up to {100 * expected.result.spread:.1f} %" in panel.summary.value
    for verdict in expected.verdicts:
        assert html.escape(verdict.sentence) in panel.summary.value
    assert panel.collections.value.count("<tr>") == 1 + 8  # header and one row a collection


def test_k_unit_switch_scales_the_velocity_axis(panel):
    metres = np.array(_trace(panel, "timed collections").y)
    panel.k_unit.value = "cm/s"
    np.testing.assert_allclose(_trace(panel, "timed collections").y, metres * 100)
    assert "[cm/s]" in panel.figure.layout.yaxis.title.text
    assert "× 10⁻² cm/s" in panel.summary.value


def test_series_without_collections_is_refused_in_words():
    with pytest.raises(ValueError, match="has no constant-head collections"):
        constant_head_panel(SAMPLES / "clay_liner")


def test_unknown_specimen_is_refused_with_the_choices(sand):
    with pytest.raises(ValueError, match="choose one of DL-A, DL-B, DL-C, DL-D"):
        constant_head_panel(sand.source, specimen="QF-01")
