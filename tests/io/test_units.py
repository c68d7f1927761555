"""Bracketed units in headers, parsed with pint."""

import os
from pathlib import Path

import pytest

from kitchen.io import UnitError, parse_value, split_header, to_si


@pytest.mark.parametrize(
    ("header", "expected"),
    [
        ("height [mm]", ("height", "mm")),
        ("  Height  [ in ] ", ("height", "in")),
        ("specimen", ("specimen", None)),
        ("water_content [%]", ("water_content", "%")),
        ("standpipe_area [mm^2]", ("standpipe_area", "mm^2")),
    ],
)
def test_split_header(header, expected):
    assert split_header(header) == expected


@pytest.mark.parametrize(
    ("value", "unit", "kind", "si"),
    # Exact definitions: 1 in = 25.4 mm (international inch), 1 lb = 0.45359237 kg,
    # 1 mL = 1 cm^3, degF = 9/5 degC + 32.
    [
        (1.0, "in", "length", 0.0254),
        (116.4, "mm", "length", 0.1164),
        (1.0, "lb", "mass", 0.45359237),
        (350.0, "mL", "volume", 350e-6),
        (350.0, "cm^3", "volume", 350e-6),
        (5.0, "min", "time", 300.0),
        (2.0, "h", "time", 7200.0),
        (40.0, "mm^2", "area", 40e-6),
        (68.0, "degF", "temperature", 20.0),
        (293.15, "K", "temperature", 20.0),
        (18.5, "%", "ratio", 0.185),
        (0.185, "-", "ratio", 0.185),
    ],
)
def test_to_si(value, unit, kind, si):
    assert to_si(value, unit, kind) == pytest.approx(si, rel=1e-12, abs=1e-12)


def test_wrong_dimension_is_named():
    with pytest.raises(UnitError, match="'g' is not a length"):
        to_si(4.95, "g", "length")


def test_unknown_unit_is_named():
    with pytest.raises(UnitError, match="unknown unit 'furlongz'"):
        to_si(1.0, "furlongz", "length")


def test_parse_value():
    parsed = parse_value("4.95 in", "length")
    assert (parsed.magnitude, parsed.unit) == (4.95, "in")
    assert parsed.si == pytest.approx(0.12573)


@pytest.mark.parametrize("text", ["4.95", "tall", ""])
def test_parse_value_needs_number_and_unit(text):
    with pytest.raises(UnitError):
        parse_value(text, "length")


@pytest.mark.parametrize(
    ("unit", "expected"),
    [
        ("10**10**10", "a power cannot be raised again"),
        ("mm^2^2", "a power cannot be raised again"),
        ("10¹⁰¹⁰", "an exponent must be a plain number"),
        ("m**1234", "an exponent must be a plain number"),
        ("(((10**99)**99)**99)", "its exponents multiply to more than 1000"),
        ("m" * 41, "longer than 40 characters"),
    ],
)
def test_a_unit_expression_is_refused_before_it_is_evaluated(unit, expected):
    # evaluating 10**10**10 asks for a number of ten billion digits: the text is refused first
    with pytest.raises(UnitError, match=expected):
        to_si(1.0, unit, "length")


@pytest.mark.parametrize(
    ("unit", "si"),
    # 1 mm = 1e-3 m, so 1 mm² = 1e-6 m² and 1 cm³ = 1e-6 m³ (SI prefixes)
    [("mm²", 1e-6), ("mm**2", 1e-6), ("(mm)**2", 1e-6), ("square millimeter", 1e-6)],
)
def test_ordinary_powers_still_read(unit, si):
    assert to_si(1.0, unit, "area") == pytest.approx(si, rel=1e-12)


