"""The reading window the tool proposes for a falling-head record, and its trend moments.

:func:`window_trends` judges the trend criterion for every window ending at the last
reading at once, from suffix sums (:class:`WindowTrends`, which depends on the readings
alone); :func:`propose_window` adds the gradient, Reynolds, flow-ratio and steady-values
criteria and proposes the longest window that meets them all (:class:`WindowProposal`).
The rule is the tool's own; the criteria are those of :mod:`kitchen.validity.checks`.

References
----------
.. [D5084] ASTM D5084, termination criteria and the table of recommended maximum hydraulic
   gradients (from memory for the clauses and the table).
.. [DS] Draper, N. R. & Smith, H. *Applied Regression Analysis*, 3rd ed., ch. 2 (t-test of
   an added regression term). From memory.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import special

from .criteria import Criteria, percent_text, recommended_maximum_gradient

__all__ = ["WindowProposal", "WindowTrends", "window_trends", "propose_window"]


@dataclass(frozen=True)
class WindowProposal:
    """The reading window the tool proposes: readings ``start`` to ``stop - 1``."""

    start: int
    stop: int
    meets_criteria: bool
    reason: str


def _suffix(values: np.ndarray) -> np.ndarray:
    return np.cumsum(values[::-1])[::-1]


def _within_critical(t: np.ndarray, dof: np.ndarray, probability: float) -> np.ndarray:
    """``t <= stdtrit(dof, probability)`` element by element, with few quantiles computed.

    The quantile of Student's t above the median falls as the degrees of freedom grow, so
    the quantiles at the fewest and the most degrees of freedom bound all the others: only
    the values of `t` between those bounds (widened by a few rounding units) need their own
    quantile. The result is the same as computing every quantile, which costs about a
    microsecond each.
    """
    ends = special.stdtrit(np.array([dof.min(), dof.max()]), probability)
    high, low = float(ends.max()) * (1 + 1e-12), float(ends.min()) * (1 - 1e-12)
    passed = t <= low
    unsure = np.flatnonzero(~passed & (t <= high))
    if unsure.size:
        passed[unsure] = t[unsure] <= special.stdtrit(dof[unsure], probability)
    return passed


@dataclass(frozen=True)
class WindowTrends:
    """What the window proposal needs of the readings alone, for every trial start.

    Built by :func:`window_trends` from the reference time and ln h; the specimen's
    dimensions do not enter, so a revised height or diameter reuses it.
    """

    n: int
    """Readings in the record. [-]"""
    starts: int
    """Trial starts: readings 0 to ``starts - 1``. [-]"""
    span: float
    """Reference time from the first reading to the last. [s]"""
    slope: np.ndarray
    """Slope of ln h on the scaled time, for each start (multiply by −scale/span for k)."""
    trend_ok: np.ndarray
    """Whether each start's window passes the trend criterion."""
    reason: str = ""
    """Why no start can be judged (too few readings), else empty."""


def window_trends(reference_time, log_head, criteria: Criteria, minimum_readings: int = 6):
    """The slope and the trend verdict of every window ending at the last reading.

    Parameters
    ----------
    reference_time : array_like
        Reference-equivalent time of every reading. [s]
    log_head : array_like
        ln of the (corrected) head of every reading. [-]
    criteria : Criteria
        ``trend_level``, ``trend_minimum_change`` and ``window_minimum_fraction``.
    minimum_readings : int
        Fewest readings in a window. [-]

    Returns
    -------
    WindowTrends

    Notes
    -----
    Every start is judged at once from suffix sums of powers of the time measured back
    from the last reading (an origin inside every window, so the centred moments lose at
    most about two digits): the slope and the quadratic term of each window come from a
    few arithmetic operations, with no refit per window. The tool's own rule.
    """
    x = np.asarray(reference_time, dtype=float)
    y = np.asarray(log_head, dtype=float)
    n = x.size
    keep = max(int(math.ceil(criteria.window_minimum_fraction * n)), minimum_readings)
    if n < minimum_readings or n - keep < 1:
        empty = np.zeros(0)
        return WindowTrends(
            n, 0, 0.0, empty, empty.astype(bool), "too few readings to leave any out"
        )
    count = n - keep + 1
    head = slice(0, count)  # the positions of the starts, without a gather
    span = float(x[-1] - x[0])
    u = (x - x[-1]) / span
    v = y - y[-1]
    u2 = u * u
    sums = [
        np.arange(n, 0, -1, dtype=float),
        *(_suffix(values) for values in (u, u2, u2 * u, u2 * u2, v, u * v, u2 * v, v * v)),
    ]
    m, s1, s2, s3, s4, sy, sxy, sxxy, syy = (values[head] for values in sums)
    mu = s1 / m
    c2 = s2 - m * mu * mu
    c3 = s3 - 3 * mu * s2 + 2 * m * mu**3
    c4 = s4 - 4 * mu * s3 + 6 * mu * mu * s2 - 3 * m * mu**4
    y_mean = sy / m
    cxy = sxy - m * mu * y_mean
    cyy = syy - m * y_mean * y_mean
    cxxy = (sxxy - 2 * mu * sxy + mu * mu * sy) - y_mean * c2
    slope = cxy / c2
    sqq = c4 - c2 * c2 / m - c3 * c3 / c2
    sqy = cxxy - c3 / c2 * cxy
    with np.errstate(divide="ignore", invalid="ignore"):
        b2 = np.where(sqq > 0, sqy / sqq, 0.0)
        sse = np.maximum(cyy - cxy * cxy / c2 - b2 * sqy, 0.0)
        se = np.sqrt(sse / (m - 3) / sqq)
        t = np.where(se > 0, b2 / se, 0.0)
        width = -u[head]  # each window spans u from u[start] to 0
        middle = 0.5 * u[head] - mu
        change = 2 * b2 * width / (slope + b2 * (2 * middle - c3 / c2))
    trend_ok = _within_critical(np.abs(t), m - 3, 1 - criteria.trend_level / 2)
    trend_ok |= np.abs(change) < criteria.trend_minimum_change
    return WindowTrends(n, count, span, slope, trend_ok)


