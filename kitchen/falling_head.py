"""Falling-head test reduction: k from two readings, or from many by a fit, with its evidence.

With the tailwater level constant, the head difference across the specimen decays as
ln h(t) = ln h0 − (k·A/(a·L))·t, so k = −m·a·L/A where m is the slope of ln h on t.
With two burettes (rising tailwater, ASTM D5084 Method C) the same holds with the
standpipe area replaced by a_in·a_out/(a_in + a_out). When the tailwater datum is
uncertain, h(t) = h∞ + (h0 − h∞)·exp(−t/τ) is fitted instead and k = a·L/(A·τ).

:class:`FallingHeadRecord` prepares one specimen's readings once (temperature-corrected
time, corrected heads, incremental k); :meth:`FallingHeadRecord.analyse` then gives, for a
reading window, everything a report or a chart needs (:class:`FallingHeadAnalysis`): k
with its 95 % interval, the fit and its diagnostics, the incremental k, the validity
verdicts. :func:`falling_head_analysis` does both in one call; the results table uses it.

References
----------
ASTM D5084, Methods B (falling head, constant tailwater) and C (falling head, rising
tailwater), calculation section and termination criteria (from memory for the clauses).
ASTM D5856 and ISO 17892-11 (falling-head test).
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, chapter on
permeability, falling-head test equation k = (a·L/(A·t))·ln(h1/h2).
Head, K. H., *Manual of Soil Laboratory Testing*, Vol. 2, permeability tests: capillary
rise in standpipes (from memory).
"""

from __future__ import annotations

import copy
import math
from dataclasses import dataclass
from functools import cached_property
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from .fitting import DecayFit, LinearFit, fit_exponential_decay, fit_line
from .uncertainty import (
    InputQuantity,
    UncertaintyResult,
    conductivity_interval,
    fit_quantity,
    rectangular_quantity,
    resolution_uncertainty,
)
from .validity import (
    CurvatureTest,
    RunsTest,
    Verdict,
    curvature_test,
    flow_ratio_check,
    gradient_check,
    is_valid,
    propose_window,
    reynolds_check,
    reynolds_number,
    runs_test,
    sign_runs_test,
    steady_values_check,
    trend_check,
    window_trends,
)
from .water import viscosity_ratio, water_density, water_surface_tension, water_viscosity

if TYPE_CHECKING:  # the settings live with the results table, which imports this module
    from .results import Settings

__all__ = [
    "FALLING_HEAD_FITS",
    "falling_head_conductivity",
    "effective_standpipe_area",
    "rising_tailwater_conductivity",
    "reference_elapsed_time",
    "water_surface_tension",
    "jurin_capillary_rise",
    "incremental_conductivity",
    "reading_window",
    "FallingHeadRecord",
    "FallingHeadAnalysis",
    "falling_head_analysis",
    "FallingHeadResult",
    "reduce_falling_head",
]

FALLING_HEAD_FITS = ("log_linear", "datum")
"""Fits of a falling-head record: ln h on time, or the decay to a fitted datum."""

STANDARD_GRAVITY = 9.80665
"""Standard acceleration of gravity (CGPM 1901). [m/s2]"""


def falling_head_conductivity(standpipe_area, flow_length, area, head_start, head_end, elapsed):
    """Conductivity from two readings of a falling-head test, constant tailwater.

    Parameters
    ----------
    standpipe_area : float or array_like
        Inside area of the standpipe. [m2]
    flow_length : float or array_like
        Specimen height (flow path length). [m]
    area : float or array_like
        Specimen cross-section area. [m2]
    head_start, head_end : float or array_like
        Head difference across the specimen at the two readings. [m]
    elapsed : float or array_like
        Time between the readings. [s]

    Returns
    -------
    float or array_like
        k = (a·L/(A·Δt))·ln(h1/h2) at the test temperature. [m/s]

    References
    ----------
    ASTM D5084 Method B (from memory for the clause); Das & Sobhan, *Principles of
    Geotechnical Engineering*, falling-head test equation.

    Examples
    --------
    Das, falling-head example (inputs confirmed, answer from memory: 2.27e-3 cm/s):
    L = 200 mm, A = 1000 mm², a = 40 mm², head 500 → 300 mm in 180 s.

    >>> k = falling_head_conductivity(40e-6, 0.200, 1000e-6, 0.500, 0.300, 180.0)
    >>> round(float(k) * 100, 5)  # cm/s
    0.00227
    """
    return standpipe_area * flow_length / (area * elapsed) * np.log(head_start / head_end)


def effective_standpipe_area(inflow_area, outflow_area=np.nan):
    """Standpipe area that makes the rising-tailwater case look like a single standpipe.

    Parameters
    ----------
    inflow_area : float or array_like
        Area of the headwater burette. [m2]
    outflow_area : float or array_like, optional
        Area of the tailwater burette; NaN (default) for a constant tailwater. [m2]

    Returns
    -------
    float or array_like
        a_in·a_out/(a_in + a_out), or a_in when there is no tailwater burette. [m2]

    References
    ----------
    ASTM D5084 Method C, rising tailwater: k = a_in·a_out·L/((a_in + a_out)·A·Δt)·
    ln(Δh1/Δh2) (from memory for the clause).
    """
    inflow = np.asarray(inflow_area, dtype=float)
    outflow = np.asarray(outflow_area, dtype=float)
    combined = np.where(np.isnan(outflow), inflow, inflow * outflow / (inflow + outflow))
    return float(combined) if combined.ndim == 0 else combined


