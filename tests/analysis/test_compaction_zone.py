"""Tests for kitchen.analysis.compaction_zone: the acceptable zone on the compaction plane."""

import itertools
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from scipy.spatial import ConvexHull, QhullError
from series_files import SAMPLES, copy_sample

from kitchen.analysis import MEETS, compaction_zone
from kitchen.workspace import Workspace

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
    assert zone.left_out == () and zone.blocking == () and zone.message == ""
    assert "Daniel & Benson (1990) draw the zone by judgement" in zone.method
    probe_w = np.array([0.18, 0.17, 0.16, 0.20, 0.15, 0.18, 0.21, 0.18])
    probe_rho = np.array([1750.0, 1720.0, 1750.0, 1800.0, 1750.0, 1801.0, 1750.0, 1699.0])
    expected = [True, True, True, True, False, False, False, False]  # edges count as inside
    assert list(zone.contains(probe_w, probe_rho)) == expected
    assert zone.contains(0.18, 1750.0) is True


def test_acceptable_zone_keeps_a_failing_specimen_among_those_that_meet_out():
    # Z8 does not meet and lies among the meeting corners, on the diagonal from Z0 to Z2:
    # the hull of all five meeting specimens would hold it (the old rule); the zone leaves
    # out the one meeting corner it must, and says that Z8 prevents more.
    meets = pd.Series(ZONE_MEETS, index=[f"Z{i}" for i in range(8)])
    w = np.append(ZONE_W, 0.19)
    rho = np.append(ZONE_RHO, 1775.0)
    meets = pd.concat([meets, pd.Series([False], index=["Z8"])])
    verdicts = np.where(meets, "meets", "does not meet")
    zone = compaction_zone.acceptable_zone(w, rho, meets, verdicts=verdicts)
    assert zone.blocking == ("Z8",)
    assert not zone.contains(0.19, 1775.0)
    assert not zone.contains(w[~meets.to_numpy()], rho[~meets.to_numpy()]).any()
    # Z2 (0.20, 1800) is the one corner to leave out: without it the triangle Z0, Z1, Z3
    # (with Z4 on its edge) keeps Z8 out; without Z1 or Z3, Z8 lies on the hull's edge from
    # Z0 to Z2, and without Z0 above the diagonal from Z1 to Z3, inside.
    assert zone.left_out == ("Z2",) and zone.kind == "polygon"
    assert (zone.n_meeting, zone.n_not_meeting) == (5, 4)
    assert zone.message == (
        "Z8, which does not meet, lies among the specimens that meet (inside the hull of all 5) "
        "and prevents a larger zone: the zone is drawn around the 4 of them that can be enclosed "
        "with no other specimen inside; left out: Z2"
    )


def test_acceptable_zone_names_the_specimens_given():
    zone = compaction_zone.acceptable_zone(
        np.append(ZONE_W, 0.19),
        np.append(ZONE_RHO, 1775.0),
        np.append(ZONE_MEETS, False),
        names=[f"S-{i}" for i in range(9)],
    )
    assert zone.blocking == ("S-8",) and zone.left_out == ("S-2",)
    assert zone.message.startswith("S-8 lies among the specimens that meet")
    assert zone.message.endswith("left out: S-2")


def _largest_by_search(w, rho, meets, scale):
    """The most meeting specimens any subset's hull can hold with no other specimen in it,
    by trying every subset (the reference for the construction's optimality)."""
    plane = np.column_stack([np.asarray(w) / scale[0], np.asarray(rho) / scale[1]])
    meeting, others = plane[meets], plane[~meets]

    def inside(points, corners, tolerance):
        corners = np.unique(corners, axis=0)
        if corners.shape[0] == 1:
            return np.hypot(*(points - corners[0]).T) <= tolerance
        try:
            hull = ConvexHull(corners)
        except QhullError:  # on one line: the segment between the farthest two
            ends = corners[[0, -1]] if corners.shape[0] == 2 else None
            if ends is None:
                spread = corners - corners.mean(axis=0)
                along = spread @ np.linalg.svd(spread)[2][0]
                ends = corners[[np.argmin(along), np.argmax(along)]]
            edge = ends[1] - ends[0]
            t = np.clip((points - ends[0]) @ edge / (edge @ edge), 0, 1)
            return np.hypot(*(points - ends[0] - t[:, None] * edge).T) <= tolerance
        # scipy's facet equations: n·x + c ≤ 0 inside, n of unit length
        return (points @ hull.equations[:, :2].T + hull.equations[:, 2] <= tolerance).all(axis=1)

    for size in range(len(meeting), 0, -1):
        best = 0
        for subset in itertools.combinations(range(len(meeting)), size):
            corners = meeting[list(subset)]
            if others.size and inside(others, corners, 2e-9).any():
                continue
            best = max(best, int(inside(meeting, corners, 1e-9).sum()))
        if best >= size:
            return best
    return 0


