"""Where a state lies against a zone's outline: inside, on the edge, and how far along each axis.

The distances are checked against values worked by hand on simple polygons (the
arithmetic is written beside each); the notched zone is one a convex test would judge
wrongly."""

import numpy as np
import pytest

from kitchen.analysis import acceptable_zone
from kitchen.field import ZoneOutline, outline_of_acceptable_zone

SQUARE = np.array([[0.10, 1600.0], [0.20, 1600.0], [0.20, 1700.0], [0.10, 1700.0]])
# a right triangle: the hypotenuse runs from (0.20, 1600) to (0.10, 1700)
TRIANGLE = np.array([[0.10, 1600.0], [0.20, 1600.0], [0.10, 1700.0]])
# a U: the square with a notch cut from the top, w 0.13-0.17, ρd 1650-1700
NOTCHED = np.array(
    [
        [0.10, 1600.0],
        [0.20, 1600.0],
        [0.20, 1700.0],
        [0.17, 1700.0],
        [0.17, 1650.0],
        [0.13, 1650.0],
        [0.13, 1700.0],
        [0.10, 1700.0],
    ]
)


def where(polygon, w, rho):
    found = ZoneOutline((polygon,), "test zone").distances([w], [rho])
    return {name: value[0] for name, value in found.items()}


@pytest.mark.parametrize(
    "w, rho",
    [
        (0.10, 1600.0),  # a corner
        (0.20, 1650.0),  # the middle of the right edge
        (0.15, 1700.0),  # the middle of the top edge
        (0.15, 1600.0),  # the middle of the bottom edge
    ],
)
def test_a_state_on_the_edge_counts_as_inside(w, rho):
    found = where(SQUARE, w, rho)
    assert found["inside"] and found["on_edge"]


def test_inside_the_square_the_margins_are_the_nearest_edges():
    found = where(SQUARE, 0.13, 1680.0)
    # by hand: w margins 0.13 - 0.10 = 0.03 and 0.20 - 0.13 = 0.07, the nearer 0.03;
    # ρd margins 1680 - 1600 = 80 and 1700 - 1680 = 20, the nearer 20
    assert found["inside"] and not found["on_edge"]
    assert found["water_content_distance"] == pytest.approx(-0.03)
    assert found["dry_density_distance"] == pytest.approx(-20.0)
    assert found["water_content_change"] == 0 and found["dry_density_change"] == 0


def test_outside_the_triangle_the_distances_are_those_worked_by_hand():
    found = where(TRIANGLE, 0.18, 1650.0)
    # by hand: at ρd = 1650 the hypotenuse is at w = 0.20 - 0.10 * (1650 - 1600)/100 = 0.15,
    # so the state is 0.18 - 0.15 = 0.03 wet of the zone; at w = 0.18 the hypotenuse is at
    # ρd = 1600 + 100 * (0.20 - 0.18)/0.10 = 1620, so it is 1650 - 1620 = 30 kg/m3 above it
    assert not found["inside"]
    assert found["water_content_distance"] == pytest.approx(0.03)
    assert found["water_content_change"] == pytest.approx(-0.03)
    assert found["dry_density_distance"] == pytest.approx(30.0)
    assert found["dry_density_change"] == pytest.approx(-30.0)


def test_no_change_along_an_axis_reaches_the_zone_gives_nan():
    found = where(SQUARE, 0.15, 1750.0)  # above the square: no w at 1750 is in it
    assert not found["inside"]
    assert np.isnan(found["water_content_distance"]) and np.isnan(found["water_content_change"])
    assert found["dry_density_change"] == pytest.approx(-50.0)


def test_a_state_in_the_notch_is_outside_though_inside_the_hull():
    found = where(NOTCHED, 0.16, 1680.0)
    # by hand: at ρd = 1680 the zone is w 0.10-0.13 and 0.17-0.20: the nearest edge is
    # 0.17 - 0.16 = 0.01 wetter; at w = 0.16 the zone is ρd 1600-1650, 30 below
    assert not found["inside"]
    assert found["water_content_change"] == pytest.approx(0.01)
    assert found["dry_density_change"] == pytest.approx(-30.0)
    # the hull (the square) would hold it
    assert where(SQUARE, 0.16, 1680.0)["inside"]


@pytest.mark.parametrize(
    "w, rho, inside",
    [
        (0.115, 1690.0, True),  # the left arm
        (0.185, 1690.0, True),  # the right arm
        (0.15, 1620.0, True),  # the base under the notch
        (0.15, 1650.0, True),  # the notch's floor, an edge
        (0.13, 1675.0, True),  # the notch's side, an edge
        (0.14, 1651.0, False),  # just inside the notch
    ],
)
def test_the_notched_zone_judges_its_arms_base_and_edges(w, rho, inside):
    assert where(NOTCHED, w, rho)["inside"] == inside


