"""Tests for kitchen.analysis.criterion: the criterion on k and the verdicts against it."""

import numpy as np
import pandas as pd
import pytest

from kitchen.analysis import criterion as conductivity_criterion

# --- verdict against a criterion -------------------------------------------------------------


def test_classification_on_hand_made_intervals():
    criterion = 1e-9  # an input, here the common liner criterion (US 40 CFR 258.40)
    k = pd.Series([5e-10, 2e-9, 9e-10, 1.1e-9, 8e-10], index=list("ABCDE"))
    low = pd.Series([4e-10, 1.5e-9, 7e-10, 9e-10, 6e-10], index=list("ABCDE"))
    high = pd.Series([6e-10, 2.5e-9, 1.2e-9, 1.3e-9, 1e-9], index=list("ABCDE"))
    verdict = conductivity_criterion.classify_against_criterion(k, low, high, criterion)
    # A: whole interval below; B: whole interval above; C, D: straddle; E: top on the line.
    assert list(verdict) == ["meets", "does not meet", "not conclusive", "not conclusive", "meets"]
    assert list(verdict.index) == list("ABCDE")
    assert conductivity_criterion.classify_against_criterion(2e-9, 1.5e-9, 3e-9, 1e-8) == "meets"
    array = conductivity_criterion.classify_against_criterion([2e-9], [1.5e-9], [3e-9], 1e-9)
    assert isinstance(array, np.ndarray) and list(array) == ["does not meet"]


def test_classification_against_a_smallest_k_required():
    # a drainage layer: the specification names the smallest k (1e-4 m/s here, an input);
    # the same intervals mirrored: the whole interval at or above meets, below does not
    minimum = conductivity_criterion.Criterion(1e-4, "minimum")
    k = np.array([3e-4, 5e-5, 1.1e-4, 1.2e-4, 9e-5])
    low = np.array([2e-4, 4e-5, 9e-5, 1e-4, 8e-5])
    high = np.array([4e-4, 6e-5, 1.3e-4, 1.4e-4, 1e-4 - 1e-12])
    verdict = conductivity_criterion.classify_against_criterion(k, low, high, minimum)
    # A: above; B: below; C: straddles; D: bottom on the line (meets); E: top just below
    assert list(verdict) == ["meets", "does not meet", "not conclusive", "meets", "does not meet"]
    maximum = conductivity_criterion.classify_against_criterion(
        k, low, high, conductivity_criterion.Criterion(1e-4)
    )
    assert list(maximum) == ["does not meet", "meets", "not conclusive", "not conclusive", "meets"]


def test_a_criterion_is_a_float_that_knows_its_direction():
    import pickle

    c = conductivity_criterion.Criterion(1e-4, "minimum")
    assert c == 1e-4 and c * 100 == pytest.approx(1e-2) and c.symbol == "≥"
    # the words of the zone follow the kind: k at least a minimum, at most a maximum
    assert c.bound == "at least" and conductivity_criterion.Criterion(1e-9).bound == "at most"
    assert pickle.loads(pickle.dumps(c)).kind == "minimum"
    assert (
        conductivity_criterion.as_criterion(1e-9).kind == "maximum"
        and conductivity_criterion.as_criterion(c) is not None
    )
    assert conductivity_criterion.as_criterion(2e-9, "minimum") == conductivity_criterion.Criterion(
        2e-9, "minimum"
    )
    with pytest.raises(ValueError, match="expected 'maximum'"):
        conductivity_criterion.Criterion(1e-4, "most")
    with pytest.raises(ValueError, match="minimum: expected a positive"):
        conductivity_criterion.as_criterion(-1.0, "minimum")


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
        conductivity_criterion.classify_against_criterion(*args)


# --- a criterion as typed ---------------------------------------------------------------------
# 1 m/s = 100 cm/s (SI, common practice, no source)


@pytest.mark.parametrize(
    ("text", "value", "kind"),
    [
        ("1e-9 m/s", 1e-9, "maximum"),
        ("1e-7 cm/s", 1e-9, "maximum"),
        ("2.5e-10m/s", 2.5e-10, "maximum"),
        ("≤ 1e-9 m/s", 1e-9, "maximum"),
        ("k <= 1e-9 m/s", 1e-9, "maximum"),
        ("max 1e-9 m/s", 1e-9, "maximum"),
        ("≥ 1e-4 m/s", 1e-4, "minimum"),
        (">=1e-2 cm/s", 1e-4, "minimum"),
        ("Min 1e-4 m/s", 1e-4, "minimum"),
    ],
)
def test_criterion_is_read_with_its_unit_and_direction(text, value, kind):
    criterion = conductivity_criterion.parse_criterion(text)
    assert criterion == value and criterion.kind == kind


@pytest.mark.parametrize(
    ("text", "kind", "value", "expected_kind"),
    [
        # the command line's --criterion (a number in m/s) and --criterion-kind
        ("1e-9", None, 1e-9, "maximum"),
        ("1e-4", "minimum", 1e-4, "minimum"),
        (".5e-9", "maximum", 5e-10, "maximum"),
        ("1e-7 cm/s", None, 1e-9, "maximum"),
        (">= 1e-4 m/s", "minimum", 1e-4, "minimum"),
        ("min 1e-4", None, 1e-4, "minimum"),
    ],
)
def test_a_number_without_unit_is_read_where_the_unit_is_given(text, kind, value, expected_kind):
    criterion = conductivity_criterion.parse_criterion(text, kind, unit="m/s")
    assert criterion == value and criterion.kind == expected_kind


@pytest.mark.parametrize(
    ("text", "kind", "unit", "message"),
    [
        ("1e-9", None, None, "has no unit"),
        ("1e-9 m", None, None, "has unit 'm'"),
        ("1e-9 m", None, "m/s", "has unit 'm'"),
        ("fast", None, None, "expected a number and its unit"),
        ("0 m/s", None, None, "expected a positive"),
        ("-1e-9", None, "m/s", "expected a positive"),
        ("1e999 m/s", None, None, "finite"),
        ("≥ 1e-4 m/s", "maximum", None, "is a smallest k required, but its kind is given as"),
        ("max 1e-9 m/s", "minimum", None, "is a largest k allowed, but its kind is given as"),
        ("1e-9 m/s", "most", None, "expected 'maximum'"),
    ],
)
def test_bad_criterion_is_refused_in_words(text, kind, unit, message):
    with pytest.raises(ValueError, match=message):
        conductivity_criterion.parse_criterion(text, kind, unit)
