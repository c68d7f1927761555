"""The field-tests table: read through the io readers, every problem named at once."""

import hashlib
from pathlib import Path

import numpy as np
import pytest
from series_files import SAMPLES, csv_rows, write_workbook

from kitchen.field import FieldTestsError, dry_density_from_wet, read_field_tests

GOOD = """test,date,lift,station [m],offset [m],water_content [%],dry_density [Mg/m^3],wet_density [Mg/m^3],method
T1,2025-06-02,1,10,-5,19.0,1.700,,nuclear gauge
T2,2025-06-02 14:30,1,30,5,20.0,,2.040,sand cone
T3,2025-06-03,2,10,-5,18.5,1.710,2.026,nuclear gauge
"""


def write(folder: Path, text: str, name="field_tests.csv") -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / name).write_text(text, encoding="utf-8")
    return folder


def problems(path) -> list[str]:
    with pytest.raises(FieldTestsError) as caught:
        read_field_tests(path)
    return [str(problem) for problem in caught.value.problems]


def test_a_good_table_is_read_in_si(tmp_path):
    tests = read_field_tests(write(tmp_path, GOOD)).tests
    assert list(tests["test"]) == ["T1", "T2", "T3"]
    assert tests["water_content"].tolist() == pytest.approx([0.19, 0.20, 0.185])
    # T2: ρd = ρ/(1 + w) = 2040/1.20 = 1700 kg/m3, worked by hand
    assert tests["dry_density"].tolist() == pytest.approx([1700.0, 1700.0, 1710.0])
    assert tests["dry_density_from"][1] == "wet density and water content"
    assert tests["date"][1].hour == 14
    assert list(tests["lift"]) == ["1", "1", "2"]


def test_dry_density_from_wet_against_the_phase_relation():
    # Das & Sobhan, weight–volume relationships: ρd = ρ/(1 + w) (from memory);
    # 2.040 Mg/m3 at w = 20 % gives 1.700 Mg/m3 (worked by hand)
    assert dry_density_from_wet(2040.0, 0.20) == pytest.approx(1700.0)


def test_a_file_given_by_name_and_a_workbook_sheet(tmp_path):
    file = write(tmp_path, GOOD, "site_tests.csv") / "site_tests.csv"
    assert len(read_field_tests(file).tests) == 3
    book = write_workbook(tmp_path / "liner.xlsx", {"field_tests": csv_rows(GOOD)})
    read = read_field_tests(book)
    assert read.label == "liner.xlsx [field_tests]"
    assert read.tests["dry_density"].tolist() == pytest.approx([1700.0, 1700.0, 1710.0])


def test_every_problem_is_named_at_once_with_file_row_column_and_test(tmp_path):
    text = """test,date,lift,station [m],offset [m],water_content,dry_density [Mg/m^3],wet_density [Mg/m^3],method
T1,2025-06-02,1,10,-5,19.0,1.700,,nuclear gauge
T2,June second,1,30,,20.0,,,sand cone
T1,2025-06-03,2,ten,-5,18.5,1.900,2.026,nuclear gauge
T4,2025-06-03,2,20,-5,18.5,17.1,,nuclear gauge
"""
    found = problems(write(tmp_path, text))
    expected = [
        "field_tests.csv, row 1, column 'water_content': 'water_content' has a dimension",
        "field_tests.csv, row 3, column 'date', test T2: expected a date as YYYY-MM-DD",
        "field_tests.csv, row 3, column 'offset [m]', test T2: value missing",
        "field_tests.csv, row 3, column 'dry_density [Mg/m^3]', test T2: value missing; "
        "expected a dry density, or a wet density",
        "field_tests.csv, row 4, column 'station [m]', test T1: expected a number, found 'ten'",
        "field_tests.csv, row 4, column 'test', test T1: test id given twice (first in row 2)",
        "field_tests.csv, row 5, column 'dry_density [Mg/m^3]', test T4: 17.1 Mg/m^3",
    ]
    for start in expected:
        assert any(problem.startswith(start) for problem in found), (start, found)


def test_wet_and_dry_densities_that_disagree_are_named(tmp_path):
    text = GOOD.replace("18.5,1.710,2.026", "18.5,1.780,2.026")
    (found,) = problems(write(tmp_path, text))
    assert found.startswith("field_tests.csv, row 4, column 'dry_density [Mg/m^3]', test T3:")
    assert "differs from the wet density over 1 + w" in found


def test_no_location_and_no_density_columns(tmp_path):
    text = "test,date,lift,water_content [%],method\nT1,2025-06-02,1,19.0,nuclear gauge\n"
    found = problems(write(tmp_path, text))
    assert any("column 'station': no location columns" in p for p in found)
    assert any("column 'dry_density': no density column" in p for p in found)


def test_missing_required_columns_and_an_empty_table(tmp_path):
    text = "test,station [m],offset [m],dry_density [Mg/m^3]\n"
    found = problems(write(tmp_path, text))
    for column in ("date", "lift", "water_content", "method"):
        assert any(f"column '{column}': required column missing" in p for p in found)
    empty = "test,date,lift,station [m],offset [m],water_content [%],dry_density [Mg/m^3],method\n"
    (found,) = problems(write(tmp_path / "empty", empty))
    assert found == "field_tests.csv, row 2: no rows below the header"


def test_a_missing_file_and_a_workbook_without_the_sheet(tmp_path):
    (found,) = problems(tmp_path)
    assert "field_tests.csv: not found" in found
    book = write_workbook(tmp_path / "liner.xlsx", {"specimens": [["specimen"], ["A"]]})
    (found,) = problems(book)
    assert found == "liner.xlsx: has no sheet 'field_tests'"


def test_the_sample_table_is_read_and_never_written():
    file = SAMPLES / "clay_liner" / "field_tests.csv"
    before = hashlib.sha256(file.read_bytes()).hexdigest()
    read = read_field_tests(SAMPLES / "clay_liner")
    assert hashlib.sha256(file.read_bytes()).hexdigest() == before
    assert read.location == ("station", "offset")
    assert np.isfinite(read.tests["dry_density"]).all()
