"""Least-squares fits shared by the test reductions.

Straight lines with Student-t intervals (:func:`fit_line`), lines through the origin
(:func:`fit_through_origin`), line fits over moving windows of one record in constant time per
window (:class:`WindowedLineFit`) and the three-parameter exponential decay of a head record
(:func:`fit_exponential_decay`). Every fit returns a small frozen dataclass. Pure numpy/scipy.

References
----------
.. [DS] Draper, N. R. & Smith, H. *Applied Regression Analysis*, 3rd ed., Wiley, 1998,
   ch. 1 (straight line: estimates, standard errors, t intervals, confidence band of the mean
   response) and ch. 24 (nonlinear least squares, linearised covariance). From memory.
.. [MR] Montgomery, D. C. & Runger, G. C. *Applied Statistics and Probability for Engineers*,
   ch. 11 (simple linear regression, regression through the origin). From memory.
.. [GP] Golub, G. H. & Pereyra, V. (1973). The differentiation of pseudo-inverses and nonlinear
   least squares problems whose variables separate. SIAM J. Numer. Anal. 10(2), 413-432.
.. [OG] Ogita, T., Rump, S. M. & Oishi, S. (2005). Accurate sum and dot product. SIAM J. Sci.
   Comput. 26(6), 1955-1988 (error-free TwoSum and TwoProduct). From memory.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field
from fractions import Fraction
from functools import cached_property

import numpy as np
from scipy import optimize, special

__all__ = [
    "DecayFit",
    "LinearFit",
    "ProportionalFit",
    "WindowedLineFit",
    "fit_exponential_decay",
    "fit_line",
    "fit_through_origin",
]

_EPS = np.finfo(np.float64).eps


# --------------------------------------------------------------------------- input checks
def _check_confidence(confidence):
    if not isinstance(confidence, (int, float, np.floating)) or not 0.0 < confidence < 1.0:
        raise ValueError(f"confidence must be a fraction between 0 and 1, got {confidence!r}")
    return float(confidence)


def _as_vector(values, name):
    try:
        array = np.asarray(values, dtype=np.float64)
    except (TypeError, ValueError) as error:
        raise ValueError(f"{name} must hold numbers only ({error})") from None
    if array.ndim != 1:
        raise ValueError(f"{name} must be one-dimensional, got an array of shape {array.shape}")
    return array


def _paired(x, y, names, minimum, what):
    x, y = _as_vector(x, names[0]), _as_vector(y, names[1])
    if x.size != y.size:
        raise ValueError(
            f"{names[0]} and {names[1]} must have the same length, got {x.size} and {y.size}"
        )
    if x.size < minimum:
        raise ValueError(f"{what} needs at least {minimum} points, got {x.size}")
    return x, y


def _finite_sum(array, name):
    """Sum of `array`; a non-finite sum is traced to the first offending value."""
    total = float(array.sum())
    if math.isfinite(total):
        return total
    bad = np.flatnonzero(~np.isfinite(array))
    if bad.size:
        i = int(bad[0])
        raise ValueError(f"{name}[{i}] is {array[i]}; every value must be a finite number")
    raise ValueError(f"{name} holds values too large to fit in double precision")


def _too_large(*values):
    if not all(math.isfinite(v) for v in values):
        raise ValueError("the values are too large to fit in double precision; rescale them")


def _t_quantile(confidence, dof):
    """Two-sided Student-t quantile t_{(1+confidence)/2, dof}."""
    return float(special.stdtrit(dof, 0.5 + 0.5 * confidence))


# --------------------------------------------------------------------------- straight line
@dataclass(frozen=True)
class LinearFit:
    """Ordinary least-squares line ``y = intercept + slope * x`` with Student-t intervals.

    Intervals are two-sided at `confidence`. ``residuals`` (``y - fitted``, input order) is
    computed on first access. Units follow the data: slope in [y unit / x unit].
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
            raise AttributeError("this LinearFit was built without its data")
        values = np.asarray(self._residual_source(), dtype=np.float64)
        values.flags.writeable = False
        return values

    def predict(self, x) -> np.ndarray:
        """Fitted mean response at `x`. [y unit]"""
        return self.y_mean + self.slope * (np.asarray(x, dtype=np.float64) - self.x_mean)

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


