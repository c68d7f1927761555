"""The trend chart: log k against void ratio, dry density and water content, and predictions."""

import numpy as np
import pytest
from chart_series import LBFT3_PER_MG, sample_series, specimen_traces, traces, wide_analysis

from kitchen.charts import conductivity_trend as conductivity_trend_chart


@pytest.fixture(scope="module")
def clay():
    return sample_series("clay_liner")


@pytest.fixture(scope="module")
def sand():
    return sample_series("drainage_sand")


@pytest.fixture(scope="module")
def wide():
    return wide_analysis()


# --- trends ----------------------------------------------------------------------------------


def test_void_ratio_trend_line_band_and_error_bars(wide):
    figure = conductivity_trend_chart.conductivity_trend_figure(wide, "void_ratio")
    assert figure.layout.xaxis.title.text == "void ratio e [–]"
    assert figure.layout.yaxis.title.text == "hydraulic conductivity k20 [m/s]"
    fit = wide.void_ratio_trend.fit
    line = next(t for t in figure.data if t.name and t.name.startswith("Tavenas line"))
    np.testing.assert_allclose(line.y, 10 ** (fit.intercept + fit.slope * np.asarray(line.x)))
    # the constructed series scatters about its line (r² = 0.13): a weak fit, drawn faint,
    # without its band, its r² stated
    assert fit.r_squared < 0.25 and line.opacity < 1 and "weak fit" in line.name
    assert f"r² = {fit.r_squared:.2f}" in line.name
    assert not [t for t in figure.data if t.legendgroup == "fit" and t.name != line.name]
    rows = wide.specimens.set_index("specimen")
    for trace in specimen_traces(figure):
        names = [n.replace("&lt;", "<").replace("&gt;", ">") for n in trace.text]  # escaped
        k = rows.loc[names, "k"].to_numpy()
        np.testing.assert_allclose(trace.error_y.array, 0.6 * k)  # k·1.6 − k
        np.testing.assert_allclose(trace.error_y.arrayminus, k - k / 1.6)


def test_dry_density_trend_in_pounds_per_cubic_foot(clay):
    analysis = clay[1]
    figure = conductivity_trend_chart.conductivity_trend_figure(
        analysis, "dry_density", "m/s", "lb/ft3"
    )
    assert figure.layout.xaxis.title.text == "dry density ρd [lb/ft³]"
    rows = analysis.specimens.set_index("specimen")
    for trace in specimen_traces(figure):
        expected = rows.loc[list(trace.text), "dry_density"] / 1000 * LBFT3_PER_MG
        np.testing.assert_allclose(trace.x, expected, rtol=1e-6)


def test_water_content_trend_is_relative_to_optimum(clay):
    analysis = clay[1]
    figure = conductivity_trend_chart.conductivity_trend_figure(
        analysis, "water_content_from_optimum", "cm/s"
    )
    assert figure.layout.xaxis.title.text == "water content relative to optimum w − w_opt [%]"
    rows = analysis.specimens.set_index("specimen")
    for trace in specimen_traces(figure):
        names = list(trace.text)
        np.testing.assert_allclose(trace.x, 100 * rows.loc[names, "water_content_from_optimum"])
        np.testing.assert_allclose(trace.y, 100 * rows.loc[names, "k"])


def test_grading_predictions_are_labelled_as_such(sand):
    analysis = sand[1]
    figure = conductivity_trend_chart.conductivity_trend_figure(analysis, "void_ratio")
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
        conductivity_trend_chart.conductivity_trend_figure(clay[1], "porosity")


def test_a_strong_trend_is_drawn_with_its_band(clay):
    # the invented clay's log k against w − w_opt: r² = 0.88 (the sample's results)
    analysis = clay[1]
    fit = analysis.water_content_trend.fit
    assert fit.r_squared > 0.25
    figure = conductivity_trend_chart.conductivity_trend_figure(
        analysis, "water_content_from_optimum"
    )
    group = [t for t in figure.data if t.legendgroup == "fit"]
    line = next(t for t in group if (t.name or "").startswith("log-linear"))
    assert line.opacity in (None, 1.0) and "weak" not in line.name
    band = [t for t in group if t is not line]
    low, high = fit.band(np.asarray(band[0].x) / 100)
    np.testing.assert_allclose(band[0].y, 10**low)
    np.testing.assert_allclose(band[1].y, 10**high)


def test_a_trend_with_r_squared_near_zero_is_faint_on_the_sample(clay):
    # the invented clay's log k against e: r² = 0.01, three efforts on one plane
    figure = conductivity_trend_chart.conductivity_trend_figure(clay[1], "void_ratio")
    line = next(t for t in figure.data if t.name and t.name.startswith("Tavenas line"))
    assert line.opacity < 1 and "r² = 0.01" in line.name and "drawn faint" in line.name
