"""A seeded corpus of bad input: small series with one defect each, as CSV files and workbooks.

Each case is a series of one to three specimens (falling-head readings or constant-head
collections, in units drawn at random) with one defect drawn from the kinds a laboratory's
files show — a header that is not comma-separated, UTF-16 text, a header with no rows, a
number that is not finite, a true/false cell, a column given twice, a hidden sheet, a
formula without its value, a unit written wrongly, a mold-and-soil mass typed as the dry
mass, a unit expression that asks for unbounded work, text or zero where a number belongs,
readings out of order, a specimen id holding a control character or too long for a
file name — or a neighbour that must load (a specimen id that spells a missing
value, the same values in other units, a blank row). Every case asserts its one outcome:

- refused, with a problem naming the file, the row and the column (and the specimen, for
  the checks that know it) in words: no internal message, no other file;
- or loaded, every value equal to what was written converted to SI by this module's own
  factors, the specimen state physical, and every result valid only with a finite k.

A traceback fails the case; a hang cannot happen, every input being read with bounded work
(:mod:`kitchen.io.units`, :mod:`kitchen.io.raw_tables`). ``test_the_corpus_covers_every_kind``
states the size of the corpus and how its outcomes divide.
"""

from __future__ import annotations

import copy
import math
import re
from collections import Counter
from dataclasses import dataclass, field, replace

import numpy as np
import pytest
from series_files import write_workbook

from kitchen.io import SeriesError, load_series
from kitchen.reduction import series_results
from kitchen.specimen import specimen_state

SEED = 20_817
CASES = 400

# Exact definitions: 1 in = 25.4 mm, 1 lb = 0.45359237 kg (international yard and pound,
# 1959); 1 mL = 1 cm3; degF = 9/5 degC + 32; SI prefixes.
FACTORS = {
    "mm": 1e-3,
    "cm": 1e-2,
    "m": 1.0,
    "in": 0.0254,
    "g": 1e-3,
    "kg": 1.0,
    "lb": 0.45359237,
    "s": 1.0,
    "min": 60.0,
    "h": 3600.0,
    "mL": 1e-6,
    "L": 1e-3,
    "cm^3": 1e-6,
    "%": 0.01,
    "-": 1.0,
}
UNITS_OF = {
    "length": ("mm", "cm", "in", "m"),
    "mass": ("g", "kg", "lb"),
    "time": ("s", "min", "h"),
    "volume": ("mL", "L", "cm^3"),
    "temperature": ("degC", "degF"),
}
KIND_OF = {
    "diameter": "length",
    "height": "length",
    "dry_mass": "mass",
    "standpipe_diameter": "length",
    "time": "time",
    "head": "length",
    "temperature": "temperature",
    "head_difference": "length",
    "duration": "time",
    "volume": "volume",
}
TEXT_COLUMNS = ("specimen", "effort")
MISSING_MARKERS = ("NA", "N/A", "nan", "NaN", "NULL", "null", "None", "<NA>", "n/a")
INTERNAL_PHRASES = (
    "Traceback",
    "zip()",
    "argument",
    "NoneType",
    "object has no attribute",
    "KeyError",
    "IndexError",
    "codec",
    "dtype",
)


def _split(header: str) -> tuple[str, str | None]:
    match = re.fullmatch(r"\s*(.*?)\s*(?:\[(.*)\])?\s*", header)
    return "_".join(match.group(1).lower().split()), match.group(2)


def _si(value, unit: str | None) -> float:
    """A written value in SI, by this module's own factors (NaN for an empty cell)."""
    if value is None or (isinstance(value, str) and value.strip() in ("", *MISSING_MARKERS)):
        return math.nan
    value = float(value)
    if unit is None or unit == "degC":
        return value
    if unit == "degF":
        return (value - 32.0) * 5.0 / 9.0
    return value * FACTORS[unit]