def _line_result(n, slope, x_mean, y_mean, sxx, syy, sse, confidence, residual_source):
    dof = n - 2
    s = math.sqrt(max(sse, 0.0) / dof)
    slope_se = s / math.sqrt(sxx)
    intercept_se = s * math.sqrt(1.0 / n + x_mean * x_mean / sxx)
    intercept = y_mean - slope * x_mean
    t = _t_quantile(confidence, dof)
    r_squared = 1.0 - max(sse, 0.0) / syy if syy > 0 else 1.0
    _too_large(slope, intercept, slope_se, intercept_se, r_squared)
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
    One centred pass: the means are removed and ``sxx``, ``sxy``, ``syy`` are dot products of
    the centred data. When R² is within 1e-6 of 1 the residual sum of squares is recomputed
    from the residuals instead of ``syy - slope * sxy`` to avoid cancellation. R² is 1 when y is
    constant (the line reproduces every reading).

    References
    ----------
    .. [1] Draper & Smith, *Applied Regression Analysis*, ch. 1 ([DS]_); Montgomery & Runger,
       ch. 11 ([MR]_). From memory.
    """
    confidence = _check_confidence(confidence)
    x, y = _paired(x, y, ("x", "y"), 3, "a straight-line fit")
    n = x.size
    x_mean = _finite_sum(x, "x") / n
    y_mean = _finite_sum(y, "y") / n
    xc = x - x_mean
    yc = y - y_mean
    sxx = float(np.dot(xc, xc))
    if not sxx > n * (64.0 * _EPS * abs(x_mean)) ** 2:
        raise ValueError(
            f"x does not vary (every value is {x[0]!r}); the slope of a line is undefined"
        )
    sxy = float(np.dot(xc, yc))
    syy = float(np.dot(yc, yc))
    _too_large(sxx, sxy, syy)
    slope = sxy / sxx
    sse = syy - slope * sxy
    if sse <= 1e-6 * syy:
        residuals = yc - slope * xc
        sse = float(np.dot(residuals, residuals))
    return _line_result(
        n, slope, x_mean, y_mean, sxx, syy, sse, confidence, lambda: yc - slope * xc
    )


# --------------------------------------------------------------------------- through origin
@dataclass(frozen=True)
class ProportionalFit:
    """Least-squares line through the origin ``y = slope * x`` with a Student-t interval.

    ``r_squared`` is the uncentred coefficient ``1 - sum(residuals**2) / sum(y**2)``.
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
    t_quantile: float = field(default=float("nan"), repr=False)

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
    confidence = _check_confidence(confidence)
    x, y = _paired(x, y, ("x", "y"), 2, "a line through the origin")
    n = x.size
    _finite_sum(x, "x")
    _finite_sum(y, "y")
    sxx = float(np.dot(x, x))
    if sxx == 0.0:
        raise ValueError("x is zero everywhere; the slope of a line through the origin is undefined")
    slope = float(np.dot(x, y)) / sxx
    residuals = y - slope * x
    sse = float(np.dot(residuals, residuals))
    syy = float(np.dot(y, y))
    _too_large(sxx, slope, sse, syy)
    s = math.sqrt(sse / (n - 1))
    se = s / math.sqrt(sxx)
    t = _t_quantile(confidence, n - 1)
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


# --------------------------------------------------------------------------- moving windows
def _split(a):
    """Veltkamp split: a = high + low exactly, each half with at most 26 significant bits."""
    c = 134217729.0 * a  # 2**27 + 1
    high = c - (c - a)
    return high, a - high


def _two_product(a, b, a_parts, b_parts):
    """Error-free product: a*b = p + e exactly (Dekker; [OG]_)."""
    (ah, al), (bh, bl) = a_parts, b_parts
    p = a * b
    e = ((ah * bh - p) + ah * bl + al * bh) + al * bl
    return p, e


def _compensated_prefix(a, extra=None):
    """Prefix sums as unevaluated pairs: sum(a[:k]) + sum(extra[:k]) ~= high[k] + low[k].

    ``high`` is the plain running sum; ``low`` accumulates the exact rounding error of every
    step of it (TwoSum, [OG]_), so the pair carries about twice the working precision.
    """
    high = np.zeros(a.size + 1)
    np.cumsum(a, out=high[1:])
    before, after = high[:-1], high[1:]
    b_virtual = after - before
    error = (before - (after - b_virtual)) + (a - b_virtual)
    if extra is not None:
        error += extra
    low = np.zeros(a.size + 1)
    np.cumsum(error, out=low[1:])
    if not (math.isfinite(high[-1]) and math.isfinite(low[-1])):
        raise ValueError("the values are too large to fit in double precision; rescale them")
    return high, low


