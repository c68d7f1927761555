"""Display units of the charts and the report, against exact definitions."""

import math

import pytest

from kitchen.display_units import (
    DENSITY_UNITS,
    FOOT,
    POUND,
    STANDARD_GRAVITY,
    density_unit,
    k_unit,
    scientific,
    superscript,
)


def test_k_units():
    # 1 m = 100 cm by definition (SI Brochure, 9th ed., Table 7: the prefix centi = 1e-2).
    assert k_unit("m/s").factor == 1.0
    assert k_unit("cm/s").factor == 100.0
    assert k_unit("cm/s").title() == "hydraulic conductivity k [cm/s]"


def test_density_units_from_exact_definitions():
    # NIST SP 811 (2008), Appendix B: 1 ft = 0.3048 m and 1 lb = 0.45359237 kg exactly;
    # B.8 lists 1 lb/ft3 = 1.601 846 E+01 kg/m3; g_n = 9.806 65 m/s2 exactly (3rd CGPM 1901).
    assert FOOT == 0.3048 and POUND == 0.45359237 and STANDARD_GRAVITY == 9.80665
    rho = 1000.0  # 1 Mg/m3 in kg/m3
    assert rho * density_unit("Mg/m3").factor == pytest.approx(1.0, rel=1e-15)
    assert rho * density_unit("kN/m3").factor == pytest.approx(9.80665, rel=1e-15)
    assert rho * density_unit("lb/ft3").factor == pytest.approx(62.428, abs=5e-4)
    assert 1.0 / density_unit("lb/ft3").factor == pytest.approx(16.01846, abs=5e-6)


@pytest.mark.parametrize(
    "name, key",
    [
        ("Mg/m3", "Mg/m³"),
        ("Mg/m³", "Mg/m³"),
        ("g/cm3", "Mg/m³"),
        ("kN/m^3", "kN/m³"),
        ("kn/m3", "kN/m³"),
        ("pcf", "lb/ft³"),
        ("lb/ft3", "lb/ft³"),
    ],
)
def test_density_aliases(name, key):
    assert density_unit(name) is DENSITY_UNITS[key]


def test_unit_weight_is_named_as_such():
    assert density_unit("kN/m3").title() == "dry unit weight γd [kN/m³]"
    assert density_unit("Mg/m3").title() == "dry density ρd [Mg/m³]"


@pytest.mark.parametrize("bad", ["ft/s", "", "mm/s"])
def test_unknown_k_unit_is_named(bad):
    with pytest.raises(ValueError, match="expected one of m/s, cm/s"):
        k_unit(bad)


def test_spaces_around_a_unit_are_forgiven():
    assert k_unit(" cm/s ").unit == "cm/s"


def test_unknown_density_unit_is_named():
    with pytest.raises(ValueError, match="density unit 'kg/l': expected one of Mg/m3"):
        density_unit("kg/l")


@pytest.mark.parametrize(
    "value, text",
    [
        (1e-9, "1×10⁻⁹"),
        (7.559208e-9, "7.56×10⁻⁹"),
        (9.996e-10, "1×10⁻⁹"),
        (2.5e5, "2.5×10⁵"),
        (0.5, "0.5"),
        (123.0, "123"),
        (math.nan, "–"),
        (0.0, "0"),
    ],
)
def test_scientific(value, text):
    assert scientific(value) == text


def test_scientific_html_and_digits():
    assert scientific(7.559208e-9, html=True) == "7.56×10<sup>−9</sup>"
    assert scientific(7.559208e-9, digits=5) == "7.5592×10⁻⁹"


def test_distinct_texts_add_digits_until_values_differ():
    # Common practice, no source: an interval is printed with enough digits to show its ends.
    from kitchen.display_units import distinct_texts, k_unit

    low, high = distinct_texts(k_unit("m/s"), 7.556e-9, 7.562e-9, html=False)
    assert low != high
    same = distinct_texts(k_unit("m/s"), 7.5e-9, 7.5e-9, html=False)
    assert same[0] == same[1]


@pytest.mark.parametrize(
    ("exponent", "text"),
    [(-9, "⁻⁹"), (10, "¹⁰"), (0, "⁰"), (-12345678, "⁻¹²³⁴⁵⁶⁷⁸")],
)
def test_superscript(exponent, text):
    # the superscript digits and minus of Unicode (U+2070, U+00B9, U+00B2, U+00B3,
    # U+2074-U+2079, U+207B; from memory)
    assert superscript(exponent) == text