def rising_tailwater_conductivity(
    inflow_area, outflow_area, flow_length, area, head_start, head_end, elapsed
):
    """Conductivity from two readings with a rising tailwater (two burettes).

    Parameters
    ----------
    inflow_area, outflow_area : float or array_like
        Areas of the headwater and tailwater burettes. [m2]
    flow_length : float or array_like
        Specimen height. [m]
    area : float or array_like
        Specimen cross-section area. [m2]
    head_start, head_end : float or array_like
        Head difference across the specimen at the two readings. [m]
    elapsed : float or array_like
        Time between the readings. [s]

    Returns
    -------
    float or array_like
        k = a_in·a_out·L/((a_in + a_out)·A·Δt)·ln(Δh1/Δh2). [m/s]

    References
    ----------
    ASTM D5084 Method C (from memory for the clause).
    """
    effective = effective_standpipe_area(inflow_area, outflow_area)
    return falling_head_conductivity(effective, flow_length, area, head_start, head_end, elapsed)


def reference_elapsed_time(time, temperature, reference_temperature=20.0, viscosity="kestin"):
    """Elapsed time scaled to the reference temperature, ∫ dt / R_T.

    Parameters
    ----------
    time : array_like
        Reading times. [s]
    temperature : array_like
        Temperature at each reading, no NaN. [degC]
    reference_temperature : float
        Reference temperature. [degC]
    viscosity : str
        Viscosity method for R_T.

    Returns
    -------
    numpy.ndarray
        τ_i = ∫ from t_0 to t_i of dt / R_T(t), by the trapezoid rule. [s]

    Notes
    -----
    Between readings d ln h/dt = −k_T(t)·A/(a·L) and k_T = k_ref/R_T(t), so ln h is a
    straight line in τ with slope −k_ref·A/(a·L) even when the temperature drifts. The
    standards correct each trial by its own temperature; this integral is the same
    correction applied reading by reading (the tool's own formulation, following from
    Darcy's law and the viscosity ratio of ASTM D5084).
    """
    time = np.asarray(time, dtype=float)
    inverse = 1.0 / np.asarray(
        viscosity_ratio(np.asarray(temperature, dtype=float), reference_temperature, viscosity)
    )
    steps = np.diff(time) * 0.5 * (inverse[1:] + inverse[:-1])
    return np.concatenate(([0.0], np.cumsum(steps)))


def jurin_capillary_rise(diameter, temperature=20.0):
    """Capillary rise of water in a clean glass standpipe, by Jurin's law.

    Parameters
    ----------
    diameter : float or array_like
        Inside diameter (bore) of the standpipe. [m]
    temperature : float or array_like
        Water temperature. [degC]

    Returns
    -------
    float or array_like
        hc = 4σ/(ρw·g·d), with a contact angle of zero (clean glass). [m]

    Notes
    -----
    The standpipe level stands hc above the pressure head, so the head across the
    specimen is the reading less hc; with a tailwater burette the two rises oppose, and
    equal burettes cancel.

    References
    ----------
    Jurin's law as given by Head, *Manual of Soil Laboratory Testing*, Vol. 2,
    permeability tests (from memory: about 3 mm in a 10 mm tube, 15 mm in a 2 mm tube).
    """
    rho = water_density(temperature)
    return 4.0 * water_surface_tension(temperature) / (rho * STANDARD_GRAVITY * diameter)


def _values_between(time, reference_time, log_head, scale, step, count=None):
    """k between readings ``step`` apart, counted back from the last reading.

    With ``count``, only the last ``count`` values (or as many as the readings allow).
    """
    values = (time.size - 1) // step
    if count is not None:
        values = min(values, count)
    index = (time.size - 1) - step * np.arange(values, -1, -1)
    k = scale * (log_head[index[:-1]] - log_head[index[1:]])
    k = k / (reference_time[index[1:]] - reference_time[index[:-1]])
    return 0.5 * (time[index[:-1]] + time[index[1:]]), k


def incremental_conductivity(
    time,
    head,
    standpipe_area,
    flow_length,
    area,
    temperature=None,
    reference_temperature=20.0,
    viscosity="kestin",
    step=1,
):
    """k between successive readings (or readings ``step`` apart) of a falling-head test.

    Parameters
    ----------
    time : array_like
        Reading times, increasing. [s]
    head : array_like
        Head difference at each reading. [m]
    standpipe_area : float
        Standpipe area (the effective one with a tailwater burette). [m2]
    flow_length : float
        Specimen height. [m]
    area : float
        Specimen area. [m2]
    temperature : array_like, optional
        Temperature at each reading; each value is then corrected to the reference
        temperature with the temperatures of its own readings. [degC]
    reference_temperature : float
        Reference temperature. [degC]
    viscosity : str
        Viscosity method of R_T.
    step : int
        Reading intervals per value, counted back from the last reading. [-]

    Returns
    -------
    time : numpy.ndarray
        Middle time of each value. [s]
    k : numpy.ndarray
        k_i = a·L/A · ln(h_i/h_j)/(τ_j − τ_i) with τ the reference-equivalent time (the
        elapsed time when no temperature is given). [m/s]

    References
    ----------
    ASTM D5084 Method B, applied to each pair of readings (from memory).
    """
    time = np.asarray(time, dtype=float)
    head = np.asarray(head, dtype=float)
    if not isinstance(step, (int, np.integer)) or not 1 <= step < time.size:
        raise ValueError(f"step must be a whole number from 1 to {time.size - 1}, got {step!r}")
    if temperature is None:
        reference_time = time - time[0]
    else:
        reference_time = reference_elapsed_time(time, temperature, reference_temperature, viscosity)
    scale = standpipe_area * flow_length / area
    return _values_between(time, reference_time, np.log(head), scale, int(step))