class WindowedLineFit:
    """Straight-line fits over windows of one record, in constant time per window.

    Prefix sums of 1, x, y, x², xy and y² (x and y shifted by their first values) are built
    once; :meth:`fit` then gives every statistic of :func:`fit_line` for readings
    ``start .. stop-1`` from a handful of differences. Residuals are computed on access.

    Parameters
    ----------
    x : array_like
        Regressor values of the whole record, at least 3. [any unit]
    y : array_like
        Responses, same length as `x`. [any unit]

    Notes
    -----
    Plain prefix sums lose the small centred moments of a short window far from the start
    to cancellation (a window of 100 readings at 5e5 s in a record of 1e6 readings keeps about
    four digits). Here each product is split exactly (TwoProduct) and each running sum keeps its
    exact rounding errors in a second running sum (TwoSum), both from [OG]_; a window's sums are
    the exact differences of these pairs, combined in exact rational arithmetic into centred
    moments, and rounded once. The windowed results then agree with :func:`fit_line` on the
    slice to about 1e-12 relative. Memory: about 13 float arrays of the record's length.

    References
    ----------
    .. [1] Draper & Smith, ch. 1 ([DS]_), for the statistics; Ogita, Rump & Oishi ([OG]_).
    """

    def __init__(self, x, y):
        x, y = _paired(x, y, ("x", "y"), 3, "a windowed line fit")
        _finite_sum(x, "x")
        _finite_sum(y, "y")
        self.n = x.size
        self.x_reference = float(x[0])
        self.y_reference = float(y[0])
        self._x = x - self.x_reference
        self._y = y - self.y_reference
        x_parts, y_parts = _split(self._x), _split(self._y)
        self._prefix = {
            "x": _compensated_prefix(self._x),
            "y": _compensated_prefix(self._y),
            "xx": _compensated_prefix(*_two_product(self._x, self._x, x_parts, x_parts)),
            "xy": _compensated_prefix(*_two_product(self._x, self._y, x_parts, y_parts)),
            "yy": _compensated_prefix(*_two_product(self._y, self._y, y_parts, y_parts)),
        }
        # run number of equal consecutive x: a window has constant x iff its ends share a run
        self._run = np.zeros(self.n, dtype=np.int64)
        np.cumsum(self._x[1:] != self._x[:-1], out=self._run[1:])

    def _window_sum(self, key, start, stop):
        high, low = self._prefix[key]
        return (Fraction(float(high[stop])) - Fraction(float(high[start]))) + (
            Fraction(float(low[stop])) - Fraction(float(low[start]))
        )

    def fit(self, start: int, stop: int, confidence=0.95) -> LinearFit:
        """Fit a line to readings ``start .. stop-1`` (Python slice convention).

        Parameters
        ----------
        start, stop : int
            Window bounds, ``0 <= start``, ``stop <= n``, at least 3 readings. [-]
        confidence : float, default 0.95
            Two-sided confidence level. [-]

        Returns
        -------
        LinearFit
            As :func:`fit_line` on ``x[start:stop], y[start:stop]``.
        """
        confidence = _check_confidence(confidence)
        if not all(isinstance(v, (int, np.integer)) for v in (start, stop)):
            raise ValueError(f"window bounds must be integers, got {start!r} and {stop!r}")
        start, stop = int(start), int(stop)
        if not 0 <= start < stop <= self.n:
            raise ValueError(
                f"window {start}..{stop} is outside the record of {self.n} readings"
                " (need 0 <= start < stop <= n)"
            )
        m = stop - start
        if m < 3:
            raise ValueError(f"window {start}..{stop} holds {m} readings; a line needs at least 3")
        if self._run[start] == self._run[stop - 1]:
            raise ValueError(
                f"x does not vary in window {start}..{stop}; the slope of a line is undefined"
            )
        sx, sy, sxx, sxy, syy = (
            self._window_sum(k, start, stop) for k in ("x", "y", "xx", "xy", "yy")
        )
        cxx = sxx - sx * sx / m
        cxy = sxy - sx * sy / m
        cyy = syy - sy * sy / m
        sse = cyy - cxy * cxy / cxx
        slope = float(cxy / cxx)
        mean_x, mean_y = float(sx / m), float(sy / m)
        xs, ys = self._x[start:stop], self._y[start:stop]
        return _line_result(
            m,
            slope,
            float(Fraction(self.x_reference) + sx / m),
            float(Fraction(self.y_reference) + sy / m),
            float(cxx),
            float(cyy),
            float(sse),
            confidence,
            lambda: (ys - mean_y) - slope * (xs - mean_x),
        )
