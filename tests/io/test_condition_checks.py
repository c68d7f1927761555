"""The flexible-wall conditions and B-value checks of a series: read, converted, refused."""

import pytest
from series_files import SPECIMENS, problems_of, write_series

from kitchen.io import load_series

FLEXIBLE = """specimen,cell_pressure [kPa],back_pressure [kPa],b_value,height_change [mm],volume_change [cm^3]
A1,550,515,0.97,1.1,18.5
"""
CHECKS = """specimen,back_pressure [kPa],cell_pressure_increment [kPa],pore_pressure_increment [kPa]
A1,200,50,35
A1,300,50,48.5
"""


def test_conditions_are_read_in_si(tmp_path):
    series = load_series(
        write_series(tmp_path / "s", flexible_wall=FLEXIBLE, b_value_checks=CHECKS)
    )
    row = series.flexible_wall.iloc[0]
    assert row["cell_pressure"] == pytest.approx(550e3)
    assert row["back_pressure"] == pytest.approx(515e3)
    assert row["height_change"] == pytest.approx(1.1e-3)
    assert row["volume_change"] == pytest.approx(18.5e-6)
    assert series.b_value_checks["pore_pressure_increment"].tolist() == [35e3, 48.5e3]


def test_a_series_without_conditions_has_empty_tables(tmp_path):
    series = load_series(write_series(tmp_path / "s"))
    assert series.flexible_wall.empty and series.b_value_checks.empty
    assert "cell_pressure" in series.flexible_wall.columns


def test_back_pressure_at_or_above_the_cell_pressure_is_named(tmp_path):
    text = FLEXIBLE.replace("550,515", "500,515")
    problems = problems_of(write_series(tmp_path / "s", flexible_wall=text))
    assert any(
        p.startswith("flexible_wall.csv, row 2, column 'back_pressure [kPa]', specimen A1")
        and "effective stress would be zero or less" in p
        for p in problems
    )


def test_a_change_given_twice_is_named(tmp_path):
    text = (
        "specimen,cell_pressure [kPa],back_pressure [kPa],consolidated_height [mm],"
        "height_change [mm],consolidated_diameter [mm],volume_change [mL]\n"
        "A1,550,515,115,1.1,101,18\n"
    )
    problems = problems_of(write_series(tmp_path / "s", flexible_wall=text))
    assert any("give consolidated_height or height_change, not both" in p for p in problems)
    assert any("give consolidated_diameter or volume_change, not both" in p for p in problems)


def test_a_height_change_as_large_as_the_height_is_named(tmp_path):
    text = FLEXIBLE.replace(",1.1,", ",116.4,")
    problems = problems_of(write_series(tmp_path / "s", flexible_wall=text))
    # 116.4 mm is also outside what a change of height can be: both are named
    assert any("as large as the specimen's height" in p for p in problems)
    assert any("-100 mm to 100 mm" in p for p in problems)


def test_unknown_and_repeated_specimens_are_named(tmp_path):
    text = FLEXIBLE + "A9,550,515,0.97,1.1,18.5\nA1,550,515,0.97,1.1,18.5\n"
    problems = problems_of(write_series(tmp_path / "s", flexible_wall=text))
    assert any("row 3" in p and "unknown specimen (not in specimens): A9" in p for p in problems)
    assert sum("specimen given more than once" in p for p in problems) == 2


def test_missing_pressures_and_units_are_named(tmp_path):
    text = "specimen,cell_pressure,b_value\nA1,550,0.97\n"
    problems = problems_of(write_series(tmp_path / "s", flexible_wall=text))
    assert any(
        "column 'cell_pressure'" in p and "has a dimension (pressure) but no unit" in p
        for p in problems
    )
    assert any("column 'back_pressure'" in p and "required column missing" in p for p in problems)


def test_a_b_value_out_of_range_is_named(tmp_path):
    problems = problems_of(
        write_series(tmp_path / "s", flexible_wall=FLEXIBLE.replace("0.97", "9.7"))
    )
    assert any("column 'b_value'" in p and "outside 0 to 1.2" in p for p in problems)


def test_a_pore_pressure_rise_above_the_cell_increment_is_named(tmp_path):
    text = CHECKS.replace("48.5", "75")
    problems = problems_of(write_series(tmp_path / "s", b_value_checks=text))
    assert any(
        p.startswith(
            "b_value_checks.csv, row 3, column 'pore_pressure_increment [kPa]', specimen A1"
        )
        and "B = Δu/Δσ3 is at most about 1" in p
        for p in problems
    )


def test_flow_direction_words(tmp_path):
    text = SPECIMENS.replace("standpipe_diameter [mm]", "standpipe_diameter [mm],flow_direction")
    text = text.replace(",5\nA2", ",5,Upward\nA2").rstrip("\n") + ",sideways\n"
    problems = problems_of(write_series(tmp_path / "s", specimens=text))
    assert len([p for p in problems if "flow_direction" in p]) == 1
    assert any(
        p.startswith("specimens.csv, row 3, column 'flow_direction', specimen A2")
        and "expected one of upward, downward, horizontal" in p
        for p in problems
    )
    good = load_series(write_series(tmp_path / "t", specimens=text.replace("sideways", "")))
    assert good.specimens["flow_direction"].iloc[0] == "upward"


def test_final_state_columns_are_checked(tmp_path):
    text = SPECIMENS.replace("standpipe_diameter [mm]", "standpipe_diameter [mm],final_height [m]")
    text = text.replace(",5\nA2", ",5,116\nA2")
    problems = problems_of(write_series(tmp_path / "s", specimens=text))
    assert any(
        p.startswith("specimens.csv, row 2, column 'final_height [m]', specimen A1")
        and "check the unit" in p
        for p in problems
    )
