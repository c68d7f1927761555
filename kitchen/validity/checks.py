"""Is the test valid: termination criteria, fit diagnostics and their verdicts in words.

The criteria follow ASTM D5084's termination criteria (from memory, high confidence):
at least four consecutive k values within ±25 % of their mean (±50 % below 1×10⁻¹⁰ m/s),
no significant trend, outflow/inflow between 0.75 and 1.25 where both are measured; the
hydraulic gradient against the standard's recommended maximum for the measured k; and the
Reynolds number on d10 below 1 for Darcy's law to hold (Bear 1972). Every limit is a field
of :class:`Criteria`, with the standard's value as default, so that a project
specification with other limits can be followed.

The standard gives no numeric test for a trend; the tests here are the tool's own and
every sentence that uses one says so.

This module holds the checks: steady values, the trend, outflow/inflow, the gradient, the
Reynolds number, k against gradient, and :func:`is_valid` over their verdicts. The limits
and :class:`Verdict` are in :mod:`kitchen.validity.criteria`, the curvature and runs tests
in :mod:`kitchen.fits.curvature`, the window proposal in
:mod:`kitchen.validity.window_proposal`.

References
----------
.. [D5084] ASTM D5084, Standard Test Methods for Measurement of Hydraulic Conductivity of
   Saturated Porous Materials Using a Flexible Wall Permeameter: termination criteria and
   the table of recommended maximum hydraulic gradients (from memory for the clauses and
   the table).
.. [Bear] Bear, J. (1972). *Dynamics of Fluids in Porous Media*, Elsevier, §5.11 (Darcy's
   law holds for a Reynolds number on a grain diameter below about 1). From memory.
.. [DS] Draper, N. R. & Smith, H. *Applied Regression Analysis*, 3rd ed., ch. 1 and 2
   (t-test of an added regression term) and ch. 7 (runs test on residuals). From memory.
.. [WW] Wald, A. & Wolfowitz, J. (1940). On a test whether two samples are from the same
   population. Ann. Math. Statist. 11(2), 147-162 (number of runs, its mean and variance).
"""

from __future__ import annotations

import math

import numpy as np

from kitchen.fits import CurvatureTest, LinearFit, fit_line

from .criteria import Criteria, Verdict, percent_text, recommended_maximum_gradient, signed_percent

__all__ = [
    "reynolds_number",
    "steady_values_check",
    "trend_check",
    "flow_ratio_check",
    "gradient_check",
    "reynolds_check",
    "datum_check",
    "gradient_independence_check",
    "is_valid",
]


def reynolds_number(darcy_velocity, d10, water_density, water_viscosity):
    """Reynolds number of flow through a soil on its effective grain size.

    Parameters
    ----------
    darcy_velocity : float or array_like
        Darcy (discharge) velocity. [m/s]
    d10 : float or array_like
        Effective grain size. [m]
    water_density : float or array_like
        Water density. [kg/m3]
    water_viscosity : float or array_like
        Dynamic viscosity of water. [Pa s]

    Returns
    -------
    float or array_like
        Re = ρw·v·d10/μ. [-]

    References
    ----------
    Bear (1972), *Dynamics of Fluids in Porous Media*, §5.11 (from memory).
    """
    return water_density * darcy_velocity * d10 / water_viscosity


