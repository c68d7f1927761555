"""Checking the values of a series: every bad value named by file, row and column."""

import numpy as np
import pandas as pd
import pytest
from series_files import CONSTANT, FALLING, SPECIMENS, problems_of, write_series

from kitchen.io import HEAD_RISE_SCATTERS, HEAD_RISE_TOLERANCE, head_rise_tolerance, load_series


def test_mold_masses_give_dry_mass(tmp_path):
    specimens = SPECIMENS.replace("dry_mass [g]", "mold_mass [g],mold_and_soil_mass [g]")
    specimens = specimens.replace(",1650,", ",2100.0,3750.0,").replace(",1600,", ",2100,3700,")
    series = load_series(write_series(tmp_path / "s", specimens=specimens))
    assert series.specimens["dry_mass"].tolist() == pytest.approx([1.65, 1.60])


@pytest.mark.parametrize(
    ("tables", "expected"),
    [
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


def test_specimen_ids_are_read_without_surrounding_spaces(tmp_path):
    falling = FALLING.replace("A1,10,95", " A1 ,10,95").replace("A2,0,", "A2 ,0,")
    series = load_series(write_series(tmp_path / "s", falling_head=falling))
    assert series.falling_head["specimen"].tolist() == ["A1"] * 3 + ["A2"] * 3
    ids = series.falling_head["specimen"]  # a readings table: one code a row
    assert isinstance(ids.dtype, pd.CategoricalDtype)
    assert ids.cat.categories.dtype == "string" and ids.cat.codes.dtype.itemsize == 1
    assert series.specimens["specimen"].dtype == "string"  # one a row: strings


def test_a_text_id_column_in_many_rows_is_stored_once(tmp_path):
    """Each distinct id is one string object however many readings carry it."""
    rows = "".join(f"A1,{minute},{100 - minute * 0.01:.2f},20\n" for minute in range(2000))
    series = load_series(
        write_series(tmp_path / "s", falling_head=FALLING.split("\n")[0] + "\n" + rows)
    )
    ids = series.falling_head["specimen"].to_numpy(dtype=object)
    assert len({id(value) for value in ids}) == 1


def _logger_csv(noise_mm: float, refill_at: int | None = None, n: int = 20_000) -> str:
    # a transducer read every second: the head falls 0.2 m over the record (k of a clay),
    # far less between two readings than the transducer scatters
    rng = np.random.default_rng(11)
    t = np.arange(n, dtype=float)
    head = 1.2 * np.exp(-t / 1.2e5) + rng.normal(0.0, noise_mm * 1e-3, n)
    if refill_at is not None:
        head[refill_at:] += 0.05  # the standpipe topped up by 5 cm
    lines = ["specimen,time [s],head [m],temperature [degC]"]
    lines += [f"A1,{ti:.0f},{hi:.5f},20" for ti, hi in zip(t, head, strict=True)]
    return "\n".join(lines) + "\n"


def test_a_noisy_logger_record_loads_and_a_refill_is_still_caught(tmp_path):
    # 1 mm scatter: successive heads rise by up to about 6 mm, which is scatter, not a refill
    noisy = _logger_csv(1.0)
    series = load_series(write_series(tmp_path / "noisy", falling_head=noisy))
    assert len(series.falling_head) == 20_000
    problems = problems_of(write_series(tmp_path / "refill", falling_head=_logger_csv(1.0, 9000)))
    assert len(problems) == 1
    assert problems[0].startswith("falling_head.csv, row 9002, column 'head [m]': head rises")
    assert "times the scatter of this specimen's successive heads" in problems[0]


def test_head_rise_tolerance_follows_the_scatter():
    # for normal data 1.4826 * MAD estimates sigma (Rousseeuw & Croux 1993); successive
    # differences of noise of sd s have sd s * sqrt(2)
    rng = np.random.default_rng(5)
    head = 1.0 + rng.normal(0.0, 1e-3, 200_000)
    expected = HEAD_RISE_SCATTERS * 1e-3 * np.sqrt(2)
    assert head_rise_tolerance(head) == pytest.approx(expected, rel=0.02)
    assert head_rise_tolerance(np.linspace(1.0, 0.9, 50)) == HEAD_RISE_TOLERANCE  # no scatter
    assert head_rise_tolerance(np.array([1.0, 0.99, 0.98])) == HEAD_RISE_TOLERANCE  # too few


@pytest.mark.parametrize(
    ("tables", "expected"),
    [
        (
            {"specimens": SPECIMENS.replace(",1650,", ",inf,")},
            "specimens.csv, row 2, column 'dry_mass [g]', specimen A1: expected a finite "
            "number, found inf",
        ),
        (
            {"specimens": SPECIMENS.replace(",1600,", ",-inf,")},
            "specimens.csv, row 3, column 'dry_mass [g]', specimen A2: expected a finite "
            "number, found -inf",
        ),
        (
            {"specimens": SPECIMENS.replace("101.6,116.4,1650", "1e999,116.4,1650")},
            "specimens.csv, row 2, column 'diameter [mm]', specimen A1: expected a finite "
            "number, found inf",
        ),
        (
            {"falling_head": None, "constant_head": CONSTANT.replace(",300,350,", ",inf,350,")},
            "constant_head.csv, row 2, column 'duration [s]', specimen A1: expected a finite "
            "number, found inf",
        ),
        (
            {"falling_head": FALLING.replace("A2,10,97", "A2,Infinity,97")},
            "falling_head.csv, row 6, column 'time [min]', specimen A2: expected a finite "
            "number, found inf",
        ),
        (
            {
                "specimens": SPECIMENS.replace("height [mm]", "height [Mm]").replace(
                    "116.4,1650", "1e303,1650"
                )
            },
            "specimens.csv, row 2, column 'height [Mm]', specimen A1: 1e+303 Mm is too large "
            "a number",
        ),
    ],
)
def test_a_number_that_is_not_finite_is_named(tmp_path, tables, expected):
    problems = problems_of(write_series(tmp_path / "s", **tables))
    assert expected in problems, problems
    assert not any("no dry mass" in problem for problem in problems), problems


# The plausible ranges are the tool's own (common practice, no source): a specimen of
# 10 mm-1 m diameter and 5 mm-1 m height, 1 g-100 kg of dry soil, water content 0-200 %,
# heads up to 100 m, water at 0-60 degC, a collection up to 30 days.
@pytest.mark.parametrize(
    ("tables", "expected"),
    [
        (
            {"specimens": SPECIMENS.replace("height [mm]", "height [Mm]")},
            "specimens.csv, row 2, column 'height [Mm]', specimen A1: 116.4 Mm (1.164e+08 m) "
            "is outside 5 mm to 1 m, what a specimen's height in a laboratory test can be: "
            "check the unit",
        ),
        (
            {"specimens": SPECIMENS.replace("diameter [mm]", "diameter [cm]")},
            "specimens.csv, row 3, column 'diameter [cm]', specimen A2: 101.6 cm (1.016 m) is "
            "outside 10 mm to 1 m, what a specimen's diameter in a laboratory test can be: "
            "check the unit",
        ),
        (
            {"specimens": SPECIMENS.replace("dry_mass [g]", "dry_mass [kg]")},
            "specimens.csv, row 2, column 'dry_mass [kg]', specimen A1: 1650 kg is "
            "outside 1 g to 100 kg, what a specimen's dry mass in a laboratory test can be: "
            "check the unit",
        ),
        (
            {
                "specimens": SPECIMENS.replace(",18.0,", ",0.18,")
                .replace(",16.0,", ",0.16,")
                .replace("[%]", "[-]")
            },
            None,  # a water content as a fraction under [-] is right
        ),
        (
            {"specimens": SPECIMENS.replace(",18.0,", ",250,")},
            "specimens.csv, row 2, column 'water_content [%]', specimen A1: 250 % is "
            "outside 0 to 200 %, what a water content in a laboratory test can be: check the "
            "unit",
        ),
        (
            {"specimens": SPECIMENS.replace(",5\n", ",5000\n")},
            "specimens.csv, row 2, column 'standpipe_diameter [mm]', specimen A1: 5000 mm "
            "(5 m) is outside 0.1 mm to 300 mm",
        ),
        (
            {"falling_head": FALLING.replace("head [cm]", "head [km]")},
            "falling_head.csv, row 2, column 'head [km]', specimen A1: 100 km (1e+05 m) is "
            "outside up to 100 m, what a head in a laboratory test can be: check the unit",
        ),
        (
            {"falling_head": FALLING.replace("A2,10,97,19", "A2,10,97,66.2")},
            "falling_head.csv, row 6, column 'temperature [degC]', specimen A2: 66.2 degC "
            "(66.2 °C) is outside 0 to 60 °C, what a water temperature in a laboratory test "
            "can be: check the unit",
        ),
        (
            {
                "falling_head": None,
                "constant_head": CONSTANT.replace("duration [s]", "duration [d]"),
            },
            "constant_head.csv, row 2, column 'duration [d]', specimen A1: 300 d (2.592e+07 s) "
            "is outside up to 30 days",
        ),
    ],
)
def test_a_value_far_outside_a_laboratory_test_is_named_check_the_unit(tmp_path, tables, expected):
    folder = write_series(tmp_path / "s", **tables)
    if expected is None:
        assert load_series(folder).specimens["water_content"].tolist() == pytest.approx(
            [0.18, 0.16]
        )
        return
    problems = problems_of(folder)
    assert any(problem.startswith(expected) for problem in problems), problems


# Phase relations (Das & Sobhan, weight-volume relationships): rho_d = Ms / V,
# e = Gs rho_w / rho_d - 1, S = w Gs / e. The specimen of 101.6 mm by 116.4 mm holds
# V = 943.7 cm3; with Gs 2.70 a void ratio of zero is a dry mass of 2548 g.
@pytest.mark.parametrize(
    ("specimens", "expected"),
    [
        (
            SPECIMENS.replace(",1650,", ",3500,"),
            "specimens.csv, row 2, column 'dry_mass [g]', specimen A1: this dry mass gives a "
            "dry density of 3.71 Mg/m³ and a void ratio of -0.272 (with Gs 2.7): a void ratio "
            "above zero expected, no soil is denser than its solids; is it the mass of mold "
            "and soil?",
        ),
        (
            SPECIMENS.replace(",1650,", ",2200,"),
            # rho_d = 2200 g / 943.7 cm3 = 2.331 Mg/m3, e = 0.158, S = 0.18 * 2.70 / 0.158
            "specimens.csv, row 2, column 'dry_mass [g]', specimen A1: this dry mass gives a "
            "dry density of 2.33 Mg/m³ and a void ratio of 0.158 (with Gs 2.7), so a "
            "saturation of 307 % at a water content of 18 %: at most about 100 % expected",
        ),
        (
            SPECIMENS.replace("dry_mass [g]", "dry_mass [kg]")
            .replace(",1650,", ",1.65,")
            .replace(",1600,", ",1.6,"),
            None,  # the same specimen in kilograms
        ),
        (
            SPECIMENS.replace(",1650,", ",1.65,"),
            # 1.65 g: rho_d = 0.00175 Mg/m3, e = 1543
            "specimens.csv, row 2, column 'dry_mass [g]', specimen A1: this dry mass gives a "
            "dry density of 0.00175 Mg/m³ and a void ratio of 1.54e+03 (with Gs 2.7): a void "
            "ratio up to 5 expected of a compacted specimen; check the unit",
        ),
    ],
)
def test_phase_relations_out_of_reach_are_named(tmp_path, specimens, expected):
    folder = write_series(tmp_path / "s", specimens=specimens)
    if expected is None:
        assert load_series(folder).specimens["dry_mass"].tolist() == pytest.approx([1.65, 1.6])
        return
    problems = problems_of(folder)
    assert any(problem.startswith(expected) for problem in problems), problems


def test_the_mold_and_soil_mass_typed_as_the_mold_mass_difference_is_named(tmp_path):
    # mold 2100 g, mold and soil 5600 g: 3500 g of dry soil in 943.7 cm3, e = -0.27
    specimens = (
        SPECIMENS.replace("dry_mass [g]", "mold_mass [g],mold_and_soil_mass [g]")
        .replace(",1650,", ",2100,5600,")
        .replace(",1600,", ",2100,3700,")
    )
    problems = problems_of(write_series(tmp_path / "s", specimens=specimens))
    assert len(problems) == 1
    assert problems[0].startswith(
        "specimens.csv, row 2, column 'mold_and_soil_mass [g]', specimen A1: this dry mass "
        "gives a dry density of 3.71 Mg/m³ and a void ratio of -0.272"
    )
