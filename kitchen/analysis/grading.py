"""Conductivity predicted from grading: Hazen, Chapuis, and the Kozeny–Carman ratio.

Estimates from the effective grain size d10 (and the void ratio) to show beside measured
values, never measurements; each says whether its inputs lie in the range the method was
established for.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ._checks import (
    column_numbers,
    finite_numbers,
    like_inputs,
    require_columns,
    require_elements,
    require_same_length,
    shown_value,
    table_row_name,
)

__all__ = [
    "CHAPUIS_VALIDITY",
    "HAZEN_VALIDITY",
    "KOZENY_CARMAN_VALIDITY",
    "GradingPrediction",
    "hazen_conductivity",
    "chapuis_conductivity",
    "kozeny_carman_ratio",
    "grading_predictions",
]


_HAZEN_D10_RANGE = (0.1e-3, 3.0e-3)  # [m]
_CHAPUIS_D10_RANGE = (0.13e-3, 1.98e-3)  # [m]
_CHAPUIS_VOID_RATIO_RANGE = (0.4, 1.5)

HAZEN_VALIDITY = "clean uniform sand, 0.1 mm ≤ d10 ≤ 3 mm (uniformity not checked)"
"""Where Hazen's estimate holds, in words (see :func:`hazen_conductivity`)."""
CHAPUIS_VALIDITY = "natural sand and gravel, 0.13 mm ≤ d10 ≤ 1.98 mm, 0.4 ≤ e ≤ 1.5"
"""Where Chapuis's prediction holds, in words (see :func:`chapuis_conductivity`)."""
KOZENY_CARMAN_VALIDITY = (
    "one clean sand whose grains and fabric stay the same, between the void ratios it was "
    "tested at; not for clays, whose k does not follow e³/(1 + e)"
)
"""Where the Kozeny–Carman ratio holds, in words (see :func:`kozeny_carman_ratio`)."""


@dataclass(frozen=True)
class GradingPrediction:
    """A conductivity predicted from grading, with whether the inputs are in the method's range.

    Attributes
    ----------
    conductivity : float, numpy.ndarray or pandas.Series
        Predicted k, in the kind of the inputs. [m/s]
    within_range : bool, numpy.ndarray of bool or pandas.Series
        True where the inputs lie inside the range the method was established for.
    method : str
        The method's name.
    validity : str
        The range of validity, in words.
    """

    conductivity: object
    within_range: object
    method: str
    validity: str


def _d10(d10) -> np.ndarray:
    values = finite_numbers(d10, "d10")
    require_elements(
        d10,
        values,
        values > 0,
        "d10",
        "a positive effective grain size d10 in m (0.2 mm is 0.0002)",
    )
    return values


def _void_ratio(void_ratio, name="void_ratio") -> np.ndarray:
    values = finite_numbers(void_ratio, name)
    require_elements(void_ratio, values, values > 0, name, "a positive void ratio")
    return values


def hazen_conductivity(d10, coefficient=100.0) -> GradingPrediction:
    """Hazen's estimate of the conductivity of a clean, uniform sand, k = C·d10².

    Parameters
    ----------
    d10 : float, array_like or pandas.Series
        Effective grain size, the size 10 % by mass is finer than. [m]
    coefficient : float, default 100.0
        Hazen's C with k in cm/s and d10 in cm (about 100; 1 to 1.5 with d10 in mm).
        [cm⁻¹·s⁻¹, i.e. (cm/s)/cm²]

    Returns
    -------
    GradingPrediction
        k = C·d10² converted to SI: k [m/s] = 0.01 · C · (100 · d10 [m])² = 100·C·d10².
        ``within_range`` is True for 0.1 mm ≤ d10 ≤ 3 mm.

    Notes
    -----
    Meant for clean, uniform sands (uniformity coefficient below about 5, from memory);
    the grading's uniformity is not checked here. A prediction, not a measurement.

    References
    ----------
    Hazen, A. (1892), as given in Das, B. M. and Sobhan, K., *Principles of Geotechnical
    Engineering*, permeability chapter, Hazen's equation (from memory); the range
    0.1–3 mm of d10 as quoted there and by Carrier, W. D. (2003), J. Geotech. Geoenviron.
    Eng. 129(11), 1054–1056 (from memory).
    """
    values = _d10(d10)
    c = finite_numbers(coefficient, "coefficient")
    if c.ndim != 0 or not c > 0:
        raise ValueError(
            "coefficient: expected one positive Hazen coefficient (about 100); "
            f"got {shown_value(coefficient)}"
        )
    k = 100.0 * float(c) * values**2
    inside = (values >= _HAZEN_D10_RANGE[0]) & (values <= _HAZEN_D10_RANGE[1])
    return GradingPrediction(
        conductivity=like_inputs(k, d10),
        within_range=like_inputs(inside, d10),
        method="Hazen (1892)",
        validity=HAZEN_VALIDITY,
    )


