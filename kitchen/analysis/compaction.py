"""Compaction: saturation lines, compaction curves, the line of optimums, the acceptable zone.

The compaction plane has molding water content w (a fraction) across and dry density ρd
[kg/m3] up. On it sit the zero-air-voids and constant-saturation lines, one compaction curve
per compactive effort, the line through their optimums, and the zone that holds the specimens
whose hydraulic conductivity meets a criterion (Daniel & Benson 1990).

This module holds the compaction curves and the line of optimums. The saturation lines are
in :mod:`kitchen.analysis.saturation_lines`, the acceptable zone in
:mod:`kitchen.analysis.compaction_zone` and the input checks in :mod:`kitchen.analysis._checks`.
"""

from __future__ import annotations

import warnings
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import pandas as pd

from kitchen.fits import LinearFit, fit_line

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
    "CompactionCurve",
    "LineOfOptimums",
    "fit_compaction_curve",
    "compaction_curves",
    "line_of_optimums",
]


# --- compaction curves -----------------------------------------------------------------------

_DEGREES = {"quadratic": 2, "cubic": 3}
_WATER_CONTENT_EXPECTED = "a water content as a fraction between 0 and 1 (0.18 for 18 %, not 18)"
_DRY_DENSITY_EXPECTED = "a dry density in kg/m3 between 100 and 5000 (1.75 Mg/m3 is 1750)"


def _degree(method) -> int:
    if method not in _DEGREES:
        raise ValueError(
            f"method: expected one of {', '.join(map(repr, _DEGREES))}; got {method!r}"
        )
    return _DEGREES[method]


def _plausible_water_content(w):
    return (w >= 0.0) & (w <= 1.0)


def _plausible_dry_density(rho):
    return (rho >= 100.0) & (rho <= 5000.0)


@dataclass(frozen=True)
class CompactionCurve:
    """A compaction curve fitted to the specimens of one compactive effort.

    Attributes
    ----------
    method : str
        ``"quadratic"`` or ``"cubic"``: the polynomial ρd(w) fitted by least squares.
    coefficients : tuple of float
        Polynomial coefficients in powers of w, highest power first (the order
        :func:`numpy.polyval` takes). [kg/m3 per unit water content to that power]
    optimum_water_content : float or None
        Water content at the peak of the fitted curve; None when the curve has no peak. [-]
    maximum_dry_density : float or None
        Dry density at that peak; None when the curve has no peak. [kg/m3]
    n : int
        Number of specimens fitted.
    tested_water_content, tested_dry_density : numpy.ndarray
        The fitted points, in input order. [-], [kg/m3]
    residuals : numpy.ndarray
        Tested minus fitted dry density, in input order. [kg/m3]
    residual_standard_deviation : float or None
        sqrt(Σ residual² / (n − number of coefficients)); None for an exact fit. [kg/m3]
    peak_found : bool
        False when the curve has no maximum (a quadratic opening upward, a cubic without a
        local maximum).
    peak_within_range : bool
        True when the peak lies within the tested water contents.
    message : str
        Empty when the peak is found within the tested range; otherwise what is wrong.
    """

    method: str
    coefficients: tuple[float, ...]
    optimum_water_content: float | None
    maximum_dry_density: float | None
    n: int
    tested_water_content: np.ndarray
    tested_dry_density: np.ndarray
    residuals: np.ndarray
    residual_standard_deviation: float | None
    peak_found: bool
    peak_within_range: bool
    message: str

    def dry_density(self, water_content):
        """Dry density on the fitted curve. [kg/m3] (`water_content` a fraction [-])."""
        w = finite_numbers(water_content, "water_content")
        return like_inputs(np.polyval(self.coefficients, w), water_content)


