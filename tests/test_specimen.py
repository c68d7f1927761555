"""Phase relations against textbook definitions and a hand-worked case."""

import math

import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st

from kitchen.specimen import (
    circle_area,
    degree_of_saturation,
    dry_density,
    porosity,
    specimen_state,
    void_ratio,
)


def test_hand_worked_specimen():
    # Worked by hand from the definitions (Das & Sobhan, weight-volume relationships):
    # D = 101.6 mm, L = 116.4 mm -> V = 943.7 cm^3; Ms = 1650 g -> rho_d = 1.7485 Mg/m^3;
    # Gs = 2.70 -> e = 2.70/1.7485 - 1 = 0.5442; n = 0.3524; w = 18 % -> S = 0.893.
    rho_d = dry_density(1.650, 0.1016, 0.1164)
    assert rho_d == pytest.approx(1748.5, abs=0.1)
    e = void_ratio(rho_d, 2.70)
    assert e == pytest.approx(0.5442, abs=1e-4)
    assert porosity(e) == pytest.approx(0.3524, abs=1e-4)
    assert degree_of_saturation(0.18, 2.70, e) == pytest.approx(0.893, abs=1e-3)


def test_zero_air_voids_check_value():
    # Check value (textbook: Das & Sobhan; Holtz & Kovacs; from memory): w = 20 %,
    # Gs = 2.70, S = 100 % -> rho_d = 1.753 Mg/m^3. A specimen at that state has S = 1 and
    # e = w*Gs = 0.54.
    rho_d = 2.70 * 1000.0 / (1 + 0.20 * 2.70)
    assert rho_d / 1000 == pytest.approx(1.753, abs=5e-4)
    assert degree_of_saturation(0.20, 2.70, void_ratio(rho_d, 2.70)) == pytest.approx(1.0)


@given(st.floats(0.5, 2.5), st.floats(0.03, 0.3), st.floats(0.03, 0.3), st.floats(2.5, 2.9))
def test_dry_density_scales_inversely_with_height(mass, diameter, height, gs):
    base = dry_density(mass, diameter, height)
    assert dry_density(mass, diameter, 2 * height) == pytest.approx(base / 2)
    e = void_ratio(base, gs)
    assert porosity(e) == pytest.approx(1 - base / (gs * 1000.0))


def test_circle_area():
    assert circle_area(0.1) == pytest.approx(math.pi * 0.0025)


def test_specimen_state_adds_columns_without_mutating():
    frame = pd.DataFrame(
        {
            "specimen": ["S1"],
            "diameter": [0.1016],
            "height": [0.1164],
            "dry_mass": [1.65],
            "specific_gravity": [2.70],
            "water_content": [0.18],
        }
    )
    before = frame.copy()
    state = specimen_state(frame)
    pd.testing.assert_frame_equal(frame, before)
    assert {"area", "volume", "dry_density", "void_ratio", "porosity", "saturation"} <= set(
        state.columns
    )
    assert state["saturation"].iloc[0] == pytest.approx(0.893, abs=1e-3)


def test_specimen_state_names_missing_columns():
    with pytest.raises(KeyError, match="dry_mass"):
        specimen_state(
            pd.DataFrame(
                {"specimen": ["S1"], "diameter": [0.1], "height": [0.1], "specific_gravity": [2.7]}
            )
        )
