"""The checks of a series' values, and their conversion to SI.

Each raw table's columns are converted to SI (:func:`convert_table`), and its values checked:
finite numbers where numbers belong (never a true/false cell), positive and non-negative
quantities, values a laboratory specimen can have (:data:`PLAUSIBLE_RANGES`: a value far
outside them is a unit written wrongly), the dry mass and the standpipe areas of the
specimens table and the phase relations they give (:func:`check_specimens`), known specimen
ids, and readings in time order with a falling head (:func:`check_readings`). Every problem
is added to a list as an :class:`~kitchen.io.raw_tables.InputProblem` naming the file, the
row and the column, and the specimen where the check knows it; :mod:`kitchen.io.series`
refuses the series with all of them at once. Text columns are handled by their distinct
values, and every check is a vectorised pass.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
import pandas as pd

from kitchen.specimen import circle_area, specimen_state

from .raw_tables import SCHEMAS, TEXT_KINDS, InputProblem, RawTable
from .units import to_si

__all__ = [
    "HEAD_RISE_TOLERANCE",
    "HEAD_RISE_SCATTERS",
    "SPECIMEN_ID_LENGTH",
    "convert_table",
    "head_rise_tolerance",
    "report_rows",
]


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
        "final_height",
        "final_diameter",
        "final_mass",
    ),
    "flexible_wall": ("cell_pressure", "b_value", "consolidated_height", "consolidated_diameter"),
    "b_value_checks": ("cell_pressure_increment",),
    "constant_head": ("head_difference", "duration", "volume", "outflow_mass", "flow_length"),
    "falling_head": ("head", "head_pressure"),
    "field_tests": ("dry_density", "wet_density"),
}


_NON_NEGATIVE = {
    "specimens": ("water_content", "mold_mass", "final_water_content", "depth"),
    "falling_head": ("time", "inflow_volume", "outflow_volume"),
    "flexible_wall": ("back_pressure",),
    "b_value_checks": ("back_pressure", "pore_pressure_increment"),
    "field_tests": ("water_content",),
}


@dataclass(frozen=True)
class PlausibleRange:
    """The values a column can hold in a laboratory test, in SI, with the words for them."""

    low: float
    high: float
    shown: str  # the range in the words of a message, "10 mm to 1 m"
    what: str  # what the column is, "a specimen's diameter"


_DAY = 86_400.0
_BORE = PlausibleRange(1e-4, 0.3, "0.1 mm to 300 mm", "a standpipe bore")
_BORE_AREA = PlausibleRange(
    circle_area(_BORE.low),
    circle_area(_BORE.high),
    f"that of a bore of {_BORE.shown}",
    "a standpipe's area",
)

_CELL_PRESSURE = PlausibleRange(0.0, 1e7, "0 to 10 MPa", "a pressure in a permeameter cell")
_BURETTE_LEVEL = PlausibleRange(-10.0, 10.0, "-10 m to 10 m", "a burette level")

PLAUSIBLE_RANGES: dict[str, dict[str, PlausibleRange]] = {
    "specimens": {
        "diameter": PlausibleRange(0.010, 1.0, "10 mm to 1 m", "a specimen's diameter"),
        "height": PlausibleRange(0.005, 1.0, "5 mm to 1 m", "a specimen's height"),
        "dry_mass": PlausibleRange(0.001, 100.0, "1 g to 100 kg", "a specimen's dry mass"),
        "mold_mass": PlausibleRange(0.0, 100.0, "0 to 100 kg", "a mold's mass"),
        "mold_and_soil_mass": PlausibleRange(0.001, 200.0, "1 g to 200 kg", "a mold with its soil"),
        "water_content": PlausibleRange(0.0, 2.0, "0 to 200 %", "a water content"),
        "d10": PlausibleRange(1e-7, 0.05, "0.1 µm to 50 mm", "an effective grain size"),
        "standpipe_diameter": _BORE,
        "standpipe_area": _BORE_AREA,
        "tailwater_standpipe_diameter": _BORE,
        "tailwater_standpipe_area": _BORE_AREA,
        "final_height": PlausibleRange(0.005, 1.0, "5 mm to 1 m", "a specimen's height"),
        "final_diameter": PlausibleRange(0.010, 1.0, "10 mm to 1 m", "a specimen's diameter"),
        "final_mass": PlausibleRange(0.001, 200.0, "1 g to 200 kg", "a specimen's mass"),
        "final_water_content": PlausibleRange(0.0, 2.0, "0 to 200 %", "a water content"),
        "depth": PlausibleRange(0.0, 1000.0, "0 to 1000 m", "a sample's depth"),
    },
    "flexible_wall": {
        "cell_pressure": _CELL_PRESSURE,
        "back_pressure": _CELL_PRESSURE,
        "b_value": PlausibleRange(0.0, 1.2, "0 to 1.2", "a B-value"),
        "consolidated_height": PlausibleRange(0.005, 1.0, "5 mm to 1 m", "a specimen's height"),
        "height_change": PlausibleRange(-0.1, 0.1, "-100 mm to 100 mm", "a change of height"),
        "consolidated_diameter": PlausibleRange(
            0.010, 1.0, "10 mm to 1 m", "a specimen's diameter"
        ),
        "volume_change": PlausibleRange(-0.01, 0.01, "-10 L to 10 L", "a change of volume"),
    },
    "b_value_checks": {
        "back_pressure": _CELL_PRESSURE,
        "cell_pressure_increment": _CELL_PRESSURE,
        "pore_pressure_increment": _CELL_PRESSURE,
    },
    "constant_head": {
        "head_difference": PlausibleRange(0.0, 100.0, "up to 100 m", "a head difference"),
        "duration": PlausibleRange(0.0, 30 * _DAY, "up to 30 days", "a collection's duration"),
        "volume": PlausibleRange(0.0, 0.1, "up to 100 L", "a collected volume"),
        "outflow_mass": PlausibleRange(0.0, 100.0, "up to 100 kg", "a collected mass"),
        "temperature": PlausibleRange(0.0, 60.0, "0 to 60 °C", "a water temperature"),
        "flow_length": PlausibleRange(0.005, 1.0, "5 mm to 1 m", "a flow length"),
    },
    "falling_head": {
        "time": PlausibleRange(0.0, 366 * _DAY, "up to one year", "a test's elapsed time"),
        "head": PlausibleRange(0.0, 100.0, "up to 100 m", "a head"),
        "temperature": PlausibleRange(0.0, 60.0, "0 to 60 °C", "a water temperature"),
        "inflow_volume": PlausibleRange(0.0, 0.1, "up to 100 L", "a cumulative volume"),
        "outflow_volume": PlausibleRange(0.0, 0.1, "up to 100 L", "a cumulative volume"),
        "head_pressure": PlausibleRange(0.0, 1e6, "up to 1000 kPa", "a pressure across a specimen"),
        "headwater_level": _BURETTE_LEVEL,
        "tailwater_level": _BURETTE_LEVEL,
        "headwater_pressure": _CELL_PRESSURE,
        "tailwater_pressure": _CELL_PRESSURE,
    },
    "field_tests": {
        "water_content": PlausibleRange(0.0, 1.0, "0 to 100 %", "a compacted soil's water content"),
        "dry_density": PlausibleRange(
            800.0, 2600.0, "0.8 to 2.6 Mg/m³", "a compacted soil's dry density"
        ),
        "wet_density": PlausibleRange(
            900.0, 3000.0, "0.9 to 3.0 Mg/m³", "a compacted soil's wet density"
        ),
    },
}
"""The values a laboratory permeameter test can hold, by table and column, in SI.

