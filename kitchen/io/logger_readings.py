"""Readings as they come off the bench: date-times, pressures and burette levels.

A falling-head readings table may give, instead of the elapsed ``time`` and the ``head``:

- the time of each reading as an ISO 8601 date-time (``date_time``), or a ``date`` and a
  ``time_of_day`` column, with the time zone in the header's brackets (``date_time [UTC]``,
  ``date_time [+01:00]``, ``date_time [Europe/Zurich]``) or in each value
  (``2026-03-02T08:15:00+01:00``); the elapsed time counts from each specimen's first
  reading;
- the head as the pressure of a differential transducer (``head_pressure [kPa]``), or as
  the pressures at the inflow and outflow ends (``headwater_pressure``,
  ``tailwater_pressure``), turned into head with the water density at the reading's
  temperature: h = Δp/(ρw(T)·g);
- the head as the levels of the headwater and tailwater burettes of a flexible-wall cell
  (``headwater_level``, ``tailwater_level``): h = level in − level out; where the series
  gives no volumes, the cumulative inflow and outflow are the burettes' changes of level
  times their areas (``standpipe_area``, ``tailwater_standpipe_area`` of the specimens
  table).

Every problem is named with the file, row and column: a date-time that cannot be read, a
value without a time zone, a time that jumps back (named by the checks of the readings), a
gap in a logger's record, a pressure without a temperature, two ways of giving the same
quantity.
"""

from __future__ import annotations

import re

import numpy as np
import pandas as pd

from kitchen.water import water_density

from .raw_tables import InputProblem, RawTable
from .units import UnitError, time_zone

__all__ = [
    "STANDARD_GRAVITY",
    "GAP_FACTOR",
    "pressure_head",
    "read_date_times",
    "derive_readings",
]

STANDARD_GRAVITY = 9.80665
"""Standard acceleration of gravity, gn. [m/s²] (3rd CGPM, 1901; CODATA 2018: exact)."""

_DAY_ONLY = re.compile(r"[ T]00:00:00$")

GAP_FACTOR = 50.0
"""A logger's reading more than this many times the median interval of its record after
the one before is named as a gap (a restart or a lost stretch). Readings by hand at
doubling intervals (1, 2, 4 … 512 min) stay below it. The tool's own rule."""

_OFFSET_END = re.compile(r"(?:[zZ]|[+-]\d{2}(?::?\d{2})?)$")
"""The end of an ISO 8601 date-time that carries its offset from UTC (``Z``, ``+01:00``)."""


def pressure_head(pressure, temperature):
    """Head of water equal to a pressure: h = p/(ρw(T)·gn). [m]

    Parameters
    ----------
    pressure : float or array_like
        Pressure difference. [Pa]
    temperature : float or array_like
        Water temperature. [degC]

    Returns
    -------
    float or numpy.ndarray
        Head of water. [m]

    References
    ----------
    Hydrostatics, p = ρ·g·h (Das & Sobhan, *Principles of Geotechnical Engineering*,
    chapter on permeability: head and pressure); ρw(T) from Tanaka et al. (2001),
    Metrologia 38:301 (:func:`kitchen.water.water_density`); gn = 9.80665 m/s² (3rd CGPM,
    1901).

    Examples
    --------
    >>> round(float(pressure_head(9.80665 * 998.2067, 20.0)), 6)
    1.0
    """
    density = water_density(temperature)
    return (
        np.asarray(pressure, dtype=float) / (density * STANDARD_GRAVITY)
        if np.ndim(pressure)
        else float(pressure) / (float(density) * STANDARD_GRAVITY)
    )