@dataclass
class Table:
    header: list[str]
    rows: list[list]  # cells as written: float, str, bool or None

    def at(self, name: str) -> int:
        return [_split(h)[0] for h in self.header].index(name)

    def numeric(self) -> list[str]:
        """The headers of the columns of numbers."""
        return [h for h in self.header if _split(h)[0] not in TEXT_COLUMNS]

    def dimensional(self) -> list[str]:
        """The headers of the columns of numbers with a unit."""
        return [h for h in self.header if _split(h)[0] in KIND_OF]


@dataclass(frozen=True)
class Refused:
    """The series is refused with a problem at this place, in these words."""

    table: str
    row: int | None  # None: the file as a whole; ANY_ROW: some row of the table
    columns: tuple[str | None, ...]  # the header(s) the problem may name; (None,): none
    words: tuple[str, ...]
    specimen: str | None = None  # the specimen the problem names (ANY_ROW: that row's)


ANY_ROW = -1


@dataclass(frozen=True)
class Loads:
    """The series loads with the values written."""


@dataclass
class Case:
    ident: str
    kind: str
    form: str  # "csv" or "xlsx"
    tables: dict[str, Table]
    expect: Refused | Loads
    raw: dict[str, bytes] = field(default_factory=dict)  # CSV files written as bytes
    hidden: tuple[str, ...] = ()


# --- a valid series ---------------------------------------------------------------------------


def _series(rng: np.random.Generator, method: str, specimens: int) -> dict[str, Table]:
    """A physical series (Das & Sobhan, weight-volume relationships: e = Gs rho_w / rho_d - 1,
    S e = w Gs), in units drawn at random, values rounded as a laboratory writes them."""
    length, mass = rng.choice(UNITS_OF["length"][:3]), rng.choice(UNITS_OF["mass"])
    rows = []
    ids = [f"{rng.choice(['S', 'QF', 'T'])}-{number + 1:02d}" for number in range(specimens)]
    for name in ids:
        diameter = rng.uniform(0.07, 0.152)
        height = diameter * rng.uniform(0.9, 1.3)
        density = rng.uniform(1500.0, 1900.0)
        gs = round(rng.uniform(2.62, 2.78), 2)
        e = gs * 1000.0 / density - 1.0
        water = rng.uniform(0.55, 0.95) * e / gs
        dry_mass = density * math.pi * diameter**2 / 4 * height
        rows.append(
            [
                name,
                round(diameter / FACTORS[length], 3),
                round(height / FACTORS[length], 3),
                round(dry_mass / FACTORS[mass], 4),
                gs,
                round(water * 100, 1),
                str(rng.choice(["standard", "modified"])),
                round(rng.uniform(1.0, 8.0), 2),
            ]
        )
    tables = {
        "specimens": Table(
            [
                "specimen",
                f"diameter [{length}]",
                f"height [{length}]",
                f"dry_mass [{mass}]",
                "specific_gravity",
                "water_content [%]",
                "effort",
                "standpipe_diameter [mm]",
            ],
            rows,
        )
    }
    head_unit = rng.choice(["mm", "cm", "m"])
    if method == "falling_head":
        time_unit = rng.choice(UNITS_OF["time"])
        readings = []
        for name in ids:
            start, tau, scale = rng.uniform(1.0, 2.0), rng.uniform(3000, 24000), rng.uniform(0.5, 2)
            temperature = round(rng.uniform(18.0, 23.0), 1)
            for minutes in (0, 10, 20, 30, 45):
                seconds = minutes * 60 * scale
                readings.append(
                    [
                        name,
                        round(seconds / FACTORS[time_unit], 4),
                        round(start * math.exp(-seconds / tau) / FACTORS[head_unit], 4),
                        temperature,
                    ]
                )
        header = ["specimen", f"time [{time_unit}]", f"head [{head_unit}]", "temperature [degC]"]
        tables["falling_head"] = Table(header, readings)
    else:
        collections = []
        for name in ids:
            for _ in range(3):
                collections.append(
                    [
                        name,
                        round(rng.uniform(0.3, 1.5) / FACTORS[head_unit], 3),
                        float(round(rng.uniform(60, 600))),
                        round(rng.uniform(100, 900), 1),
                        round(rng.uniform(18.0, 23.0), 1),
                    ]
                )
        header = [
            "specimen",
            f"head_difference [{head_unit}]",
            "duration [s]",
            "volume [mL]",
            "temperature [degC]",
        ]
        tables["constant_head"] = Table(header, collections)
    return tables


