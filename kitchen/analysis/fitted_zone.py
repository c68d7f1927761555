"""The fitted zone: where a regression of log k20 on the compaction plane says a new specimen meets.

Beside the zone drawn around the specimens that meet (:mod:`.compaction_zone`), the series
gives a second, statistical one. log10 k20 is fitted by ordinary least squares on the
molding water content and the dry density (with an offset per compactive effort when the
series has several), and the 95 % prediction interval of a new specimen is worked out over
the plane. The fitted zone is the part of the data's extent (the convex hull of the tested
states, of each effort's own where effort is a factor) where the prediction bound meets the
criterion: the upper end at or below a largest k allowed, the lower end at or above a
smallest k required. With it come the line where the prediction equals the criterion, the
fit's statistics, and the point of the zone's boundary where one more specimen would narrow
it most. Regressions
of k on compaction variables are in the literature (Benson, Zhai & Wang 1994); this zone,
built from one, is the tool's own construction.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from kitchen.fits import student_t_quantile

from ._checks import (
    checked_confidence,
    conductivity_values,
    finite_numbers,
    like_inputs,
    require_same_length,
)
from .compaction_zone import inside_convex_polygon
from .criterion import Criterion, as_criterion

__all__ = [
    "FITTED_ZONE_ASSUMPTIONS",
    "FITTED_ZONE_METHOD",
    "FittedParameter",
    "EffortZone",
    "FittedZone",
    "NextSpecimen",
    "fit_zone",
]

FITTED_ZONE_METHOD = (
    "least squares of log10 k20 on molding water content and dry density (with an offset "
    "per compactive effort when each of two or more efforts has 3 specimens or more), its "
    "95 % prediction interval for a new specimen (Student t); the zone (of each effort, "
    "where effort is a factor) is the part of the hull of the tested states (of that "
    "effort) where the interval's end meets the criterion; the tool's own construction"
)
"""The fitted zone in words, for the methods table."""

FITTED_ZONE_ASSUMPTIONS = (
    "The fitted zone is the tool's own construction. It assumes that log10 k20 varies "
    "linearly with molding water content and dry density over the tested states (with a "
    "constant offset per compactive effort where the fit has one), that the scatter about "
    "that plane is independent and normal with one standard deviation everywhere, and that "
    "each specimen's own measurement error is small beside that scatter. It claims nothing "
    "outside the hull of the tested states (of each effort's own, where effort is a "
    "factor): a state in an effort's zone is one where a new specimen compacted with that "
    "effort meets the criterion, with the upper end of the 95 % prediction interval (the "
    "lower end for a smallest k required)."
)
"""The fitted zone's assumptions in a sentence the report can show."""

MINIMUM_RESIDUAL_DEGREES_OF_FREEDOM = 3
"""Fewest residual degrees of freedom for a fitted zone: with fewer, Student's t at 95 %
(12.7 for one, 4.3 for two) makes the prediction interval too wide to bound anything."""

MINIMUM_SPECIMENS_PER_EFFORT = 3
"""Fewest specimens of each effort for effort to enter the fit as a factor."""

_RAYS = 240
_GRID = 41
_BISECTIONS = 45


@dataclass(frozen=True)
class FittedParameter:
    """One parameter of the fit, with its confidence interval (Student t).

    Attributes
    ----------
    name : str
    unit : str
    estimate, low, high : float
    """

    name: str
    unit: str
    estimate: float
    low: float
    high: float


@dataclass(frozen=True)
class NextSpecimen:
    """Where one more specimen would narrow the fitted zone's boundary most.

    Attributes
    ----------
    water_content : float
        Molding water content, a fraction. [-]
    dry_density : float
        [kg/m3]
    effort : str or None
        The effort whose prediction bounds the zone there (None when the fit has no
        effort factor).
    prediction_standard_error : float
        Standard error of a new specimen's log10 k20 there, s·√(1 + h). [log10 m/s]
    reason : str
        Why there, in words.
    """

    water_content: float
    dry_density: float
    effort: str | None
    prediction_standard_error: float
    reason: str


