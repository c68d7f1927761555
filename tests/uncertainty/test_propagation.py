"""Uncertainty propagation: the GUM's first-order law and Monte Carlo, against each other."""

import math

import numpy as np
import pytest
from scipy import stats

from kitchen.uncertainty import (
    InputQuantity,
    propagate,
    propagate_first_order,
    propagate_monte_carlo,
    rectangular_quantity,
)


def linear(values):
    return 2.0 * values["a"] - 3.0 * values["b"] + 0.5 * values["c"]


LINEAR_INPUTS = (
    InputQuantity("a", 1.0, 0.010),
    InputQuantity("b", 2.0, 0.004),
    InputQuantity("c", -1.0, 0.030),
)


def test_first_order_on_a_linear_model_is_exact():
    # Law of propagation, JCGM 100:2008 eq. (10): u^2 = sum (c_i u_i)^2, hand-computed.
    result = propagate_first_order(linear, LINEAR_INPUTS)
    expected = math.sqrt((2 * 0.010) ** 2 + (3 * 0.004) ** 2 + (0.5 * 0.030) ** 2)
    assert result.value == pytest.approx(2.0 - 6.0 - 0.5)
    assert result.standard_uncertainty == pytest.approx(expected, rel=1e-9)
    sensitivities = [c.sensitivity for c in result.contributions]
    assert sensitivities == pytest.approx([2.0, -3.0, 0.5], rel=1e-9)
    assert result.coverage_factor == pytest.approx(stats.norm.ppf(0.975))  # infinite dof
    assert result.low == pytest.approx(result.value - 1.959964 * expected, rel=1e-6)


def test_welch_satterthwaite_effective_degrees_of_freedom():
    # JCGM 100:2008 G.4.1 eq. (G.2b): equal contributions, one with 4 dof and one Type B
    # (infinite dof): nu_eff = (1 + 1)^2 / (1/4) = 16; k = t(0.975, 16) = 2.120 (scipy.stats).
    quantities = (InputQuantity("x", 0.0, 1.0, "t", 4), InputQuantity("y", 0.0, 1.0))
    result = propagate_first_order(lambda v: v["x"] + v["y"], quantities)
    assert result.effective_degrees_of_freedom == pytest.approx(16.0)
    assert result.coverage_factor == pytest.approx(stats.t.ppf(0.975, 16))
    assert result.coverage_factor == pytest.approx(2.120, abs=5e-4)


def test_monte_carlo_agrees_with_first_order_on_a_linear_model():
    # For a linear model with normal inputs the output is normal and both methods give the
    # same 95 % interval (JCGM 101:2008, 5.11 and the GUM's own case, from memory).
    first = propagate_first_order(linear, LINEAR_INPUTS)
    carlo = propagate_monte_carlo(linear, LINEAR_INPUTS, trials=400_000, seed=3)
    half_first = 0.5 * (first.high - first.low)
    half_carlo = 0.5 * (carlo.high - carlo.low)
    assert half_carlo == pytest.approx(half_first, rel=0.01)
    assert carlo.standard_uncertainty == pytest.approx(first.standard_uncertainty, rel=0.01)
    assert 0.5 * (carlo.low + carlo.high) == pytest.approx(first.value, abs=0.02 * half_first)


def test_monte_carlo_of_one_t_input_reproduces_the_gum_t_interval():
    # A Type A input as a scaled and shifted t (JCGM 101:2008, 6.4.9): the 95 % interval is
    # +-t(0.975, nu)*u, exactly the GUM's first-order interval with nu dof (t = 2.571, nu = 5).
    quantity = (InputQuantity("slope", 10.0, 0.2, "t", 5),)
    first = propagate_first_order(lambda v: v["slope"], quantity)
    carlo = propagate_monte_carlo(lambda v: v["slope"], quantity, trials=400_000, seed=5)
    assert first.high - first.value == pytest.approx(2.5706 * 0.2, rel=1e-4)
    assert carlo.high - carlo.value == pytest.approx(first.high - first.value, rel=0.015)


def test_monte_carlo_of_a_rectangle_is_narrower_than_first_order():
    # Rectangular input of half-width a: the 95 % probabilistically symmetric interval is
    # +-0.95 a (JCGM 101:2008, rectangular case, from memory); the first-order law with a
    # normal coverage factor gives +-1.96 a/sqrt(3) = +-1.13 a. Both checked.
    quantity = (rectangular_quantity("x", 0.0, 2.0),)  # half-width a = 1
    carlo = propagate_monte_carlo(lambda v: v["x"], quantity, trials=400_000, seed=7)
    first = propagate_first_order(lambda v: v["x"], quantity)
    assert carlo.high == pytest.approx(0.95, abs=0.005)
    assert first.high == pytest.approx(1.96 / math.sqrt(3), abs=0.002)


@pytest.mark.parametrize(
    ("make", "message"),
    [
        (
            lambda: propagate(linear, LINEAR_INPUTS, method="guess"),
            "unknown uncertainty method 'guess'",
        ),
        (lambda: propagate_first_order(linear, ()), "at least one input quantity"),
        (lambda: propagate_first_order(linear, LINEAR_INPUTS * 2), "given twice: a, b, c"),
        (lambda: propagate_first_order(linear, LINEAR_INPUTS, 1.5), "confidence must be"),
        (lambda: propagate_monte_carlo(linear, LINEAR_INPUTS, trials=10), "at least 1000"),
        (
            lambda: propagate_first_order(
                lambda v: np.full_like(v["a"], np.nan), LINEAR_INPUTS[:1]
            ),
            "non-finite value",
        ),
    ],
)
def test_bad_inputs_are_named(make, message):
    with pytest.raises(ValueError, match=message):
        make()