def _readings(tables: dict[str, Table]) -> str:
    return "falling_head" if "falling_head" in tables else "constant_head"


def _pick_cell(rng, tables, names=None, table=None):
    """A table, a data row and a numeric column of it (file rows count the header as 1)."""
    table = table or str(rng.choice(list(tables)))
    headers = [h for h in tables[table].numeric() if names is None or _split(h)[0] in names]
    header = str(rng.choice(headers))
    index = int(rng.integers(len(tables[table].rows)))
    return table, index, header


def _id_at(table: Table, index: int) -> str:
    return str(table.rows[index][table.at("specimen")]).strip()


# --- the defects ----------------------------------------------------------------------------
# Each takes the random generator, a valid series and the form, changes the series in place
# (or returns raw bytes), and returns what must happen.


def no_specimen_column(rng, tables, form, case):
    name = _readings(tables)
    table = tables[name]
    variant = "renamed" if form == "xlsx" else rng.choice(["semicolons", "tabs", "renamed"])
    if variant == "renamed":
        table.header[0] = str(rng.choice(["sample", "Specimen ID", "id", ""]))
        return Refused(name, 1, ("specimen",), ("required column missing; columns found",))
    mark = ";" if variant == "semicolons" else "\t"
    decimal = "," if variant == "semicolons" and rng.random() < 0.5 else "."
    lines = [mark.join(table.header)]
    for row in table.rows:
        lines.append(mark.join(_csv_cell(cell).replace(".", decimal) for cell in row))
    case.raw[name] = ("\n".join(lines) + "\n").encode()
    return Refused(name, 1, ("specimen",), (f"(the header has {variant}: save the file comma",))


def utf16(rng, tables, form, case):
    name = str(rng.choice(list(tables)))
    encoding = str(rng.choice(["utf-16-le", "utf-16-be", "utf-16"]))
    case.raw[name] = _csv_text(tables[name]).encode(encoding)
    return Refused(name, None, (None,), ("UTF-16", "save it as UTF-8"))


def header_only(rng, tables, form, case):
    name = _readings(tables) if rng.random() < 0.7 else "specimens"
    tables[name].rows = []
    words = "no specimens below" if name == "specimens" else "no readings below"
    return Refused(name, 2, (None,), (words,))


def not_finite(rng, tables, form, case):
    name, index, header = _pick_cell(rng, tables)
    token = str(rng.choice(["inf", "-inf", "1e999", "Infinity", "-Infinity", "1e400"]))
    tables[name].rows[index][tables[name].header.index(header)] = token
    specimen = _id_at(tables[name], index)
    return Refused(name, index + 2, (header,), ("expected a finite number",), specimen)


def true_false(rng, tables, form, case):
    name, index, header = _pick_cell(rng, tables)
    cell = bool(rng.random() < 0.5)
    written = cell if form == "xlsx" else str(rng.choice(["TRUE", "FALSE", "true", "False"]))
    tables[name].rows[index][tables[name].header.index(header)] = written
    specimen = _id_at(tables[name], index)
    return Refused(name, index + 2, (header,), ("true/false",), specimen)


def id_spelling_a_missing_value(rng, tables, form, case):
    old = tables["specimens"].rows[0][0]
    new = str(rng.choice(MISSING_MARKERS))
    for table in tables.values():
        for row in table.rows:
            if row[0] == old:
                row[0] = new
    return Loads()


