"""Uncertainty of k: the conductivity model, from the fit and the instruments' resolutions."""

import math

import pytest
from scipy import stats

from kitchen.uncertainty import Resolutions, conductivity_interval, fit_quantity


def _falling_head_interval(method, resolutions=None):
    return conductivity_interval(
        2.0e-9,
        diameter=0.1016,
        flow_length=0.116,
        resolutions=resolutions or Resolutions(),
        fit=fit_quantity("slope of ln h on time", 0.004, 60),
        standpipe_areas=(math.pi * 0.005**2 / 4, math.nan),
        temperature=21.0,
        method=method,
        trials=400_000,
        seed=11,
    )


def test_k_interval_monte_carlo_matches_first_order():
    # The k model is a product of small relative perturbations: nearly linear, so the two
    # methods must agree (JCGM 101:2008 validates the GUM this way, from memory).
    first = _falling_head_interval("first_order")
    carlo = _falling_head_interval("monte_carlo")
    assert carlo.low == pytest.approx(first.low, rel=2e-4)
    assert carlo.high == pytest.approx(first.high, rel=2e-4)
    assert first.method == "first_order" and carlo.method == "monte_carlo"
    assert "JCGM 100:2008" in first.describe() and "JCGM 101:2008" in carlo.describe()


def test_k_interval_budget_by_hand():
    # Only the fit and the diameter: u(k)/k = sqrt(0.004^2 + (2 u_D / D)^2), u_D = 0.1 mm/sqrt(12).
    resolutions = Resolutions(caliper=0.0, thermometer=0.0)
    result = conductivity_interval(
        2.0e-9,
        diameter=0.1016,
        flow_length=0.116,
        resolutions=Resolutions(caliper=0.1e-3, thermometer=0.0),
        fit=fit_quantity("fit", 0.004, math.inf),
    )
    u_d = 0.1e-3 / math.sqrt(12)
    # the flow length is read on the same caliper: u_L/L = u_d/0.116
    expected = math.sqrt(0.004**2 + (2 * u_d / 0.1016) ** 2 + (u_d / 0.116) ** 2)
    assert result.relative_standard_uncertainty == pytest.approx(expected, rel=1e-6)
    bare = conductivity_interval(
        2.0e-9,
        diameter=0.1016,
        flow_length=0.116,
        resolutions=resolutions,
        fit=fit_quantity("fit", 0.004, 10),
    )
    assert bare.high == pytest.approx(2.0e-9 * (1 + stats.t.ppf(0.975, 10) * 0.004), rel=1e-9)


def test_rising_tailwater_bores_both_count():
    one = conductivity_interval(
        1e-9,
        diameter=0.1,
        flow_length=0.1,
        resolutions=Resolutions(thermometer=0.0),
        standpipe_areas=(math.pi * 0.0012**2 / 4, math.nan),
    )
    two = conductivity_interval(
        1e-9,
        diameter=0.1,
        flow_length=0.1,
        resolutions=Resolutions(thermometer=0.0),
        standpipe_areas=(math.pi * 0.0012**2 / 4, math.pi * 0.0015**2 / 4),
    )
    names = [c.name for c in two.contributions]
    assert "tailwater standpipe bore" in names and "tailwater standpipe bore" not in [
        c.name for c in one.contributions
    ]
    # a_in a_out/(a_in + a_out): each bore carries part of the sensitivity, so the total
    # is below the single-bore case's 2 u_d/d from the narrower bore alone
    assert two.standard_uncertainty < one.standard_uncertainty