def reading_window(time, start_time=None, end_time=None) -> tuple[int, int]:
    """The reading window ``(start, stop)`` of the readings between two times.

    Parameters
    ----------
    time : array_like
        Reading times, increasing. [s]
    start_time, end_time : float, optional
        First and last times to keep (inclusive); the record's ends by default. [s]

    Returns
    -------
    (int, int)
        Positions of the first reading kept and one past the last, for
        :meth:`FallingHeadRecord.analyse`.
    """
    time = np.asarray(time, dtype=float)
    start = 0 if start_time is None else int(np.searchsorted(time, start_time, "left"))
    stop = time.size if end_time is None else int(np.searchsorted(time, end_time, "right"))
    if stop - start < 2:
        raise ValueError(
            f"fewer than two readings between {start_time} s and {end_time} s; a window needs two"
        )
    return start, stop


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


def _number(row, name, specimen, unit, required=True):
    value = row.get(name, np.nan)
    value = float(value) if value is not None and not pd.isna(value) else math.nan
    if required and not (math.isfinite(value) and value > 0):
        raise ValueError(
            f"specimen {specimen}: {name} must be a positive number [{unit}], got {value!r}"
        )
    return value


class FallingHeadRecord:
    """One specimen's falling-head readings, prepared once for any number of windows.

    Parameters
    ----------
    readings : pandas.DataFrame
        The specimen's rows of the ``falling_head`` table in time order: ``time`` [s],
        ``head`` [m]; optional ``temperature`` [degC] (NaN where not read),
        ``inflow_volume``/``outflow_volume`` [m3] (cumulative), ``source_row``.
    specimen_row : pandas.Series
        The specimen's state: ``specimen``, ``area`` [m2] (or ``diameter`` [m]),
        ``height`` [m], ``standpipe_area`` [m2], optional ``tailwater_standpipe_area``
        [m2] (NaN: constant tailwater), ``diameter`` [m], ``d10`` [m].
    settings : Settings, optional
        Reference temperature, viscosity, criteria, resolutions, uncertainty method,
        capillary rise and fit (:class:`kitchen.results.Settings`).
    capillary_rise : float, optional
        A measured capillary rise in the standpipe, subtracted from every head; overrides
        ``settings.capillary_rise``. [m]

    Attributes
    ----------
    time, head : numpy.ndarray
        The readings as given. [s], [m]
    corrected_head, log_head : numpy.ndarray
        Heads less the capillary rise, and their logarithm. [m], [-]
    reference_time : numpy.ndarray
        Reference-equivalent time from the first reading (the elapsed time when no
        temperature is recorded). [s]
    increment_time, increment_k : numpy.ndarray
        k between successive readings at the reference temperature, and their middle
        times (formed on first use). [s], [m/s]
    capillary_rise, scale, mean_temperature : float
        The rise subtracted [m], a·L/A [m], the record's time-weighted temperature [degC].

    Notes
    -----
    Preparing costs a few passes over the readings (the viscosity ratio at every reading,
    the logarithm of every head) and keeps three arrays of the record's length (reference
    time, ln h, the running integral of temperature) besides the readings; the incremental
    k are formed on first use. Each :meth:`analyse` of a window then costs about fifteen
    passes over the window's readings (the line, the curvature and runs tests), with no
    refit of anything outside it; the proposal judges every start at once from suffix sums.
    """

    def __init__(
        self,
        readings: pd.DataFrame,
        specimen_row: pd.Series,
        settings=None,
        capillary_rise: float | None = None,
    ):
        if settings is None:
            from .results import Settings

            settings = Settings()
        self.settings: Settings = settings
        self.specimen = specimen = str(specimen_row["specimen"])
        missing = [c for c in ("time", "head") if c not in readings.columns]
        if missing:
            raise ValueError(
                f"specimen {specimen}: the falling-head readings lack column(s) "
                f"{', '.join(missing)}"
            )
        self.time = time = readings["time"].to_numpy(float)
        head = readings["head"].to_numpy(float)
        self.n = n = time.size
        if n < 2:
            raise ValueError(
                f"specimen {specimen}: a falling-head test needs at least two readings, got {n}"
            )
        rows = readings["source_row"].to_numpy() if "source_row" in readings.columns else None
        self._rows = rows
        self._check(np.isfinite(time), "time", "a finite number [s]")
        self._check(np.isfinite(head) & (head > 0), "head", "a positive number [m]")
        self._check(np.r_[True, np.diff(time) > 0], "time", "a time later than the reading before")
        self.head = head
        self._set_specimen(specimen_row)
        self._prepare_temperature(readings)
        self._given_rise = capillary_rise
        self._prepare_heads(capillary_rise)
        self.inflow, self.outflow = (
            readings[c].to_numpy(float) if c in readings.columns else None
            for c in ("inflow_volume", "outflow_volume")
        )
        self._volumes = self.inflow is not None and self.outflow is not None
        if self._volumes:
            self._volumes = bool(np.any(np.isfinite(self.inflow) & np.isfinite(self.outflow)))

    def _set_specimen(self, specimen_row) -> None:
        """Dimensions and standpipes from the specimen's row (nothing of the readings)."""
        specimen = self.specimen
        self.height = _number(specimen_row, "height", specimen, "m")
        diameter = _number(specimen_row, "diameter", specimen, "m", required=False)
        if "area" in specimen_row.index and not pd.isna(specimen_row["area"]):
            self.area = _number(specimen_row, "area", specimen, "m2")
        elif math.isfinite(diameter):
            self.area = math.pi * diameter**2 / 4
        else:
            raise ValueError(f"specimen {specimen}: give the specimen area [m2] or diameter [m]")
        self.diameter = diameter if math.isfinite(diameter) else math.sqrt(4 * self.area / math.pi)
        self.inflow_area = _number(specimen_row, "standpipe_area", specimen, "m2")
        self.outflow_area = _number(
            specimen_row, "tailwater_standpipe_area", specimen, "m2", required=False
        )
        self.standpipe_area = float(effective_standpipe_area(self.inflow_area, self.outflow_area))
        self.scale = self.standpipe_area * self.height / self.area
        self.d10 = _number(specimen_row, "d10", specimen, "m", required=False)

    def with_specimen(self, specimen_row: pd.Series) -> FallingHeadRecord:
        """The same readings against a revised row of the same specimen, not prepared again.

        Parameters
        ----------
        specimen_row : pandas.Series
            The specimen's state as for the constructor, with a new height, diameter or
            any other value of the specimens table.

        Returns
        -------
        FallingHeadRecord
            A new record sharing this one's reading arrays (they are never written to):
            the reference time, the running temperature integral and the trend of every
            trial window depend on the readings alone. Only when a standpipe area changed
            and the capillary rise depends on it (Jurin's law) are the corrected heads
            formed again. The same as a record built from scratch on the new row.
        """
        if str(specimen_row["specimen"]) != self.specimen:
            raise ValueError(
                f"specimen {self.specimen}: a record takes the rows of its own specimen, got "
                f"{specimen_row['specimen']!r}"
            )
        other = copy.copy(self)
        for derived in ("increment_k",):  # depends on the scale a·L/A
            other.__dict__.pop(derived, None)
        other._set_specimen(specimen_row)
        same_bores = np.array_equal(
            [self.inflow_area, self.outflow_area],
            [other.inflow_area, other.outflow_area],
            equal_nan=True,
        )
        if not same_bores and self._rise_from_bores:
            other.__dict__.pop("_trends", None)  # ln h changes with the rise
            other._prepare_heads(self._given_rise)
        return other

    @property
    def _rise_from_bores(self) -> bool:
        return self._given_rise is None and self.settings.capillary_rise == "jurin"

    @cached_property
    def _trends(self):
        """The trend of every trial window (:func:`kitchen.validity.window_trends`)."""
        return window_trends(
            self.reference_time, self.log_head, self.settings.criteria, self._minimum_readings()
        )

    @cached_property
    def increment_time(self) -> np.ndarray:
        """Middle time of each pair of successive readings. [s]"""
        return 0.5 * (self.time[1:] + self.time[:-1])

    @cached_property
    def increment_k(self) -> np.ndarray:
        """k between successive readings, at the reference temperature. [m/s]"""
        return self.scale * -np.diff(self.log_head) / np.diff(self.reference_time)

    def _where(self, index: int) -> str:
        if self._rows is not None:
            return f"row {int(self._rows[index])}"
        return f"reading {index + 1}"

    def _check(self, good: np.ndarray, column: str, expected: str):
        bad = np.flatnonzero(~good)
        if bad.size:
            i = int(bad[0])
            more = f" (and {bad.size - 1} more)" if bad.size > 1 else ""
            raise ValueError(
                f"specimen {self.specimen}, {self._where(i)}, column '{column}': expected "
                f"{expected}{more}"
            )

    def _prepare_temperature(self, readings):
        settings, time = self.settings, self.time
        if "temperature" in readings.columns:
            temperature = readings["temperature"].to_numpy(float)
        else:
            temperature = np.full(self.n, np.nan)
        known = np.isfinite(temperature)
        self._check(
            ~known | ((temperature > 0) & (temperature < 100)),
            "temperature",
            "a water temperature between 0 and 100 degC",
        )
        self._missing = np.flatnonzero(~known)  # positions of the readings without one
        if known.all():
            filled = temperature
        elif known.any():
            filled = np.interp(time, time[known], temperature[known])
        else:
            filled = None
        self.temperature_recorded = filled is not None
        if filled is None:
            self.mean_temperature = math.nan
            self.reference_time = time - time[0]
            self._temperature_area = None
            return
        self.reference_time = reference_elapsed_time(
            time, filled, settings.reference_temperature, settings.viscosity
        )
        steps = np.diff(time) * 0.5 * (filled[1:] + filled[:-1])
        self._temperature_area = np.concatenate(([0.0], np.cumsum(steps)))
        self.mean_temperature = self._mean_temperature(0, self.n)

    def _prepare_heads(self, capillary_rise):
        settings = self.settings
        self.capillary_note = ""
        if capillary_rise is not None:
            rise = float(capillary_rise)
            if not (math.isfinite(rise) and rise >= 0):
                raise ValueError(
                    f"specimen {self.specimen}: capillary rise must be zero or a positive number "
                    f"[m], got {capillary_rise!r}"
                )
            self.capillary_note = f"heads less a measured capillary rise of {rise * 1e3:.1f} mm"
        elif settings.capillary_rise == "jurin":
            t = self.mean_temperature if self.temperature_recorded else 20.0
            bore = math.sqrt(4 * self.inflow_area / math.pi)
            rise = jurin_capillary_rise(bore, t)
            words = f"standpipe bore {bore * 1e3:.2f} mm"
            if math.isfinite(self.outflow_area):
                tail_bore = math.sqrt(4 * self.outflow_area / math.pi)
                rise -= jurin_capillary_rise(tail_bore, t)
                words += f", less the rise in the {tail_bore * 1e3:.2f} mm tailwater burette"
            self.capillary_note = (
                f"heads less a capillary rise of {rise * 1e3:.1f} mm by Jurin's law ({words}, "
                f"{t:.1f} degC; Head, Manual of Soil Laboratory Testing, Vol. 2)"
            )
        else:
            rise = 0.0
        self.capillary_rise = rise
        corrected = self.head - rise if rise else self.head
        bad = np.flatnonzero(corrected <= 0)
        if bad.size:
            i = int(bad[0])
            raise ValueError(
                f"specimen {self.specimen}, {self._where(i)}, column 'head': head "
                f"{self.head[i] * 1e3:.1f} mm is not above the capillary rise {rise * 1e3:.1f} mm; "
                "check the capillary-rise value or the standpipe bore"
            )
        self.corrected_head = corrected
        self.log_head = np.log(corrected)

    # ---------------------------------------------------------------- windows
    def _checked_window(self, window) -> tuple[int, int]:
        try:
            start, stop = (int(v) for v in window)
        except (TypeError, ValueError):
            raise ValueError(
                f"specimen {self.specimen}: a reading window is (start, stop), two reading "
                f"positions; got {window!r}"
            ) from None
        if not 0 <= start < stop <= self.n or stop - start < 2:
            raise ValueError(
                f"specimen {self.specimen}: reading window {start}..{stop - 1} needs at least two "
                f"of the {self.n} readings"
            )
        return start, stop

    def _mean_temperature(self, start, stop) -> float:
        if self._temperature_area is None:
            return math.nan
        span = self.time[stop - 1] - self.time[start]
        return float((self._temperature_area[stop - 1] - self._temperature_area[start]) / span)

    def _values(self, start, stop, heads, log_head):
        """The k values judged by the steady-values criterion, and words on their spacing."""
        criteria, resolutions = self.settings.criteria, self.settings.resolutions
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
        time, k = _values_between(
            self.time[sl], self.reference_time[sl], log_head[sl], self.scale, step, count
        )
        return time, k, step, words

    def _flow_ratio(self, start, stop) -> Verdict:
        criteria = self.settings.criteria
        if not self._volumes:
            return flow_ratio_check(math.nan, math.nan, criteria)
        inflow, outflow = self.inflow[start:stop], self.outflow[start:stop]
        both = np.flatnonzero(np.isfinite(inflow) & np.isfinite(outflow))
        if both.size < 2:
            return flow_ratio_check(math.nan, math.nan, criteria)
        for name, volume in (("inflow_volume", inflow), ("outflow_volume", outflow)):
            read = volume[np.isfinite(volume)]
            falls = np.flatnonzero(np.diff(read) < 0)
            if falls.size:
                index = start + int(np.flatnonzero(np.isfinite(volume))[falls[0] + 1])
                return Verdict(
                    "flow_ratio",
                    False,
                    f"outflow/inflow: cannot be judged — {name} decreases at {self._where(index)} "
                    "(the volumes are read as cumulative)",
                )
        first, last = both[0], both[-1]
        return flow_ratio_check(
            float(inflow[last] - inflow[first]), float(outflow[last] - outflow[first]), criteria
        )

    def _propose(self):
        settings = self.settings
        criteria = settings.criteria
        heads, log_head = self.corrected_head, self.log_head
        value_time, value_k, step, words = self._values(0, self.n, heads, log_head)
        steady = steady_values_check(value_k, criteria, words)
        reynolds_per_k = math.nan
        if math.isfinite(self.d10):
            t = self._mean_temperature(0, self.n)
            t = 20.0 if math.isnan(t) else t
            ratio = viscosity_ratio(t, settings.reference_temperature, settings.viscosity)
            reynolds_per_k = water_density(t) * self.d10 / (water_viscosity(t) * ratio)
        return propose_window(
            self.reference_time,
            log_head,
            heads / self.height,
            self.scale,
            criteria,
            steady_passed=bool(steady.passed),
            minimum_readings=self._minimum_readings(),
            inflow=self.inflow,
            outflow=self.outflow,
            reynolds_per_k=reynolds_per_k,
            trends=self._trends,
        )

    def _minimum_readings(self) -> int:
        return max(self.settings.criteria.steady_count + 1, 6)

    def _propose_datum(self, grid: int = 16, refinements: int = 8):
        """The longest window ending at the last reading whose decay fit meets every criterion.

        The decay is refitted for each trial start: on a grid of up to ``grid`` starts, then
        by bisection (at most ``refinements`` more fits) between the last start that fails
        and the first that passes. The tool's own rule.
        """
        criteria = self.settings.criteria
        keep = max(math.ceil(criteria.window_minimum_fraction * self.n), self._minimum_readings())
        last_start = self.n - keep
        reason = (
            "the longest window ending at the last reading whose decay fit meets every criterion"
        )
        none = (
            "no window ending at the last reading and keeping at least "
            f"{criteria.window_minimum_fraction * 100:.0f} % of the readings meets every criterion "
            "with the datum-fitted decay"
        )
        if last_start < 0:
            return 0, False, none

        def passes(start):
            trial = self._analyse(start, self.n, "datum", True, [], [])
            return trial.fit_kind == "datum" and trial.valid

        starts = np.unique(
            np.linspace(0, last_start, min(grid, last_start + 1)).round().astype(int)
        )
        previous = None
        for start in starts:
            if passes(int(start)):
                low, high = (int(previous), int(start)) if previous is not None else (0, 0)
                for _ in range(refinements):
                    if high - low <= 1:
                        break
                    middle = (low + high) // 2
                    low, high = (low, middle) if passes(middle) else (middle, high)
                return high, True, reason
            previous = start
        return 0, False, none

    # ---------------------------------------------------------------- analysis
    def analyse(self, window=None, fit: str | None = None) -> FallingHeadAnalysis:
        """Reduce one reading window to k with its interval, diagnostics and verdicts.

        Parameters
        ----------
        window : (int, int), optional
            Readings ``start`` to ``stop - 1`` (positions, see :func:`reading_window` to
            choose by time). Without one the tool proposes the longest window ending at
            the last reading that meets every criterion, and says so.
        fit : {"log_linear", "datum"}, optional
            ``"log_linear"``: least squares of ln h on the reference-equivalent time.
            ``"datum"``: h = h∞ + (h0 − h∞)·exp(−τ/T), by separable least squares, for an
            uncertain tailwater datum; k from the time constant. Default from the settings.

        Returns
        -------
        FallingHeadAnalysis

        Notes
        -----
        k at the test temperature is k_ref/R_T at the window's time-weighted mean
        temperature. The trend criterion is a quadratic term added to ln h against time
        (a trend in k is a change in the slope of ln h); the curvature diagnostic adds a
        runs test on the residuals' signs (a residual of exactly zero counts as negative).
        Both tests are the tool's own.

        References
        ----------
        ASTM D5084 Methods B and C, termination criteria (from memory); Golub & Pereyra
        (1973) for the separable fit (:func:`kitchen.fitting.fit_exponential_decay`);
        JCGM 100:2008 for the interval (:func:`kitchen.uncertainty.conductivity_interval`).
        """
        settings = self.settings
        fit = fit or settings.falling_head_fit
        if fit not in FALLING_HEAD_FITS:
            raise ValueError(
                f"unknown falling-head fit {fit!r}; choose one of {', '.join(FALLING_HEAD_FITS)}"
            )
        notes: list[str] = []
        method_notes: list[str] = [self.capillary_note] if self.capillary_note else []
        if window is None:
            if fit == "datum":
                start, met, reason = self._propose_datum()
            else:
                proposal = self._propose()
                start, met, reason = proposal.start, proposal.meets_criteria, proposal.reason
            stop, proposed = self.n, True
            if met and start > 0:
                method_notes.append(
                    f"readings {start + 1} to {stop} of {self.n} used: window proposed by the tool "
                    f"({reason}); the first {start} reading(s), to "
                    f"{self.time[start - 1] / 60:.0f} min, left out"
                )
            elif met:
                method_notes.append(
                    f"all {self.n} readings used: window proposed by the tool (every criterion is "
                    "met with every reading)"
                )
            else:
                method_notes.append(f"all {self.n} readings used: {reason}")
        else:
            start, stop = self._checked_window(window)
            proposed = False
            method_notes.append(f"readings {start + 1} to {stop} of {self.n} used (window chosen)")
        return self._analyse(start, stop, fit, proposed, notes, method_notes)

    def _analyse(self, start, stop, fit, proposed, notes, method_notes) -> FallingHeadAnalysis:
        settings = self.settings
        criteria = settings.criteria
        n = stop - start
        sl = slice(start, stop)
        tau = self.reference_time[sl]
        heads = self.corrected_head[sl]
        missing = int(np.searchsorted(self._missing, stop) - np.searchsorted(self._missing, start))
        if not self.temperature_recorded:
            notes.append(
                "temperature not recorded: k not corrected to the reference temperature "
                "(about 2.5 % per degC)"
            )
        elif missing:
            notes.append(
                f"temperature missing at {missing} of {n} readings: interpolated in time from "
                "the readings that have one"
            )
        temperature = self._mean_temperature(start, stop)
        decay, asymptote, low_inf, high_inf = None, 0.0, 0.0, 0.0
        if fit == "datum":
            if n < 4:
                raise ValueError(
                    f"specimen {self.specimen}: the datum-fitted decay needs at least 4 readings; "
                    f"the window holds {n}"
                )
            decay = fit_exponential_decay(tau, heads)
            if not decay.converged:
                notes.append(
                    f"datum-fitted decay not usable over these readings ({decay.message}): the "
                    "log-linear fit is used instead"
                )
                fit, decay = "log_linear", None
        if decay is not None:
            asymptote, low_inf, high_inf = (
                decay.asymptote,
                decay.asymptote_low,
                decay.asymptote_high,
            )
            used = self.corrected_head - asymptote
            with np.errstate(divide="ignore", invalid="ignore"):
                log_used = np.log(used)
            k_reference = self.scale / decay.time_constant
            spread = decay.time_constant_standard_error / decay.time_constant
            fitted = fit_quantity("time constant of the decay", spread, n - 3)
            words = (
                f"datum-fitted decay h = h∞ + (h0 − h∞)·exp(−t/τ): h∞ = {asymptote * 1e3:.1f} mm "
                f"(95 % interval {low_inf * 1e3:.1f} to {high_inf * 1e3:.1f} mm), "
                f"τ = {decay.time_constant / 3600:.3g} h; k from τ"
            )
            method_notes.append(words)
            if not low_inf <= 0.0 <= high_inf:
                straight = -fit_line(tau, self.log_head[sl]).slope * self.scale
                ratio_fits = k_reference / straight - 1.0
                side = "above" if ratio_fits > 0 else "below"
                notes.append(
                    f"the fitted datum h∞ = {asymptote * 1e3:.0f} mm (95 % interval "
                    f"{low_inf * 1e3:.0f} to {high_inf * 1e3:.0f} mm) is not zero, and k from the "
                    f"decay is {abs(ratio_fits) * 100:.0f} % {side} the log-linear fit over the "
                    f"same readings ({straight:.3g} m/s): a drift in k or an early transient bends "
                    "ln h as a datum error does — rely on the decay only where the tailwater "
                    "datum is uncertain by about that much"
                )
            positive = np.isfinite(log_used[sl])
            line = None
            if positive.sum() >= 3:
                line = fit_line(tau[positive], log_used[sl][positive])
            residuals = decay.residuals
            r_squared = decay.r_squared
        else:
            used, log_used = self.corrected_head, self.log_head
            if n == 2:
                line = None
                k_reference = (
                    self.scale * (log_used[start] - log_used[start + 1]) / (tau[1] - tau[0])
                )
                notes.append(
                    "two readings only: no interval from a fit; the interval comes from the "
                    "reading resolutions"
                )
                residuals, r_squared = None, math.nan
            else:
                line = fit_line(tau, log_used[sl])
                k_reference = -line.slope * self.scale
                r_squared = line.r_squared
                # signs of the residuals, y − b·x > ȳ − b·x̄, in one scratch array
                scratch = np.multiply(tau, line.slope)
                np.subtract(log_used[sl], scratch, out=scratch)
                residuals = scratch > line.y_mean - line.slope * line.x_mean
                del scratch
            self._refuse_no_fall(k_reference, start, stop)
            fitted = None
            if line is not None:
                fitted = fit_quantity(
                    "slope of ln h on time", line.slope_standard_error / abs(line.slope), n - 2
                )
        self._refuse_no_fall(k_reference, start, stop)
        ratio = 1.0
        if math.isfinite(temperature):
            ratio = viscosity_ratio(temperature, settings.reference_temperature, settings.viscosity)
        k = k_reference / ratio
        # criteria
        value_time, value_k, step, words = self._values(start, stop, used, log_used)
        if not np.all(np.isfinite(value_k[-criteria.steady_count :])):
            steady = Verdict(
                "steady_values",
                False,
                "k values cannot be formed at the last readings: the head is at or below the "
                "fitted asymptote",
            )
        else:
            steady = steady_values_check(value_k, criteria, words)
        curvature = None
        if line is not None and line.n >= 4:
            x = tau if decay is None else tau[np.isfinite(log_used[sl])]
            y = log_used[sl] if decay is None else log_used[sl][np.isfinite(log_used[sl])]
            curvature = curvature_test(x, y, criteria.trend_level, line, increasing=True)
            trend = trend_check(curvature, criteria)
        else:
            trend = Verdict(
                "trend",
                False,
                "no significant trend in k: cannot be judged — the tool's own test needs at "
                "least 4 readings",
            )
        gradient_start = float(used[start] / self.height)
        reynolds = math.nan
        if math.isfinite(self.d10):
            t = 20.0 if math.isnan(temperature) else temperature
            velocity = k * gradient_start
            reynolds = float(
                reynolds_number(velocity, self.d10, water_density(t), water_viscosity(t))
            )
        verdicts = (
            steady,
            trend,
            self._flow_ratio(start, stop),
            gradient_check(gradient_start, k_reference, criteria),
            reynolds_check(reynolds, criteria),
        )
        runs = None
        if residuals is not None and residuals.size >= 10:
            if residuals.dtype == bool:
                runs = sign_runs_test(residuals, criteria.trend_level)
            else:
                runs = runs_test(residuals, criteria.trend_level)
        if (runs is not None and runs.significant) or (
            curvature is not None and curvature.significant
        ):
            diagnosis = _curvature_note(runs, curvature, decay is not None)
        else:
            diagnosis = ""
        interval = self._interval(k_reference, fitted, start, stop, temperature)
        if decay is None:
            increment_k = self.increment_k
        else:
            with np.errstate(invalid="ignore"):
                increment_k = self.scale * -np.diff(log_used) / np.diff(self.reference_time)
        return FallingHeadAnalysis(
            specimen=self.specimen,
            fit_kind=fit,
            start=start,
            stop=stop,
            window_proposed=proposed,
            time=self.time,
            head=self.head,
            corrected_head=self.corrected_head,
            reference_time=self.reference_time,
            capillary_rise=self.capillary_rise,
            asymptote=float(asymptote),
            asymptote_low=float(low_inf),
            asymptote_high=float(high_inf),
            increment_time=self.increment_time,
            increment_k=increment_k,
            value_time=value_time,
            value_k=value_k,
            value_step=step,
            line=line,
            decay=decay,
            k=float(k),
            k_reference=float(k_reference),
            k_reference_low=interval.low,
            k_reference_high=interval.high,
            interval=interval,
            r_squared=float(r_squared),
            curvature=curvature,
            runs=runs,
            verdicts=verdicts,
            notes=tuple(notes),
            diagnosis=diagnosis,
            method_notes=tuple(method_notes),
            standpipe_area=self.standpipe_area,
            gradient_start=gradient_start,
            gradient_end=float(used[stop - 1] / self.height),
            temperature=temperature,
            reynolds=reynolds,
        )

    def _refuse_no_fall(self, k_reference, start, stop):
        if not k_reference > 0:
            raise ValueError(
                f"specimen {self.specimen}: the head does not fall over readings {start + 1} to "
                f"{stop} (k = {k_reference:.3g} m/s); check the readings or the window"
            )

    def _interval(self, k_reference, fitted, start, stop, temperature) -> UncertaintyResult:
        settings = self.settings
        resolutions = settings.resolutions
        readings: tuple[InputQuantity, ...] = ()
        factor = None
        if fitted is None:  # two readings: their resolutions enter directly
            h1, h2 = (float(h) for h in self.corrected_head[start : start + 2])
            t1, t2 = (float(t) for t in self.time[start : start + 2])
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
            diameter=self.diameter,
            flow_length=self.height,
            resolutions=resolutions,
            fit=fitted,
            readings=readings,
            reading_factor=factor,
            standpipe_areas=(self.inflow_area, self.outflow_area),
            temperature=temperature,
            reference_temperature=settings.reference_temperature,
            viscosity=settings.viscosity,
            method=settings.uncertainty_method,
            trials=settings.monte_carlo_trials,
            seed=settings.monte_carlo_seed,
        )


