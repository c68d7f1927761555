"""Constant-head collections against textbook worked examples and invariants."""

import numpy as np
import pytest
from constant_head_rows import collections_from_k20
from hypothesis import given
from hypothesis import strategies as st

from kitchen.reduction import (
    collection_table,
    constant_head_conductivity,
    darcy_velocity,
    hydraulic_gradient,
)
from kitchen.water import water_density


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


def test_mass_uses_water_density_not_one_gram_per_millilitre():
    collections, state = collections_from_k20(temperatures=(30.0, 30.0, 30.0), weighed=True)
    table = collection_table(collections, state)
    expected = collections["outflow_mass"] / water_density(30.0)
    np.testing.assert_allclose(table["flow_volume"], expected)
    assert not np.allclose(table["flow_volume"], collections["outflow_mass"] / 1000.0, rtol=1e-3)