def missing_marker_in_an_optional_column(rng, tables, form, case):
    name = str(rng.choice(["specimens", _readings(tables)]))
    column = "water_content" if name == "specimens" else "temperature"
    table = tables[name]
    index = int(rng.integers(len(table.rows)))
    table.rows[index][table.at(column)] = str(rng.choice(MISSING_MARKERS))
    return Loads()


def column_given_twice(rng, tables, form, case):
    name = str(rng.choice(list(tables)))
    table = tables[name]
    position = int(rng.integers(len(table.header)))
    header = table.header[position]
    internal, unit = _split(header)
    if internal in KIND_OF and KIND_OF[internal] in UNITS_OF and rng.random() < 0.5:
        unit = str(rng.choice([u for u in UNITS_OF[KIND_OF[internal]] if u != unit]))
        second = f"{internal} [{unit}]"
    else:
        second = header
    table.header.append(second)
    for row in table.rows:
        row.append(row[position])
    return Refused(name, 1, (second,), ("given twice (columns",))


def hidden_sheet(rng, tables, form, case):
    name = str(rng.choice(list(tables)))
    case.hidden = (name,)
    return Refused(name, None, (None,), ("the sheet is hidden",))


def formula_without_value(rng, tables, form, case):
    name, index, header = _pick_cell(rng, tables)
    tables[name].rows[index][tables[name].header.index(header)] = "=2*3"
    return Refused(name, index + 2, (header,), ("formula with no saved value",))


def unit_written_wrongly(rng, tables, form, case):
    """A header whose unit makes the values impossible for a laboratory test."""
    readings = _readings(tables)
    slips = [
        ("specimens", "diameter", ["m", "km", "Mm"]),
        ("specimens", "height", ["m", "km", "Mm"]),
        ("specimens", "water_content", ["-"]),
        ("specimens", "standpipe_diameter", ["m"]),
        ("specimens", "dry_mass", None),
        (readings, "temperature", ["K", "degF-values"]),
        (readings, "head" if readings == "falling_head" else "head_difference", ["km"]),
    ]
    if readings == "constant_head":
        slips.append((readings, "duration", ["d"]))
    name, column, units = slips[int(rng.integers(len(slips)))]
    table = tables[name]
    position = table.at(column)
    unit = _split(table.header[position])[1]
    if column == "dry_mass":
        new = "kg" if unit == "g" else "g"  # grams read as kilograms, or the reverse
    else:
        new = str(rng.choice(units))
    if new == "degF-values":  # degrees Fahrenheit typed under degC
        for row in table.rows:
            row[position] = round(row[position] * 9 / 5 + 32, 1)
    else:
        table.header[position] = f"{column} [{new}]"
    return Refused(name, ANY_ROW, (table.header[position],), ("check the unit",))


def mold_and_soil_mass_as_dry_mass(rng, tables, form, case):
    """The mass of mold and soil typed as the dry mass, or a water content far too high; the
    outcome follows the phase relations computed here (Das & Sobhan, weight-volume
    relationships), refused when the void ratio is at or below zero or above 5, or the
    saturation above 110 %."""
    table = tables["specimens"]
    index = int(rng.integers(len(table.rows)))
    row = table.rows[index]
    unit = _split(table.header[table.at("dry_mass")])[1]
    if rng.random() < 0.6:
        row[table.at("dry_mass")] = round(
            row[table.at("dry_mass")] + rng.uniform(2.0, 4.5) / FACTORS[unit], 4
        )
    else:
        row[table.at("water_content")] = round(
            row[table.at("water_content")] * rng.uniform(2, 4), 1
        )
    length = _split(table.header[table.at("diameter")])[1]
    diameter = row[table.at("diameter")] * FACTORS[length]
    height = row[table.at("height")] * FACTORS[length]
    density = row[table.at("dry_mass")] * FACTORS[unit] / (math.pi * diameter**2 / 4 * height)
    gs = row[table.at("specific_gravity")]
    e = gs * 1000.0 / density - 1.0
    saturation = row[table.at("water_content")] / 100 * gs / e
    if e <= 0 or e > 5 or saturation > 1.10:
        if e <= 0:
            words = ("void ratio above zero",)
        else:
            words = ("void ratio up to",) if e > 5 else ("saturation of",)
        header = table.header[table.at("dry_mass")]
        return Refused("specimens", index + 2, (header,), words, _id_at(table, index))
    return Loads()