def _fit_curve(w: np.ndarray, rho: np.ndarray, method: str) -> CompactionCurve:
    degree = _degree(method)
    needed, distinct = degree + 1, np.unique(w).size
    if w.size < needed or distinct < needed:
        raise ValueError(
            f"a {method} compaction curve needs at least {needed} specimens at {needed} "
            f"distinct water contents; got {w.size} specimen(s) at {distinct} distinct "
            "water content(s)"
        )
    # least squares in x = (w - centre)/half, which spans [-1, 1] (as numpy's
    # Polynomial.fit does, for conditioning), then the coefficients in powers of w
    low, high = float(w.min()), float(w.max())
    centre, half = 0.5 * (low + high), 0.5 * (high - low)
    x = (w - centre) / half
    scaled, *_ = np.linalg.lstsq(np.vander(x, needed), rho, rcond=None)  # highest first
    power = np.zeros(1)
    for coefficient in scaled:  # Horner's rule on polynomials: q(x) with x = w/half - c/half
        power = np.polyadd(np.polymul(power, [1.0 / half, -centre / half]), [coefficient])
    power = np.concatenate([np.zeros(needed - power.size), power])  # highest power first
    residuals = rho - np.polyval(scaled, x)
    dof = w.size - needed
    rsd = float(np.sqrt(np.sum(residuals**2) / dof)) if dof > 0 else None
    slope = np.polyder(power)
    bend = np.polyder(slope)
    roots = np.roots(slope) if np.any(slope) else np.zeros(0)
    real = roots[np.abs(roots.imag) <= 1e-9 * np.maximum(1.0, np.abs(roots.real))].real
    maxima = [float(r) for r in real if np.polyval(bend, r) < 0]
    w_opt = rho_max = None
    inside, message = False, ""
    if not maxima:
        message = (
            f"the fitted {method} curve has no peak (it opens upward or does not turn over "
            "within the data): test specimens on both sides of the optimum"
        )
    else:
        w_opt = maxima[0]
        rho_max = float(np.polyval(power, w_opt))
        inside = low <= w_opt <= high
        if not inside:
            message = (
                f"the peak of the fitted {method} curve, w = {w_opt:.3f} ({100 * w_opt:.1f} %), "
                f"lies outside the tested water contents {low:.3f}–{high:.3f}: the optimum is "
                "an extrapolation; test specimens beyond it"
            )
    return CompactionCurve(
        method=method,
        coefficients=tuple(float(c) for c in power),
        optimum_water_content=w_opt,
        maximum_dry_density=rho_max,
        n=int(w.size),
        tested_water_content=w.copy(),
        tested_dry_density=rho.copy(),
        residuals=residuals,
        residual_standard_deviation=rsd,
        peak_found=bool(maxima),
        peak_within_range=inside,
        message=message,
    )


def fit_compaction_curve(water_content, dry_density, method="quadratic") -> CompactionCurve:
    """Fit a compaction curve ρd(w) to the specimens of one compactive effort.

    Parameters
    ----------
    water_content : array_like or pandas.Series
        Molding water content of each specimen, a fraction. [-]
    dry_density : array_like or pandas.Series
        Dry density of each specimen. [kg/m3]
    method : {"quadratic", "cubic"}, default "quadratic"
        Polynomial fitted by least squares. A quadratic needs at least 3 specimens at 3
        distinct water contents, a cubic 4 at 4.

    Returns
    -------
    CompactionCurve
        The coefficients, the optimum water content and maximum dry density (the peak of
        the fitted curve), residuals and flags. A curve without a peak, or with its peak
        outside the tested water contents, is returned flagged, with a warning.

    Notes
    -----
    The standards draw a smooth curve through the points by eye; a least-squares
    polynomial through points near the peak is common practice (no source). The peak is
    where dρd/dw = 0 with d²ρd/dw² < 0. Pass only the points that belong to the curve:
    points far on the wet side follow the saturation lines, not a parabola.

    References
    ----------
    ASTM D698 and ASTM D1557 (laboratory compaction characteristics of soil using standard
    and modified effort), calculation section: plot the compaction curve and read the
    optimum water content and maximum dry unit weight at its peak (from memory).
    """
    w = finite_numbers(water_content, "water_content")
    rho = finite_numbers(dry_density, "dry_density")
    if w.ndim != 1 or rho.ndim != 1:
        raise ValueError("water_content, dry_density: expected one value per specimen (1-D)")
    require_same_length(water_content=w, dry_density=rho)
    require_elements(
        water_content, w, _plausible_water_content(w), "water_content", _WATER_CONTENT_EXPECTED
    )
    require_elements(
        dry_density, rho, _plausible_dry_density(rho), "dry_density", _DRY_DENSITY_EXPECTED
    )
    curve = _fit_curve(w, rho, method)
    if curve.message:
        warnings.warn(curve.message, stacklevel=2)
    return curve


