"""The series chooser: no code to edit, the choice carried between notebooks, samples copied."""

import hashlib
import json

import pytest
from series_files import SAMPLES, copy_sample

from kitchen.panels import (
    forget_series,
    remember_series,
    remembered_series,
    workbook_panel,
    working_copy,
    working_folder,
)
from kitchen.panels.series_choice import WORKING_FOLDER_VARIABLE


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
    (tmp_path / "sample_data" / "clay_liner" / "windows.csv").write_text("left by a user\n")
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
