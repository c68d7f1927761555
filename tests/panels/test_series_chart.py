"""The series-chart panel: criterion and units drive the analysis and the charts."""

import re

import numpy as np
import pytest
from html_cells import TableCells
from series_files import SAMPLES

from kitchen.analysis import NO_CRITERION, NOT_JUDGED, analyse_series
from kitchen.io import load_series
from kitchen.panels import series_chart_panel
from kitchen.reduction import series_results


@pytest.fixture(scope="module")
def clay():
    return load_series(SAMPLES / "clay_liner")


@pytest.fixture(scope="module")
def clay_results(clay):
    return series_results(clay)


@pytest.fixture()
def panel(clay):
    return series_chart_panel(clay.source)


def test_a_drainage_criterion_reaches_the_verdicts_and_the_chart():
    # the invented drainage sand (sample_data/drainage_sand/truth.json): every k20 is above
    # the smallest k of 1e-4 m/s such a layer is often required to have (from memory)
    panel = series_chart_panel(SAMPLES / "drainage_sand", criterion="≥ 1e-4 m/s")
    assert panel.analysis.criterion.kind == "minimum"
    assert panel.analysis.counts["meets"] == 4
    assert "k20 ≥" in panel.verdicts.value
    names = [trace.name for trace in panel.figures["void_ratio"].data if trace.name]
    assert any(name.startswith("criterion k ≥") for name in names)


def test_a_criterion_without_its_unit_is_refused_in_words(panel):
    # the panel reads the criterion as the core does (kitchen.analysis.parse_criterion,
    # tested in tests/analysis/test_criterion.py), with no unit assumed: 1e-7 could be m/s
    # or cm/s
    panel.criterion.value = "1e-7"
    assert "has no unit" in panel.error.message
    panel.criterion.value = "≥ 1e-4 m/s"
    assert panel.error.message == "" and panel.analysis.criterion.kind == "minimum"


def test_verdicts_follow_the_criterion_as_the_core_says(panel, clay_results):
    expected = analyse_series(clay_results, 1e-9)
    assert panel.analysis.counts == expected.counts
    # sample_data/README.md: eight specimens have a true k20 at or below 1e-9 m/s, and one of
    # them, QF-04, drifts and fails its trend check: seven meet, and QF-04 is not judged
    assert expected.counts["meets"] == 7 and expected.counts[NOT_JUDGED] == 1
    panel.criterion.value = "5e-10 m/s"
    tighter = analyse_series(clay_results, 5e-10)
    assert panel.analysis.counts == tighter.counts != expected.counts
    assert list(panel.analysis.specimens["verdict"]) == list(tighter.specimens["verdict"])
    assert "5.00 × 10⁻¹⁰ m/s" in panel.verdicts.value


def test_a_test_not_valid_reads_not_judged_beside_its_validity(panel):
    # QF-04 fails the trend check (its k drifts by design, sample_data/README.md): the panel
    # never says it meets, shows its validity beside the verdict and counts it apart
    row = panel.table.value.split(">QF-04<", 1)[1].split("</tr>", 1)[0]
    assert ">no<" in row and f">{NOT_JUDGED}<" in row and ">meets<" not in row
    assert f"{NOT_JUDGED}: 1" in panel.verdicts.value and "meets: 7" in panel.verdicts.value
    chart = panel.figures["compaction"]
    marked = {t.name for t in chart.data if t.text is not None and "QF-04" in t.text}
    assert marked == {NOT_JUDGED}


def _criterion_line(figure):
    return next(t for t in figure.data if t.name and t.name.startswith("criterion"))


def _specimen_points(figure, axis="y"):
    """(verdict, k) of every specimen marker on a chart's log-k axis."""
    return sorted(
        (t.name, y)
        for t in figure.data
        if t.mode == "markers"
        and t.name in ("meets", "does not meet", "not conclusive")
        and (t.yaxis or "y") == axis
        for y in t.y
    )


def test_criterion_moves_the_line_the_markers_and_the_zone(panel):
    chart = panel.figures["void_ratio"]
    assert list(_criterion_line(chart).y) == pytest.approx([1e-9, 1e-9])
    zone_before = next(t for t in panel.figures["compaction"].data if t.fill == "toself").x
    panel.criterion.value = "1e-8 m/s"
    assert list(_criterion_line(chart).y) == pytest.approx([1e-8, 1e-8])
    verdicts = [name for name, _ in _specimen_points(chart)]
    assert verdicts.count("meets") == panel.analysis.counts["meets"] > 8
    zone_after = next(t for t in panel.figures["compaction"].data if t.fill == "toself").x
    assert len(zone_after) != len(zone_before) or not np.allclose(zone_after, zone_before)


