"""Validity criteria against hand-computed sets, the D5084 gradient table, and the tests."""

import math

import numpy as np
import pytest
from scipy import stats

from kitchen.validity import (
    GRADIENT_TABLE,
    Criteria,
    Verdict,
    curvature_test,
    flow_ratio_check,
    gradient_check,
    gradient_independence_check,
    is_valid,
    propose_window,
    recommended_maximum_gradient,
    reynolds_check,
    reynolds_number,
    runs_test,
    steady_values_check,
    trend_check,
)

D5084 = Criteria()


# ----------------------------------------------------------------- gradient table
@pytest.mark.parametrize(
    ("k", "gradient"),
    [
        # ASTM D5084 recommended maximum gradients [std, from memory], DOMAIN.md section 5:
        # 1e-5 to 1e-6 m/s -> 2; 1e-6 to 1e-7 -> 5; 1e-7 to 1e-8 -> 10; 1e-8 to 1e-9 -> 20;
        # below 1e-9 -> 30. A k on a boundary takes the row it starts.
        (5e-6, 2.0),
        (1e-6, 2.0),
        (5e-7, 5.0),
        (1e-7, 5.0),
        (5e-8, 10.0),
        (5e-9, 20.0),
        (1e-9, 20.0),
        (5e-10, 30.0),
        (1e-12, 30.0),
    ],
)
def test_gradient_table_lookup(k, gradient):
    assert recommended_maximum_gradient(k) == gradient


def test_gradient_table_outside_and_arrays():
    assert math.isnan(recommended_maximum_gradient(2e-5))
    np.testing.assert_array_equal(recommended_maximum_gradient([5e-9, 5e-10]), [20.0, 30.0])
    assert GRADIENT_TABLE[0] == (1e-6, 1e-5, 2.0)


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


# ----------------------------------------------------------------- curvature and trend
def test_curvature_test_matches_numpy_least_squares():
    # Reference: the quadratic coefficient and its t statistic from numpy.linalg.lstsq with
    # the covariance s^2 (X'X)^-1 (Draper & Smith, ch. 2, from memory).
    rng = np.random.default_rng(4)
    x = np.sort(rng.uniform(0, 10, 40))
    y = 1.0 - 0.3 * x + 0.004 * x**2 + rng.normal(0, 0.01, 40)
    xc = x - x.mean()
    design = np.column_stack([np.ones_like(xc), xc, xc**2])
    beta, sse, *_ = np.linalg.lstsq(design, y, rcond=None)
    covariance = sse[0] / (40 - 3) * np.linalg.inv(design.T @ design)
    test = curvature_test(x, y)
    assert test.coefficient == pytest.approx(beta[2], rel=1e-9)
    assert test.t_statistic == pytest.approx(beta[2] / math.sqrt(covariance[2, 2]), rel=1e-9)
    assert test.p_value == pytest.approx(2 * stats.t.sf(abs(test.t_statistic), 37), rel=1e-9)


def test_curvature_change_is_the_change_of_the_slope():
    # y' = s0 (1 + c (x - x_mid)/span): the slope changes by c (relative) across the range.
    x = np.linspace(0.0, 5.0, 60)
    s0, c = -0.2, -0.30
    y = s0 * (x + c * (x - 2.5) ** 2 / (2 * 5.0))
    y = y + np.random.default_rng(0).normal(0, 1e-5, x.size)
    test = curvature_test(x, y)
    assert test.change == pytest.approx(c, abs=1e-3)
    assert test.change_low < c < test.change_high


def _log_head(change, noise, n=40, seed=2):
    """ln h with k changing linearly by `change` (relative) across the record."""
    t = np.linspace(0, 6 * 3600.0, n)
    rate = 1.0 / (10 * 3600.0)
    slope = -rate * (1 + change * (t - t.mean()) / np.ptp(t))
    log_h = np.concatenate(([0.0], np.cumsum(0.5 * (slope[1:] + slope[:-1]) * np.diff(t))))
    return t, log_h + np.random.default_rng(seed).normal(0, noise, n)


def test_trend_fails_when_k_drifts():
    t, y = _log_head(-0.30, 3e-4)
    verdict = trend_check(curvature_test(t, y), D5084)
    assert verdict.passed is False
    assert "no significant trend in k over the readings used: no — k falls 30 %" in verdict.sentence
    assert "the tool's own test" in verdict.sentence


def test_trend_passes_when_k_is_steady():
    t, y = _log_head(0.0, 3e-4)
    verdict = trend_check(curvature_test(t, y), D5084)
    assert verdict.passed and "the tool's own test" in verdict.sentence
    assert "k changes" in verdict.sentence


def test_trend_minimum_change_is_a_setting():
    t, y = _log_head(-0.03, 1e-5)  # a 3 % drift, measured very precisely
    curvature = curvature_test(t, y)
    assert curvature.significant
    assert trend_check(curvature, D5084).passed is False
    relaxed = trend_check(curvature, Criteria(trend_minimum_change=0.05))
    assert relaxed.passed and "a change of at least 5 %" in relaxed.sentence


