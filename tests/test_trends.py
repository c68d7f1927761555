"""Tests for kitchen.trends: log k trends, geometric mean, verdicts, grading predictions."""

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from kitchen import trends

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


# --- verdict against a criterion -------------------------------------------------------------


def test_classification_on_hand_made_intervals():
    criterion = 1e-9  # an input, here the common liner criterion (US 40 CFR 258.40)
    k = pd.Series([5e-10, 2e-9, 9e-10, 1.1e-9, 8e-10], index=list("ABCDE"))
    low = pd.Series([4e-10, 1.5e-9, 7e-10, 9e-10, 6e-10], index=list("ABCDE"))
    high = pd.Series([6e-10, 2.5e-9, 1.2e-9, 1.3e-9, 1e-9], index=list("ABCDE"))
    verdict = trends.classify_against_criterion(k, low, high, criterion)
    # A: whole interval below; B: whole interval above; C, D: straddle; E: top on the line.
    assert list(verdict) == ["meets", "does not meet", "not conclusive", "not conclusive", "meets"]
    assert list(verdict.index) == list("ABCDE")
    assert trends.classify_against_criterion(2e-9, 1.5e-9, 3e-9, 1e-8) == "meets"
    array = trends.classify_against_criterion([2e-9], [1.5e-9], [3e-9], 1e-9)
    assert isinstance(array, np.ndarray) and list(array) == ["does not meet"]


def test_classification_against_a_smallest_k_required():
    # a drainage layer: the specification names the smallest k (1e-4 m/s here, an input);
    # the same intervals mirrored: the whole interval at or above meets, below does not
    minimum = trends.Criterion(1e-4, "minimum")
    k = np.array([3e-4, 5e-5, 1.1e-4, 1.2e-4, 9e-5])
    low = np.array([2e-4, 4e-5, 9e-5, 1e-4, 8e-5])
    high = np.array([4e-4, 6e-5, 1.3e-4, 1.4e-4, 1e-4 - 1e-12])
    verdict = trends.classify_against_criterion(k, low, high, minimum)
    # A: above; B: below; C: straddles; D: bottom on the line (meets); E: top just below
    assert list(verdict) == ["meets", "does not meet", "not conclusive", "meets", "does not meet"]
    maximum = trends.classify_against_criterion(k, low, high, trends.Criterion(1e-4))
    assert list(maximum) == ["does not meet", "meets", "not conclusive", "not conclusive", "meets"]


def test_a_criterion_is_a_float_that_knows_its_direction():
    import pickle

    c = trends.Criterion(1e-4, "minimum")
    assert c == 1e-4 and c * 100 == pytest.approx(1e-2) and c.symbol == "≥"
    assert pickle.loads(pickle.dumps(c)).kind == "minimum"
    assert trends.as_criterion(1e-9).kind == "maximum" and trends.as_criterion(c) is not None
    assert trends.as_criterion(2e-9, "minimum") == trends.Criterion(2e-9, "minimum")
    with pytest.raises(ValueError, match="expected 'maximum'"):
        trends.Criterion(1e-4, "most")
    with pytest.raises(ValueError, match="minimum: expected a positive"):
        trends.as_criterion(-1.0, "minimum")


@pytest.mark.parametrize(
    "args, message",
    [
        (
            (pd.Series([1e-9, np.nan], index=["S1", "S2"]), [1e-9] * 2, [2e-9] * 2, 1e-9),
            "k: expected a finite.*index 'S2'",
        ),
        (([1e-9], [2e-9], [3e-9], 1e-9), "k_low: expected the low end"),
        (([1e-9], [5e-10], [8e-10], 1e-9), "k_high: expected the high end"),
        (([1e-9], [5e-10], [2e-9], [1e-9, 1e-8]), "maximum: expected one criterion value"),
        (([1e-9], [5e-10], [2e-9], 0.0), "maximum: expected a positive"),
        (([1e-9, 2e-9], [5e-10], [2e-9], 1e-9), "k_low has 1"),
    ],
)
def test_classification_bad_input(args, message):
    with pytest.raises(ValueError, match=message):
        trends.classify_against_criterion(*args)


# --- predictions from grading ----------------------------------------------------------------


def test_hazen_in_si():
    # Hazen (1892) as given in Das: k [cm/s] = 100·D10² [cm²]. D10 = 0.1 mm = 0.01 cm gives
    # 0.01 cm/s = 1e-4 m/s (hand conversion of the book's formula).
    prediction = trends.hazen_conductivity(0.1e-3)
    assert prediction.conductivity == pytest.approx(1e-4, rel=1e-12)
    assert prediction.within_range is True
    assert trends.hazen_conductivity(0.1e-3, coefficient=150).conductivity == pytest.approx(1.5e-4)
    d10 = np.array([0.05e-3, 0.1e-3, 0.5e-3, 3.0e-3, 3.5e-3])
    # Range 0.1–3 mm (book, from memory).
    assert list(trends.hazen_conductivity(d10).within_range) == [False, True, True, True, False]