def compaction_curves(table: pd.DataFrame, method="quadratic") -> dict:
    """Fit one compaction curve per compactive effort.

    Parameters
    ----------
    table : pandas.DataFrame
        One row per specimen with columns ``effort`` (str), ``water_content`` [-] and
        ``dry_density`` [kg/m3]; ``specimen`` and ``source_row`` name rows in messages.
    method : {"quadratic", "cubic"}, default "quadratic"
        See :func:`fit_compaction_curve`.

    Returns
    -------
    dict
        Effort → :class:`CompactionCurve`, in order of first appearance. Specimens without
        an effort or a water content, and efforts with too few specimens for a curve, are
        left out with a warning that says why.

    References
    ----------
    See :func:`fit_compaction_curve`.
    """
    require_columns(table, ("effort", "water_content", "dry_density"), "compaction table")
    needed = _degree(method) + 1
    w = column_numbers(table, "water_content", allow_missing=True)
    rho = column_numbers(table, "dry_density", allow_missing=False)
    has_w = ~np.isnan(w)
    with np.errstate(invalid="ignore"):
        checks = (
            (w, _plausible_water_content(w) | ~has_w, "water_content", _WATER_CONTENT_EXPECTED),
            (rho, _plausible_dry_density(rho), "dry_density", _DRY_DENSITY_EXPECTED),
        )
    for values, ok, column, expected in checks:
        if not ok.all():
            bad = np.flatnonzero(~ok)[:5]
            rows = "; ".join(
                f"{table_row_name(table, table.index[i])}: {shown_value(values[i])}" for i in bad
            )
            raise ValueError(f"column {column!r}: expected {expected}; {rows}")
    labels = table["effort"].to_numpy(dtype=object)
    has_effort = ~pd.isna(labels)
    for missing, what in ((~has_effort, "an effort"), (has_effort & ~has_w, "a water content")):
        if missing.any():
            rows = ", ".join(table_row_name(table, table.index[i]) for i in np.flatnonzero(missing))
            warnings.warn(
                f"{int(missing.sum())} specimen(s) without {what} left out of the compaction "
                f"curves: {rows}",
                stacklevel=2,
            )
    used = has_effort & has_w
    w_values, rho_values = w, rho
    curves = {}
    for name in pd.unique(labels[used]):
        rows = used & (labels == name)
        points, distinct = int(rows.sum()), len(np.unique(w_values[rows]))
        if points < needed or distinct < needed:
            warnings.warn(
                f"effort {shown_value(name)}: {points} specimen(s) at {distinct} distinct water "
                f"content(s); a {method} curve needs at least {needed} at {needed} distinct "
                "water contents: no curve drawn",
                stacklevel=2,
            )
            continue
        curve = _fit_curve(w_values[rows], rho_values[rows], method)
        if curve.message:
            warnings.warn(f"effort {shown_value(name)}: {curve.message}", stacklevel=2)
        curves[name] = curve
    return curves


# --- line of optimums ------------------------------------------------------------------------


