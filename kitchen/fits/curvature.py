"""Tests for curvature about a fitted straight line: an added quadratic term, and runs.

:func:`curvature_test` is the t-test of a quadratic term added to the line of y on x
(:class:`CurvatureTest`, with the relative change of the slope across x: for ln h on time,
the change of k across the window); :func:`runs_test` and :func:`sign_runs_test` count the
runs of the residuals' signs (:class:`RunsTest`). The trend criterion and the curvature
diagnosis of the falling-head reduction are built on them; both uses are the tool's own.

References
----------
.. [DS] Draper, N. R. & Smith, H. *Applied Regression Analysis*, 3rd ed., ch. 1 and 2
   (t-test of an added regression term) and ch. 7 (runs test on residuals). From memory.
.. [WW] Wald, A. & Wolfowitz, J. (1940). On a test whether two samples are from the same
   population. Ann. Math. Statist. 11(2), 147-162 (number of runs, its mean and variance).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import special

from ._common import DOT_BLOCK
from .line import LinearFit, fit_line

__all__ = ["CurvatureTest", "RunsTest", "curvature_test", "runs_test", "sign_runs_test"]


@dataclass(frozen=True)
class CurvatureTest:
    """The t-test of a quadratic term added to a straight line y = a + b·x.

    ``change`` is the relative change of the slope from the first to the last x, against
    the slope at the middle (for ln h on time: the change of k across the window), with
    ``change_low``/``change_high`` its interval at 1 − ``level``.
    """

    coefficient: float
    t_statistic: float
    p_value: float
    degrees_of_freedom: int
    change: float
    change_low: float
    change_high: float
    level: float

    @property
    def significant(self) -> bool:
        return self.p_value < self.level


@dataclass(frozen=True)
class RunsTest:
    """The runs test on the signs of residuals: too few runs means systematic curvature."""

    runs: int
    expected_runs: float
    positive: int
    negative: int
    z: float
    p_value: float
    level: float

    @property
    def significant(self) -> bool:
        return self.p_value < self.level


def curvature_test(
    x, y, level: float = 0.05, line: LinearFit | None = None, increasing: bool = False
) -> CurvatureTest:
    """Test for curvature: a quadratic term added to the straight line of y on x.

    Parameters
    ----------
    x, y : array_like
        The data, at least 4 points. [any units]
    level : float
        Significance level. [-]
    line : LinearFit, optional
        The straight-line fit of ``y`` on ``x`` when already computed (saves passes).
    increasing : bool
        True when ``x`` is known to increase (its range is then read from its ends).

    Returns
    -------
    CurvatureTest
        t = b2/se(b2) with n − 3 degrees of freedom, two-sided p; the relative change of
        the slope across the range of x.

    Notes
    -----
    The quadratic is written in the centred x with the squared term made orthogonal to
    1 and x, so its coefficient is Σ q·r / Σ q² with r the straight line's residuals and
    the residual sum of squares falls by (Σ q·r)²/Σ q²; no matrix is formed, and
    Σ q·r = Σ x_c²·y − ȳ·Σ x_c² − b·Σ x_c³ needs no array of residuals: five passes over
    the data besides the line.

    References
    ----------
    Draper & Smith, *Applied Regression Analysis*, ch. 2, extra sum of squares and the
    t-test of an added term (from memory).
    """
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    n = x.size
    if n < 4:
        raise ValueError(f"a curvature test needs at least 4 points, got {n}")
    line = line or fit_line(x, y)
    s2 = line.sxx
    s3, s4, s2y = _centred_moments(x, y, line.x_mean)
    sqq = s4 - s2 * s2 / n - s3 * s3 / s2
    sqr = s2y - line.y_mean * s2 - line.slope * s3
    dof = n - 3
    sse_line = line.residual_standard_deviation**2 * (n - 2)
    if not sqq > 0:
        return CurvatureTest(0.0, 0.0, 1.0, dof, 0.0, 0.0, 0.0, level)
    b2 = sqr / sqq
    sse = max(sse_line - sqr * sqr / sqq, 0.0)
    se = math.sqrt(sse / dof / sqq) if dof > 0 else math.inf
    if se > 0:
        t = b2 / se
    else:
        t = math.copysign(math.inf, b2) if b2 else 0.0
    p = float(2 * special.stdtr(dof, -abs(t))) if math.isfinite(t) else 0.0
    x_low, x_high = (float(x[0]), float(x[-1])) if increasing else (x.min(), x.max())
    x_middle = 0.5 * (x_low + x_high) - line.x_mean
    slope_middle = line.slope + b2 * (2 * x_middle - s3 / s2)
    span = x_high - x_low
    tq = float(special.stdtrit(dof, 1 - level / 2)) if dof > 0 else math.inf
    if slope_middle == 0:
        change = low = high = math.nan
    else:
        change = 2 * b2 * span / slope_middle
        ends = sorted(
            (2 * (b2 - tq * se) * span / slope_middle, 2 * (b2 + tq * se) * span / slope_middle)
        )
        low, high = ends
    return CurvatureTest(float(b2), float(t), p, dof, float(change), low, high, level)


def _centred_moments(x: np.ndarray, y: np.ndarray, x_mean: float) -> tuple[float, float, float]:
    """Σ x_c³, Σ x_c⁴ and Σ x_c²·y with x_c = x − x_mean, in blocks of :data:`DOT_BLOCK`.

    The working arrays are a block long, so a window of 10^6 readings needs no two more
    arrays of its length; einsum rather than dot: single-threaded, so no waiting on BLAS
    threads when the machine is busy.
    """
    sums = np.zeros(3)
    xc = np.empty(min(x.size, DOT_BLOCK))
    xc2 = np.empty_like(xc)
    for i in range(0, x.size, DOT_BLOCK):
        xb = x[i : i + DOT_BLOCK]
        c, c2 = xc[: xb.size], xc2[: xb.size]
        np.subtract(xb, x_mean, out=c)
        np.multiply(c, c, out=c2)
        sums += (
            np.einsum("i,i->", c2, c),
            np.einsum("i,i->", c2, c2),
            np.einsum("i,i->", c2, y[i : i + DOT_BLOCK]),
        )
    s3, s4, s2y = sums.tolist()
    return s3, s4, s2y


def runs_test(residuals, level: float = 0.05) -> RunsTest:
    """Runs test on the signs of residuals, one-sided for too few runs.

    Parameters
    ----------
    residuals : array_like
        Residuals in reading order; exact zeros are left out. [any unit]
    level : float
        Significance level. [-]

    Returns
    -------
    RunsTest
        Number of runs, its expectation 1 + 2·n₊·n₋/n, z with a continuity correction and
        the lower-tail p (too few runs: the residuals keep their sign over stretches, as
        they do about a curve).

    References
    ----------
    Wald & Wolfowitz (1940), Ann. Math. Statist. 11(2):147; Draper & Smith, *Applied
    Regression Analysis*, ch. 7 (from memory). Normal approximation to the number of runs.
    """
    r = np.asarray(residuals, dtype=float)
    return sign_runs_test(r[r != 0] > 0, level)


def sign_runs_test(positive, level: float = 0.05) -> RunsTest:
    """Runs test on a sequence of signs (True for a positive residual); see :func:`runs_test`."""
    signs = np.asarray(positive, dtype=bool)
    positive = int(np.count_nonzero(signs))
    negative = int(signs.size - positive)
    n = positive + negative
    if positive == 0 or negative == 0:
        return RunsTest(1 if n else 0, 1.0, positive, negative, 0.0, 1.0, level)
    runs = 1 + int(np.count_nonzero(signs[1:] != signs[:-1]))
    product = 2.0 * positive * negative
    expected = 1.0 + product / n
    variance = product * (product - n) / (n * n * (n - 1.0))
    z = (runs - expected + 0.5) / math.sqrt(variance) if variance > 0 else 0.0
    p = float(special.ndtr(z))
    return RunsTest(runs, expected, positive, negative, z, p, level)
