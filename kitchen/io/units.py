"""Units at the file boundary: bracketed column headers parsed with pint, values to SI.

A column with a dimension carries its unit in brackets after its name, for example
``height [mm]`` or ``temperature [degC]``. :func:`split_header` separates name and unit;
:func:`to_si` converts a column of numbers to the package's internal unit for its kind.
Nothing else in the package knows about units.

Internal units (see the nomenclature in :mod:`kitchen`): metre, square metre, cubic
metre, kilogram, second; temperature in degrees Celsius; ratios (water content,
saturation) as fractions.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

import numpy as np

__all__ = [
    "KINDS",
    "EXAMPLE_UNITS",
    "UnitError",
    "split_header",
    "to_si",
    "parse_value",
    "format_header",
    "time_zone",
    "time_zone_problem",
]

_HEADER = re.compile(r"^\s*(?P<name>[^\[\]]*?)\s*(?:\[(?P<unit>[^\[\]]*)\])?\s*$")

KINDS: dict[str, tuple[str | None, str]] = {
    # kind: (pint dimensionality, internal unit)
    "length": ("[length]", "m"),
    "area": ("[length] ** 2", "m**2"),
    "volume": ("[length] ** 3", "m**3"),
    "mass": ("[mass]", "kg"),
    "time": ("[time]", "s"),
    "temperature": ("[temperature]", "degC"),
    "pressure": ("[mass] / [length] / [time] ** 2", "Pa"),
    "density": ("[mass] / [length] ** 3", "kg/m**3"),
    "ratio": ("", "dimensionless"),
    "dimensionless": ("", "dimensionless"),
}
"""Kinds of quantity a column may hold, with pint dimensionality and the internal unit."""

EXAMPLE_UNITS: dict[str, str] = {
    "length": "mm, cm, in",
    "area": "mm2, cm2, in^2",
    "volume": "mL, cm3, L",
    "mass": "g, kg, lb",
    "time": "s, min, h",
    "temperature": "degC, degF",
    "density": "Mg/m3, kg/m3, lb/ft3",
    "pressure": "kPa, psi, bar",
    "ratio": "%, -",
    "dimensionless": "-",
}
"""Units of the right dimension for each kind, quoted by the errors that ask for one."""

_PLAIN_POWER = re.compile(r"(?<=[A-Za-zµμ])([23])(?![\w.])")
"""A digit 2 or 3 right after a unit's letters (``mm2``, ``Mg/m3``): the power the tool's own
tables write without a sign (``standpipe_area [mm2]``, ``dry_density [Mg/m3]``)."""

_RATIO_WORDS = {"%": 0.01, "percent": 0.01, "-": 1.0, "1": 1.0, "fraction": 1.0}

UNIT_TEXT_LIMIT = 40
"""The longest unit text read (``cubic_centimeter`` has 16 characters). [characters]"""

EXPONENT_LIMIT = 1000
"""The largest product of the exponents of a unit expression (``mm**2``: 2)."""

_POWER = re.compile(r"\*\*")
_NUMBER = r"[-+]?\d{1,3}(?:\.\d{1,3})?(?![\d.])"
_EXPONENT = re.compile(rf"\*\*\s*(?:\(\s*(?P<grouped>{_NUMBER})\s*\)|(?P<plain>{_NUMBER}))")


def _article(word: str) -> str:
    return "an" if word[:1] in "aeiou" else "a"


class UnitError(ValueError):
    """A unit that is missing, unknown, or of the wrong dimension."""


def pint_cache_folder(pint_folder: str | Path) -> Path:
    """Where the registry keeps pint's parsed definitions for the pint installed in
    `pint_folder`: ``$XDG_CACHE_HOME/kitchen/pint/<key>`` (``~/.cache/…`` without
    XDG_CACHE_HOME), the key a digest of the folder's path.

    pint's own cache folder (``~/.cache/pint``) keys the parsed definitions by the file's
    content alone, and they hold the path of the file they import next: once the
    environment that wrote them is deleted, every other environment with the same pint
    version reads them, fails to find that path, and parses the file again in every process
    (0.13-0.14 s against 0.017 s from a cache of its own, measured). A folder of its own for
    each installation cannot be left pointing elsewhere.
    """
    import hashlib

    from .files import cache_folder

    key = hashlib.sha256(str(Path(pint_folder).resolve()).encode()).hexdigest()[:16]
    return cache_folder("pint", key)


@lru_cache(maxsize=1)
def _registry():
    """pint's default registry, its parsed definitions kept in a cache folder.

    Parsing pint's definitions file takes 0.13-0.5 s in every new process (each ``report``,
    each notebook kernel); pint keeps the parsed definitions in a cache folder, here one of
    this pint installation's own (:func:`pint_cache_folder`), and reads them back in a
    tenth of that. Where the cache cannot be used (a read-only home), the file is parsed
    as before.
    """
    import pint

    try:
        folder = pint_cache_folder(Path(pint.__file__).parent)
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=folder)
    except Exception:  # any trouble with the cache (unwritable, damaged): parse the file
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=True)


def bounded_unit_text(text: str) -> None:
    """Refuse a unit expression whose evaluation could take unbounded work.

    pint evaluates a unit as an arithmetic expression, so ``10**10**10`` asks for a number
    of ten billion digits. A unit is read only when its text has at most
    :data:`UNIT_TEXT_LIMIT` characters and every power, after pint's own rewriting
    (``mm²`` → ``mm**(2)``, ``cubic cm`` → ``cm**3``), has a plain number of at most three
    digits for its exponent, is not raised again, and the product of the exponents is at
    most :data:`EXPONENT_LIMIT`. The tool's own rule.

    Raises
    ------
    UnitError
        Naming what is refused.

    Examples
    --------
    >>> bounded_unit_text("mm^2")
    >>> bounded_unit_text("10**10**10")
    Traceback (most recent call last):
    ...
    kitchen.io.units.UnitError: unit '10**10**10': a power cannot be raised again
    """
    if len(text) > UNIT_TEXT_LIMIT:
        raise UnitError(
            f"unit {text[:UNIT_TEXT_LIMIT]!r}...: longer than {UNIT_TEXT_LIMIT} characters"
        )
    from pint.util import string_preprocessor

    rewritten = string_preprocessor(text)
    product = 1.0
    for power in _POWER.finditer(rewritten):
        exponent = _EXPONENT.match(rewritten, power.start())
        if exponent is None:
            raise UnitError(
                f"unit {text!r}: an exponent must be a plain number of at most three digits"
            )
        if rewritten[exponent.end() :].lstrip().startswith("**"):
            raise UnitError(f"unit {text!r}: a power cannot be raised again")
        product *= max(1.0, abs(float(exponent["grouped"] or exponent["plain"])))
        if product > EXPONENT_LIMIT:
            raise UnitError(f"unit {text!r}: its exponents multiply to more than {EXPONENT_LIMIT}")


def split_header(header: str) -> tuple[str, str | None]:
    """Split a column header into its name and its bracketed unit.

    Parameters
    ----------
    header : str
        A header such as ``"height [mm]"`` or ``"specimen"``.

    Returns
    -------
    name, unit : tuple of str and (str or None)
        The lower-case name, and the unit text inside the brackets (``None`` when the
        header has no brackets; an empty string when the brackets are empty).

    Examples
    --------
    >>> split_header("height [mm]")
    ('height', 'mm')
    >>> split_header("specimen")
    ('specimen', None)
    """
    match = _HEADER.match(str(header))
    if match is None:
        raise UnitError(f"header {header!r} is not of the form 'name [unit]'")
    unit = match.group("unit")
    return match.group("name").strip().lower(), None if unit is None else unit.strip()


_OFFSET = re.compile(r"^(?:UTC|GMT)?\s*(?P<sign>[+-])(?P<hours>\d{1,2})(?::?(?P<minutes>\d{2}))?$")


def time_zone(text: str | None):
    """The time zone a date-time column's header states, as a :class:`datetime.tzinfo`.

    Parameters
    ----------
    text : str or None
        The text in the header's brackets: ``UTC``, an offset from UTC (``+01:00``,
        ``UTC-05:00``, ``+0530``) or a name of the IANA time-zone database
        (``Europe/Zurich``). None or empty: no zone stated (each value must then carry
        its own offset).

    Returns
    -------
    datetime.tzinfo or None

    Raises
    ------
    UnitError
        When the text is none of these.

    References
    ----------
    ISO 8601-1:2019, clause 4.3.13 (time shift from UTC); the IANA time zone database
    (through Python's :mod:`zoneinfo`).

    Examples
    --------
    >>> time_zone("+01:00")
    datetime.timezone(datetime.timedelta(seconds=3600))
    >>> time_zone("UTC")
    datetime.timezone.utc
    """
    import datetime as dt

    if text is None or not text.strip():
        return None
    text = text.strip()
    if text.upper() in ("UTC", "Z", "GMT"):
        return dt.UTC
    offset = _OFFSET.match(text)
    if offset is not None:
        hours, minutes = int(offset["hours"]), int(offset["minutes"] or 0)
        if hours > 14 or minutes >= 60:
            raise UnitError(f"time zone {text!r}: an offset from UTC is at most 14:00")
        sign = -1 if offset["sign"] == "-" else 1
        return dt.timezone(sign * dt.timedelta(hours=hours, minutes=minutes))
    import zoneinfo

    try:
        return zoneinfo.ZoneInfo(text)
    except (zoneinfo.ZoneInfoNotFoundError, ValueError):
        raise UnitError(
            f"unknown time zone {text!r}: expected UTC, an offset such as +01:00, or a "
            "zone name such as Europe/Zurich"
        ) from None


def time_zone_problem(text: str | None) -> str | None:
    """What is wrong with the time zone of a date-time header, or None."""
    try:
        time_zone(text)
    except UnitError as error:
        return str(error)
    return None


def format_header(name: str, unit: str | None) -> str:
    """Join a name and a unit into a header, the inverse of :func:`split_header`."""
    return name if not unit else f"{name} [{unit}]"


@lru_cache(maxsize=256)
def _factor_offset(unit: str, kind: str) -> tuple[float, float]:
    """Return (factor, offset) so that internal = factor * value + offset."""
    if kind not in KINDS:
        raise UnitError(f"unknown kind of quantity {kind!r}")
    if kind in ("ratio", "dimensionless"):
        word = unit.strip().lower()
        if word in _RATIO_WORDS:
            return _RATIO_WORDS[word], 0.0
    registry = _registry()
    text = unit.replace("°C", "degC").replace("°F", "degF").replace("°", "deg")
    text = _PLAIN_POWER.sub(r"**\1", text)
    bounded_unit_text(text)
    try:
        parsed = registry.Unit(text)
    except Exception as error:  # pint raises several types for text it cannot read
        raise UnitError(f"unknown unit {unit!r}") from error
    dimensionality, internal = KINDS[kind]
    wanted = registry.Quantity(1.0, internal).dimensionality
    if parsed.dimensionality != wanted:
        raise UnitError(
            f"unit {unit!r} is not {_article(kind)} {kind} (for example {EXAMPLE_UNITS[kind]})"
        )
    q0 = float(registry.Quantity(0.0, parsed).to(internal).magnitude)
    if q0 == 0.0:
        return float(registry.Quantity(1.0, parsed).to(internal).magnitude), 0.0
    # An offset unit (degF, K): a span of 1000 keeps the factor's rounding small.
    q1000 = float(registry.Quantity(1000.0, parsed).to(internal).magnitude)
    return (q1000 - q0) / 1000.0, q0


def to_si(values, unit: str, kind: str):
    """Convert numbers in ``unit`` to the internal unit of ``kind``.

    Parameters
    ----------
    values : float or array_like
        Magnitudes in ``unit``.
    unit : str
        Unit text as written in a header, for example ``"mm"``, ``"in"``, ``"min"``,
        ``"mL"``, ``"degC"``, ``"%"``. A 2 or 3 right after a unit's letters is its power,
        as the tool's own tables write it (``"mm2"``, ``"Mg/m3"``), as are ``"mm^2"`` and
        ``"mm²"``.
    kind : str
        One of :data:`KINDS`.

    Returns
    -------
    float or numpy.ndarray
        Values in the internal unit (m, m², m³, kg, s, °C, or a fraction).

    Raises
    ------
    UnitError
        When the unit is unknown or not of the dimension the kind needs.

    Examples
    --------
    >>> float(to_si(25.4, "mm", "length"))
    0.0254
    >>> round(float(to_si(68.0, "degF", "temperature")), 9)
    20.0
    """
    factor, offset = _factor_offset(unit, kind)
    if np.isscalar(values):
        return factor * float(values) + offset
    return np.asarray(values, dtype=float) * factor + offset


@dataclass(frozen=True)
class ParsedValue:
    """A value given with its unit, as typed by a person (``"4.95 in"``)."""

    magnitude: float
    unit: str
    si: float


def parse_value(text: str, kind: str) -> ParsedValue:
    """Parse ``"<number> <unit>"`` typed by a person into its SI value.

    Parameters
    ----------
    text : str
        For example ``"4.95 in"``, ``"101.6 mm"``, ``"21.5 degC"``, ``"18 %"``. A bare number
        is accepted only for dimensionless kinds.
    kind : str
        One of :data:`KINDS`.

    Returns
    -------
    ParsedValue
    """
    match = re.match(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$", str(text))
    if match is None:
        raise UnitError(f"{text!r} is not a number followed by a unit")
    magnitude = float(match.group(1))
    unit = match.group(2)
    if not unit:
        if kind != "dimensionless":
            raise UnitError(
                f"{text!r} has no unit; {_article(kind)} {kind} needs one (for example "
                f"{EXAMPLE_UNITS[kind]})"
            )
        return ParsedValue(magnitude, "", magnitude)
    return ParsedValue(magnitude, unit, to_si(magnitude, unit, kind))
