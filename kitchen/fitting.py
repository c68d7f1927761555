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


_BLOCK = 8192  # dot products run in blocks this long (see _dot)


def _dot(a, b):
    """Dot product of two long vectors, in blocks of `_BLOCK` summed in Python.

    Blocks stay below the length at which OpenBLAS hands a dot product to several threads;
    on a busy machine that hand-off can stall for milliseconds to seconds, while the blocked
    single-thread loop costs about the same as one call on an idle one.
    """
    if a.size <= _BLOCK:
        return float(np.dot(a, b))
    return float(
        sum(np.dot(a[i : i + _BLOCK], b[i : i + _BLOCK]) for i in range(0, a.size, _BLOCK))
    )


def _t_quantile(confidence, dof):
    """Two-sided Student-t quantile t_{(1+confidence)/2, dof}."""
    return float(special.stdtrit(dof, 0.5 + 0.5 * confidence))


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
    One centred pass in cache-sized blocks: the means are removed and ``sxx``, ``sxy``, ``syy``
    are dot products of the centred data. When R² is within 1e-6 of 1 the residual sum of
    squares is recomputed from the residuals instead of ``syy - slope * sxy`` to avoid
    cancellation. R² is 1 when y is constant (the line reproduces every reading).

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
    xc, yc = np.empty(n), np.empty(n)
    sxx = sxy = syy = 0.0
    with np.errstate(over="ignore", invalid="ignore"):
        for i in range(0, n, _BLOCK):  # centre and sum each block while it is in cache
            xb = np.subtract(x[i : i + _BLOCK], x_mean, out=xc[i : i + _BLOCK])
            yb = np.subtract(y[i : i + _BLOCK], y_mean, out=yc[i : i + _BLOCK])
            sxx += np.dot(xb, xb)
            sxy += np.dot(xb, yb)
            syy += np.dot(yb, yb)
    sxx, sxy, syy = float(sxx), float(sxy), float(syy)
    _too_large(sxx, sxy, syy)
    if not sxx > n * (64.0 * _EPS * x_mean) ** 2:
        raise ValueError(
            f"x does not vary (every value is {float(x[0])!r}); the slope of a line is undefined"
        )
    slope = sxy / sxx
    sse = syy - slope * sxy
    if sse <= 1e-6 * syy:  # nearly exact line: sum the squared residuals themselves
        sse, scratch = 0.0, np.empty(min(n, _BLOCK))
        for i in range(0, n, _BLOCK):
            r = np.multiply(xc[i : i + _BLOCK], slope, out=scratch[: min(_BLOCK, n - i)])
            np.subtract(yc[i : i + _BLOCK], r, out=r)
            sse += float(np.dot(r, r))
    return _line_result(
        n, slope, x_mean, y_mean, sxx, syy, sse, confidence, lambda: yc - slope * xc
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
    confidence = _check_confidence(confidence)
    x, y = _paired(x, y, ("x", "y"), 2, "a line through the origin")
    n = x.size
    _finite_sum(x, "x")
    _finite_sum(y, "y")
    with np.errstate(over="ignore", invalid="ignore"):
        sxx, syy = _dot(x, x), _dot(y, y)
    _too_large(sxx, syy)
    if sxx == 0.0:
        raise ValueError(
            "x is zero everywhere; the slope of a line through the origin is undefined"
        )
    slope = _dot(x, y) / sxx
    residuals = y - slope * x
    sse = _dot(residuals, residuals)
    _too_large(slope, sse)
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


# --------------------------------------------------------------------------- exponential decay
@dataclass(frozen=True)
class DecayFit:
    """Fit of ``h(t) = asymptote + (initial - asymptote) * exp(-(t - t[0]) / time_constant)``.

    Attributes
    ----------
    asymptote, asymptote_low, asymptote_high : float
        Final head h_inf and its interval (infinite on one side when the record cannot tell
        the decay from a straight line). [head unit]
    initial, initial_low, initial_high : float
        Fitted head h0 at the first reading time and its interval. [head unit]
    time_constant, time_constant_low, time_constant_high : float
        tau and its interval (upper end infinite when the rate interval reaches zero). [s]
    r_squared : float
        ``1 - sum(residuals**2) / sum((h - mean(h))**2)``. [-]
    residual_standard_deviation : float
        ``sqrt(sum(residuals**2) / (n - 3))``. [head unit]
    n : int
        Number of readings.
    confidence : float
        Confidence level of the intervals. [-]
    residuals : numpy.ndarray
        Observed minus fitted head in input order, read-only. [head unit]
    iterations : int
        Newton iterations on the full data (each one exponential per reading).
    converged : bool
        False, with the reason in `message`, when the record does not determine a decay; the
        numbers are then those of the best fit at the edge of the searched range and must not
        be reported as results.
    message : str
        Plain-language status.
    asymptote_standard_error, initial_standard_error, time_constant_standard_error : float
        Linearised standard errors. [head unit], [head unit], [s]
    start_time : float
        t[0], the time origin of the model. [s]

    Notes
    -----
    Intervals are two-sided Student-t intervals with n - 3 degrees of freedom from the
    linearised covariance ``s**2 (J^T J)^-1`` ([DS]_ ch. 24), widened for the asymptote as
    described in :func:`fit_exponential_decay`.
    """

    asymptote: float
    asymptote_low: float
    asymptote_high: float
    initial: float
    initial_low: float
    initial_high: float
    time_constant: float
    time_constant_low: float
    time_constant_high: float
    r_squared: float
    residual_standard_deviation: float
    n: int
    confidence: float
    residuals: np.ndarray = field(repr=False, compare=False)
    iterations: int
    converged: bool
    message: str
    asymptote_standard_error: float
    initial_standard_error: float
    time_constant_standard_error: float
    start_time: float

    def predict(self, t) -> np.ndarray:
        """Fitted head at times `t`. [head unit]"""
        t = np.asarray(t, dtype=np.float64)
        decay = np.exp(-(t - self.start_time) / self.time_constant)
        return self.asymptote + (self.initial - self.asymptote) * decay


_RATE_LOW = 1e-4  # lowest rate searched, in 1/record span: time constants up to 1e4 spans
_STEP_DONE = 1e-5  # a Newton step smaller than this (relative) ends the iteration
_MAX_ITERATIONS = 30


def _decay_subsample(n, head=1024, body=3072):
    """Indices and weights of a subsample whose weighted sums approximate full-data sums.

    All of the first `head` readings, then a stride through the rest ending on the last reading;
    each sample stands for the readings up to the next one.
    """
    if n <= head + body:
        return np.arange(n), np.ones(n)
    stride = -(-(n - head) // body)
    index = np.concatenate([np.arange(head), np.arange(head, n, stride)])
    if index[-1] != n - 1:
        index = np.append(index, n - 1)
    return index, np.diff(np.append(index, n)).astype(np.float64)


def _profile_sse(rates, u, hc, w):
    """Weighted residual sum of squares after the linear parameters, one per rate (rows)."""
    rates = np.atleast_1d(rates)
    g = -np.expm1(np.multiply.outer(-rates, u)) / rates[:, None]
    gc = g - (np.einsum("ij,j->i", g, w) / w.sum())[:, None]  # einsum: no BLAS threads
    var = np.einsum("ij,ij,j->i", gc, gc, w)
    slope = np.divide(np.einsum("ij,j->i", gc, w * hc), var, out=np.zeros_like(var), where=var > 0)
    r = hc - slope[:, None] * gc
    return np.einsum("ij,ij,j->i", r, r, w)


def _decay_terms(rate, u, hc, h_sum, work):
    """Linear parameters, Newton system and Gauss-Newton matrix at one rate (full data).

    `work` holds four scratch arrays, filled as g, dg/drate, d2g/drate2 and u*exp(-rate u);
    the data are processed in blocks so that each block's terms are summed while in cache.
    """
    n = u.size
    inverse = 1.0 / rate
    sums = np.zeros(10)
    dot = np.dot
    for i in range(0, n, _BLOCK):
        j = i + _BLOCK
        uu, hh = u[i:j], hc[i:j]
        g, gk, gkk, e = (row[i:j] for row in work)
        np.multiply(uu, -rate, out=e)
        np.exp(e, out=e)
        np.subtract(1.0, e, out=g)
        g *= inverse  # g = (1 - e) / rate
        np.multiply(uu, e, out=e)  # e now holds u * exp(-rate u)
        np.subtract(e, g, out=gk)
        gk *= inverse  # dg/drate = (u e - g) / rate
        np.multiply(uu, e, out=gkk)
        gkk += gk
        gkk += gk
        gkk *= -inverse  # d2g/drate2 = -(u**2 e + 2 dg/drate) / rate
        sums += (
            g.sum(),
            gk.sum(),
            gkk.sum(),
            dot(g, g),
            dot(g, gk),
            dot(gk, gk),
            dot(g, gkk),
            dot(hh, g),
            dot(hh, gk),
            dot(hh, gkk),
        )
    sg, sk, skk2, sgg, sgk, skk, sgkk, shg, shk, shkk = sums.tolist()
    determinant = n * sgg - sg * sg
    b = (n * shg - h_sum * sg) / determinant if determinant > 0 else math.nan
    a = (h_sum - b * sg) / n
    rk = shk - a * sk - b * sgk
    rkk = shkk - a * skk2 - b * sgkk
    gauss_newton = np.array([[n, sg, b * sk], [sg, sgg, b * sgk], [b * sk, b * sgk, b * b * skk]])
    hessian = gauss_newton.copy()
    hessian[1, 2] = hessian[2, 1] = b * sgk - rk
    hessian[2, 2] = b * b * skk - b * rkk
    # minus half the gradient of sum(r**2) in (A, B, rate); the first two vanish up to rounding
    gradient = np.array([h_sum - n * a - b * sg, shg - a * sg - b * sgg, b * rk])
    sse_drop = 2 * a * h_sum + 2 * b * shg - n * a * a - 2 * a * b * sg - b * b * sgg
    return a, b, gauss_newton, hessian, gradient, sse_drop


def _newton_step(hessian, gauss_newton, gradient):
    try:
        np.linalg.cholesky(hessian)
        return np.linalg.solve(hessian, gradient), True
    except np.linalg.LinAlgError:
        pass
    try:
        return np.linalg.solve(gauss_newton, gradient), False
    except np.linalg.LinAlgError:
        return np.zeros(3), False


def fit_exponential_decay(t, h, confidence=0.95) -> DecayFit:
    """Fit ``h(t) = h_inf + (h0 - h_inf) exp(-(t - t[0]) / tau)`` by least squares.

    No start values are needed: for a fixed rate 1/tau the model is linear in ``h0`` and
    ``h_inf``, so only the rate is searched (variable projection, [GP]_).

    Parameters
    ----------
    t : array_like
        Reading times, not decreasing, at least 4 readings and a positive span. [s]
    h : array_like
        Heads (or head differences) at those times. [m]
    confidence : float, default 0.95
        Two-sided confidence level of the intervals. [-]

    Returns
    -------
    DecayFit
        Asymptote h_inf [m], initial head h0 [m] and time constant tau [s] with intervals,
        R², residual standard deviation [m], residuals [m], iteration count and status.

    Raises
    ------
    ValueError
        Fewer than 4 readings, lengths differ, a value is not finite, times decrease or do not
        span a positive interval, or the heads are all equal.

    Notes
    -----
    Internally ``h = A + B g(k, u)`` with ``u = (t - t[0]) / span``, ``k = span / tau`` and
    ``g = (1 - exp(-k u)) / k``, a basis that stays well conditioned as tau grows; then
    ``h0 = A`` and ``h_inf = A + B / k``. The rate is located on a subsample (the first 1024
    readings and a weighted stride through the rest): a grid in log k from 1e-4 to 40 over the
    shortest sampling interval (in record spans), then a bounded scalar search between the best
    grid neighbours. Newton steps on the full data follow, each with one exponential per
    reading; the reduced step is the rate part of the full three-parameter Newton step taken
    where the linear parameters are optimal ([GP]_). Once a step is below 1e-5 of the rate it is
    applied with a second-order update of the residuals and iteration stops.

    The interval for tau is the t interval of the rate, mapped to tau; its upper end is infinite
    when the rate interval reaches zero (the record cannot tell the decay from a straight line).
    The asymptote's linearised interval is widened to include the asymptotes of the refitted
    model at both ends of the rate interval (first order in A and B, exact in 1/k), and is
    unbounded on one side when the rate interval reaches zero: the linearisation alone badly
    understates how little a nearly straight record says about h_inf. When the best rate lies
    at an end of the searched range, or the head settles within the first reading interval,
    the fit is reported with ``converged=False``.

    References
    ----------
    .. [1] Golub & Pereyra (1973), SIAM J. Numer. Anal. 10(2):413 ([GP]_).
    .. [2] Draper & Smith, ch. 24, linearised covariance of nonlinear least squares ([DS]_).
       From memory.
    """
    confidence = _check_confidence(confidence)
    t, h = _paired(t, h, ("t", "h"), 4, "an exponential decay fit (three parameters)")
    n = t.size
    _finite_sum(t, "t")
    h_mean = _finite_sum(h, "h") / n
    steps = np.diff(t)
    if (steps < 0).any():
        i = int(np.flatnonzero(steps < 0)[0]) + 1
        raise ValueError(f"times must not decrease: t[{i}] = {t[i]} comes after {t[i - 1]}")
    distinct = np.count_nonzero(steps) + 1
    del steps
    if distinct < 3:
        raise ValueError(
            f"the readings are at {distinct} distinct time(s); a decay needs at least 3"
        )
    span = float(t[-1] - t[0])
    hc = h - h_mean
    with np.errstate(over="ignore", invalid="ignore"):
        shh = _dot(hc, hc)
    _too_large(shh, span)
    if not shh > n * (64.0 * _EPS * h_mean) ** 2:
        raise ValueError(f"the head does not change (every value is {h[0]!r}); nothing decays")
    u = (t - t[0]) * (1.0 / span)

    rate, rate_high, head_range = _locate_rate(u, h)
    work = [np.empty(n) for _ in range(4)]  # separate blocks: large ones are not recycled
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        status, iterations, rate, (a, b, jtj), step = _polish_rate(
            rate, rate_high, u, hc, shh, work
        )

    # apply the last step; residuals updated to second order in the rate step
    d_a, d_b, d_rate = (float(v) for v in step)
    a, b, rate_final = a + d_a, b + d_b, rate + d_rate
    g, gk, gkk, scratch = work
    residuals = hc - a
    for coefficient, row in ((b, g), (b * d_rate, gk), (0.5 * b * d_rate * d_rate, gkk)):
        if coefficient:
            np.multiply(row, coefficient, out=scratch)
            residuals -= scratch
    del work, g, gk, gkk, scratch
    sse = _dot(residuals, residuals)
    residuals.flags.writeable = False

    message = {
        "edge": _EDGE_MESSAGES["low" if rate <= _RATE_LOW else "high"],
        "limit": f"no convergence after {iterations} full-data iterations",
        "failed": "numerical failure: the normal equations became singular",
        "done": f"converged after {iterations} full-data Newton iteration(s)",
    }[status]
    return _decay_result(
        (h_mean + a, b, rate_final, span, float(t[0])),
        jtj,
        (sse, shh, n, confidence, residuals),
        (iterations, status == "done", message, head_range, h, rate_high),
    )


def _polish_rate(rate, rate_high, u, hc, shh, work):
    """Safeguarded Newton iteration on the rate over the full data, from the subsample rate."""
    h_sum = float(hc.sum())
    iterations, best_sse, last_change = 0, math.inf, 0.0
    while True:
        iterations += 1
        a, b, jtj, hessian, gradient, sse_drop = _decay_terms(rate, u, hc, h_sum, work)
        if not (math.isfinite(a) and math.isfinite(b) and np.isfinite(hessian).all()):
            return "failed", iterations, rate, (a, b, jtj), np.zeros(3)
        sse = shh - sse_drop
        if sse > best_sse * (1 + 1e-9) + 1e-13 * shh and iterations < _MAX_ITERATIONS:
            last_change *= 0.5  # the last step raised the sum of squares: go back half of it
            rate -= last_change
            continue
        best_sse = sse
        step, exact = _newton_step(hessian, jtj, gradient)
        d_rate = float(step[2])
        if (rate <= _RATE_LOW and d_rate < 0) or (rate >= rate_high and d_rate > 0):
            return "edge", iterations, rate, (a, b, jtj), np.zeros(3)
        if abs(d_rate) <= (_STEP_DONE if exact else 1e-10) * rate:
            return "done", iterations, rate, (a, b, jtj), step if exact else np.zeros(3)
        if iterations >= _MAX_ITERATIONS:
            return "limit", iterations, rate, (a, b, jtj), np.zeros(3)
        new_rate = rate + max(-0.5 * rate, min(d_rate, rate))
        new_rate = min(max(new_rate, _RATE_LOW), rate_high)
        last_change, rate = new_rate - rate, new_rate


_EDGE_MESSAGES = {
    "low": (
        "no decay resolved: the record is as straight as a line (time constant beyond"
        f" {1 / _RATE_LOW:.0f} record spans) or bends away from an asymptote; the asymptote and"
        " time constant are undetermined - fit a straight line instead"
    ),
    "high": (
        "no decay resolved: the head reaches its final level within the first reading"
        " interval, so the time constant cannot be measured from these readings"
    ),
}


def _locate_rate(u, h):
    """Rate (1/record span) minimising the profiled sum of squares on a weighted subsample."""
    index, w = _decay_subsample(u.size)
    us, hs = u[index], h[index]
    hs = hs - np.dot(w, hs) / w.sum()
    gaps = np.diff(us)
    rate_high = max(40.0 / gaps[gaps > 0].min(), 100.0 * _RATE_LOW)  # exp(-40) ~ 4e-18
    grid = np.geomspace(_RATE_LOW, rate_high, int(5 * math.log10(rate_high / _RATE_LOW)) + 2)
    best = int(np.argmin(_profile_sse(grid, us, hs, w)))
    low, high = grid[max(best - 1, 0)], grid[min(best + 1, grid.size - 1)]
    found = optimize.minimize_scalar(
        lambda log_rate: _profile_sse(math.exp(log_rate), us, hs, w)[0],
        bounds=(math.log(low), math.log(high)),
        method="bounded",
        options={"xatol": 1e-5},
    )
    rate = min(max(math.exp(found.x), _RATE_LOW), rate_high)
    return rate, rate_high, float(np.ptp(hs))


def _decay_result(parameters, jtj, fit, status):
    """Intervals from the linearised covariance and the DecayFit record."""
    initial, b, rate, span, start_time = parameters
    sse, shh, n, confidence, residuals = fit
    iterations, converged, message, head_range, h, rate_high = status
    dof = n - 3
    s = math.sqrt(sse / dof)
    tq = _t_quantile(confidence, dof)
    asymptote = initial + b / rate
    with np.errstate(all="ignore"):
        try:
            covariance = s * s * np.linalg.inv(jtj)
        except np.linalg.LinAlgError:
            covariance = np.full((3, 3), np.inf)
        gradient = np.array([1.0, 1.0 / rate, -b / rate**2])  # of the asymptote in (A, B, rate)
        se_initial = math.sqrt(max(covariance[0, 0], 0.0))
        se_asymptote = math.sqrt(max(float(gradient @ covariance @ gradient), 0.0))
        se_rate = math.sqrt(max(covariance[2, 2], 0.0))
        path = -np.linalg.solve(jtj[:2, :2], jtj[:2, 2])  # d(A, B)/d rate with the fit refitted
    rate_low, rate_up = rate - tq * se_rate, rate + tq * se_rate
    low, high = asymptote - tq * se_asymptote, asymptote + tq * se_asymptote
    # widen to the asymptotes implied along the profile by the ends of the rate interval
    for end in (rate_low, rate_up):
        if 0 < end < math.inf:
            implied = initial + path[0] * (end - rate) + (b + path[1] * (end - rate)) / end
            low, high = min(low, implied), max(high, implied)
        elif end <= 0 and b - path[1] * rate < 0:  # towards zero rate the asymptote runs to -inf
            low = -math.inf
        elif end <= 0:
            high = math.inf
    if rate > 0.35 * rate_high:  # exp(-rate * shortest interval) < 1e-6: only a final level
        converged, message = False, _EDGE_MESSAGES["high"]
    elif not all(math.isfinite(v) for v in (se_initial, se_asymptote, se_rate)):
        converged = False
        message = "the readings do not determine all three parameters (singular Jacobian)"
    elif converged and high - low > 10 * head_range and high - low > 10 * np.ptp(h):
        message += (
            "; the asymptote is poorly determined (its interval is wider than ten times the"
            " range of the heads): the record is nearly a straight line"
        )
    if not all(math.isfinite(float(v)) for v in (asymptote, initial, rate, s)):
        converged = False
        message = "numerical failure: the fit produced non-finite values; " + message
    return DecayFit(
        asymptote=float(asymptote),
        asymptote_low=float(low),
        asymptote_high=float(high),
        initial=float(initial),
        initial_low=float(initial - tq * se_initial),
        initial_high=float(initial + tq * se_initial),
        time_constant=span / rate,
        time_constant_low=span / rate_up,
        time_constant_high=span / rate_low if rate_low > 0 else math.inf,
        r_squared=1.0 - sse / shh,
        residual_standard_deviation=s,
        n=n,
        confidence=confidence,
        residuals=residuals,
        iterations=iterations,
        converged=converged,
        message=message,
        asymptote_standard_error=se_asymptote,
        initial_standard_error=se_initial,
        time_constant_standard_error=span * se_rate / rate**2,
        start_time=start_time,
    )