def chapuis_conductivity(d10, void_ratio) -> GradingPrediction:
    """Chapuis's (2004) prediction for natural sands and gravels from d10 and void ratio.

    Parameters
    ----------
    d10 : float, array_like or pandas.Series
        Effective grain size. [m]
    void_ratio : float, array_like or pandas.Series
        Void ratio. [-]

    Returns
    -------
    GradingPrediction
        k [cm/s] = 2.4622 · (d10² · e³/(1 + e))^0.7825 with d10 in mm, returned in m/s.
        ``within_range`` is True for 0.13 mm ≤ d10 ≤ 1.98 mm and 0.4 ≤ e ≤ 1.5.

    Notes
    -----
    Established for homogeneous natural sands and gravels, without plastic fines. A
    prediction, not a measurement.

    References
    ----------
    Chapuis, R. P. (2004). Predicting the saturated hydraulic conductivity of sand and
    gravel using effective diameter and void ratio. Canadian Geotechnical Journal 41(5),
    787–795 (coefficients and range from memory).
    """
    d = _d10(d10)
    e = _void_ratio(void_ratio)
    require_same_length(d10=d, void_ratio=e)
    d_mm = 1000.0 * d
    k_cm = 2.4622 * (d_mm**2 * e**3 / (1.0 + e)) ** 0.7825
    inside = (
        (d >= _CHAPUIS_D10_RANGE[0])
        & (d <= _CHAPUIS_D10_RANGE[1])
        & (e >= _CHAPUIS_VOID_RATIO_RANGE[0])
        & (e <= _CHAPUIS_VOID_RATIO_RANGE[1])
    )
    return GradingPrediction(
        conductivity=like_inputs(0.01 * k_cm, d10, void_ratio),
        within_range=like_inputs(inside, d10, void_ratio),
        method="Chapuis (2004)",
        validity=CHAPUIS_VALIDITY,
    )


def kozeny_carman_ratio(e_from, e_to):
    """Ratio k(e_to)/k(e_from) for one sand at two void ratios, k ∝ e³/(1 + e).

    Parameters
    ----------
    e_from : float, array_like or pandas.Series
        Void ratio at which k is known. [-]
    e_to : float, array_like or pandas.Series
        Void ratio at which k is wanted. [-]

    Returns
    -------
    float, numpy.ndarray or pandas.Series
        [e_to³/(1 + e_to)] / [e_from³/(1 + e_from)]; multiply a known k by it. [-]

    Notes
    -----
    The proportionality holds for one sand whose grains and fabric stay the same
    (:data:`KOZENY_CARMAN_VALIDITY`), and is read here between void ratios the sand was
    tested at; it fails for clays, whose k falls far faster with e (Mitchell & Soga,
    *Fundamentals of Soil Behavior*, 3rd ed., chapter on conductivity, from memory). A
    prediction, not a measurement; the series analysis notes the range it draws it over.

    References
    ----------
    Taylor, D. W. (1948). *Fundamentals of Soil Mechanics*, Wiley, permeability chapter
    (from memory); as given in Das, B. M. and Sobhan, K., *Principles of Geotechnical
    Engineering*, permeability chapter (from memory).
    """
    a = _void_ratio(e_from, "e_from")
    b = _void_ratio(e_to, "e_to")
    require_same_length(e_from=a, e_to=b)
    return like_inputs((b**3 / (1.0 + b)) / (a**3 / (1.0 + a)), e_from, e_to)


