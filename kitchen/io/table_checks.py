"""The checks of a series' values, and their conversion to SI.

Each raw table's columns are converted to SI (:func:`convert_table`), and its values checked:
numbers where numbers belong, positive and non-negative quantities, the dry mass and the
standpipe areas of the specimens table (:func:`check_specimens`), known specimen ids, and
readings in time order with a falling head (:func:`check_readings`). Every problem is
added to a list as an :class:`~kitchen.io.raw_tables.InputProblem` naming the file, the row
and the column; :mod:`kitchen.io.series` refuses the series with all of them at once. Text
columns are handled by their distinct values, and every check is a vectorised pass.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from .raw_tables import SCHEMAS, TEXT_KINDS, InputProblem, RawTable
from .units import to_si

__all__ = ["HEAD_RISE_TOLERANCE", "HEAD_RISE_SCATTERS", "head_rise_tolerance"]


_POSITIVE = {
    "specimens": (
        "diameter",
        "height",
        "dry_mass",
        "specific_gravity",
        "d10",
        "standpipe_diameter",
        "standpipe_area",
        "tailwater_standpipe_diameter",
        "tailwater_standpipe_area",
    ),
    "constant_head": ("head_difference", "duration", "volume", "outflow_mass", "flow_length"),
    "falling_head": ("head",),
}


_NON_NEGATIVE = {
    "specimens": ("water_content", "mold_mass"),
    "falling_head": ("time", "inflow_volume", "outflow_volume"),
}


_LEFT_OUT_WHEN_ABSENT = {"falling_head": ("inflow_volume", "outflow_volume")}
"""Optional columns the SI table leaves out when the file has none (a logger record rarely
carries volumes; an empty column of 10⁶ readings would cost 8 MB)."""


HEAD_RISE_TOLERANCE = 0.002
"""A falling-head reading may rise this much above the one before it (resolution), or
more for a logger record whose heads scatter more (see :func:`head_rise_tolerance`). [m]"""

HEAD_RISE_SCATTERS = 8.0
"""How many standard deviations of the scatter of successive head changes a rise may reach
before it counts as a refill or an error (Gaussian noise exceeds 8 σ about once in 10¹⁵
readings)."""


def head_rise_tolerance(head: np.ndarray) -> float:
    """The largest rise between successive readings of one specimen taken as scatter. [m]

    The larger of :data:`HEAD_RISE_TOLERANCE` and :data:`HEAD_RISE_SCATTERS` times a robust
    standard deviation of the successive changes of head (1.4826 times their median
    absolute deviation from their median, which the slow fall of a long record barely
    moves). A transducer logging every second scatters by more than the head falls between
    two readings, so its heads rise often and by a few millimetres; a refilled standpipe
    rises by centimetres. The tool's own rule.

    References
    ----------
    Rousseeuw, P. J. and Croux, C. (1993), J. Am. Stat. Assoc. 88(424), 1273–1283: the
    median absolute deviation, scaled by 1.4826, as a robust estimate of σ for normal data.
    """
    steps = np.diff(np.asarray(head, dtype=float))
    steps = steps[np.isfinite(steps)]
    if steps.size < 8:  # too few to judge the scatter: the resolution alone
        return HEAD_RISE_TOLERANCE
    spread = 1.4826 * float(np.median(np.abs(steps - np.median(steps))))
    return max(HEAD_RISE_TOLERANCE, HEAD_RISE_SCATTERS * spread)


def _numeric_column(table: RawTable, column: str, problems: list[InputProblem]) -> np.ndarray:
    """The column as a new array of floats in SI; bad cells are reported and become NaN."""
    values = table.frame[column]
    if values.dtype.kind in "fiu":
        numbers = values.to_numpy(dtype=float)
    else:
        numbers = pd.to_numeric(values, errors="coerce").to_numpy(dtype=float)
        bad = np.flatnonzero(np.isnan(numbers) & values.notna().to_numpy())
        rows = table.frame["source_row"].to_numpy()
        for index in bad:
            problems.append(
                InputProblem(
                    table.file,
                    int(rows[index]),
                    table.headers[column],
                    f"expected a number, found {values.iloc[index]!r}",
                )
            )
    kind = SCHEMAS[table.name][column].kind
    unit = table.units.get(column)
    if kind == "dimensionless" or not unit:
        return numbers.copy()  # never a view of the raw table
    if to_si(0.0, unit, kind) != 0.0:  # an offset unit (degF, K)
        return to_si(numbers, unit, kind)
    return np.multiply(numbers, to_si(1.0, unit, kind))  # one pass, one new array


def report_rows(problems, table: RawTable, mask: np.ndarray, column: str, message: str, limit=20):
    """Add `message` for each row of `table` where `mask` holds, naming file, row and column.

    The first `limit` rows are named one by one, the rest counted in one more problem.
    """
    if not mask.any():
        return
    rows = table.frame["source_row"].to_numpy()[mask]
    header = table.headers.get(column, column)
    for row in rows[:limit]:
        problems.append(InputProblem(table.file, int(row), header, message))
    if len(rows) > limit:
        problems.append(
            InputProblem(table.file, None, header, f"{len(rows) - limit} more row(s): {message}")
        )


@dataclass(frozen=True)
class TextCodes:
    """A text column as codes into its distinct values: ``values[codes]``, -1 where empty."""

    codes: np.ndarray
    values: np.ndarray  # distinct stripped texts (object array of str)

    @classmethod
    def of(cls, column: pd.Series) -> TextCodes:
        """Codes of a text column; each distinct text is stripped once, not once per row."""
        if isinstance(column.dtype, pd.CategoricalDtype):
            codes = column.cat.codes.to_numpy()
            texts = column.cat.categories.to_numpy(dtype=object)
        else:
            codes, texts = pd.factorize(column.to_numpy(dtype=object))
        stripped = np.array([str(text).strip() for text in texts], dtype=object)
        merged, values = pd.factorize(stripped)  # " A1" and "A1" are one specimen
        merged = np.where(values[merged] == "", -1, merged)
        if np.array_equal(merged, np.arange(len(texts))):
            return cls(codes, values)  # nothing merged or emptied: the codes stand
        return cls(np.append(merged, -1)[codes], values)  # code -1 stays -1

    def strings(self) -> pd.arrays.StringArray:
        """The column as pandas strings, ``<NA>`` where empty."""
        return pd.array(self.values, dtype="string").take(self.codes, allow_fill=True)

    def present(self) -> np.ndarray:
        """Which of `values` occur in the column."""
        counts = np.bincount(self.codes + 1, minlength=len(self.values) + 1)
        return counts[1:].astype(bool)


def convert_table(table: RawTable, problems: list[InputProblem]) -> tuple[pd.DataFrame, TextCodes]:
    """The table in SI with its value problems reported, and its specimen ids as codes."""
    schema = SCHEMAS[table.name]
    rows = table.frame["source_row"].to_numpy(dtype=np.int32)  # a new array, not a view
    n = rows.size
    columns: dict[str, object] = {"source_row": rows}
    ids = None
    for column, spec in schema.items():
        present = column in table.frame.columns
        if spec.kind in TEXT_KINDS:
            if present:
                labels = TextCodes.of(table.frame[column])
                columns[column] = labels.strings()
                ids = labels if column == "specimen" else ids
                if spec.required:
                    report_rows(problems, table, labels.codes < 0, column, "value missing")
            else:
                columns[column] = pd.array([pd.NA] * n, dtype="string")
            continue
        if not present:
            if column not in _LEFT_OUT_WHEN_ABSENT.get(table.name, ()):
                columns[column] = np.full(n, np.nan)
            continue
        values = _numeric_column(table, column, problems)
        columns[column] = values
        finite = np.isfinite(values)
        if spec.required:
            empty = table.frame[column].isna().to_numpy()
            report_rows(problems, table, empty, column, "value missing; expected a number")
        if column in _POSITIVE.get(table.name, ()):
            report_rows(
                problems, table, finite & (values <= 0), column, "must be greater than zero"
            )
        if column in _NON_NEGATIVE.get(table.name, ()):
            report_rows(problems, table, finite & (values < 0), column, "must not be negative")
    # every column is a new array: the frame takes them as they are (no copy, no consolidation)
    return pd.DataFrame(columns, copy=False), ids


def check_specimens(
    table: RawTable, frame: pd.DataFrame, problems: list[InputProblem]
) -> pd.DataFrame:
    """Checks across the columns of the specimens table; fills the dry mass from the mold
    masses and the standpipe areas from their diameters. Takes the frame `convert_table` made
    (new arrays, owned here) and returns it with the diameters left out."""

    def column(name: str) -> np.ndarray:
        return frame[name].to_numpy(dtype=float)

    ids = frame["specimen"]
    duplicated = (ids.duplicated(keep=False) & ids.notna()).to_numpy()
    report_rows(problems, table, duplicated, "specimen", "specimen id given more than once")
    dry, mold, full = column("dry_mass"), column("mold_mass"), column("mold_and_soil_mass")
    has_dry = ~np.isnan(dry)
    has_mold = ~np.isnan(mold) & ~np.isnan(full)
    report_rows(
        problems,
        table,
        ~has_dry & ~has_mold,
        "dry_mass",
        "no dry mass: give dry_mass, or both mold_mass and mold_and_soil_mass",
    )
    by_mold = ~has_dry & has_mold
    soil = full - mold
    report_rows(
        problems,
        table,
        by_mold & (soil <= 0),
        "mold_and_soil_mass",
        "must be greater than mold_mass (the difference is the dry soil)",
    )
    if by_mold.any():
        frame["dry_mass"] = np.where(by_mold, soil, dry)
    gs = column("specific_gravity")
    with np.errstate(invalid="ignore"):
        odd = ~np.isnan(gs) & ((gs < 1.5) | (gs > 4.0))
    report_rows(
        problems,
        table,
        odd,
        "specific_gravity",
        "expected a specific gravity of soil solids between 1.5 and 4.0 (typically 2.6-2.8)",
    )
    for prefix in ("", "tailwater_"):
        diameter_name, area_name = f"{prefix}standpipe_diameter", f"{prefix}standpipe_area"
        diameter, area = column(diameter_name), column(area_name)
        has_diameter, has_area = ~np.isnan(diameter), ~np.isnan(area)
        report_rows(
            problems,
            table,
            has_diameter & has_area,
            area_name,
            f"give {diameter_name} or {area_name}, not both",
        )
        from_diameter = has_diameter & ~has_area
        if from_diameter.any():
            frame[area_name] = np.where(from_diameter, np.pi * diameter**2 / 4, area)
        del frame[diameter_name]
    return frame


def check_known_specimens(table: RawTable, ids: TextCodes, known: set, problems):
    """Report the rows whose specimen id is not among `known` (the specimens table's)."""
    unknown_value = np.array([value not in known for value in ids.values], dtype=bool)
    if not unknown_value.any() or not (unknown_value & ids.present()).any():
        return
    names = ", ".join(sorted(ids.values[unknown_value & ids.present()])[:5])
    report_rows(
        problems,
        table,
        np.append(unknown_value, False)[ids.codes],
        "specimen",
        f"unknown specimen (not in specimens): {names}",
    )


def check_readings(table: RawTable, frame: pd.DataFrame, ids: TextCodes, known: set, problems):
    """Checks across the columns of a readings table: known specimens; then a volume or an
    outflow mass per collection (constant head), or readings in time order, a head that does
    not rise, one run of readings per specimen (falling head)."""
    check_known_specimens(table, ids, known, problems)
    if table.name == "constant_head":
        neither = frame["volume"].isna() & frame["outflow_mass"].isna()
        both = frame["volume"].notna() & frame["outflow_mass"].notna()
        report_rows(problems, table, neither.to_numpy(), "volume", "give volume or outflow_mass")
        report_rows(
            problems, table, both.to_numpy(), "volume", "give volume or outflow_mass, not both"
        )
        return
    codes = ids.codes
    same = np.zeros(codes.size, dtype=bool)  # the reading before is of the same specimen
    np.equal(codes[1:], codes[:-1], out=same[1:])
    time = frame["time"].to_numpy()
    head = frame["head"].to_numpy()
    report_rows(
        problems,
        table,
        same & np.r_[False, np.diff(time) <= 0],
        "time",
        "time does not increase from the reading before",
    )
    starts = np.flatnonzero(~same)
    rises = same & np.r_[False, np.diff(head) > HEAD_RISE_TOLERANCE]
    for start, stop in zip(starts, np.r_[starts[1:], codes.size], strict=True):
        if not rises[start:stop].any():  # the common case: nothing to judge
            continue
        tolerance = head_rise_tolerance(head[start:stop])
        run = np.zeros(codes.size, dtype=bool)
        run[start + 1 : stop] = np.diff(head[start:stop]) > tolerance
        why = (
            "its resolution"
            if tolerance == HEAD_RISE_TOLERANCE
            else f"{HEAD_RISE_SCATTERS:g} times the scatter of this specimen's successive heads"
        )
        report_rows(
            problems,
            table,
            run,
            "head",
            f"head rises from the reading before by more than {tolerance * 1e3:.3g} mm ({why}; "
            "in a falling-head test it only falls; was the standpipe refilled?)",
        )
    first_row = {}
    rows = frame["source_row"].to_numpy()
    for index in np.flatnonzero(~same):  # once per run of one specimen's readings
        specimen = ids.values[codes[index]] if codes[index] >= 0 else ""
        if specimen in first_row:
            problems.append(
                InputProblem(
                    table.file,
                    int(rows[index]),
                    table.headers["specimen"],
                    f"readings of specimen {specimen} are split (they also start at row "
                    f"{first_row[specimen]}); keep each specimen's readings together",
                )
            )
        else:
            first_row[specimen] = int(rows[index])