@dataclass(frozen=True)
class EffortZone:
    """The fitted zone of one effort (of the series, where effort is not a factor).

    Attributes
    ----------
    effort : str or None
        None where effort is not a factor of the fit.
    extent : numpy.ndarray
        (m, 2) corners of the hull of the effort's tested states (of every state, without
        an effort factor), water content [-] and dry density [kg/m3], counterclockwise;
        (0, 2) when they lie on one line.
    region : numpy.ndarray
        (r, 2) corners of the zone, counterclockwise; (0, 2) when no state of the extent
        meets the criterion with the bound.
    share : float
        Share of the extent's area in the zone.
    criterion_line : numpy.ndarray or None
        Ends (2, 2) of the line where the prediction equals the criterion, within the
        extent; None where it misses the extent.
    """

    effort: str | None
    extent: np.ndarray
    region: np.ndarray
    share: float
    criterion_line: np.ndarray | None


@dataclass(frozen=True)
class FittedZone:
    """A least-squares fit of log10 k20 on the compaction plane and the zones it bounds.

    Attributes
    ----------
    criterion : Criterion
        The criterion the prediction bound is held to. [m/s]
    confidence : float
        Confidence of the prediction interval and of the parameters' intervals.
    n : int
        Number of specimens fitted.
    efforts : tuple of str
        The efforts of the fit, each with its own offset, the first the reference; empty
        when effort is not a factor.
    parameters : tuple of FittedParameter
        log10 k20 at the specimens' mean state (reference effort) [log10 m/s], slope on
        water content [log10 m/s per unit w], slope on dry density [log10 m/s per kg/m3],
        then the offset of each other effort from the reference [log10 m/s].
    residual_standard_deviation : float
        s, the scatter of log10 k20 about the fit. [log10 m/s]
    degrees_of_freedom : int
        n minus the number of parameters.
    r_squared : float
        Share of the variance of log10 k20 the fit explains.
    t_value : float
        Student's t of the intervals.
    extent : numpy.ndarray
        (m, 2) corners of the hull of all the tested states, water content [-] and dry
        density [kg/m3], counterclockwise.
    zones : tuple of EffortZone
        One per effort of the fit, in the order of :attr:`efforts`; one (effort None)
        without an effort factor. Each is convex: its ``region`` draws it as a polygon
        through points of its boundary, :meth:`contains` tests a state exactly.
    next_specimen : NextSpecimen or None
        None when no zone has a boundary inside its extent and no criterion line crosses
        an extent without a zone.
    method, assumptions : str
        The construction and its assumptions in words.
    message : str
        What the zones are, in words, with cautions.
    """

    criterion: Criterion
    confidence: float
    n: int
    efforts: tuple
    parameters: tuple[FittedParameter, ...]
    residual_standard_deviation: float
    degrees_of_freedom: int
    r_squared: float
    t_value: float
    extent: np.ndarray
    zones: tuple[EffortZone, ...]
    next_specimen: NextSpecimen | None
    method: str
    assumptions: str
    message: str
    _coefficients: np.ndarray = field(repr=False)
    _inverse: np.ndarray = field(repr=False)
    _centre: tuple[float, float] = field(repr=False)
    _spread: tuple[float, float] = field(repr=False)

    def _design(self, z: np.ndarray, level: int) -> np.ndarray:
        """Rows [1, z_w, z_ρ, effort dummies] for scaled states `z` (..., 2)."""
        dummies = np.zeros(z.shape[:-1] + (max(len(self.efforts) - 1, 0),))
        if level > 0:
            dummies[..., level - 1] = 1.0
        return np.concatenate([np.ones(z.shape[:-1] + (1,)), z, dummies], axis=-1)

    def _scaled(self, water_content, dry_density) -> np.ndarray:
        w, rho = np.broadcast_arrays(water_content, dry_density)
        return np.stack(
            [(w - self._centre[0]) / self._spread[0], (rho - self._centre[1]) / self._spread[1]],
            axis=-1,
        )

    def _unscaled(self, z: np.ndarray) -> np.ndarray:
        if z.size == 0:
            return np.empty((0, 2))
        return np.column_stack(
            [
                self._centre[0] + self._spread[0] * z[:, 0],
                self._centre[1] + self._spread[1] * z[:, 1],
            ]
        )

    def _bands(self, z: np.ndarray, level: int) -> tuple[np.ndarray, np.ndarray]:
        """(prediction, half-width of the prediction interval) of log10 k20 at `z`."""
        x = self._design(z, level)
        leverage = np.einsum("...i,ij,...j->...", x, self._inverse, x)
        half = self.t_value * self.residual_standard_deviation * np.sqrt(1.0 + leverage)
        return x @ self._coefficients, half

    def _excess(self, z: np.ndarray, level: int) -> np.ndarray:
        """By how much the bound of effort `level` misses the criterion at `z` [log10 m/s]:
        at or below zero where it meets it."""
        limit = np.log10(float(self.criterion))
        centre, half = self._bands(z, level)
        if self.criterion.kind == "maximum":
            return centre + half - limit
        return limit - (centre - half)

    def _level(self, effort) -> int:
        if self.efforts:
            if effort not in self.efforts:
                raise ValueError(
                    f"effort: the fit has an offset per effort; expected one of "
                    f"{', '.join(map(str, self.efforts))}, got {effort!r}"
                )
            return self.efforts.index(effort)
        if effort is not None:
            raise ValueError(f"effort: the fit has no effort factor; got {effort!r}")
        return 0

    def predict(self, water_content, dry_density, effort=None):
        """log10 k20 of a new specimen at (w, ρd): (prediction, low, high) of its interval.

        Parameters
        ----------
        water_content : array_like
            A fraction. [-]
        dry_density : array_like
            [kg/m3]
        effort : str, optional
            One of :attr:`efforts`; required when the fit has an effort factor.

        Returns
        -------
        tuple of numpy.ndarray or float
            The prediction and the ends of its prediction interval. [log10 m/s]

        Notes
        -----
        ŷ0 ± t·s·√(1 + x0ᵀ(XᵀX)⁻¹x0), the prediction interval of a new observation of a
        multiple linear regression (Montgomery & Runger, *Applied Statistics and
        Probability for Engineers*, multiple regression chapter; Draper & Smith, *Applied
        Regression Analysis*; both from memory).
        """
        w = finite_numbers(water_content, "water_content")
        rho = finite_numbers(dry_density, "dry_density")
        require_same_length(water_content=w, dry_density=rho)
        centre, half = self._bands(self._scaled(w, rho), self._level(effort))
        return tuple(
            like_inputs(value, water_content, dry_density)
            for value in (centre, centre - half, centre + half)
        )

    def contains(self, water_content, dry_density, effort=None):
        """True where (w, ρd) lies in the fitted zone (w [-], ρd [kg/m3]).

        With `effort` (one of :attr:`efforts`): in that effort's zone, inside the hull of its
        tested states with its prediction bound meeting the criterion. Without: in the zone
        of any effort of the fit (the one zone, without an effort factor).
        """
        w = finite_numbers(water_content, "water_content")
        rho = finite_numbers(dry_density, "dry_density")
        require_same_length(water_content=w, dry_density=rho)
        z = self._scaled(w, rho)
        levels = range(len(self.zones)) if effort is None else [self._level(effort)]
        inside = np.zeros(z.shape[:-1], dtype=bool)
        for level in levels:
            corners = self.zones[level].extent
            if corners.size:
                within = inside_convex_polygon(self._scaled(corners[:, 0], corners[:, 1]), z)
                inside |= within & (self._excess(z, level) <= 0)
        return like_inputs(inside, water_content, dry_density)

    @property
    def summary(self) -> str:
        """The fit and its zones in a sentence or two, for the notes of a report."""
        head = (
            f"n = {self.n}, s = {self.residual_standard_deviation:.3g} in log10 k20, "
            f"R² = {self.r_squared:.3f}"
        )
        slopes = {p.name: p for p in self.parameters}
        water = slopes["slope on water content"]
        density = slopes["slope on dry density"]
        fit = (
            f"log10 k20 changes by {water.estimate / 100:.3g} per percentage point of water "
            f"content (95 % interval {water.low / 100:.3g} to {water.high / 100:.3g}) and by "
            f"{density.estimate * 10:.3g} per 0.01 Mg/m³ of dry density "
            f"({density.low * 10:.3g} to {density.high * 10:.3g})"
        )
        text = f"fitted zone (the tool's own construction): {head}; {fit}; {self.message}"
        if self.next_specimen is not None:
            spot = self.next_specimen
            effort = f", {spot.effort} effort" if spot.effort is not None else ""
            text += (
                f"; one more specimen near w = {100 * spot.water_content:.1f} %, "
                f"ρd = {spot.dry_density / 1000:.3f} Mg/m³{effort} would narrow the "
                "boundary most"
            )
        return text


