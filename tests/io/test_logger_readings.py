"""Readings as they come off the bench: date-times, pressures, burette levels, and their errors."""

import math

import numpy as np
import pandas as pd
import pytest
from series_files import SPECIMENS, problems_of, write_series

from kitchen.io import STANDARD_GRAVITY, load_series, pressure_head, read_date_times, time_zone

BURETTES = """specimen,diameter [mm],height [mm],dry_mass [g],specific_gravity,water_content [%],standpipe_diameter [mm],tailwater_standpipe_diameter [mm]
A1,101.6,116.4,1650,2.70,18.0,8,8
A2,101.6,116.4,1600,2.70,16.0,8,8
"""


# --- pressure to head ---------------------------------------------------------------------
@pytest.mark.parametrize("temperature", [5.0, 15.0, 20.0, 25.0, 35.0])
def test_pressure_head_uses_the_water_density_of_iapws(temperature):
    # reference: IAPWS-95 through the iapws package, liquid water at 101.325 kPa
    iapws = pytest.importorskip("iapws")
    density = iapws.IAPWS95(T=273.15 + temperature, P=0.101325).rho
    pressure = 20_000.0  # Pa
    expected = pressure / (density * 9.80665)  # h = p/(ρw·g), hydrostatics
    assert pressure_head(pressure, temperature) == pytest.approx(expected, rel=2e-5)


def test_pressure_head_of_arrays_and_standard_gravity():
    # gn = 9.80665 m/s² exactly (3rd CGPM, 1901)
    assert STANDARD_GRAVITY == 9.80665
    heads = pressure_head(np.array([0.0, 9806.65]), np.array([4.0, 4.0]))
    # at 4 °C water is densest, about 999.97 kg/m³ (Tanaka et al. 2001): 1 m of head ≈ 1.00003 m
    assert heads[0] == 0.0
    assert heads[1] == pytest.approx(1000.0 / 999.975, rel=1e-5)


# --- date-times ---------------------------------------------------------------------------
def test_date_times_in_the_zone_of_the_header_and_with_their_own_offsets():
    texts = pd.Series(["2026-03-02T08:00:00", "2026-03-02T07:30:00Z", "2026-03-02T09:00+01:00"])
    seconds, zoneless, shifted = read_date_times(texts, "+01:00")
    base = pd.Timestamp("2026-03-02T07:00:00Z").timestamp()  # 08:00 at UTC+01:00
    assert seconds.tolist() == [base, base + 1800, base + 3600]
    assert not zoneless.any() and not shifted.any()


def test_date_times_in_a_named_zone_follow_summer_time():
    # Europe/Zurich is UTC+1 in winter and UTC+2 in summer (IANA time zone database)
    texts = pd.Series(["2026-01-15T12:00", "2026-07-15T12:00"])
    seconds, _, _ = read_date_times(texts, "Europe/Zurich")
    assert seconds[0] == pd.Timestamp("2026-01-15T11:00Z").timestamp()
    assert seconds[1] == pd.Timestamp("2026-07-15T10:00Z").timestamp()


def test_time_zone_words():
    assert time_zone(None) is None
    assert time_zone("UTC").utcoffset(None).total_seconds() == 0
    assert time_zone("UTC-05:30").utcoffset(None).total_seconds() == -(5.5 * 3600)
    with pytest.raises(ValueError, match="unknown time zone 'Mars/Olympus'"):
        time_zone("Mars/Olympus")


LOGGED = """specimen,date_time [UTC],head [cm],temperature [degC]
A1,2026-03-02T08:00:00,100,20
A1,2026-03-02T08:10:00,95,20
A1,2026-03-02T08:20:00,90.3,20
A2,2026-03-02T09:00:00,100,20
A2,2026-03-02T09:10:00,97,20
A2,2026-03-02T09:20:00,94.1,20
"""


