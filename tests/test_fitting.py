"""Tests for kitchen.fitting.

Outside references: scipy.stats.linregress, scipy.stats.t.ppf, numpy.linalg.lstsq and
scipy.optimize.curve_fit (reference libraries), math.fsum (correctly rounded sums), and a printed
Student-t table value (from memory). Synthetic records are generated from known parameters.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import optimize, stats

from kitchen.fitting import (
    WindowedLineFit,
    _compensated_prefix,
    fit_exponential_decay,
    fit_line,
    fit_through_origin,
)

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


# --------------------------------------------------------------------------- windows
WINDOW_FIELDS = [
    "slope",
    "intercept",
    "slope_standard_error",
    "intercept_standard_error",
    "slope_low",
    "slope_high",
    "intercept_low",
    "intercept_high",
    "r_squared",
    "residual_standard_deviation",
    "x_mean",
    "sxx",
    "y_mean",
    "t_quantile",
]


def _assert_same_line(window, reference, rtol):
    for name in WINDOW_FIELDS:
        assert getattr(window, name) == pytest.approx(getattr(reference, name), rel=rtol), name
    assert window.n == reference.n


def test_compensated_prefix_sums_match_fsum():
    # reference: math.fsum, which rounds the exact sum of its terms once; here it measures the
    # error of each prefix pair (high + low) against the exact sum. Terms near 1e11 over 3e5
    # readings: a plain running sum is off by more than 1, the pair by far less than 1e-3
    rng = np.random.default_rng(11)
    values = rng.uniform(0.0, 6e5, 300_000) ** 2
    high, low = _compensated_prefix(values)
    for k in (1, 17, 123_457, 299_999, 300_000):
        error = math.fsum(np.concatenate([[high[k], low[k]], -values[:k]]))
        assert abs(error) <= 1e-3, k
    assert abs(math.fsum(np.concatenate([[high[-1]], -values]))) > 1.0  # plain sum is not enough


@pytest.fixture(scope="module")
def long_record():
    # 1e6 readings spanning 6e5 s (about a week at 0.6 s), a slowly falling head with noise
    rng = np.random.default_rng(12)
    t = np.sort(rng.uniform(0.0, 6e5, 10**6))
    head = 0.8 - 1.2e-6 * t + 3e-9 * (t - 3e5) ** 2 / 3e5 + rng.normal(0.0, 1e-4, t.size)
    return t, head, WindowedLineFit(t, head)


@pytest.mark.parametrize(
    ("start", "stop"),
    [
        (900_000, 900_005),
        (800_000, 800_100),
        (999_000, 1_000_000),
        (123_456, 123_460),
        (500_000, 600_000),
        (0, 1_000_000),
    ],
)
def test_window_agrees_with_fit_line_on_long_record(long_record, start, stop):
    # reference: fit_line on the slice (itself checked against linregress); 1e-9 relative
    t, head, windows = long_record
    window = windows.fit(start, stop, confidence=0.9)
    reference = fit_line(t[start:stop], head[start:stop], confidence=0.9)
    _assert_same_line(window, reference, RTOL)
    scale = np.abs(reference.residuals).max()
    np.testing.assert_allclose(window.residuals, reference.residuals, rtol=0, atol=1e-9 * scale)
    x0 = np.array([t[start], t[stop - 1] + 10.0])
    for mine, theirs in zip(window.band(x0), reference.band(x0), strict=True):
        np.testing.assert_allclose(mine, theirs, rtol=RTOL)


@settings(max_examples=60, deadline=None)
@given(
    steps=st.lists(st.floats(0.01, 10.0), min_size=3, max_size=80),
    offset=st.floats(-1e6, 1e6),
    slope=st.floats(-5.0, 5.0),
    seed=st.integers(0, 2**32 - 1),
    bounds=st.tuples(st.floats(0.0, 1.0), st.floats(0.0, 1.0)),
)
def test_window_property_matches_fit_line(steps, offset, slope, seed, bounds):
    # property: any window of any record gives fit_line's numbers on the slice (1e-9 relative;
    # slopes and intercepts near zero are compared on the scale of the data)
    x = offset + np.cumsum(steps)
    rng = np.random.default_rng(seed)
    y = 2.0 + slope * (x - offset) + rng.normal(0.0, 1.0, x.size)
    n = x.size
    start = min(int(min(bounds) * n), n - 3)
    stop = max(int(max(bounds) * n), start + 3)
    window = WindowedLineFit(x, y).fit(start, stop)
    reference = fit_line(x[start:stop], y[start:stop])
    y_scale = np.abs(y[start:stop]).max()
    assert window.slope == pytest.approx(
        reference.slope, rel=RTOL, abs=1e-12 * y_scale / math.sqrt(reference.sxx)
    )
    assert window.intercept == pytest.approx(
        reference.intercept, rel=RTOL, abs=1e-12 * (y_scale + abs(reference.slope * x[stop - 1]))
    )
    for name in ["slope_standard_error", "residual_standard_deviation", "x_mean", "sxx"]:
        assert getattr(window, name) == pytest.approx(getattr(reference, name), rel=RTOL), name
    assert window.r_squared == pytest.approx(reference.r_squared, rel=RTOL, abs=1e-12)


def test_window_with_repeated_x_values():
    x = np.array([0.0, 1.0, 1.0, 1.0, 2.0, 3.0, 3.0])
    y = np.array([0.1, 1.2, 0.9, 1.1, 2.2, 2.8, 3.1])
    windows = WindowedLineFit(x, y)
    _assert_same_line(windows.fit(0, 5), fit_line(x[:5], y[:5]), RTOL)
    with pytest.raises(ValueError, match=r"x does not vary in window 1\.\.4"):
        windows.fit(1, 4)


@pytest.mark.parametrize(
    ("start", "stop", "match"),
    [
        (0, 2, "holds 2 readings; a line needs at least 3"),
        (-1, 5, r"window -1\.\.5 is outside the record of 10 readings"),
        (5, 11, "outside the record"),
        (6, 6, "outside the record"),
        (0.0, 5, "must be integers"),
    ],
)
def test_window_bad_bounds(start, stop, match):
    windows = WindowedLineFit(np.arange(10.0), np.arange(10.0) ** 2)
    with pytest.raises(ValueError, match=match):
        windows.fit(start, stop)


def test_window_bad_record():
    with pytest.raises(ValueError, match=r"y\[3\] is nan"):
        WindowedLineFit(np.arange(5.0), [1.0, 2.0, 3.0, np.nan, 5.0])
    with pytest.raises(ValueError, match="same length"):
        WindowedLineFit(np.arange(5.0), np.arange(4.0))
    with pytest.raises(ValueError, match="at least 3 points"):
        WindowedLineFit([1.0, 2.0], [1.0, 2.0])


# --------------------------------------------------------------------------- decay
SPAN = 600.0  # record span [s]
TAU_RATIOS = [0.2, 0.5, 1.0, 2.0, 5.0, 20.0]  # time constant / record span


# low-noise round trip limits by tau / span: (relative error of tau, error of the asymptote [m]);
# the asymptote grows poorly determined as the record covers less of the decay
LOW_NOISE_LIMITS = {
    0.2: (0.01, 0.005),
    0.5: (0.01, 0.005),
    1.0: (0.01, 0.005),
    2.0: (0.01, 0.005),
    5.0: (0.05, 0.04),
    20.0: (0.5, 0.5),
}


def _decay_record(ratio, noise, seed=0, n=200, asymptote=0.15, drop=0.85, start=0.0):
    rng = np.random.default_rng(seed)
    t = start + np.linspace(0.0, SPAN, n)
    h = asymptote + drop * np.exp(-(t - start) / (ratio * SPAN)) + rng.normal(0.0, noise, n)
    return t, h


def _model(t, asymptote, drop, tau):
    return asymptote + drop * np.exp(-(t - t[0]) / tau)


@pytest.mark.parametrize("ratio", TAU_RATIOS)
@pytest.mark.parametrize("asymptote", [0.15, 0.0, -0.4])
def test_decay_round_trip_without_noise(ratio, asymptote):
    # exact model values: parameters back to 1e-8 (relative to the head drop for the asymptote)
    t, h = _decay_record(ratio, 0.0, asymptote=asymptote)
    fit = fit_exponential_decay(t, h)
    assert fit.converged, fit.message
    assert fit.asymptote == pytest.approx(asymptote, abs=1e-8 * 0.85)
    assert fit.initial == pytest.approx(asymptote + 0.85, rel=1e-10)
    assert fit.time_constant == pytest.approx(ratio * SPAN, rel=1e-8)
    assert fit.r_squared == pytest.approx(1.0, abs=1e-12)


@pytest.mark.parametrize("ratio", TAU_RATIOS)
@pytest.mark.parametrize("noise", [1e-4, 1e-3, 1e-2])
def test_decay_round_trip_with_noise(ratio, noise):
    # 30 seeded records per case; nominal 95 % intervals must hold the true asymptote and time
    # constant in at least 80 % of them (binomial: 80 % is > 4 sd below 95 % for 30 trials)
    tau = ratio * SPAN
    fits = [fit_exponential_decay(*_decay_record(ratio, noise, seed)) for seed in range(30)]
    for fit in fits:
        values = [getattr(fit, name) for name in fit.__dataclass_fields__ if name != "residuals"]
        assert not any(isinstance(v, float) and math.isnan(v) for v in values), fit
        assert fit.message
    inside_h = np.mean([f.asymptote_low <= 0.15 <= f.asymptote_high for f in fits])
    inside_tau = np.mean([f.time_constant_low <= tau <= f.time_constant_high for f in fits])
    assert inside_h >= 0.8
    assert inside_tau >= 0.8
    if ratio <= 5 and noise <= 1e-3:
        # well-determined records: every fit converges, estimates within 5 standard errors,
        # and the reported standard error matches the spread over the seeds within 35 %
        assert all(f.converged for f in fits)
        taus = np.array([f.time_constant for f in fits])
        errors = np.array([f.time_constant_standard_error for f in fits])
        assert np.all(np.abs(taus - tau) <= 5 * errors)
        assert np.std(taus, ddof=1) == pytest.approx(np.mean(errors), rel=0.35)
        asymptotes = np.array([f.asymptote for f in fits])
        assert np.all(
            np.abs(asymptotes - 0.15) <= 5 * np.array([f.asymptote_standard_error for f in fits])
        )
    if noise == 1e-4:
        # low noise (1e-4 m on a 0.85 m drop): tau and the asymptote within the stated limits
        tau_limit, asymptote_limit = LOW_NOISE_LIMITS[ratio]
        assert np.all(np.abs(np.array([f.time_constant for f in fits]) / tau - 1) < tau_limit)
        assert np.all(np.abs(np.array([f.asymptote for f in fits]) - 0.15) < asymptote_limit)


@pytest.mark.parametrize(
    ("ratio", "noise", "n"),
    [(0.2, 1e-3, 200), (1.0, 1e-2, 200), (5.0, 1e-3, 200), (1.0, 3e-3, 20_000)],
)
def test_decay_matches_curve_fit(ratio, noise, n):
    # reference: scipy.optimize.curve_fit (Levenberg-Marquardt), started at the truth and run to
    # tight tolerances; parameters 1e-6 relative, standard errors 1e-4 relative (its Jacobian
    # is a finite difference)
    t, h = _decay_record(ratio, noise, seed=5, n=n)
    fit = fit_exponential_decay(t, h)
    p, covariance = optimize.curve_fit(
        _model, t, h, p0=[0.15, 0.85, ratio * SPAN], ftol=1e-14, xtol=1e-14, gtol=1e-14
    )
    assert fit.converged, fit.message
    assert fit.asymptote == pytest.approx(p[0], rel=1e-6, abs=1e-7)
    assert fit.initial == pytest.approx(p[0] + p[1], rel=1e-6)
    assert fit.time_constant == pytest.approx(p[2], rel=1e-6)
    se = np.sqrt(np.diag(covariance))
    assert fit.asymptote_standard_error == pytest.approx(se[0], rel=1e-4)
    assert fit.time_constant_standard_error == pytest.approx(se[2], rel=1e-4)
    se_initial = math.sqrt(covariance[0, 0] + covariance[1, 1] + 2 * covariance[0, 1])
    assert fit.initial_standard_error == pytest.approx(se_initial, rel=1e-4)
    np.testing.assert_allclose(fit.residuals, h - _model(t, *p), atol=1e-7)
    dof = n - 3
    assert fit.residual_standard_deviation == pytest.approx(
        math.sqrt(np.sum((h - _model(t, *p)) ** 2) / dof), rel=1e-8
    )


def test_decay_to_zero_and_rising_record():
    # a plain exponential to zero, and the same record mirrored (a rising tailwater)
    t = np.linspace(0.0, 3600.0, 500)
    h = 0.9 * np.exp(-t / 700.0)
    fit = fit_exponential_decay(t, h)
    assert fit.converged
    assert fit.asymptote == pytest.approx(0.0, abs=1e-9)
    assert fit.time_constant == pytest.approx(700.0, rel=1e-8)
    rising = fit_exponential_decay(t, 1.0 - h)
    assert rising.asymptote == pytest.approx(1.0, rel=1e-9)
    assert rising.initial == pytest.approx(0.1, rel=1e-9)
    assert rising.time_constant == pytest.approx(700.0, rel=1e-8)


def test_decay_is_unchanged_by_a_time_offset():
    t, h = _decay_record(1.0, 1e-3, seed=3)
    base = fit_exponential_decay(t, h)
    shifted = fit_exponential_decay(t + 86_400.0, h)
    assert shifted.start_time == 86_400.0
    assert shifted.time_constant == pytest.approx(base.time_constant, rel=1e-8)
    assert shifted.asymptote == pytest.approx(base.asymptote, rel=1e-8)
    np.testing.assert_allclose(shifted.predict(t + 86_400.0), base.predict(t), atol=1e-12)


def test_decay_nearly_straight_reports_wide_interval():
    # tau = 20 spans with 1 % noise: converged, the asymptote interval reaches -inf
    t, h = _decay_record(20.0, 1e-2, seed=1)
    fit = fit_exponential_decay(t, h)
    assert fit.converged
    assert fit.asymptote_low == -math.inf
    assert fit.time_constant_high == math.inf
    assert "poorly determined" in fit.message


@pytest.mark.parametrize("curvature", [0.0, 2e-8])
def test_decay_of_a_straight_or_upward_curving_record(curvature):
    # no decay to resolve: converged=False with a plain message, finite numbers, no exception
    t = np.linspace(0.0, 1000.0, 300)
    h = 1.0 - 2e-4 * t - curvature * t**2
    h += np.random.default_rng(4).normal(0.0, 1e-5, t.size)
    fit = fit_exponential_decay(t, h)
    assert not fit.converged
    assert "no decay resolved" in fit.message and "straight line" in fit.message
    assert math.isfinite(fit.initial) and math.isfinite(fit.time_constant)


def test_decay_faster_than_sampling():
    # the head falls to its final level before the second reading
    t = np.arange(0.0, 50.0)
    h = 0.2 + 0.5 * np.exp(-t / 0.05) + np.random.default_rng(2).normal(0.0, 1e-4, t.size)
    fit = fit_exponential_decay(t, h)
    assert not fit.converged
    assert "within the first reading interval" in fit.message
    assert fit.asymptote == pytest.approx(0.2, abs=1e-4)  # the mean of the later readings


@pytest.mark.parametrize(
    ("t", "h", "match"),
    [
        ([0.0, 1.0, 2.0], [3.0, 2.0, 1.5], "at least 4 points, got 3"),
        ([0.0, 1.0, 2.0, 3.0], [3.0, 2.0, 1.5], "same length"),
        ([0.0, 2.0, 1.0, 3.0], [3.0, 2.0, 1.5, 1.2], r"t\[2\] = 1.0 comes after 2.0"),
        ([5.0, 5.0, 5.0, 5.0], [3.0, 2.0, 1.5, 1.2], "at 1 distinct time"),
        ([0.0, 0.0, 9.0, 9.0, 9.0], [3.0, 2.9, 1.5, 1.2, 1.3], "at 2 distinct time"),
        ([0.0, 1.0, 2.0, 3.0], [3.0, np.nan, 1.5, 1.2], r"h\[1\] is nan"),
        ([0.0, 1.0, 2.0, 3.0], [0.3, 0.3, 0.3, 0.3], "head does not change"),
    ],
)
def test_decay_bad_input(t, h, match):
    with pytest.raises(ValueError, match=match):
        fit_exponential_decay(t, h)
