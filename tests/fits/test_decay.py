"""Tests for kitchen.fits.decay: the three-parameter exponential decay.

Outside references: scipy.optimize.curve_fit (reference library). Synthetic records are
generated from known parameters.
"""

import math

import numpy as np
import pytest
from scipy import optimize

from kitchen.fits import fit_exponential_decay

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
