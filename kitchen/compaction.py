"""Compaction: saturation lines, compaction curves, the line of optimums, the acceptable zone.

The compaction plane has molding water content w (a fraction) across and dry density ρd
[kg/m3] up. On it sit the zero-air-voids and constant-saturation lines, one compaction curve
per compactive effort, the line through their optimums, and the zone that holds the specimens
whose hydraulic conductivity meets a criterion (Daniel & Benson 1990).
"""

from __future__ import annotations

import warnings
from collections.abc import Mapping
from dataclasses import dataclass, replace

import numpy as np
import pandas as pd
from scipy.spatial import ConvexHull, QhullError

from kitchen.fitting import LinearFit, fit_line
from kitchen.specimen import WATER_DENSITY_PHASE

__all__ = [
    "CompactionCurve",
    "LineOfOptimums",
    "AcceptableZone",
    "zero_air_voids_dry_density",
    "constant_saturation_dry_density",
    "fit_compaction_curve",
    "compaction_curves",
    "line_of_optimums",
    "acceptable_zone",
]

# --- input checks shared with kitchen.trends -------------------------------------------------


def _numbers(value, name: str) -> np.ndarray:
    """`value` as a float array; every element finite, or a ValueError naming where."""
    try:
        if isinstance(value, pd.Series):
            array = value.to_numpy(dtype=float, na_value=np.nan)
        else:
            array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise ValueError(f"{name}: expected numbers, got {value!r:.80}") from None
    _require(value, array, np.isfinite(array), name, "a finite number (not NaN or infinite)")
    return array


def _show(value) -> str:
    """repr of a value, numpy scalars as plain Python ones (1.5, not np.float64(1.5))."""
    return repr(value.item() if isinstance(value, np.generic) else value)


def _place(value, position: int) -> str:
    if isinstance(value, pd.Series):
        return f"index {_show(value.index[position])}"
    return f"position {position}"


def _require(value, array: np.ndarray, ok, name: str, expected: str) -> None:
    """Raise a ValueError naming the elements of `value` where `ok` is False."""
    ok = np.broadcast_to(ok, np.shape(array))
    if ok.all():
        return
    flat = np.ravel(array)
    if np.ndim(array) == 0:
        raise ValueError(f"{name}: expected {expected}; got {_show(flat[0])}")
    bad = np.flatnonzero(~np.ravel(ok))
    shown = ", ".join(f"{_show(flat[i])} at {_place(value, int(i))}" for i in bad[:5])
    more = f" and {bad.size - 5} more" if bad.size > 5 else ""
    raise ValueError(f"{name}: expected {expected}; got {shown}{more}")


def _same_length(**arrays: np.ndarray) -> None:
    lengths = {name: np.size(a) for name, a in arrays.items() if np.ndim(a) > 0}
    if len(set(lengths.values())) > 1:
        listed = ", ".join(f"{name} has {n}" for name, n in lengths.items())
        raise ValueError(f"inputs must have one value per specimen; {listed}")


def _like(result, *inputs):
    """`result` in the kind of the inputs: a Series (first Series' index), an array, a scalar."""
    for item in inputs:
        if isinstance(item, pd.Series):
            return pd.Series(np.broadcast_to(result, (len(item),)).copy(), index=item.index)
    if all(np.ndim(item) == 0 for item in inputs):
        return np.asarray(result).item()
    return np.asarray(result)


def _row(table: pd.DataFrame, label) -> str:
    """Name a table row for a message: its file line and specimen when known."""
    where = f"index {_show(label)}"
    if "source_row" in table.columns and pd.notna(table.at[label, "source_row"]):
        where = f"row {int(table.at[label, 'source_row'])}"
    if "specimen" in table.columns:
        where += f" (specimen {_show(table.at[label, 'specimen'])})"
    return where


def _require_columns(table, required: tuple[str, ...], what: str) -> None:
    if not isinstance(table, pd.DataFrame):
        raise ValueError(f"{what}: expected a pandas DataFrame, got {type(table).__name__}")
    missing = [c for c in required if c not in table.columns]
    if missing:
        raise ValueError(
            f"{what}: missing column(s) {', '.join(missing)}; "
            f"required: {', '.join(required)}; found: {', '.join(map(str, table.columns))}"
        )