A value outside them is named with "check the unit": it is what a unit written wrongly in
the header gives (a height in ``[Mm]``, diameters in millimetres under ``[cm]``, a
temperature in °F under ``[degC]``). The bounds are wide on purpose — a specimen from a
small mold to a large permeameter, a standpipe from a capillary burette to a pipe, a
falling-head record logged for weeks — and are common practice, no source. The specific
gravity has its own range and message (:data:`SPECIFIC_GRAVITY_RANGE`)."""

SPECIFIC_GRAVITY_RANGE = PlausibleRange(
    1.5, 4.0, "1.5 and 4.0", "a specific gravity of soil solids"
)
"""The specific gravity of soil solids accepted (most soils have 2.6–2.8); a value outside
is named by :func:`check_specimens` in words of its own, not as a unit written wrongly.
Common practice, no source."""

VOID_RATIO_LIMIT = 5.0
"""The largest void ratio a compacted specimen is taken to have (a compacted clay has
0.3–1.5; a void ratio above 5 is a peat, or a mass in a unit written wrongly). Common
practice, no source."""

SATURATION_LIMIT = 1.10
"""The largest degree of saturation accepted from the as-molded values: a few percent above
100 % is the scatter of the measured masses, dimensions and Gs; beyond 110 % a value is
wrong. Common practice, no source."""


_LEFT_OUT_WHEN_ABSENT = {
    "falling_head": (
        "inflow_volume",
        "outflow_volume",
        "head_pressure",
        "headwater_level",
        "tailwater_level",
        "headwater_pressure",
        "tailwater_pressure",
    )
}
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


def _numeric_column(
    table: RawTable, column: str, problems: list[InputProblem], ids: TextCodes | None = None
) -> np.ndarray:
    """The column as floats in SI; bad cells are reported and become NaN. A column already
    in SI is the raw array itself, read-only; any other is a new array.

    Text that is not a number, a true/false cell, and a number that is not finite (``inf``,
    or one too large for its unit) are each named, with the specimen of the row."""
    values = table.frame[column]
    rows = table.frame["source_row"].to_numpy()
    if values.dtype.kind in "fiu":
        numbers = values.to_numpy(dtype=float)
    else:
        if values.dtype.kind == "b":
            truth = values.notna().to_numpy()
        elif values.dtype == object:
            truth = np.fromiter(map(_is_truth, values), bool, len(values))
        elif pd.api.types.is_string_dtype(values.dtype):
            words = values.str.strip().str.lower()
            truth = words.isin(_TRUTH_WORDS).to_numpy(dtype=bool)
        else:
            truth = np.zeros(len(values), dtype=bool)
        numbers = pd.to_numeric(values.where(~truth), errors="coerce").to_numpy(dtype=float)
        bad = np.flatnonzero(np.isnan(numbers) & values.notna().to_numpy() & ~truth)
        for index in bad:
            problems.append(
                InputProblem(
                    table.file,
                    int(rows[index]),
                    table.headers[column],
                    f"expected a number, found {values.iloc[index]!r}",
                )
            )
        report_rows(
            problems,
            table,
            truth,
            column,
            "expected a number, found a true/false value (TRUE or FALSE is not a number)",
            ids=ids,
        )
    kind = SCHEMAS[table.name][column].kind
    unit = table.units.get(column)
    plain = kind == "dimensionless" or not unit
    zero = 0.0 if plain else to_si(0.0, unit, kind)
    factor = 1.0 if plain else to_si(1.0, unit, kind) - zero
    if factor == 1.0 and zero == 0.0:
        # already in SI (seconds, degrees Celsius, a ratio): the raw table's own array,
        # shared read-only (pandas' copy-on-write), not a second copy of a logger's column
        si = numbers
        if si.flags.writeable:
            si = si.view()
            si.flags.writeable = False
    elif zero != 0.0:  # an offset unit (degF, K)
        si = to_si(numbers, unit, kind)
    else:
        with np.errstate(over="ignore"):
            si = np.multiply(numbers, factor)  # one pass, one new array
    infinite = np.isinf(si)
    if infinite.any():
        si = si.copy()  # a new array, written below
        for index in np.flatnonzero(infinite)[:_NAMED_ROWS]:
            problems.append(
                InputProblem(
                    table.file,
                    int(rows[index]),
                    table.headers[column],
                    (
                        f"{_as_written(values.iloc[index])} {unit} is too large a number"
                        if np.isfinite(numbers[index])
                        else f"expected a finite number, found {_as_written(values.iloc[index])}"
                    ),
                    _specimen_at(ids, index),
                )
            )
        _count_more(problems, table, column, infinite, "expected a finite number")
        si[infinite] = np.nan
    return si


_TRUTH_WORDS = ("true", "false")


def _is_truth(value) -> bool:
    """A true/false cell: a workbook's boolean, or the word TRUE or FALSE in any case."""
    if isinstance(value, bool | np.bool_):
        return True
    return isinstance(value, str) and value.strip().lower() in _TRUTH_WORDS


