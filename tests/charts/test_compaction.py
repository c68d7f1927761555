"""The compaction–conductivity chart: its data and labels (not pixels), and its units."""

import numpy as np
import pytest
from chart_series import KN_PER_MG, sample_series, specimen_traces

from kitchen.analysis import (
    NO_CRITERION,
    NOT_JUDGED,
    Criterion,
    analyse_series,
    zero_air_voids_dry_density,
)
from kitchen.charts import compaction as compaction_chart
from kitchen.charts import conductivity_trend as conductivity_trend_chart
from kitchen.charts import style as chart_style
from kitchen.reduction import series_results


@pytest.fixture(scope="module")
def clay():
    return sample_series("clay_liner")


@pytest.fixture(scope="module")
def sand():
    return sample_series("drainage_sand")


# --- the compaction–conductivity chart ------------------------------------------------------


def test_compaction_chart_axes_share_water_content(clay):
    figure = compaction_chart.compaction_conductivity_figure(clay[1])
    layout = figure.layout
    assert layout.xaxis.matches == "x2"  # the two panels share the w axis
    assert layout.xaxis2.title.text == "molding water content w [%]"
    assert layout.yaxis.title.text == "dry density ρd [Mg/m³]"
    assert layout.yaxis2.title.text == "hydraulic conductivity k20 [m/s]"
    assert layout.yaxis2.type == "log"


def test_compaction_chart_points_and_lines(clay):
    series, analysis = clay
    figure = compaction_chart.compaction_conductivity_figure(analysis)
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


def test_compaction_chart_unit_switch(clay):
    analysis = clay[1]
    base = compaction_chart.compaction_conductivity_figure(analysis)
    switched = compaction_chart.compaction_conductivity_figure(analysis, "cm/s", "kN/m3")
    assert switched.layout.yaxis.title.text == "dry unit weight γd [kN/m³]"
    assert switched.layout.yaxis2.title.text == "hydraulic conductivity k20 [cm/s]"
    assert len(base.data) == len(switched.data)
    for before, after in zip(base.data, switched.data, strict=True):
        scale = KN_PER_MG if before.yaxis == "y" else 100.0  # 1 m/s = 100 cm/s
        np.testing.assert_allclose(after.y, np.asarray(before.y) * scale, rtol=1e-12)
        np.testing.assert_allclose(after.x, before.x)


def test_compaction_chart_needs_water_contents(sand):
    with pytest.raises(ValueError, match="no specimen has a molding water content"):
        compaction_chart.compaction_conductivity_figure(sand[1])


def test_compaction_chart_draws_both_zones_told_apart(clay):
    analysis = clay[1]
    fitted = analysis.fitted_zone
    drawn_parts = [part for part in fitted.zones if part.region.size]
    assert drawn_parts and fitted.next_specimen is not None
    figure = compaction_chart.compaction_conductivity_figure(analysis)
    drawn = next(t for t in figure.data if t.legendgroup == "zone")
    group = [t for t in figure.data if t.legendgroup == "fitted zone"]
    regions = [t for t in group if t.name.startswith("fitted zone")]
    assert len(regions) == len(drawn_parts)
    for trace, part in zip(regions, drawn_parts, strict=True):
        assert f"({part.effort})" in trace.name
        np.testing.assert_allclose(np.asarray(trace.x)[:-1] / 100, part.region[:, 0])
        np.testing.assert_allclose(np.asarray(trace.y)[:-1] * 1000, part.region[:, 1])
    lines = [t for t in group if t.name.endswith("prediction = criterion")]
    crossing = [part for part in fitted.zones if part.criterion_line is not None]
    assert len(lines) == len(crossing) >= 1
    for trace, part in zip(lines, crossing, strict=True):
        np.testing.assert_allclose(np.asarray(trace.x) / 100, part.criterion_line[:, 0])
    spot = next(t for t in group if t.mode == "markers")
    assert spot.x[0] == pytest.approx(100 * fitted.next_specimen.water_content)
    # told apart in the legend and without colour: names, fill patterns and edges
    assert drawn.name.startswith("drawn zone") and "no other inside" in drawn.name
    region = regions[0]
    assert "upper 95 % prediction bound meets the criterion" in region.name
    assert "tool's own" in region.legendgrouptitle.text
    assert drawn.fillpattern.shape == "/" and region.fillpattern.shape == "."
    assert drawn.line.color != region.line.color


def test_without_a_criterion_no_line_no_zone_and_markers_by_validity(clay):
    # no criterion given: nothing to draw a zone or a line from; QF-04 fails its trend check
    # by design (sample_data/README.md), so the markers tell valid from not judged alone
    series, _ = clay
    bare = analyse_series(series_results(series))
    figure = compaction_chart.compaction_conductivity_figure(bare)
    names = [t.name or "" for t in figure.data]
    assert not any(n.startswith(("criterion", "drawn zone", "fitted")) for n in names)
    assert {t.meta["verdict"] for t in specimen_traces(figure)} == {NO_CRITERION, NOT_JUDGED}
    assert "no criterion given" in figure.layout.title.text
    trend = conductivity_trend_chart.conductivity_trend_figure(bare, "void_ratio")
    assert not any((t.name or "").startswith("criterion") for t in trend.data)
    assert not any(a.text and "criterion" in a.text for a in trend.layout.annotations)


def test_the_drawn_zone_says_at_most_or_at_least_as_the_criterion_goes(clay):
    # a smallest k of 1e-9 m/s turns the clay series round: the wet-of-optimum specimens no
    # longer meet, the dry ones do, and the zone is where k is at least the criterion
    series, analysis = clay
    flipped = analyse_series(series_results(series), Criterion(1e-9, "minimum"))
    for each, words in ((analysis, "(k at most the criterion)"), (flipped, "(k at least")):
        figure = compaction_chart.compaction_conductivity_figure(each)
        [drawn] = [t for t in figure.data if (t.name or "").startswith("drawn zone")]
        assert words in drawn.name


def test_each_family_of_lines_has_line_codes_of_its_own(clay):
    # read in greyscale print: the saturation lines, the compaction curves, the line of
    # optimums and each zone's border share no dash code (common practice, no source)
    figure = compaction_chart.compaction_conductivity_figure(clay[1])
    lines = [t for t in figure.data if t.mode == "lines" and t.yaxis in (None, "y")]
    families = {
        "saturation": {t.line.dash for t in lines if t.legendgroup == "saturation"},
        "effort": {t.line.dash for t in lines if t.name.startswith("compaction curve")},
        "optimums": {t.line.dash for t in lines if t.legendgroup == "optimums"},
        "drawn zone": {t.line.dash for t in lines if t.legendgroup == "zone"},
        "fitted zone": {t.line.dash for t in lines if t.legendgroup == "fitted zone"},
    }
    assert all(families.values()), families  # the sample draws every family
    assert len(families["saturation"]) == 3 and len(families["effort"]) == 3
    names = list(families)
    for i, first in enumerate(names):
        for second in names[i + 1 :]:
            assert not families[first] & families[second], (first, second)
    # the codes a family may use never overlap either, whatever the number of efforts
    codes = [set(c) for c in chart_style.LINE_CODES.values()]
    assert sum(len(c) for c in codes) == len(set().union(*codes))
