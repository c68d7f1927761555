"""One reading window of a falling-head record reduced to k, and the window the tool proposes.

:func:`_analyse` reduces readings ``start`` to ``stop - 1`` of a prepared
:class:`~kitchen.reduction.falling_head_record.FallingHeadRecord` (the first argument of every
function here) to a :class:`~kitchen.reduction.falling_head_evidence.FallingHeadAnalysis`: the
log-linear fit of ln h on the reference-equivalent time, or the datum-fitted decay, then
every criterion. :func:`_propose` and :func:`_propose_datum` propose the longest window
ending at the last reading that meets every criterion, for either fit.
:meth:`FallingHeadRecord.analyse <kitchen.reduction.falling_head_record.FallingHeadRecord.analyse>`
is the way in.

References
----------
ASTM D5084, Methods B and C, calculation and termination criteria (from memory for the
clauses); Golub & Pereyra (1973) for the separable fit
(:func:`kitchen.fits.fit_exponential_decay`).
"""

from __future__ import annotations

import math

import numpy as np

from kitchen.fits import curvature_test, fit_exponential_decay, fit_line, runs_test, sign_runs_test
from kitchen.uncertainty import fit_quantity
from kitchen.validity import (
    Verdict,
    datum_check,
    gradient_check,
    propose_window,
    reynolds_check,
    reynolds_number,
    steady_values_check,
    trend_check,
)
from kitchen.water import viscosity_ratio, water_density, water_viscosity

from .falling_head_evidence import (
    FallingHeadAnalysis,
    _curvature_note,
    _flow_ratio,
    _interval,
    _values,
)


def _analyse(record, start, stop, fit, proposed, notes, method_notes) -> FallingHeadAnalysis:
    settings = record.settings
    criteria = settings.criteria
    n = stop - start
    sl = slice(start, stop)
    tau = record.reference_time[sl]
    heads = record.corrected_head[sl]
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
    value_time, value_k, step, words = _values(record, start, stop, used, log_used)
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
    runs = None
    if residuals is not None and residuals.size >= 10:
        if residuals.dtype == bool:
            runs = sign_runs_test(residuals, criteria.trend_level)
        else:
            runs = runs_test(residuals, criteria.trend_level)
    if (runs is not None and runs.significant) or (curvature is not None and curvature.significant):
        diagnosis = _curvature_note(runs, curvature, decay is not None)
    else:
        diagnosis = ""
    interval = _interval(record, k_reference, fitted, start, stop, temperature)
    if decay is None:
        increment_k = record.increment_k
    else:
        with np.errstate(invalid="ignore"):
            increment_k = record.scale * -np.diff(log_used) / np.diff(record.reference_time)
    return FallingHeadAnalysis(
        specimen=record.specimen,
        fit_kind=fit,
        start=start,
        stop=stop,
        window_proposed=proposed,
        time=record.time,
        head=record.head,
        corrected_head=record.corrected_head,
        reference_time=record.reference_time,
        capillary_rise=record.capillary_rise,
        asymptote=float(asymptote),
        asymptote_low=float(low_inf),
        asymptote_high=float(high_inf),
        increment_time=record.increment_time,
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
        standpipe_area=record.standpipe_area,
        gradient_start=gradient_start,
        gradient_end=float(used[stop - 1] / record.height),
        temperature=temperature,
        reynolds=reynolds,
    )


def _refuse_no_fall(record, k_reference, start, stop):
    if not k_reference > 0:
        raise ValueError(
            f"specimen {record.specimen}: the head does not fall over readings {start + 1} to "
            f"{stop} (k = {k_reference:.3g} m/s); check the readings or the window"
        )


def _propose(record):
    settings = record.settings
    criteria = settings.criteria
    heads, log_head = record.corrected_head, record.log_head
    value_time, value_k, step, words = _values(record, 0, record.n, heads, log_head)
    steady = steady_values_check(value_k, criteria, words)
    reynolds_per_k = math.nan
    if math.isfinite(record.d10):
        t = record._mean_temperature(0, record.n)
        t = 20.0 if math.isnan(t) else t
        ratio = viscosity_ratio(t, settings.reference_temperature, settings.viscosity)
        reynolds_per_k = water_density(t) * record.d10 / (water_viscosity(t) * ratio)
    return propose_window(
        record.reference_time,
        log_head,
        heads / record.height,
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
    """The longest window ending at the last reading whose decay fit meets every criterion.

    The decay is refitted for each trial start: on a grid of up to ``grid`` starts, then
    by bisection (at most ``refinements`` more fits) between the last start that fails
    and the first that passes. The tool's own rule.
    """
    criteria = record.settings.criteria
    keep = max(math.ceil(criteria.window_minimum_fraction * record.n), record._minimum_readings())
    last_start = record.n - keep
    reason = "the longest window ending at the last reading whose decay fit meets every criterion"
    none = (
        "no window ending at the last reading and keeping at least "
        f"{criteria.window_minimum_fraction * 100:.0f} % of the readings meets every criterion "
        "with the datum-fitted decay"
    )
    if last_start < 0:
        return 0, False, none

    def passes(start):
        trial = _analyse(record, start, record.n, "datum", True, [], [])
        return trial.fit_kind == "datum" and trial.valid

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
            return high, True, reason
        previous = start
    return 0, False, none