@dataclass(frozen=True)
class LineOfOptimums:
    """The optimum points of several compactive efforts and the straight line through them.

    Attributes
    ----------
    efforts : tuple
        Efforts whose optimum is used, in the order given.
    optimum_water_content, maximum_dry_density : numpy.ndarray
        The optimum points (w_opt, ρd_max), one per effort. [-], [kg/m3]
    slope : float or None
        dρd/dw of the line; None with fewer than two usable efforts. [kg/m3]
    intercept : float or None
        ρd of the line at w = 0; None with fewer than two usable efforts. [kg/m3]
    fit : LinearFit or None
        Least-squares fit with intervals (three or more efforts); None otherwise (two
        efforts give the line through both points, without intervals).
    excluded : tuple of (effort, reason)
        Efforts left out, and why.
    message : str
        Empty when a line is drawn; otherwise why not.
    """

    efforts: tuple
    optimum_water_content: np.ndarray
    maximum_dry_density: np.ndarray
    slope: float | None
    intercept: float | None
    fit: LinearFit | None
    excluded: tuple[tuple[object, str], ...]
    message: str

    def dry_density(self, water_content):
        """Dry density on the line of optimums. [kg/m3] (`water_content` a fraction [-])."""
        if self.slope is None:
            raise ValueError(f"no line of optimums: {self.message}")
        w = finite_numbers(water_content, "water_content")
        return like_inputs(self.intercept + self.slope * w, water_content)


def line_of_optimums(curves: Mapping) -> LineOfOptimums:
    """Collect the optimum of each compaction curve and fit a straight line through them.

    Parameters
    ----------
    curves : mapping of effort to CompactionCurve
        As returned by :func:`compaction_curves`.

    Returns
    -------
    LineOfOptimums
        The optimum points; with two efforts the line through both, with three or more a
        least-squares line (:func:`kitchen.fits.fit_line`) with intervals. Curves whose
        peak is missing or outside the tested water contents are left out, with the reason.

    Notes
    -----
    The optimums of different efforts lie roughly on a line about parallel to the
    zero-air-voids line, near 80 to 90 % saturation (common practice; Holtz & Kovacs,
    compaction chapter, from memory). A straight line is the tool's own simplification.

    References
    ----------
    Daniel, D. E. and Benson, C. H. (1990). Water content–density criteria for compacted
    soil liners. Journal of Geotechnical Engineering 116(12), 1811–1830 (line of
    optimums on the compaction plane; pages from memory).
    """
    if not isinstance(curves, Mapping) or not curves:
        raise ValueError("curves: expected a non-empty mapping of effort to CompactionCurve")
    efforts, points, excluded = [], [], []
    for effort, curve in curves.items():
        if not isinstance(curve, CompactionCurve):
            raise ValueError(
                f"curves[{shown_value(effort)}]: expected a CompactionCurve, "
                f"got {type(curve).__name__}"
            )
        if not curve.peak_found or not curve.peak_within_range:
            excluded.append((effort, curve.message))
            continue
        efforts.append(effort)
        points.append((curve.optimum_water_content, curve.maximum_dry_density))
    w = np.array([point[0] for point in points], dtype=float)
    rho = np.array([point[1] for point in points], dtype=float)
    slope = intercept = fit = None
    message = ""
    if len(points) < 2:
        message = (
            f"a line of optimums needs at least two efforts with a peak inside the tested "
            f"water contents; {len(points)} available"
        )
    elif np.ptp(w) == 0:
        message = "all optimums share one water content: the line would be vertical"
    elif len(points) == 2:
        slope = float((rho[1] - rho[0]) / (w[1] - w[0]))
        intercept = float(rho[0] - slope * w[0])
    else:
        fit = fit_line(w, rho)
        slope, intercept = float(fit.slope), float(fit.intercept)
    return LineOfOptimums(
        efforts=tuple(efforts),
        optimum_water_content=w,
        maximum_dry_density=rho,
        slope=slope,
        intercept=intercept,
        fit=fit,
        excluded=tuple(excluded),
        message=message,
    )
