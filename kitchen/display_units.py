"""Units for display: the k and density units the charts and the report offer.

Inside the package k is in m/s and dry density in kg/m3; the charts and the report show
them in the unit the engineer picks. Only the display changes: exported tables keep
their stated units (``k20 [m/s]``, ``dry_density [Mg/m3]``).

References
----------
NIST Special Publication 811 (2008), *Guide for the Use of the International System of
Units*, Appendix B: 1 ft = 0.3048 m and 1 lb = 0.453 592 37 kg exactly (the
international foot and pound, 1959), so 1 lb/ft³ = 16.018 46 kg/m³; standard
acceleration of gravity g_n = 9.806 65 m/s² exactly (3rd CGPM, 1901).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = [
    "STANDARD_GRAVITY",
    "FOOT",
    "POUND",
    "K_UNITS",
    "DENSITY_UNITS",
    "DisplayUnit",
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
    """

    unit: str
    factor: float
    quantity: str
    symbol: str

    def title(self) -> str:
        """Axis or column title with the unit in brackets: ``"dry density ρd [Mg/m³]"``."""
        return f"{self.quantity} {self.symbol} [{self.unit}]"


K_UNITS = {
    "m/s": DisplayUnit("m/s", 1.0, "hydraulic conductivity", "k"),
    "cm/s": DisplayUnit("cm/s", 100.0, "hydraulic conductivity", "k"),
}
"""Conductivity units offered, by name (1 m/s = 100 cm/s)."""

DENSITY_UNITS = {
    "Mg/m³": DisplayUnit("Mg/m³", 1e-3, "dry density", "ρd"),
    "kN/m³": DisplayUnit("kN/m³", STANDARD_GRAVITY / 1000.0, "dry unit weight", "γd"),
    "lb/ft³": DisplayUnit("lb/ft³", FOOT**3 / POUND, "dry density", "ρd"),
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
    exponent = math.floor(math.log10(abs(value)))
    mantissa = value / 10.0**exponent
    if round(abs(mantissa), digits - 1) >= 10.0:
        mantissa, exponent = mantissa / 10.0, exponent + 1
    text = f"{mantissa:.{digits - 1}f}".rstrip("0").rstrip(".")
    lead = f"{text}×"
    if html:
        power = str(exponent).replace("-", "−")
        return f"{lead}10<sup>{power}</sup>"
    return f"{lead}10{superscript(exponent)}"


def distinct_texts(unit: DisplayUnit, *values: float, html: bool = True) -> list[str]:
    """The values in ``unit``, written with enough digits (3 to 6) to tell them apart.

    An interval such as 7.556e-9 to 7.562e-9 m/s would print as "7.56 – 7.56" with three
    digits; this adds digits until the texts differ wherever the values do.
    """
    texts: list[str] = []
    for digits in range(3, 7):
        texts = [scientific(v * unit.factor, digits, html=html) for v in values]
        if len(set(texts)) == len(set(values)):
            break
    return texts