def test_chapuis_published_check_value():
    # Chapuis (2004), Can. Geotech. J. 41(5):787 (coefficients from memory): d10 = 0.2 mm,
    # e = 0.7 -> 0.0567 cm/s; tolerance half a unit of the last printed digit.
    prediction = trends.chapuis_conductivity(0.2e-3, 0.7)
    assert prediction.conductivity * 100 == pytest.approx(0.0567, abs=0.00005)
    assert prediction.within_range is True and prediction.method == "Chapuis (2004)"


def test_chapuis_validity_range():
    d10 = np.array([0.12e-3, 0.13e-3, 1.98e-3, 2.0e-3, 0.5e-3, 0.5e-3, 0.5e-3])
    e = np.array([0.7, 0.7, 0.7, 0.7, 0.39, 1.5, 1.6])
    flags = trends.chapuis_conductivity(d10, e).within_range
    assert list(flags) == [False, True, True, False, False, True, False]


def test_kozeny_carman_book_example():
    # Das (from memory): k = 0.02 cm/s at e = 0.5 -> 0.0400 cm/s at e = 0.65. The exact
    # ratio, (0.65³/1.65)/(0.5³/1.5) = 1.99727 (by hand), gives 0.03995 cm/s: the book's
    # printed answer agrees to two significant figures (it rounds intermediate values).
    ratio = trends.kozeny_carman_ratio(0.5, 0.65)
    assert ratio == pytest.approx(1.99727, abs=5e-6)
    assert 0.02 * ratio == pytest.approx(0.040, abs=0.0005)
    e = pd.Series([0.45, 0.8], index=["a", "b"])
    back = trends.kozeny_carman_ratio(e, 0.6) * trends.kozeny_carman_ratio(0.6, e)
    np.testing.assert_allclose(back, 1.0, rtol=1e-12)
    assert list(back.index) == ["a", "b"]


@pytest.mark.parametrize(
    "call, message",
    [
        (lambda: trends.hazen_conductivity(-0.1e-3), "d10: expected a positive"),
        (lambda: trends.hazen_conductivity(0.1e-3, coefficient=0), "coefficient: expected one"),
        (lambda: trends.chapuis_conductivity(0.2e-3, 0.0), "void_ratio: expected a positive"),
        (lambda: trends.chapuis_conductivity([0.2e-3] * 2, [0.7] * 3), "void_ratio has 3"),
        (lambda: trends.kozeny_carman_ratio(np.nan, 0.6), "e_from: expected a finite"),
        (lambda: trends.kozeny_carman_ratio(0.5, -0.6), "e_to: expected a positive"),
    ],
)
def test_grading_formula_bad_input(call, message):
    with pytest.raises(ValueError, match=message):
        call()


def _grading_table():
    return pd.DataFrame(
        {
            "specimen": ["G1", "G2", "G3", "G4"],
            "d10": [0.2e-3, 0.05e-3, np.nan, 0.3e-3],
            "void_ratio": [0.7, 0.7, 0.6, np.nan],
            "source_row": [2, 3, 4, 5],
        }
    )


def test_grading_predictions_table():
    table = _grading_table()
    before = table.copy()
    frame = trends.grading_predictions(table)
    pd.testing.assert_frame_equal(table, before)
    assert list(frame.columns) == [
        "specimen",
        "d10",
        "void_ratio",
        "hazen_k",
        "hazen_within_range",
        "chapuis_k",
        "chapuis_within_range",
        "note",
    ]
    assert frame.hazen_k[0] == pytest.approx(trends.hazen_conductivity(0.2e-3).conductivity)
    assert frame.chapuis_k[0] == pytest.approx(
        trends.chapuis_conductivity(0.2e-3, 0.7).conductivity
    )
    assert list(frame.hazen_within_range) == [True, False, False, True]
    assert list(frame.chapuis_within_range) == [True, False, False, False]
    assert frame.note[0] == "predictions from grading, not measurements"
    assert "Hazen: d10 = 0.05 mm is outside 0.1–3 mm" in frame.note[1]
    assert "Chapuis: d10 = 0.05 mm" in frame.note[1]
    assert frame.note[2] == "d10 not given: no prediction from grading"
    assert np.isnan(frame.hazen_k[2]) and np.isnan(frame.chapuis_k[3])
    assert "void ratio not given: no Chapuis prediction" in frame.note[3]


@pytest.mark.parametrize(
    "change, message",
    [
        (lambda t: t.drop(columns="d10"), "grading table: missing column.*d10"),
        (lambda t: t.assign(d10=[0.2e-3, -1.0, np.nan, 0.3e-3]), r"row 3 \(specimen 'G2'\)"),
        (lambda t: t.assign(void_ratio=["0.7", "loose", 0.6, 0.7]), "'loose'"),
    ],
)
def test_grading_predictions_bad_table(change, message):
    with pytest.raises(ValueError, match=message):
        trends.grading_predictions(change(_grading_table()))
