"""The evidence of a falling-head window: its interval by hand and by Monte Carlo, outflow/inflow."""

import numpy as np
import pytest
from synthetic_records import known_k_record

from kitchen.reduction import falling_head_analysis
from kitchen.settings import Settings
from kitchen.uncertainty import Resolutions


def test_two_readings_interval_from_resolutions_by_hand():
    readings, specimen = known_k_record()
    resolutions = Resolutions(caliper=0.0, thermometer=0.0, head_scale=1e-3, timer=1.0)
    settings = Settings(resolutions=resolutions, datum_uncertainty=0.0)
    analysis = falling_head_analysis(readings, specimen, settings, (0, 2))
    h1, h2 = readings["head"].iloc[:2]
    elapsed = readings["time"].iloc[1] - readings["time"].iloc[0]
    u_h, u_t = 1e-3 / np.sqrt(12), 1.0 / np.sqrt(12)
    fall = np.log(h1 / h2)
    expected = np.sqrt((u_h / h1 / fall) ** 2 + (u_h / h2 / fall) ** 2 + 2 * (u_t / elapsed) ** 2)
    assert analysis.interval.relative_standard_uncertainty == pytest.approx(expected, rel=1e-4)
    assert analysis.line is None and not analysis.valid  # four k values are needed
    # the tailwater datum, ±20 mm rectangular (u = 20 mm/√3, GUM F.2.2.1 — from memory for the
    # clause), moves ln((h1 − δ)/(h2 − δ)) by δ·(1/h2 − 1/h1) to first order
    with_datum = falling_head_analysis(
        readings, specimen, Settings(resolutions=resolutions, datum_uncertainty=0.02), (0, 2)
    )
    datum_term = 0.02 / np.sqrt(3) * (1 / h2 - 1 / h1) / fall
    assert with_datum.interval.relative_standard_uncertainty == pytest.approx(
        np.hypot(expected, datum_term), rel=1e-3
    )


def test_the_datum_widens_a_fitted_interval_by_the_slope_of_one_over_h():
    # k from the slope b of ln h on t; a datum error δ changes it by −δ·b′, b′ the slope of
    # 1/h on t (first-order Taylor expansion; least-squares slopes, numpy.polyfit)
    readings, specimen = known_k_record(noise=0.3e-3)
    window = (0, 40)
    plain = falling_head_analysis(readings, specimen, Settings(datum_uncertainty=0.0), window)
    datum = falling_head_analysis(readings, specimen, Settings(datum_uncertainty=0.01), window)
    t = readings["time"].to_numpy()[:40]
    h = readings["head"].to_numpy()[:40]
    sensitivity = np.polyfit(t, 1 / h, 1)[0] / np.polyfit(t, np.log(h), 1)[0]
    expected = np.hypot(
        plain.interval.relative_standard_uncertainty, 0.01 / np.sqrt(3) * sensitivity
    )
    assert datum.interval.relative_standard_uncertainty == pytest.approx(expected, rel=1e-3)
    assert datum.k_reference == plain.k_reference  # the estimate itself does not move
    decay = falling_head_analysis(
        readings, specimen, Settings(falling_head_fit="datum", datum_uncertainty=0.05), window
    )
    fitted = falling_head_analysis(
        readings, specimen, Settings(falling_head_fit="datum", datum_uncertainty=0.0), window
    )
    assert decay.interval == fitted.interval  # a fitted datum carries its own uncertainty


def test_monte_carlo_setting_reaches_the_interval():
    readings, specimen = known_k_record(noise=0.3e-3)
    # without the datum's rectangular term, which would dominate this small record and make
    # the Monte Carlo interval rightly narrower than k = 1.96 on a normal (JCGM 101:2008, from
    # memory), the two methods agree
    plain = Settings(datum_uncertainty=0.0)
    first = falling_head_analysis(readings, specimen, plain, window=(0, 40))
    carlo = falling_head_analysis(
        readings, specimen, plain.with_changes(uncertainty_method="monte_carlo"), (0, 40)
    )
    assert carlo.interval.trials == 200_000
    assert carlo.k_reference_low == pytest.approx(first.k_reference_low, rel=2e-3)
    assert carlo.k_reference_high == pytest.approx(first.k_reference_high, rel=2e-3)