def _curvature_note(runs: RunsTest | None, curvature: CurvatureTest | None, datum: bool) -> str:
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


def falling_head_analysis(
    readings: pd.DataFrame,
    specimen_row: pd.Series,
    settings=None,
    window=None,
    fit: str | None = None,
    capillary_rise: float | None = None,
) -> FallingHeadAnalysis:
    """Analyse one specimen's falling-head readings in one call.

    ``FallingHeadRecord(readings, specimen_row, settings, capillary_rise).analyse(window,
    fit)``; keep the record instead when several windows of one specimen are tried.

    Parameters
    ----------
    readings, specimen_row, settings, capillary_rise
        See :class:`FallingHeadRecord`.
    window, fit
        See :meth:`FallingHeadRecord.analyse`.

    Returns
    -------
    FallingHeadAnalysis
    """
    record = FallingHeadRecord(readings, specimen_row, settings, capillary_rise)
    return record.analyse(window, fit)


@dataclass(frozen=True)
class FallingHeadResult:
    """The conductivity of one specimen from its falling-head readings (in a window).

    ``fit`` is the least-squares line of ln h on the reference-equivalent time
    (None when only two readings are used).
    """

    specimen: str
    n: int
    start: int
    stop: int
    k: float
    k_reference: float
    k_reference_low: float
    k_reference_high: float
    standpipe_area: float
    gradient_start: float
    gradient_end: float
    temperature: float
    fit: LinearFit | None
    time: np.ndarray
    head: np.ndarray
    reference_time: np.ndarray
    notes: tuple[str, ...]


