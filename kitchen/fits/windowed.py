"""Straight-line fits over moving windows of one record, in constant time per window.

:class:`WindowedLineFit` builds compensated prefix sums of one record once; each window's
fit is then a :class:`~kitchen.fits.LinearFit` with every statistic that
:func:`~kitchen.fits.fit_line` gives on the slice, from a handful of differences.

References
----------
.. [DS] Draper, N. R. & Smith, H. *Applied Regression Analysis*, 3rd ed., Wiley, 1998,
   ch. 1 (straight line: estimates, standard errors, t intervals). From memory.
.. [OG] Ogita, T., Rump, S. M. & Oishi, S. (2005). Accurate sum and dot product. SIAM J. Sci.
   Comput. 26(6), 1955-1988 (error-free TwoSum and TwoProduct). From memory.
"""

from __future__ import annotations

import math
from fractions import Fraction

import numpy as np

from ._common import checked_confidence, finite_sum, paired_vectors
from .line import LinearFit, linear_fit_from_sums

__all__ = ["WindowedLineFit"]


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


def compensated_prefix_sums(a, extra=None):
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
    once; :meth:`fit` then gives every statistic of :func:`~kitchen.fits.fit_line` for readings
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
    moments, and rounded once. The windowed results then agree with
    :func:`~kitchen.fits.fit_line` on the slice to about 1e-12 relative. Memory: about 13 float
    arrays of the record's length.

    References
    ----------
    .. [1] Draper & Smith, ch. 1 ([DS]_), for the statistics; Ogita, Rump & Oishi ([OG]_).
    """

    def __init__(self, x, y):
        x, y = paired_vectors(x, y, ("x", "y"), 3, "a windowed line fit")
        finite_sum(x, "x")
        finite_sum(y, "y")
        self.n = x.size
        self.x_reference = float(x[0])
        self.y_reference = float(y[0])
        self._x = x - self.x_reference
        self._y = y - self.y_reference
        x_parts, y_parts = _split(self._x), _split(self._y)
        self._prefix = {
            "x": compensated_prefix_sums(self._x),
            "y": compensated_prefix_sums(self._y),
            "xx": compensated_prefix_sums(*_two_product(self._x, self._x, x_parts, x_parts)),
            "xy": compensated_prefix_sums(*_two_product(self._x, self._y, x_parts, y_parts)),
            "yy": compensated_prefix_sums(*_two_product(self._y, self._y, y_parts, y_parts)),
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
            As :func:`~kitchen.fits.fit_line` on ``x[start:stop], y[start:stop]``.
        """
        confidence = checked_confidence(confidence)
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
        return linear_fit_from_sums(
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
