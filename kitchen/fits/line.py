"""Straight lines fitted by least squares, with Student-t intervals.

:func:`fit_line` fits ``y = intercept + slope * x`` (:class:`LinearFit`, with the confidence
band of the mean response); :func:`fit_through_origin` fits ``y = slope * x``
(:class:`ProportionalFit`). Each returns a small frozen dataclass. Pure numpy/scipy.

References
----------
.. [DS] Draper, N. R. & Smith, H. *Applied Regression Analysis*, 3rd ed., Wiley, 1998,
   ch. 1 (straight line: estimates, standard errors, t intervals, confidence band of the mean
   response). From memory.
.. [MR] Montgomery, D. C. & Runger, G. C. *Applied Statistics and Probability for Engineers*,
   ch. 11 (simple linear regression, regression through the origin). From memory.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from ._common import (
    DOT_BLOCK,
    MACHINE_EPSILON,
    blocked_dot,
    checked_confidence,
    finite_sum,
    paired_vectors,
    refuse_overflow,
    student_t_quantile,
)

__all__ = ["LinearFit", "ProportionalFit", "fit_line", "fit_through_origin"]


# --------------------------------------------------------------------------- straight line
@dataclass(frozen=True)
class LinearFit:
    """Ordinary least-squares line ``y = intercept + slope * x`` with Student-t intervals.

    Attributes
    ----------
    slope, intercept : float
        Estimates. [y unit / x unit], [y unit]
    slope_standard_error, intercept_standard_error : float
        Standard errors. [as the estimates]
    slope_low, slope_high, intercept_low, intercept_high : float
        Two-sided Student-t interval at `confidence`, n - 2 degrees of freedom.
    r_squared : float
        Coefficient of determination (1 when y is constant). [-]
    residual_standard_deviation : float
        ``sqrt(sum(residuals**2) / (n - 2))``. [y unit]
    n : int
        Number of points.
    confidence : float
        Confidence level of the intervals and band. [-]
    x_mean, sxx, y_mean : float
        Mean of x, sum of squared deviations of x from it, mean of y (for the band).
    t_quantile : float
        Student-t quantile used for the intervals. [-]
    residuals : numpy.ndarray
        Observed minus fitted y in input order, read-only, computed on first access. [y unit]
    """

    slope: float
    intercept: float
    slope_standard_error: float
    intercept_standard_error: float
    slope_low: float
    slope_high: float
    intercept_low: float
    intercept_high: float
    r_squared: float
    residual_standard_deviation: float
    n: int
    confidence: float
    x_mean: float
    sxx: float
    y_mean: float
    t_quantile: float
    _residual_source: Callable[[], np.ndarray] | None = field(
        default=None, repr=False, compare=False
    )

    @cached_property
    def residuals(self) -> np.ndarray:
        """Observed minus fitted y, in input order. [y unit]"""
        if self._residual_source is None:
            raise ValueError("this LinearFit was built without its data, so it has no residuals")
        values = np.asarray(self._residual_source(), dtype=np.float64)
        values.flags.writeable = False
        return values

    def predict(self, x) -> np.ndarray:
        """Fitted mean response at `x`. [y unit]"""
        fitted = np.subtract(np.asarray(x, dtype=np.float64), self.x_mean)  # one new array
        fitted *= self.slope
        fitted += self.y_mean
        return fitted

    def band(self, x) -> tuple[np.ndarray, np.ndarray]:
        """Confidence band ``(low, high)`` of the mean response at `x`. [y unit]

        Half-width ``t * s * sqrt(1/n + (x - x_mean)**2 / sxx)`` ([DS]_ ch. 1).
        """
        x = np.asarray(x, dtype=np.float64)
        centre = self.predict(x)
        half = (
            self.t_quantile
            * self.residual_standard_deviation
            * np.sqrt(1.0 / self.n + (x - self.x_mean) ** 2 / self.sxx)
        )
        return centre - half, centre + half


def linear_fit_from_sums(n, slope, x_mean, y_mean, sxx, syy, sse, confidence, residual_source):
    dof = n - 2
    s = math.sqrt(max(sse, 0.0) / dof)
    slope_se = s / math.sqrt(sxx)
    intercept_se = s * math.sqrt(1.0 / n + x_mean * x_mean / sxx)
    intercept = y_mean - slope * x_mean
    t = student_t_quantile(confidence, dof)
    r_squared = 1.0 - max(sse, 0.0) / syy if syy > 0 else 1.0
    refuse_overflow(slope, intercept, slope_se, intercept_se, r_squared)
    return LinearFit(
        slope=slope,
        intercept=intercept,
        slope_standard_error=slope_se,
        intercept_standard_error=intercept_se,
        slope_low=slope - t * slope_se,
        slope_high=slope + t * slope_se,
        intercept_low=intercept - t * intercept_se,
        intercept_high=intercept + t * intercept_se,
        r_squared=r_squared,
        residual_standard_deviation=s,
        n=n,
        confidence=confidence,
        x_mean=x_mean,
        sxx=sxx,
        y_mean=y_mean,
        t_quantile=t,
        _residual_source=residual_source,
    )


def fit_line(x, y, confidence=0.95) -> LinearFit:
    """Fit ``y = intercept + slope * x`` by ordinary least squares.

    Parameters
    ----------
    x : array_like
        Regressor values, at least 3, not all equal. [any unit]
    y : array_like
        Responses, same length as `x`. [any unit]
    confidence : float, default 0.95
        Two-sided confidence level of the intervals and band. [-]

    Returns
    -------
    LinearFit
        Slope and intercept with standard errors and Student-t intervals (n - 2 degrees of
        freedom), R², residual standard deviation, and what :meth:`LinearFit.band` needs.

    Raises
    ------
    ValueError
        Fewer than 3 points, lengths differ, a value is not finite, or `x` is constant.

    Notes
    -----
    One centred pass in cache-sized blocks: the means are removed and ``sxx``, ``sxy``, ``syy``
    are dot products of the centred data. When R² is within 1e-6 of 1 the residual sum of
    squares is recomputed from the residuals instead of ``syy - slope * sxy`` to avoid
    cancellation. R² is 1 when y is constant (the line reproduces every reading).

    References
    ----------
    .. [1] Draper & Smith, *Applied Regression Analysis*, ch. 1 ([DS]_); Montgomery & Runger,
       ch. 11 ([MR]_). From memory.
    """
    confidence = checked_confidence(confidence)
    x, y = paired_vectors(x, y, ("x", "y"), 3, "a straight-line fit")
    n = x.size
    x_mean = finite_sum(x, "x") / n
    y_mean = finite_sum(y, "y") / n
    # centre and sum each block while it is in cache, in two scratch blocks: the fit holds
    # no copy of its data (the residuals are formed again from x and y when asked for)
    xc, yc = np.empty(min(n, DOT_BLOCK)), np.empty(min(n, DOT_BLOCK))
    sxx = sxy = syy = 0.0
    with np.errstate(over="ignore", invalid="ignore"):
        for i in range(0, n, DOT_BLOCK):
            size = min(DOT_BLOCK, n - i)
            xb = np.subtract(x[i : i + DOT_BLOCK], x_mean, out=xc[:size])
            yb = np.subtract(y[i : i + DOT_BLOCK], y_mean, out=yc[:size])
            sxx += np.dot(xb, xb)
            sxy += np.dot(xb, yb)
            syy += np.dot(yb, yb)
    sxx, sxy, syy = float(sxx), float(sxy), float(syy)
    refuse_overflow(sxx, sxy, syy)
    if not sxx > n * (64.0 * MACHINE_EPSILON * x_mean) ** 2:
        raise ValueError(
            f"x does not vary (every value is {float(x[0])!r}); the slope of a line is undefined"
        )
    slope = sxy / sxx
    sse = syy - slope * sxy
    if sse <= 1e-6 * syy:  # nearly exact line: sum the squared residuals themselves
        sse = 0.0
        for i in range(0, n, DOT_BLOCK):
            size = min(DOT_BLOCK, n - i)
            xb = np.subtract(x[i : i + DOT_BLOCK], x_mean, out=xc[:size])
            yb = np.subtract(y[i : i + DOT_BLOCK], y_mean, out=yc[:size])
            r = np.multiply(xb, slope, out=xb)
            np.subtract(yb, r, out=r)
            sse += float(np.dot(r, r))
    return linear_fit_from_sums(
        n,
        slope,
        x_mean,
        y_mean,
        sxx,
        syy,
        sse,
        confidence,
        lambda: (y - y_mean) - slope * (x - x_mean),
    )


# --------------------------------------------------------------------------- through origin
@dataclass(frozen=True)
class ProportionalFit:
    """Least-squares line through the origin ``y = slope * x`` with a Student-t interval.

    Attributes
    ----------
    slope, slope_standard_error : float
        Estimate and its standard error. [y unit / x unit]
    slope_low, slope_high : float
        Two-sided Student-t interval at `confidence`, n - 1 degrees of freedom.
    r_squared : float
        Uncentred coefficient ``1 - sum(residuals**2) / sum(y**2)``. [-]
    residual_standard_deviation : float
        ``sqrt(sum(residuals**2) / (n - 1))``. [y unit]
    n : int
        Number of points.
    confidence : float
        Confidence level of the interval. [-]
    residuals : numpy.ndarray
        Observed minus fitted y in input order, read-only. [y unit]
    t_quantile : float
        Student-t quantile used for the interval. [-]
    """

    slope: float
    slope_standard_error: float
    slope_low: float
    slope_high: float
    r_squared: float
    residual_standard_deviation: float
    n: int
    confidence: float
    residuals: np.ndarray = field(repr=False, compare=False)
    t_quantile: float = field(repr=False)

    def predict(self, x) -> np.ndarray:
        """Fitted response at `x`. [y unit]"""
        return self.slope * np.asarray(x, dtype=np.float64)


def fit_through_origin(x, y, confidence=0.95) -> ProportionalFit:
    """Fit ``y = slope * x`` (no intercept) by least squares.

    Parameters
    ----------
    x : array_like
        Regressor values, at least 2, not all zero. [any unit]
    y : array_like
        Responses, same length as `x`. [any unit]
    confidence : float, default 0.95
        Two-sided confidence level of the slope interval. [-]

    Returns
    -------
    ProportionalFit
        ``slope = sum(x*y) / sum(x**2)``; standard error ``s / sqrt(sum(x**2))`` with
        ``s**2 = sum(residuals**2) / (n - 1)``; Student-t interval with n - 1 degrees of freedom.

    Raises
    ------
    ValueError
        Fewer than 2 points, lengths differ, a value is not finite, or `x` is zero everywhere.

    References
    ----------
    .. [1] Montgomery & Runger, ch. 11, regression through the origin ([MR]_); Draper & Smith,
       ch. 1 ([DS]_). From memory.
    """
    confidence = checked_confidence(confidence)
    x, y = paired_vectors(x, y, ("x", "y"), 2, "a line through the origin")
    n = x.size
    finite_sum(x, "x")
    finite_sum(y, "y")
    with np.errstate(over="ignore", invalid="ignore"):
        sxx, syy = blocked_dot(x, x), blocked_dot(y, y)
    refuse_overflow(sxx, syy)
    if sxx == 0.0:
        raise ValueError(
            "x is zero everywhere; the slope of a line through the origin is undefined"
        )
    slope = blocked_dot(x, y) / sxx
    residuals = y - slope * x
    sse = blocked_dot(residuals, residuals)
    refuse_overflow(slope, sse)
    s = math.sqrt(sse / (n - 1))
    se = s / math.sqrt(sxx)
    t = student_t_quantile(confidence, n - 1)
    residuals.flags.writeable = False
    return ProportionalFit(
        slope=slope,
        slope_standard_error=se,
        slope_low=slope - t * se,
        slope_high=slope + t * se,
        r_squared=1.0 - sse / syy if syy > 0 else 1.0,
        residual_standard_deviation=s,
        n=n,
        confidence=confidence,
        residuals=residuals,
        t_quantile=t,
    )