def test_outflow_over_inflow_from_the_readings():
    readings, specimen = known_k_record()
    readings["inflow_volume"] = np.arange(40) * 1e-6
    readings["outflow_volume"] = np.arange(40) * 0.95e-6
    verdict = next(
        v for v in falling_head_analysis(readings, specimen).verdicts if v.criterion == "flow_ratio"
    )
    assert verdict.passed and "0.95 over the readings used" in verdict.sentence
    readings["outflow_volume"] = np.arange(40) * 0.5e-6
    analysis = falling_head_analysis(readings, specimen, window=(0, 40))
    assert not analysis.valid and any("outflow/inflow" in c for c in analysis.checks)
    readings["outflow_volume"] = np.r_[np.arange(20), np.arange(20)] * 1e-6
    analysis = falling_head_analysis(readings, specimen, window=(0, 40))
    assert any("outflow_volume decreases at reading 21" in c for c in analysis.checks)


def _steady_logger_record(noise, seed=4, n=20_000):
    # a head falling from 1.2 m by k20 = 2e-9 m/s over 8 h (known_k_record), read n times
    return known_k_record(n=n, noise=noise, seed=seed)


def test_the_steady_values_span_what_the_observed_scatter_calls_for():
    # Each k value judged for steadiness is a least-squares fit over a span just long
    # enough that the scatter about the fit makes at most 5 % uncertainty in it: the span
    # follows the scatter observed, not the head scale's resolution (the tool's own rule).
    readings, specimen = _steady_logger_record(1.0e-3)
    plain = falling_head_analysis(readings, specimen, window=(0, 20_000))
    coarse = Settings(resolutions=Resolutions(head_scale=1e-2))
    assert falling_head_analysis(readings, specimen, coarse, (0, 20_000)).value_step == (
        plain.value_step
    )
    steady = next(v for v in plain.verdicts if v.criterion == "steady_values")
    assert steady.passed and "least-squares fit over" in steady.sentence
    assert "at most 5.0 % standard uncertainty in each" in steady.sentence
    # the standard error of a least-squares slope, s/sqrt(Sxx) (Draper & Smith, ch. 1, from
    # memory), falls as m^1.5 with m equally spaced readings: four times the scatter calls
    # for spans 4^(2/3) = 2.5 times as long
    readings, _ = _steady_logger_record(4.0e-3)
    noisy = falling_head_analysis(readings, specimen, window=(0, 20_000))
    assert noisy.value_step / plain.value_step == pytest.approx(4 ** (2 / 3), rel=0.1)
    for analysis in (plain, noisy):
        assert analysis.valid
        np.testing.assert_allclose(analysis.value_k, 2.0e-9, rtol=0.2)


def test_two_readings_suffice_when_they_are_far_apart_beside_their_scatter():
    # an exact record: the values are the standard's own, k between successive readings
    readings, specimen = known_k_record()
    analysis = falling_head_analysis(readings, specimen, window=(0, 40))
    assert analysis.value_step == 1
    np.testing.assert_allclose(analysis.value_k, analysis.increment_k[-4:])
    steady = next(v for v in analysis.verdicts if v.criterion == "steady_values")
    assert "each from two successive readings" in steady.sentence


def test_a_window_too_short_for_the_scatter_says_so():
    readings, specimen = known_k_record(n=12, noise=20e-3, seed=2)
    analysis = falling_head_analysis(readings, specimen, window=(0, 12))
    steady = next(v for v in analysis.verdicts if v.criterion == "steady_values")
    assert analysis.value_step == 2  # (12 - 1) // 4 reading intervals at most
    assert "more than the 5 % aimed at: the readings used allow no longer spans" in steady.sentence
