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
