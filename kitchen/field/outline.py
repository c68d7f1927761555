"""A zone's outline on the compaction plane, and where a point lies against it.

The acceptable zone drawn around the specimens that meet is a convex polygon (or a segment,
a point); the fitted zone is one convex polygon per compactive effort, and their union need
not be convex. :class:`ZoneOutline` holds any of them as a union of closed polygons and
answers, for a state (w, ρd): is it inside (a point on the boundary counts as inside), and
how far is it from the boundary along each axis — the change of water content at its dry
density, and the change of dry density at its water content, that brings it to the edge.
Outside, that is the change that brings it in (NaN where none does: no water content at
that dry density is in the zone); inside, the margin to the nearest edge, given as a
negative number. The construction, by the chords a line of constant ρd (or w) cuts from
the polygons (even–odd rule), is common computational geometry (O'Rourke, *Computational
Geometry in C*, 2nd ed., ch. 7, point in polygon by ray crossing; from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["ZoneOutline", "outline_of_acceptable_zone", "outline_of_fitted_zone"]

RELATIVE_TOLERANCE = 1e-9
"""How near the edge a point counts as on it, as a share of the zone's span on each axis:
rounding, not a field tolerance."""


def _chords(polygons, along: int, at: float, tolerance: float) -> list[tuple[float, float]]:
    """The closed intervals of coordinate `along` (0: w, 1: ρd) where the line on which the
    other coordinate equals `at` meets the polygons: crossings paired by the even–odd rule,
    plus the edges lying on the line and the corners on it (where the line only touches)."""
    across = 1 - along
    intervals: list[tuple[float, float]] = []
    for corners in polygons:
        a = corners
        b = np.roll(corners, -1, axis=0)
        on_line = np.abs(a[:, across] - at) <= tolerance
        for point in a[on_line]:
            intervals.append((float(point[along]), float(point[along])))
        flat = on_line & (np.abs(b[:, across] - at) <= tolerance)
        for start, end in zip(a[flat], b[flat], strict=True):
            low, high = sorted((float(start[along]), float(end[along])))
            intervals.append((low, high))
        if len(corners) < 2:
            continue
        crosses = (a[:, across] <= at) != (b[:, across] <= at)
        if not crosses.any():
            continue
        share = (at - a[crosses, across]) / (b[crosses, across] - a[crosses, across])
        where = np.sort(a[crosses, along] + share * (b[crosses, along] - a[crosses, along]))
        intervals.extend(
            (float(lo), float(hi)) for lo, hi in zip(where[::2], where[1::2], strict=True)
        )
    return intervals


def _signed_distance(value: float, intervals, tolerance: float) -> tuple[float, float]:
    """(distance, change): distance of `value` from the union of `intervals` along the
    line, positive outside and minus the margin to the nearest end inside; `change` the
    signed move that reaches the nearest interval from outside (0 inside). NaN without
    intervals."""
    if not intervals:
        return np.nan, np.nan
    spans = np.array(sorted(intervals))
    merged = [list(spans[0])]
    for low, high in spans[1:]:
        if low <= merged[-1][1] + tolerance:
            merged[-1][1] = max(merged[-1][1], high)
        else:
            merged.append([low, high])
    merged = np.array(merged)
    inside = (merged[:, 0] - tolerance <= value) & (value <= merged[:, 1] + tolerance)
    if inside.any():
        low, high = merged[np.argmax(inside)]
        return -max(0.0, min(value - low, high - value)), 0.0
    gaps = np.concatenate([merged[:, 0] - value, merged[:, 1] - value])
    nearest = gaps[np.argmin(np.abs(gaps))]
    return float(abs(nearest)), float(nearest)


@dataclass(frozen=True)
class ZoneOutline:
    """A zone on the compaction plane: the union of closed polygons.

    Attributes
    ----------
    polygons : tuple of numpy.ndarray
        Each (m, 2): water content [-] and dry density [kg/m3] of its corners in order
        around it (either way round); two corners make a segment, one a point.
    name : str
        What the zone is, in words (``"acceptable zone (drawn)"``).
    """

    polygons: tuple
    name: str

    @property
    def empty(self) -> bool:
        return not any(len(p) for p in self.polygons)

    def _tolerances(self) -> tuple[float, float]:
        corners = np.vstack([p for p in self.polygons if len(p)] or [np.zeros((1, 2))])
        spans = np.ptp(corners, axis=0)
        size = np.where(spans > 0, spans, np.maximum(np.abs(corners).max(axis=0), 1.0))
        return tuple(float(s) * RELATIVE_TOLERANCE for s in size)

    def distances(self, water_content, dry_density) -> dict[str, np.ndarray]:
        """Where each state lies against the zone.

        Parameters
        ----------
        water_content : array_like
            A fraction. [-]
        dry_density : array_like
            [kg/m3]

        Returns
        -------
        dict of str to numpy.ndarray
            ``inside`` (bool: inside or on the edge), ``on_edge`` (bool),
            ``water_content_distance`` [-] and ``dry_density_distance`` [kg/m3] (positive
            outside: how far from the zone along that axis; negative inside: minus the
            margin to the nearest edge; NaN where the line of the state's dry density, or
            water content, misses the zone), and ``water_content_change`` [-] and
            ``dry_density_change`` [kg/m3] (the signed move that brings a state outside to
            the edge, 0 inside, NaN where none does).

        Examples
        --------
        A unit square of water content 0.10–0.20 and dry density 1600–1700 kg/m3:

        >>> square = np.array([[0.10, 1600], [0.20, 1600], [0.20, 1700], [0.10, 1700]])
        >>> where = ZoneOutline((square,), "square").distances([0.22], [1650])
        >>> bool(where["inside"][0]), round(float(where["water_content_change"][0]), 6)
        (False, -0.02)
        """
        w = np.atleast_1d(np.asarray(water_content, dtype=float))
        rho = np.atleast_1d(np.asarray(dry_density, dtype=float))
        w, rho = np.broadcast_arrays(w, rho)
        tol_w, tol_rho = self._tolerances()
        polygons = [np.asarray(p, dtype=float) for p in self.polygons if len(p)]
        out = {
            name: np.full(w.shape, np.nan)
            for name in (
                "water_content_distance",
                "water_content_change",
                "dry_density_distance",
                "dry_density_change",
            )
        }
        for i, (wi, ri) in enumerate(zip(w, rho, strict=True)):
            (
                out["water_content_distance"][i],
                out["water_content_change"][i],
            ) = _signed_distance(wi, _chords(polygons, 0, ri, tol_rho), tol_w)
            (
                out["dry_density_distance"][i],
                out["dry_density_change"][i],
            ) = _signed_distance(ri, _chords(polygons, 1, wi, tol_w), tol_rho)
        inside = out["water_content_distance"] <= 0
        out["inside"] = inside
        # on the edge: within rounding of it along either axis
        out["on_edge"] = inside & (
            (out["water_content_distance"] >= -tol_w)
            | (np.nan_to_num(out["dry_density_distance"], nan=-np.inf) >= -tol_rho)
        )
        return out

    def contains(self, water_content, dry_density) -> np.ndarray:
        """True where (w, ρd) lies inside the zone or on its edge (w [-], ρd [kg/m3])."""
        return self.distances(water_content, dry_density)["inside"]


def outline_of_acceptable_zone(zone) -> ZoneOutline:
    """The outline of a drawn acceptable zone (:class:`kitchen.analysis.AcceptableZone`):
    its polygon, segment or point, or nothing."""
    corners = np.asarray(zone.vertices, dtype=float).reshape(-1, 2)
    return ZoneOutline((corners,) if corners.size else (), "acceptable zone (drawn)")


def outline_of_fitted_zone(fitted, effort=None) -> ZoneOutline:
    """The outline of a fitted zone (:class:`kitchen.analysis.FittedZone`): the region of
    one effort, or the union of every effort's region (which need not be convex)."""
    zones = [z for z in fitted.zones if effort is None or z.effort == effort]
    if effort is not None and not zones:
        known = ", ".join(str(z.effort) for z in fitted.zones)
        raise ValueError(f"effort: the fitted zone has no effort {effort!r}; it has {known}")
    polygons = tuple(np.asarray(z.region, dtype=float) for z in zones if len(z.region))
    own = f", {effort} effort" if effort is not None else ""
    return ZoneOutline(polygons, f"fitted zone{own}")
