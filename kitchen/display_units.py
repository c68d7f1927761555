"""Units for display: the k and density units the charts and the report offer.

Inside the package k is in m/s and dry density in kg/m3; the charts and the report show
them in the unit the engineer picks: the charts, the panels' tables, the report page and
the ``specimens`` sheet of ``results.xlsx``. ``results.csv`` (and the workbook's ``tests``
sheet) keep their stated units (``k20 [m/s]``, ``dry_density [Mg/m3]``).

Numbers are written one way wherever a person reads them — the panels' tables, the report
page and the cells of ``results.xlsx``: :func:`column_format` gives each column's
:class:`NumberFormat` (k to three significant figures, densities, water contents and void
ratios to fixed decimals), as text and as a spreadsheet number format, so the workbook keeps
the full value in the cell and shows it as the page does.

References
----------
NIST Special Publication 811 (2008), *Guide for the Use of the International System of
Units*, Appendix B: 1 ft = 0.3048 m and 1 lb = 0.453 592 37 kg exactly (the
international foot and pound, 1959), so 1 lb/ft³ = 16.018 46 kg/m³; standard
acceleration of gravity g_n = 9.806 65 m/s² exactly (3rd CGPM, 1901).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

__all__ = [
    "STANDARD_GRAVITY",
    "FOOT",
    "POUND",
    "K_UNITS",
    "DENSITY_UNITS",
    "CONDUCTIVITY_FORMAT",
    "DisplayUnit",
    "NumberFormat",
    "column_format",
    "restate_conductivities",
    "k_unit",
    "density_unit",
    "distinct_texts",
    "scientific",
    "superscript",
]

STANDARD_GRAVITY = 9.80665
"""Standard acceleration of gravity g_n, exact by definition (3rd CGPM 1901). [m/s2]"""
FOOT = 0.3048
"""The international foot, exact by definition (1959; NIST SP 811 App. B). [m]"""
POUND = 0.45359237
"""The international avoirdupois pound, exact by definition (1959; NIST SP 811 App. B). [kg]"""


@dataclass(frozen=True)
class NumberFormat:
    """How the numbers of one quantity are written: on screen, and in a spreadsheet cell.

    Attributes
    ----------
    style : {"fixed", "scientific"}
        ``fixed``: ``digits`` decimals (``1.705``); ``scientific``: ``digits`` significant
        figures as a power of ten (``7.56×10⁻⁹``), the trailing zeros kept (``6.70×10⁻⁹``)
        so that the numbers of a column read alike.
    digits : int
        Decimals (fixed) or significant figures (scientific).
    """

    style: str
    digits: int

    def text(self, value, html: bool = False) -> str:
        """`value` written in this format; ``–`` for a missing value, ``∞`` for an infinite one.

        ``html=True`` writes the power of ten as ``10<sup>−9</sup>`` (HTML and plotly labels).
        """
        if value is None or isinstance(value, str):
            return "–" if value is None else value
        try:
            number = float(value)
        except (TypeError, ValueError):
            return "–"
        if math.isnan(number):
            return "–"
        if math.isinf(number):
            return "∞" if number > 0 else "−∞"
        if self.style == "fixed":
            return f"{number:.{self.digits}f}"
        return power_of_ten(number, self.digits, html=html, trim=False)

    @property
    def spreadsheet(self) -> str:
        """The same format as a spreadsheet number format (``0.000``, ``0.00E+00``)."""
        if self.style == "fixed":
            return "0" + ("." + "0" * self.digits if self.digits else "")
        return "0" + ("." + "0" * (self.digits - 1) if self.digits > 1 else "") + "E+00"


CONDUCTIVITY_FORMAT = NumberFormat("scientific", 3)
"""k, its interval and every conductivity: three significant figures (common practice, no
source; a falling-head k is seldom known better than to 1 %)."""


def _fixed(decimals: int) -> NumberFormat:
    return NumberFormat("fixed", decimals)


@dataclass(frozen=True)
class DisplayUnit:
    """A unit to show a quantity in: ``shown = factor × SI value``.

    Attributes
    ----------
    unit : str
        The unit as printed on axes and table headers (``"kN/m³"``).
    factor : float
        Multiplier from the SI value to the shown value.
    quantity : str
        The quantity's name in that unit (dry density, or dry unit weight for kN/m³).
    symbol : str
        Its symbol (ρd, γd).
    number : NumberFormat
        How its numbers are written: k to three significant figures; a density to the
        decimals that give about four significant figures for a soil (1.705 Mg/m³,
        16.72 kN/m³, 106.4 lb/ft³; common practice, no source).
    """

    unit: str
    factor: float
    quantity: str
    symbol: str
    number: NumberFormat = CONDUCTIVITY_FORMAT

    def title(self) -> str:
        """Axis or column title with the unit in brackets: ``"dry density ρd [Mg/m³]"``."""
        return f"{self.quantity} {self.symbol} [{self.unit}]"


K_UNITS = {
    "m/s": DisplayUnit("m/s", 1.0, "hydraulic conductivity", "k"),
    "cm/s": DisplayUnit("cm/s", 100.0, "hydraulic conductivity", "k"),
}
"""Conductivity units offered, by name (1 m/s = 100 cm/s)."""

DENSITY_UNITS = {
    "Mg/m³": DisplayUnit("Mg/m³", 1e-3, "dry density", "ρd", _fixed(3)),
    "kN/m³": DisplayUnit("kN/m³", STANDARD_GRAVITY / 1000.0, "dry unit weight", "γd", _fixed(2)),
    "lb/ft³": DisplayUnit("lb/ft³", FOOT**3 / POUND, "dry density", "ρd", _fixed(1)),
}
"""Density units offered, by name. kN/m³ shows the dry unit weight γd = ρd·g_n."""

_DENSITY_ALIASES = {
    "mg/m3": "Mg/m³",
    "mg/m^3": "Mg/m³",
    "mg/m³": "Mg/m³",
    "t/m3": "Mg/m³",
    "g/cm3": "Mg/m³",
    "kn/m3": "kN/m³",
    "kn/m^3": "kN/m³",
    "kn/m³": "kN/m³",
    "lb/ft3": "lb/ft³",
    "lb/ft^3": "lb/ft³",
    "lb/ft³": "lb/ft³",
    "pcf": "lb/ft³",
}


def k_unit(name: str = "m/s") -> DisplayUnit:
    """The conductivity display unit named `name` (``"m/s"`` or ``"cm/s"``)."""
    unit = K_UNITS.get(str(name).strip())
    if unit is None:
        raise ValueError(f"k unit {name!r}: expected one of {', '.join(K_UNITS)}")
    return unit


def density_unit(name: str = "Mg/m³") -> DisplayUnit:
    """The density display unit named `name` (``"Mg/m3"``, ``"kN/m3"``, ``"lb/ft3"``…)."""
    key = _DENSITY_ALIASES.get(str(name).strip().lower().replace(" ", ""))
    if key is None:
        raise ValueError(
            f"density unit {name!r}: expected one of Mg/m3, kN/m3, lb/ft3 (or the same with ³)"
        )
    return DENSITY_UNITS[key]


_SUPERSCRIPT = str.maketrans("0123456789-+", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻⁺")


def superscript(exponent: int) -> str:
    """An integer in superscript digits, for powers of ten: ``superscript(-9)`` is ``⁻⁹``."""
    return str(exponent).translate(_SUPERSCRIPT)


def scientific(value: float, digits: int = 3, html: bool = False) -> str:
    """A number as ``1.13×10⁻⁹`` (or ``1.13×10<sup>−9</sup>`` for HTML and plotly labels).

    Values between 0.01 and 10 000 are written plainly; NaN is written ``–``.
    """
    if value is None or not math.isfinite(value):
        return "–"
    if value == 0 or 1e-2 <= abs(value) < 1e4:
        return f"{value:.{digits}g}"
    return power_of_ten(value, digits, html=html, trim=True)


def power_of_ten(value: float, digits: int = 3, html: bool = False, trim: bool = False) -> str:
    """`value` as ``m×10ⁿ`` with `digits` significant figures in the mantissa.

    ``trim=True`` drops trailing zeros (a limit as it was typed, ``1×10⁻⁹``); otherwise they
    are kept (a measured value, ``6.70×10⁻⁹``). NaN is written ``–``, zero ``0``.
    """
    if value is None or not math.isfinite(value):
        return "–"
    if value == 0:
        return "0"
    exponent = math.floor(math.log10(abs(value)))
    mantissa = value / 10.0**exponent
    if round(abs(mantissa), digits - 1) >= 10.0:
        mantissa, exponent = mantissa / 10.0, exponent + 1
    text = f"{mantissa:.{digits - 1}f}"
    if trim and "." in text:
        text = text.rstrip("0").rstrip(".")
    lead = f"{text}×"
    if html:
        power = str(exponent).replace("-", "−")
        return f"{lead}10<sup>{power}</sup>"
    return f"{lead}10{superscript(exponent)}"


def distinct_texts(unit: DisplayUnit, *values: float, html: bool = True) -> list[str]:
    """The values in ``unit``, written with enough digits (3 to 6) to tell them apart.

    Three significant figures (:data:`CONDUCTIVITY_FORMAT`), trailing zeros kept. An
    interval such as 7.556e-9 to 7.562e-9 m/s would print as "7.56 – 7.56" with three
    digits; this adds digits until the texts differ wherever the values do.
    """
    texts: list[str] = []
    for digits in range(3, 7):
        style = NumberFormat("scientific", digits)
        texts = [style.text(v * unit.factor, html=html) for v in values]
        if len(set(texts)) == len(set(values)):
            break
    return texts


_HEADER = re.compile(r"^\s*(?P<name>[^\[\]]*?)\s*(?:\[(?P<unit>[^\[\]]*)\])?\s*$")

_UNIT_FORMATS = {
    "%": _fixed(1),
    "degC": _fixed(1),
    "°C": _fixed(1),
    "mm": _fixed(2),
    "g": _fixed(2),
    "mm2": _fixed(2),
    "mm²": _fixed(2),
}
_NAME_FORMATS = {
    "void_ratio": _fixed(3),
    "void ratio": _fixed(3),
    "e": _fixed(3),
    "porosity": _fixed(3),
    "n": _fixed(3),
    "specific_gravity": _fixed(2),
    "gs": _fixed(2),
    "gradient": _fixed(1),
    "i": _fixed(1),
}


def column_format(header: str) -> NumberFormat | None:
    """The number format of a table column, from its header (``"k20 [m/s]"``, ``"e"``).

    The one format of each quantity, used by the panels' tables, the report page and the
    number formats of ``results.xlsx``: a conductivity (``[m/s]``, ``[cm/s]``) to three
    significant figures; a density in its unit's decimals (:attr:`DisplayUnit.number`);
    a percentage (water content, saturation) and a temperature to 0.1; a length or a mass
    in mm or g to 0.01; a void ratio or porosity to 0.001; Gs to 0.01; a gradient to 0.1
    (common practice, no source: the digits a laboratory sheet carries). None for a
    column of no known quantity (counts, text): the caller writes it as it is.

    Examples
    --------
    >>> column_format("k20 [cm/s]").text(6.7e-9)
    '6.70×10⁻⁹'
    >>> column_format("dry_density [Mg/m3]").text(1.66)
    '1.660'
    """
    match = _HEADER.match(str(header))
    if match is None:
        return None
    name, unit = match.group("name").strip(), (match.group("unit") or "").strip()
    if unit in K_UNITS:
        return CONDUCTIVITY_FORMAT
    if unit:
        key = _DENSITY_ALIASES.get(unit.lower().replace(" ", ""))
        if key is not None:
            return DENSITY_UNITS[key].number
        return _UNIT_FORMATS.get(unit)
    return _NAME_FORMATS.get(name.lower())


_CONDUCTIVITY_IN_WORDS = re.compile(
    r"(?<![\w.])(?P<number>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)(?P<space>\s*)m/s\b"
)


def restate_conductivities(text: str, unit: str) -> str:
    """The tool's own sentences with every ``<number> m/s`` written in `unit`.

    The checks and notes are written in m/s; where the engineer shows k in cm/s, their
    conductivities follow (``k = 7.56e-09 m/s`` becomes ``k = 7.56×10⁻⁷ cm/s``), each with
    the significant figures the sentence gave it. Other text, and any text in m/s, is left
    as it is.
    """
    shown = k_unit(unit)
    if shown.factor == 1.0:
        return text

    def restated(match: re.Match) -> str:
        number = match.group("number")
        mantissa = re.split(r"[eE]", number)[0].lstrip("+-").replace(".", "").lstrip("0")
        digits = max(1, len(mantissa))
        value = float(number) * shown.factor
        return f"{scientific(value, digits)}{match.group('space') or ' '}{shown.unit}"

    return _CONDUCTIVITY_IN_WORDS.sub(restated, text)
