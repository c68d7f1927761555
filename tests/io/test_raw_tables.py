"""Reading the raw tables: files, sheets and headers, every bad input named by file, row, column."""

import pandas as pd
import pytest
from series_files import CONSTANT, SPECIMENS, problems_of, write_series

from kitchen.io import SeriesError, load_series, read_tables


def test_workbook_problems_name_the_sheet(tmp_path):
    book = tmp_path / "book.xlsx"
    with pd.ExcelWriter(book) as writer:
        pd.DataFrame({"specimen": ["A1"], "diameter": [101.6]}).to_excel(
            writer, sheet_name="specimens", index=False
        )
        pd.DataFrame({"specimen": ["A1"], "time [s]": [0], "head [m]": [1]}).to_excel(
            writer, sheet_name="falling_head", index=False
        )
    problems = problems_of(book)
    assert any(p.startswith("book.xlsx [specimens], row 1, column 'diameter'") for p in problems)


@pytest.mark.parametrize(
    ("tables", "expected"),
    [
        (
            {"specimens": None},
            "specimens.csv: missing: every series needs it",
        ),
        (
            {"falling_head": None},
            "has no test data",
        ),
        (
            {"specimens": SPECIMENS.replace("height [mm]", "length_of_it [mm]")},
            "specimens.csv, row 1, column 'height': required column missing",
        ),
        (
            {"specimens": SPECIMENS.replace("height [mm]", "height")},
            "specimens.csv, row 1, column 'height': 'height' has a dimension (length) but no unit",
        ),
        (
            {"specimens": SPECIMENS.replace("height [mm]", "height [parsec-ish]")},
            "specimens.csv, row 1, column 'height [parsec-ish]': unknown unit",
        ),
        (
            {"specimens": SPECIMENS.replace("height [mm]", "height [g]")},
            "column 'height [g]': unit 'g' is not a length",
        ),
        (
            {"specimens": SPECIMENS.replace(",", ";")},
            "the header has semicolons",
        ),
    ],
)
def test_bad_input_is_named(tmp_path, tables, expected):
    problems = problems_of(write_series(tmp_path / "s", **tables))
    assert any(expected in problem for problem in problems), problems


def test_not_utf8_is_named(tmp_path):
    folder = write_series(tmp_path / "s")
    (folder / "specimens.csv").write_bytes(SPECIMENS.replace("A1", "Ä1").encode("latin-1"))
    assert any("not UTF-8" in p for p in problems_of(folder))


def test_missing_folder_is_named(tmp_path):
    with pytest.raises(SeriesError, match="not found"):
        load_series(tmp_path / "nowhere")


def test_reading_never_writes_the_raw_files(tmp_path):
    folder = write_series(tmp_path / "s", constant_head=CONSTANT)
    before = {p.name: p.read_bytes() for p in folder.iterdir()}
    read_tables(folder)
    load_series(folder)
    assert {p.name: p.read_bytes() for p in folder.iterdir()} == before