def steady_values_check(values, criteria: Criteria, spacing: str = "") -> Verdict:
    """The last ``steady_count`` k values within the band about their mean.

    Parameters
    ----------
    values : array_like
        Consecutive k values, in time order (only the last ``steady_count`` are judged).
        [m/s]
    criteria : Criteria
        Limits.
    spacing : str, optional
        Words on how the values were formed, appended to the sentence.

    Returns
    -------
    Verdict
        ``steady_values``; for example "4 of the last 4 k values within ±25 % of their mean
        (6.7e-09 m/s): yes — largest deviation 8 %".

    References
    ----------
    ASTM D5084, termination criteria (from memory).
    """
    values = np.asarray(values, dtype=float)
    count = criteria.steady_count
    tail = f" ({spacing})" if spacing else ""
    if values.size < count:
        return Verdict(
            "steady_values",
            False,
            f"{count} consecutive k values within the band: no — only {values.size} k value(s) "
            f"in the readings used, {count} needed{tail}",
        )
    last = values[-count:]
    mean = float(last.mean())
    if not mean > 0:
        return Verdict(
            "steady_values",
            False,
            f"{count} consecutive k values within the band: no — the last {count} values "
            f"average {mean:.3g} m/s (no flow through the specimen){tail}",
        )
    band = criteria.band(mean)
    deviation = np.abs(last - mean) / mean
    inside = int(np.count_nonzero(deviation <= band))
    passed = inside == count
    wider = ""
    if band != criteria.steady_tolerance:
        wider = f"; ±{percent_text(band)} as k is below {criteria.low_k_threshold:.0e} m/s"
    sentence = (
        f"{inside} of the last {count} k values within ±{percent_text(band)} of their mean "
        f"({mean:.3g} m/s): {'yes' if passed else 'no'} — largest deviation "
        f"{percent_text(float(deviation.max()))}{wider}{tail}"
    )
    return Verdict("steady_values", passed, sentence)


def trend_check(curvature: CurvatureTest, criteria: Criteria) -> Verdict:
    """No significant trend in k: the tool's own test on the curvature of ln h.

    Parameters
    ----------
    curvature : CurvatureTest
        :func:`~kitchen.fits.curvature_test` of ln h on the reference-equivalent time over the
        window; a trend in k is a change of the slope of ln h, so the quadratic term tests it.
    criteria : Criteria
        ``trend_level`` and ``trend_minimum_change``.

    Returns
    -------
    Verdict
        ``trend``; the sentence gives the change of k across the window with its interval
        and the p-value, and names the test as the tool's own.

    References
    ----------
    ASTM D5084 asks for no significant trend and gives no test (from memory); the test is
    the tool's own, after Draper & Smith, ch. 2 (from memory).
    """
    significant = curvature.p_value < criteria.trend_level
    large = abs(curvature.change) >= criteria.trend_minimum_change
    trend = significant and large
    p = "p < 0.001" if curvature.p_value < 0.001 else f"p = {curvature.p_value:.2g}"
    low, high = curvature.change_low, curvature.change_high
    if low > 0 or high < 0:
        word = "rises" if curvature.change > 0 else "falls"
        ends = sorted((abs(low), abs(high)))
        change = (
            f"k {word} {percent_text(abs(curvature.change))} from the first to the last reading "
            f"({percent_text(1 - curvature.level)} interval {ends[0] * 100:.1f} to "
            f"{ends[1] * 100:.1f} %)"
        )
    else:
        change = (
            f"k changes {signed_percent(curvature.change)} from the first to the last reading "
            f"({percent_text(1 - curvature.level)} interval {signed_percent(low)} to "
            f"{signed_percent(high)})"
        )
    gate = (
        f" and a change of at least {percent_text(criteria.trend_minimum_change)}"
        if criteria.trend_minimum_change
        else ""
    )
    sentence = (
        f"no significant trend in k over the readings used: {'no' if trend else 'yes'} — "
        f"{change}, {p}; the tool's own test: a quadratic term added to ln h against time, "
        f"t-test at the {percent_text(criteria.trend_level)} level{gate}"
    )
    return Verdict("trend", not bool(trend), sentence)


