"""Falling-head test reduction: k from two readings, or from many by a log-linear fit.

With the tailwater level constant, the head difference across the specimen decays as
ln h(t) = ln h0 − (k·A/(a·L))·t, so k = −m·a·L/A where m is the slope of ln h on t.
With two burettes (rising tailwater, ASTM D5084 Method C) the same holds with the
standpipe area replaced by a_in·a_out/(a_in + a_out).

References
----------
ASTM D5084, Methods B (falling head, constant tailwater) and C (falling head, rising
tailwater), calculation section (from memory for the clauses).
ASTM D5856 and ISO 17892-11 (falling-head test).
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, chapter on
permeability, falling-head test equation k = (a·L/(A·t))·ln(h1/h2).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from .fitting import LinearFit, fit_line
from .water import viscosity_ratio

__all__ = [
    "falling_head_conductivity",
    "effective_standpipe_area",
    "rising_tailwater_conductivity",
    "reference_elapsed_time",
    "FallingHeadResult",
    "reduce_falling_head",
]


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
    >>> round(k * 100, 5)  # cm/s
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


def _filled_temperature(time: np.ndarray, temperature: np.ndarray, notes: list[str]):
    known = ~np.isnan(temperature)
    if known.all():
        return temperature, True
    if not known.any():
        notes.append(
            "temperature not recorded: k not corrected to the reference temperature "
            "(about 2.5 % per degC)"
        )
        return None, False
    notes.append(
        f"temperature missing at {int((~known).sum())} of {len(time)} readings: "
        "interpolated in time from the readings that have one"
    )
    return np.interp(time, time[known], temperature[known]), True


def reduce_falling_head(
    readings: pd.DataFrame,
    specimen_row: pd.Series,
    reference_temperature: float = 20.0,
    viscosity: str = "kestin",
    window: tuple[int, int] | None = None,
) -> FallingHeadResult:
    """Reduce one specimen's falling-head readings to its conductivity.

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
        interval of the fitted slope, the gradients at the window's ends and its
        time-weighted mean temperature.

    References
    ----------
    ASTM D5084 Methods B and C; the log-linear least squares of ln h on t is common
    practice for many readings (no source); intervals from the Student t distribution
    of the slope (Draper & Smith, *Applied Regression Analysis*, ch. 1, from memory).
    """
    specimen = str(specimen_row["specimen"])
    time_all = readings["time"].to_numpy(float)
    head_all = readings["head"].to_numpy(float)
    start, stop = (0, len(time_all)) if window is None else window
    if not 0 <= start < stop <= len(time_all) or stop - start < 2:
        raise ValueError(
            f"specimen {specimen}: reading window {start}..{stop - 1} needs at least two of "
            f"the {len(time_all)} readings"
        )
    time = time_all[start:stop]
    head = head_all[start:stop]
    notes: list[str] = []
    temperature, corrected = _filled_temperature(
        time, readings["temperature"].to_numpy(float)[start:stop], notes
    )
    if corrected:
        reference_time = reference_elapsed_time(
            time, temperature, reference_temperature, viscosity
        )
        span = time[-1] - time[0]
        mean_temperature = float(np.trapezoid(temperature, time) / span)
    else:
        reference_time = time - time[0]
        mean_temperature = float("nan")
    a = effective_standpipe_area(
        specimen_row["standpipe_area"], specimen_row.get("tailwater_standpipe_area", np.nan)
    )
    scale = a * float(specimen_row["height"]) / float(specimen_row["area"])
    log_head = np.log(head)
    if len(time) == 2:
        fit = None
        k = scale * (log_head[0] - log_head[1]) / (time[1] - time[0])
        k_reference = scale * (log_head[0] - log_head[1]) / reference_time[1]
        low = high = k_reference
        notes.append("two readings only: no interval from a fit")
    else:
        fit = fit_line(reference_time, log_head)
        k_reference = -fit.slope * scale
        low, high = -fit.slope_high * scale, -fit.slope_low * scale
        k = -fit_line(time, log_head).slope * scale
    length = float(specimen_row["height"])
    return FallingHeadResult(
        specimen=specimen,
        n=len(time),
        start=start,
        stop=stop,
        k=float(k),
        k_reference=float(k_reference),
        k_reference_low=float(low),
        k_reference_high=float(high),
        standpipe_area=float(a),
        gradient_start=float(head[0] / length),
        gradient_end=float(head[-1] / length),
        temperature=mean_temperature,
        fit=fit,
        time=time,
        head=head,
        reference_time=reference_time,
        notes=tuple(notes),
    )
