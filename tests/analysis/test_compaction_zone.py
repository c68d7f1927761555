"""Tests for kitchen.analysis.compaction_zone: the acceptable zone on the compaction plane."""

import numpy as np
import pandas as pd
import pytest

from kitchen.analysis import compaction_zone

# --- acceptable zone -------------------------------------------------------------------------

# Constructed series: meeting specimens at the corners of w 0.16–0.20, ρd 1700–1800 and one
# in the middle; failing specimens outside that rectangle.
ZONE_W = np.array([0.16, 0.20, 0.20, 0.16, 0.18, 0.12, 0.24, 0.18])
ZONE_RHO = np.array([1700.0, 1700.0, 1800.0, 1800.0, 1750.0, 1650.0, 1700.0, 1850.0])
ZONE_MEETS = np.array([True, True, True, True, True, False, False, False])


def test_acceptable_zone_is_the_rectangle_of_meeting_specimens():
    zone = compaction_zone.acceptable_zone(ZONE_W, ZONE_RHO, ZONE_MEETS)
    assert zone.kind == "polygon" and zone.vertices.shape == (4, 2)
    corners = {(0.16, 1700.0), (0.20, 1700.0), (0.20, 1800.0), (0.16, 1800.0)}
    assert {(round(w, 10), round(r, 6)) for w, r in zone.vertices} == corners
    x, y = zone.vertices.T  # counterclockwise: positive shoelace area
    assert 0.5 * np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y) == pytest.approx(0.04 * 100)
    assert (zone.n_meeting, zone.n_not_meeting) == (5, 3)
    assert zone.not_meeting_inside == () and zone.message == ""
    assert "Daniel & Benson (1990) draw the zone by judgement" in zone.method
    probe_w = np.array([0.18, 0.17, 0.16, 0.20, 0.15, 0.18, 0.21, 0.18])
    probe_rho = np.array([1750.0, 1720.0, 1750.0, 1800.0, 1750.0, 1801.0, 1750.0, 1699.0])
    expected = [True, True, True, True, False, False, False, False]  # edges count as inside
    assert list(zone.contains(probe_w, probe_rho)) == expected
    assert zone.contains(0.18, 1750.0) is True


def test_acceptable_zone_lists_failing_specimens_inside_it():
    meets = pd.Series(ZONE_MEETS, index=[f"Z{i}" for i in range(8)])
    w = np.append(ZONE_W, 0.19)
    rho = np.append(ZONE_RHO, 1760.0)
    meets = pd.concat([meets, pd.Series([False], index=["Z8"])])
    zone = compaction_zone.acceptable_zone(w, rho, meets)
    assert zone.not_meeting_inside == ("Z8",)
    assert "1 specimen(s) that do not meet the criterion lie inside the zone" in zone.message


def test_acceptable_zone_degenerate_cases():
    point = compaction_zone.acceptable_zone([0.18, 0.12], [1750.0, 1650.0], [True, False])
    assert point.kind == "point" and "single point" in point.message
    assert list(point.contains([0.18, 0.181], [1750.0, 1750.0])) == [True, False]

    pair = compaction_zone.acceptable_zone(
        [0.16, 0.20, 0.12], [1700, 1800, 1650], [True, True, False]
    )
    assert pair.kind == "segment" and "segment, not an area" in pair.message
    assert list(pair.contains([0.18, 0.18, 0.22], [1750.0, 1760.0, 1850.0])) == [True, False, False]

    line = compaction_zone.acceptable_zone(
        [0.16, 0.18, 0.20], [1700, 1750, 1800], [True, True, True]
    )
    assert line.kind == "segment"
    np.testing.assert_allclose(sorted(map(tuple, line.vertices)), [(0.16, 1700), (0.20, 1800)])

    empty = compaction_zone.acceptable_zone([0.16, 0.20], [1700, 1800], [False, False])
    assert empty.kind == "empty" and empty.vertices.shape == (0, 2)
    assert not empty.contains([0.16, 0.2], [1700, 1800]).any()


@pytest.mark.parametrize(
    "w, rho, meets, message",
    [
        (
            [0.1, 0.2],
            [1700, 1750],
            [True, "yes"],
            "meets: expected True or False.*'yes' at position 1",
        ),
        ([0.1, 0.2], [1700, 1750], [1, 0], "meets: expected True or False"),
        ([0.1, np.nan], [1700, 1750], [True, True], "water_content: expected a finite.*position 1"),
        ([0.1, 0.2], [1700, 1750, 1800], [True, True], "dry_density has 3"),
        ([], [], [], "no specimens"),
    ],
)
def test_acceptable_zone_bad_input(w, rho, meets, message):
    with pytest.raises(ValueError, match=message):
        compaction_zone.acceptable_zone(w, rho, np.array(meets, dtype=object) if meets else [])
