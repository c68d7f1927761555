"""The curvature and runs tests against numpy least squares and hand-computed sets."""

import math

import numpy as np
import pytest
from scipy import stats

from kitchen.fits import curvature_test, runs_test


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
