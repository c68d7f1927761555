"""What one reading window of a falling-head record gives, and the evidence it is built from.

:class:`FallingHeadAnalysis` holds everything one window of one specimen gives: k with its
95 % interval, the fit and its diagnostics, the incremental k, the verdicts, and what a
chart needs. The functions here form parts of that evidence, most from a prepared
:class:`~kitchen.reduction.falling_head_record.FallingHeadRecord` (their first argument): the k
values the steady-values criterion judges (:func:`last_k_values`), the interval of k
(:func:`window_interval`), the curvature diagnosis in plain words
(:func:`curvature_diagnosis`), and what the full record shows when a proposed window leaves
readings out (:func:`full_record_evidence`, the ``full_record`` criterion).
:mod:`kitchen.reduction.falling_head_record` puts them together with the outflow/inflow
verdict.

References
----------
ASTM D5084, Methods B and C, termination criteria (from memory for the clauses).
JCGM 100:2008 (GUM) for the interval (:func:`kitchen.uncertainty.conductivity_interval`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from kitchen.fits import (
    CurvatureTest,
    DecayFit,
    LinearFit,
    RunsTest,
    curvature_test,
)
from kitchen.uncertainty import (
    InputQuantity,
    UncertaintyResult,
    conductivity_interval,
    rectangular_quantity,
)
from kitchen.validity import Verdict, is_valid, percent_text

from .falling_head_formulas import span_conductivity

__all__ = ["FallingHeadAnalysis"]


@dataclass(frozen=True, eq=False)
class FallingHeadAnalysis:
    """Everything one reading window of one specimen gives: k, its evidence, its chart.

    Arrays ``time``, ``head``, ``corrected_head``, ``reference_time`` cover every reading;
    ``start``/``stop`` mark the window (readings ``start`` to ``stop - 1``).
    ``increment_time``/``increment_k`` are k between successive readings over the whole
    record, at the reference temperature (formed when read, from ``scale`` = a·L/A: a
    record of 10⁶ readings does not hold two more arrays of its length for a chart that may
    never be drawn); ``value_time``/``value_k`` are the last k values
    of the window, the ones the steady-values criterion judges (readings ``value_step``
    apart, counted back from the window's last reading).
    ``line`` is the straight line of ln(corrected head) on reference time over the window
    (the fit itself for ``fit_kind == "log_linear"``; a diagnostic for ``"datum"``);
    ``decay`` the datum-fitted decay (None for the log-linear fit). ``asymptote`` is h∞
    (0 for the log-linear fit). ``verdicts`` hold every criterion (with ``full_record``
    where a proposed window leaves readings out: whether it hides a fault of the whole
    record, :func:`full_record_evidence`); ``notes`` qualify the
    data and the fit, ``diagnosis`` is the plain-words curvature warning ("" when the
    curvature tests pass), and both go into ``checks``; ``method_notes`` say how k was
    obtained (window, fit, capillary rise).
    """

    specimen: str
    fit_kind: str
    start: int
    stop: int
    window_proposed: bool
    time: np.ndarray
    head: np.ndarray
    reference_time: np.ndarray
    capillary_rise: float
    asymptote: float
    asymptote_low: float
    asymptote_high: float
    scale: float
    value_time: np.ndarray
    value_k: np.ndarray
    value_step: int
    line: LinearFit | None
    decay: DecayFit | None
    k: float
    k_reference: float
    k_reference_low: float
    k_reference_high: float
    interval: UncertaintyResult
    r_squared: float
    curvature: CurvatureTest | None
    runs: RunsTest | None
    verdicts: tuple[Verdict, ...]
    notes: tuple[str, ...]
    diagnosis: str
    method_notes: tuple[str, ...]
    standpipe_area: float
    gradient_start: float
    gradient_end: float
    temperature: float
    reynolds: float

    @property
    def n(self) -> int:
        """Readings in the window."""
        return self.stop - self.start

    @property
    def valid(self) -> bool:
        """True when every applicable criterion passes."""
        return is_valid(self.verdicts)

    @property
    def checks(self) -> tuple[str, ...]:
        """The failed criteria in words, then the notes on the data and the fit."""
        failed = tuple(v.sentence for v in self.verdicts if v.passed is False)
        return failed + self.notes + ((self.diagnosis,) if self.diagnosis else ())

    @property
    def window_time(self) -> np.ndarray:
        """Reading times in the window. [s]"""
        return self.time[self.start : self.stop]

    @property
    def corrected_head(self) -> np.ndarray:
        """Heads less the capillary rise, every reading (formed when read). [m]"""
        return self.head - self.capillary_rise if self.capillary_rise else self.head

    @property
    def increment_time(self) -> np.ndarray:
        """Middle time of each pair of successive readings. [s]"""
        return 0.5 * (self.time[1:] + self.time[:-1])

    @property
    def increment_k(self) -> np.ndarray:
        """k between successive readings at the reference temperature. [m/s]

        ``scale · −Δln(h − h∞) / Δτ`` over each pair of readings (h the corrected head, τ
        the reference time; h∞ the fitted datum, 0 for the log-linear fit): the slope of
        the falling-head law between two readings (ASTM D5084 Method C, from memory). NaN
        where the head is at or below h∞.
        """
        head = self.corrected_head
        with np.errstate(divide="ignore", invalid="ignore"):
            log_head = np.log(head - self.asymptote if self.decay is not None else head)
            return self.scale * -np.diff(log_head) / np.diff(self.reference_time)

    @property
    def fitted_head(self) -> np.ndarray:
        """The fitted head at each reading of the window, as recorded (with h∞ and hc). [m]

        Formed when read, not kept: an analysis of 10⁶ readings holds no array of the
        window's length for a chart drawn once."""
        return self.fitted_head_at(slice(None))

    def fitted_head_at(self, positions) -> np.ndarray:
        """The fitted head at some readings of the window (`positions` counted from its
        first reading: indices or a slice), the same numbers as :attr:`fitted_head` there;
        a chart's line of a few hundred points needs no array of the window's length. [m]"""
        tau = self.reference_time[self.start : self.stop]
        at = tau[positions]
        if self.decay is not None:
            return self.capillary_rise + self.decay.predict(at)
        if self.line is not None:
            fitted = self.line.predict(at)  # hc + exp(fitted ln h), in that one array
            np.exp(fitted, out=fitted)
            fitted += self.capillary_rise
            return fitted
        h = self.head[self.start : self.start + 2] - self.capillary_rise
        rate = np.log(h[0] / h[1]) / (tau[1] - tau[0])
        return self.capillary_rise + h[0] * np.exp(-rate * (at - tau[0]))

    @property
    def head_residuals(self) -> np.ndarray:
        """Recorded minus fitted head over the window. [m]"""
        return self.head[self.start : self.stop] - self.fitted_head


@dataclass(frozen=True)
class LastKValues:
    """The last k values of a window, the ones the steady-values criterion judges.

    ``time`` holds their middle times [s] and ``k`` the values at the reference temperature
    [m/s], oldest first; each spans ``step`` reading intervals; ``words`` say how they are
    spaced, for the verdict.
    """

    time: np.ndarray
    k: np.ndarray
    step: int
    words: str


def last_k_values(record, start, stop, heads, log_head, head_scatter, slope) -> LastKValues:
    """The k values judged by the steady-values criterion, and words on how they are formed.

    Parameters
    ----------
    record : FallingHeadRecord
        The prepared record (reference time, reading times, scale a·L/A, settings).
    start, stop : int
        The window: readings ``start`` to ``stop - 1``. [-]
    heads, log_head : numpy.ndarray
        The heads the fit uses (less the capillary rise, and less h∞ for the datum-fitted
        decay) at every reading of the record, and their logarithm. [m], [-]
    head_scatter : float
        Standard deviation of the readings' heads about the window's fit, as observed
        (NaN when the window has too few readings to show it). [m]
    slope : float
        Slope of ln h on the reference time over the window. [1/s]

    Returns
    -------
    LastKValues
        The last ``criteria.steady_count`` values, oldest first, each spanning ``step``
        reading intervals.

    Notes
    -----
    Each value is the least-squares k of one span of readings
    (:func:`~kitchen.reduction.falling_head_formulas.span_conductivity`), the spans counted
    back from the window's last reading and sharing their boundary readings. A span is made
    just long enough that the scatter of its k, s/(h·√Sττ·|b|) with s the observed head
    scatter about the fit, h the head at the span's end, Sττ the spread of the span's
    reference times and b the window's slope, is at most ``criteria.value_precision`` of k
    (5 % by default, a fifth of the ±25 % band, so that noise alone almost never moves a
    value out of it); the spans are never longer than a quarter of the window.

    ASTM D5084 forms each of the four k values from two readings, as a manual test reads
    them; it gives no rule for a logger's record, in which two single readings close in
    time differ by little more than their own scatter and a value between them can be far
    off, or negative, on a perfectly steady test. The spans and the least-squares fit over
    every reading of a span are the tool's own construction; with readings far apart
    beside their scatter the spans shrink to two readings and the values are the
    standard's.

    References
    ----------
    ASTM D5084, termination criteria: the last k values steady (from memory for the clause).
    Draper & Smith, *Applied Regression Analysis*, 3rd ed., ch. 1: the standard error of a
    least-squares slope, s/√Sxx (from memory).
    """
    criteria = record.settings.criteria
    count = criteria.steady_count
    precision = criteria.value_precision
    n = stop - start
    cap = max((n - 1) // count, 1)
    step, worst = cap, math.nan
    tau = record.reference_time
    if n - 1 >= count and math.isfinite(head_scatter) and slope < 0:
        step, worst = _shortest_span(
            tau, heads, start, stop, count, head_scatter, -slope, precision
        )
    fit = f"a least-squares fit over {step + 1} readings"
    if step == 1:
        fit = "two successive readings"
    if math.isfinite(worst):
        words = (
            f"each from {fit}: with the readings' scatter of {head_scatter * 1e3:.2g} mm about "
            f"the fit, at most {percent_text(max(worst, 0.0))} standard uncertainty in each"
        )
        if worst > precision:
            words += (
                f", more than the {percent_text(precision)} aimed at: the readings used allow no "
                "longer spans"
            )
    else:
        words = f"each from {fit}"
    sl = slice(start, stop)
    time, k = span_conductivity(record.time[sl], tau[sl], log_head[sl], record.scale, step, count)
    return LastKValues(time, k, step, words)


def _shortest_span(tau, heads, start, stop, count, head_scatter, rate, precision):
    """The fewest reading intervals per span that bring every span's k within `precision`.

    Returns the step and the largest relative standard uncertainty of the spans' k at it
    (see :func:`last_k_values`). Sums of the reference time and its square are taken back
    from the last reading over a tail of the readings: about twice as long as equally
    spaced readings would need (from Sττ = Δτ²·m(m² − 1)/12 for m readings Δτ apart), grown
    eightfold where the spacing calls for more, so that a long record is not read through
    when short spans suffice; a bisection on the step then finds the shortest span.
    """
    n = stop - start
    spacing = (tau[stop - 1] - tau[start]) / (n - 1)
    # m³/12 ≥ (s/(h·|b|·p·Δτ))² for equally spaced readings; h the smallest head, the last
    needed = head_scatter / (heads[stop - 1] * rate * precision * spacing)
    guess = 2.0 * count * (12.0 * needed * needed) ** (1.0 / 3.0) + 64.0 * count
    length = int(min(n, guess)) if math.isfinite(guess) else n
    while True:
        back = tau[stop - length : stop][::-1] - tau[stop - 1]  # 0 at the last reading
        first = np.concatenate(([0.0], np.cumsum(back)))
        second = np.concatenate(([0.0], np.cumsum(back * back)))
        ends_head = heads[stop - length : stop][::-1]
        top = (length - 1) // count

        def uncertainty(step, first=first, second=second, ends_head=ends_head):
            worst, m = 0.0, step + 1
            for near in range(0, count * step, step):  # each span's end, back from the last
                far = near + step
                total = first[far + 1] - first[near]
                spread = second[far + 1] - second[near] - total * total / m
                if not (spread > 0 and ends_head[near] > 0):
                    return math.inf
                worst = max(worst, head_scatter / (ends_head[near] * math.sqrt(spread) * rate))
            return worst

        if top >= 1 and (uncertainty(top) <= precision or length == n):
            break
        if length == n:  # fewer readings than one reading interval per value
            return 1, math.nan
        length = min(n, length * 8)
    low, high = 0, top  # uncertainty(high) <= precision unless high is the cap
    if uncertainty(high) > precision:
        return high, uncertainty(high)
    while high - low > 1:
        middle = (low + high) // 2
        if uncertainty(middle) <= precision:
            high = middle
        else:
            low = middle
    return high, uncertainty(high)


DATUM = "tailwater datum"
"""Name of the datum's input quantity in an uncertainty budget."""


def datum_sensitivity(time: np.ndarray, head: np.ndarray) -> float:
    """b′/b: how a datum error δ moves a log-linear k, which is multiplied by 1 − δ·b′/b.

    b is the least-squares slope of ln h on t, b′ that of 1/h on t, over the same readings;
    from ln(h − δ) ≈ ln h − δ/h (first-order Taylor expansion) and the linearity of the
    least-squares slope in y (Montgomery & Runger, *Applied Statistics and Probability for
    Engineers*, simple linear regression, b = Sxy/Sxx). [1/m]

    >>> t = np.array([0.0, 1.0, 2.0]); h = np.exp(-t)
    >>> expected = np.polyfit(t, 1 / h, 1)[0] / np.polyfit(t, np.log(h), 1)[0]
    >>> bool(abs(datum_sensitivity(t, h) - expected) < 1e-9 * abs(expected))
    True
    """
    time = np.asarray(time, dtype=float)
    head = np.asarray(head, dtype=float)
    mean_time = float(time.mean())
    # Σ t/h, Σ 1/h, Σ t·ln h, Σ ln h a block at a time: no array of the window's length
    sums = np.zeros(4)
    for i in range(0, time.size, _BLOCK):
        t, h = time[i : i + _BLOCK], head[i : i + _BLOCK]
        reciprocal, log_head = np.reciprocal(h), np.log(h)
        sums += (t @ reciprocal, reciprocal.sum(), t @ log_head, log_head.sum())
    time_over_head, over_head, time_log, log_sum = sums.tolist()
    across = time_over_head - mean_time * over_head
    along = time_log - mean_time * log_sum
    return across / along


_BLOCK = 8192
"""Readings summed at a time by :func:`datum_sensitivity` (below the length at which a
dot product is handed to several threads)."""


def window_interval(
    record, k_reference, fitted, start, stop, temperature, *, datum_fitted: bool = False
) -> UncertaintyResult:
    """The 95 % interval of k over readings ``start`` to ``stop - 1`` of `record`.

    `fitted` is the input quantity of the fit (None for two readings, whose head and time
    resolutions then enter directly through k ∝ ln(h1/h2)/(t2 − t1)); the specimen's
    dimensions, the standpipe areas and the temperature enter as
    :func:`kitchen.uncertainty.conductivity_interval` takes them. [m/s]

    Unless the datum is fitted (`datum_fitted`, the datum-fitted decay), the tailwater datum
    enters as a rectangular error δ of half-width ``settings.datum_uncertainty`` common to
    every head: the heads measured from the right datum are h − δ. For two readings k ∝
    ln((h1 − δ)/(h2 − δ)) exactly; for a fit, ln(h − δ) ≈ ln h − δ/h to first order, so
    the least-squares slope of ln h on t becomes b − δ·b′, b′ the slope of 1/h on t, and
    k is multiplied by 1 − δ·b′/b (:func:`datum_sensitivity`).

    References
    ----------
    JCGM 100:2008 (GUM) 5.1.2 and JCGM 101:2008 (Monte Carlo), through
    :func:`kitchen.uncertainty.conductivity_interval` (from memory for the clauses).
    Das, B. M. and Sobhan, K.,
    *Principles of Geotechnical Engineering*, falling-head test equation
    k = (a·L/(A·t))·ln(h1/h2).
    """
    settings = record.settings
    resolutions = settings.resolutions
    readings: tuple[InputQuantity, ...] = ()
    factor = None
    tolerance = 0.0 if datum_fitted else settings.datum_uncertainty
    datum = (rectangular_quantity(DATUM, 0.0, 2.0 * tolerance),) if tolerance > 0 else ()
    if fitted is None:  # two readings: their resolutions enter directly
        h1, h2 = (float(h) for h in record.corrected(start, start + 2))
        t1, t2 = (float(t) for t in record.time[start : start + 2])
        readings = (
            rectangular_quantity("first head", h1, resolutions.head_scale),
            rectangular_quantity("second head", h2, resolutions.head_scale),
            rectangular_quantity("first time", t1, resolutions.timer),
            rectangular_quantity("second time", t2, resolutions.timer),
        ) + datum
        fall, elapsed = math.log(h1 / h2), t2 - t1

        def factor(values):
            offset = values[DATUM] if datum else 0.0
            with np.errstate(divide="ignore", invalid="ignore"):
                new_fall = np.log(
                    (values["first head"] - offset) / (values["second head"] - offset)
                )
            return new_fall / fall * elapsed / (values["second time"] - values["first time"])

    elif datum:
        readings = datum
        sensitivity = datum_sensitivity(
            record.reference_time[start:stop], record.corrected(start, stop)
        )

        def factor(values):
            return 1.0 - values[DATUM] * sensitivity

    return conductivity_interval(
        k_reference,
        diameter=record.diameter,
        flow_length=record.height,
        resolutions=resolutions,
        fit=fitted,
        readings=readings,
        reading_factor=factor,
        standpipe_areas=(record.inflow_area, record.outflow_area),
        temperature=temperature,
        reference_temperature=settings.reference_temperature,
        viscosity=settings.viscosity,
        method=settings.uncertainty_method,
        trials=settings.monte_carlo_trials,
        seed=settings.monte_carlo_seed,
    )


def curvature_diagnosis(runs: RunsTest | None, curvature: CurvatureTest | None, datum: bool) -> str:
    """The curvature warning in plain words, from whichever of the two tests is significant.

    `datum` says the window was fitted by the datum-fitted decay rather than a line.
    """
    evidence = []
    if runs is not None and runs.significant:
        evidence.append(
            f"the residuals' signs form {runs.runs} runs where {runs.expected_runs:.0f} are "
            f"expected (runs test, p = {runs.p_value:.2g})"
        )
    if curvature is not None and curvature.significant:
        evidence.append(f"a quadratic term is significant (p = {curvature.p_value:.2g})")
    subject = "the decay fit leaves a pattern" if datum else "ln h against time is curved"
    return (
        f"{subject} over the readings used: {'; '.join(evidence)} — the tool's own tests. Air "
        "in the specimen, leakage, swelling or a wrong tailwater datum are the usual causes: "
        "look at the chart, try a later window or the datum-fitted decay"
    )


@dataclass(frozen=True)
class FullRecordEvidence:
    """What every reading of a record shows when a proposed window leaves some out.

    ``verdict`` is the ``full_record`` criterion (None when the full record gives no
    curvature to judge); ``note`` says what the full record showed; ``refuted`` is True when
    the full record's curvature lies in the readings left out (the proposed window's
    readings refute a wrong datum as its cause, as with an early transient). The fits it
    is judged from are the record's own (``full_curvature``, ``full_decay``).
    """

    verdict: Verdict | None
    note: str
    refuted: bool


def _curvature_words(curvature: CurvatureTest) -> str:
    p = "p < 0.001" if curvature.p_value < 0.001 else f"p = {curvature.p_value:.2g}"
    word = "falls" if curvature.change < 0 else "rises"
    return f"k {word} {percent_text(abs(curvature.change))} from the first reading to the last, {p}"


def _window_bend(record, start, datum) -> int:
    """How ln(h − datum) over readings ``start`` to the last bends: +1 or −1 when the tool's
    curvature test finds it significant (its quadratic term's sign), 0 when not; −1 when
    the datum lies at or above a head of the window (ln(h − datum) then plunges at its end).
    """
    if datum == math.inf:
        return -1
    if not math.isfinite(datum):
        return 0
    heads = record.corrected(start) - datum
    if not np.all(heads > 0):
        return -1
    test = curvature_test(
        record.reference_time[start:],
        np.log(heads),
        record.settings.criteria.trend_level,
        increasing=True,
    )
    return int(np.sign(test.coefficient)) if test.significant else 0


def full_record_evidence(record, start: int | None) -> FullRecordEvidence:
    """Whether a window proposed from reading ``start`` hides a fault of the whole record.

    With ``start`` None (no window meets every criterion) only the note is formed: whether
    the curvature of the full record has the shape a wrong datum gives it.

    A proposed window leaves out early readings until the tool's trend test passes. A
    wrong tailwater datum bends ln h through the whole record, and a window of fewer
    readings may only be too short to show it: the window would then report a k off by as
    much as the datum makes (about 2.6 % for 20 mm on a head falling from 1000 to 600 mm)
    with an interval that does not hold the truth. So the full record is judged too:

    1. the curvature test of ln h over every reading (the trend criterion's test);
    2. where it is significant, the datum-fitted decay over every reading gives the datum
       h∞ that would explain the curvature, with its 95 % interval;
    3. the same curvature test of ln(h − h∞) over the proposed window: when it curves
       significantly, the window's readings refute the datum that would explain the full
       record, and the curvature lies in the readings left out (an early transient): the
       window stands. Otherwise the window's readings cannot tell that datum from none, and
       the fault may run through the whole record: the ``full_record`` criterion fails with
       the reason in words.

    The datum is fitted to every reading, the window's included, so ln(h − h∞) over the
    window is as straight as the full record lets it be: with a true datum error the
    window's test rejects it far less often than its nominal 5 % (no record of the seeded
    datum population in ``tests/reduction/test_falling_head_populations.py`` was refuted).

    The rule is the tool's own; its rates of false alarm and coverage on seeded
    populations of records are measured by ``tests/benchmarks/verdict_rates.py``.

    References
    ----------
    Draper & Smith, *Applied Regression Analysis*, 3rd ed., ch. 2 (t-test of an added
    term; from memory); Golub & Pereyra (1973) for the decay
    (:func:`kitchen.fits.fit_exponential_decay`).
    """
    criteria = record.settings.criteria
    line = record.full_line
    curvature = record.full_curvature  # the record's alone: formed once a record
    whole = f"over the full record (all {record.n} readings)"
    bend = f"{_curvature_words(curvature)}; the tool's own test"
    if not curvature.significant:
        note = f"{whole} ln h shows no significant curvature ({bend})"
        if start is not None:
            note += ": the readings left out fail another criterion"
        return FullRecordEvidence(None, note, False)
    decay = record.full_decay
    if not decay.converged:
        note = (
            f"{whole} ln h curves ({bend}), but a decay to a fitted datum cannot follow it "
            f"({decay.message}): not the bend of a wrong datum"
        )
        return FullRecordEvidence(None, note, False)
    low, high = decay.asymptote_low, decay.asymptote_high
    k_decay = record.scale / decay.time_constant
    k_line = -line.slope * record.scale
    datum = (
        f"the datum-fitted decay over every reading puts the datum at h∞ = "
        f"{decay.asymptote * 1e3:.0f} mm (95 % interval {low * 1e3:.0f} to {high * 1e3:.0f} mm), "
        f"with k {(k_decay / k_line - 1) * 100:+.1f} % from the log-linear fit's"
    )
    tolerance = criteria.datum_tolerance
    if low <= tolerance and high >= -tolerance:
        shape = "as a wrong datum would"
        advice = "check the datum, or use the datum-fitted decay"
    else:
        shape = "through the whole record"
        advice = (
            f"a datum that far off is beyond the ±{tolerance * 1e3:.0f} mm a datum can be misread "
            "by: a drift in k, or a transient, bends it so"
        )
    if start is None:
        note = f"{whole} ln h curves {shape} ({bend}; {datum}): {advice}"
        return FullRecordEvidence(None, note, False)
    refuted = _window_bend(record, start, decay.asymptote) != 0
    note = f"{whole} ln h curves ({bend}); {datum}"
    readings = f"readings {start + 1} to {record.n}"
    if refuted:
        verdict = Verdict(
            "full_record",
            True,
            "no fault of the whole record hidden by the proposed window: yes — corrected by "
            f"that datum, ln(h − h∞) over {readings} curves significantly, so the curvature of "
            "the full record lies in the readings left out (as an early transient's does), "
            "not in a wrong datum; the tool's own test",
        )
    else:
        verdict = Verdict(
            "full_record",
            False,
            "no fault of the whole record hidden by the proposed window: no — ln h over the "
            f"full record curves {shape} ({bend}; {datum}), and {readings} cannot tell that "
            f"datum from none: {advice}",
        )
    return FullRecordEvidence(verdict, note, refuted)
