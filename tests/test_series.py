"""Reading a series: units at the boundary, and every bad input named by file, row, column."""

import math
from pathlib import Path

import pandas as pd
import pytest

from kitchen.series import SeriesError, build_series, load_series, read_tables, rebuild_series

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


# --- building again after one table changed -------------------------------------------------


def _height_changed(tables, row: int, height_mm: float):
    changed = dict(tables)
    changed["specimens"] = tables["specimens"].copy()
    changed["specimens"].frame.loc[row, "height"] = height_mm
    return changed


def test_rebuild_after_a_specimen_change_equals_a_full_build(tmp_path):
    folder = write_series(tmp_path / "s", constant_head=CONSTANT)
    tables, files = read_tables(folder)
    series = build_series(tables, folder, files)
    changed = _height_changed(tables, 1, 117.0)
    rebuilt = rebuild_series(series, changed, ["specimens"])
    full = build_series(changed, folder, files)
    for name in ("specimens", "constant_head", "falling_head"):
        pd.testing.assert_frame_equal(getattr(rebuilt, name), getattr(full, name))
    assert rebuilt.specimens["height"].tolist() == pytest.approx([0.1164, 0.117])
    assert rebuilt.falling_head is series.falling_head  # the readings were not validated again
    assert (rebuilt.name, rebuilt.input_files, rebuilt.units) == (full.name, files, full.units)


def test_rebuild_reports_problems_as_a_full_build_does(tmp_path):
    folder = write_series(tmp_path / "s")
    tables, files = read_tables(folder)
    series = build_series(tables, folder, files)
    with pytest.raises(SeriesError) as caught:
        rebuild_series(series, _height_changed(tables, 0, -1.0), ["specimens"])
    assert [str(p) for p in caught.value.problems] == [
        "specimens.csv, row 2, column 'height [mm]': must be greater than zero"
    ]


def test_rebuild_checks_unchanged_readings_against_new_ids(tmp_path):
    folder = write_series(tmp_path / "s")
    tables, files = read_tables(folder)
    series = build_series(tables, folder, files)
    renamed = dict(tables)
    renamed["specimens"] = tables["specimens"].copy()
    renamed["specimens"].frame["specimen"] = ["A1", "B2"]
    with pytest.raises(SeriesError) as caught:
        rebuild_series(series, renamed, ["specimens"])
    problems = [str(p) for p in caught.value.problems]
    assert problems[0] == (
        "falling_head.csv, row 5, column 'specimen': unknown specimen (not in specimens): A2"
    )
    assert len(problems) == 3  # rows 5, 6 and 7


def test_rebuild_refuses_a_table_it_was_not_given(tmp_path):
    folder = write_series(tmp_path / "s")
    tables, files = read_tables(folder)
    with pytest.raises(ValueError, match="constant_head"):
        rebuild_series(build_series(tables, folder, files), tables, ["constant_head"])


def test_specimen_ids_are_read_without_surrounding_spaces(tmp_path):
    falling = FALLING.replace("A1,10,95", " A1 ,10,95").replace("A2,0,", "A2 ,0,")
    series = load_series(write_series(tmp_path / "s", falling_head=falling))
    assert series.falling_head["specimen"].tolist() == ["A1"] * 3 + ["A2"] * 3
    assert series.falling_head["specimen"].dtype == "string"


def test_a_text_id_column_in_many_rows_is_stored_once(tmp_path):
    """Each distinct id is one string object however many readings carry it."""
    rows = "".join(f"A1,{minute},{100 - minute * 0.01:.2f},20\n" for minute in range(2000))
    series = load_series(
        write_series(tmp_path / "s", falling_head=FALLING.split("\n")[0] + "\n" + rows)
    )
    ids = series.falling_head["specimen"].to_numpy(dtype=object)
    assert len({id(value) for value in ids}) == 1
