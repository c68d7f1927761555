"""Constant-head reduction against textbook worked examples and invariants."""

import numpy as np
import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st

from kitchen.constant_head import (
    collection_table,
    constant_head_conductivity,
    darcy_velocity,
    hydraulic_gradient,
    reduce_constant_head,
)
from kitchen.water import viscosity_ratio, water_density


def test_das_constant_head_example():
    # Das, Principles of Geotechnical Engineering, constant-head example (inputs and
    # answer from memory): L = 30 cm, A = 177 cm^2, h = 50 cm, Q = 350 cm^3 in 5 min
    # -> k = 3.95e-3 cm/s (printed to three figures).
    k = constant_head_conductivity(350e-6, 0.30, 177e-4, 0.50, 5 * 60.0)
    assert k * 100 == pytest.approx(3.95e-3, abs=0.005e-3)


def test_das_sobhan_problem_inputs():
    # Das & Sobhan, Principles of Geotechnical Engineering 9th ed., Problem 7.6 inputs
    # (answer computed by hand, not published): D = 70 mm, L = 140 mm, h = 550 mm,
    # Q = 450 cm^3 in 7 min -> k = 7.087e-3 cm/s.
    area = np.pi * 0.070**2 / 4
    k = constant_head_conductivity(450e-6, 0.140, area, 0.550, 7 * 60.0)
    assert k * 100 == pytest.approx(7.087e-3, rel=5e-4)


def test_darcy_velocity_equals_k_times_gradient():
    v = darcy_velocity(350e-6, 177e-4, 300.0)
    i = hydraulic_gradient(0.50, 0.30)
    assert v == pytest.approx(constant_head_conductivity(350e-6, 0.30, 177e-4, 0.50, 300.0) * i)


@given(st.floats(0.01, 10.0))
def test_k_scales_with_flow_length(factor):
    base = constant_head_conductivity(350e-6, 0.30, 177e-4, 0.50, 300.0)
    assert constant_head_conductivity(350e-6, 0.30 * factor, 177e-4, 0.50, 300.0) == (
        pytest.approx(base * factor)
    )


def _collections(k20=4.0e-4, temperatures=(18.0, 20.0, 24.0), weighed=False):
    area, length = 0.0081, 0.15
    rows = []
    for index, (head, temperature) in enumerate(zip((0.05, 0.10, 0.15), temperatures, strict=True)):
        k_t = k20 / viscosity_ratio(temperature)
        volume = k_t * head / length * area * 120.0
        rows.append(
            {
                "specimen": "S",
                "head_difference": head,
                "duration": 120.0,
                "volume": np.nan if weighed else volume,
                "outflow_mass": volume * water_density(temperature) if weighed else np.nan,
                "temperature": temperature,
                "flow_length": np.nan,
                "source_row": index + 2,
            }
        )
    state = pd.DataFrame({"specimen": ["S"], "area": [area], "height": [length]})
    return pd.DataFrame(rows), state


@pytest.mark.parametrize("weighed", [False, True])
def test_round_trip_recovers_k20(weighed):
    # Collections made from a known k20 with the viscosity ratio, at three gradients.
    collections, state = _collections(weighed=weighed)
    table = collection_table(collections, state)
    result = reduce_constant_head(table, "S")
    assert result.k_reference == pytest.approx(4.0e-4, rel=1e-9)
    assert result.spread == pytest.approx(0.0, abs=1e-9)
    assert result.k_reference_low <= result.k_reference <= result.k_reference_high
    assert result.gradient_max == pytest.approx(1.0)


def test_mass_uses_water_density_not_one_gram_per_millilitre():
    collections, state = _collections(temperatures=(30.0, 30.0, 30.0), weighed=True)
    table = collection_table(collections, state)
    expected = collections["outflow_mass"] / water_density(30.0)
    np.testing.assert_allclose(table["flow_volume"], expected)
    assert not np.allclose(table["flow_volume"], collections["outflow_mass"] / 1000.0, rtol=1e-3)


def test_missing_temperature_is_stated():
    collections, state = _collections()
    collections["temperature"] = np.nan
    result = reduce_constant_head(collection_table(collections, state), "S")
    assert any("temperature not recorded" in note for note in result.notes)
    assert np.isnan(result.temperature)


def test_one_collection_says_no_interval():
    collections, state = _collections()
    result = reduce_constant_head(collection_table(collections.iloc[:1], state), "S")
    assert result.k_reference_low == result.k_reference == result.k_reference_high
    assert any("one collection" in note for note in result.notes)


def test_unknown_specimen_is_named():
    collections, state = _collections()
    with pytest.raises(ValueError, match="specimen Z has no constant-head collections"):
        reduce_constant_head(collection_table(collections, state), "Z")
