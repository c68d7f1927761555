"""The series chooser: no code to edit, the choice carried between notebooks, samples copied."""

import hashlib
import json

import pytest
from series_files import SAMPLES, copy_sample

from kitchen.field import check_field_tests, read_field_tests
from kitchen.panels import (
    forget_series,
    remember_series,
    remembered_series,
    workbook_panel,
    working_copy,
    working_folder,
)
from kitchen.panels.series_choice import WORKING_FOLDER_VARIABLE
from kitchen.workspace import Workspace

LOGS = ("windows.csv", "kept_tests.csv", "revisions.csv")


def _digests(folder):
    return {
        path.relative_to(folder): hashlib.sha256(path.read_bytes()).hexdigest()
        for path in sorted(folder.rglob("*"))
        if path.is_file()
    }


@pytest.fixture()
def notebooks(tmp_path, monkeypatch):
    """A notebooks folder with sample_data/ beside it (as in the repository), as the
    current folder, and no working folder named by the environment."""
    copy_sample(SAMPLES, tmp_path / "sample_data")
    for sample in ("clay_liner", "flexible_wall_clay", "transducer_log"):
        for log in LOGS:  # the logs a user's work may leave beside a sample
            (tmp_path / "sample_data" / sample / log).write_text("left by a user\n")
    folder = tmp_path / "notebooks"
    folder.mkdir()
    monkeypatch.chdir(folder)
    monkeypatch.delenv(WORKING_FOLDER_VARIABLE, raising=False)
    return folder


def test_working_copy_holds_the_raw_tables_only_and_is_made_once(notebooks):
    samples = notebooks.parent / "sample_data"
    before = _digests(samples)
    copy = working_copy("clay_liner")
    assert copy == notebooks / "working" / "clay_liner" == working_folder() / "clay_liner"
    assert sorted(p.name for p in copy.iterdir()) == [
        "falling_head.csv",
        "field_tests.csv",
        "project.csv",
        "specimens.csv",
    ]
    (copy / "windows.csv").write_text("the engineer's own\n")
    assert working_copy("clay_liner") == copy
    assert (copy / "windows.csv").read_text() == "the engineer's own\n"
    workbook = working_copy("drainage_sand.xlsx")
    assert (
        workbook.is_file()
        and workbook.read_bytes() == (samples / "drainage_sand.xlsx").read_bytes()
    )
    assert _digests(samples) == before
    with pytest.raises(ValueError, match="unknown sample 'clay'; expected one of clay_liner"):
        working_copy("clay")


def test_the_environment_names_another_working_folder(notebooks, tmp_path, monkeypatch):
    monkeypatch.setenv(WORKING_FOLDER_VARIABLE, str(tmp_path / "elsewhere"))
    assert working_copy("drainage_sand") == tmp_path / "elsewhere" / "drainage_sand"


def test_the_choice_is_remembered_and_forgotten(notebooks, tmp_path):
    assert remembered_series() is None
    own = copy_sample(SAMPLES / "clay_liner", tmp_path / "my series")
    written = remember_series(own)
    assert json.loads(written.read_text())["series"] == str(own.resolve())
    assert remembered_series() == own.resolve()
    forget_series()
    assert remembered_series() is None
    written.write_text("{not json")
    assert remembered_series() is None  # a damaged file is no choice, never a failure
    remember_series(own)
    (own / "specimens.csv").unlink()
    own_gone = own.rename(tmp_path / "moved")
    assert remembered_series() is None and own_gone.exists()


