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


# --- one way to write the numbers of a table: panels, report page and results.xlsx ---------


@pytest.mark.parametrize(
    ("value", "text"),
    # k to three significant figures (common practice, no source), the trailing zero kept so
    # that a column reads alike: 6.70 beside 7.56, never 6.7
    [
        (6.7e-9, "6.70×10⁻⁹"),
        (7.559208e-9, "7.56×10⁻⁹"),
        (9.996e-10, "1.00×10⁻⁹"),
        (1.0e-4, "1.00×10⁻⁴"),
        (0.0123, "1.23×10⁻²"),
        (math.nan, "–"),
        (None, "–"),
    ],
)
def test_conductivity_is_written_to_three_significant_figures(value, text):
    from kitchen.display_units import column_format

    assert column_format("k20 [m/s]").text(value) == text
    assert column_format("k20_low [cm/s]").text(value) == text


@pytest.mark.parametrize(
    ("column", "value", "text", "cell_format"),
    # fixed decimals by quantity (common practice, no source): w and S to 0.1 %, e and n
    # to 0.001, Gs to 0.01, ρd to 0.001 Mg/m³ (so 1.660 beside 1.606), γd to 0.01 kN/m³,
    # 0.1 lb/ft³ (each about four significant figures of a soil's density)
    [
        ("water_content [%]", 16.4, "16.4", "0.0"),
        ("saturation [%]", 75.39197, "75.4", "0.0"),
        ("void_ratio", 0.5895057, "0.590", "0.000"),
        ("e", 0.5, "0.500", "0.000"),
        ("porosity", 0.37087, "0.371", "0.000"),
        ("specific_gravity", 2.7, "2.70", "0.00"),
        ("dry_density [Mg/m3]", 1.66, "1.660", "0.000"),
        ("dry_density [Mg/m3]", 1.6059, "1.606", "0.000"),
        ("ρd [Mg/m³]", 1.704932532704562, "1.705", "0.000"),
        ("γd [kN/m³]", 16.71945, "16.72", "0.00"),
        ("ρd [lb/ft³]", 106.43, "106.4", "0.0"),
        ("k20 [m/s]", 7.559208e-9, "7.56×10⁻⁹", "0.00E+00"),
        ("temperature [degC]", 19.559, "19.6", "0.0"),
        ("gradient", 16.023, "16.0", "0.0"),
        ("diameter [mm]", 101.6, "101.60", "0.00"),
    ],
)
def test_each_column_has_one_number_format(column, value, text, cell_format):
    from kitchen.display_units import column_format

    style = column_format(column)
    assert style.text(value) == text
    assert style.spreadsheet == cell_format


def test_a_column_of_no_known_quantity_has_no_fixed_format():
    from kitchen.display_units import column_format

    assert column_format("notes") is None and column_format("n_readings") is None


def test_html_powers_of_ten():
    from kitchen.display_units import CONDUCTIVITY_FORMAT

    assert CONDUCTIVITY_FORMAT.text(6.7e-9, html=True) == "6.70×10<sup>−9</sup>"


def test_the_density_unit_brings_its_own_format():
    assert density_unit("kN/m3").number.text(16.7) == "16.70"
    assert density_unit("Mg/m3").number.text(1.7) == "1.700"
    assert density_unit("lb/ft3").number.text(106.0) == "106.0"


def test_an_interval_keeps_the_trailing_zero():
    from kitchen.display_units import distinct_texts

    assert distinct_texts(k_unit("m/s"), 6.7e-9, 6.68e-9, 6.72e-9, html=False) == [
        "6.70×10⁻⁹",
        "6.68×10⁻⁹",
        "6.72×10⁻⁹",
    ]


@pytest.mark.parametrize(
    ("text", "unit", "expected"),
    # 1 m/s = 100 cm/s (SI prefixes); the tool's own sentences, restated in the unit chosen
    [
        ("k = 7.56e-09 m/s is steady", "cm/s", "k = 7.56×10⁻⁷ cm/s is steady"),
        ("below 1e-10 m/s, and 2.5e-9 m/s", "cm/s", "below 1×10⁻⁸ cm/s, and 2.5×10⁻⁷ cm/s"),
        ("average 1.2e-08 m/s (no flow)", "m/s", "average 1.2e-08 m/s (no flow)"),
        ("gradient 16 (k in m/s)", "cm/s", "gradient 16 (k in m/s)"),
        ("k 3e-9 cm/s", "cm/s", "k 3e-9 cm/s"),
    ],
)
def test_conductivities_in_words_follow_the_unit(text, unit, expected):
    from kitchen.display_units import restate_conductivities

    assert restate_conductivities(text, unit) == expected
