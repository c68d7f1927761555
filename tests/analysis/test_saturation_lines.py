"""Tests for kitchen.analysis.saturation_lines: zero-air-voids and constant-saturation dry density."""

import numpy as np
import pandas as pd
import pytest

from kitchen.analysis import saturation_lines
from kitchen.specimen import degree_of_saturation, void_ratio

# --- saturation lines ------------------------------------------------------------------------


def test_zero_air_voids_published_value():
    # Das, Principles of Geotechnical Engineering; Holtz & Kovacs (book, from memory):
    # w = 20 %, Gs = 2.70 -> 1.753 Mg/m3. Tolerance: half a unit of the last printed digit.
    rho = saturation_lines.zero_air_voids_dry_density(0.20, 2.70)
    assert rho == pytest.approx(1753.0, abs=0.5)


def test_constant_saturation_published_value():
    # Same sources (book, from memory): S = 90 % -> 1.688 Mg/m3. The exact value, 1687.5
    # kg/m3, sits on the rounding edge of the printed digits; allow half a unit plus 1e-6.
    rho = saturation_lines.constant_saturation_dry_density(0.20, 2.70, 0.90)
    assert rho == pytest.approx(1688.0, abs=0.5 + 1e-6)


def test_saturation_line_round_trips_through_phase_relations():
    # S = w·Gs/e with e = Gs·ρw/ρd − 1 (Das, phase relations): the line must give back S.
    w = np.linspace(0.05, 0.35, 7)
    for s in (0.7, 0.85, 1.0):
        rho = saturation_lines.constant_saturation_dry_density(w, 2.68, s)
        e = void_ratio(rho, 2.68)
        np.testing.assert_allclose(degree_of_saturation(w, 2.68, e), s, rtol=1e-12)


def test_zero_air_voids_is_full_saturation_and_keeps_the_input_kind():
    w = pd.Series([0.10, 0.15, 0.25], index=["a", "b", "c"])
    zav = saturation_lines.zero_air_voids_dry_density(w, 2.65)
    assert isinstance(zav, pd.Series) and list(zav.index) == ["a", "b", "c"]
    np.testing.assert_allclose(zav, saturation_lines.constant_saturation_dry_density(w, 2.65, 1.0))
    assert isinstance(saturation_lines.zero_air_voids_dry_density(0.1, 2.65), float)
    assert isinstance(saturation_lines.zero_air_voids_dry_density([0.1, 0.2], 2.65), np.ndarray)
    # Hand check: 2650 / (1 + 0.1·2.65) = 2094.86 kg/m3.
    assert saturation_lines.zero_air_voids_dry_density(0.1, 2.65) == pytest.approx(
        2094.862, abs=1e-3
    )


@pytest.mark.parametrize(
    "kwargs, message",
    [
        (dict(water_content=-0.1, specific_gravity=2.7, saturation=0.9), "water_content"),
        (dict(water_content=0.2, specific_gravity=2700, saturation=0.9), "between 1 and 10"),
        (dict(water_content=0.2, specific_gravity=2.7, saturation=90), "not 90"),
        (dict(water_content=0.2, specific_gravity=2.7, saturation=0.0), "0 < S"),
        (dict(water_content=0.2, specific_gravity=2.7, saturation=0.9, water_density=-1), "kg/m3"),
        (dict(water_content=[0.1, 0.2], specific_gravity=[2.7] * 3, saturation=1), "has 3"),
        (dict(water_content="wet", specific_gravity=2.7, saturation=0.9), "expected numbers"),
    ],
)
def test_saturation_line_bad_input(kwargs, message):
    with pytest.raises(ValueError, match=message):
        saturation_lines.constant_saturation_dry_density(**kwargs)


def test_saturation_line_names_the_index_of_a_missing_value():
    w = pd.Series([0.1, np.nan], index=["S1", "S2"])
    with pytest.raises(
        ValueError,
        match=r"water_content: expected a finite number \(not NaN or infinite\); got nan at index 'S2'",
    ):
        saturation_lines.zero_air_voids_dry_density(w, 2.7)