def test_acceptable_zone_holds_as_many_meeting_specimens_as_any_subset_can():
    # Seeded small series (4–10 specimens, some on one line, some repeated) against a
    # search over every subset of the meeting specimens.
    rng = np.random.default_rng(20)
    blocked = 0
    for trial in range(120):
        n = int(rng.integers(4, 11))
        w = rng.uniform(0.10, 0.20, n).round(3)
        rho = rng.uniform(1600.0, 1800.0, n).round(0)
        if trial % 3 == 0:  # half of them on one line
            w[: n // 2] = np.linspace(0.10, 0.20, n // 2).round(3)
            rho[: n // 2] = np.linspace(1600.0, 1800.0, n // 2)
        if trial % 5 == 0:  # one state tested twice
            w[-1], rho[-1] = w[0], rho[0]
        meets = rng.random(n) < 0.65
        zone = compaction_zone.acceptable_zone(w, rho, meets)
        assert not zone.contains(w[~meets], rho[~meets]).any(), trial
        held = int(zone.contains(w[meets], rho[meets]).sum())
        assert held == _largest_by_search(w, rho, meets, zone.scale), trial
        assert held + len(zone.left_out) == meets.sum()
        blocked += bool(zone.blocking)
    assert blocked >= 30  # the search met the hard case often, not only clean hulls


def test_a_specimen_on_the_state_of_a_failing_one_is_left_out():
    zone = compaction_zone.acceptable_zone(
        [0.16, 0.20, 0.18, 0.18], [1700, 1700, 1800, 1700], [True, True, True, False]
    )
    assert zone.kind == "polygon" or zone.kind == "segment"
    assert not zone.contains(0.18, 1700.0)
    same = compaction_zone.acceptable_zone([0.16, 0.16], [1700, 1700], [True, False])
    assert same.kind == "empty" and same.left_out == (0,)
    assert "no specimen that meets can be enclosed without one that does not" in same.message


# --- the sample series, revised as notebook 05 suggests -------------------------------------


@pytest.fixture
def clay(tmp_path) -> Path:
    """A copy of the invented clay-liner series, free to revise."""
    return copy_sample(SAMPLES / "clay_liner", tmp_path / "clay_liner")


def test_revised_height_of_qf03_does_not_put_qf12_in_the_zone(clay):
    # With QF-03's height revised to 4.8 in, the hull of the specimens that meet reached
    # round QF-12 (k20 about ten times the 1e-9 m/s criterion): it read "in acceptable zone".
    workspace = Workspace(clay)
    workspace.revise(
        specimen="QF-03",
        field="height",
        value="4.8 in",
        reason="re-measured",
        when="2025-05-02T14:30:00+02:00",
    )
    analysis = workspace.analysis(1e-9)
    rows = analysis.specimens.set_index("specimen")
    assert rows.at["QF-12", "k"] > 9e-9 and rows.at["QF-12", "verdict"] != MEETS
    assert not rows.at["QF-12", "in_zone"]
    assert not rows.loc[rows["verdict"] != MEETS, "in_zone"].any()
    zone = analysis.acceptable_zone
    assert "QF-12" in zone.blocking and zone.left_out
    sentence = next(note for note in analysis.notes if note.startswith("acceptable zone: "))
    assert "QF-12, which does not meet," in sentence and "prevent" in sentence
    for name in zone.left_out:
        assert name in sentence and rows.at[name, "verdict"] == MEETS


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