def test_a_series_opened_in_one_notebook_opens_in_the_next(notebooks):
    first = workbook_panel("open")
    assert first.series_path == notebooks / "working" / "clay_liner"
    assert first.panel.results is not None
    assert "Load" not in [
        c.description for c in first.panel.widget.children[0].children if hasattr(c, "description")
    ]
    assert remembered_series() is None  # opening the default is no choice
    first.chooser.source.value = "drainage_sand"
    assert first.chooser.path.value == str(notebooks / "working" / "drainage_sand")
    first.chooser.open.click()
    assert first.error.message == ""
    assert first.series_path == notebooks / "working" / "drainage_sand"
    assert set(first.panel.results["specimen"]) == {"DL-A", "DL-B", "DL-C", "DL-D"}
    chart = workbook_panel("series_chart", criterion="≥ 1e-4 m/s")
    assert chart.chooser.source.value == "drainage_sand"
    assert chart.series_path == (notebooks / "working" / "drainage_sand").resolve()
    assert chart.panel.analysis.criterion.kind == "minimum"


def test_a_series_of_ones_own_is_typed_and_opened(notebooks, tmp_path):
    own = copy_sample(SAMPLES / "clay_liner", tmp_path / "lab sheets" / "cell 4")
    panel = workbook_panel("falling_head", specimen="QF-02")
    assert panel.panel.specimen.value == "QF-02"
    panel.chooser.source.value = "own"
    assert panel.chooser.path.value == ""
    panel.chooser.path.value = str(own)
    panel.chooser.open.click()
    assert panel.error.message == ""
    assert panel.panel.workspace.path == own
    assert remembered_series() == own.resolve()
    assert workbook_panel("revise").panel.series_path == own.resolve()


def test_a_series_that_does_not_fit_the_panel_is_said_in_words(notebooks, tmp_path):
    panel = workbook_panel("falling_head", specimen="QF-02")
    panel.chooser.source.value = "drainage_sand"
    panel.chooser.open.click()
    assert panel.panel is None
    assert "has no falling-head readings" in panel.error.message
    assert "drainage_sand" in panel.error.message
    panel.chooser.source.value = "own"
    panel.chooser.path.value = str(tmp_path / "no such folder")
    panel.chooser.open.click()
    assert "no such folder: not found; expected a series folder or .xlsx workbook" in (
        panel.error.message
    )
    panel.chooser.path.value = ""
    panel.chooser.open.click()
    assert "type the path of a series folder" in panel.error.message


def test_a_window_kept_on_the_sample_is_written_beside_the_working_copy(notebooks):
    samples = notebooks.parent / "sample_data"
    before = _digests(samples)
    panel = workbook_panel("falling_head", specimen="QF-02").panel
    panel.window.value = (3, panel.window.value[1])
    panel.reason.value = "early readings before saturation"
    panel.keep.click()
    assert (notebooks / "working" / "clay_liner" / "windows.csv").exists()
    assert _digests(samples) == before


@pytest.mark.parametrize("sample", ["flexible_wall_clay", "transducer_log"])
def test_a_flexible_wall_copy_carries_its_condition_tables_and_no_log(notebooks, sample):
    samples = notebooks.parent / "sample_data"
    before = _digests(samples)
    copy = working_copy(sample)
    assert sorted(p.name for p in copy.iterdir()) == [
        "b_value_checks.csv",
        "falling_head.csv",
        "flexible_wall.csv",
        "project.csv",
        "specimens.csv",
    ]
    for path in copy.iterdir():
        assert path.read_bytes() == (samples / sample / path.name).read_bytes()
    assert _digests(samples) == before


def test_an_older_copy_gains_the_field_tests_and_keeps_its_own(notebooks):
    copy = working_copy("clay_liner")
    (copy / "field_tests.csv").unlink()  # a copy made before the field tests were carried
    (copy / "windows.csv").write_text("the engineer's own\n")
    assert working_copy("clay_liner") == copy
    samples = notebooks.parent / "sample_data" / "clay_liner"
    assert (copy / "field_tests.csv").read_bytes() == (samples / "field_tests.csv").read_bytes()
    assert (copy / "windows.csv").read_text() == "the engineer's own\n"
    (copy / "field_tests.csv").write_text("the engineer's edits\n")
    working_copy("clay_liner")
    assert (copy / "field_tests.csv").read_text() == "the engineer's edits\n"  # never over one
    assert not list(copy.glob(".*partial"))