def test_runs_test_by_hand():
    # + + + - - - + + + - - -: n+ = n- = 6, R = 4; E = 1 + 2*6*6/12 = 7;
    # var = 72*(72 - 12)/(144*11) = 2.7273; z = (4 - 7 + 0.5)/1.6514 = -1.514; p = 0.065.
    residuals = np.array([1, 1, 1, -1, -1, -1, 1, 1, 1, -1, -1, -1], dtype=float)
    test = runs_test(residuals)
    assert (test.runs, test.positive, test.negative) == (4, 6, 6)
    assert test.expected_runs == pytest.approx(7.0)
    assert test.z == pytest.approx(-1.5138, abs=1e-4)
    assert test.p_value == pytest.approx(0.0650, abs=5e-4)
    assert not test.significant
    alternating = runs_test(np.tile([1.0, -1.0], 10))
    assert alternating.p_value > 0.99
    curved = runs_test(np.r_[np.ones(10), -np.ones(20), np.ones(10)])
    assert curved.significant


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


# ----------------------------------------------------------------- the window proposal
def _transient_record(n=300, seed=8):
    t = np.linspace(0.0, 10 * 3600.0, n)
    rate = 1.0 / (20 * 3600.0) * (1 + 1.5 * np.exp(-t / 1800.0))
    log_h = np.concatenate(([0.0], -np.cumsum(0.5 * (rate[1:] + rate[:-1]) * np.diff(t))))
    return t, log_h + np.random.default_rng(seed).normal(0, 2e-4, n)


def test_proposal_agrees_with_refitting_every_window():
    # Suffix sums against a refit of every window from scratch (curvature_test per start).
    t, y = _transient_record()
    proposal = propose_window(t, y, np.full(t.size, 1.0), 1e-3, D5084)
    first = next(
        s for s in range(0, 151) if curvature_test(t[s:], y[s:]).p_value >= D5084.trend_level
    )
    assert proposal.meets_criteria
    assert (proposal.start, proposal.stop) == (first, t.size)
    assert 0 < proposal.start < 150


def test_proposal_keeps_every_reading_of_a_steady_record():
    t, y = _log_head(0.0, 3e-4, n=80)
    proposal = propose_window(t, y, np.full(t.size, 1.0), 1e-3, D5084)
    assert (proposal.start, proposal.meets_criteria) == (0, True)


def test_proposal_refuses_a_drift():
    t, y = _log_head(-0.5, 3e-4, n=80)
    proposal = propose_window(t, y, np.full(t.size, 1.0), 1e-3, D5084)
    assert (proposal.start, proposal.stop, proposal.meets_criteria) == (0, 80, False)
    assert "50 % of the readings" in proposal.reason


def test_proposal_honours_the_gradient_and_flow_limits():
    t, y = _log_head(0.0, 3e-4, n=80)
    k = 1.0 / (10 * 3600.0) * 1e-4  # scale 1e-4 m: k = 2.8e-9 m/s, limit 20
    gradient = np.where(np.arange(80) < 10, 25.0, 15.0)
    proposal = propose_window(t, y, gradient, 1e-4, D5084)
    assert recommended_maximum_gradient(k) == 20.0
    assert proposal.start == 10
    # Inflow 1 mL per interval; no outflow over the first 39 intervals, then 1 mL each:
    # outflow/inflow from reading s is 40/(79 - s), at least 0.75 from s = 26 (by hand).
    inflow = np.arange(80) * 1e-6
    outflow = np.maximum(np.arange(80) - 39, 0) * 1e-6
    proposal = propose_window(t, y, np.full(80, 1.0), 1e-4, D5084, inflow=inflow, outflow=outflow)
    assert proposal.start == 26


# ----------------------------------------------------------------- settings and verdicts
@pytest.mark.parametrize(
    ("changes", "message"),
    [
        ({"steady_count": 1}, "steady_count must be a whole number of at least 2"),
        ({"steady_tolerance": 1.5}, "steady_tolerance must be a fraction"),
        ({"trend_level": 0.0}, "trend_level must be a fraction"),
        ({"flow_ratio_low": 1.1}, "must bracket 1"),
        ({"gradient_table": ((1e-8, 1e-9, 20.0),)}, "gradient_table row"),
        ({"gradient_table": ((0.0, 1e-8, 20.0), (1e-9, 1e-7, 10.0))}, "overlap"),
        ({"reynolds_limit": 0.0}, "must be positive"),
    ],
)
def test_bad_criteria_are_named(changes, message):
    with pytest.raises(ValueError, match=message):
        Criteria(**changes)


def test_is_valid():
    passed, failed, skipped = (
        Verdict("a", True, ""),
        Verdict("b", False, ""),
        Verdict("c", None, ""),
    )
    assert is_valid([passed, skipped])
    assert not is_valid([passed, failed, skipped])
    assert not is_valid([skipped])
