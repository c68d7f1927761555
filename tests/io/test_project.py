"""The project table of a series: its settings as written, every problem by file, row and
column, and the criterion the workspace reads from it.

The criterion values are those of the liner rules the README cites (1×10⁻⁹ m/s,
US 40 CFR 258.40; EU Directive 1999/31/EC Annex I) and a drainage layer's smallest k
(common practice, no source).
"""

import shutil
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pytest
from series_files import SAMPLES

from kitchen.analysis import Criterion
from kitchen.io import SeriesError, read_project_settings
from kitchen.workspace import Workspace


@pytest.fixture()
def clay(tmp_path) -> Path:
    folder = tmp_path / "clay_liner"
    folder.mkdir()
    for name in ("specimens.csv", "falling_head.csv"):
        shutil.copy2(SAMPLES / "clay_liner" / name, folder / name)
    return folder


def test_no_table_is_no_settings_and_no_criterion(clay):
    assert read_project_settings(clay) == {}
    assert Workspace(clay).criterion is None


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("1e-9 m/s", Criterion(1e-9, "maximum")),
        ("<= 1e-7 cm/s", Criterion(1e-9, "maximum")),
        (">= 1e-4 m/s", Criterion(1e-4, "minimum")),
    ],
)
def test_the_criterion_of_the_project_table(clay, text, expected):
    (clay / "project.csv").write_text(f"setting,value\ncriterion,{text}\n", encoding="utf-8")
    criterion = Workspace(clay).criterion
    assert criterion == pytest.approx(float(expected), rel=1e-12)
    assert criterion.kind == expected.kind


def test_a_workbook_carries_it_in_a_sheet(tmp_path):
    book = tmp_path / "sand.xlsx"
    shutil.copy2(SAMPLES / "drainage_sand.xlsx", book)
    with pd.ExcelWriter(book, mode="a", engine="openpyxl") as writer:
        pd.DataFrame({"setting": ["criterion"], "value": [">= 1e-4 m/s"]}).to_excel(
            writer, sheet_name="project", index=False
        )
    setting = read_project_settings(book)["criterion"]
    assert setting.where == "sand.xlsx [project], row 2, column 'value'"
    assert Workspace(book).criterion.kind == "minimum"


def test_every_problem_is_named_by_row_and_column(clay):
    (clay / "project.csv").write_text(
        "setting,value\nlimit,3\ncriterion,\ncriterion,1e-9 m/s\ncriterion,1e-8 m/s\n",
        encoding="utf-8",
    )
    with pytest.raises(SeriesError) as caught:
        Workspace(clay)
    text = str(caught.value)
    assert "project.csv, row 2, column 'setting': unknown setting 'limit'" in text
    assert "project.csv, row 3, column 'value': criterion has no value" in text
    assert "project.csv, row 5, column 'setting': criterion given twice (first in row 4)" in text


def test_a_criterion_without_its_unit_is_refused_where_it_stands(clay):
    (clay / "project.csv").write_text("setting,value\ncriterion,1e-7\n", encoding="utf-8")
    with pytest.raises(SeriesError, match=r"project.csv, row 2, column 'value': criterion: .*unit"):
        _ = Workspace(clay).criterion


def test_a_table_without_its_columns_is_named(clay):
    (clay / "project.csv").write_text("name,number\ncriterion,1\n", encoding="utf-8")
    with pytest.raises(SeriesError, match=r"project.csv, row 1, column 'setting': required column"):
        read_project_settings(clay)


def test_the_table_is_never_written(clay):
    path = clay / "project.csv"
    path.write_text("setting,value\ncriterion,1e-9 m/s\n", encoding="utf-8")
    before = path.read_bytes()
    Workspace(clay).results()
    assert path.read_bytes() == before


def test_the_samples_carry_the_liner_criterion_and_none_for_the_sand(tmp_path):
    # the clay liner's project table is the 1e-9 m/s of US 40 CFR 258.40 and EU Directive
    # 1999/31/EC Annex I, written by its generator; the drainage sand states none
    # (sample_data/README.md), so it is reported with no verdict until one is given
    clay = Workspace(SAMPLES / "clay_liner").criterion
    assert clay == Criterion(1e-9) and clay.kind == "maximum"
    assert Workspace(SAMPLES / "drainage_sand").criterion is None
    assert Workspace(SAMPLES / "drainage_sand.xlsx").criterion is None
    script = SAMPLES / "make_clay_liner_series.py"
    subprocess.run([sys.executable, str(script), "--output", str(tmp_path)], check=True)
    written = sorted(p.name for p in (tmp_path / "clay_liner").iterdir())
    assert written == ["falling_head.csv", "project.csv", "specimens.csv", "truth.json"]
    for name in written:  # byte for byte what the sample holds
        assert (tmp_path / "clay_liner" / name).read_bytes() == (
            SAMPLES / "clay_liner" / name
        ).read_bytes()
