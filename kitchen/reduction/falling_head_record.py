"""One specimen's falling-head readings, prepared once, and each reading window reduced to k.

:class:`FallingHeadRecord` checks the readings (each bad value named by its row and
column), takes the specimen's dimensions and standpipes, forms the reference-equivalent
time from the temperatures, subtracts the capillary rise, and keeps the trend of every
trial window; :meth:`FallingHeadRecord.analyse` then reduces a window (chosen, or proposed
by the tool) to a :class:`~kitchen.reduction.falling_head_evidence.FallingHeadAnalysis`:
the log-linear fit of ln h on the reference-equivalent time, or the datum-fitted decay, then
every criterion. The window proposed is the longest one ending at the last reading that
meets every criterion, for either fit; where it leaves readings out, the full record is
judged too, so that a fault running through the whole record (a wrong datum) is not hidden
by a window too short to show it, and an early transient is not taken for a datum by the
datum-fitted decay. :meth:`FallingHeadRecord.with_specimen` gives the
same readings against a revised specimen row without preparing them again. The functions
after the class do the work of :meth:`FallingHeadRecord.analyse` on the record's prepared
state (the record is their first argument).

References
----------
ASTM D5084, Methods B and C, calculation and termination criteria (from memory for the
clauses).
Head, K. H., *Manual of Soil Laboratory Testing*, Vol. 2, permeability tests: capillary
rise in standpipes (from memory).
Golub & Pereyra (1973) for the separable fit (:func:`kitchen.fits.fit_exponential_decay`).
Hausman, J. A. (1978), Econometrica 46(6):1251, for comparing the datum of two windows
(from memory).
"""

from __future__ import annotations

import copy
import math
from dataclasses import replace
from functools import cached_property

import numpy as np
import pandas as pd
from scipy import special

from kitchen.fits import curvature_test, fit_exponential_decay, fit_line, runs_test, sign_runs_test
from kitchen.settings import FALLING_HEAD_FITS, Settings
from kitchen.uncertainty import fit_quantity
from kitchen.validity import (
    Verdict,
    datum_check,
    flow_ratio_check,
    gradient_check,
    propose_window,
    reynolds_check,
    reynolds_number,
    steady_values_check,
    trend_check,
    window_trends,
)
from kitchen.water import viscosity_ratio, water_density, water_viscosity

