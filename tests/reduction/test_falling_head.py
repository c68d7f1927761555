"""Falling-head reduction in one call: round trips and invariants."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from synthetic_records import known_k_record

from kitchen.reduction import FallingHeadRecord, falling_head_analysis
from kitchen.water import viscosity_ratio, water_surface_tension


def _log_linear(readings, specimen, window=None):
    """The log-linear fit over `window`, every reading by default (no window proposed)."""
    return falling_head_analysis(
        readings, specimen, window=window or (0, len(readings)), fit="log_linear"
    )


@pytest.mark.parametrize("tailwater_area", [np.nan, 3.0e-6])
def test_round_trip_exact(tailwater_area):
    readings, specimen = known_k_record(tailwater_area=tailwater_area)
    result = _log_linear(readings, specimen)
    assert result.k_reference == pytest.approx(2.0e-9, rel=1e-9)
    assert result.k == pytest.approx(2.0e-9, rel=1e-9)


def test_round_trip_with_drifting_temperature():
    # A known k20 with temperature drifting 17 -> 24 degC: the fit on the
    # reference-equivalent time recovers k20; k at test temperature is higher.
    temperature = np.linspace(17.0, 24.0, 40)
    readings, specimen = known_k_record(temperature=temperature)
    result = _log_linear(readings, specimen)
    assert result.k_reference == pytest.approx(2.0e-9, rel=1e-9)
    assert result.temperature == pytest.approx(20.5, abs=0.01)
    assert result.k == pytest.approx(2.0e-9 / viscosity_ratio(20.5), rel=5e-3)


def test_noisy_round_trip_interval_covers_truth():
    # the 95 % interval of the fitted slope alone, as k: -slope * a·L/A
    covered = 0
    for seed in range(40):
        readings, specimen = known_k_record(noise=0.5e-3, seed=seed)
        record = FallingHeadRecord(readings, specimen)
        line = record.analyse((0, record.n), "log_linear").line
        covered += -line.slope_high * record.scale <= 2.0e-9 <= -line.slope_low * record.scale
    assert covered >= 34  # a 95 % interval: expect about 38 of 40


@settings(max_examples=25, deadline=None)
@given(st.floats(0.2, 5.0))
def test_k_scales_with_height(factor):
    readings, specimen = known_k_record(noise=0.3e-3)
    base = _log_linear(readings, specimen).k_reference
    specimen = specimen.copy()
    specimen["height"] *= factor
    assert _log_linear(readings, specimen).k_reference == pytest.approx(base * factor)


def test_window_selects_readings():
    readings, specimen = known_k_record()
    result = _log_linear(readings, specimen, window=(10, 30))
    assert (result.n, result.start, result.stop) == (20, 10, 30)
    assert result.window_time[0] == readings["time"].iloc[10]


def test_two_readings_use_the_closed_form():
    readings, specimen = known_k_record()
    result = _log_linear(readings, specimen, window=(0, 2))
    assert result.line is None
    assert result.k_reference == pytest.approx(2.0e-9, rel=1e-9)
    assert any("two readings" in note for note in result.notes)


@pytest.mark.parametrize("window", [(5, 6), (30, 20), (0, 99)])
def test_bad_window_is_named(window):
    readings, specimen = known_k_record()
    with pytest.raises(ValueError, match="specimen C1: reading window"):
        _log_linear(readings, specimen, window=window)


# --------------------------------------------------------------------------- capillary rise
def test_surface_tension_against_the_iapws_table():
    # IAPWS R1-76(2014) table (from memory): 74.23 mN/m at 10 degC, 72.74 at 20, 71.97 at 25,
    # 71.20 at 30 degC.
    for temperature, sigma in [(10.0, 74.23), (20.0, 72.74), (25.0, 71.97), (30.0, 71.20)]:
        assert water_surface_tension(temperature) * 1e3 == pytest.approx(sigma, abs=0.02)
