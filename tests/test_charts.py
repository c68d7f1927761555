"""Tests for kitchen.charts: every name it offers is the object of the module that holds it.

The figure builders are tested beside their modules: tests/test_chart_style.py,
tests/test_series_chart_parts.py, tests/test_compaction_chart.py,
tests/test_conductivity_trend_chart.py and tests/test_specimen_charts.py.
"""

from kitchen import (
    chart_style,
    charts,
    compaction_chart,
    conductivity_trend_chart,
    series_chart_parts,
    specimen_charts,
)


def test_each_name_is_the_object_of_its_home_module():
    # the project's own layout: the style, the series charts and the specimen charts live in
    # modules of their own; kitchen.charts offers their names too
    homes = dict.fromkeys(
        ("MAX_TRACE_POINTS", "memo_template", "decimation_indices", "add_caption"), chart_style
    )
    homes |= dict.fromkeys(
        ("compaction_conductivity_figure", "compaction_conductivity_spec"), compaction_chart
    )
    homes["conductivity_trend_figure"] = conductivity_trend_chart
    homes |= dict.fromkeys(
        ("falling_head_figure", "falling_head_spec", "constant_head_figure"), specimen_charts
    )
    assert sorted(charts.__all__) == sorted(homes)
    for name, home in homes.items():
        assert getattr(charts, name) is getattr(home, name), name
    # the style's constants, and the error-bar and criterion limits, are offered too
    style = ("FONT", "INK", "MUTED", "GRID", "ZONE", "VERDICT_COLOURS", "VERDICT_FILL")
    style += ("EFFORT_SYMBOLS", "EFFORT_DASHES", "SATURATION_DASHES", "NO_EFFORT", "WIDTH")
    for name in (*style, "HEIGHT"):
        assert getattr(charts, name) is getattr(chart_style, name), name
    for name in ("ERROR_BAR_FRACTION", "CRITERION_REACH"):
        assert getattr(charts, name) is getattr(series_chart_parts, name), name
