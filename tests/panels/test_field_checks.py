"""The field-checks panel, driven without a browser: open, re-read as tests are added, try
a state, switch the zone, export; bad field tests shown in words."""

from series_files import SAMPLES, copy_sample

from kitchen.field import check_field_tests, read_field_tests
from kitchen.panels import field_checks_panel
from kitchen.workspace import Workspace


def test_the_panel_shows_the_judgement_the_package_computes(tmp_path):
    folder = SAMPLES / "clay_liner"
    panel = field_checks_panel(folder)
    assert panel.error.message == ""
    expected = check_field_tests(read_field_tests(folder), Workspace(folder).analysis())
    assert list(panel.check.tests["verdict"]) == list(expected.tests["verdict"])
    assert expected.summary in panel.summary.value
    assert "L2-03R" in panel.tests.value and "L4-02" in panel.outside.value
    plane = panel.figures["plane"]
    drawn = sum(len(trace.x) for trace in plane.data if trace.name.startswith("lift "))
    assert drawn == len(expected.tests)


def test_a_test_added_to_the_file_is_judged_on_re_reading(tmp_path):
    folder = copy_sample(SAMPLES / "clay_liner", tmp_path / "series")
    panel = field_checks_panel(folder)
    before = len(panel.check.tests)
    with (folder / "field_tests.csv").open("a") as stream:
        stream.write("L4-07,2025-06-12 15:10,4,150.0,-2.0,15.0,1.700,1.955,nuclear gauge,\n")
    panel.reread.click()
    assert panel.error.message == ""
    assert len(panel.check.tests) == before + 1
    row = panel.check.tests.set_index("test").loc["L4-07"]
    assert row["verdict"] == "outside the zone" and "L4-07" in panel.outside.value


def test_a_typed_state_is_placed_against_the_zone_without_saving(tmp_path):
    folder = copy_sample(SAMPLES / "clay_liner", tmp_path / "series")
    before = (folder / "field_tests.csv").read_bytes()
    panel = field_checks_panel(folder)
    panel.trial_water_content.value = 15.0
    assert "outside the acceptable zone (drawn)" in panel.trial.value
    assert (folder / "field_tests.csv").read_bytes() == before


def test_the_fitted_zone_can_be_chosen(tmp_path):
    panel = field_checks_panel(SAMPLES / "clay_liner")
    panel.zone.value = "fitted"
    assert panel.check.zone_kind == "fitted" and panel.check.zone.name == "fitted zone"


def test_bad_field_tests_are_listed_in_words(tmp_path):
    folder = copy_sample(SAMPLES / "clay_liner", tmp_path / "series")
    text = (folder / "field_tests.csv").read_text().replace(",19.", ",nineteen.", 1)
    (folder / "field_tests.csv").write_text(text)
    panel = field_checks_panel(folder)
    assert "problem(s) with the series" in panel.error.widget.value
    assert "field_tests.csv, row" in panel.error.message and "test L1-" in panel.error.message


def test_export_writes_the_check_report(tmp_path):
    panel = field_checks_panel(SAMPLES / "clay_liner", export_folder=tmp_path / "out")
    panel.export.click()
    assert panel.error.message == ""
    names = {p.name for p in panel.exported}
    assert {"field_check.html", "field_check.docx", "manifest.csv"} <= names
