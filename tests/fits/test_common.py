"""Tests for kitchen.fits._common: the blocked dot product, the t quantile, the input checks.

Outside references: math.fsum (correctly rounded sums) and scipy.stats.t.ppf (reference
library).
"""

import math

import numpy as np
import pytest
from scipy import stats

from kitchen.fits._common import DOT_BLOCK, blocked_dot, finite_sum, student_t_quantile


@pytest.mark.parametrize("n", [10, DOT_BLOCK, 5 * DOT_BLOCK + 17])
def test_blocked_dot_matches_fsum(n):
    # reference: math.fsum of the products, rounded once; positive terms, so the blocked sum
    # is within a few units of n * eps of it (1e-12 relative)
    rng = np.random.default_rng(21)
    a, b = rng.uniform(0.5, 2.0, n), rng.uniform(0.5, 2.0, n)
    assert blocked_dot(a, b) == pytest.approx(math.fsum(a * b), rel=1e-12)


@pytest.mark.parametrize(("confidence", "dof"), [(0.5, 1), (0.9, 3), (0.95, 10), (0.999, 250)])
def test_t_quantile_matches_scipy(confidence, dof):
    # reference: scipy.stats.t.ppf at (1 + confidence) / 2; tolerance 1e-12 relative
    expected = stats.t.ppf(0.5 + confidence / 2, dof)
    assert student_t_quantile(confidence, dof) == pytest.approx(expected, rel=1e-12)


def test_finite_sum_names_the_value_or_the_overflow():
    assert finite_sum(np.array([1.0, 2.5]), "h") == 3.5
    with pytest.raises(ValueError, match=r"h\[1\] is nan; every value must be a finite number"):
        finite_sum(np.array([1.0, np.nan, 3.0]), "h")
    with (
        np.errstate(over="ignore"),
        pytest.raises(ValueError, match="x holds values too large to fit in double precision"),
    ):
        finite_sum(np.array([1e308, 1e308]), "x")
