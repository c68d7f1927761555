"""Tests for kitchen.analysis.trends: log k trends, geometric mean, and the names it offers.

The verdicts against a criterion are tested in tests/analysis/test_criterion.py, the
grading predictions in tests/analysis/test_grading.py.
"""

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from kitchen.analysis import trends

# --- Tavenas e–log k and the generic trend ---------------------------------------------------

# Invented series: log10 k = −12 + e/0.45 with scatter in log10 k.
E = np.array([0.55, 0.60, 0.66, 0.71, 0.78, 0.84, 0.90])
LOG_SCATTER = np.array([0.05, -0.08, 0.03, 0.06, -0.04, -0.02, 0.04])
K = 10.0 ** (-12.0 + E / 0.45 + LOG_SCATTER)


def test_tavenas_fit_matches_linregress_on_e_and_log_k():
    trend = trends.fit_log_conductivity_void_ratio(E, K)
    reference = stats.linregress(E, np.log10(K))  # scipy.stats.linregress as the reference
    assert trend.fit.slope == pytest.approx(reference.slope, rel=1e-10)
    assert trend.fit.intercept == pytest.approx(reference.intercept, rel=1e-10)
    assert trend.fit.r_squared == pytest.approx(reference.rvalue**2, rel=1e-10)
    t = stats.t.ppf(0.975, E.size - 2)
    slope_low = reference.slope - t * reference.stderr
    slope_high = reference.slope + t * reference.stderr
    assert trend.change_index == pytest.approx(1.0 / reference.slope, rel=1e-10)
    assert trend.change_index_low == pytest.approx(1.0 / slope_high, rel=1e-8)
    assert trend.change_index_high == pytest.approx(1.0 / slope_low, rel=1e-8)
    assert trend.x_name == "void_ratio" and trend.n == 7 and trend.message == ""


def test_tavenas_fit_recovers_the_change_index_and_compares_with_half_e0():
    trend = trends.fit_log_conductivity_void_ratio(E, 10.0 ** (-12.0 + E / 0.45))
    assert trend.change_index == pytest.approx(0.45, rel=1e-9)
    # Tavenas et al. (1983): Ck ≈ 0.5·e0; e0 defaults to the largest void ratio tested.
    assert trend.initial_void_ratio == pytest.approx(0.90)
    assert trend.change_index_rule == pytest.approx(0.45)
    given = trends.fit_log_conductivity_void_ratio(E, K, initial_void_ratio=1.2)
    assert given.change_index_rule == pytest.approx(0.60)


def test_tavenas_band_brackets_the_line_in_m_per_s():
    trend = trends.fit_log_conductivity_void_ratio(E, K)
    e = np.linspace(0.5, 0.95, 5)
    low, high = trend.band(e)
    middle = trend.conductivity(e)
    assert np.all(low < middle) and np.all(middle < high)
    band_low, band_high = trend.fit.band(e)
    np.testing.assert_allclose(low, 10.0**band_low, rtol=1e-12)
    np.testing.assert_allclose(high, 10.0**band_high, rtol=1e-12)
    np.testing.assert_allclose(middle, 10.0 ** trend.fit.predict(e), rtol=1e-12)


def test_tavenas_flat_trend_leaves_ck_unbounded():
    k = 10.0 ** (-9.0 + np.array([0.1, -0.1, 0.05, -0.05, 0.0, 0.08, -0.08]))
    trend = trends.fit_log_conductivity_void_ratio(E, k)
    assert trend.change_index_high == np.inf
    assert "reaches zero or below" in trend.message


@pytest.mark.parametrize(
    "e, k, kwargs, message",
    [
        (E, -K, {}, "k: expected a positive hydraulic conductivity in m/s"),
        (E[:2], K[:2], {}, "needs at least 3 specimens; got 2"),
        (np.full(7, 0.7), K, {}, "void_ratio: all specimens share one value"),
        (E, np.append(K[:6], np.nan), {}, "k: expected a finite.*position 6"),
        (E, K[:6], {}, "k has 6"),
        (-E, K, {}, "void_ratio: expected a positive void ratio"),
        (E, K, {"initial_void_ratio": -1.0}, "initial_void_ratio: expected one positive"),
        (E, K, {"confidence": 95}, "confidence: expected a fraction between 0 and 1"),
    ],
)
def test_tavenas_bad_input(e, k, kwargs, message):
    with pytest.raises(ValueError, match=message):
        trends.fit_log_conductivity_void_ratio(e, k, **kwargs)


def test_generic_trend_on_dry_density_matches_linregress():
    rho = np.array([1620.0, 1660.0, 1700.0, 1735.0, 1770.0, 1810.0])
    k = 10.0 ** (2.0 - 0.0065 * rho + LOG_SCATTER[:6])
    trend = trends.fit_log_conductivity(pd.Series(rho), pd.Series(k), "dry_density")
    reference = stats.linregress(rho, np.log10(k))
    assert trend.fit.slope == pytest.approx(reference.slope, rel=1e-9)
    assert trend.fit.intercept == pytest.approx(reference.intercept, rel=1e-9)
    assert isinstance(trend, trends.ConductivityTrend) and trend.x_name == "dry_density"
    assert not hasattr(trend, "change_index")
    at = pd.Series([1650.0, 1750.0], index=["p", "q"])
    assert list(trend.conductivity(at).index) == ["p", "q"]


@pytest.mark.parametrize(
    "x_name, message", [("", "x_name: expected the name of x"), (None, "x_name: expected")]
)
def test_generic_trend_bad_name(x_name, message):
    with pytest.raises(ValueError, match=message):
        trends.fit_log_conductivity(E, K, x_name)


def test_generic_trend_names_x_in_messages():
    with pytest.raises(ValueError, match="water_content_from_optimum: expected a finite"):
        trends.fit_log_conductivity([0.0, np.inf, 0.02], K[:3], "water_content_from_optimum")


# --- geometric mean --------------------------------------------------------------------------


def test_geometric_mean_matches_scipy():
    k = np.array([2.1e-10, 5.5e-10, 8.0e-10, 1.3e-9, 3.2e-10])
    summary = trends.geometric_mean_conductivity(k)
    assert summary.geometric_mean == pytest.approx(stats.gmean(k), rel=1e-12)
    log_k = np.log10(k)
    assert summary.log10_standard_deviation == pytest.approx(np.std(log_k, ddof=1), rel=1e-12)
    low, high = stats.t.interval(0.95, k.size - 1, loc=log_k.mean(), scale=stats.sem(log_k))
    assert summary.low == pytest.approx(10.0**low, rel=1e-10)
    assert summary.high == pytest.approx(10.0**high, rel=1e-10)
    assert summary.n == 5 and summary.confidence == 0.95


@pytest.mark.parametrize(
    "k, message",
    [
        ([1e-9], "at least 2 values; got 1"),
        ([1e-9, 0.0], "k: expected a positive"),
        ([1e-9, np.nan], "k: expected a finite"),
    ],
)
def test_geometric_mean_bad_input(k, message):
    with pytest.raises(ValueError, match=message):
        trends.geometric_mean_conductivity(k)