def unbounded_or_unknown_unit(rng, tables, form, case):
    name = str(rng.choice(list(tables)))
    table = tables[name]
    header = str(rng.choice(table.dimensional()))
    internal = _split(header)[0]
    units = ["10**10**10", "m^2^2", "10¹⁰¹⁰", "furlongz", "g", "", None]
    unit = units[int(rng.integers(len(units)))]
    if unit == "g" and KIND_OF[internal] == "mass":
        unit = "m"
    new = internal if unit is None else f"{internal} [{unit}]"
    table.header[table.header.index(header)] = new
    words = ("raised again", "exponent", "unknown unit", "is not a", "but no unit")
    return Refused(name, 1, (new,), words)


def text_in_a_number(rng, tables, form, case):
    name, index, header = _pick_cell(rng, tables)
    tables[name].rows[index][tables[name].header.index(header)] = str(
        rng.choice(["12a", "—", "n.d.", "1.2.3", "abc", "5 mm"])
    )
    return Refused(name, index + 2, (header,), ("expected a number, found",))


def zero_or_negative(rng, tables, form, case):
    positive = ("diameter", "height", "dry_mass", "standpipe_diameter", "head", "duration")
    positive += ("volume", "head_difference")
    name, index, header = _pick_cell(rng, tables, names=positive)
    position = tables[name].header.index(header)
    tables[name].rows[index][position] = float(rng.choice([0.0, -1.0])) * (
        abs(tables[name].rows[index][position]) if rng.random() < 0.5 else 1.0
    )
    return Refused(name, index + 2, (header,), ("must be greater than zero",))