_NAMED_ROWS = 20
"""How many rows one check names one by one; the rest are counted in one more problem."""


def _as_written(value) -> str:
    """A cell as a message shows it: text as written, a number in its shortest form."""
    if isinstance(value, str):
        return value.strip()
    try:
        return f"{float(value):g}"
    except (TypeError, ValueError):
        return str(value)


def _specimen_at(ids: TextCodes | None, index: int) -> str | None:
    """The specimen id of row `index`, where the table has one."""
    if ids is None or ids.codes[index] < 0:
        return None
    return str(ids.values[ids.codes[index]])


def _count_more(problems, table: RawTable, column: str, mask: np.ndarray, message: str):
    more = int(mask.sum()) - _NAMED_ROWS
    if more > 0:
        header = table.headers.get(column, column)
        problems.append(InputProblem(table.file, None, header, f"{more} more row(s): {message}"))


def check_plausible(
    table: RawTable,
    column: str,
    si: np.ndarray,
    ids: TextCodes | None,
    problems: list[InputProblem],
    checked: np.ndarray | None = None,
) -> np.ndarray:
    """Name the values of `column` outside :data:`PLAUSIBLE_RANGES`, where `checked` holds
    (every row when None). `si` is finite or NaN (:func:`_numeric_column`): a NaN is never
    outside a range.

    Returns which rows were named."""
    bounds = PLAUSIBLE_RANGES.get(table.name, {}).get(column)
    if bounds is None:
        return np.zeros(si.size, dtype=bool)
    outside = si < bounds.low
    outside |= si > bounds.high  # a NaN is neither
    if checked is not None:
        outside &= checked
    if not outside.any():
        return outside
    rows = table.frame["source_row"].to_numpy()
    raw = table.frame[column]
    unit = table.units.get(column) or ""
    internal = _INTERNAL_UNITS.get(SCHEMAS[table.name][column].kind, "")
    for index in np.flatnonzero(outside)[:_NAMED_ROWS]:
        written = f"{_as_written(raw.iloc[index])} {unit}".strip()
        if internal == "%":
            shown = f"{si[index] * 100:.4g} %"
        else:
            shown = f"{si[index]:.4g} {internal}".strip()
        value = written if shown == written else f"{written} ({shown})"
        problems.append(
            InputProblem(
                table.file,
                int(rows[index]),
                table.headers.get(column, column),
                f"{value} is outside {bounds.shown}, what {bounds.what} in a "
                "laboratory test can be: check the unit",
                _specimen_at(ids, index),
            )
        )
    _count_more(problems, table, column, outside, f"outside {bounds.shown}: check the unit")
    return outside


