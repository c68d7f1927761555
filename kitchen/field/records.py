"""The field-tests table: each test of the built liner, read and checked, in SI.

During construction each lift of a compacted clay liner is tested in the field for water
content and density (nuclear gauge, sand cone, drive cylinder). The tests are kept in a
table ``field_tests.csv`` in the series folder (or a sheet ``field_tests`` of the series
workbook, or a CSV file of any name elsewhere), one row per test, headers with their units
in brackets as every table of the tool: ``test``, ``date``, ``lift``, the location
(``station`` and ``offset``, or ``x`` and ``y``), ``water_content``, ``dry_density`` (or
``wet_density``, from which ρd = ρ/(1 + w)), ``method`` and, optionally, ``effort`` (the
laboratory effort whose fitted prediction applies). The table is read by the readers of
:mod:`kitchen.io` and every problem is listed at once, naming file, row, column and test.
The file is read, never written.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from kitchen.io import InputProblem, SeriesError, convert_table, read_table, report_rows

__all__ = [
    "FIELD_TESTS",
    "DENSITY_AGREEMENT",
    "FieldTests",
    "FieldTestsError",
    "dry_density_from_wet",
    "field_tests_path",
    "read_field_tests",
]

FIELD_TESTS = "field_tests"
"""The name of the table: ``field_tests.csv`` in a folder, a sheet of that name in a
workbook."""

DENSITY_AGREEMENT = 0.01
"""Where a row gives both the wet and the dry density, the dry density may differ from
ρ/(1 + w) by this share before the row is refused (rounding of the printed values). Common
practice, no source."""

_LOCATIONS = (("station", "offset"), ("x", "y"))


class FieldTestsError(SeriesError):
    """A field-tests table that cannot be used, with every problem found in it."""

    def __init__(self, problems: list[InputProblem]):
        self.problems = list(problems)
        lines = [f"{len(self.problems)} problem(s) in the field tests:"]
        lines += [f"  - {problem}" for problem in self.problems]
        ValueError.__init__(self, "\n".join(lines))


@dataclass(frozen=True)
class FieldTests:
    """The field tests of a liner, checked and in SI.

    Attributes
    ----------
    source : pathlib.Path
        The file read (a CSV file, or the workbook holding the sheet).
    label : str
        The file as messages name it (``field_tests.csv``, ``liner.xlsx [field_tests]``).
    location : tuple of str
        The location columns used: ``("station", "offset")`` or ``("x", "y")``.
    tests : pandas.DataFrame
        One row per test, in the file's order: ``test``, ``date`` (a timestamp), ``lift``,
        ``method``, ``effort`` (may be empty), the two location columns [m],
        ``water_content`` [-], ``dry_density`` [kg/m3], ``wet_density`` [kg/m3] (NaN
        where not given), ``dry_density_from`` (``"measured"`` or ``"wet density and
        water content"``) and ``source_row`` (the row a spreadsheet shows, header = 1).
    units : dict
        The unit of each column as written in its header.
    """

    source: Path
    label: str
    location: tuple[str, str]
    tests: pd.DataFrame
    units: dict


def field_tests_path(path: str | Path) -> Path:
    """The file a field-tests table is read from: ``field_tests.csv`` in a folder, the
    workbook itself (its sheet ``field_tests``), or the file given."""
    path = Path(path)
    return path / f"{FIELD_TESTS}.csv" if path.is_dir() else path


def dry_density_from_wet(wet_density, water_content):
    """Dry density from the wet (bulk) density and the water content.

    Parameters
    ----------
    wet_density : float or array_like
        Bulk density of the moist soil ρ. [kg/m3]
    water_content : float or array_like
        Water content w, a fraction. [-]

    Returns
    -------
    float or numpy.ndarray
        ρd = ρ/(1 + w). [kg/m3]

    References
    ----------
    Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, weight–volume
    relationships (ρd = ρ/(1 + w); from memory); ASTM D6938 and ASTM D1556 compute the
    in-place dry density of a nuclear-gauge or sand-cone test the same way (from memory).

    Examples
    --------
    >>> round(float(dry_density_from_wet(2040.0, 0.20)), 6)
    1700.0
    """
    return np.asarray(wet_density, dtype=float) / (1.0 + np.asarray(water_content, dtype=float))


def _dates(table, frame, ids, problems) -> np.ndarray:
    """The ``date`` column as timestamps; a cell that is not a date is named."""
    texts = frame["date"].to_numpy(dtype=object)
    parsed = np.full(len(texts), np.datetime64("NaT"), dtype="datetime64[ns]")
    bad = np.zeros(len(texts), dtype=bool)
    for i, text in enumerate(texts):
        if text is pd.NA or text is None or (isinstance(text, float) and np.isnan(text)):
            continue
        try:
            stamp = pd.Timestamp(str(text).strip())
        except (ValueError, TypeError, OverflowError):
            stamp = pd.NaT
        if pd.isna(stamp) or stamp.tzinfo is not None:
            bad[i] = True
        else:
            parsed[i] = stamp.to_datetime64()
    report_rows(
        problems,
        table,
        bad,
        "date",
        "expected a date as YYYY-MM-DD (a time may follow, 2025-06-03 14:20), without a time zone",
        ids=ids,
    )
    return parsed


def read_field_tests(path: str | Path) -> FieldTests:
    """Read and check a field-tests table.

    Parameters
    ----------
    path : str or pathlib.Path
        A series folder (its ``field_tests.csv``), a workbook (its sheet ``field_tests``),
        or a CSV file of field tests.

    Returns
    -------
    FieldTests

    Raises
    ------
    FieldTestsError
        Every problem at once, each naming file, row, column and test: a missing file or
        column, a header without its unit, a value that is not a number or outside what a
        compacted soil can hold, a missing value, a date that is not one, no location
        columns (station and offset, or x and y) or a location left empty, neither a dry
        nor a wet density, a wet and dry density that disagree, a test id given twice.
    """
    path = field_tests_path(path)
    try:
        table = read_table(path, FIELD_TESTS)
    except SeriesError as error:
        raise FieldTestsError(error.problems) from None
    problems = list(table.problems)
    frame, ids = convert_table(table, problems)
    columns = set(table.frame.columns)
    location = next((pair for pair in _LOCATIONS if set(pair) <= columns), None)
    if location is None:
        found = ", ".join(table.headers.values()) or "none"
        problems.append(
            InputProblem(
                table.file,
                1,
                "station",
                "no location columns: expected 'station [m]' and 'offset [m]', or 'x [m]' "
                f"and 'y [m]'; columns found: {found}",
            )
        )
    else:
        for column in location:
            report_rows(
                problems,
                table,
                frame[column].isna().to_numpy() & table.frame[column].isna().to_numpy(),
                column,
                "value missing; expected the test's location",
                ids=ids,
            )
    if not {"dry_density", "wet_density"} & columns:
        problems.append(
            InputProblem(
                table.file,
                1,
                "dry_density",
                "no density column: expected 'dry_density [Mg/m^3]', or 'wet_density "
                "[Mg/m^3]' from which the dry density is worked out with the water content",
            )
        )
    w = frame["water_content"].to_numpy(dtype=float)
    dry = frame["dry_density"].to_numpy(dtype=float)
    wet = frame["wet_density"].to_numpy(dtype=float)
    given = lambda column: (  # noqa: E731 - a cell written, whatever it held
        table.frame[column].notna().to_numpy()
        if column in columns
        else np.zeros(len(frame), dtype=bool)
    )
    neither = ~given("dry_density") & ~given("wet_density")
    if {"dry_density", "wet_density"} & columns:
        shown = "dry_density" if "dry_density" in columns else "wet_density"
        report_rows(
            problems,
            table,
            neither,
            shown,
            "value missing; expected a dry density, or a wet density with the water content",
            ids=ids,
        )
    from_wet = dry_density_from_wet(wet, w)
    both = np.isfinite(dry) & np.isfinite(from_wet)
    with np.errstate(invalid="ignore"):
        apart = both & (np.abs(dry - from_wet) > DENSITY_AGREEMENT * from_wet)
    for i in np.flatnonzero(apart)[:20]:
        problems.append(
            InputProblem(
                table.file,
                int(frame["source_row"].iloc[i]),
                table.headers["dry_density"],
                f"the dry density {dry[i] / 1000:.3f} Mg/m³ differs from the wet density "
                f"over 1 + w, {wet[i] / 1000:.3f}/(1 + {w[i]:.3f}) = {from_wet[i] / 1000:.3f} "
                f"Mg/m³, by more than {100 * DENSITY_AGREEMENT:g} %: check the row",
                _test_at(ids, i),
                "test",
            )
        )
    dates = _dates(table, frame, ids, problems)
    test_ids = frame["test"].to_numpy(dtype=object)
    seen: dict = {}
    for i, test in enumerate(test_ids):
        if test is pd.NA:
            continue
        if test in seen:
            problems.append(
                InputProblem(
                    table.file,
                    int(frame["source_row"].iloc[i]),
                    table.headers["test"],
                    f"test id given twice (first in row {seen[test]}); each test needs its own "
                    "id (a retest too: it is linked to the test it replaces by its location)",
                    str(test),
                    "test",
                )
            )
        else:
            seen[test] = int(frame["source_row"].iloc[i])
    if problems:
        rows = frame["source_row"].to_numpy()
        test_of_row = {
            int(row): str(test)
            for row, test in zip(rows, test_ids, strict=True)
            if test is not pd.NA
        }
        raise FieldTestsError([_as_test(problem, test_of_row) for problem in problems])
    source = path
    tests = pd.DataFrame(
        {
            "test": frame["test"].astype(str).to_numpy(dtype=object),
            "date": dates,
            "lift": frame["lift"].astype(str).to_numpy(dtype=object),
            "method": frame["method"].astype(str).to_numpy(dtype=object),
            "effort": frame["effort"].to_numpy(dtype=object),
            location[0]: frame[location[0]].to_numpy(dtype=float),
            location[1]: frame[location[1]].to_numpy(dtype=float),
            "water_content": w,
            "dry_density": np.where(np.isfinite(dry), dry, from_wet),
            "wet_density": wet,
            "dry_density_from": np.where(
                np.isfinite(dry), "measured", "wet density and water content"
            ),
            "source_row": frame["source_row"].to_numpy(dtype=int),
        }
    )
    tests["effort"] = [None if pd.isna(e) else str(e) for e in tests["effort"]]
    return FieldTests(source, table.file, location, tests, dict(table.units))


def _test_at(ids, index: int) -> str | None:
    if ids is None or ids.codes[index] < 0:
        return None
    return str(ids.values[ids.codes[index]])


def _as_test(problem: InputProblem, test_of_row: dict) -> InputProblem:
    """A problem of the table naming its row's test, as a test (not a specimen)."""
    test = problem.specimen if problem.specimen is not None else test_of_row.get(problem.row)
    return InputProblem(problem.file, problem.row, problem.column, problem.message, test, "test")