def _table_numbers(table: pd.DataFrame, column: str, allow_missing: bool) -> np.ndarray:
    """A float column as an array; non-numbers (and NaN unless `allow_missing`) raise
    naming the row."""
    given = table[column]
    if given.dtype.kind == "f":
        values = given.to_numpy(dtype=float)
        bad = np.isinf(values)
    else:
        values = pd.to_numeric(given, errors="coerce").to_numpy(dtype=float)
        bad = np.isnan(values) & given.notna().to_numpy() | np.isinf(values)
    if not allow_missing:
        bad |= np.isnan(values)
    if bad.any():
        rows = "; ".join(
            f"{_row(table, i)}: {_show(table.at[i, column])}" for i in table.index[bad][:5]
        )
        raise ValueError(f"column {column!r}: expected a finite number; {rows}")
    return values


# --- saturation lines ------------------------------------------------------------------------


def constant_saturation_dry_density(
    water_content, specific_gravity, saturation, water_density=WATER_DENSITY_PHASE
):
    """Dry density at a given water content and degree of saturation.

    Parameters
    ----------
    water_content : float, array_like or pandas.Series
        Water content, a fraction (0.20 for 20 %). [-]
    specific_gravity : float, array_like or pandas.Series
        Specific gravity of the solids Gs. [-]
    saturation : float, array_like or pandas.Series
        Degree of saturation S, a fraction, 0 < S ≤ 1. [-]
    water_density : float, default kitchen.specimen.WATER_DENSITY_PHASE (1000.0)
        Density of water ρw used in the phase relations. [kg/m3]

    Returns
    -------
    float, numpy.ndarray or pandas.Series
        ρd = Gs·ρw / (1 + w·Gs/S), in the kind of the inputs. [kg/m3]

    References
    ----------
    Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, weight–volume
    relationships (ρd = Gs·ρw/(1 + e) with S·e = w·Gs) and the compaction chapter (from
    memory); Holtz, R. D. and Kovacs, W. D., *An Introduction to Geotechnical Engineering*,
    compaction chapter (from memory).

    Examples
    --------
    >>> round(constant_saturation_dry_density(0.20, 2.70, 0.90))
    1688
    """
    w = _numbers(water_content, "water_content")
    gs = _numbers(specific_gravity, "specific_gravity")
    s = _numbers(saturation, "saturation")
    rho_w = _numbers(water_density, "water_density")
    _require(water_content, w, w >= 0, "water_content", "a fraction ≥ 0")
    _require(
        specific_gravity,
        gs,
        (gs > 1) & (gs <= 10),
        "specific_gravity",
        "a specific gravity of solids between 1 and 10 (dimensionless; most soils 2.6–2.8)",
    )
    _require(
        saturation,
        s,
        (s > 0) & (s <= 1),
        "saturation",
        "a fraction 0 < S ≤ 1 (0.90 for 90 %, not 90)",
    )
    _require(water_density, rho_w, rho_w > 0, "water_density", "a positive density in kg/m3")
    _same_length(water_content=w, specific_gravity=gs, saturation=s)
    rho_d = gs * rho_w / (1.0 + w * gs / s)
    return _like(rho_d, water_content, specific_gravity, saturation)