_INTERNAL_UNITS = {
    "length": "m",
    "area": "m²",
    "volume": "m³",
    "mass": "kg",
    "time": "s",
    "temperature": "°C",
    "ratio": "%",
    "pressure": "Pa",
    "density": "kg/m³",
}


def report_rows(
    problems,
    table: RawTable,
    mask: np.ndarray,
    column: str,
    message: str,
    limit=_NAMED_ROWS,
    ids: TextCodes | None = None,
):
    """Add `message` for each row of `table` where `mask` holds, naming file, row and column,
    and the specimen of the row when its ids are given.

    The first `limit` rows are named one by one, the rest counted in one more problem.
    """
    if not mask.any():
        return
    indices = np.flatnonzero(mask)
    rows = table.frame["source_row"].to_numpy()[indices]
    header = table.headers.get(column, column)
    for index, row in zip(indices[:limit], rows[:limit], strict=False):
        problems.append(
            InputProblem(table.file, int(row), header, message, _specimen_at(ids, index))
        )
    if len(rows) > limit:
        problems.append(
            InputProblem(table.file, None, header, f"{len(rows) - limit} more row(s): {message}")
        )


def _as_categories(table: str, column: str) -> bool:
    """Whether a text column is kept as categories: the specimen id of a readings table,
    repeated on every reading (the specimens table keeps its ids as strings, one a row)."""
    return column == "specimen" and table != "specimens"


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

    def categories(self) -> pd.Categorical:
        """The column as categories: one code a row (a byte for up to 127 ids), ``NaN``
        where empty; the frame of 10⁶ readings holds 1 MB of ids instead of 8."""
        return pd.Categorical.from_codes(self.codes, pd.Index(self.values, dtype="string"))

    def present(self) -> np.ndarray:
        """Which of `values` occur in the column."""
        counts = np.bincount(self.codes + 1, minlength=len(self.values) + 1)
        return counts[1:].astype(bool)


SPECIMEN_ID_LENGTH = 64
"""The most characters a specimen id may have: it names the pack's chart files, whose
names a file system keeps under 255 bytes (common practice, no source)."""

_UNSHOWABLE = re.compile(r"[\x00-\x1f\x7f-\x9f\u200b-\u200f\u202a-\u202e\u2066-\u2069\ufeff]")
"""Control characters, zero-width and bidirectional marks: what a terminal, a workbook or
a file name cannot show as written, or shows as something else."""