def readings_out_of_order(rng, tables, form, case):
    if "falling_head" not in tables:
        return zero_or_negative(rng, tables, form, case)
    table = tables["falling_head"]
    index = int(rng.integers(1, 5))  # a reading after a specimen's first (five per specimen)
    index += 5 * int(rng.integers(len(table.rows) // 5))
    if rng.random() < 0.5:
        position = table.at("time")
        table.rows[index][position] = table.rows[index - 1][position]
        words = ("time does not increase",)
    else:
        position = table.at("head")
        unit = _split(table.header[position])[1]
        table.rows[index][position] = round(
            table.rows[index - 1][position] + 0.1 / FACTORS[unit], 4
        )
        words = ("head rises",)
    return Refused("falling_head", index + 2, (table.header[position],), words)


def unknown_or_repeated_specimen(rng, tables, form, case):
    if len(tables["specimens"].rows) > 1 and rng.random() < 0.5:
        rows = tables["specimens"].rows
        rows[1][0] = rows[0][0]
        return Refused("specimens", 3, ("specimen",), ("given more than once",))
    name = _readings(tables)
    index = int(rng.integers(len(tables[name].rows)))
    tables[name].rows[index][0] = "ZZ-99"
    return Refused(name, index + 2, ("specimen",), ("unknown specimen",))


def unshowable_or_long_id(rng, tables, form, case):
    # an id is printed, put in file names and in workbooks: a control character (a
    # workbook cannot hold C0 controls, so there a bidirectional or zero-width mark) or an
    # id longer than a file name allows is refused at load, naming the specimens' row
    index = int(rng.integers(len(tables["specimens"].rows)))
    old = tables["specimens"].rows[index][0]
    marks = ["\u202e", "\u200b"] + ([] if form == "xlsx" else ["\x1b[31m", "\x07", "\x7f"])
    if rng.random() < 0.5:
        new, words = f"{old}{rng.choice(marks)}x", ("holds a control character",)
    else:
        new, words = old + "-" + "L" * int(rng.integers(64, 300)), ("characters, more than",)
    for table in tables.values():
        for row in table.rows:
            if row[0] == old:
                row[0] = new
    return Refused("specimens", index + 2, ("specimen",), words)


def required_cell_empty(rng, tables, form, case):
    name = str(rng.choice(list(tables)))
    table = tables[name]
    required = ["specimen", "diameter", "height", "dry_mass", "specific_gravity"]
    if name != "specimens":
        required = ["specimen", *table.header[1:3]]
        required = [_split(h)[0] for h in required]
    column = str(rng.choice(required))
    index = int(rng.integers(len(table.rows)))
    table.rows[index][table.at(column)] = None
    header = table.header[table.at(column)]
    return Refused(name, index + 2, (header,), ("value missing", "no dry mass"))


def more_cells_than_the_header(rng, tables, form, case):
    name = str(rng.choice(list(tables)))
    index = int(rng.integers(len(tables[name].rows)))
    tables[name].rows[index].append(5.0)
    return Refused(name, index + 2, (None,), ("cells where the header has",))


def gravity_written_wrongly(rng, tables, form, case):
    table = tables["specimens"]
    index = int(rng.integers(len(table.rows)))
    position = table.at("specific_gravity")
    table.rows[index][position] = round(
        table.rows[index][position] * float(rng.choice([10, 0.1])), 3
    )
    return Refused("specimens", index + 2, ("specific_gravity",), ("specific gravity of soil",))


def other_units(rng, tables, form, case):
    """The same values in another unit of the same kind: the same series in SI."""
    name = str(rng.choice(list(tables)))
    table = tables[name]
    header = str(rng.choice(table.dimensional()))
    internal, unit = _split(header)
    kind = KIND_OF[internal]
    new = str(rng.choice([u for u in UNITS_OF[kind] if u != unit]))
    position = table.header.index(header)
    for row in table.rows:
        si = _si(row[position], unit)
        if new == "degF":
            row[position] = si * 9 / 5 + 32
        elif new == "degC":
            row[position] = si
        else:
            row[position] = si / FACTORS[new]
    table.header[position] = f"{internal} [{new}]"
    return Loads()


def blank_rows_and_padded_ids(rng, tables, form, case):
    name = str(rng.choice(list(tables)))
    table = tables[name]
    index = int(rng.integers(1, len(table.rows) + 1))
    table.rows.insert(index, [None] * len(table.header))
    for row in tables[_readings(tables)].rows:
        if row[0] is not None and rng.random() < 0.3:
            row[0] = f" {row[0]} "
    return Loads()


def nothing_wrong(rng, tables, form, case):
    return Loads()


DEFECTS = {
    # kind: (the defect, the forms it is written in)
    "no_specimen_column": (no_specimen_column, ("csv", "xlsx")),
    "utf16": (utf16, ("csv",)),
    "header_only": (header_only, ("csv", "xlsx")),
    "not_finite": (not_finite, ("csv", "xlsx")),
    "true_false": (true_false, ("csv", "xlsx")),
    "id_spelling_a_missing_value": (id_spelling_a_missing_value, ("csv", "xlsx")),
    "missing_marker_in_an_optional_column": (missing_marker_in_an_optional_column, ("csv", "xlsx")),
    "column_given_twice": (column_given_twice, ("csv", "xlsx")),
    "hidden_sheet": (hidden_sheet, ("xlsx",)),
    "formula_without_value": (formula_without_value, ("xlsx",)),
    "unit_written_wrongly": (unit_written_wrongly, ("csv", "xlsx")),
    "mold_and_soil_mass_as_dry_mass": (mold_and_soil_mass_as_dry_mass, ("csv", "xlsx")),
    "unbounded_or_unknown_unit": (unbounded_or_unknown_unit, ("csv", "xlsx")),
    "text_in_a_number": (text_in_a_number, ("csv", "xlsx")),
    "zero_or_negative": (zero_or_negative, ("csv", "xlsx")),
    "readings_out_of_order": (readings_out_of_order, ("csv", "xlsx")),
    "unknown_or_repeated_specimen": (unknown_or_repeated_specimen, ("csv", "xlsx")),
    "unshowable_or_long_id": (unshowable_or_long_id, ("csv", "xlsx")),
    "required_cell_empty": (required_cell_empty, ("csv", "xlsx")),
    "more_cells_than_the_header": (more_cells_than_the_header, ("csv",)),
    "gravity_written_wrongly": (gravity_written_wrongly, ("csv", "xlsx")),
    "other_units": (other_units, ("csv", "xlsx")),
    "blank_rows_and_padded_ids": (blank_rows_and_padded_ids, ("csv", "xlsx")),
    "nothing_wrong": (nothing_wrong, ("csv", "xlsx")),
}
WORKBOOK_SHARE = 0.25
"""The share of the cases of a kind written in both forms that are written as a workbook
(a workbook costs some ten times a CSV file to write and read)."""


def _corpus() -> list[Case]:
    cases = []
    kinds = list(DEFECTS)
    for number in range(CASES):
        rng = np.random.default_rng([SEED, number])
        kind = kinds[number % len(kinds)]
        defect, forms = DEFECTS[kind]
        if len(forms) == 1:
            form = forms[0]
        else:
            form = "xlsx" if rng.random() < WORKBOOK_SHARE else "csv"
        method = str(rng.choice(["falling_head", "constant_head"]))
        tables = _series(rng, method, int(rng.integers(1, 4)))
        case = Case(f"{number:03d}-{kind}-{form}", kind, form, tables, Loads())
        case.expect = defect(rng, tables, form, case)
        cases.append(case)
    return cases


# --- writing and reading a case ---------------------------------------------------------------


def _csv_cell(cell) -> str:
    if cell is None:
        return ""
    if isinstance(cell, bool):
        return "TRUE" if cell else "FALSE"
    if isinstance(cell, float):
        return repr(float(cell))
    return str(cell)


def _csv_text(table: Table) -> str:
    lines = [",".join(table.header)]
    lines += [",".join(_csv_cell(cell) for cell in row) for row in table.rows]
    return "\n".join(lines) + "\n"


CORPUS = _corpus()


def _write(case: Case, folder) -> tuple:
    """The series on disk, and the file label of each table."""
    folder.mkdir()
    if case.form == "xlsx":
        book = folder / "book.xlsx"
        write_workbook(
            book, {name: [t.header, *t.rows] for name, t in case.tables.items()}, case.hidden
        )
        return book, {name: f"book.xlsx [{name}]" for name in case.tables}
    for name, table in case.tables.items():
        data = case.raw.get(name) or _csv_text(table).encode("utf-8")
        (folder / f"{name}.csv").write_bytes(data)
    return folder, {name: f"{name}.csv" for name in case.tables}


def _matches(problem, expect: Refused, labels, tables) -> bool:
    if problem.file != labels[expect.table]:
        return False
    if not any(word in problem.message for word in expect.words):
        return False
    if problem.column not in expect.columns:
        return False
    if expect.row == ANY_ROW:
        if problem.row is None:
            return False
        table = tables[expect.table]
        return problem.specimen == _id_at(table, problem.row - 2)
    return problem.row == expect.row and problem.specimen == expect.specimen


def _check_refused(case: Case, path, labels) -> None:
    with pytest.raises(SeriesError) as caught:
        load_series(path)
    problems = caught.value.problems
    assert any(_matches(p, case.expect, labels, case.tables) for p in problems), (
        case.expect,
        [str(p) for p in problems],
    )
    for problem in problems:
        text = str(problem)
        assert problem.file in labels.values(), text
        assert not any(phrase in problem.message for phrase in INTERNAL_PHRASES), text
        if problem.row is not None:  # a row is named with its column but for a whole row
            whole_row = ("cells where the header has", "below the header")
            assert problem.column is not None or any(w in text for w in whole_row), text


def _expected(table: Table) -> tuple[list[str], dict[str, np.ndarray]]:
    """The ids and the SI values a table was written with (blank rows left out)."""
    rows = [row for row in table.rows if any(cell is not None for cell in row)]
    ids = [str(row[table.at("specimen")]).strip() for row in rows]
    values = {}
    for header in table.numeric():
        internal, unit = _split(header)
        column = np.array([_si(row[table.header.index(header)], unit) for row in rows])
        if internal == "standpipe_diameter":
            internal, column = "standpipe_area", math.pi * column**2 / 4
        values[internal] = column
    return ids, values


def _check_loads(case: Case, path) -> None:
    series = load_series(path)
    for name, table in case.tables.items():
        frame = getattr(series, name)
        ids, values = _expected(table)
        assert frame["specimen"].tolist() == ids, name
        for column, expected in values.items():
            np.testing.assert_allclose(
                frame[column].to_numpy(dtype=float), expected, rtol=1e-9, atol=1e-12
            )
    state = specimen_state(series.specimens)
    e = state["void_ratio"].to_numpy(dtype=float)
    saturation = state["saturation"].to_numpy(dtype=float)
    # the loader's own limits of a compacted specimen: 0 < e <= 5, S <= 110 % (common
    # practice, no source)
    assert ((e > 0) & (e <= 5)).all(), e
    assert (np.isnan(saturation) | (saturation <= 1.10)).all(), saturation
    results = series_results(series)
    for _, result in results.iterrows():
        k = result["k_reference"]
        if result["valid"]:
            assert np.isfinite(k) and k > 0, result
        if not np.isfinite(k):
            assert len(result["checks"]) > 0, result  # an empty number has its reason


@pytest.mark.parametrize("case", CORPUS, ids=[case.ident for case in CORPUS])
def test_each_case_is_refused_in_words_or_loads_as_written(tmp_path, case):
    path, labels = _write(case, tmp_path / "series")
    before = {p.name: p.read_bytes() for p in path.parent.rglob("*") if p.is_file()}
    if isinstance(case.expect, Refused):
        _check_refused(case, path, labels)
    else:
        _check_loads(case, path)
    after = {p.name: p.read_bytes() for p in path.parent.rglob("*") if p.is_file()}
    assert after == before  # the raw files are never written


def test_the_corpus_covers_every_kind():
    outcomes = Counter(
        (case.form, "refused" if isinstance(case.expect, Refused) else "loads") for case in CORPUS
    )
    kinds = Counter(case.kind for case in CORPUS)
    assert len(CORPUS) >= 300
    assert set(kinds) == set(DEFECTS) and min(kinds.values()) >= 10
    assert outcomes[("xlsx", "refused")] >= 40 and outcomes[("xlsx", "loads")] >= 10
    assert outcomes[("csv", "refused")] >= 150 and outcomes[("csv", "loads")] >= 40
    for kind, (_, forms) in DEFECTS.items():
        assert {case.form for case in CORPUS if case.kind == kind} == set(forms), kind


def test_the_checks_of_a_case_can_fail(tmp_path):
    """A case whose expectation is wrong fails: a value other than the one written, a
    problem at another row, or a series refused where it should load."""
    loads = next(c for c in CORPUS if c.kind == "nothing_wrong" and c.form == "csv")
    path, _ = _write(loads, tmp_path / "loads")
    changed = copy.deepcopy(loads)
    changed.tables["specimens"].rows[0][1] *= 1.01  # a diameter 1 % off what was written
    with pytest.raises(AssertionError):
        _check_loads(changed, path)
    refused = next(c for c in CORPUS if c.kind == "not_finite" and c.form == "csv")
    path, labels = _write(refused, tmp_path / "refused")
    elsewhere = replace(refused.expect, row=refused.expect.row + 1)
    with pytest.raises(AssertionError):
        _check_refused(replace(refused, expect=elsewhere), path, labels)
    with pytest.raises(SeriesError):
        _check_loads(refused, path)
