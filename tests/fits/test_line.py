"""Tests for kitchen.fits.line: the straight line and the line through the origin.

Outside references: scipy.stats.linregress, scipy.stats.t.ppf and numpy.linalg.lstsq
(reference libraries), and a printed Student-t table value (from memory).
"""

import math

import numpy as np
import pytest
from scipy import stats

from kitchen.fits import fit_line, fit_through_origin

RTOL = 1e-9  # agreement with reference libraries on well-conditioned data


def _line_data(seed, n, slope, intercept, noise, x_offset=0.0, x_span=100.0):
    rng = np.random.default_rng(seed)
    x = x_offset + np.sort(rng.uniform(0.0, x_span, n))
    y = intercept + slope * x + rng.normal(0.0, noise, n)
    return x, y


# --------------------------------------------------------------------------- fit_line
LINE_CASES = [  # seed, n, slope, intercept, noise, x offset
    (1, 3, 2.0, -1.0, 0.5, 0.0),
    (2, 10, -0.3, 5.0, 0.1, 0.0),
    (3, 250, 1e-6, 0.4, 1e-4, 6e5),
    (4, 5000, 4.0, 1e3, 30.0, -50.0),
    (5, 40, 0.0, 1.0, 1.0, 1.7e9),  # times as seconds since 1970: large offset, no trend
]


@pytest.mark.parametrize(("seed", "n", "slope", "intercept", "noise", "offset"), LINE_CASES)
def test_fit_line_matches_linregress(seed, n, slope, intercept, noise, offset):
    # reference: scipy.stats.linregress; tolerance 1e-9 relative
    x, y = _line_data(seed, n, slope, intercept, noise, offset)
    fit = fit_line(x, y)
    ref = stats.linregress(x, y)
    assert fit.slope == pytest.approx(ref.slope, rel=RTOL, abs=1e-14 * abs(ref.intercept))
    assert fit.intercept == pytest.approx(ref.intercept, rel=RTOL)
    assert fit.slope_standard_error == pytest.approx(ref.stderr, rel=1e-8)
    assert fit.intercept_standard_error == pytest.approx(ref.intercept_stderr, rel=1e-8)
    assert fit.r_squared == pytest.approx(ref.rvalue**2, rel=1e-8, abs=1e-12)
    assert fit.n == n
    assert fit.x_mean == pytest.approx(np.mean(x), rel=1e-15)


@pytest.mark.parametrize("confidence", [0.5, 0.8, 0.9, 0.95, 0.99, 0.999])
def test_fit_line_intervals_use_student_t(confidence):
    # reference: scipy.stats.t.ppf with n - 2 degrees of freedom; tolerance 1e-12 relative
    x, y = _line_data(7, 12, 1.5, 0.2, 0.3)
    fit = fit_line(x, y, confidence=confidence)
    t = stats.t.ppf(0.5 + confidence / 2, 10)
    assert fit.t_quantile == pytest.approx(t, rel=1e-12)
    assert fit.slope_low == pytest.approx(fit.slope - t * fit.slope_standard_error, rel=1e-12)
    assert fit.slope_high == pytest.approx(fit.slope + t * fit.slope_standard_error, rel=1e-12)
    half = t * fit.intercept_standard_error
    assert fit.intercept_low == pytest.approx(fit.intercept - half, rel=1e-12)
    assert fit.intercept_high == pytest.approx(fit.intercept + half, rel=1e-12)


def test_student_t_quantile_against_printed_table():
    # Student-t table, t(0.975; 10 dof) = 2.228 (Montgomery & Runger, appendix table of
    # percentage points of the t distribution; from memory); printed to 4 digits
    x, y = _line_data(8, 12, 1.0, 0.0, 0.2)
    assert fit_line(x, y).t_quantile == pytest.approx(2.228, abs=5e-4)


def test_band_matches_matrix_form():
    # Draper & Smith, ch. 1/5 matrix form (from memory): var(yhat(x0)) = s^2 x0' (X'X)^-1 x0,
    # computed here with numpy.linalg.inv; tolerance 1e-10 relative
    x, y = _line_data(9, 30, -2.0, 10.0, 0.7)
    fit = fit_line(x, y, confidence=0.9)
    design = np.column_stack([np.ones_like(x), x])
    inverse = np.linalg.inv(design.T @ design)
    x0 = np.array([-20.0, 0.0, 37.5, fit.x_mean, 150.0])
    rows = np.column_stack([np.ones_like(x0), x0])
    half = (
        stats.t.ppf(0.95, 28)
        * fit.residual_standard_deviation
        * np.sqrt(np.einsum("ij,jk,ik->i", rows, inverse, rows))
    )
    low, high = fit.band(x0)
    np.testing.assert_allclose(fit.predict(x0), fit.intercept + fit.slope * x0, rtol=1e-12)
    np.testing.assert_allclose(low, fit.predict(x0) - half, rtol=1e-10)
    np.testing.assert_allclose(high, fit.predict(x0) + half, rtol=1e-10)
    assert np.argmin(high - low) == 3  # narrowest at the mean of x