def read_date_times(
    texts: pd.Series, zone_text: str | None
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """ISO 8601 date-times as seconds since 1970-01-01 UTC, and which could not be placed.

    Parameters
    ----------
    texts : pandas.Series
        Date-times as text (``2026-03-02T08:15:00``, ``2026-03-02 08:15:00+01:00``).
    zone_text : str or None
        The zone stated in the header; values without an offset are in it.

    Returns
    -------
    seconds : numpy.ndarray
        NaN where a value cannot be read, is empty, or has no zone. [s]
    zoneless : numpy.ndarray of bool
        The values without an offset when the header states no zone.
    shifted : numpy.ndarray of bool
        The values without an offset that name no single instant in the header's zone: a
        time the clocks skipped or passed twice when they changed (summer time).

    References
    ----------
    ISO 8601-1:2019, clauses 5.4.2 (date and time of day) and 4.3.13 (time shift).

    Notes
    -----
    A record whose values all carry the same offset, or none, is parsed in one pass; only
    a record that mixes them is judged value by value on its last six characters.
    """
    zone = time_zone(zone_text)
    text = texts.astype(object)
    present = (text.notna() & (text != "")).to_numpy(dtype=bool)
    try:  # the usual record: every value with the same offset, or none with one
        parsed = pd.to_datetime(text.where(present), format="ISO8601", errors="coerce")
    except ValueError:  # offsets mixed with values without one, or different offsets
        parsed = None
    if parsed is not None and parsed.dt.tz is not None:
        nothing = np.zeros(len(text), dtype=bool)
        return _epoch_seconds(parsed), nothing, nothing
    if parsed is not None:
        if zone is None:
            return np.full(len(text), np.nan), present, np.zeros(len(text), dtype=bool)
        local = parsed.dt.tz_localize(zone, ambiguous="NaT", nonexistent="NaT")
        shifted = (parsed.notna() & local.isna()).to_numpy(dtype=bool)
        return _epoch_seconds(local), np.zeros(len(text), dtype=bool), shifted
    endings = text.where(present, "").astype(str).str[-6:].str.rstrip()
    codes, distinct = pd.factorize(endings)
    offset_at_end = np.array([_OFFSET_END.search(e) is not None for e in distinct], dtype=bool)
    with_offset = present & offset_at_end[codes] if codes.size else present
    seconds = np.full(len(text), np.nan)
    if with_offset.any():
        stamps = pd.to_datetime(text[with_offset], format="ISO8601", utc=True, errors="coerce")
        seconds[with_offset] = _epoch_seconds(stamps)
    naive = present & ~with_offset
    zoneless = naive if zone is None else np.zeros(len(text), dtype=bool)
    shifted = np.zeros(len(text), dtype=bool)
    if naive.any() and zone is not None:
        parsed = pd.to_datetime(text[naive], format="ISO8601", errors="coerce")
        local = parsed.dt.tz_localize(zone, ambiguous="NaT", nonexistent="NaT")
        shifted[naive] = (parsed.notna() & local.isna()).to_numpy(dtype=bool)
        seconds[naive] = _epoch_seconds(local)
    return seconds, zoneless, shifted


def _epoch_seconds(stamps: pd.Series) -> np.ndarray:
    values = stamps.dt.tz_convert("UTC").dt.tz_localize(None).astype("datetime64[ns]")
    out = (values - np.datetime64("1970-01-01T00:00:00", "ns")).dt.total_seconds().to_numpy()
    return np.asarray(out, dtype=float)


def _report(problems, table: RawTable, mask, column: str, message: str, ids=None, limit=20):
    from .table_checks import report_rows

    report_rows(problems, table, np.asarray(mask, dtype=bool), column, message, limit, ids)


def _run_starts(codes: np.ndarray) -> np.ndarray:
    """Index of the first reading of the run each reading belongs to."""
    if codes.size == 0:
        return np.zeros(0, dtype=int)
    new = np.r_[True, codes[1:] != codes[:-1]]
    return np.maximum.accumulate(np.where(new, np.arange(codes.size), 0))


def _elapsed_from_date_times(table, frame, ids, problems) -> None:
    raw = table.frame
    columns = [c for c in ("date_time", "date", "time_of_day") if c in raw.columns]
    if not columns:
        return
    header = table.headers
    if "time" in raw.columns:
        problems.append(
            InputProblem(
                table.file, 1, header[columns[0]], "give the elapsed time or date-times, not both"
            )
        )
        return
    if "date_time" in raw.columns and ("date" in raw.columns or "time_of_day" in raw.columns):
        problems.append(
            InputProblem(
                table.file,
                1,
                header[columns[1]],
                "give date_time, or date and time_of_day, not both",
            )
        )
        return
    if "date_time" in raw.columns:
        texts, zone_text, named = raw["date_time"], table.units.get("date_time"), "date_time"
    else:
        if "date" not in raw.columns or "time_of_day" not in raw.columns:
            missing = "time_of_day" if "date" in raw.columns else "date"
            problems.append(
                InputProblem(
                    table.file,
                    1,
                    missing,
                    "required column missing: a reading's "
                    "time as a date needs both date and time_of_day",
                )
            )
            return
        zones = {table.units.get("date"), table.units.get("time_of_day")} - {None, ""}
        if len(zones) > 1:
            problems.append(
                InputProblem(
                    table.file,
                    1,
                    header["time_of_day"],
                    "date and time_of_day state "
                    f"different time zones ({', '.join(sorted(zones))}); state one",
                )
            )
            return
        zone_text = zones.pop() if zones else None
        # a date cell of a workbook reads "2026-03-02 00:00:00": each distinct date is
        # cleaned once (a logger's record spans a few days)
        codes, days = pd.factorize(raw["date"].astype(object))
        cleaned = np.array([_DAY_ONLY.sub("", str(d).strip()) for d in days] + [""], object)
        clock = raw["time_of_day"].astype(object)
        texts = pd.Series(cleaned[codes], index=raw.index, dtype=object) + "T" + clock.astype(str)
        texts = texts.where(raw["date"].notna().to_numpy() & clock.notna().to_numpy())
        named = "time_of_day"
    try:
        seconds, zoneless, shifted = read_date_times(texts, zone_text)
    except UnitError as error:  # named with the header already
        problems.append(InputProblem(table.file, 1, header[named], str(error)))
        return
    empty = texts.isna().to_numpy()
    _report(problems, table, empty, named, "value missing; expected a date-time", ids)
    _report(
        problems,
        table,
        zoneless,
        named,
        "date-time without a time zone: state it in the header "
        f"('{named} [UTC]', '{named} [+01:00]') or in each value (2026-03-02T08:15:00+01:00)",
        ids,
    )
    _report(
        problems,
        table,
        shifted,
        named,
        f"this time is skipped or passed twice when the clocks change in {zone_text}: give "
        "it with its offset from UTC (2026-03-29T02:30:00+01:00), or state the zone as an "
        "offset ('[+01:00]')",
        ids,
    )
    unread = np.isnan(seconds) & ~empty & ~zoneless & ~shifted
    for index in np.flatnonzero(unread)[:20]:
        problems.append(
            InputProblem(
                table.file,
                int(raw["source_row"].iloc[index]),
                header[named],
                f"expected an ISO 8601 date-time (2026-03-02T08:15:00), found "
                f"{texts.iloc[index]!r}",
            )
        )
    codes = ids.codes if ids is not None else np.zeros(len(raw), dtype=int)
    starts = _run_starts(codes)
    frame["time"] = seconds - seconds[starts] if seconds.size else seconds
    frame.attrs["timed_by_date"] = True
    _name_gaps(table, frame["time"].to_numpy(), codes, named, problems, ids)


def _name_gaps(table, time, codes, column, problems, ids) -> None:
    """Name a reading that follows the one before after more than GAP_FACTOR times the
    median interval of its specimen's record."""
    same = np.r_[False, codes[1:] == codes[:-1]]
    steps = np.r_[np.nan, np.diff(time)]
    gap = np.zeros(time.size, dtype=bool)
    for code in np.unique(codes):
        mine = same & (codes == code) & np.isfinite(steps) & (steps > 0)
        if mine.sum() < 8:
            continue
        median = float(np.median(steps[mine]))
        gap |= mine & (steps > GAP_FACTOR * median)
    for index in np.flatnonzero(gap)[:20]:
        median = float(np.median(steps[same & (codes == codes[index]) & (steps > 0)]))
        problems.append(
            InputProblem(
                table.file,
                int(table.frame["source_row"].iloc[index]),
                table.headers[column],
                f"a gap of {_duration(steps[index])} after the reading before, where this "
                f"record's readings are {_duration(median)} apart: did the logger stop or "
                "restart? Give the readings after it as a specimen of their own, or withdraw "
                "them",
                None if ids is None or codes[index] < 0 else str(ids.values[codes[index]]),
            )
        )


def _duration(seconds: float) -> str:
    if seconds >= 3600:
        return f"{seconds / 3600:.3g} h"
    if seconds >= 60:
        return f"{seconds / 60:.3g} min"
    return f"{seconds:.3g} s"


def _head_from_pressures_or_levels(table, frame, ids, specimens, problems) -> None:
    raw = table.frame
    ways = [
        way
        for way, columns in (
            ("head", ("head",)),
            ("head_pressure", ("head_pressure",)),
            ("pressures", ("headwater_pressure", "tailwater_pressure")),
            ("levels", ("headwater_level", "tailwater_level")),
        )
        if any(c in raw.columns for c in columns)
    ]
    if len(ways) > 1:
        problems.append(
            InputProblem(
                table.file,
                1,
                None,
                "the head is given more than one way (" + ", ".join(ways) + "); keep one: "
                "head, head_pressure, headwater_pressure and tailwater_pressure, or "
                "headwater_level and tailwater_level",
            )
        )
        return
    if not ways or ways[0] == "head":
        return
    way = ways[0]
    pair = {
        "pressures": ("headwater_pressure", "tailwater_pressure"),
        "levels": ("headwater_level", "tailwater_level"),
    }.get(way)
    if pair is not None:
        missing = [c for c in pair if c not in raw.columns]
        if missing:
            problems.append(
                InputProblem(
                    table.file,
                    1,
                    missing[0],
                    f"required column missing: {pair[0]} and {pair[1]} go together",
                )
            )
            return
        inflow_end, outflow_end = (frame[c].to_numpy(float) for c in pair)
        for column in pair:
            _report(
                problems,
                table,
                raw[column].isna().to_numpy(),
                column,
                "value missing; expected a number",
                ids,
            )
        difference = inflow_end - outflow_end
        with np.errstate(invalid="ignore"):
            _report(
                problems,
                table,
                np.isfinite(difference) & (difference <= 0),
                pair[0],
                f"{pair[0]} must be above {pair[1]}: the head across the specimen is their "
                "difference",
                ids,
            )
    else:
        _report(
            problems,
            table,
            raw["head_pressure"].isna().to_numpy(),
            "head_pressure",
            "value missing; expected a number",
            ids,
        )
        difference = frame["head_pressure"].to_numpy(float)
    if way == "levels":
        frame["head"] = difference
        _volumes_from_levels(table, frame, ids, specimens, problems)
        return
    column = "head_pressure" if way == "head_pressure" else "headwater_pressure"
    if "temperature" not in raw.columns:
        problems.append(
            InputProblem(
                table.file,
                1,
                table.headers[column],
                "a pressure is turned into head with the water density at the reading's "
                "temperature: add a temperature column",
            )
        )
        return
    temperature = frame["temperature"].to_numpy(float)
    _report(
        problems,
        table,
        np.isnan(temperature) & np.isfinite(difference),
        "temperature",
        "value missing: a head given as a pressure needs the water temperature of its reading",
        ids,
    )
    usable = np.isfinite(temperature) & (temperature >= 0) & (temperature <= 100)
    head = np.full(difference.size, np.nan)
    head[usable] = pressure_head(difference[usable], temperature[usable])
    frame["head"] = head


def _volumes_from_levels(table, frame, ids, specimens, problems) -> None:
    """Cumulative inflow and outflow from the burettes' levels and areas, where the table
    gives no volumes."""
    if "inflow_volume" in table.frame.columns or "outflow_volume" in table.frame.columns:
        return
    if ids is None or specimens is None:
        return
    areas = specimens.set_index("specimen")
    names = pd.Series(ids.values, dtype=object)
    inflow_area = names.map(areas["standpipe_area"]).to_numpy(float)
    outflow_area = names.map(areas["tailwater_standpipe_area"]).to_numpy(float)
    codes = ids.codes
    starts = _run_starts(codes)
    inflow_level = frame["headwater_level"].to_numpy(float)
    outflow_level = frame["tailwater_level"].to_numpy(float)
    a_in = np.append(inflow_area, np.nan)[codes]
    a_out = np.append(outflow_area, np.nan)[codes]
    # a tailwater burette without its area leaves the outflow not measured (NaN)
    frame["inflow_volume"] = a_in * (inflow_level[starts] - inflow_level)
    frame["outflow_volume"] = a_out * (outflow_level - outflow_level[starts])


def derive_readings(
    table: RawTable, frame: pd.DataFrame, ids, specimens: pd.DataFrame | None, problems
) -> None:
    """Fill ``time`` and ``head`` of a converted falling-head table from the columns that
    stand in for them (date-times; pressures; burette levels), in place, naming problems.

    Parameters
    ----------
    table : RawTable
        The readings table as written.
    frame : pandas.DataFrame
        Its SI frame from :func:`kitchen.io.table_checks.convert_table` (owned here).
    ids : TextCodes or None
        Its specimen ids.
    specimens : pandas.DataFrame or None
        The validated specimens table, for the burettes' areas.
    problems : list of InputProblem
        Where the problems found are added.
    """
    _elapsed_from_date_times(table, frame, ids, problems)
    _head_from_pressures_or_levels(table, frame, ids, specimens, problems)
