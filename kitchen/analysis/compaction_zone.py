"""The acceptable zone: the part of the compaction plane holding the specimens that meet.

Daniel & Benson (1990) mark the specimens whose hydraulic conductivity meets the criterion
on the plane of molding water content and dry density, and draw the zone around them. The
zone drawn here never holds a specimen that does not meet (or is not judged): it is the
convex hull of the largest set of meeting specimens whose hull holds no other specimen. When
every meeting specimen can be enclosed, that is their convex hull; when a specimen that does
not meet lies among them, the zone leaves out the fewest meeting specimens it can, and says
which specimen prevents more. A segment, a point or nothing stand in where the specimens
allow no area.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ._checks import element_place, finite_numbers, like_inputs, require_same_length, shown_value

__all__ = ["AcceptableZone", "acceptable_zone"]


_ZONE_METHOD = (
    "convex hull of the largest set of specimens that meet the criterion whose hull holds no "
    "other specimen (the largest area among equals), on the water content–dry density plane: "
    "all the specimens that meet when none that does not meet (or is not judged) lies among "
    "them; Daniel & Benson (1990) draw the zone by judgement, this construction is the tool's "
    "own"
)
_ZONE_TOLERANCE = 1e-9  # on the plane scaled by the spans of the specimens
_KEEP_OUT = 2.0 * _ZONE_TOLERANCE
"""How near the zone's construction lets a specimen that does not meet come: twice the
tolerance of :meth:`AcceptableZone.contains`, so that none it builds around can test inside."""


@dataclass(frozen=True)
class AcceptableZone:
    """The zone of the compaction plane holding the specimens that meet a criterion.

    No specimen that does not meet the criterion lies inside the zone or on its edge.

    Attributes
    ----------
    kind : str
        ``"polygon"`` (three or more enclosed specimens not on one line), ``"segment"``
        (two distinct points, or all on one line), ``"point"`` (one), ``"empty"`` (none).
    vertices : numpy.ndarray
        Shape (m, 2): water content [-] and dry density [kg/m3] of the corners;
        counterclockwise for a polygon, the two ends for a segment.
    method : str
        How the zone is constructed, in words.
    n_meeting, n_not_meeting : int
        Number of specimens that meet and do not meet the criterion (the second counts
        every specimen not marked as meeting: not judged ones too).
    left_out : tuple
        Specimens that meet but lie outside the zone, because no zone holding them keeps
        every specimen that does not meet outside (their names when given, index labels
        for a Series input, positions otherwise). Empty when the zone is the hull of all
        that meet.
    blocking : tuple
        Specimens that do not meet yet lie inside the hull of all the specimens that meet:
        the ones that prevent a larger zone (labels as for `left_out`).
    message : str
        Empty for a clean polygon holding every meeting specimen; otherwise in words what
        the zone is and, when specimens were left out, which specimen prevents more.
    scale : tuple of float
        Spans of water content [-] and dry density [kg/m3] of all specimens; distances on
        the plane are compared in these units.
    """

    kind: str
    vertices: np.ndarray
    method: str
    n_meeting: int
    n_not_meeting: int
    left_out: tuple
    blocking: tuple
    message: str
    scale: tuple[float, float]

    def contains(self, water_content, dry_density):
        """True where (w, ρd) lies inside the zone or on its edge (w [-], ρd [kg/m3])."""
        w = finite_numbers(water_content, "water_content")
        rho = finite_numbers(dry_density, "dry_density")
        require_same_length(water_content=w, dry_density=rho)
        w, rho = np.broadcast_arrays(w, rho)
        q = np.stack([w / self.scale[0], rho / self.scale[1]], axis=-1)
        inside = _inside(self.kind, self.vertices / np.asarray(self.scale), q, _ZONE_TOLERANCE)
        return like_inputs(inside, water_content, dry_density)


def _inside(kind: str, v: np.ndarray, q: np.ndarray, tolerance: float) -> np.ndarray:
    """Whether the points `q` (..., 2) lie in the zone of `kind` with corners `v`, on the
    scaled plane, within `tolerance` of it."""
    if kind == "empty":
        return np.zeros(q.shape[:-1], dtype=bool)
    if kind == "point":
        return np.hypot(*(q - v[0]).T) <= tolerance
    if kind == "segment":
        return _segment_distance(v[0], v[1], q) <= tolerance
    return inside_convex_polygon(v, q, tolerance)


def inside_convex_polygon(
    corners: np.ndarray, q: np.ndarray, tolerance: float = _ZONE_TOLERANCE
) -> np.ndarray:
    """Whether the points `q` (..., 2) lie in the counterclockwise convex polygon `corners`,
    or within `tolerance` of it: on the left of (or on) every edge."""
    inside = np.ones(q.shape[:-1], dtype=bool)
    for start, end in zip(corners, np.roll(corners, -1, axis=0), strict=True):
        edge, rel = end - start, q - start
        cross = edge[0] * rel[..., 1] - edge[1] * rel[..., 0]
        inside &= cross >= -tolerance * np.hypot(*edge)
    return inside


def _segment_distance(a, b, q) -> np.ndarray:
    """Distance of the points `q` (..., 2) from the closed segment from `a` to `b`."""
    edge = np.asarray(b) - np.asarray(a)
    length2 = float(edge @ edge)
    t = np.zeros(q.shape[:-1]) if length2 == 0 else np.clip(((q - a) @ edge) / length2, 0, 1)
    return np.linalg.norm(q - (a + t[..., None] * edge), axis=-1)


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


def _hull_of(points: np.ndarray) -> tuple[str, np.ndarray]:
    """(kind, corners) of the convex hull of distinct scaled points: polygon, segment,
    point or empty."""
    if points.shape[0] == 0:
        return "empty", np.empty((0, 2))
    if points.shape[0] == 1:
        return "point", points[:1]
    centred = points - points.mean(axis=0)
    _, singular, directions = np.linalg.svd(centred, full_matrices=False)
    if singular[1] > 1e-9 * singular[0]:
        from scipy.spatial import ConvexHull, QhullError  # here: scipy's modules load slowly

        try:
            return "polygon", points[ConvexHull(points).vertices]
        except QhullError:
            pass
    along = centred @ directions[0]
    return "segment", points[[np.argmin(along), np.argmax(along)]]


def _cross(a, b):
    return a[..., 0] * b[..., 1] - a[..., 1] * b[..., 0]


def _in_triangles(v, length, r, tolerance) -> np.ndarray:
    """(m, m, len(r)): whether each point of `r` lies in the closed triangle (0, v[a], v[b]),
    within `tolerance` of it (corners counterclockwise; `length` the norms of `v`)."""
    a, b, r = v[:, None, None, :], v[None, :, None, :], r[None, None, :, :]
    between = np.hypot(*(v[None, :, :] - v[:, None, :]).transpose(2, 0, 1))[..., None]
    return (
        (_cross(a, r) >= -tolerance * length[:, None, None])
        & (_cross(b - a, r - a) >= -tolerance * between)
        & (_cross(-b, r - b) >= -tolerance * length[None, :, None])
    )


def _on_edges(v, length, r, tolerance) -> np.ndarray:
    """(m, len(r)): whether each point of `r` lies within `tolerance` of the closed
    segment from the origin to v[a]."""
    t = np.clip((v @ r.T) / np.maximum(length**2, 1e-300)[:, None], 0.0, 1.0)
    gap = r[None, :, :] - t[..., None] * v[:, None, :]
    return np.hypot(gap[..., 0], gap[..., 1]) <= tolerance


def _largest_polygon(points, weights, keep_out):
    """The convex polygon with corners among `points` enclosing the largest weight of
    them (then the largest area) while no point of `keep_out` lies in it or within
    :data:`_KEEP_OUT` of it: (weight plus half the area, corners counterclockwise), or
    (-inf, None).

    Every convex polygon is a fan of triangles from its lowest corner; for each candidate
    lowest corner the others are taken in angular order and the best convex chain is
    found by dynamic programming over its last edge, a triangle of the fan at a time
    (Eppstein, Overmars, Rote & Woeginger 1992, Discrete Comput. Geom. 7:45, for the fan
    decomposition; Bautista-Santiago et al. 2011, Oper. Res. Lett. 39(4):246, for the
    largest "island" of a point set by the same recursion; from memory). Each triangle
    counts the points in it (closed) except those on its edge from the lowest corner to
    its first corner, which the previous triangle (or the first edge) counts.
    """
    best_value, best_corners = -np.inf, None
    for anchor in points:
        above = (points[:, 1] > anchor[1]) | (
            (points[:, 1] == anchor[1]) & (points[:, 0] > anchor[0])
        )
        if above.sum() < 2:
            continue
        v = points[above] - anchor
        v = v[np.argsort(np.arctan2(v[:, 1], v[:, 0]), kind="stable")]
        m = v.shape[0]
        q, f = points - anchor, keep_out - anchor
        length = np.hypot(v[:, 0], v[:, 1])
        area2 = _cross(v[:, None, :], v[None, :, :])  # twice the fan triangle's area
        usable = np.triu(area2 > _ZONE_TOLERANCE * np.maximum.outer(length, length), 1)

        on_edge = _on_edges(v, length, q, _ZONE_TOLERANCE)
        edge_weight = on_edge @ weights
        held = _in_triangles(v, length, q, _ZONE_TOLERANCE) & ~on_edge[:, None, :]
        triangle = held @ weights + 0.25 * area2
        blocked = _in_triangles(v, length, f, _KEEP_OUT).any(axis=-1)
        triangle = np.where(usable & ~blocked, triangle, -np.inf)
        chain = edge_weight[:, None] + triangle  # chain[a, b]: best chain ending a -> b
        back = np.full((m, m), -1)
        for b in range(m):
            reach = chain[:, b]
            if not np.isfinite(reach).any():
                continue
            turn = _cross(v[b] - v[:, None, :], v[None, :, :] - v[b]) > _ZONE_TOLERANCE * (
                np.maximum.outer(length, length)
            )
            options = np.where(turn & np.isfinite(reach)[:, None], reach[:, None], -np.inf)
            came = np.argmax(options, axis=0)
            value = options[came, np.arange(m)] + triangle[b]
            better = value > chain[b]
            chain[b, better], back[b, better] = value[better], came[better]
        a, b = np.unravel_index(np.argmax(chain), chain.shape)
        if chain[a, b] > best_value:
            best_value, corners = float(chain[a, b]), [b]
            while a >= 0:
                corners.append(a)
                a, b = back[a, b], a
            best_corners = np.vstack([anchor, v[corners[::-1]] + anchor])
    return best_value, best_corners


def _defended_zone(points, weights, keep_out) -> tuple[str, np.ndarray]:
    """(kind, corners) of the zone around the largest weight of `points` (scaled, distinct,
    with their specimen counts) whose hull keeps every point of `keep_out` out."""

    def clear(kind, corners):
        return not keep_out.size or not _inside(kind, corners, keep_out, _KEEP_OUT).any()

    options = []  # (weight enclosed, dimension, size, kind, corners)
    for i, point in enumerate(points):
        if clear("point", point[None]):
            options.append((weights[i], 0, 0.0, "point", point[None]))
    for i in range(len(points)):
        for j in range(i + 1, len(points)):
            ends = points[[i, j]]
            if clear("segment", ends):
                held = weights[_segment_distance(ends[0], ends[1], points) <= _ZONE_TOLERANCE]
                length = float(np.hypot(*(ends[1] - ends[0])))
                options.append((held.sum(), 1, length, "segment", ends))
    value, corners = _largest_polygon(points, weights, keep_out)
    if corners is not None:
        kind, corners = _hull_of(corners)
        held = weights[_inside(kind, corners, points, _ZONE_TOLERANCE)].sum()
        options.append((held, 2 if kind == "polygon" else 1, value - held, kind, corners))
    if not options:
        return "empty", np.empty((0, 2))
    best = max(options, key=lambda option: option[:3])
    return best[3], best[4]


def _which(verdicts, i: int) -> str:
    """ ", which does not meet," for a specimen's verdict in words, "" without verdicts."""
    if verdicts is None:
        return ""
    verdict = str(verdicts[i])
    return f", which {verdict}," if verdict.startswith("does") else f", which is {verdict},"


