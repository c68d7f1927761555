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
from dataclasses import dataclass

import numpy as np
from scipy import special

from .fitting import LinearFit, fit_line

__all__ = [
    "GRADIENT_TABLE",
    "Criteria",
    "Verdict",
    "CurvatureTest",
    "RunsTest",
    "WindowProposal",
    "WindowTrends",
    "recommended_maximum_gradient",
    "reynolds_number",
    "steady_values_check",
    "curvature_test",
    "trend_check",
    "runs_test",
    "sign_runs_test",
    "flow_ratio_check",
    "gradient_check",
    "reynolds_check",
    "gradient_independence_check",
    "window_trends",
    "propose_window",
    "is_valid",
]

GRADIENT_TABLE = (
    (1e-6, 1e-5, 2.0),
    (1e-7, 1e-6, 5.0),
    (1e-8, 1e-7, 10.0),
    (1e-9, 1e-8, 20.0),
    (0.0, 1e-9, 30.0),
)
"""Recommended maximum gradient by k: rows (k from [m/s], k below [m/s], gradient).

ASTM D5084 (from memory): 1e-5 to 1e-6 m/s → 2; 1e-6 to 1e-7 → 5; 1e-7 to 1e-8 → 10;
1e-8 to 1e-9 → 20; below 1e-9 → 30. A k on a boundary takes the row it starts
(k = 1e-6 m/s → 2)."""


@dataclass(frozen=True)
class Criteria:
    """Limits of the validity criteria; defaults from ASTM D5084 where it gives one.

    Parameters
    ----------
    steady_count : int
        Consecutive k values that must lie within the band (D5084: 4). [-]
    steady_tolerance : float
        Half-width of the band about their mean (D5084: 0.25). [-]
    low_k_tolerance : float
        Half-width below ``low_k_threshold`` (D5084: 0.50). [-]
    low_k_threshold : float
        k below which the wider band applies (D5084: 1e-10). [m/s]
    trend_level : float
        Significance level of the tool's trend test (0.05). [-]
    trend_minimum_change : float
        Smallest change of k across the window counted as a trend even when significant;
        0 (default) counts every significant change. Raise it for long logged records,
        where changes too small to matter are still detectable. [-]
    flow_ratio_low, flow_ratio_high : float
        Limits of outflow/inflow (D5084: 0.75 and 1.25). [-]
    gradient_table : tuple of (float, float, float)
        Recommended maximum gradient by k, see :data:`GRADIENT_TABLE`.
    reynolds_limit : float
        Largest Reynolds number on d10 for Darcy's law (Bear 1972: about 1). [-]
    value_precision : float
        Falling head: each k value spans enough readings that the head-scale resolution
        alone makes at most this relative standard uncertainty in it (0.05; the tool's
        own rule). [-]
    window_minimum_fraction : float
        A proposed falling-head window keeps at least this fraction of the readings
        (0.5; the tool's own rule). [-]
    """

    steady_count: int = 4
    steady_tolerance: float = 0.25
    low_k_tolerance: float = 0.50
    low_k_threshold: float = 1e-10
    trend_level: float = 0.05
    trend_minimum_change: float = 0.0
    flow_ratio_low: float = 0.75
    flow_ratio_high: float = 1.25
    gradient_table: tuple[tuple[float, float, float], ...] = GRADIENT_TABLE
    reynolds_limit: float = 1.0
    value_precision: float = 0.05
    window_minimum_fraction: float = 0.5

    def __post_init__(self):
        if not isinstance(self.steady_count, (int, np.integer)) or self.steady_count < 2:
            raise ValueError(
                f"steady_count must be a whole number of at least 2, got {self.steady_count!r}"
            )
        fractions = {
            "steady_tolerance": self.steady_tolerance,
            "low_k_tolerance": self.low_k_tolerance,
            "trend_level": self.trend_level,
            "value_precision": self.value_precision,
            "window_minimum_fraction": self.window_minimum_fraction,
        }
        for name, value in fractions.items():
            if not 0.0 < value < 1.0:
                raise ValueError(f"{name} must be a fraction between 0 and 1, got {value!r}")
        if not 0.0 <= self.trend_minimum_change < 1.0:
            raise ValueError(
                "trend_minimum_change must be a fraction from 0 to 1, got "
                f"{self.trend_minimum_change!r}"
            )
        if not 0.0 < self.flow_ratio_low < 1.0 < self.flow_ratio_high:
            raise ValueError(
                "outflow/inflow limits must bracket 1 (low between 0 and 1, high above 1), got "
                f"{self.flow_ratio_low!r} and {self.flow_ratio_high!r}"
            )
        if not self.low_k_threshold > 0 or not self.reynolds_limit > 0:
            raise ValueError("low_k_threshold and reynolds_limit must be positive")
        rows = sorted(self.gradient_table, key=lambda row: row[0])
        for index, row in enumerate(rows):
            if len(row) != 3 or not (0 <= row[0] < row[1]) or not row[2] > 0:
                raise ValueError(
                    f"gradient_table row {row!r} must be (k from, k below, maximum gradient) "
                    "with 0 <= k from < k below and a positive gradient [m/s, m/s, -]"
                )
            if index and rows[index - 1][1] > row[0]:
                raise ValueError(f"gradient_table rows {rows[index - 1]!r} and {row!r} overlap")

    def band(self, k_mean: float) -> float:
        """Half-width of the steady band for values of mean ``k_mean``. [-]"""
        return self.low_k_tolerance if k_mean < self.low_k_threshold else self.steady_tolerance


