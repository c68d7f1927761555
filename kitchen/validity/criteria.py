"""The limits of the validity criteria, and the verdict each check returns.

:class:`Criteria` holds every limit, with ASTM D5084's value as default where it gives one
(from memory, high confidence), so that a project specification with other limits can be
followed; :data:`GRADIENT_TABLE` and :func:`recommended_maximum_gradient` give the
standard's recommended maximum gradient for a measured k. A :class:`Verdict` is one
criterion's outcome in words. The checks themselves are in :mod:`kitchen.validity.checks`.

References
----------
.. [D5084] ASTM D5084, Standard Test Methods for Measurement of Hydraulic Conductivity of
   Saturated Porous Materials Using a Flexible Wall Permeameter: termination criteria and
   the table of recommended maximum hydraulic gradients (from memory for the clauses and
   the table).
.. [Bear] Bear, J. (1972). *Dynamics of Fluids in Porous Media*, Elsevier, §5.11 (Darcy's
   law holds for a Reynolds number on a grain diameter below about 1). From memory.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = [
    "GRADIENT_TABLE",
    "Criteria",
    "Verdict",
    "percent_text",
    "recommended_maximum_gradient",
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
        Falling head: each k value the steady-values criterion judges is a least-squares
        fit over a span of readings long enough that the record's observed scatter about
        its fit makes at most this relative standard uncertainty in it (0.05, a fifth of
        the ±25 % band; the tool's own rule, see
        :func:`kitchen.reduction.falling_head_evidence.last_k_values`). [-]
    window_minimum_fraction : float
        A proposed falling-head window keeps at least this fraction of the readings
        (0.5; the tool's own rule). [-]
    datum_tolerance : float
        The datum-fitted decay is taken as a tailwater-datum correction only while its
        fitted datum h∞ can lie within this much of the datum read (50 mm; the tool's own
        rule). A larger h∞ is an early transient or a drift in k bending ln h, not a datum
        error. [m]
    minimum_b_value : float
        A flexible-wall specimen is saturated when its B-value at the end of saturation is
        at least this (ASTM D5084: 0.95, from memory; a stiff soil may instead show B
        unchanged over two increments of back pressure). [-]
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
    datum_tolerance: float = 0.05
    minimum_b_value: float = 0.95

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
            "minimum_b_value": self.minimum_b_value,
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
        if not self.datum_tolerance > 0:
            raise ValueError(
                f"datum_tolerance must be a positive length [m], got {self.datum_tolerance!r}"
            )
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
    for low, high, gradient in table:  # a later row overrides an earlier one where they overlap
        out[(k >= low) & (k < high)] = gradient
    return float(out) if out.ndim == 0 else out


def percent_text(value: float) -> str:
    """A fraction in percent: whole numbers as such, else two significant digits."""
    percent = value * 100
    if abs(percent) >= 9.5 or abs(percent - round(percent)) < 1e-9:
        return f"{percent:.0f} %"
    return f"{percent:.1f} %"


def signed_percent(value: float) -> str:
    """A signed percentage to one decimal, without a negative zero."""
    return f"{round(value * 100, 1) + 0.0:+.1f} %"