def test_the_test_record_and_field_checks_open_the_series_chosen(notebooks):
    samples = notebooks.parent / "sample_data"
    before = _digests(samples)
    record = workbook_panel("record")
    assert record.error.message == ""
    assert record.series_path == notebooks / "working" / "flexible_wall_clay"
    assert record.panel.shown and all(item.value for item in record.panel.shown)
    checks = workbook_panel("field_checks")
    assert checks.error.message == ""
    copy = notebooks / "working" / "clay_liner"
    assert checks.series_path == copy
    assert checks.panel.field_tests_source() == copy  # the copy's own field_tests.csv
    assert checks.panel.workspace.path == copy
    shown = [c for row in checks.panel.widget.children[:2] for c in row.children]
    assert checks.panel.series_path not in shown and checks.panel.open_button not in shown
    assert checks.panel.field_tests_path in shown and checks.panel.reread in shown
    # the choice made in one notebook carries to the other two
    record.chooser.source.value = "transducer_log"
    record.chooser.open.click()
    assert record.error.message == ""
    assert set(record.panel.workspace.series.specimens["specimen"]) == set(
        Workspace(SAMPLES / "transducer_log").series.specimens["specimen"]
    )
    assert (
        workbook_panel("record").series_path == (notebooks / "working" / "transducer_log").resolve()
    )
    checks.chooser.source.value = "clay_liner"
    checks.chooser.open.click()
    assert workbook_panel("record").series_path == copy.resolve()
    assert _digests(samples) == before


def test_the_field_check_agrees_with_the_package_and_exports_under_the_working_folder(
    notebooks,
):
    samples = notebooks.parent / "sample_data"
    before = _digests(samples)
    panel = workbook_panel("field_checks").panel
    copy = notebooks / "working" / "clay_liner"
    # the judgement read straight from the generated sample, not through the panel
    expected = check_field_tests(
        read_field_tests(samples / "clay_liner"), Workspace(copy).analysis()
    )
    assert list(panel.check.tests["verdict"]) == list(expected.tests["verdict"])
    assert panel.export_folder.value == str(notebooks / "working" / "field_checks" / "clay_liner")
    panel.export.click()
    assert panel.error.message == ""
    assert panel.exported
    assert all(
        (notebooks / "working" / "field_checks" / "clay_liner") in path.parents
        for path in panel.exported
    )
    assert _digests(samples) == before


def test_field_checks_on_a_series_without_field_tests_say_so(notebooks):
    checks = workbook_panel("field_checks")
    checks.chooser.source.value = "drainage_sand"
    checks.chooser.open.click()
    assert checks.panel is not None and checks.panel.check is None
    assert "field_tests" in checks.panel.error.message
    assert "drainage_sand" in checks.panel.error.message


def test_every_notebook_opens_its_panel_through_the_series_row():
    """No notebook has a path to edit: its panel cell is ``workbook_panel(kind)`` with a kind
    the chooser knows, and no cell before the notebook's checks names a series path."""
    import re
    from pathlib import Path

    from kitchen.panels.series_choice import PANELS

    notebooks = sorted((Path(__file__).parents[2] / "notebooks").glob("0*.ipynb"))
    assert [path.name[:2] for path in notebooks] == ["01", "02", "03", "04", "05", "06", "07"]
    for path in notebooks:
        cells = json.loads(path.read_text("utf-8"))["cells"]
        sources = ["".join(cell["source"]) for cell in cells]
        check = next(i for i, text in enumerate(sources) if text.startswith("## Check"))
        code = [
            text for cell, text in zip(cells[:check], sources[:check], strict=True)
            if cell["cell_type"] == "code"
        ]  # fmt: skip
        kinds = re.findall(r'^workbook = workbook_panel\("(\w+)"', "\n".join(code), re.M)
        assert len(kinds) == 1 and kinds[0] in PANELS, path.name
        assert not any("sample_data" in text or "../" in text for text in code), path.name