def flow_ratio_check(inflow: float, outflow: float, criteria: Criteria) -> Verdict:
    """Outflow over inflow within the limits, where both are measured.

    Parameters
    ----------
    inflow, outflow : float
        Volumes that entered and left the specimen over the readings used; NaN when not
        measured. [m3]
    criteria : Criteria
        ``flow_ratio_low``, ``flow_ratio_high``.

    Returns
    -------
    Verdict
        ``flow_ratio``; not applicable (None) unless both volumes are given.

    References
    ----------
    ASTM D5084, termination criteria: outflow/inflow between 0.75 and 1.25 (from memory).
    """
    low, high = criteria.flow_ratio_low, criteria.flow_ratio_high
    if not (math.isfinite(inflow) and math.isfinite(outflow)):
        return Verdict(
            "flow_ratio",
            None,
            "outflow/inflow: not judged — inflow and outflow volumes not both measured",
        )
    if not inflow > 0:
        return Verdict(
            "flow_ratio",
            False,
            f"outflow/inflow within {low:g}–{high:g}: no — no inflow recorded over the readings "
            "used",
        )
    ratio = outflow / inflow
    passed = bool(low <= ratio <= high)
    return Verdict(
        "flow_ratio",
        passed,
        f"outflow/inflow within {low:g}–{high:g}: {'yes' if passed else 'no'} — {ratio:.2f} over "
        "the readings used",
    )


def gradient_check(gradient: float, k: float, criteria: Criteria) -> Verdict:
    """Largest hydraulic gradient used against the recommended maximum for the measured k.

    Parameters
    ----------
    gradient : float
        Largest gradient of the test. [-]
    k : float
        Measured conductivity (at the reference temperature). [m/s]
    criteria : Criteria
        ``gradient_table``.

    Returns
    -------
    Verdict
        ``gradient``; not applicable (None) where k is outside the table.

    References
    ----------
    ASTM D5084, recommended maximum gradients (from memory).
    """
    limit = recommended_maximum_gradient(k, criteria.gradient_table)
    if not math.isfinite(limit):
        top = max(row[1] for row in criteria.gradient_table)
        return Verdict(
            "gradient",
            None,
            f"hydraulic gradient {gradient:.3g}: no recommended maximum — k = {k:.3g} m/s is "
            f"outside the table (up to {top:.0e} m/s)",
        )
    passed = bool(gradient <= limit)
    return Verdict(
        "gradient",
        passed,
        f"hydraulic gradient at most the recommended {limit:g} for k = {k:.3g} m/s: "
        f"{'yes' if passed else 'no'} — largest gradient {gradient:.3g} (ASTM D5084 table)",
    )


def reynolds_check(reynolds: float, criteria: Criteria) -> Verdict:
    """Reynolds number on d10 at most the limit for laminar (Darcy) flow.

    Parameters
    ----------
    reynolds : float
        Largest Reynolds number of the test; NaN when d10 is not given. [-]
    criteria : Criteria
        ``reynolds_limit``.

    Returns
    -------
    Verdict
        ``reynolds``; not applicable (None) without d10.

    References
    ----------
    Bear (1972), §5.11 (from memory).
    """
    if not math.isfinite(reynolds):
        return Verdict("reynolds", None, "Reynolds number: not computed — d10 not given")
    passed = bool(reynolds <= criteria.reynolds_limit)
    return Verdict(
        "reynolds",
        passed,
        f"Reynolds number on d10 at most {criteria.reynolds_limit:g} (laminar flow, Darcy's law "
        f"holds; Bear 1972): {'yes' if passed else 'no'} — {reynolds:.2g} at the largest velocity",
    )


def datum_check(asymptote: float, low: float, high: float, criteria: Criteria) -> Verdict:
    """The datum-fitted decay's datum h∞ within the tolerance of the datum read.

    Parameters
    ----------
    asymptote, low, high : float
        The fitted datum h∞ and the ends of its interval. [m]
    criteria : Criteria
        ``datum_tolerance``.

    Returns
    -------
    Verdict
        ``datum``: passed when the interval of h∞ reaches within ±``datum_tolerance``.

    Notes
    -----
    The decay h = h∞ + (h0 − h∞)·exp(−t/τ) corrects for a tailwater datum known only to a
    few centimetres. An early transient or a drift in k also bends ln h against time, and
    the decay absorbs it as a datum offset of tens of centimetres, with a k that can be
    twice the steady value. The tool's own rule.
    """
    tolerance = criteria.datum_tolerance
    passed = bool(low <= tolerance and high >= -tolerance)
    verdict = "yes" if passed else "no"
    return Verdict(
        "datum",
        passed,
        f"fitted datum within ±{tolerance * 1e3:.0f} mm of the datum read: {verdict} — "
        f"h∞ = {asymptote * 1e3:.0f} mm (95 % interval {low * 1e3:.0f} to {high * 1e3:.0f} mm)"
        + (
            ""
            if passed
            else "; an early transient or a drift in k, not a datum error: use the log-linear "
            "fit, or a window without the transient"
        )
        + "; the tool's own rule",
    )