def _effort_levels(effort, n: int, notes: list[str]) -> tuple[tuple, np.ndarray]:
    """(efforts of the fit, level of each specimen) — no factor unless every specimen has
    an effort, there are two or more, and each has enough specimens."""
    if effort is None:
        return (), np.zeros(n, dtype=int)
    labels = [None if pd.isna(e) else str(e) for e in np.asarray(effort, dtype=object).ravel()]
    if len(labels) != n:
        raise ValueError(f"effort: expected one per specimen; got {len(labels)} for {n}")
    given = [e for e in labels if e is not None]
    efforts = tuple(dict.fromkeys(given))
    if len(efforts) < 2:
        return (), np.zeros(n, dtype=int)
    counts = {e: given.count(e) for e in efforts}
    if len(given) < n:
        notes.append("effort is not a factor of the fit: some specimens have no effort")
        return (), np.zeros(n, dtype=int)
    few = [e for e in efforts if counts[e] < MINIMUM_SPECIMENS_PER_EFFORT]
    if few:
        notes.append(
            f"effort is not a factor of the fit: {', '.join(few)} "
            f"{'has' if len(few) == 1 else 'have'} fewer than {MINIMUM_SPECIMENS_PER_EFFORT} "
            "specimens"
        )
        return (), np.zeros(n, dtype=int)
    return efforts, np.array([efforts.index(e) for e in labels])


