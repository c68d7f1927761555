"""One specimen's falling-head readings, prepared once for any number of reading windows.

:class:`FallingHeadRecord` checks the readings (each bad value named by its row and
column), takes the specimen's dimensions and standpipes, forms the reference-equivalent
time from the temperatures, subtracts the capillary rise, and keeps the trend of every
trial window; :meth:`FallingHeadRecord.analyse` then reduces a window (chosen, or proposed
by the tool) to a :class:`~kitchen.reduction.falling_head_evidence.FallingHeadAnalysis`, through
:mod:`kitchen.reduction.falling_head_window`. :meth:`FallingHeadRecord.with_specimen` gives the same
readings against a revised specimen row without preparing them again.

References
----------
ASTM D5084, Methods B and C (from memory for the clauses).
Head, K. H., *Manual of Soil Laboratory Testing*, Vol. 2, permeability tests: capillary
rise in standpipes (from memory).
"""

from __future__ import annotations

import copy
import math
from functools import cached_property

import numpy as np
import pandas as pd

from kitchen.settings import FALLING_HEAD_FITS, Settings
from kitchen.validity import window_trends

from .falling_head_evidence import FallingHeadAnalysis
from .falling_head_formulas import (
    effective_standpipe_area,
    jurin_capillary_rise,
    reference_elapsed_time,
)
from .falling_head_window import _analyse, _propose, _propose_datum

__all__ = ["FallingHeadRecord"]


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
        capillary rise and fit (:class:`kitchen.settings.Settings`).
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

    def _minimum_readings(self) -> int:
        return max(self.settings.criteria.steady_count + 1, 6)

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
        (1973) for the separable fit (:func:`kitchen.fits.fit_exponential_decay`);
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
                start, met, reason = _propose_datum(self)
            else:
                proposal = _propose(self)
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
        return _analyse(self, start, stop, fit, proposed, notes, method_notes)
