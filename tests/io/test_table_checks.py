"""Checking the values of a series: every bad value named by file, row and column."""

import numpy as np
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
    assert series.falling_head["specimen"].dtype == "string"


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