def test_fit_line_residuals_and_residual_sd():
    x, y = _line_data(10, 50, 0.5, 3.0, 0.2)
    fit = fit_line(x, y)
    np.testing.assert_allclose(fit.residuals, y - (fit.intercept + fit.slope * x), atol=1e-12)
    sd = math.sqrt(np.sum(fit.residuals**2) / (x.size - 2))
    assert fit.residual_standard_deviation == pytest.approx(sd, rel=1e-10)
    assert not fit.residuals.flags.writeable


def test_fit_line_exact_line():
    # a line through every point: slope exact, zero standard errors, R^2 = 1
    x = np.arange(10.0)
    fit = fit_line(x, 3.0 - 0.25 * x)
    assert fit.slope == pytest.approx(-0.25, rel=1e-14)
    assert fit.intercept == pytest.approx(3.0, rel=1e-14)
    assert fit.slope_standard_error < 1e-15
    assert fit.r_squared == pytest.approx(1.0, abs=1e-15)


def test_fit_line_accepts_lists_and_series():
    pd = pytest.importorskip("pandas")
    x = [0.0, 1.0, 2.0, 4.0]
    y = [1.0, 2.9, 5.2, 8.8]
    assert fit_line(pd.Series(x), pd.Series(y)).slope == pytest.approx(fit_line(x, y).slope)


@pytest.mark.parametrize(
    ("x", "y", "confidence", "match"),
    [
        ([1.0, 2.0], [1.0, 2.0], 0.95, "at least 3 points, got 2"),
        ([1.0, 2.0, 3.0], [1.0, 2.0], 0.95, "same length, got 3 and 2"),
        ([1.0, 2.0, 3.0], [1.0, 2.0, np.nan], 0.95, r"y\[2\] is nan"),
        ([1.0, np.inf, 3.0], [1.0, 2.0, 3.0], 0.95, r"x\[1\] is inf"),
        ([2.5, 2.5, 2.5, 2.5], [1.0, 2.0, 3.0, 4.0], 0.95, "x does not vary"),
        ([[1.0, 2.0, 3.0]], [1.0, 2.0, 3.0], 0.95, "one-dimensional"),
        (["a", "b", "c"], [1.0, 2.0, 3.0], 0.95, "numbers only"),
        ([1.0, 2.0, 3.0], [1.0, 2.0, 4.0], 1.5, "between 0 and 1"),
        ([1.0, 2.0, 3.0], [1.0, 2.0, 4.0], 95, "between 0 and 1"),
        ([1e300, 2e300, 3e300], [1.0, 2.0, 4.0], 0.95, "too large"),
    ],
)
def test_fit_line_bad_input(x, y, confidence, match):
    with pytest.raises(ValueError, match=match):
        fit_line(x, y, confidence=confidence)


# --------------------------------------------------------------------------- through origin
@pytest.mark.parametrize(
    ("seed", "n", "slope", "noise"), [(1, 2, 3.0, 0.5), (2, 6, -0.7, 0.05), (3, 400, 2e-5, 1e-6)]
)
def test_fit_through_origin_matches_lstsq(seed, n, slope, noise):
    # reference: numpy.linalg.lstsq on the one-column design; tolerance 1e-10 relative
    rng = np.random.default_rng(seed)
    x = rng.uniform(0.5, 20.0, n)
    y = slope * x + rng.normal(0.0, noise, n)
    fit = fit_through_origin(x, y, confidence=0.9)
    coefficients, rss, _, _ = np.linalg.lstsq(x[:, None], y, rcond=None)
    rss = float(rss[0]) if rss.size else float(np.sum((y - coefficients[0] * x) ** 2))
    assert fit.slope == pytest.approx(coefficients[0], rel=1e-10)
    se = math.sqrt(rss / (n - 1) / np.dot(x, x))
    assert fit.slope_standard_error == pytest.approx(se, rel=1e-8)
    t = stats.t.ppf(0.95, n - 1)  # scipy.stats.t.ppf, n - 1 degrees of freedom
    assert fit.slope_low == pytest.approx(fit.slope - t * se, rel=1e-8)
    assert fit.slope_high == pytest.approx(fit.slope + t * se, rel=1e-8)
    assert fit.r_squared == pytest.approx(1 - rss / np.dot(y, y), rel=1e-10)
    np.testing.assert_allclose(fit.residuals, y - fit.predict(x), atol=1e-13 * np.abs(y).max())


@pytest.mark.parametrize(
    ("x", "y", "match"),
    [
        ([1.0], [2.0], "at least 2 points, got 1"),
        ([0.0, 0.0, 0.0], [1.0, 2.0, 3.0], "zero everywhere"),
        ([1.0, 2.0], [1.0, np.nan], r"y\[1\] is nan"),
        ([1.0, 2.0, 3.0], [1.0, 2.0], "same length"),
    ],
)
def test_fit_through_origin_bad_input(x, y, match):
    with pytest.raises(ValueError, match=match):
        fit_through_origin(x, y)
