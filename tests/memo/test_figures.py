"""The memo's charts: the specimen charts show the k of the results table's rows."""

import pandas as pd
from series_files import SAMPLES

from kitchen.io import load_series
from kitchen.memo import export_memo_pack
from kitchen.reduction import series_results
from kitchen.settings import Settings
from kitchen.workspace import Workspace


def test_specimen_charts_use_the_windows_and_rises_of_the_results(tmp_path):
    # a measured capillary rise and a chosen window reach the specimen charts as they reach
    # the results table: each chart's title states the k of its row
    from kitchen import charts
    from kitchen.analysis import analyse_series
    from kitchen.memo import memo_charts
    from kitchen.reduction import falling_head_analysis
    from kitchen.specimen import specimen_state

    series = load_series(SAMPLES / "clay_liner")
    settings = Settings()
    rises, windows = {"QF-01": 0.004}, {"QF-03": (4, 30)}
    results = series_results(series, settings, windows, rises)
    analysis = analyse_series(results, 1e-9)
    workspace = Workspace(SAMPLES / "clay_liner", settings)
    for specimen, rise in rises.items():
        workspace.set_capillary_rise(specimen, rise)
    for specimen, window in windows.items():
        workspace.set_window(specimen, window)
    pd.testing.assert_frame_equal(workspace.results(), results)
    built, _ = memo_charts(workspace, analysis)
    titles = {name: figure.layout.title.text for name, _, figure in built}
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    for specimen, window, rise in (("QF-01", None, 0.004), ("QF-03", (4, 30), None)):
        readings = series.falling_head[series.falling_head["specimen"] == specimen]
        own = falling_head_analysis(readings, state.loc[specimen], settings, window,
                                    capillary_rise=rise)  # fmt: skip
        row = results.set_index("specimen").loc[specimen]
        assert own.k_reference == row["k_reference"]
        expected = charts.falling_head_figure(readings, own).layout.title.text
        assert titles[f"specimen_{specimen}_falling_head"] == expected
        plain = falling_head_analysis(readings, state.loc[specimen], settings)
        assert charts.falling_head_figure(readings, plain).layout.title.text != expected
    pack = export_memo_pack(workspace, tmp_path, images=False)
    report = (tmp_path / "report.html").read_text()
    assert "QF-01: 4.0 mm" in report and "QF-03: readings 5-30" in report
    assert len(pack) > 0


def test_specimen_charts_are_handed_on_first_and_listed_after_the_series_charts():
    # the memo pack asks for each chart's images as it is drawn: the specimen charts need
    # no more than the reductions, so they go first, while the series charts are built;
    # the memo lists the series charts first all the same (common practice, no source)
    from kitchen.memo import memo_charts

    workspace = Workspace(SAMPLES / "clay_liner")
    handed = []
    built, skipped = memo_charts(
        workspace, workspace.analysis(), on_chart=lambda name, figure: handed.append(name)
    )
    names = [name for name, _, _ in built]
    series = [name for name in names if not name.startswith("specimen_")]
    specimens = [name for name in names if name.startswith("specimen_")]
    assert series == [
        "compaction_conductivity",
        "conductivity_void_ratio",
        "conductivity_dry_density",
        "conductivity_water_content",
    ]
    assert len(specimens) == len(workspace.specimen_ids()) and skipped == []
    assert names == series + specimens and handed == specimens + series
