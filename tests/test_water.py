"""Water density, viscosity and the temperature ratio against outside references."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from iapws._iapws import _Viscosity
from iapws.iapws95 import IAPWS95

from kitchen.water import (
    D5084_AGREEMENT_RANGE,
    D5084_TOLERANCE,
    d5084_ratio,
    viscosity_range_caution,
    viscosity_ratio,
    water_density,
    water_viscosity,
)

TEMPERATURES = [1.0, 5.0, 10.0, 15.0, 20.0, 22.5, 25.0, 30.0, 35.0, 40.0]


def _iapws_state(temperature):
    """IAPWS-95 density and IAPWS 2008 viscosity at 0.101325 MPa, from the iapws package."""
    state = IAPWS95(T=temperature + 273.15, P=0.101325)
    return state.rho, _Viscosity(state.rho, temperature + 273.15)


@pytest.mark.parametrize("temperature", TEMPERATURES)
def test_viscosity_matches_iapws_2008(temperature):
    # Reference: IAPWS 2008 viscosity (Huber et al. 2009) through the `iapws` package.
    _, reference = _iapws_state(temperature)
    assert water_viscosity(temperature) == pytest.approx(reference, rel=1.0e-3)


@pytest.mark.parametrize("temperature", TEMPERATURES)
def test_density_matches_iapws_95(temperature):
    # Reference: IAPWS-95 density through the `iapws` package; Tanaka et al. (2001)
    # agree with it to about 1 ppm over 0-40 degC.
    reference, _ = _iapws_state(temperature)
    assert water_density(temperature) == pytest.approx(reference, abs=0.002)


@pytest.mark.parametrize(
    ("temperature", "viscosity_mpa_s"),
    # CRC Handbook of Chemistry and Physics, viscosity of liquid water (from memory).
    [(10.0, 1.3059), (20.0, 1.0016), (25.0, 0.8900), (30.0, 0.7972)],
)
def test_viscosity_matches_handbook_table(temperature, viscosity_mpa_s):
    assert water_viscosity(temperature) * 1e3 == pytest.approx(viscosity_mpa_s, abs=0.0015)


def test_iapws_method_is_the_reference_library():
    _, reference = _iapws_state(12.5)
    assert water_viscosity(12.5, method="iapws") == pytest.approx(reference, rel=1e-12)


@pytest.mark.parametrize("temperature", [15.0, 20.0, 25.0, 30.0])
def test_d5084_equation_close_to_viscosity_ratio_in_its_range(temperature):
    # ASTM D5084 R_T equation (from memory): within about 0.15 % of IAPWS over 15-30 degC.
    _, at_t = _iapws_state(temperature)
    _, at_20 = _iapws_state(20.0)
    assert viscosity_ratio(temperature, method="d5084") == pytest.approx(at_t / at_20, rel=2e-3)


def test_d5084_equation_departs_at_low_temperature():
    # The D5084 fit is about 1 % high at 10 degC and 6 % at 5 degC (measured against IAPWS).
    _, at_5 = _iapws_state(5.0)
    _, at_20 = _iapws_state(20.0)
    assert d5084_ratio(5.0) / (at_5 / at_20) == pytest.approx(1.06, abs=0.01)


@given(st.floats(min_value=1.0, max_value=60.0), st.sampled_from(["kestin", "d5084"]))
def test_ratio_is_one_at_reference_temperature(reference, method):
    assert viscosity_ratio(reference, reference, method) == 1.0


@given(st.floats(min_value=2.0, max_value=45.0))
def test_ratio_chains_through_any_reference(temperature):
    direct = viscosity_ratio(temperature, 10.0)
    chained = viscosity_ratio(temperature, 20.0) * viscosity_ratio(20.0, 10.0)
    assert direct == pytest.approx(chained, rel=1e-12)


def test_array_in_array_out():
    values = viscosity_ratio(np.array([15.0, 20.0, 25.0]))
    assert isinstance(values, np.ndarray)
    assert values[1] == 1.0
    assert values[0] > 1.0 > values[2]


@pytest.mark.parametrize("bad", [np.nan, -5.0, 0.0, 120.0, 293.15])
def test_temperature_outside_liquid_water_is_refused(bad):
    with pytest.raises(ValueError, match="degC"):
        water_viscosity(bad)


def test_unknown_method_is_named():
    with pytest.raises(ValueError, match="unknown viscosity method 'vogel'"):
        viscosity_ratio(20.0, method="vogel")


def _d5084_departures(low, high, step=0.5):
    """Departure of the D5084 ratio from IAPWS 2008 (the `iapws` package) for every test and
    reference temperature on a grid over [low, high]."""
    grid = np.arange(low, high + step / 2, step)
    reference = np.array([_iapws_state(t)[1] for t in grid])
    ratio = d5084_ratio(grid)
    # (R_d5084(T)/R_d5084(Tref)) / (mu(T)/mu(Tref)) - 1 over every pair (T, Tref)
    own = ratio / reference
    return own[:, None] / own[None, :] - 1.0


def test_d5084_agrees_with_iapws_within_its_tolerance_over_its_range_and_no_wider():
    # Reference: IAPWS 2008 viscosity through the `iapws` package. Inside the range every
    # pair of test and reference temperatures agrees within the tolerance; a degree wider at
    # either end, some pair does not.
    low, high = D5084_AGREEMENT_RANGE
    assert np.abs(_d5084_departures(low, high)).max() <= D5084_TOLERANCE
    assert np.abs(_d5084_departures(low - 1, high)).max() > D5084_TOLERANCE
    assert np.abs(_d5084_departures(low, high + 1)).max() > D5084_TOLERANCE


@pytest.mark.parametrize(("temperature", "percent"), [(10.0, 1.2), (5.0, 6.1), (1.0, 30.4)])
def test_outside_its_range_the_d5084_option_says_so_with_its_departure(temperature, percent):
    # Departures against IAPWS 2008 through the `iapws` package (measured: +1.2 % at 10 degC,
    # +6 % at 5 degC, +30 % at 1 degC); the caution quotes them to 0.1 percentage point.
    _, at_t = _iapws_state(temperature)
    _, at_20 = _iapws_state(20.0)
    measured = 100 * (viscosity_ratio(temperature, method="d5084") / (at_t / at_20) - 1)
    assert measured == pytest.approx(percent, abs=0.15)
    caution = viscosity_range_caution(temperature, 20.0, "d5084")
    assert f"is used at {temperature:.1f} °C (the test temperature), outside 14–34 °C" in caution
    quoted = float(caution.split("departs from IAPWS 2008 by ")[1].split(" %")[0])
    assert quoted == pytest.approx(measured, abs=0.051)


def test_the_range_caution_is_silent_where_the_formula_holds():
    assert viscosity_range_caution(np.array([17.2, 23.9]), 20.0, "d5084") == ""
    assert viscosity_range_caution(np.nan, 20.0, "d5084") == ""  # no temperature: no R_T
    for method in ("kestin", "iapws"):  # within 0.1 % of IAPWS over 1-40 degC (above)
        assert viscosity_range_caution(1.0, 20.0, method) == ""
    at_reference = viscosity_range_caution(20.0, 10.0, "d5084")
    assert "at 10.0 °C (the reference temperature)" in at_reference
    with pytest.raises(ValueError, match="unknown viscosity method 'andrade'"):
        viscosity_range_caution(20.0, 20.0, "andrade")