def _check_specimen_ids(table: RawTable, labels: TextCodes, problems: list[InputProblem]):
    """Name each row whose specimen id holds a control character or is too long.

    An id is printed, written in workbooks and put in file names: one that cannot be shown
    as written, or longer than :data:`SPECIMEN_ID_LENGTH`, is refused at load, before any
    file is written from it.
    """
    for code, text in enumerate(labels.values):
        text = str(text)
        escaped = text.encode("unicode_escape").decode("ascii")
        if _UNSHOWABLE.search(text):
            message = (
                f"the specimen id '{escaped[:80]}' holds a control character or an invisible "
                "mark; expected letters, digits and punctuation"
            )
        elif len(text) > SPECIMEN_ID_LENGTH:
            message = (
                f"the specimen id '{escaped[:24]}...' has {len(text)} characters, more than "
                f"the {SPECIMEN_ID_LENGTH} an id may have (it names the pack's files)"
            )
        else:
            continue
        report_rows(problems, table, labels.codes == code, "specimen", message)


def convert_table(table: RawTable, problems: list[InputProblem]) -> tuple[pd.DataFrame, TextCodes]:
    """The table in SI with its value problems reported, and its specimen ids as codes."""
    schema = SCHEMAS[table.name]
    rows = table.frame["source_row"].to_numpy(dtype=np.int32)  # the raw table's, read-only
    n = rows.size
    columns: dict[str, object] = {"source_row": rows}
    ids = None
    for column, spec in schema.items():
        present = column in table.frame.columns
        if spec.kind == "datetime":
            continue  # read by kitchen.io.logger_readings into elapsed time
        if spec.kind in TEXT_KINDS:
            if present:
                labels = TextCodes.of(table.frame[column])
                columns[column] = (
                    labels.categories() if _as_categories(table.name, column) else labels.strings()
                )
                if spec.kind == "id":
                    ids = labels
                if column == "specimen":
                    _check_specimen_ids(table, labels, problems)
                if spec.required:
                    report_rows(problems, table, labels.codes < 0, column, "value missing")
            else:
                columns[column] = pd.array([pd.NA] * n, dtype="string")
            continue
        if not present:
            if column not in _LEFT_OUT_WHEN_ABSENT.get(table.name, ()):
                columns[column] = np.full(n, np.nan)
            continue
        values = _numeric_column(table, column, problems, ids)  # finite or NaN, never inf
        columns[column] = values
        if spec.required:
            empty = table.frame[column].isna().to_numpy()
            report_rows(problems, table, empty, column, "value missing; expected a number")
        signed = None  # every row: NaN is of no sign and in no range
        if column in _POSITIVE.get(table.name, ()):
            report_rows(problems, table, values <= 0, column, "must be greater than zero")
            signed = values > 0
        if column in _NON_NEGATIVE.get(table.name, ()):
            report_rows(problems, table, values < 0, column, "must not be negative")
            signed = values >= 0
        check_plausible(table, column, values, ids, problems, signed)
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
    specimen_codes = TextCodes.of(ids)

    def given(name: str) -> np.ndarray:
        """Where the file has a cell (a bad one is named already: not as missing too)."""
        if name not in table.frame.columns:
            return np.zeros(len(frame), dtype=bool)
        return table.frame[name].notna().to_numpy() | ~np.isnan(column(name))

    dry, mold, full = column("dry_mass"), column("mold_mass"), column("mold_and_soil_mass")
    has_dry = given("dry_mass")
    has_mold = given("mold_mass") & given("mold_and_soil_mass")
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
    report_rows(
        problems,
        table,
        ~np.isnan(gs) & ~_within(gs, SPECIFIC_GRAVITY_RANGE),
        "specific_gravity",
        f"expected {SPECIFIC_GRAVITY_RANGE.what} between {SPECIFIC_GRAVITY_RANGE.shown} "
        "(typically 2.6-2.8)",
    )
    if by_mold.any():
        soil_range = PLAUSIBLE_RANGES["specimens"]["dry_mass"]
        with np.errstate(invalid="ignore"):
            far = by_mold & (soil > 0) & ((soil < soil_range.low) | (soil > soil_range.high))
        report_rows(
            problems,
            table,
            far,
            "mold_and_soil_mass",
            f"the dry soil (mold_and_soil_mass - mold_mass) is outside {soil_range.shown}, "
            f"what {soil_range.what} can be: check the unit",
            ids=specimen_codes,
        )
    check_phase_relations(table, frame, by_mold, specimen_codes, problems)
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
            frame[area_name] = np.where(from_diameter, circle_area(diameter), area)
        del frame[diameter_name]
    return frame