def test_a_union_of_two_zones_that_is_not_convex():
    left = np.array([[0.10, 1600.0], [0.15, 1600.0], [0.15, 1700.0], [0.10, 1700.0]])
    low = np.array([[0.15, 1600.0], [0.20, 1600.0], [0.20, 1650.0], [0.15, 1650.0]])
    union = ZoneOutline((left, low), "L-shaped")
    found = union.distances([0.18, 0.12, 0.17], [1680.0, 1690.0, 1620.0])
    assert found["inside"].tolist() == [False, True, True]
    # by hand: at ρd = 1680 only the left part, w up to 0.15: 0.03 drier; at w = 0.18 the
    # low part, ρd up to 1650: 30 lower
    assert found["water_content_change"][0] == pytest.approx(-0.03)
    assert found["dry_density_change"][0] == pytest.approx(-30.0)


def test_the_outline_agrees_with_the_drawn_zone_on_a_seeded_cloud():
    rng = np.random.default_rng(1990)
    w = rng.uniform(0.12, 0.24, 14)
    rho = rng.uniform(1600, 1800, 14)
    meets = w > 0.17
    zone = acceptable_zone(w, rho, meets)
    assert zone.kind == "polygon"
    outline = outline_of_acceptable_zone(zone)
    probe_w = rng.uniform(0.10, 0.26, 4000)
    probe_rho = rng.uniform(1580, 1820, 4000)
    ours = outline.contains(probe_w, probe_rho)
    theirs = np.asarray(zone.contains(probe_w, probe_rho), dtype=bool)
    assert ours.sum() > 100 and (ours == theirs).all()
    corners = zone.vertices
    assert outline.contains(corners[:, 0], corners[:, 1]).all()


def test_degenerate_zones_a_segment_and_a_point():
    segment = ZoneOutline((np.array([[0.10, 1600.0], [0.20, 1700.0]]),), "segment")
    found = segment.distances([0.15, 0.15], [1650.0, 1660.0])
    assert found["inside"].tolist() == [True, False]
    assert found["water_content_change"][1] == pytest.approx(0.01)
    point = ZoneOutline((np.array([[0.15, 1650.0]]),), "point")
    assert point.contains([0.15, 0.16], [1650.0, 1650.0]).tolist() == [True, False]
    empty = ZoneOutline((), "nothing")
    assert empty.empty and not empty.contains([0.15], [1650.0])[0]


def _cell_truth(on, w_edges, rho_edges, w, rho):
    """Inside, and the signed change of w that reaches the zone, for a zone made of the
    grid cells marked `on`, worked out from the grid alone (no geometry of the package)."""
    row = np.searchsorted(rho_edges, rho) - 1
    col = np.searchsorted(w_edges, w) - 1
    inside = bool(on[row, col])
    if inside:
        return True, 0.0
    spans = [(w_edges[c], w_edges[c + 1]) for c in range(on.shape[1]) if on[row, c]]
    if not spans:
        return False, np.nan
    ends = np.array(spans).ravel() - w
    return False, float(ends[np.argmin(np.abs(ends))])


def test_seeded_unions_of_cells_are_judged_as_the_grid_says():
    # a population of 100 zones, each the union of random cells of a 5 x 5 grid on the
    # compaction plane (most of them not convex, many with notches and holes), and 30
    # states a zone placed away from the cell edges: every verdict and every change of
    # water content must match the grid's
    rng = np.random.default_rng(1811)
    w_edges = np.linspace(0.10, 0.25, 6)
    rho_edges = np.linspace(1550.0, 1850.0, 6)
    wrong = 0
    for _ in range(100):
        on = rng.random((5, 5)) < 0.45
        if not on.any():
            continue
        cells = [
            np.array(
                [
                    [w_edges[c], rho_edges[r]],
                    [w_edges[c + 1], rho_edges[r]],
                    [w_edges[c + 1], rho_edges[r + 1]],
                    [w_edges[c], rho_edges[r + 1]],
                ]
            )
            for r, c in zip(*np.nonzero(on), strict=True)
        ]
        outline = ZoneOutline(tuple(cells), "cells")
        col, row = rng.integers(0, 5, 30), rng.integers(0, 5, 30)
        w = w_edges[col] + rng.uniform(0.05, 0.95, 30) * np.diff(w_edges)[0]
        rho = rho_edges[row] + rng.uniform(0.05, 0.95, 30) * np.diff(rho_edges)[0]
        found = outline.distances(w, rho)
        for i in range(30):
            inside, change = _cell_truth(on, w_edges, rho_edges, w[i], rho[i])
            same_change = (np.isnan(change) and np.isnan(found["water_content_change"][i])) or (
                abs(change - found["water_content_change"][i]) < 1e-12
            )
            wrong += (bool(found["inside"][i]) != inside) or not same_change
    assert wrong == 0