def _area(corners: np.ndarray) -> float:
    x, y = corners.T
    return 0.5 * abs(float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y)))


def _hull_corners(points: np.ndarray) -> np.ndarray:
    """Counterclockwise corners of the convex hull of `points`; (0, 2) when they span no area."""
    from scipy.spatial import ConvexHull, QhullError  # here: scipy's modules load slowly

    try:
        hull = ConvexHull(points)
    except (QhullError, ValueError):
        return np.empty((0, 2))
    corners = points[hull.vertices]
    return corners if _area(corners) > 1e-12 else np.empty((0, 2))


def _half_planes(corners: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(outward normals, offsets) of a counterclockwise convex polygon: inside is n·z ≤ b."""
    edges = np.roll(corners, -1, axis=0) - corners
    normals = np.column_stack([edges[:, 1], -edges[:, 0]])
    normals /= np.hypot(normals[:, 0], normals[:, 1])[:, None]
    return normals, np.einsum("ij,ij->i", normals, corners)


def _exit_distance(start, directions, normals, offsets) -> np.ndarray:
    """How far each ray from `start` along the unit `directions` stays in the polygon."""
    toward = directions @ normals.T
    room = offsets - normals @ start
    with np.errstate(divide="ignore", invalid="ignore"):
        reach = np.where(toward > 1e-15, room / toward, np.inf)
    return np.clip(reach.min(axis=1), 0.0, None)


def _clipped_line(point, direction, normals, offsets):
    """The part of the line point + u·direction inside the polygon, as its two ends, or None."""
    toward, room = normals @ direction, offsets - normals @ point
    low, high = -np.inf, np.inf
    for a, b in zip(toward, room, strict=True):
        if abs(a) < 1e-15:
            if b < 0:
                return None
        elif a > 0:
            high = min(high, b / a)
        else:
            low = max(low, b / a)
    if not high > low:
        return None
    return np.vstack([point + low * direction, point + high * direction])


def _trace_region(zone: FittedZone, corners: np.ndarray, level: int):
    """(corners of the zone of effort `level` within the polygon `corners`, points of its
    boundary where the bound equals the criterion), on the scaled plane; both empty when
    there is no zone."""
    from scipy import optimize  # here: scipy's modules load slowly

    nothing = np.empty((0, 2)), np.empty((0, 2))

    def excess(z):
        return zone._excess(z, level)

    normals, offsets = _half_planes(corners)
    low, high = corners.min(axis=0), corners.max(axis=0)
    grid = np.stack(
        np.meshgrid(np.linspace(low[0], high[0], _GRID), np.linspace(low[1], high[1], _GRID)),
        axis=-1,
    ).reshape(-1, 2)
    grid = np.vstack([grid[(grid @ normals.T <= offsets).all(axis=1)], corners])
    over = excess(grid)
    inside = grid[over <= 0]
    if inside.size:
        start = inside.mean(axis=0)  # a mean of points of a convex set lies in it
    else:
        found = optimize.minimize(
            lambda point: float(excess(point[None, :])[0]),
            grid[np.argmin(over)],
            method="SLSQP",
            constraints=[{"type": "ineq", "fun": lambda point: offsets - normals @ point}],
        )
        start = found.x
        within = (normals @ start <= offsets + 1e-12).all()
        if not (within and excess(start[None, :])[0] <= 0):
            return nothing
    angles = np.linspace(0.0, 2.0 * np.pi, _RAYS, endpoint=False)
    directions = np.column_stack([np.cos(angles), np.sin(angles)])
    reach = _exit_distance(start, directions, normals, offsets)
    outer = excess(start + reach[:, None] * directions) > 0
    below, above = np.zeros(outer.sum()), reach[outer]
    for _ in range(_BISECTIONS):
        middle = 0.5 * (below + above)
        over = excess(start + middle[:, None] * directions[outer]) > 0
        below, above = np.where(over, below, middle), np.where(over, middle, above)
    reach[outer] = below
    ends = start + reach[:, None] * directions
    region = _hull_corners(np.vstack([ends, corners[excess(corners) <= 0]]))
    if region.size == 0:
        return nothing
    return region, ends[outer]


def _criterion_line(zone: FittedZone, corners: np.ndarray, level: int):
    """The ends (scaled) of the line where effort `level`'s prediction equals the criterion,
    within the polygon `corners`; None where it misses it."""
    normals, offsets = _half_planes(corners)
    beta = zone._coefficients
    offset = beta[0] + (beta[2 + level] if level > 0 else 0.0)
    gradient = beta[1:3]
    size = float(gradient @ gradient)
    if size == 0:
        return None
    point = gradient * (np.log10(float(zone.criterion)) - offset) / size
    along = np.array([-gradient[1], gradient[0]]) / np.sqrt(size)
    return _clipped_line(point, along, normals, offsets)


def _next_specimen(zone: FittedZone, candidates: list):
    """(scaled state, level, standard error, reason) of the candidate point with the largest
    prediction variance; None without candidates. `candidates` holds (points, level, where)."""
    best = None
    for points, level, where in candidates:
        half = zone._bands(points, level)[1]
        i = int(np.argmax(half))
        if best is None or half[i] > best[2]:
            best = (points[i], level, float(half[i]), where)
    if best is None:
        return None
    point, level, half, where = best
    error = half / zone.t_value
    reason = (
        f"the point {where} where a new specimen's prediction is least certain "
        f"(standard error {error:.3g} in log10 k20): one more specimen there narrows the "
        "prediction interval most where it decides the boundary"
    )
    return point, level, error, reason


def fit_zone(
    water_content, dry_density, conductivity, criterion, effort=None, confidence: float = 0.95
) -> FittedZone:
    """Fit log10 k20 over the compaction plane and find where a new specimen meets the criterion.

    Parameters
    ----------
    water_content : array_like or pandas.Series
        Molding water content of each specimen, a fraction. [-]
    dry_density : array_like or pandas.Series
        Dry density of each specimen. [kg/m3]
    conductivity : array_like or pandas.Series
        Each specimen's k20 (the point value; its own interval is not used). [m/s]
    criterion : float or Criterion
        Largest k allowed (a number), or a :class:`Criterion` of either kind. [m/s]
    effort : array_like, optional
        Each specimen's compactive effort; a factor of the fit (an offset of log10 k20 per
        effort) when there are two or more efforts, each with
        :data:`MINIMUM_SPECIMENS_PER_EFFORT` specimens or more, and every specimen has one.
    confidence : float, default 0.95
        Confidence of the prediction interval and of the parameters' intervals.

    Returns
    -------
    FittedZone

    Raises
    ------
    ValueError
        Bad input (named by position or index), too few specimens for
        :data:`MINIMUM_RESIDUAL_DEGREES_OF_FREEDOM` residual degrees of freedom, or
        states on one line (the plane cannot be fitted).

    Notes
    -----
    The model is log10 k20 = β0 + βw·(w − w̄) + βρ·(ρd − ρ̄d) + δ_effort + ε, with ε
    independent and normal of one standard deviation σ. Its parameters are the ordinary
    least-squares estimates β = (XᵀX)⁻¹Xᵀy, σ is estimated by s² = SSE/(n − p), each
    parameter's interval is β_j ± t·s·√C_jj and a new specimen's prediction interval is
    ŷ0 ± t·s·√(1 + x0ᵀ(XᵀX)⁻¹x0), t of Student's distribution with n − p degrees of freedom
    (Montgomery, D. C. and Runger, G. C., *Applied Statistics and Probability for
    Engineers*, the multiple linear regression chapter; Draper, N. R. and Smith, H.,
    *Applied Regression Analysis*, the chapters on the matrix form of least squares; both
    from memory). With an offset per effort this is the same fit as one on w − w_opt and
    ρd with effort as a factor (w_opt is a constant of each effort, taken into its
    offset), without needing the optimums. Benson, Zhai & Wang (1994) regress laboratory
    and field k on compaction variables such as these; the zone built from the fit is the
    tool's own construction, and its assumptions are :data:`FITTED_ZONE_ASSUMPTIONS`.

    The zone of an effort is the set of states inside the hull of that effort's tested
    states (of all the tested states, without an effort factor) where the end of the
    two-sided interval meets the criterion (the upper end at or below a largest k allowed;
    the lower end at or above a smallest k required): an effort's prediction is not carried
    to states it was not tested at. It is convex (where an affine function is at least a
    convex one, within a convex hull), so it is traced by casting rays from a state inside
    it to where the bound reaches the criterion or the hull ends (bisection), and drawn
    through those points and the hull's corners inside it.
    One more specimen at a state x0 lowers the prediction variance there from s²·(1 + h)
    to s²·(1 + h/(1 + h)), h = x0ᵀ(XᵀX)⁻¹x0 (the Sherman–Morrison update of (XᵀX)⁻¹;
    from memory), most where h is largest: the point of the zone's boundary with the
    largest prediction variance is named (the sequential choice of Wynn and Fedorov,
    Fedorov 1972, *Theory of Optimal Experiments*, from memory; applied to the boundary,
    the tool's own rule).

    References
    ----------
    Benson, C. H., Zhai, H. and Wang, X. (1994). Estimating hydraulic conductivity of
    compacted clay liners. Journal of Geotechnical Engineering 120(2), 366–387 (title and
    pages from memory).
    Daniel, D. E. and Benson, C. H. (1990). Water content–density criteria for compacted
    soil liners. Journal of Geotechnical Engineering 116(12), 1811–1830 (from memory).

    Examples
    --------
    >>> w = [0.14, 0.16, 0.18, 0.20, 0.22, 0.15, 0.17, 0.19, 0.21]
    >>> rho = [1700, 1740, 1760, 1740, 1700, 1650, 1690, 1700, 1680]
    >>> k = [10 ** (-8.0 - 40 * (x - 0.14) + 0.05 * (-1) ** i) for i, x in enumerate(w)]
    >>> zone = fit_zone(w, rho, k, 1e-9)
    >>> zone.n, zone.degrees_of_freedom, bool(zone.contains(0.215, 1695))
    (9, 6, True)
    >>> round(zone.zones[0].share, 2)
    0.63
    """
    w = finite_numbers(water_content, "water_content")
    rho = finite_numbers(dry_density, "dry_density")
    k = conductivity_values(conductivity, "conductivity")
    if w.ndim != 1 or rho.ndim != 1 or k.ndim != 1:
        raise ValueError(
            "water_content, dry_density, conductivity: expected one value per specimen"
        )
    require_same_length(water_content=w, dry_density=rho, conductivity=k)
    limit = as_criterion(criterion)
    confidence = checked_confidence(confidence)
    notes: list[str] = []
    n = w.size
    efforts, levels = _effort_levels(effort, n, notes)
    p = 3 + max(len(efforts) - 1, 0)
    if efforts and n - p < MINIMUM_RESIDUAL_DEGREES_OF_FREEDOM:
        notes.append("effort is not a factor of the fit: too few specimens for its offsets")
        efforts, levels, p = (), np.zeros(n, dtype=int), 3
    if n - p < MINIMUM_RESIDUAL_DEGREES_OF_FREEDOM:
        raise ValueError(
            f"fitted zone: {n} specimen(s) with a water content, dry density and k; the fit "
            f"of log10 k20 on w and ρd ({p} parameters) needs at least "
            f"{p + MINIMUM_RESIDUAL_DEGREES_OF_FREEDOM}, so that its scatter is estimated "
            f"with {MINIMUM_RESIDUAL_DEGREES_OF_FREEDOM} degrees of freedom"
        )
    centre = (float(w.mean()), float(rho.mean()))
    spread = (float(np.ptp(w)) or 1.0, float(np.ptp(rho)) or 1.0)
    z = np.column_stack([(w - centre[0]) / spread[0], (rho - centre[1]) / spread[1]])
    dummies = np.zeros((n, p - 3))
    for level in range(1, len(efforts)):
        dummies[levels == level, level - 1] = 1.0
    x = np.column_stack([np.ones(n), z, dummies])
    singular = np.linalg.svd(x, compute_uv=False)
    if singular[-1] <= 1e-9 * singular[0]:
        raise ValueError(
            "fitted zone: the specimens' states lie on one line of the compaction plane (or "
            "an effort's offset cannot be told from them): log10 k20 cannot be fitted over "
            "the plane"
        )
    y = np.log10(k)
    inverse = np.linalg.inv(x.T @ x)
    beta = inverse @ x.T @ y
    residuals = y - x @ beta
    dof = n - p
    s = float(np.sqrt(residuals @ residuals / dof))
    total = float(((y - y.mean()) ** 2).sum())
    r_squared = 1.0 - float(residuals @ residuals) / total if total > 0 else 1.0
    t = student_t_quantile(confidence, dof)
    half = t * s * np.sqrt(np.diag(inverse))
    per_unit = np.ones(p)
    per_unit[1:3] = 1.0 / np.asarray(spread)
    reference = f" ({efforts[0]} effort)" if efforts else ""
    names = [
        (f"log10 k20 at the mean state{reference}", "log10 m/s"),
        ("slope on water content", "log10 m/s per unit w"),
        ("slope on dry density", "log10 m/s per kg/m3"),
    ] + [(f"offset of {e} from {efforts[0]}", "log10 m/s") for e in efforts[1:]]
    parameters = tuple(
        FittedParameter(
            name,
            unit,
            float(beta[j] * per_unit[j]),
            float((beta[j] - half[j]) * per_unit[j]),
            float((beta[j] + half[j]) * per_unit[j]),
        )
        for j, (name, unit) in enumerate(names)
    )
    fit = FittedZone(
        criterion=limit,
        confidence=confidence,
        n=n,
        efforts=efforts,
        parameters=parameters,
        residual_standard_deviation=s,
        degrees_of_freedom=dof,
        r_squared=r_squared,
        t_value=t,
        extent=np.empty((0, 2)),
        zones=(),
        next_specimen=None,
        method=FITTED_ZONE_METHOD,
        assumptions=FITTED_ZONE_ASSUMPTIONS,
        message="",
        _coefficients=beta,
        _inverse=inverse,
        _centre=centre,
        _spread=spread,
    )
    kind = "a largest k allowed" if limit.kind == "maximum" else "a smallest k required"
    end = "upper" if limit.kind == "maximum" else "lower"
    bound = f"the {end} end of the {100 * confidence:g} % prediction interval"
    zones, candidates, words = [], [], []
    for level in range(max(len(efforts), 1)):
        name = efforts[level] if efforts else None
        own = f"{name}: " if name is not None else ""
        tested = "its tested states" if name is not None else "the hull of the tested states"
        corners = _hull_corners(z[levels == level])
        if corners.size == 0:
            zones.append(EffortZone(name, np.empty((0, 2)), np.empty((0, 2)), 0.0, None))
            words.append(f"{own}its tested states lie on one line: no zone")
            continue
        region, boundary = _trace_region(fit, corners, level)
        line = _criterion_line(fit, corners, level)
        share = _area(region) / _area(corners) if region.size else 0.0
        zones.append(
            EffortZone(
                name,
                fit._unscaled(corners),
                fit._unscaled(region),
                share,
                None if line is None else fit._unscaled(line),
            )
        )
        if boundary.size:
            candidates.append((boundary, level, "of the fitted zone's boundary inside the data"))
            words.append(f"{own}{bound} meets {kind} over {100 * share:.0f} % of {tested}")
        elif region.size:
            words.append(f"{own}{bound} meets {kind} over the whole of {tested}")
        else:
            words.append(f"{own}{bound} meets {kind} nowhere in {tested}: no zone")
            if line is not None:
                steps = np.linspace(0.0, 1.0, 101)[:, None]
                candidates.append(
                    (
                        line[0] + steps * (line[1] - line[0]),
                        level,
                        "of the line where the prediction equals the criterion (there is "
                        "no zone there yet)",
                    )
                )
    spot = _next_specimen(fit, candidates)
    if spot is not None:
        state, level, error, reason = spot
        w_next, rho_next = fit._unscaled(state[None, :])[0]
        spot = NextSpecimen(
            float(w_next), float(rho_next), efforts[level] if efforts else None, error, reason
        )
    return replace(
        fit,
        extent=fit._unscaled(_hull_corners(z)),
        zones=tuple(zones),
        next_specimen=spot,
        message="; ".join([*words, *notes]),
    )