def reduce_falling_head(
    readings: pd.DataFrame,
    specimen_row: pd.Series,
    reference_temperature: float = 20.0,
    viscosity: str = "kestin",
    window: tuple[int, int] | None = None,
) -> FallingHeadResult:
    """Reduce one specimen's falling-head readings to its conductivity (log-linear fit).

    Parameters
    ----------
    readings : pandas.DataFrame
        The specimen's rows of the ``falling_head`` table, in time order: ``time`` [s],
        ``head`` [m], ``temperature`` [degC] (NaN where not recorded).
    specimen_row : pandas.Series
        The specimen's state: ``specimen``, ``area`` [m2], ``height`` [m],
        ``standpipe_area`` [m2], ``tailwater_standpipe_area`` [m2] (NaN: constant
        tailwater).
    reference_temperature : float
        Temperature k is corrected to. [degC]
    viscosity : str
        Viscosity method for R_T.
    window : (int, int), optional
        Readings ``start`` to ``stop - 1`` (positions in ``readings``); all by default.

    Returns
    -------
    FallingHeadResult
        k at the test temperature, k at the reference temperature with the 95 %
        interval of the fitted slope alone, the gradients at the window's ends and its
        time-weighted mean temperature. :func:`falling_head_analysis` gives the interval
        that also carries the measurement resolutions, and the validity verdicts.

    References
    ----------
    ASTM D5084 Methods B and C; the log-linear least squares of ln h on t is common
    practice for many readings (no source); intervals from the Student t distribution
    of the slope (Draper & Smith, *Applied Regression Analysis*, ch. 1, from memory).
    """
    from .results import Settings

    settings = Settings(reference_temperature=reference_temperature, viscosity=viscosity)
    record = FallingHeadRecord(readings, specimen_row, settings)
    analysis = record.analyse((0, record.n) if window is None else window, "log_linear")
    start, stop = analysis.start, analysis.stop
    line = analysis.line
    if line is None:
        low = high = analysis.k_reference
    else:
        low, high = -line.slope_high * record.scale, -line.slope_low * record.scale
    return FallingHeadResult(
        specimen=analysis.specimen,
        n=analysis.n,
        start=start,
        stop=stop,
        k=analysis.k,
        k_reference=analysis.k_reference,
        k_reference_low=float(low),
        k_reference_high=float(high),
        standpipe_area=analysis.standpipe_area,
        gradient_start=analysis.gradient_start,
        gradient_end=analysis.gradient_end,
        temperature=analysis.temperature,
        fit=line,
        time=record.time[start:stop],
        head=record.head[start:stop],
        reference_time=record.reference_time[start:stop] - record.reference_time[start],
        notes=analysis.notes,
    )
