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
    final_state,
    pore_volume,
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


def test_pore_volume_from_phase_relations():
    # Das & Sobhan, weight-volume relationships: Vs = Ms/(Gs·ρw), Vv = V − Vs. Hand numbers:
    # Ms = 1.35 kg, Gs = 2.70 → Vs = 0.5 L; V = 1 L → Vv = 0.5 L, so e = 1 and n = 0.5.
    assert pore_volume(1.35, 2.70, 1.0e-3) == pytest.approx(0.5e-3)
    state = specimen_state(
        pd.DataFrame({"specimen": ["S"], "diameter": [0.1], "height": [0.1],
                      "dry_mass": [1.5], "specific_gravity": [2.65]})
    )  # fmt: skip
    row = state.iloc[0]
    assert pore_volume(row["dry_mass"], 2.65, row["volume"]) == pytest.approx(
        row["porosity"] * row["volume"]
    )


def _with_final(**final):
    base = {"specimen": ["S"], "diameter": [0.1], "height": [0.1], "dry_mass": [1.4],
            "specific_gravity": [2.7], "water_content": [0.2]}  # fmt: skip
    return pd.DataFrame(base | {name: [value] for name, value in final.items()})


def test_final_state_beside_the_initial_one():
    # final volume π·0.1²/4·0.102 = 8.0111e-4 m³; ρd = 1.4/8.0111e-4 = 1747.6 kg/m³;
    # e = 2.7·1000/1747.6 − 1 = 0.54500; w = (1.75 − 1.4)/1.4 = 0.25; S = 0.25·2.7/0.545 = 1.2385
    # (Das & Sobhan: ρd = Ms/V, e = Gs·ρw/ρd − 1, S·e = w·Gs); hand arithmetic
    row = final_state(_with_final(final_height=0.102, final_mass=1.75)).iloc[0]
    assert row["final_volume"] == pytest.approx(8.0111e-4, rel=1e-4)
    assert row["final_dry_density"] == pytest.approx(1747.6, rel=1e-4)
    assert row["final_void_ratio"] == pytest.approx(0.54500, rel=1e-4)
    assert row["final_water_content"] == pytest.approx(0.25)
    assert row["final_saturation"] == pytest.approx(1.2385, rel=1e-3)
    assert row["volume_change"] == pytest.approx(0.02)
    assert row["change"] == "swelled 2 %"


def test_final_state_flags_consolidation_and_says_what_was_not_recorded():
    shrunk = final_state(_with_final(final_height=0.097, final_water_content=0.19)).iloc[0]
    assert shrunk["change"] == "consolidated 3 %"
    assert shrunk["final_water_content"] == 0.19  # recorded wins over the final mass
    steady = final_state(_with_final(final_diameter=0.1003)).iloc[0]
    assert steady["change"] == "unchanged (within 1 %)"
    assert math.isnan(steady["final_water_content"])
    nothing = final_state(_with_final()).iloc[0]
    assert nothing["change"] == "not recorded" and math.isnan(nothing["final_dry_density"])