def test_units_switch_the_axes(panel):
    metres = _specimen_points(panel.figures["dry_density"])
    panel.k_unit.value = "cm/s"
    centimetres = _specimen_points(panel.figures["dry_density"])
    assert [name for name, _ in centimetres] == [name for name, _ in metres]
    np.testing.assert_allclose([k for _, k in centimetres], [100 * k for _, k in metres])
    assert list(_criterion_line(panel.figures["dry_density"]).y) == pytest.approx([1e-7, 1e-7])
    x_metric = sorted(
        x for t in panel.figures["dry_density"].data if t.mode == "markers" for x in t.x
    )
    panel.density_unit.value = "kN/m³"
    assert "kN/m³" in panel.figures["dry_density"].layout.xaxis.title.text
    assert "kN/m³" in panel.figures["compaction"].layout.yaxis.title.text
    x_weight = sorted(
        x for t in panel.figures["dry_density"].data if t.mode == "markers" for x in t.x
    )
    # gamma_d = rho_d * g_n, g_n = 9.80665 m/s2 exactly (3rd CGPM, 1901)
    np.testing.assert_allclose(x_weight, np.array(x_metric) * 9.80665, rtol=1e-12)


def test_bad_criterion_in_the_box_is_shown_and_the_charts_stay(panel):
    counts = panel.analysis.counts
    panel.criterion.value = "1e-9 m"
    assert "expected one of m/s, cm/s" in panel.error.message
    assert panel.analysis.counts == counts
    panel.criterion.value = "1e-9 m/s"
    assert panel.error.message == ""


def test_sand_series_has_no_compaction_plane_and_says_so():
    panel = series_chart_panel(SAMPLES / "drainage_sand", criterion="1e-3 m/s")
    assert panel.error.message == ""
    assert any("no specimen has a molding water content" in note for note in panel.error.notes)
    assert panel.drawn == {"compaction": False, "void_ratio": True, "dry_density": True}
    assert panel.chart_choice.value == "void_ratio"
    assert panel.shown_chart is panel.figures["void_ratio"]
    panel.chart_choice.value = "compaction"
    assert panel.shown_chart is panel.missing["compaction"]
    assert "not drawn" in panel.missing["compaction"].value
    assert len(panel.figures["void_ratio"].data) > 0


def test_export_button_writes_the_memo_pack_with_progress(tmp_path):
    panel = series_chart_panel(
        SAMPLES / "clay_liner", export_folder=tmp_path / "memo", images=False
    )
    seen = []
    panel.progress.bar.observe(lambda change: seen.append(change["new"]), names="value")
    panel.export.click()
    assert panel.error.message == ""
    names = {path.relative_to(tmp_path / "memo").as_posix() for path in panel.exported}
    assert {"results.csv", "results.xlsx", "report.html"} <= names
    assert all(path.exists() for path in panel.exported)
    assert seen == sorted(seen) and len(seen) >= 3  # the bar moved forward, file by file
    assert panel.progress.bar.bar_style == "success"
    assert f"{len(panel.exported)} file(s) written" in panel.progress.label.value
    assert not (SAMPLES / "clay_liner" / "results.csv").exists()


def test_export_to_an_unwritable_place_is_shown_in_words(tmp_path):
    blocker = tmp_path / "a file"
    blocker.write_text("not a folder")
    panel = series_chart_panel(SAMPLES / "clay_liner", export_folder=blocker, images=False)
    panel.export.click()
    assert panel.error.message.startswith("Could not finish exporting")
    assert panel.progress.bar.bar_style == "danger"
    assert panel.export.disabled is False


def test_export_over_a_folder_the_tool_did_not_write_is_refused_in_words(tmp_path):
    folder = tmp_path / "memo"
    folder.mkdir()
    (folder / "minutes.txt").write_text("the meeting's notes")
    panel = series_chart_panel(SAMPLES / "clay_liner", export_folder=folder, images=False)
    panel.export.click()
    assert panel.error.message.startswith("Could not finish exporting")
    assert "minutes.txt: not in manifest.csv" in panel.error.message
    assert [p.name for p in folder.iterdir()] == ["minutes.txt"]
    panel.export_folder.value = str(tmp_path / "memo-new")
    panel.export.click()  # a new folder takes the pack
    assert panel.error.message == "" and (tmp_path / "memo-new" / "manifest.csv").exists()


# --- the criterion in force -----------------------------------------------------------------


