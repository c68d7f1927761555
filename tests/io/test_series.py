"""Building a series: units at the boundary, assembly, and building again after a change."""

import math

import pandas as pd
import pytest
from series_files import CONSTANT, SPECIMENS, problems_of, write_series

from kitchen.io import SeriesError, build_series, load_series, read_tables, rebuild_series


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


def test_falling_head_readings_need_a_standpipe(tmp_path):
    problems = problems_of(write_series(tmp_path / "s", specimens=SPECIMENS.replace(",5\n", ",\n")))
    expected = "column 'standpipe_area': specimen has falling-head readings but no standpipe"
    assert any(expected in problem for problem in problems), problems
