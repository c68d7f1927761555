"""A small series written as CSV text, for the tests of reading, checking and building it."""

import re
from pathlib import Path

import pytest

from kitchen.io import SeriesError, load_series

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


def write_workbook(path: Path, sheets: dict[str, list[list]], hidden: tuple[str, ...] = ()) -> Path:
    """A workbook with one sheet per table, each given as rows of cells (the header first);
    a cell written as text starting with ``=`` is a formula, stored without a saved value."""
    import openpyxl

    book = openpyxl.Workbook()
    book.remove(book.active)
    for name, rows in sheets.items():
        sheet = book.create_sheet(name)
        for row in rows:
            sheet.append(row)
        if name in hidden:
            sheet.sheet_state = "hidden"
    book.save(path)
    return path


def csv_rows(text: str) -> list[list]:
    """The rows of CSV text as cells: numbers as numbers, everything else as text."""
    number = re.compile(r"^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$")
    rows = []
    for line in text.strip().split("\n"):
        rows.append(
            [float(cell) if number.match(cell) else (cell or None) for cell in line.split(",")]
        )
    return rows


# the logs a user's work leaves beside a series (the tool's own files, not the sample's)
USER_LOGS = ("revisions.csv", "windows.csv", "kept_tests.csv", "*.revisions.csv", "*.windows.csv",
             "*.kept_tests.csv")  # fmt: skip


def copy_sample(source, destination):
    """A copy of a sample series folder holding only its generated files: the raw tables,
    the project table and truth.json, never a log a user's work in the notebooks left beside
    them. Returns the destination as a Path."""
    import shutil

    return Path(shutil.copytree(source, destination, ignore=shutil.ignore_patterns(*USER_LOGS)))


def pristine_samples():
    """One copy per test session of the sample series as generated (raw tables, project
    tables, workbooks, truth.json), without the logs a user's work in the notebooks may have
    left beside them, so that no test reads a window, keep or revision that is not the
    sample's own."""
    import atexit
    import shutil
    import tempfile

    source = Path(__file__).resolve().parents[1] / "sample_data"
    target = Path(tempfile.mkdtemp(prefix="kitchen-samples-")) / "sample_data"
    atexit.register(shutil.rmtree, target.parent, True)  # removed when the session ends
    return copy_sample(source, target)


SAMPLES = pristine_samples()
"""The sample series as generated, copied once per test session (see pristine_samples)."""