def gradient_independence_check(
    gradient, velocity, criteria: Criteria, heads=None
) -> tuple[Verdict, LinearFit | None]:
    """Constant head: k does not depend on the gradient — v against i through zero.

    Parameters
    ----------
    gradient : array_like
        Gradient of each collection. [-]
    velocity : array_like
        Darcy velocity of each collection, corrected to the reference temperature. [m/s]
    criteria : Criteria
        ``trend_level`` and ``trend_minimum_change``.
    heads : array_like, optional
        Head difference of each collection; collections at one head share its reading,
        so they are averaged before the fit. Each collection on its own by default. [m]

    Returns
    -------
    verdict : Verdict
        ``gradient_independence``: a straight line of v on i with an intercept, through
        the mean of the collections at each head; k is independent of i when the
        intercept's interval includes zero (or the change of v/i it implies across the
        gradients is below ``trend_minimum_change``). Not applicable (None) with fewer
        than 3 heads.
    fit : LinearFit or None
        The line of v on i (head means).

    Notes
    -----
    Collections at one head carry one head reading, whose error is common to all of
    them; treating them as independent would make the intercept's interval too narrow.
    Averaging per head leaves one point per head, so with three heads the test has one
    degree of freedom and flags only a marked departure; the sentence gives k at each
    head so the engineer can judge the spread.

    References
    ----------
    ASTM D2434 (establish the laminar range) and D5856 (k at three gradients), from memory;
    the test on the intercept is the tool's own.
    """
    gradient = np.asarray(gradient, dtype=float)
    velocity = np.asarray(velocity, dtype=float)
    labels = np.arange(gradient.size) if heads is None else np.asarray(heads, dtype=float)
    unique, inverse = np.unique(labels, return_inverse=True)
    counts = np.bincount(inverse)
    mean_gradient = np.bincount(inverse, gradient) / counts
    mean_velocity = np.bincount(inverse, velocity) / counts
    if unique.size < 3 or np.ptp(mean_gradient) <= 1e-9 * np.abs(mean_gradient).max():
        return (
            Verdict(
                "gradient_independence",
                None,
                f"k against gradient: not judged — {unique.size} head(s); the tool's test needs "
                "three (D5856 suggests three gradients)",
            ),
            None,
        )
    fit = fit_line(mean_gradient, mean_velocity, confidence=1 - criteria.trend_level)
    k_each = mean_velocity / mean_gradient
    spread = float(np.max(np.abs(k_each - k_each.mean())) / k_each.mean())
    includes_zero = fit.intercept_low <= 0.0 <= fit.intercept_high
    implied = abs(fit.intercept) * (1 / mean_gradient.min() - 1 / mean_gradient.max()) / fit.slope
    independent = includes_zero or implied < criteria.trend_minimum_change
    sentence = (
        f"k independent of gradient ({unique.size} heads, gradients {mean_gradient.min():.3g} to "
        f"{mean_gradient.max():.3g}): {'yes' if independent else 'no'} — k at each head within "
        f"±{percent_text(spread)} of their mean; v against i has intercept {fit.intercept:.2e} m/s "
        f"({percent_text(1 - criteria.trend_level)} interval {fit.intercept_low:.2e} to "
        f"{fit.intercept_high:.2e} m/s, {'includes' if includes_zero else 'excludes'} zero); the "
        "tool's own test, on the mean of the collections at each head"
    )
    return Verdict("gradient_independence", bool(independent), sentence), fit


def is_valid(verdicts) -> bool:
    """True when every applicable verdict passed (and at least one applied)."""
    applicable = [v.passed for v in verdicts if v.passed is not None]
    return bool(applicable) and all(applicable)
