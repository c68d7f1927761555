"""The acceptable zone: the part of the compaction plane holding the specimens that meet.

Daniel & Benson (1990) mark the specimens whose hydraulic conductivity meets the criterion
on the plane of molding water content and dry density, and draw the zone around them; here
the zone is their convex hull (or a segment, a point, or nothing), with a test of whether a
point lies in it and the specimens that do not meet yet lie inside.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import pandas as pd
from scipy.spatial import ConvexHull, QhullError

from ._checks import element_place, finite_numbers, like_inputs, require_same_length, shown_value

__all__ = ["AcceptableZone", "acceptable_zone"]


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
        w = finite_numbers(water_content, "water_content")
        rho = finite_numbers(dry_density, "dry_density")
        require_same_length(water_content=w, dry_density=rho)
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
        return like_inputs(inside, water_content, dry_density)


def _flags(meets) -> np.ndarray:
    raw = meets.to_numpy() if isinstance(meets, pd.Series) else np.asarray(meets)
    if raw.dtype != bool:
        for i, item in enumerate(np.ravel(raw)):
            if not isinstance(item, bool | np.bool_):
                raise ValueError(
                    "meets: expected True or False for each specimen (True where it meets "
                    f"the criterion); got {shown_value(item)} at {element_place(meets, i)}"
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
    w = finite_numbers(water_content, "water_content")
    rho = finite_numbers(dry_density, "dry_density")
    flags = _flags(meets)
    if w.ndim != 1 or rho.ndim != 1 or flags.ndim != 1:
        raise ValueError("water_content, dry_density, meets: expected one value per specimen")
    require_same_length(water_content=w, dry_density=rho, meets=flags)
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
