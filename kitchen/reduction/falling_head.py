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

This module holds the one-call :func:`falling_head_analysis` and the plain
:func:`reduce_falling_head`. The closed-form equations are in
:mod:`kitchen.reduction.falling_head_formulas`, the prepared record in
:mod:`kitchen.reduction.falling_head_record`, one window's result and its evidence in
:mod:`kitchen.reduction.falling_head_evidence` and :mod:`kitchen.reduction.falling_head_window`; their public
names are importable from here.

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

from dataclasses import dataclass

import numpy as np
import pandas as pd

from kitchen.fits import LinearFit
from kitchen.settings import Settings

from .falling_head_evidence import FallingHeadAnalysis
from .falling_head_formulas import STANDARD_GRAVITY as STANDARD_GRAVITY
from .falling_head_record import FallingHeadRecord

__all__ = ["falling_head_analysis", "FallingHeadResult", "reduce_falling_head"]


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