@pytest.mark.parametrize(
    ("unit", "kind", "si"),
    # the units as the tool itself writes them in its tables (standpipe_area [mm2],
    # dry_density [Mg/m3]) and as people type them; 1 cm² = 1e-4 m², 1 Mg/m³ = 1000 kg/m³
    # (SI prefixes)
    [
        ("mm2", "area", 1e-6),
        ("cm2", "area", 1e-4),
        ("cm^2", "area", 1e-4),
        ("cm²", "area", 1e-4),
        ("cm3", "volume", 1e-6),
        ("Mg/m3", "density", 1000.0),
        ("Mg/m³", "density", 1000.0),
        ("g/cm3", "density", 1000.0),
        ("kg/m^3", "density", 1.0),
    ],
)
def test_units_as_the_tool_writes_them_are_read(unit, kind, si):
    assert to_si(1.0, unit, kind) == pytest.approx(si, rel=1e-12)


@pytest.mark.parametrize("unit", ["m2s", "2mm", "mm2.5"])
def test_a_digit_that_is_not_a_power_is_not_read_as_one(unit):
    with pytest.raises(UnitError):
        to_si(1.0, unit, "area")


@pytest.mark.parametrize(
    ("kind", "examples", "not_shown"),
    [
        ("length", "mm, cm, in", "g"),
        ("area", "mm2, cm2", "s"),
        ("volume", "mL, cm3", "g"),
        ("mass", "g, kg", "mm"),
        ("time", "s, min, h", "g"),
        ("temperature", "degC", "mm"),
        ("density", "Mg/m3", "s"),
    ],
)
def test_a_value_without_a_unit_is_told_units_of_its_own_dimension(kind, examples, not_shown):
    with pytest.raises(UnitError) as caught:
        parse_value("4.95", kind)
    message = str(caught.value)
    assert f"{kind} needs one (for example {examples}" in message
    assert f" {not_shown}," not in message and f" {not_shown})" not in message


def test_a_wrong_dimension_is_told_units_of_the_right_one():
    with pytest.raises(UnitError, match=r"'g' is not a length \(for example mm, cm, in\)"):
        to_si(4.95, "g", "length")


def test_the_cached_registry_converts_as_a_freshly_parsed_one():
    # pint's cache of its parsed definitions changes how long the registry takes to build,
    # never a conversion: compared with a registry parsed from pint's definitions file
    import pint

    from kitchen.io.units import _registry

    fresh = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    cached = _registry()
    for unit in ("mm", "in", "ft", "mL", "cm**3", "g", "lb", "min", "h", "kPa", "psi", "gal"):
        assert cached(unit).to_base_units().magnitude == fresh(unit).to_base_units().magnitude
    assert cached.Quantity(20.0, "degF").to("degC").magnitude == pytest.approx(
        fresh.Quantity(20.0, "degF").to("degC").magnitude, rel=1e-15
    )


def test_a_deleted_environment_leaves_no_parsed_definitions_that_another_reads(tmp_path):
    # pint's own cache folder keys its parsed definitions by content alone, and they name
    # the path of the file they import next: a deleted environment left them pointing at
    # nothing for every other one with the same pint. The registry keeps them in a folder
    # of its own for each pint installation (the foot: 0.3048 m exactly, NIST SP 811 B.8)
    import shutil
    import subprocess
    import sys

    import pint

    script = (
        "import pint\n"
        "from pathlib import Path\n"
        "from kitchen.io.units import _registry, pint_cache_folder\n"
        "assert abs(_registry()('ft').to_base_units().magnitude - 0.3048) < 1e-15\n"
        "print(pint_cache_folder(Path(pint.__file__).parent))\n"
    )
    environment = {**os.environ, "XDG_CACHE_HOME": str(tmp_path / "cache")}
    folders = []
    for name in ("first", "second"):
        site = tmp_path / name
        shutil.copytree(Path(pint.__file__).parent, site / "pint")
        done = subprocess.run(
            [sys.executable, "-c", script],
            capture_output=True,
            text=True,
            timeout=120,
            env={**environment, "PYTHONPATH": str(site)},
        )
        assert done.returncode == 0, done.stderr
        folders.append(Path(done.stdout.strip()))
        assert list(folders[-1].glob("*.pickle"))  # parsed once, kept for the next process
        shutil.rmtree(site)  # the environment is deleted
    assert folders[0] != folders[1]
    assert folders[0].parent == folders[1].parent == tmp_path / "cache" / "kitchen" / "pint"