@dataclass(frozen=True)
class Verdict:
    """One criterion's outcome: ``passed`` is None when it does not apply."""

    criterion: str
    passed: bool | None
    sentence: str


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


@dataclass(frozen=True)
class WindowProposal:
    """The reading window the tool proposes: readings ``start`` to ``stop - 1``."""

    start: int
    stop: int
    meets_criteria: bool
    reason: str


def recommended_maximum_gradient(k, table=GRADIENT_TABLE):
    """Recommended maximum hydraulic gradient for a conductivity.

    Parameters
    ----------
    k : float or array_like
        Hydraulic conductivity. [m/s]
    table : tuple of (float, float, float)
        Rows (k from, k below, gradient); default :data:`GRADIENT_TABLE`.

    Returns
    -------
    float or numpy.ndarray
        Gradient; NaN where k is outside the table (above 1e-5 m/s by default). [-]

    References
    ----------
    ASTM D5084, table of recommended maximum gradients (from memory).

    Examples
    --------
    >>> recommended_maximum_gradient(5e-9)
    20.0
    """
    k = np.asarray(k, dtype=float)
    out = np.full(k.shape, np.nan)
    for low, high, gradient in table:
        out = np.where((k >= low) & (k < high), gradient, out)
    return float(out) if out.ndim == 0 else out


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


def _percent(value: float) -> str:
    """A fraction in percent: whole numbers as such, else two significant digits."""
    percent = value * 100
    if abs(percent) >= 9.5 or abs(percent - round(percent)) < 1e-9:
        return f"{percent:.0f} %"
    return f"{percent:.1f} %"


def _signed(value: float) -> str:
    """A signed percentage to one decimal, without a negative zero."""
    return f"{round(value * 100, 1) + 0.0:+.1f} %"


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
        wider = f"; ±{_percent(band)} as k is below {criteria.low_k_threshold:.0e} m/s"
    sentence = (
        f"{inside} of the last {count} k values within ±{_percent(band)} of their mean "
        f"({mean:.3g} m/s): {'yes' if passed else 'no'} — largest deviation "
        f"{_percent(float(deviation.max()))}{wider}{tail}"
    )
    return Verdict("steady_values", passed, sentence)


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
    xc = np.subtract(x, line.x_mean)
    xc2 = np.multiply(xc, xc)
    s2 = line.sxx
    # einsum rather than dot: single-threaded, so no waiting on BLAS threads when the
    # machine is busy, and as fast as memory allows otherwise
    s3 = float(np.einsum("i,i->", xc2, xc))
    s4 = float(np.einsum("i,i->", xc2, xc2))
    sqq = s4 - s2 * s2 / n - s3 * s3 / s2
    sqr = float(np.einsum("i,i->", xc2, y)) - line.y_mean * s2 - line.slope * s3
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


def trend_check(curvature: CurvatureTest, criteria: Criteria) -> Verdict:
    """No significant trend in k: the tool's own test on the curvature of ln h.

    Parameters
    ----------
    curvature : CurvatureTest
        :func:`curvature_test` of ln h on the reference-equivalent time over the window;
        a trend in k is a change of the slope of ln h, so the quadratic term tests it.
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
            f"k {word} {_percent(abs(curvature.change))} from the first to the last reading "
            f"({_percent(1 - curvature.level)} interval {ends[0] * 100:.1f} to "
            f"{ends[1] * 100:.1f} %)"
        )
    else:
        change = (
            f"k changes {_signed(curvature.change)} from the first to the last reading "
            f"({_percent(1 - curvature.level)} interval {_signed(low)} to {_signed(high)})"
        )
    gate = (
        f" and a change of at least {_percent(criteria.trend_minimum_change)}"
        if criteria.trend_minimum_change
        else ""
    )
    sentence = (
        f"no significant trend in k over the readings used: {'no' if trend else 'yes'} — "
        f"{change}, {p}; the tool's own test: a quadratic term added to ln h against time, "
        f"t-test at the {_percent(criteria.trend_level)} level{gate}"
    )
    return Verdict("trend", not bool(trend), sentence)


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
        f"±{_percent(spread)} of their mean; v against i has intercept {fit.intercept:.2e} m/s "
        f"({_percent(1 - criteria.trend_level)} interval {fit.intercept_low:.2e} to "
        f"{fit.intercept_high:.2e} m/s, {'includes' if includes_zero else 'excludes'} zero); the "
        "tool's own test, on the mean of the collections at each head"
    )
    return Verdict("gradient_independence", bool(independent), sentence), fit


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
            f"{_percent(criteria.window_minimum_fraction)} of the readings meets every criterion",
        )
    start = int(np.argmax(passing))
    return WindowProposal(
        start, n, True, "the longest window ending at the last reading that meets every criterion"
    )


def is_valid(verdicts) -> bool:
    """True when every applicable verdict passed (and at least one applied)."""
    applicable = [v.passed for v in verdicts if v.passed is not None]
    return bool(applicable) and all(applicable)