def zero_air_voids_dry_density(water_content, specific_gravity, water_density=WATER_DENSITY_PHASE):
    """Dry density on the zero-air-voids line (full saturation, S = 1).

    Parameters
    ----------
    water_content : float, array_like or pandas.Series
        Water content, a fraction. [-]
    specific_gravity : float, array_like or pandas.Series
        Specific gravity of the solids Gs. [-]
    water_density : float, default kitchen.specimen.WATER_DENSITY_PHASE (1000.0)
        Density of water ρw used in the phase relations. [kg/m3]

    Returns
    -------
    float, numpy.ndarray or pandas.Series
        ρd = Gs·ρw / (1 + w·Gs), in the kind of the inputs. [kg/m3]

    References
    ----------
    Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, compaction
    chapter, zero-air-void unit weight (from memory); Holtz, R. D. and Kovacs, W. D.,
    *An Introduction to Geotechnical Engineering*, compaction chapter (from memory).

    Examples
    --------
    >>> round(zero_air_voids_dry_density(0.20, 2.70))
    1753
    """
    return constant_saturation_dry_density(water_content, specific_gravity, 1.0, water_density)


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
        w = _numbers(water_content, "water_content")
        return _like(np.polyval(self.coefficients, w), water_content)


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
    w = _numbers(water_content, "water_content")
    rho = _numbers(dry_density, "dry_density")
    if w.ndim != 1 or rho.ndim != 1:
        raise ValueError("water_content, dry_density: expected one value per specimen (1-D)")
    _same_length(water_content=w, dry_density=rho)
    _require(
        water_content, w, _plausible_water_content(w), "water_content", _WATER_CONTENT_EXPECTED
    )
    _require(dry_density, rho, _plausible_dry_density(rho), "dry_density", _DRY_DENSITY_EXPECTED)
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
    _require_columns(table, ("effort", "water_content", "dry_density"), "compaction table")
    needed = _degree(method) + 1
    w = _table_numbers(table, "water_content", allow_missing=True)
    rho = _table_numbers(table, "dry_density", allow_missing=False)
    has_w = ~np.isnan(w)
    with np.errstate(invalid="ignore"):
        checks = (
            (w, _plausible_water_content(w) | ~has_w, "water_content", _WATER_CONTENT_EXPECTED),
            (rho, _plausible_dry_density(rho), "dry_density", _DRY_DENSITY_EXPECTED),
        )
    for values, ok, column, expected in checks:
        if not ok.all():
            bad = np.flatnonzero(~ok)[:5]
            rows = "; ".join(f"{_row(table, table.index[i])}: {_show(values[i])}" for i in bad)
            raise ValueError(f"column {column!r}: expected {expected}; {rows}")
    labels = table["effort"].to_numpy(dtype=object)
    has_effort = ~pd.isna(labels)
    for missing, what in ((~has_effort, "an effort"), (has_effort & ~has_w, "a water content")):
        if missing.any():
            rows = ", ".join(_row(table, table.index[i]) for i in np.flatnonzero(missing))
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
                f"effort {_show(name)}: {points} specimen(s) at {distinct} distinct water "
                f"content(s); a {method} curve needs at least {needed} at {needed} distinct "
                "water contents: no curve drawn",
                stacklevel=2,
            )
            continue
        curve = _fit_curve(w_values[rows], rho_values[rows], method)
        if curve.message:
            warnings.warn(f"effort {_show(name)}: {curve.message}", stacklevel=2)
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
        w = _numbers(water_content, "water_content")
        return _like(self.intercept + self.slope * w, water_content)


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
        least-squares line (:func:`kitchen.fitting.fit_line`) with intervals. Curves whose
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
                f"curves[{_show(effort)}]: expected a CompactionCurve, got {type(curve).__name__}"
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


# --- acceptable zone -------------------------------------------------------------------------

_ZONE_METHOD = (
    "convex hull of the specimens that meet the criterion (the smallest convex polygon "
    "holding them) on the water content–dry density plane; Daniel & Benson (1990) draw the "
    "zone by judgement, this construction is the tool's own"
)
_ZONE_TOLERANCE = 1e-9  # on the plane scaled by the spans of the specimens


@dataclass(frozen=True)
class AcceptableZone:
    """The zone of the compaction plane holding the specimens that meet a criterion.

    Attributes
    ----------
    kind : str
        ``"polygon"`` (three or more meeting specimens not on one line), ``"segment"``
        (two distinct points, or all on one line), ``"point"`` (one), ``"empty"`` (none).
    vertices : numpy.ndarray
        Shape (m, 2): water content [-] and dry density [kg/m3] of the corners;
        counterclockwise for a polygon, the two ends for a segment.
    method : str
        How the zone is constructed, in words.
    n_meeting, n_not_meeting : int
        Number of specimens that meet and do not meet the criterion.
    not_meeting_inside : tuple
        Specimens that do not meet the criterion yet lie in the zone (index labels for a
        Series input, positions otherwise): the zone does not exclude them.
    message : str
        Empty for a clean polygon; otherwise a caution in words.
    scale : tuple of float
        Spans of water content [-] and dry density [kg/m3] of all specimens; distances on
        the plane are compared in these units.
    """

    kind: str
    vertices: np.ndarray
    method: str
    n_meeting: int
    n_not_meeting: int
    not_meeting_inside: tuple
    message: str
    scale: tuple[float, float]

    def contains(self, water_content, dry_density):
        """True where (w, ρd) lies inside the zone or on its edge (w [-], ρd [kg/m3])."""
        w = _numbers(water_content, "water_content")
        rho = _numbers(dry_density, "dry_density")
        _same_length(water_content=w, dry_density=rho)
        w, rho = np.broadcast_arrays(w, rho)
        q = np.stack([w / self.scale[0], rho / self.scale[1]], axis=-1)
        v = self.vertices / np.asarray(self.scale)
        if self.kind == "empty":
            inside = np.zeros(w.shape, dtype=bool)
        elif self.kind == "point":
            inside = np.hypot(*(q - v[0]).T) <= _ZONE_TOLERANCE
        elif self.kind == "segment":
            edge = v[1] - v[0]
            t = np.clip(((q - v[0]) @ edge) / (edge @ edge), 0.0, 1.0)
            inside = np.linalg.norm(q - (v[0] + t[..., None] * edge), axis=-1) <= _ZONE_TOLERANCE
        else:
            inside = np.ones(w.shape, dtype=bool)
            for start, end in zip(v, np.roll(v, -1, axis=0), strict=True):
                edge, rel = end - start, q - start
                cross = edge[0] * rel[..., 1] - edge[1] * rel[..., 0]
                inside &= cross >= -_ZONE_TOLERANCE * np.hypot(*edge)
        return _like(inside, water_content, dry_density)