def test_elapsed_time_from_date_times_counts_from_each_specimens_first_reading(tmp_path):
    series = load_series(write_series(tmp_path / "s", falling_head=LOGGED))
    assert series.falling_head["time"].tolist() == [0.0, 600.0, 1200.0] * 2
    assert "date_time" not in series.falling_head.columns


def test_date_and_time_of_day_columns(tmp_path):
    text = "specimen,date,time_of_day [+02:00],head [cm]\n" + "\n".join(
        f"A1,2026-06-01,{clock},{head}"
        for clock, head in (("23:50:00", 100), ("23:59:30", 95), ("00:09:00", 90))
    )
    # the date must move on at midnight: the third reading is written on the next day
    text = text.replace("2026-06-01,00:09:00", "2026-06-02,00:09:00")
    series = load_series(write_series(tmp_path / "s", falling_head=text + "\n"))
    assert series.falling_head["time"].tolist() == [0.0, 570.0, 1140.0]


def test_a_date_time_without_a_zone_is_named(tmp_path):
    text = LOGGED.replace("date_time [UTC]", "date_time")
    text = text.replace("2026-03-02T08:10:00", "2026-03-02T08:10:00+00:00")
    problems = problems_of(write_series(tmp_path / "s", falling_head=text))
    zoneless = [p for p in problems if "without a time zone" in p]
    assert len(zoneless) == 5
    assert zoneless[0].startswith("falling_head.csv, row 2, column 'date_time', specimen A1")


def test_unknown_zone_and_unreadable_date_time_are_named(tmp_path):
    text = LOGGED.replace("[UTC]", "[Atlantis]")
    problems = problems_of(write_series(tmp_path / "a", falling_head=text))
    assert any("column 'date_time [Atlantis]'" in p and "unknown time zone" in p for p in problems)
    text = LOGGED.replace("2026-03-02T08:10:00", "02/03/2026 8h10")
    problems = problems_of(write_series(tmp_path / "b", falling_head=text))
    assert any(
        p.startswith("falling_head.csv, row 3, column 'date_time [UTC]'")
        and "expected an ISO 8601 date-time" in p
        and "'02/03/2026 8h10'" in p
        for p in problems
    )


def test_a_logger_clock_that_jumps_back_is_named_by_row(tmp_path):
    text = LOGGED.replace("2026-03-02T08:20:00", "2026-03-02T08:05:00")
    problems = problems_of(write_series(tmp_path / "s", falling_head=text))
    assert any(
        p.startswith("falling_head.csv, row 4, column 'time'") and "does not increase" in p
        for p in problems
    )


def test_a_gap_in_a_logger_record_is_named_by_row(tmp_path):
    minutes = list(range(0, 20)) + [20 + 24 * 60]  # a reading a minute, then a day's silence
    rows = [
        f"A1,2026-03-02T{8 + m // 60:02d}:{m % 60:02d}:00,{100 - 0.1 * i:.1f}"
        for i, m in enumerate(minutes[:-1])
    ] + [f"A1,2026-03-03T08:20:00,{100 - 0.1 * 20:.1f}"]
    text = "specimen,date_time [UTC],head [cm]\n" + "\n".join(rows) + "\n"
    problems = problems_of(write_series(tmp_path / "s", specimens=SPECIMENS, falling_head=text))
    gaps = [p for p in problems if "a gap of" in p]
    assert len(gaps) == 1
    assert gaps[0].startswith("falling_head.csv, row 22, column 'date_time [UTC]', specimen A1")
    assert "24 h" in gaps[0] and "1 min apart" in gaps[0]


def test_readings_by_hand_at_doubling_intervals_are_no_gap(tmp_path):
    minutes = [0, 1, 2, 4, 8, 16, 32, 64, 128, 256, 512]  # common practice, no source
    base = pd.Timestamp("2026-03-02T08:00:00")
    rows = [
        f"A1,{(base + pd.Timedelta(minutes=m)).isoformat()},{100 * math.exp(-m / 2000):.2f}"
        for m in minutes
    ]
    text = "specimen,date_time [UTC],head [cm]\n" + "\n".join(rows) + "\n"
    series = load_series(write_series(tmp_path / "s", falling_head=text))
    assert series.falling_head["time"].iloc[-1] == 512 * 60


