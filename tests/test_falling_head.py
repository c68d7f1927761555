"""Falling-head reduction against a textbook worked example, round trips and invariants."""

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from kitchen.falling_head import (
    effective_standpipe_area,
    falling_head_conductivity,
    reduce_falling_head,
    reference_elapsed_time,
    rising_tailwater_conductivity,
)
from kitchen.water import viscosity_ratio


def test_das_falling_head_example():
    # Das, Principles of Geotechnical Engineering, falling-head example (inputs confirmed,
    # answer from memory): L = 200 mm, A = 1000 mm^2, a = 40 mm^2, h 500 -> 300 mm in
    # 180 s -> k = 2.27e-3 cm/s.
    k = falling_head_conductivity(40e-6, 0.200, 1000e-6, 0.500, 0.300, 180.0)
    assert k * 100 == pytest.approx(2.27e-3, abs=0.005e-3)
    # The head at 100 s follows from the same k (computed): 376.5 mm.
    rate = k * 1000e-6 / (40e-6 * 0.200)
    assert 0.500 * np.exp(-rate * 100.0) == pytest.approx(0.3765, abs=5e-5)


def test_rising_tailwater_equal_burettes_halve_the_area():
    # ASTM D5084 Method C (from memory): with a_in = a_out the effective area is a/2.
    assert effective_standpipe_area(40e-6, 40e-6) == pytest.approx(20e-6)
    assert effective_standpipe_area(40e-6) == pytest.approx(40e-6)
    single = falling_head_conductivity(20e-6, 0.2, 1e-3, 0.5, 0.3, 180.0)
    assert rising_tailwater_conductivity(40e-6, 40e-6, 0.2, 1e-3, 0.5, 0.3, 180.0) == (
        pytest.approx(single)
    )


def _record(k20=2.0e-9, n=40, temperature=None, noise=0.0, seed=1, tailwater_area=np.nan):
    area, length, standpipe = 0.0081, 0.116, 2.0e-6
    a = effective_standpipe_area(standpipe, tailwater_area)
    time = np.linspace(0.0, 8 * 3600.0, n)
    temps = np.full(n, 20.0) if temperature is None else np.asarray(temperature, dtype=float)
    tau = reference_elapsed_time(time, temps)
    head = 1.2 * np.exp(-k20 * area / (a * length) * tau)
    head = head + np.random.default_rng(seed).normal(0.0, noise, n)
    readings = pd.DataFrame({"time": time, "head": head, "temperature": temps})
    specimen = pd.Series(
        {
            "specimen": "C1",
            "area": area,
            "height": length,
            "standpipe_area": standpipe,
            "tailwater_standpipe_area": tailwater_area,
        }
    )
    return readings, specimen


@pytest.mark.parametrize("tailwater_area", [np.nan, 3.0e-6])
def test_round_trip_exact(tailwater_area):
    readings, specimen = _record(tailwater_area=tailwater_area)
    result = reduce_falling_head(readings, specimen)
    assert result.k_reference == pytest.approx(2.0e-9, rel=1e-9)
    assert result.k == pytest.approx(2.0e-9, rel=1e-9)


def test_round_trip_with_drifting_temperature():
    # A known k20 with temperature drifting 17 -> 24 degC: the fit on the
    # reference-equivalent time recovers k20; k at test temperature is higher.
    temperature = np.linspace(17.0, 24.0, 40)
    readings, specimen = _record(temperature=temperature)
    result = reduce_falling_head(readings, specimen)
    assert result.k_reference == pytest.approx(2.0e-9, rel=1e-9)
    assert result.temperature == pytest.approx(20.5, abs=0.01)
    assert result.k == pytest.approx(2.0e-9 / viscosity_ratio(20.5), rel=5e-3)


def test_noisy_round_trip_interval_covers_truth():
    covered = 0
    for seed in range(40):
        readings, specimen = _record(noise=0.5e-3, seed=seed)
        result = reduce_falling_head(readings, specimen)
        covered += result.k_reference_low <= 2.0e-9 <= result.k_reference_high
    assert covered >= 34  # a 95 % interval: expect about 38 of 40


@settings(max_examples=25, deadline=None)
@given(st.floats(0.2, 5.0))
def test_k_scales_with_height(factor):
    readings, specimen = _record(noise=0.3e-3)
    base = reduce_falling_head(readings, specimen).k_reference
    specimen = specimen.copy()
    specimen["height"] *= factor
    assert reduce_falling_head(readings, specimen).k_reference == pytest.approx(base * factor)


def test_window_selects_readings():
    readings, specimen = _record()
    result = reduce_falling_head(readings, specimen, window=(10, 30))
    assert (result.n, result.start, result.stop) == (20, 10, 30)
    assert result.time[0] == readings["time"].iloc[10]


def test_two_readings_use_the_closed_form():
    readings, specimen = _record()
    result = reduce_falling_head(readings, specimen, window=(0, 2))
    assert result.fit is None
    assert result.k_reference == pytest.approx(2.0e-9, rel=1e-9)
    assert any("two readings" in note for note in result.notes)


def test_missing_temperatures():
    temps = np.full(40, 22.0)
    temps[5:9] = np.nan
    readings, specimen = _record(temperature=np.full(40, 22.0))
    readings["temperature"] = temps
    result = reduce_falling_head(readings, specimen)
    assert any("interpolated" in note for note in result.notes)
    readings["temperature"] = np.nan
    result = reduce_falling_head(readings, specimen)
    assert any("temperature not recorded" in note for note in result.notes)
    assert np.isnan(result.temperature)


@pytest.mark.parametrize("window", [(5, 6), (30, 20), (0, 99)])
def test_bad_window_is_named(window):
    readings, specimen = _record()
    with pytest.raises(ValueError, match="specimen C1: reading window"):
        reduce_falling_head(readings, specimen, window=window)
