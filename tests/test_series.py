"""Reading a series: units at the boundary, and every bad input named by file, row, column."""

import math
from pathlib import Path

import pandas as pd
import pytest

from kitchen.series import SeriesError, load_series, read_tables

SPECIMENS = """specimen,diameter [mm],height [mm],dry_mass [g],specific_gravity,water_content [%],effort,standpipe_diameter [mm]
A1,101.6,116.4,1650,2.70,18.0,standard,5
A2,101.6,116.4,1600,2.70,16.0,standard,5
"""
FALLING = """specimen,time [min],head [cm],temperature [degC]
A1,0,100,20
A1,10,95,20.5
A1,20,90.3,21
A2,0,100,19
A2,10,97,19
A2,20,94.1,19
"""
CONSTANT = """specimen,head_difference [cm],duration [s],volume [mL],outflow_mass [g],temperature [degC]
A1,50,300,350,,21
A1,40,300,,280,21
"""


def write_series(folder: Path, **tables: str) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    contents = {"specimens": SPECIMENS, "falling_head": FALLING} | tables
    for name, text in contents.items():
        if text is not None:
            (folder / f"{name}.csv").write_text(text, encoding="utf-8")
    return folder


def problems_of(folder: Path) -> list[str]:
    with pytest.raises(SeriesError) as caught:
        load_series(folder)
    return [str(problem) for problem in caught.value.problems]


def test_valid_series_is_in_si(tmp_path):
    series = load_series(write_series(tmp_path / "s", constant_head=CONSTANT))
    assert series.name == "s"
    first = series.specimens.iloc[0]
    assert first["diameter"] == pytest.approx(0.1016)
    assert first["dry_mass"] == pytest.approx(1.650)
    assert first["water_content"] == pytest.approx(0.18)
    assert first["standpipe_area"] == pytest.approx(math.pi * 0.005**2 / 4)
    assert list(series.falling_head["time"][:3]) == [0.0, 600.0, 1200.0]
    assert series.falling_head["head"].iloc[0] == pytest.approx(1.0)
    assert series.constant_head["outflow_mass"].iloc[1] == pytest.approx(0.280)
    assert series.falling_head["source_row"].tolist() == [2, 3, 4, 5, 6, 7]
    assert len(series.input_files) == 3


def test_mold_masses_give_dry_mass(tmp_path):
    specimens = SPECIMENS.replace("dry_mass [g]", "mold_mass [g],mold_and_soil_mass [g]")
    specimens = specimens.replace(",1650,", ",2100.0,3750.0,").replace(",1600,", ",2100,3700,")
    series = load_series(write_series(tmp_path / "s", specimens=specimens))
    assert series.specimens["dry_mass"].tolist() == pytest.approx([1.65, 1.60])


def test_workbook_reads_like_folder(tmp_path):
    folder = write_series(tmp_path / "s")
    book = tmp_path / "book.xlsx"
    with pd.ExcelWriter(book) as writer:
        for name in ("specimens", "falling_head"):
            pd.read_csv(folder / f"{name}.csv").to_excel(writer, sheet_name=name, index=False)
    from_book = load_series(book)
    from_folder = load_series(folder)
    assert from_book.name == "book"
    pd.testing.assert_frame_equal(from_book.falling_head, from_folder.falling_head)
    pd.testing.assert_series_equal(
        from_book.specimens["dry_mass"], from_folder.specimens["dry_mass"]
    )


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
            {"specimens": SPECIMENS.replace("116.4,1650", "11a6.4,1650")},
            "specimens.csv, row 2, column 'height [mm]': expected a number, found '11a6.4'",
        ),
        (
            {"specimens": SPECIMENS.replace("116.4,1600", "-116.4,1600")},
            "specimens.csv, row 3, column 'height [mm]': must be greater than zero",
        ),
        (
            {"specimens": SPECIMENS.replace("A2,", "A1,")},
            "specimens.csv, row 3, column 'specimen': specimen id given more than once",
        ),
        (
            {"specimens": SPECIMENS.replace(",2.70,18.0", ",27.0,18.0")},
            "specimens.csv, row 2, column 'specific_gravity': expected a specific gravity",
        ),
        (
            {"specimens": SPECIMENS.replace(",5\n", ",\n")},
            "column 'standpipe_area': specimen has falling-head readings but no standpipe",
        ),
        (
            {"falling_head": FALLING + "B9,0,100,20\n"},
            "falling_head.csv, row 8, column 'specimen': unknown specimen (not in specimens): B9",
        ),
        (
            {"falling_head": FALLING.replace("A1,20,90.3", "A1,10,90.3")},
            "falling_head.csv, row 4, column 'time [min]': time does not increase",
        ),
        (
            {"falling_head": FALLING.replace("A2,10,97", "A2,10,0")},
            "falling_head.csv, row 6, column 'head [cm]': must be greater than zero",
        ),
        (
            {"falling_head": FALLING.replace("A1,20,90.3", "A1,20,99.3")},
            "falling_head.csv, row 4, column 'head [cm]': head rises",
        ),
        (
            {"falling_head": FALLING.replace("A1,10,95", "A1,,95")},
            "falling_head.csv, row 3, column 'time [min]': value missing",
        ),
        (
            {"constant_head": CONSTANT.replace(",300,350,", ",0,350,")},
            "constant_head.csv, row 2, column 'duration [s]': must be greater than zero",
        ),
        (
            {"constant_head": CONSTANT.replace(",300,,280,", ",300,,,")},
            "constant_head.csv, row 3, column 'volume [mL]': give volume or outflow_mass",
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


def test_every_problem_is_reported_at_once(tmp_path):
    specimens = SPECIMENS.replace("116.4,1650", "x,1650").replace("A2,", "A1,")
    falling = FALLING.replace("A2,10,97", "A2,10,-1")
    problems = problems_of(write_series(tmp_path / "s", specimens=specimens, falling_head=falling))
    assert len(problems) >= 3


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