def _flags(meets) -> np.ndarray:
    raw = meets.to_numpy() if isinstance(meets, pd.Series) else np.asarray(meets)
    if raw.dtype != bool:
        for i, item in enumerate(np.ravel(raw)):
            if not isinstance(item, bool | np.bool_):
                raise ValueError(
                    "meets: expected True or False for each specimen (True where it meets "
                    f"the criterion); got {_show(item)} at {_place(meets, i)}"
                )
    return raw.astype(bool)


def _span(values: np.ndarray) -> float:
    span = float(np.ptp(values)) if values.size else 0.0
    return span if span > 0 else max(float(np.abs(values).max(initial=0.0)), 1.0)


def acceptable_zone(water_content, dry_density, meets) -> AcceptableZone:
    """The zone on the compaction plane holding the specimens that meet a criterion.

    Parameters
    ----------
    water_content : array_like or pandas.Series
        Molding water content of each specimen, a fraction. [-]
    dry_density : array_like or pandas.Series
        Dry density of each specimen. [kg/m3]
    meets : array_like of bool or pandas.Series
        True where the specimen meets the criterion (for example k ≤ the maximum allowed).

    Returns
    -------
    AcceptableZone
        The convex hull of the meeting specimens, or a degenerate zone (segment, point,
        empty) described as such, with a ``contains(w, ρd)`` test.

    Notes
    -----
    Daniel & Benson (1990) mark the specimens that meet the criterion on the compaction
    plane and draw the acceptable zone around them by judgement, guided by the
    zero-air-voids line, the line of optimums and other criteria (shear strength,
    shrinkage). The convex hull is this tool's own construction; it may enclose
    specimens that do not meet the criterion, which are listed in ``not_meeting_inside``.

    References
    ----------
    Daniel, D. E. and Benson, C. H. (1990). Water content–density criteria for compacted
    soil liners. Journal of Geotechnical Engineering 116(12), 1811–1830 (pages from
    memory).
    """
    w = _numbers(water_content, "water_content")
    rho = _numbers(dry_density, "dry_density")
    flags = _flags(meets)
    if w.ndim != 1 or rho.ndim != 1 or flags.ndim != 1:
        raise ValueError("water_content, dry_density, meets: expected one value per specimen")
    _same_length(water_content=w, dry_density=rho, meets=flags)
    if w.size == 0:
        raise ValueError("water_content: no specimens given")
    scale = (_span(w), _span(rho))
    scaled = np.unique(np.column_stack([w[flags] / scale[0], rho[flags] / scale[1]]), axis=0)
    kind, corners, message = "polygon", scaled, ""
    if scaled.shape[0] == 0:
        kind, message = "empty", "no specimen meets the criterion: there is no zone"
    elif scaled.shape[0] == 1:
        kind = "point"
        message = "one specimen meets the criterion: the zone is a single point, not an area"
    else:
        centred = scaled - scaled.mean(axis=0)
        _, singular, directions = np.linalg.svd(centred, full_matrices=False)
        hull = None
        if singular[1] > 1e-9 * singular[0]:
            try:
                hull = ConvexHull(scaled)
            except QhullError:
                hull = None
        if hull is None:
            along = centred @ directions[0]
            kind, corners = "segment", scaled[[np.argmin(along), np.argmax(along)]]
            message = (
                "the meeting specimens lie on one line: the zone is a segment, not an area; "
                "test more specimens"
            )
        else:
            corners = scaled[hull.vertices]
    vertices = corners * np.asarray(scale) if corners.size else np.empty((0, 2))
    zone = AcceptableZone(
        kind, vertices, _ZONE_METHOD, int(flags.sum()), int((~flags).sum()), (), message, scale
    )
    inside = np.asarray(zone.contains(w, rho)) & ~flags
    labels = next(
        (x.index for x in (water_content, dry_density, meets) if isinstance(x, pd.Series)),
        range(w.size),
    )
    failing_inside = tuple(labels[int(i)] for i in np.flatnonzero(inside))
    if failing_inside:
        caution = (
            f"{len(failing_inside)} specimen(s) that do not meet the criterion lie inside the "
            "zone: the hull outlines the meeting specimens, it does not exclude the others"
        )
        message = f"{message}; {caution}" if message else caution
    return replace(zone, not_meeting_inside=failing_inside, message=message)