def test_elapsed_time_and_date_times_together_are_refused(tmp_path):
    text = "specimen,time [min],date_time [UTC],head [cm]\nA1,0,2026-03-02T08:00,100\n"
    problems = problems_of(write_series(tmp_path / "s", falling_head=text))
    assert any("give the elapsed time or date-times, not both" in p for p in problems)


# --- heads from pressures and burette levels ------------------------------------------------
PRESSURES = """specimen,time [min],head_pressure [kPa],temperature [degC]
A1,0,9.8,20
A1,10,9.3,20
A1,20,8.9,20
"""


def test_head_from_a_transducer_pressure(tmp_path):
    series = load_series(write_series(tmp_path / "s", falling_head=PRESSURES))
    # h = p/(ρw·g) with ρw(20 °C) = 998.2067 kg/m³ (Tanaka et al. 2001, from memory)
    expected = 9800.0 / (998.2067 * 9.80665)
    assert series.falling_head["head"].iloc[0] == pytest.approx(expected, rel=1e-6)


def test_head_from_psi(tmp_path):
    text = PRESSURES.replace("[kPa]", "[psi]")
    text = text.replace("9.8,", "1.4,").replace("9.3,", "1.35,").replace("8.9,", "1.3,")
    series = load_series(write_series(tmp_path / "s", falling_head=text))
    # 1 psi = 6894.757 Pa (NIST SP 811)
    assert series.falling_head["head"].iloc[0] == pytest.approx(
        1.4 * 6894.757 / (998.2067 * 9.80665), rel=1e-6
    )


def test_a_pressure_without_a_temperature_is_named(tmp_path):
    text = "specimen,time [min],head_pressure [kPa]\nA1,0,9.8\nA1,10,9.3\n"
    problems = problems_of(write_series(tmp_path / "a", falling_head=text))
    assert any(
        p.startswith("falling_head.csv, row 1, column 'head_pressure [kPa]'")
        and "add a temperature column" in p
        for p in problems
    )
    text = PRESSURES.replace("A1,10,9.3,20", "A1,10,9.3,")
    problems = problems_of(write_series(tmp_path / "b", falling_head=text))
    assert any(
        p.startswith("falling_head.csv, row 3, column 'temperature [degC]', specimen A1")
        and "needs the water temperature" in p
        for p in problems
    )


def test_a_pressure_unit_of_the_wrong_dimension_is_named(tmp_path):
    text = PRESSURES.replace("[kPa]", "[kg]")
    problems = problems_of(write_series(tmp_path / "s", falling_head=text))
    assert any("head_pressure [kg]" in p and "is not a pressure" in p for p in problems)


def test_head_given_two_ways_is_refused(tmp_path):
    text = "specimen,time [min],head [cm],head_pressure [kPa],temperature [degC]\nA1,0,100,9.8,20\n"
    problems = problems_of(write_series(tmp_path / "s", falling_head=text))
    assert any("the head is given more than one way (head, head_pressure)" in p for p in problems)


LEVELS = """specimen,time [min],headwater_level [mm],tailwater_level [mm]
A1,0,900,100
A1,10,880,119
A1,20,861,137
A2,0,900,100
A2,10,890,110
A2,20,880,120
"""


def test_head_and_volumes_from_burette_levels(tmp_path):
    series = load_series(write_series(tmp_path / "s", specimens=BURETTES, falling_head=LEVELS))
    readings = series.falling_head
    assert readings["head"].tolist() == pytest.approx([0.8, 0.761, 0.724, 0.8, 0.78, 0.76])
    area = math.pi * 0.008**2 / 4
    assert readings["inflow_volume"].iloc[2] == pytest.approx(0.039 * area)
    assert readings["outflow_volume"].iloc[2] == pytest.approx(0.037 * area)
    assert readings["inflow_volume"].iloc[3] == 0.0  # each specimen counts from its own start


