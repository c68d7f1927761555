"""The field-check report: every file written with the memo pack's provenance, manifest and
cautions; the .docx read back; bad field tests refused before anything is written."""

import hashlib
import html
import shutil
from io import BytesIO

import docx
import openpyxl
import pandas as pd
import pytest
from series_files import SAMPLES, copy_sample

from kitchen.cautions import CAUTIONS, FIELD_CAUTIONS
from kitchen.field import FieldTestsError
from kitchen.memo import export_field_check, verify_pack
from kitchen.workspace import Workspace


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    folder = SAMPLES / "clay_liner"
    before = hashlib.sha256((folder / "field_tests.csv").read_bytes()).hexdigest()
    out = tmp_path_factory.mktemp("field_check")
    made = export_field_check(Workspace(folder), folder, out, images=True)
    after = hashlib.sha256((folder / "field_tests.csv").read_bytes()).hexdigest()
    return made, before == after


def test_every_file_is_written_and_the_manifest_verifies(report):
    made, unchanged = report
    names = sorted(p.relative_to(made.folder).as_posix() for p in made.files)
    charts = [f"charts/{c}.{e}" for c in ("field_tests_plane", "field_tests_by_date")
              for e in ("html", "png", "svg")]  # fmt: skip
    assert names == sorted(
        ["field_check.csv", "field_check.xlsx", "field_check.html", "field_check.docx",
         "charts/plotly.min.js", "manifest.csv", *charts]
    )  # fmt: skip
    assert verify_pack(made.folder) == []
    assert unchanged  # the field tests are read, never written


def test_the_csv_holds_every_test_in_date_order_with_its_verdict(report):
    made, _ = report
    table = pd.read_csv(made.folder / "field_check.csv", keep_default_na=False)
    assert list(table["test"]) == list(made.check.tests["test"])
    assert list(table["verdict"]) == list(made.check.tests["verdict"])
    retest = table.set_index("test").loc["L2-03R"]
    assert retest["retest_of"] == "L2-03"


def test_the_provenance_hashes_the_field_tests_too(report):
    made, _ = report
    paths = [f.path for f in made.provenance.input_files]
    assert any(path.endswith("field_tests.csv") for path in paths)
    assert any(path.endswith("specimens.csv") for path in paths)


def test_cautions_everywhere(report):
    made, _ = report
    page = (made.folder / "field_check.html").read_text()
    chart = (made.folder / "charts" / "field_tests_plane.html").read_text()
    for text in CAUTIONS + FIELD_CAUTIONS:
        escaped = html.escape(text)
        assert escaped in page and escaped in chart
    book = openpyxl.load_workbook(made.folder / "field_check.xlsx")
    notes = [row[1] for row in book["cautions"].iter_rows(values_only=True)]
    for text in CAUTIONS + FIELD_CAUTIONS:
        assert text in notes


def test_the_document_reads_back_with_its_tables_and_charts(report):
    made, _ = report
    read = docx.Document(BytesIO((made.folder / "field_check.docx").read_bytes()))
    texts = [p.text for p in read.paragraphs]
    for text in CAUTIONS + FIELD_CAUTIONS:
        assert text in texts
    tables = [[[c.text for c in row.cells] for row in t.rows] for t in read.tables]
    lifts = next(t for t in tables if t[0][0] == "lift")
    assert [row[0] for row in lifts[1:]] == ["1", "2", "3", "4", "all lifts"]
    every = max(tables, key=len)
    assert [row[0] for row in every[1:]] == list(made.check.tests["test"])
    assert len(read.inline_shapes) == 2  # both charts, as PNG


def test_bad_field_tests_are_refused_before_anything_is_written(tmp_path):
    folder = copy_sample(SAMPLES / "clay_liner", tmp_path / "series")
    text = (folder / "field_tests.csv").read_text().replace("L1-03,2025-06-02", "L1-03,02/31")
    (folder / "field_tests.csv").write_text(text)
    with pytest.raises(FieldTestsError) as caught:
        export_field_check(Workspace(folder), folder, tmp_path / "out", images=False)
    (problem,) = caught.value.problems
    assert str(problem).startswith("field_tests.csv, row 4, column 'date', test L1-03")
    assert not (tmp_path / "out").exists()


def test_a_series_without_a_criterion_judges_nothing(tmp_path):
    folder = copy_sample(SAMPLES / "clay_liner", tmp_path / "series")
    (folder / "project.csv").unlink()
    made = export_field_check(Workspace(folder), folder, tmp_path / "out", images=False)
    assert set(made.check.tests["verdict"]) == {"not judged: no zone"}
    assert "not judged" in (tmp_path / "out" / "field_check.html").read_text()
    shutil.rmtree(tmp_path / "out")
