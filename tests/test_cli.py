"""The command line, run as a user runs it."""

import subprocess
import sys
from pathlib import Path

import pandas as pd

SAMPLES = Path(__file__).resolve().parents[1] / "sample_data"


def run(*arguments, cwd=None):
    return subprocess.run(
        [sys.executable, "-m", "kitchen", *map(str, arguments)],
        capture_output=True,
        text=True,
        cwd=cwd,
    )


def test_report_writes_results(tmp_path):
    done = run("report", SAMPLES / "clay_liner", "--out", tmp_path, "--no-images")
    assert done.returncode == 0, done.stderr
    table = pd.read_csv(tmp_path / "results.csv")
    assert len(table) == 14
    assert {"k20 [m/s]", "k20_low [m/s]", "k20_high [m/s]", "valid", "checks"} <= set(table)


def test_report_options(tmp_path):
    done = run(
        "report",
        "--no-images",
        SAMPLES / "drainage_sand",
        "--out",
        tmp_path,
        "--reference-temperature",
        "10",
        "--viscosity",
        "d5084",
    )
    assert done.returncode == 0, done.stderr
    assert "k10 [m/s]" in pd.read_csv(tmp_path / "results.csv").columns


def test_bad_series_lists_problems_without_traceback(tmp_path):
    folder = tmp_path / "bad"
    folder.mkdir()
    (folder / "specimens.csv").write_text(
        "specimen,diameter [mm],height,dry_mass [g],specific_gravity\nA,100,116,1600,2.7\n"
    )
    (folder / "falling_head.csv").write_text("specimen,time [s],head [m]\nA,0,1\nA,60,x\n")
    done = run("report", folder, "--out", tmp_path / "out")
    assert done.returncode == 2
    assert "Traceback" not in done.stderr
    assert "specimens.csv, row 1, column 'height'" in done.stderr
    assert "falling_head.csv, row 3, column 'head [m]': expected a number, found 'x'" in done.stderr
    assert not (tmp_path / "out" / "results.csv").exists()


def test_missing_series_is_named(tmp_path):
    done = run("report", tmp_path / "nowhere", "--out", tmp_path / "out")
    assert done.returncode == 2
    assert "not found" in done.stderr and "Traceback" not in done.stderr