def check_phase_relations(
    table: RawTable,
    frame: pd.DataFrame,
    by_mold: np.ndarray,
    ids: TextCodes,
    problems: list[InputProblem],
) -> None:
    """Name each specimen whose dry mass gives a void ratio at or below zero, above
    :data:`VOID_RATIO_LIMIT`, or a saturation above :data:`SATURATION_LIMIT`.

    Only rows whose diameter, height, dry mass and Gs passed their own checks are judged.
    The problem names the dry-mass column (the mold-and-soil mass where the dry mass is
    their difference): the mold-and-soil mass typed as the dry mass is the usual cause.

    References
    ----------
    Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, weight-volume
    relationships: ρd = Ms/V, e = Gs·ρw/ρd − 1, S·e = w·Gs (through
    :func:`kitchen.specimen.specimen_state`).
    """

    def column(name: str) -> np.ndarray:
        return frame[name].to_numpy(dtype=float)

    ranges = PLAUSIBLE_RANGES["specimens"]
    diameter, height, mass = column("diameter"), column("height"), column("dry_mass")
    gs, water = column("specific_gravity"), column("water_content")
    with np.errstate(invalid="ignore"):
        judged = (
            _within(diameter, ranges["diameter"])
            & _within(height, ranges["height"])
            & _within(mass, ranges["dry_mass"])
            & _within(gs, SPECIFIC_GRAVITY_RANGE)
        )
    if not judged.any():
        return
    with np.errstate(invalid="ignore"):
        water_judged = np.isfinite(water) & (water >= 0) & (water <= ranges["water_content"].high)
    state = specimen_state(frame)
    density, e, saturation = (
        state[name].to_numpy(dtype=float) for name in ("dry_density", "void_ratio", "saturation")
    )
    rows = table.frame["source_row"].to_numpy()
    for index in np.flatnonzero(judged):
        name = "mold_and_soil_mass" if by_mold[index] else "dry_mass"
        state = (
            f"a dry density of {density[index] / 1000:.3g} Mg/m³ and a void ratio of "
            f"{e[index]:.3g} (with Gs {gs[index]:g})"
        )
        if e[index] <= 0:
            message = (
                f"this dry mass gives {state}: a void ratio above zero expected, no soil is "
                "denser than its solids; is it the mass of mold and soil?"
            )
        elif e[index] > VOID_RATIO_LIMIT:
            message = (
                f"this dry mass gives {state}: a void ratio up to {VOID_RATIO_LIMIT:g} "
                "expected of a compacted specimen; check the unit"
            )
        elif water_judged[index] and saturation[index] > SATURATION_LIMIT:
            message = (
                f"this dry mass gives {state}, so a saturation of "
                f"{saturation[index] * 100:.0f} % at a water content of "
                f"{water[index] * 100:.3g} %: at most about 100 % expected (up to "
                f"{SATURATION_LIMIT * 100:.0f} % for scatter); check the dry mass, the water "
                "content and the dimensions"
            )
        else:
            continue
        problems.append(
            InputProblem(
                table.file,
                int(rows[index]),
                table.headers.get(name, name),
                message,
                _specimen_at(ids, index),
            )
        )


def _within(values: np.ndarray, bounds: PlausibleRange) -> np.ndarray:
    return np.isfinite(values) & (values > 0) & (values >= bounds.low) & (values <= bounds.high)


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


def check_readings(
    table: RawTable, frame: pd.DataFrame, ids: TextCodes | None, known: set | None, problems
):
    """Checks across the columns of a readings table: known specimens; then a volume or an
    outflow mass per collection (constant head), or readings in time order, a head that does
    not rise, one run of readings per specimen (falling head).

    Without a specimen column (``ids`` None) nothing is checked across rows; without the
    specimens table's ids (``known`` None) the ids are not looked up."""
    if ids is None:
        return  # no specimen column: named with the header, nothing to check across rows
    if known is not None:
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
    earlier = np.zeros(codes.size, dtype=bool)  # t_i <= t_(i-1), as diff(t) <= 0 is for finite t
    np.less_equal(time[1:], time[:-1], out=earlier[1:])
    earlier &= same
    report_rows(problems, table, earlier, "time", "time does not increase from the reading before")
    starts = np.flatnonzero(~same)
    rises = same & np.r_[False, np.diff(head) > HEAD_RISE_TOLERANCE]
    stops = np.append(starts[1:], codes.size) if starts.size else starts
    for start, stop in zip(starts, stops, strict=True):
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
