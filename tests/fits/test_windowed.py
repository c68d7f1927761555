"""Tests for kitchen.fits.windowed: line fits over moving windows of one record.

Outside references: math.fsum (correctly rounded sums); each window is compared with
kitchen.fits.fit_line on the slice, itself checked against scipy.stats.linregress in
tests/fits/test_line.py.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from kitchen.fits import WindowedLineFit, fit_line
from kitchen.fits.windowed import compensated_prefix_sums

RTOL = 1e-9  # agreement with reference libraries on well-conditioned data


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
    high, low = compensated_prefix_sums(values)
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