from .falling_head_evidence import (
    FallingHeadAnalysis,
    curvature_diagnosis,
    full_record_evidence,
    last_k_values,
    window_interval,
)
from .falling_head_formulas import (
    TrapezoidArea,
    effective_standpipe_area,
    jurin_capillary_rise,
    reference_elapsed_time,
)

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
        Heads less the capillary rise (formed when read: :meth:`corrected`), and their
        logarithm. [m], [-]
    reference_time : numpy.ndarray
        Reference-equivalent time from the first reading (the elapsed time when no
        temperature is recorded). [s]
    capillary_rise, scale, mean_temperature : float
        The rise subtracted [m], a·L/A [m], the record's time-weighted temperature [degC].
    full_line : kitchen.fits.LinearFit or None
        ln h on the reference time over every reading (formed on first use; None for two
        readings).
    full_curvature, full_decay : kitchen.fits.CurvatureTest, kitchen.fits.DecayFit
        The curvature test of ln h and the datum-fitted decay over every reading, which the
        full record's judgement uses (formed on first use, once a record: a proposal made
        again does not refit them).

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
        steps = np.diff(time)
        self._check(np.r_[True, steps > 0], "time", "a time later than the reading before")
        self.head = head
        self._set_specimen(specimen_row)
        self._prepare_temperature(readings, steps)
        del steps
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
        other._set_specimen(specimen_row)
        same_bores = np.array_equal(
            [self.inflow_area, self.outflow_area],
            [other.inflow_area, other.outflow_area],
            equal_nan=True,
        )
        if not same_bores and self._rise_from_bores:
            for derived in ("_trends", "full_line", "full_curvature", "full_decay"):  # ln h changes
                other.__dict__.pop(derived, None)
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
    def full_line(self):
        """ln h on the reference time over every reading (None for two readings)."""
        if self.n < 3:
            return None
        return fit_line(self.reference_time, self.log_head)

    @cached_property
    def full_curvature(self):
        """The trend criterion's curvature test of ln h over every reading (formed on first
        use; the full record's judgement starts from it:
        :func:`~kitchen.reduction.falling_head_evidence.full_record_evidence`)."""
        return curvature_test(
            self.reference_time,
            self.log_head,
            self.settings.criteria.trend_level,
            self.full_line,
            increasing=True,
        )

    @cached_property
    def full_decay(self):
        """The datum-fitted decay over every reading (formed on first use, where the full
        record curves:
        :func:`~kitchen.reduction.falling_head_evidence.full_record_evidence`)."""
        fit = fit_exponential_decay(self.reference_time, self.corrected())
        # judged by its datum and time constant alone: its residuals, an array of the
        # record's length, are not kept
        return replace(fit, residuals=np.empty(0))

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

    def _prepare_temperature(self, readings, steps):
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
            time, filled, settings.reference_temperature, settings.viscosity, steps=steps
        )
        # the temperature's integral, for the mean over any window (76 MiB for 10⁷
        # readings as a whole array, which a record of them no longer holds)
        self._temperature_area = TrapezoidArea(time, filled)
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
        corrected = self.corrected()
        bad = np.flatnonzero(corrected <= 0)
        if bad.size:
            i = int(bad[0])
            raise ValueError(
                f"specimen {self.specimen}, {self._where(i)}, column 'head': head "
                f"{self.head[i] * 1e3:.1f} mm is not above the capillary rise {rise * 1e3:.1f} mm; "
                "check the capillary-rise value or the standpipe bore"
            )
        if rise:  # `corrected` is an array of its own: its logarithm is taken in place
            self.log_head = np.log(corrected, out=corrected)
        else:
            self.log_head = np.log(corrected)

    def corrected(self, start: int = 0, stop: int | None = None) -> np.ndarray:
        """Heads of readings ``start`` to ``stop - 1`` less the capillary rise. [m]

        Formed when asked for (the heads themselves when there is no rise), so a record
        of 10⁷ readings holds no second array of heads beside ln h."""
        head = self.head[start:stop]
        return head - self.capillary_rise if self.capillary_rise else head

    @property
    def corrected_head(self) -> np.ndarray:
        """Heads less the capillary rise, every reading (:meth:`corrected`). [m]"""
        return self.corrected()

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
        area = self._temperature_area.area
        return float((area(stop - 1) - area(start)) / span)

    def _minimum_readings(self) -> int:
        return max(self.settings.criteria.steady_count + 1, 6)

    # ---------------------------------------------------------------- analysis
    def analyse(self, window=None, fit: str | None = None) -> FallingHeadAnalysis:
        """Reduce one reading window to k with its interval, diagnostics and verdicts.

        Parameters
        ----------
        window : (int, int), optional
            Readings ``start`` to ``stop - 1`` (positions, see
            :func:`~kitchen.reduction.reading_window` to choose by time). Without one the
            tool proposes the longest window ending at the last reading that meets every
            criterion, and says so.
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
        evidence = None
        if window is None:
            if fit == "datum":
                start, met, reason, fit, evidence = _propose_datum(self)
            else:
                proposal = _propose(self)
                start, met, reason = proposal.start, proposal.meets_criteria, proposal.reason
                if met and start > 0:
                    evidence = full_record_evidence(self, start)
                elif not met and self._trends.starts and not self._trends.trend_ok[0]:
                    evidence = full_record_evidence(self, None)
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
        return _analyse(self, start, stop, fit, proposed, notes, method_notes, evidence)


def _analyse(
    record, start, stop, fit, proposed, notes, method_notes, evidence=None
) -> FallingHeadAnalysis:
    settings = record.settings
    criteria = settings.criteria
    n = stop - start
    sl = slice(start, stop)
    tau = record.reference_time[sl]
    heads = record.corrected(start, stop)
    missing = int(np.searchsorted(record._missing, stop) - np.searchsorted(record._missing, start))
    if not record.temperature_recorded:
        notes.append(
            "temperature not recorded: k not corrected to the reference temperature "
            "(about 2.5 % per degC)"
        )
    elif missing:
        notes.append(
            f"temperature missing at {missing} of {n} readings: interpolated in time from "
            "the readings that have one"
        )
    temperature = record._mean_temperature(start, stop)
    decay, asymptote, low_inf, high_inf = None, 0.0, 0.0, 0.0
    if fit == "datum":
        if n < 4:
            raise ValueError(
                f"specimen {record.specimen}: the datum-fitted decay needs at least 4 readings; "
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
        used = record.corrected_head - asymptote
        with np.errstate(divide="ignore", invalid="ignore"):
            log_used = np.log(used)
        k_reference = record.scale / decay.time_constant
        spread = decay.time_constant_standard_error / decay.time_constant
        fitted = fit_quantity("time constant of the decay", spread, n - 3)
        words = (
            f"datum-fitted decay h = h∞ + (h0 − h∞)·exp(−t/τ): h∞ = {asymptote * 1e3:.1f} mm "
            f"(95 % interval {low_inf * 1e3:.1f} to {high_inf * 1e3:.1f} mm), "
            f"τ = {decay.time_constant / 3600:.3g} h; k from τ"
        )
        method_notes.append(words)
        if not low_inf <= 0.0 <= high_inf:
            straight = -fit_line(tau, record.log_head[sl]).slope * record.scale
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
        used, log_used = record.corrected_head, record.log_head
        if n == 2:
            line = None
            k_reference = record.scale * (log_used[start] - log_used[start + 1]) / (tau[1] - tau[0])
            notes.append(
                "two readings only: no interval from a fit; the interval comes from the "
                "reading resolutions"
            )
            residuals, r_squared = None, math.nan
        else:
            line = fit_line(tau, log_used[sl])
            k_reference = -line.slope * record.scale
            r_squared = line.r_squared
            # signs of the residuals, y − b·x > ȳ − b·x̄, in one scratch array
            scratch = np.multiply(tau, line.slope)
            np.subtract(log_used[sl], scratch, out=scratch)
            residuals = scratch > line.y_mean - line.slope * line.x_mean
            del scratch
        _refuse_no_fall(record, k_reference, start, stop)
        fitted = None
        if line is not None:
            fitted = fit_quantity(
                "slope of ln h on time", line.slope_standard_error / abs(line.slope), n - 2
            )
    _refuse_no_fall(record, k_reference, start, stop)
    ratio = 1.0
    if math.isfinite(temperature):
        ratio = viscosity_ratio(temperature, settings.reference_temperature, settings.viscosity)
    k = k_reference / ratio
    # criteria
    if decay is not None:
        head_scatter, slope = decay.residual_standard_deviation, -1.0 / decay.time_constant
    elif line is not None:
        head_scatter = _head_scatter(line)
        slope = line.slope
    else:
        head_scatter, slope = math.nan, -k_reference / record.scale
    judged = last_k_values(record, start, stop, used, log_used, head_scatter, slope)
    if not np.all(np.isfinite(judged.k[-criteria.steady_count :])):
        steady = Verdict(
            "steady_values",
            False,
            "k values cannot be formed at the last readings: the head is at or below the "
            "fitted asymptote",
        )
    else:
        steady = steady_values_check(judged.k, criteria, judged.words)
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
    gradient_start = float(used[start] / record.height)
    reynolds = math.nan
    if math.isfinite(record.d10):
        t = 20.0 if math.isnan(temperature) else temperature
        velocity = k * gradient_start
        reynolds = float(
            reynolds_number(velocity, record.d10, water_density(t), water_viscosity(t))
        )
    verdicts = (
        steady,
        trend,
        _flow_ratio(record, start, stop),
        gradient_check(gradient_start, k_reference, criteria),
        reynolds_check(reynolds, criteria),
    )
    if decay is not None:
        verdicts += (datum_check(asymptote, low_inf, high_inf, criteria),)
    if evidence is not None:
        notes.append(evidence.note)
        if evidence.verdict is not None:
            verdicts += (evidence.verdict,)
    runs = None
    if residuals is not None and residuals.size >= 10:
        if residuals.dtype == bool:
            runs = sign_runs_test(residuals, criteria.trend_level)
        else:
            runs = runs_test(residuals, criteria.trend_level)
    if (runs is not None and runs.significant) or (curvature is not None and curvature.significant):
        diagnosis = curvature_diagnosis(runs, curvature, decay is not None)
    else:
        diagnosis = ""
    interval = window_interval(
        record, k_reference, fitted, start, stop, temperature, datum_fitted=decay is not None
    )
    return FallingHeadAnalysis(
        specimen=record.specimen,
        fit_kind=fit,
        start=start,
        stop=stop,
        window_proposed=proposed,
        time=record.time,
        head=record.head,
        reference_time=record.reference_time,
        capillary_rise=record.capillary_rise,
        asymptote=float(asymptote),
        asymptote_low=float(low_inf),
        asymptote_high=float(high_inf),
        scale=record.scale,
        value_time=judged.time,
        value_k=judged.k,
        value_step=judged.step,
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
        standpipe_area=record.standpipe_area,
        gradient_start=gradient_start,
        gradient_end=float(used[stop - 1] / record.height),
        temperature=temperature,
        reynolds=reynolds,
    )


def _head_scatter(line) -> float:
    """Standard deviation of the heads about a line fitted to ln h, in head units. [m]

    The line's residual scatter s of ln h is δh/h; at the head exp(ȳ) of the window's
    mean ln h it is a head scatter of s·exp(ȳ) (first order in δh/h).
    """
    if line.n < 3:
        return math.nan
    return line.residual_standard_deviation * math.exp(line.y_mean)


def _refuse_no_fall(record, k_reference, start, stop):
    if not k_reference > 0:
        raise ValueError(
            f"specimen {record.specimen}: the head does not fall over readings {start + 1} to "
            f"{stop} (k = {k_reference:.3g} m/s); check the readings or the window"
        )


def _flow_ratio(record, start, stop) -> Verdict:
    criteria = record.settings.criteria
    if not record._volumes:
        return flow_ratio_check(math.nan, math.nan, criteria)
    inflow, outflow = record.inflow[start:stop], record.outflow[start:stop]
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
                f"outflow/inflow: cannot be judged — {name} decreases at {record._where(index)} "
                "(the volumes are read as cumulative)",
            )
    first, last = both[0], both[-1]
    return flow_ratio_check(
        float(inflow[last] - inflow[first]), float(outflow[last] - outflow[first]), criteria
    )


def _propose(record):
    settings = record.settings
    criteria = settings.criteria
    heads, log_head = record.corrected_head, record.log_head
    line = record.full_line
    if line is None:
        judged = last_k_values(record, 0, record.n, heads, log_head, math.nan, -1.0)
    else:
        judged = last_k_values(
            record, 0, record.n, heads, log_head, _head_scatter(line), line.slope
        )
    steady = steady_values_check(judged.k, criteria, judged.words)
    reynolds_per_k = math.nan
    if math.isfinite(record.d10):
        t = 20.0 if math.isnan(record.mean_temperature) else record.mean_temperature
        ratio = viscosity_ratio(t, settings.reference_temperature, settings.viscosity)
        reynolds_per_k = water_density(t) * record.d10 / (water_viscosity(t) * ratio)
    starts = record._trends.starts  # the gradient is judged at the trial starts only
    return propose_window(
        record.reference_time,
        log_head,
        heads[:starts] / record.height,
        record.scale,
        criteria,
        steady_passed=bool(steady.passed),
        minimum_readings=record._minimum_readings(),
        inflow=record.inflow,
        outflow=record.outflow,
        reynolds_per_k=reynolds_per_k,
        trends=record._trends,
    )


def _propose_datum(record, grid: int = 16, refinements: int = 8):
    """The window proposed for the datum-fitted decay, and the fit to use over it.

    Returns ``(start, met, reason, fit, evidence)``: the window is readings ``start`` to
    the last; ``fit`` is ``"datum"``, or ``"log_linear"`` where the full record shows an
    early transient (below); ``evidence`` is the full record's
    (:func:`~kitchen.reduction.falling_head_evidence.full_record_evidence`), or None.

    A decay to a fitted datum follows an early transient as readily as a datum error: over
    a window that still holds the transient's tail it takes the tail for a datum some tens
    of millimetres off, within the datum tolerance, and gives k up to about 10 % high with
    an interval that does not hold the truth; a later start only moves the window to where
    the tail is just too small to see, and the decay's k sits at the edge of its interval.
    So the log-linear proposal comes first: where it leaves out early readings and the full
    record shows that its curvature lies in them, not in a wrong datum (the window's
    readings refute the datum that would explain it), no datum error is left to fit, and k
    comes from the log-linear fit over that window, with a note that says why. Otherwise
    the decay is refitted for each trial start: on a grid of up to ``grid`` starts, then by
    bisection (at most ``refinements`` more fits) between the last start that fails and
    the first that passes; the longest window ending at the last reading is proposed whose
    decay fit meets every criterion and whose fitted datum is a datum's:

    - where the log-linear proposal leaves out early readings, the datum fitted to the
      trial window agrees with the one fitted to the readings that proposal keeps: a datum
      error is the same in every window, so the two estimates differ only by their noise,
      whose variance is the difference of their variances (the longer window's estimate
      being the more precise, as in Hausman's test); a difference beyond the two-sided
      normal quantile at ``criteria.trend_level`` belongs to the early readings, as a
      transient's does;
    - a datum whose interval excludes zero bends ln h itself: the trial window's ln h
      curves significantly (the trend criterion's test). A decay can find a datum in the
      fast fall of a few early readings where ln h shows no curvature.

    The tool's own rule; its rates on seeded populations are measured by
    ``tests/benchmarks/verdict_rates.py``.

    References
    ----------
    Hausman, J. A. (1978). Specification tests in econometrics. Econometrica 46(6),
    1251-1271 (an efficient and a consistent estimate compared; from memory).
    """
    criteria = record.settings.criteria
    proposal = _propose(record)
    reference = None
    if proposal.meets_criteria and proposal.start > 0:
        evidence = full_record_evidence(record, proposal.start)
        if evidence.refuted:
            reason = (
                "datum-fitted decay not used: the curvature of the full record lies in its first "
                f"{proposal.start} readings (an early transient, not a wrong datum: corrected by "
                "the datum that would explain it, the later readings curve), and a decay fitted "
                "after them takes the transient's tail for a datum; k from the log-linear fit "
                f"over the longest window that meets every criterion"
            )
            return proposal.start, True, reason, "log_linear", evidence
        reference = fit_exponential_decay(
            record.reference_time[proposal.start :], record.corrected(proposal.start)
        )
    keep = max(math.ceil(criteria.window_minimum_fraction * record.n), record._minimum_readings())
    last_start = record.n - keep
    reason = (
        "the longest window ending at the last reading whose decay fit meets every criterion "
        "and whose fitted datum bends ln h as a datum would"
    )
    limit = float(special.ndtri(1 - criteria.trend_level / 2))
    none = (
        "no window ending at the last reading and keeping at least "
        f"{criteria.window_minimum_fraction * 100:.0f} % of the readings meets every criterion "
        "with the datum-fitted decay"
    )
    if last_start < 0:
        return 0, False, none, "datum", None

    def passes(start):
        trial = _analyse(record, start, record.n, "datum", True, [], [])
        if not (trial.fit_kind == "datum" and trial.valid):
            return False
        if reference is not None and reference.converged and start < proposal.start:
            spread = reference.asymptote_standard_error**2 - trial.decay.asymptote_standard_error**2
            gap = abs(trial.asymptote - reference.asymptote)
            if gap > limit * math.sqrt(max(spread, 0.0)):
                return False
        if trial.asymptote_low <= 0.0 <= trial.asymptote_high:
            return True
        bend = curvature_test(
            record.reference_time[start:],
            record.log_head[start:],
            criteria.trend_level,
            increasing=True,
        )
        return bend.significant

    starts = np.unique(np.linspace(0, last_start, min(grid, last_start + 1)).round().astype(int))
    previous = None
    for start in starts:
        if passes(int(start)):
            low, high = (int(previous), int(start)) if previous is not None else (0, 0)
            for _ in range(refinements):
                if high - low <= 1:
                    break
                middle = (low + high) // 2
                low, high = (low, middle) if passes(middle) else (middle, high)
            return high, True, reason, "datum", None
        previous = start
    return 0, False, none, "datum", None