def propose_window(
    reference_time,
    log_head,
    gradient,
    scale: float,
    criteria: Criteria,
    *,
    steady_passed: bool = True,
    minimum_readings: int = 6,
    inflow=None,
    outflow=None,
    reynolds_per_k: float = math.nan,
    trends: WindowTrends | None = None,
) -> WindowProposal:
    """The longest window ending at the last reading that meets every criterion.

    Parameters
    ----------
    reference_time : array_like
        Reference-equivalent time of every reading. [s]
    log_head : array_like
        ln of the (corrected) head of every reading. [-]
    gradient : array_like
        Hydraulic gradient at every reading. [-]
    scale : float
        a·L/A, so that k = −scale · slope of ln h on reference time. [m]
    criteria : Criteria
        Limits; ``window_minimum_fraction`` bounds how many readings may be left out.
    steady_passed : bool
        Whether the last k values meet the band (they are the same for every window).
    minimum_readings : int
        Fewest readings in a window. [-]
    inflow, outflow : array_like, optional
        Cumulative inflow and outflow volumes at each reading, NaN where not read. [m3]
    reynolds_per_k : float
        Reynolds number per unit of k·i (ρw·d10/(μ·R_T)); NaN without d10. [s/m]
    trends : WindowTrends, optional
        :func:`window_trends` of the same readings, criteria and `minimum_readings`, when
        already at hand (a record keeps it); computed here otherwise.

    Returns
    -------
    WindowProposal
        Readings ``start`` to the last; when no window meets every criterion, every
        reading, with ``meets_criteria`` False.

    Notes
    -----
    The criteria concern the final values of a test, so the proposal keeps the last
    reading and leaves out early ones; it never leaves out more than
    1 − ``window_minimum_fraction`` of the readings. The trend of every window comes
    from :func:`window_trends`; the gradient, Reynolds and flow-ratio criteria are then
    judged for every start at once. The tool's own rule.
    """
    if trends is None:
        trends = window_trends(reference_time, log_head, criteria, minimum_readings)
    n = trends.n
    if trends.reason:
        return WindowProposal(0, n, False, trends.reason)
    head = slice(0, trends.starts)
    k = -scale * trends.slope / trends.span
    limit = recommended_maximum_gradient(k, criteria.gradient_table)
    g = np.asarray(gradient, dtype=float)[head]
    gradient_ok = ~(g > limit)  # NaN limit (outside the table): not judged
    reynolds_ok = ~(reynolds_per_k * k * g > criteria.reynolds_limit)
    flow_ok = np.ones(trends.starts, dtype=bool)
    if inflow is not None and outflow is not None:
        inflow = np.asarray(inflow, dtype=float)
        outflow = np.asarray(outflow, dtype=float)
        both = np.isfinite(inflow) & np.isfinite(outflow)
        if both.sum() >= 2:
            last = np.flatnonzero(both)[-1]
            positions = np.where(both, np.arange(n), n)
            first = np.minimum.accumulate(positions[::-1])[::-1][head]
            usable = first < last
            safe = np.where(usable, first, last)
            with np.errstate(divide="ignore", invalid="ignore"):
                ratio = (outflow[last] - outflow[safe]) / (inflow[last] - inflow[safe])
            inside = (ratio >= criteria.flow_ratio_low) & (ratio <= criteria.flow_ratio_high)
            flow_ok = ~usable | inside
    passing = trends.trend_ok & gradient_ok & reynolds_ok & flow_ok & bool(steady_passed)
    if not passing.any():
        return WindowProposal(
            0,
            n,
            False,
            "no window ending at the last reading and keeping at least "
            f"{percent_text(criteria.window_minimum_fraction)} of the readings meets every "
            "criterion",
        )
    start = int(np.argmax(passing))
    return WindowProposal(
        start, n, True, "the longest window ending at the last reading that meets every criterion"
    )
