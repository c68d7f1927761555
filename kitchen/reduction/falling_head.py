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

This module holds the one-call :func:`falling_head_analysis`. The closed-form equations are
in :mod:`kitchen.reduction.falling_head_formulas`, the prepared record and the reduction of
each window in :mod:`kitchen.reduction.falling_head_record`, one window's result and its
evidence in :mod:`kitchen.reduction.falling_head_evidence`.

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

import pandas as pd

from .falling_head_evidence import FallingHeadAnalysis
from .falling_head_record import FallingHeadRecord

__all__ = ["falling_head_analysis"]


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