def _listed(labels) -> str:
    return ", ".join(str(label) for label in labels)


def _joined(parts: list[str]) -> str:
    """Specimens in a sentence: "A", "A and B", "A, B and C" (commas of a verdict kept)."""
    if len(parts) == 1:
        return parts[0]
    first = [part.rstrip(",") for part in parts[:-1]]
    return ", ".join(first) + (", and " if "," in first[-1] else " and ") + parts[-1]


def acceptable_zone(
    water_content, dry_density, meets, *, names=None, verdicts=None
) -> AcceptableZone:
    """The zone on the compaction plane holding the specimens that meet a criterion.

    Parameters
    ----------
    water_content : array_like or pandas.Series
        Molding water content of each specimen, a fraction. [-]
    dry_density : array_like or pandas.Series
        Dry density of each specimen. [kg/m3]
    meets : array_like of bool or pandas.Series
        True where the specimen meets the criterion (for example k ≤ the maximum allowed);
        False for every other specimen: does not meet, not conclusive, not judged.
    names : array_like of str, optional
        The specimens' names, for `left_out`, `blocking` and the words of the message
        (default: the index labels of a Series input, positions otherwise).
    verdicts : array_like of str, optional
        Each specimen's verdict in words, named beside the specimens that prevent a larger
        zone (for example "does not meet").

    Returns
    -------
    AcceptableZone
        The convex hull of the largest set of meeting specimens whose hull holds no
        other specimen, or a degenerate zone (segment, point, empty) described as such,
        with a ``contains(w, ρd)`` test.

    Notes
    -----
    Daniel & Benson (1990) mark the specimens that meet the criterion on the compaction
    plane and draw the acceptable zone around them by judgement, guided by the
    zero-air-voids line, the line of optimums and other criteria (shear strength,
    shrinkage). The construction here is the tool's own: the zone is the convex hull of the
    largest set of meeting specimens whose hull holds no specimen that does not meet
    (nor lies within a tolerance of one); among sets of that size, the one of the largest
    area (a polygon before a segment before a point). It is the hull of all the meeting
    specimens whenever that hull holds no other specimen. The specimens that do not meet
    yet lie inside the hull of all the meeting ones are those that prevent a larger zone:
    the message names them, and the meeting specimens left out.

    References
    ----------
    Daniel, D. E. and Benson, C. H. (1990). Water content–density criteria for compacted
    soil liners. Journal of Geotechnical Engineering 116(12), 1811–1830 (pages from
    memory).
    Eppstein, D., Overmars, M., Rote, G. and Woeginger, G. (1992). Finding minimum area
    k-gons. Discrete & Computational Geometry 7, 45–58; Bautista-Santiago, C. et al.
    (2011). Computing optimal islands. Operations Research Letters 39(4), 246–251: the fan
    recursion for the largest convex polygon (both from memory).

    Examples
    --------
    A specimen that does not meet (the third) among four that meet is kept out:

    >>> zone = acceptable_zone(
    ...     [0.16, 0.20, 0.19, 0.20, 0.16], [1700, 1700, 1760, 1800, 1800],
    ...     [True, True, False, True, True], names=["A", "B", "C", "D", "E"])
    >>> zone.kind, len(zone.left_out), zone.blocking, bool(zone.contains(0.19, 1760))
    ('polygon', 1, ('C',), False)
    """
    w = finite_numbers(water_content, "water_content")
    rho = finite_numbers(dry_density, "dry_density")
    flags = _flags(meets)
    if w.ndim != 1 or rho.ndim != 1 or flags.ndim != 1:
        raise ValueError("water_content, dry_density, meets: expected one value per specimen")
    require_same_length(water_content=w, dry_density=rho, meets=flags)
    if w.size == 0:
        raise ValueError("water_content: no specimens given")
    labels = next(
        (x.index for x in (water_content, dry_density, meets) if isinstance(x, pd.Series)),
        range(w.size),
    )
    if names is not None:
        labels = list(np.asarray(names, dtype=object).ravel())
        require_same_length(water_content=w, names=np.asarray(labels, dtype=object))
    words = [str(label) for label in labels]
    scale = (_span(w), _span(rho))
    plane = np.column_stack([w / scale[0], rho / scale[1]])
    meeting, weights = np.unique(plane[flags], axis=0, return_counts=True)
    others = plane[~flags]
    kind, corners = _hull_of(meeting)
    blocking = np.flatnonzero(~flags & _inside(kind, corners, plane, _KEEP_OUT))
    if blocking.size:
        kind, corners = _defended_zone(meeting, weights.astype(float), others)
    enclosed = _inside(kind, corners, plane, _ZONE_TOLERANCE)
    left_out = np.flatnonzero(flags & ~enclosed)
    n_meeting = int(flags.sum())
    notes = []
    if n_meeting == 0:
        notes.append("no specimen meets the criterion: there is no zone")
    elif blocking.size:
        said = [words[i] + _which(verdicts, i) for i in blocking]
        held = n_meeting - left_out.size
        notes.append(
            f"{_joined(said)} {'lies' if len(said) == 1 else 'lie'} among the specimens "
            f"that meet (inside the hull of all {n_meeting}) and "
            f"{'prevents' if len(said) == 1 else 'prevent'} a larger zone: the zone is drawn "
            f"around the {held} of them that can be enclosed with no other specimen inside; "
            f"left out: {_listed(words[i] for i in left_out)}"
        )
    if kind == "point" and n_meeting:
        notes.append("the zone is a single point, not an area")
    elif kind == "segment":
        notes.append("the zone is a segment, not an area; test more specimens")
    elif kind == "empty" and n_meeting:
        notes.append("no specimen that meets can be enclosed without one that does not")
    vertices = corners * np.asarray(scale) if corners.size else np.empty((0, 2))
    return AcceptableZone(
        kind,
        vertices,
        _ZONE_METHOD,
        n_meeting,
        int((~flags).sum()),
        tuple(labels[int(i)] for i in left_out),
        tuple(labels[int(i)] for i in blocking),
        "; ".join(notes),
        scale,
    )
