"""Tests for kitchen.analysis.grading: Hazen, Chapuis and Kozeny–Carman predictions from grading."""

import numpy as np
import pandas as pd
import pytest

from kitchen.analysis import grading

# --- predictions from grading ----------------------------------------------------------------


def test_hazen_in_si():
    # Hazen (1892) as given in Das: k [cm/s] = 100·D10² [cm²]. D10 = 0.1 mm = 0.01 cm gives
    # 0.01 cm/s = 1e-4 m/s (hand conversion of the book's formula).
    prediction = grading.hazen_conductivity(0.1e-3)
    assert prediction.conductivity == pytest.approx(1e-4, rel=1e-12)
    assert prediction.within_range is True
    assert grading.hazen_conductivity(0.1e-3, coefficient=150).conductivity == pytest.approx(1.5e-4)
    d10 = np.array([0.05e-3, 0.1e-3, 0.5e-3, 3.0e-3, 3.5e-3])
    # Range 0.1–3 mm (book, from memory).
    assert list(grading.hazen_conductivity(d10).within_range) == [False, True, True, True, False]


def test_chapuis_published_check_value():
    # Chapuis (2004), Can. Geotech. J. 41(5):787 (coefficients from memory): d10 = 0.2 mm,
    # e = 0.7 -> 0.0567 cm/s; tolerance half a unit of the last printed digit.
    prediction = grading.chapuis_conductivity(0.2e-3, 0.7)
    assert prediction.conductivity * 100 == pytest.approx(0.0567, abs=0.00005)
    assert prediction.within_range is True and prediction.method == "Chapuis (2004)"


def test_chapuis_validity_range():
    d10 = np.array([0.12e-3, 0.13e-3, 1.98e-3, 2.0e-3, 0.5e-3, 0.5e-3, 0.5e-3])
    e = np.array([0.7, 0.7, 0.7, 0.7, 0.39, 1.5, 1.6])
    flags = grading.chapuis_conductivity(d10, e).within_range
    assert list(flags) == [False, True, True, False, False, True, False]


def test_kozeny_carman_book_example():
    # Das (from memory): k = 0.02 cm/s at e = 0.5 -> 0.0400 cm/s at e = 0.65. The exact
    # ratio, (0.65³/1.65)/(0.5³/1.5) = 1.99727 (by hand), gives 0.03995 cm/s: the book's
    # printed answer agrees to two significant figures (it rounds intermediate values).
    ratio = grading.kozeny_carman_ratio(0.5, 0.65)
    assert ratio == pytest.approx(1.99727, abs=5e-6)
    assert 0.02 * ratio == pytest.approx(0.040, abs=0.0005)
    e = pd.Series([0.45, 0.8], index=["a", "b"])
    back = grading.kozeny_carman_ratio(e, 0.6) * grading.kozeny_carman_ratio(0.6, e)
    np.testing.assert_allclose(back, 1.0, rtol=1e-12)
    assert list(back.index) == ["a", "b"]


@pytest.mark.parametrize(
    "call, message",
    [
        (lambda: grading.hazen_conductivity(-0.1e-3), "d10: expected a positive"),
        (lambda: grading.hazen_conductivity(0.1e-3, coefficient=0), "coefficient: expected one"),
        (lambda: grading.chapuis_conductivity(0.2e-3, 0.0), "void_ratio: expected a positive"),
        (lambda: grading.chapuis_conductivity([0.2e-3] * 2, [0.7] * 3), "void_ratio has 3"),
        (lambda: grading.kozeny_carman_ratio(np.nan, 0.6), "e_from: expected a finite"),
        (lambda: grading.kozeny_carman_ratio(0.5, -0.6), "e_to: expected a positive"),
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
    frame = grading.grading_predictions(table)
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
    assert frame.hazen_k[0] == pytest.approx(grading.hazen_conductivity(0.2e-3).conductivity)
    assert frame.chapuis_k[0] == pytest.approx(
        grading.chapuis_conductivity(0.2e-3, 0.7).conductivity
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
        grading.grading_predictions(change(_grading_table()))


def test_every_prediction_names_the_range_it_holds_in():
    # Hazen 0.1-3 mm (Das, Carrier 2003; from memory), Chapuis 0.13-1.98 mm and e 0.4-1.5
    # (Chapuis 2004, from memory): the words carried by each prediction quote those ranges
    assert grading.hazen_conductivity(0.2e-3).validity == grading.HAZEN_VALIDITY
    assert "0.1 mm ≤ d10 ≤ 3 mm" in grading.HAZEN_VALIDITY
    assert grading.chapuis_conductivity(0.2e-3, 0.7).validity == grading.CHAPUIS_VALIDITY
    assert "0.13 mm ≤ d10 ≤ 1.98 mm, 0.4 ≤ e ≤ 1.5" in grading.CHAPUIS_VALIDITY
    assert "not for clays" in grading.KOZENY_CARMAN_VALIDITY
