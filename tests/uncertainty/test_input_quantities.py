"""Input quantities: resolutions as rectangles, the temperature sensitivity, bad inputs named."""

import math

import pytest

from kitchen.uncertainty import (
    InputQuantity,
    Resolutions,
    rectangular_quantity,
    resolution_uncertainty,
    temperature_sensitivity,
)


def test_resolution_is_a_rectangle_of_half_width_half_the_step():
    # JCGM 100:2008 F.2.2.1 (from memory): a resolution dx gives u = dx/sqrt(12).
    assert resolution_uncertainty(1.0) == pytest.approx(0.288675, abs=1e-6)
    assert rectangular_quantity("h", 0.5, 1e-3).standard_uncertainty == pytest.approx(
        1e-3 / math.sqrt(12)
    )


def test_temperature_sensitivity_against_iapws():
    # d ln(mu)/dT at 20 degC from the iapws package (IAPWS 2008 viscosity), a reference
    # library: about -0.0245 per degC.
    from iapws._iapws import _Viscosity
    from iapws.iapws95 import IAPWS95

    def mu(t):
        state = IAPWS95(T=t + 273.15, P=0.101325)
        return _Viscosity(state.rho, t + 273.15)

    reference = (math.log(mu(20.05)) - math.log(mu(19.95))) / 0.1
    assert temperature_sensitivity(20.0, 20.0, "kestin") == pytest.approx(reference, rel=5e-3)


@pytest.mark.parametrize(
    ("make", "message"),
    [
        (lambda: InputQuantity("x", 1.0, 0.1, "triangle"), "unknown distribution 'triangle'"),
        (lambda: InputQuantity("x", 1.0, -0.1), "must be finite and not negative"),
        (lambda: InputQuantity("x", math.nan, 0.1), "value must be finite"),
        (lambda: InputQuantity("x", 1.0, 0.1, "t", 0), "degrees of freedom must be positive"),
        (lambda: Resolutions(caliper=-1e-5), "resolution caliper must be"),
    ],
)
def test_bad_inputs_are_named(make, message):
    with pytest.raises(ValueError, match=message):
        make()