def grading_predictions(table: pd.DataFrame) -> pd.DataFrame:
    """Hazen and Chapuis predictions for each specimen of a table.

    Parameters
    ----------
    table : pandas.DataFrame
        Columns ``specimen``, ``d10`` [m] (NaN when not given) and ``void_ratio`` [-];
        ``source_row`` names rows in messages when present.

    Returns
    -------
    pandas.DataFrame
        A new frame, same index: ``specimen``, ``d10`` [m], ``void_ratio`` [-],
        ``hazen_k`` [m/s], ``hazen_within_range``, ``chapuis_k`` [m/s],
        ``chapuis_within_range`` and ``note`` (in words: predictions, not measurements;
        which inputs lie outside a method's range; why a value is missing). Rows without a
        d10 (or, for Chapuis, a void ratio) get no prediction, said so in ``note``.

    References
    ----------
    See :func:`hazen_conductivity` and :func:`chapuis_conductivity`.
    """
    require_columns(table, ("specimen", "d10", "void_ratio"), "grading table")
    d10 = pd.Series(column_numbers(table, "d10", allow_missing=True), index=table.index)
    e = pd.Series(column_numbers(table, "void_ratio", allow_missing=True), index=table.index)
    for values, column, expected in (
        (d10, "d10", "a positive d10 in m (0.2 mm is 0.0002)"),
        (e, "void_ratio", "a positive void ratio"),
    ):
        bad = values <= 0
        if bad.any():
            rows = "; ".join(
                f"{table_row_name(table, i)}: {shown_value(values[i])}"
                for i in table.index[bad][:5]
            )
            raise ValueError(f"column {column!r}: expected {expected}; {rows}")
    hazen_k = pd.Series(np.nan, index=table.index)
    chapuis_k = pd.Series(np.nan, index=table.index)
    hazen_ok = pd.Series(False, index=table.index)
    chapuis_ok = pd.Series(False, index=table.index)
    has_d10, has_both = d10.notna(), d10.notna() & e.notna()
    if has_d10.any():
        hazen = hazen_conductivity(d10[has_d10])
        hazen_k[has_d10], hazen_ok[has_d10] = hazen.conductivity, hazen.within_range
    if has_both.any():
        chapuis = chapuis_conductivity(d10[has_both], e[has_both])
        chapuis_k[has_both], chapuis_ok[has_both] = chapuis.conductivity, chapuis.within_range
    notes = []
    for i in table.index:
        if not has_d10[i]:
            notes.append("d10 not given: no prediction from grading")
            continue
        parts = ["predictions from grading, not measurements"]
        if not hazen_ok[i]:
            parts.append(f"Hazen: d10 = {1000 * d10[i]:.3g} mm is outside 0.1–3 mm")
        if not has_both[i]:
            parts.append("void ratio not given: no Chapuis prediction")
        elif not chapuis_ok[i]:
            parts.append(
                f"Chapuis: d10 = {1000 * d10[i]:.3g} mm, e = {e[i]:.3g} is outside "
                "0.13–1.98 mm, 0.4–1.5"
            )
        notes.append("; ".join(parts))
    return pd.DataFrame(
        {
            "specimen": table["specimen"],
            "d10": d10,
            "void_ratio": e,
            "hazen_k": hazen_k,
            "hazen_within_range": hazen_ok,
            "chapuis_k": chapuis_k,
            "chapuis_within_range": chapuis_ok,
            "note": notes,
        },
        index=table.index,
    )
