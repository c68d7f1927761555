"""What one reading window of a falling-head record gives, and the evidence it is built from.

:class:`FallingHeadAnalysis` holds everything one window of one specimen gives: k with its
95 % interval, the fit and its diagnostics, the incremental k, the verdicts, and what a
chart needs. The functions here form parts of that evidence, most from a prepared
:class:`~kitchen.reduction.falling_head_record.FallingHeadRecord` (their first argument): the k
values the steady-values criterion judges (:func:`last_k_values`), the interval of k
(:func:`window_interval`), and the curvature diagnosis in plain words
(:func:`curvature_diagnosis`). :mod:`kitchen.reduction.falling_head_record` puts them
together with the outflow/inflow verdict.

References
----------
ASTM D5084, Methods B and C, termination criteria (from memory for the clauses).
JCGM 100:2008 (GUM) for the interval (:func:`kitchen.uncertainty.conductivity_interval`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from kitchen.fits import CurvatureTest, DecayFit, LinearFit, RunsTest
from kitchen.uncertainty import (
    InputQuantity,
    UncertaintyResult,
    conductivity_interval,
    rectangular_quantity,
    resolution_uncertainty,
)
from kitchen.validity import Verdict, is_valid

from .falling_head_formulas import spaced_conductivity

__all__ = ["FallingHeadAnalysis"]


@dataclass(frozen=True, eq=False)
class FallingHeadAnalysis:
    """Everything one reading window of one specimen gives: k, its evidence, its chart.

    Arrays ``time``, ``head``, ``corrected_head``, ``reference_time`` cover every reading;
    ``start``/``stop`` mark the window (readings ``start`` to ``stop - 1``).
    ``increment_time``/``increment_k`` are k between successive readings over the whole
    record, at the reference temperature; ``value_time``/``value_k`` are the last k values
    of the window, the ones the steady-values criterion judges (readings ``value_step``
    apart, counted back from the window's last reading).
    ``line`` is the straight line of ln(corrected head) on reference time over the window
    (the fit itself for ``fit_kind == "log_linear"``; a diagnostic for ``"datum"``);
    ``decay`` the datum-fitted decay (None for the log-linear fit). ``asymptote`` is h∞
    (0 for the log-linear fit). ``verdicts`` hold every criterion; ``notes`` qualify the
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
    corrected_head: np.ndarray
    reference_time: np.ndarray
    capillary_rise: float
    asymptote: float
    asymptote_low: float
    asymptote_high: float
    increment_time: np.ndarray
    increment_k: np.ndarray
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

    @cached_property
    def fitted_head(self) -> np.ndarray:
        """The fitted head at each reading of the window, as recorded (with h∞ and hc). [m]"""
        tau = self.reference_time[self.start : self.stop]
        if self.decay is not None:
            return self.capillary_rise + self.decay.predict(tau)
        if self.line is not None:
            return self.capillary_rise + np.exp(self.line.predict(tau))
        h = self.corrected_head[self.start : self.stop]
        rate = np.log(h[0] / h[1]) / (tau[1] - tau[0])
        return self.capillary_rise + h[0] * np.exp(-rate * (tau - tau[0]))

    @cached_property
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


def last_k_values(record, start, stop, heads, log_head) -> LastKValues:
    """The k values judged by the steady-values criterion, and words on their spacing.

    Each value spans enough reading intervals that the head falls by at least
    ``sqrt(2)·u/p`` over it, u the standard uncertainty of one head-scale reading and p
    ``criteria.value_precision``: the fall, a difference of two readings, is then known to p
    of itself (the tool's own rule). The values are k between readings that far apart
    (:func:`~kitchen.reduction.falling_head_formulas.spaced_conductivity`).

    References
    ----------
    ASTM D5084, termination criteria: the last k values steady (from memory for the clause).
    JCGM 100:2008 (GUM) 4.3.7 and F.2.2.1 for u
    (:func:`kitchen.uncertainty.resolution_uncertainty`; from memory for the clauses).
    """
    criteria, resolutions = record.settings.criteria, record.settings.resolutions
    count = criteria.steady_count
    n = stop - start
    needed = math.sqrt(2.0) * resolution_uncertainty(resolutions.head_scale)
    needed /= criteria.value_precision
    cap = max((n - 1) // count, 1)
    step, words = 1, "between successive readings"
    if needed > 0:
        back = heads[stop - 2 :: -1]  # a view: readings back from the last one
        length = 16
        while True:  # look only as far back as needed
            falls = back[: min(length, cap)] - heads[stop - 1]
            reach = np.flatnonzero(falls >= needed)
            if reach.size or length >= cap:
                break
            length *= 16
        step = int(reach[0]) + 1 if reach.size else cap
        if step > 1:
            words = (
                f"each over {step} reading intervals, for a head fall of at least "
                f"{needed * 1e3:.1f} mm against the {resolutions.head_scale * 1e3:g} mm "
                "head scale"
            )
        if not reach.size and n - 1 >= count:
            words += (
                f"; the last value's head fall, {falls[step - 1] * 1e3:.1f} mm, is less than "
                f"the {needed * 1e3:.1f} mm the head-scale resolution calls for"
            )
    sl = slice(start, stop)
    time, k = spaced_conductivity(
        record.time[sl], record.reference_time[sl], log_head[sl], record.scale, step, count
    )
    return LastKValues(time, k, step, words)


def window_interval(record, k_reference, fitted, start, stop, temperature) -> UncertaintyResult:
    """The 95 % interval of k over readings ``start`` to ``stop - 1`` of `record`.

    `fitted` is the input quantity of the fit (None for two readings, whose head and time
    resolutions then enter directly through k ∝ ln(h1/h2)/(t2 − t1)); the specimen's
    dimensions, the standpipe areas and the temperature enter as
    :func:`kitchen.uncertainty.conductivity_interval` takes them. [m/s]

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
    if fitted is None:  # two readings: their resolutions enter directly
        h1, h2 = (float(h) for h in record.corrected_head[start : start + 2])
        t1, t2 = (float(t) for t in record.time[start : start + 2])
        readings = (
            rectangular_quantity("first head", h1, resolutions.head_scale),
            rectangular_quantity("second head", h2, resolutions.head_scale),
            rectangular_quantity("first time", t1, resolutions.timer),
            rectangular_quantity("second time", t2, resolutions.timer),
        )
        fall, elapsed = math.log(h1 / h2), t2 - t1

        def factor(values):
            new_fall = np.log(values["first head"] / values["second head"])
            return new_fall / fall * elapsed / (values["second time"] - values["first time"])

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
