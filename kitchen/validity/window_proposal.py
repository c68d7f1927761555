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


BLOCK = 1 << 13
"""Readings handled at a time by :func:`window_trends`: its working arrays (about forty)
are a block long whatever the record's length, about 3 MB in all, so a record of 10^7
readings needs no more than one of 10^5 beside the slopes and verdicts it returns; a block
of 8192 also keeps them in the processor's cache (measured: as fast as 16384, faster
than 32768)."""

PROPOSAL_BLOCK = 1 << 16
"""Trial starts judged at a time by :func:`propose_window` for the gradient and Reynolds
criteria (elementwise, so the verdicts are those of whole arrays): 512 kB an array of
them, where a record of 10^7 readings has some 5·10^6 starts."""


def _critical_bounds(dof_low: float, dof_high: float, probability: float) -> tuple[float, float]:
    """Bounds on Student's t quantile over degrees of freedom in [dof_low, dof_high].

    The quantile above the median falls as the degrees of freedom grow, so the quantiles at
    the two ends bound all the others; widened by a few rounding units.
    """
    ends = special.stdtrit(np.array([dof_low, dof_high]), probability)
    return float(ends.min()) * (1 - 1e-12), float(ends.max()) * (1 + 1e-12)


def _within_critical(t: np.ndarray, dof: np.ndarray, probability: float, bounds) -> np.ndarray:
    """``t <= stdtrit(dof, probability)`` element by element, with few quantiles computed.

    `bounds` are :func:`_critical_bounds` over every degree of freedom judged: only the
    values of `t` between them need their own quantile. The result is the same as
    computing every quantile, which costs about a microsecond each.
    """
    low, high = bounds
    passed = t <= low
    unsure = np.flatnonzero(~passed & (t <= high))
    if unsure.size:
        passed[unsure] = t[unsure] <= special.stdtrit(dof[unsure], probability)
    return passed


def _suffix_blocks(columns, n: int, count: int, block: int):
    """Suffix sums of every column in `columns`, block by block from the last reading.

    `columns(a, b)` gives new arrays (its own, summed in place) of readings ``b - 1`` down
    to ``a``: last reading first. Yields ``(a, b, sums)`` for the blocks inside the first
    `count` readings, ``sums[j][i]`` being the sum of column j over readings ``a + i`` to
    the last. The sums run one reading at a time from the last, as ``cumsum`` of the
    reversed column does, so they are the same numbers to the last bit as one
    whole-record cumulative sum; the columns come reversed, so no reversed copy of each is
    made.
    """
    carry = None
    stop = n
    while stop > 0:
        start = max(0, stop - block)
        if stop > count:  # a block outside the starts: only its totals carry on
            start = max(start, count)
        parts = columns(start, stop)
        sums = []
        for j, reverse in enumerate(parts):
            if carry is not None:
                reverse[0] += carry[j]
            np.cumsum(reverse, out=reverse)
            sums.append(reverse[::-1])
        carry = [values[0] for values in sums]
        if start < count:
            yield start, stop, sums
        stop = start


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


def window_trends(
    reference_time, log_head, criteria: Criteria, minimum_readings: int = 6, block: int = BLOCK
):
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
    span = float(x[-1] - x[0])
    x_last, y_last = x[-1], y[-1]
    probability = 1 - criteria.trend_level / 2
    bounds = _critical_bounds(n - count + 1 - 3, n - 3, probability)
    slope = np.empty(count)
    trend_ok = np.empty(count, dtype=bool)

    def columns(a: int, b: int):  # last reading first (see _suffix_blocks)
        backwards = slice(b - 1, a - 1 if a > 0 else None, -1)
        u = (x[backwards] - x_last) / span
        v = y[backwards] - y_last
        u2 = u * u
        return u, u2, u2 * u, u2 * u2, v, u * v, u2 * v, v * v

    for a, b, sums in _suffix_blocks(columns, n, count, block):
        s1, s2, s3, s4, sy, sxy, sxxy, syy = sums
        m = np.arange(n - a, n - b, -1, dtype=float)
        u_start = (x[a:b] - x_last) / span
        mu = s1 / m
        mu2 = mu * mu  # products, not powers: numpy's float power of 3 or 4 is ~50x slower
        c2 = s2 - m * mu * mu
        c3 = s3 - 3 * mu * s2 + 2 * m * (mu2 * mu)
        c4 = s4 - 4 * mu * s3 + 6 * mu2 * s2 - 3 * m * (mu2 * mu2)
        y_mean = sy / m
        cxy = sxy - m * mu * y_mean
        cyy = syy - m * y_mean * y_mean
        cxxy = (sxxy - 2 * mu * sxy + mu2 * sy) - y_mean * c2
        block_slope = cxy / c2
        sqq = c4 - c2 * c2 / m - c3 * c3 / c2
        sqy = cxxy - c3 / c2 * cxy
        with np.errstate(divide="ignore", invalid="ignore"):
            b2 = np.where(sqq > 0, sqy / sqq, 0.0)
            sse = np.maximum(cyy - cxy * cxy / c2 - b2 * sqy, 0.0)
            se = np.sqrt(sse / (m - 3) / sqq)
            t = np.where(se > 0, b2 / se, 0.0)
            width = -u_start  # each window spans u from u[start] to 0
            middle = 0.5 * u_start - mu
            change = 2 * b2 * width / (block_slope + b2 * (2 * middle - c3 / c2))
        ok = _within_critical(np.abs(t), m - 3, probability, bounds)
        ok |= np.abs(change) < criteria.trend_minimum_change
        slope[a:b] = block_slope
        trend_ok[a:b] = ok
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
        Hydraulic gradient at every reading, or at least at every trial start (the first
        ``trends.starts`` readings: only those are judged). [-]
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
    passing = np.logical_and(trends.trend_ok, flow_ok)
    g_all = np.asarray(gradient, dtype=float)
    # k, its gradient limit and the Reynolds number a block of starts at a time: a record
    # of 10^7 readings has 5·10^6 starts, and whole arrays of them held some 150 MB at once;
    # none is judged when the last k values already fail the steady check
    if not steady_passed:
        passing[:] = False
    for a in range(0, trends.starts if steady_passed else 0, PROPOSAL_BLOCK):
        b = min(a + PROPOSAL_BLOCK, trends.starts)
        k = np.multiply(trends.slope[a:b], -scale)  # −scale·slope/span
        k /= trends.span
        g = g_all[a:b]
        ok = ~(g > recommended_maximum_gradient(k, criteria.gradient_table))  # NaN: not judged
        if not math.isnan(reynolds_per_k):  # no d10: the Reynolds criterion is not judged
            ok &= ~(reynolds_per_k * k * g > criteria.reynolds_limit)
        passing[a:b] &= ok
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