def test_headwater_below_tailwater_is_named(tmp_path):
    text = LEVELS.replace("A1,20,861,137", "A1,20,130,137")
    problems = problems_of(write_series(tmp_path / "s", specimens=BURETTES, falling_head=text))
    assert any(
        p.startswith("falling_head.csv, row 4, column 'headwater_level [mm]', specimen A1")
        and "must be above tailwater_level" in p
        for p in problems
    )


def test_one_burette_level_alone_is_named(tmp_path):
    text = "specimen,time [min],headwater_level [mm]\nA1,0,900\n"
    problems = problems_of(write_series(tmp_path / "s", specimens=BURETTES, falling_head=text))
    assert any("column 'tailwater_level'" in p and "go together" in p for p in problems)


def test_every_problem_of_a_logger_file_is_listed_at_once(tmp_path):
    text = (
        "specimen,date_time,head_pressure [kPa],temperature [degC]\n"
        "A1,2026-03-02T08:00,9.8,20\n"
        "A1,not a time,9.7,\n"
        "A1,2026-03-02T08:20,-1,20\n"
    )
    problems = problems_of(write_series(tmp_path / "s", falling_head=text))
    rows = {(p.split(",")[1].strip()) for p in problems}
    assert {"row 2", "row 3", "row 4"} <= rows
    assert any("must be greater than zero" in p for p in problems)


def test_a_time_the_clocks_skipped_is_named(tmp_path):
    # Europe/Zurich skipped 02:00-03:00 on 2026-03-29 (IANA time zone database)
    text = (
        "specimen,date_time [Europe/Zurich],head [cm]\n"
        "A1,2026-03-29T01:30,100\nA1,2026-03-29T02:30,95\nA1,2026-03-29T03:30,90\n"
    )
    problems = problems_of(write_series(tmp_path / "s", falling_head=text))
    assert any(
        p.startswith("falling_head.csv, row 3, column 'date_time [Europe/Zurich]', specimen A1")
        and "skipped or passed twice when the clocks change" in p
        for p in problems
    )
    assert not any("expected an ISO 8601" in p for p in problems)


def test_revised_burette_areas_move_the_volumes(tmp_path):
    from kitchen.workspace import Workspace

    write_series(tmp_path / "s", specimens=BURETTES, falling_head=LEVELS)
    workspace = Workspace(tmp_path / "s")
    before = workspace.readings("A1")["inflow_volume"].iloc[2]
    workspace.revise(specimen="A1", field="standpipe_diameter", value="16 mm", reason="bore")
    assert workspace.readings("A1")["inflow_volume"].iloc[2] == pytest.approx(4 * before)


def test_a_workbook_with_date_cells_and_flexible_wall_sheets(tmp_path):
    import datetime as dt

    from series_files import csv_rows, write_workbook

    start = dt.datetime(2026, 3, 2, 8, 0)
    readings = [["specimen", "date [UTC]", "time_of_day [UTC]", "head [cm]"]] + [
        ["A1", start.date(), (start + dt.timedelta(minutes=m)).time(), 100 - m / 2]
        for m in (0, 10, 20)
    ]
    flexible = [["specimen", "cell_pressure [kPa]", "back_pressure [kPa]", "b_value"],
                ["A1", 550, 515, 0.96]]  # fmt: skip
    book = write_workbook(
        tmp_path / "s.xlsx",
        {"specimens": csv_rows(SPECIMENS), "falling_head": readings, "flexible_wall": flexible},
    )
    series = load_series(book)
    assert series.falling_head["time"].tolist() == [0.0, 600.0, 1200.0]
    assert series.flexible_wall["cell_pressure"].iloc[0] == 550e3