def test_the_box_opens_on_the_series_criterion_and_a_typed_one_overrides_it(panel, clay_results):
    # the clay liner's project table says 1e-9 m/s (sample_data/README.md)
    assert panel.criterion.value == "1e-9 m/s"
    assert panel.analysis.counts == analyse_series(clay_results, 1e-9).counts
    assert "project table (project.csv, row 2" in panel.verdicts.value
    panel.criterion.value = "5e-10 m/s"
    assert panel.criterion_source == "typed in the panel"
    assert panel.analysis.counts == analyse_series(clay_results, 5e-10).counts
    panel.criterion.value = ""  # empty: the series' own again
    assert panel.analysis.criterion == 1e-9 and "project table" in panel.criterion_source


def test_a_series_without_a_criterion_opens_empty_and_draws_no_verdict():
    # the drainage sand carries no criterion (sample_data/README.md): nothing is assumed
    panel = series_chart_panel(SAMPLES / "drainage_sand", images=False)
    assert panel.criterion.value == "" and "none given" in panel.criterion.placeholder
    assert panel.analysis.criterion is None
    assert "No criterion given" in panel.verdicts.value and "meets" not in panel.verdicts.value
    assert f"{NO_CRITERION}: 4" in panel.verdicts.value
    rows = _table_rows(panel)
    assert {row["verdict"] for row in rows} == {NO_CRITERION}
    assert {row["in acceptable zone"] for row in rows} == {"–"}
    names = [t.name or "" for t in panel.figures["void_ratio"].data]
    assert not any(name.startswith("criterion") for name in names)
    panel.criterion.value = "≥ 1e-4 m/s"  # typed: judged against it at once
    assert panel.analysis.counts["meets"] == 4 and panel.criterion_source == "typed in the panel"
    # the sand has no water contents: no zone is drawn, so none is said to hold it or not
    assert {row["in acceptable zone"] for row in _table_rows(panel)} == {"–"}


def _table_rows(panel) -> list[dict]:
    parser = TableCells()
    parser.feed(panel.table.value)
    header = [text for tag, _, text in parser.cells if tag == "th"]
    cells = [text for tag, _, text in parser.cells if tag == "td"]
    return [dict(zip(header, cells[i : i + len(header)], strict=True))
            for i in range(0, len(cells), len(header))]  # fmt: skip


def test_the_table_follows_the_density_and_k_units(panel):
    # gamma_d = rho_d * g_n, g_n = 9.80665 m/s2 exactly (3rd CGPM, 1901); 1 m/s = 100 cm/s
    rows = panel.analysis.specimens
    panel.density_unit.value = "kN/m³"
    panel.k_unit.value = "cm/s"
    table = _table_rows(panel)
    assert "γd [kN/m³]" in table[0] and "ρd [Mg/m³]" not in table[0]
    first = rows.iloc[0]
    assert table[0]["γd [kN/m³]"] == f"{first['dry_density'] * 9.80665 / 1000:.2f}"
    label = next(c for c in table[0] if c.endswith("[cm/s]") and c.startswith("k"))
    # k to three significant figures, the trailing zero kept, no unit repeated in the cell
    assert all(re.fullmatch(r"\d\.\d\d×10⁻[⁰¹²³⁴⁵⁶⁷⁸⁹]+", row[label]) for row in table)
    assert table[0][label] == "7.56×10⁻⁷"  # QF-01's k20, 7.559e-9 m/s (the sample's results)
    panel.density_unit.value = "Mg/m³"
    assert _table_rows(panel)[0]["ρd [Mg/m³]"] == f"{first['dry_density'] / 1000:.3f}"


def _visible(box) -> bool:
    return box.layout.visibility != "hidden"


def test_choosing_a_chart_never_takes_a_figure_out_of_the_page(panel):
    """A figure taken out of the page and put back leaves an old view behind that breaks
    the next update in the browser: the chart box keeps every figure, and a choice only
    hides or shows them (the real-browser test checks what the browser draws)."""
    held = panel.chart_box.children
    figures_held = [pane.children[0].children[0] for pane in held]
    assert figures_held == [
        panel.figures[key] for key in ("compaction", "void_ratio", "dry_density")
    ]
    for key in ("void_ratio", "compaction", "dry_density", "compaction"):
        panel.chart_choice.value = key
        panel.criterion.value = "3e-9 m/s" if panel.criterion.value != "3e-9 m/s" else "1e-9 m/s"
        panel.k_unit.value = "cm/s" if panel.k_unit.value == "m/s" else "m/s"
        assert panel.chart_box.children == held
        shown = [k for k, pane in panel.panes.items() if _visible(pane)]
        assert shown == [key]
        assert _visible(panel.panes[key].children[0])
        assert not _visible(panel.panes[key].children[1])
        factor = 100.0 if panel.k_unit.value == "cm/s" else 1.0
        lines = [t for t in panel.figures[key].data if (t.name or "").startswith("criterion")]
        expected = panel.criterion_value * factor
        assert [list(t.y) for t in lines] == [[pytest.approx(expected)] * 2]
