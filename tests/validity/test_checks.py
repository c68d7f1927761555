"""Validity criteria against hand-computed sets, the D5084 gradient table, and the tests."""

import math

import numpy as np
import pytest
from synthetic_records import drifting_log_head

from kitchen.fits import curvature_test
from kitchen.validity import (
    Criteria,
    Verdict,
    datum_check,
    flow_ratio_check,
    gradient_check,
    gradient_independence_check,
    is_valid,
    reynolds_check,
    reynolds_number,
    steady_values_check,
    trend_check,
)

D5084 = Criteria()


def test_gradient_check_words():
    ok = gradient_check(18.0, 5e-9, D5084)
    assert ok.passed and "recommended 20 for k = 5e-09 m/s: yes" in ok.sentence
    high = gradient_check(25.0, 5e-9, D5084)
    assert high.passed is False and "largest gradient 25" in high.sentence
    sand = gradient_check(0.9, 3e-4, D5084)
    assert sand.passed is None and "outside the table" in sand.sentence


def test_a_project_table_replaces_the_standard_one():
    project = Criteria(gradient_table=((0.0, 1e-8, 15.0),))
    assert gradient_check(18.0, 5e-9, project).passed is False


# ----------------------------------------------------------------- steady values
def test_steady_values_pass():
    # Hand-computed: mean 1.0125e-9; deviations 1.2 %, 8.6 %, 11.1 %, 3.7 % -> within 25 %.
    verdict = steady_values_check(np.array([1.00, 1.10, 0.90, 1.05]) * 1e-9, D5084)
    assert verdict.passed
    assert verdict.sentence.startswith("4 of the last 4 k values within ±25 % of their mean")
    assert "largest deviation 11 %" in verdict.sentence


def test_steady_values_fail_on_spread():
    # Hand-computed: mean 1.025e-9; deviations 2.4 %, 36.6 %, 31.7 %, 2.4 % -> 2 of 4 inside.
    verdict = steady_values_check(np.array([1.0, 1.4, 0.7, 1.0]) * 1e-9, D5084)
    assert verdict.passed is False
    assert (
        "2 of the last 4 k values within ±25 % of their mean (1.03e-09 m/s): no" in verdict.sentence
    )
    assert "largest deviation 37 %" in verdict.sentence


def test_steady_values_wider_band_below_1e_10():
    # The same spread below 1e-10 m/s meets the +-50 % band of D5084 (from memory).
    verdict = steady_values_check(np.array([1.0, 1.4, 0.7, 1.0]) * 1e-11, D5084)
    assert verdict.passed
    assert "within ±50 %" in verdict.sentence and "below 1e-10 m/s" in verdict.sentence


def test_only_the_last_values_are_judged():
    values = np.array([5.0, 0.1, 1.0, 1.1, 0.9, 1.05]) * 1e-9
    assert steady_values_check(values, D5084).passed
    assert steady_values_check(values, Criteria(steady_count=5)).passed is False


def test_too_few_values():
    verdict = steady_values_check([1e-9, 1e-9, 1e-9], D5084)
    assert verdict.passed is False and "only 3 k value(s)" in verdict.sentence


def test_trend_fails_when_k_drifts():
    t, y = drifting_log_head(-0.30, 3e-4)
    verdict = trend_check(curvature_test(t, y), D5084)
    assert verdict.passed is False
    assert "no significant trend in k over the readings used: no — k falls 30 %" in verdict.sentence
    assert "the tool's own test" in verdict.sentence


def test_trend_passes_when_k_is_steady():
    t, y = drifting_log_head(0.0, 3e-4)
    verdict = trend_check(curvature_test(t, y), D5084)
    assert verdict.passed and "the tool's own test" in verdict.sentence
    assert "k changes" in verdict.sentence


def test_trend_minimum_change_is_a_setting():
    t, y = drifting_log_head(-0.03, 1e-5)  # a 3 % drift, measured very precisely
    curvature = curvature_test(t, y)
    assert curvature.significant
    assert trend_check(curvature, D5084).passed is False
    relaxed = trend_check(curvature, Criteria(trend_minimum_change=0.05))
    assert relaxed.passed and "a change of at least 5 %" in relaxed.sentence


# ----------------------------------------------------------------- flow, Reynolds, gradient
def test_flow_ratio():
    assert flow_ratio_check(100e-6, 93e-6, D5084).passed
    low = flow_ratio_check(100e-6, 70e-6, D5084)
    assert low.passed is False and "0.70" in low.sentence and "0.75–1.25" in low.sentence
    assert flow_ratio_check(math.nan, 70e-6, D5084).passed is None
    assert flow_ratio_check(0.0, 1e-6, D5084).passed is False


def test_reynolds_number_by_hand():
    # rho v d10 / mu = 998.2 * 1e-3 * 0.3e-3 / 1.0016e-3 = 0.2990 (hand-computed).
    re = reynolds_number(1e-3, 0.3e-3, 998.2, 1.0016e-3)
    assert re == pytest.approx(0.2990, abs=1e-4)
    assert reynolds_check(re, D5084).passed
    assert reynolds_check(2.0, D5084).passed is False
    assert reynolds_check(math.nan, D5084).passed is None


def test_gradient_independence():
    gradient = np.repeat([0.35, 0.60, 0.90], 3)
    heads = gradient * 0.15
    rng = np.random.default_rng(1)
    darcy = 3e-4 * gradient * (1 + rng.normal(0, 0.005, gradient.size))
    verdict, fit = gradient_independence_check(gradient, darcy, D5084, heads)
    assert verdict.passed and "includes zero" in verdict.sentence and fit.n == 3
    # Forchheimer-like loss: k falls 30 % from the lowest to the highest gradient.
    many = np.linspace(0.2, 1.0, 8)
    bent = 3e-4 * many * (1 - 0.375 * (many - 0.2))
    verdict, _ = gradient_independence_check(many, bent, D5084)
    assert verdict.passed is False and "excludes zero" in verdict.sentence
    one_head, _ = gradient_independence_check([0.5, 0.5, 0.5], [1e-4] * 3, D5084)
    assert one_head.passed is None


def test_is_valid():
    passed, failed, skipped = (
        Verdict("a", True, ""),
        Verdict("b", False, ""),
        Verdict("c", None, ""),
    )
    assert is_valid([passed, skipped])
    assert not is_valid([passed, failed, skipped])
    assert not is_valid([skipped])


# ----------------------------------------------------------------- the datum


@pytest.mark.parametrize(
    ("asymptote", "low", "high", "passed"),
    [
        (0.004, -0.01, 0.018, True),  # the datum read is right: h∞ about zero
        (0.066, 0.040, 0.092, True),  # the interval reaches within 50 mm
        (0.222, 0.168, 0.274, False),  # an early transient absorbed as a datum offset
        (-0.120, -0.150, -0.090, False),
    ],
)
def test_datum_check_against_the_tolerance(asymptote, low, high, passed):
    # the tool's own rule (Criteria.datum_tolerance, 50 mm by default)
    verdict = datum_check(asymptote, low, high, Criteria())
    assert verdict.criterion == "datum" and verdict.passed is passed
    assert f"h∞ = {asymptote * 1e3:.0f} mm" in verdict.sentence
    assert datum_check(0.222, 0.168, 0.274, Criteria(datum_tolerance=0.3)).passed
    with pytest.raises(ValueError, match="datum_tolerance must be a positive length"):
        Criteria(datum_tolerance=0.0)
