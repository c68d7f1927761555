"""The limits of the validity criteria: the D5084 gradient table, and bad limits named."""

import math

import numpy as np
import pytest

from kitchen.validity import GRADIENT_TABLE, Criteria, recommended_maximum_gradient


# ----------------------------------------------------------------- gradient table
@pytest.mark.parametrize(
    ("k", "gradient"),
    [
        # ASTM D5084 recommended maximum gradients [std, from memory]:
        # 1e-5 to 1e-6 m/s -> 2; 1e-6 to 1e-7 -> 5; 1e-7 to 1e-8 -> 10; 1e-8 to 1e-9 -> 20;
        # below 1e-9 -> 30. A k on a boundary takes the row it starts.
        (5e-6, 2.0),
        (1e-6, 2.0),
        (5e-7, 5.0),
        (1e-7, 5.0),
        (5e-8, 10.0),
        (5e-9, 20.0),
        (1e-9, 20.0),
        (5e-10, 30.0),
        (1e-12, 30.0),
    ],
)
def test_gradient_table_lookup(k, gradient):
    assert recommended_maximum_gradient(k) == gradient


def test_gradient_table_outside_and_arrays():
    assert math.isnan(recommended_maximum_gradient(2e-5))
    np.testing.assert_array_equal(recommended_maximum_gradient([5e-9, 5e-10]), [20.0, 30.0])
    assert GRADIENT_TABLE[0] == (1e-6, 1e-5, 2.0)


# ----------------------------------------------------------------- settings and verdicts
@pytest.mark.parametrize(
    ("changes", "message"),
    [
        ({"steady_count": 1}, "steady_count must be a whole number of at least 2"),
        ({"steady_tolerance": 1.5}, "steady_tolerance must be a fraction"),
        ({"trend_level": 0.0}, "trend_level must be a fraction"),
        ({"flow_ratio_low": 1.1}, "must bracket 1"),
        ({"gradient_table": ((1e-8, 1e-9, 20.0),)}, "gradient_table row"),
        ({"gradient_table": ((0.0, 1e-8, 20.0), (1e-9, 1e-7, 10.0))}, "overlap"),
        ({"reynolds_limit": 0.0}, "must be positive"),
    ],
)
def test_bad_criteria_are_named(changes, message):
    with pytest.raises(ValueError, match=message):
        Criteria(**changes)
