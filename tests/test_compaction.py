"""Tests for kitchen.compaction: saturation lines, compaction curves, line of optimums, zone."""

import warnings

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

from kitchen import compaction
from kitchen.specimen import degree_of_saturation, void_ratio

# --- saturation lines ------------------------------------------------------------------------


def test_zero_air_voids_published_value():
    # Das, Principles of Geotechnical Engineering; Holtz & Kovacs (book, from memory):
    # w = 20 %, Gs = 2.70 -> 1.753 Mg/m3. Tolerance: half a unit of the last printed digit.
    rho = compaction.zero_air_voids_dry_density(0.20, 2.70)
    assert rho == pytest.approx(1753.0, abs=0.5)


def test_constant_saturation_published_value():
    # Same sources (book, from memory): S = 90 % -> 1.688 Mg/m3. The exact value, 1687.5
    # kg/m3, sits on the rounding edge of the printed digits; allow half a unit plus 1e-6.
    rho = compaction.constant_saturation_dry_density(0.20, 2.70, 0.90)
    assert rho == pytest.approx(1688.0, abs=0.5 + 1e-6)


def test_saturation_line_round_trips_through_phase_relations():
    # S = w·Gs/e with e = Gs·ρw/ρd − 1 (Das, phase relations): the line must give back S.
    w = np.linspace(0.05, 0.35, 7)
    for s in (0.7, 0.85, 1.0):
        rho = compaction.constant_saturation_dry_density(w, 2.68, s)
        e = void_ratio(rho, 2.68)
        np.testing.assert_allclose(degree_of_saturation(w, 2.68, e), s, rtol=1e-12)


def test_zero_air_voids_is_full_saturation_and_keeps_the_input_kind():
    w = pd.Series([0.10, 0.15, 0.25], index=["a", "b", "c"])
    zav = compaction.zero_air_voids_dry_density(w, 2.65)
    assert isinstance(zav, pd.Series) and list(zav.index) == ["a", "b", "c"]
    np.testing.assert_allclose(zav, compaction.constant_saturation_dry_density(w, 2.65, 1.0))
    assert isinstance(compaction.zero_air_voids_dry_density(0.1, 2.65), float)
    assert isinstance(compaction.zero_air_voids_dry_density([0.1, 0.2], 2.65), np.ndarray)
    # Hand check: 2650 / (1 + 0.1·2.65) = 2094.86 kg/m3.
    assert compaction.zero_air_voids_dry_density(0.1, 2.65) == pytest.approx(2094.862, abs=1e-3)


@pytest.mark.parametrize(
    "kwargs, message",
    [
        (dict(water_content=-0.1, specific_gravity=2.7, saturation=0.9), "water_content"),
        (dict(water_content=0.2, specific_gravity=2700, saturation=0.9), "between 1 and 10"),
        (dict(water_content=0.2, specific_gravity=2.7, saturation=90), "not 90"),
        (dict(water_content=0.2, specific_gravity=2.7, saturation=0.0), "0 < S"),
        (dict(water_content=0.2, specific_gravity=2.7, saturation=0.9, water_density=-1), "kg/m3"),
        (dict(water_content=[0.1, 0.2], specific_gravity=[2.7] * 3, saturation=1), "has 3"),
        (dict(water_content="wet", specific_gravity=2.7, saturation=0.9), "expected numbers"),
    ],
)
def test_saturation_line_bad_input(kwargs, message):
    with pytest.raises(ValueError, match=message):
        compaction.constant_saturation_dry_density(**kwargs)


def test_saturation_line_names_the_index_of_a_missing_value():
    w = pd.Series([0.1, np.nan], index=["S1", "S2"])
    with pytest.raises(
        ValueError,
        match=r"water_content: expected a finite number \(not NaN or infinite\); got nan at index 'S2'",
    ):
        compaction.zero_air_voids_dry_density(w, 2.7)


# --- compaction curves -----------------------------------------------------------------------

# An invented series: a parabola with its peak at w = 0.17, ρd = 1760 kg/m3, plus scatter.
W = np.array([0.12, 0.14, 0.16, 0.18, 0.20, 0.22])
SCATTER = np.array([3.0, -4.0, 2.5, -1.0, 4.0, -2.0])
RHO = 1760.0 - 9000.0 * (W - 0.17) ** 2 + SCATTER


def test_quadratic_curve_matches_numpy_polyfit_and_the_vertex():
    curve = compaction.fit_compaction_curve(W, RHO)
    a, b, c = np.polyfit(W, RHO, 2)  # reference: numpy.polyfit on the same points
    np.testing.assert_allclose(curve.coefficients, (a, b, c), rtol=1e-9)
    assert curve.optimum_water_content == pytest.approx(-b / (2 * a), rel=1e-9)
    assert curve.maximum_dry_density == pytest.approx(c - b**2 / (4 * a), rel=1e-12)
    np.testing.assert_allclose(curve.residuals, RHO - np.polyval((a, b, c), W), atol=1e-8)
    dof = W.size - 3
    assert curve.residual_standard_deviation == pytest.approx(
        np.sqrt(np.sum((RHO - np.polyval((a, b, c), W)) ** 2) / dof), rel=1e-9
    )
    assert curve.n == 6 and curve.peak_found and curve.peak_within_range
    assert curve.message == ""
    np.testing.assert_allclose(curve.dry_density(W), np.polyval((a, b, c), W), rtol=1e-12)
    assert isinstance(curve.dry_density(0.17), float)


def test_quadratic_curve_recovers_an_exact_parabola():
    # Round trip: points on ρd = 1760 − 9000 (w − 0.17)² give the peak back.
    curve = compaction.fit_compaction_curve(W, 1760.0 - 9000.0 * (W - 0.17) ** 2)
    assert curve.optimum_water_content == pytest.approx(0.17, abs=1e-10)
    assert curve.maximum_dry_density == pytest.approx(1760.0, abs=1e-8)


def test_cubic_curve_matches_polyfit_and_a_numerical_maximum():
    curve = compaction.fit_compaction_curve(W, RHO, method="cubic")
    reference = np.polyfit(W, RHO, 3)
    np.testing.assert_allclose(curve.coefficients, reference, rtol=1e-8)
    best = optimize.minimize_scalar(
        lambda w: -np.polyval(reference, w),
        bounds=(W.min(), W.max()),
        method="bounded",
        options={"xatol": 1e-10},
    )
    assert curve.optimum_water_content == pytest.approx(best.x, abs=1e-7)
    assert curve.maximum_dry_density == pytest.approx(-best.fun, rel=1e-10)


def test_curve_opening_upward_is_flagged():
    rho = 1700.0 + 5000.0 * (W - 0.17) ** 2
    with pytest.warns(UserWarning, match="no peak"):
        curve = compaction.fit_compaction_curve(W, rho)
    assert not curve.peak_found and not curve.peak_within_range
    assert curve.optimum_water_content is None and curve.maximum_dry_density is None


def test_peak_outside_the_tested_range_is_flagged():
    w = np.array([0.10, 0.12, 0.14, 0.16])  # all dry of the peak at 0.20
    with pytest.warns(UserWarning, match="outside the tested water contents 0.100–0.160"):
        curve = compaction.fit_compaction_curve(w, 1800.0 - 8000.0 * (w - 0.20) ** 2)
    assert curve.peak_found and not curve.peak_within_range
    assert curve.optimum_water_content == pytest.approx(0.20, abs=1e-9)


def test_exact_fit_has_no_residual_standard_deviation():
    w = np.array([0.15, 0.17, 0.19])
    curve = compaction.fit_compaction_curve(w, 1760.0 - 9000.0 * (w - 0.17) ** 2)
    assert curve.residual_standard_deviation is None and curve.peak_within_range


@pytest.mark.parametrize(
    "w, rho, method, message",
    [
        (W[:2], RHO[:2], "quadratic", "at least 3 specimens at 3 distinct.*got 2 specimen"),
        ([0.1, 0.1, 0.2, 0.2], RHO[:4], "quadratic", "got 4 specimen.*at 2 distinct"),
        (W[:3], RHO[:3], "cubic", "at least 4 specimens"),
        (W, RHO, "spline", "method: expected one of 'quadratic', 'cubic'"),
        (W * 100, RHO, "quadratic", "not 18"),
        (W, RHO / 1000, "quadratic", "1.75 Mg/m3 is 1750"),
        (W, RHO[:5], "quadratic", "dry_density has 5"),
        (
            np.append(W[:5], np.nan),
            RHO,
            "quadratic",
            "water_content: expected a finite.*position 5",
        ),
        ([[0.1, 0.2]], [[1700, 1750]], "quadratic", "1-D"),
    ],
)
def test_compaction_curve_bad_input(w, rho, method, message):
    with pytest.raises(ValueError, match=message):
        compaction.fit_compaction_curve(w, rho, method=method)


def _table():
    """Invented specimens: two full efforts, one with two points, one without effort."""
    rows = [("standard", w, r) for w, r in zip(W, RHO, strict=True)]
    w_mod = W - 0.03
    rows += [
        ("modified", w, 1880.0 - 9500.0 * (w - 0.14) ** 2 + s)
        for w, s in zip(w_mod, SCATTER[::-1], strict=True)
    ]
    rows += [("reduced", 0.15, 1650.0), ("reduced", 0.19, 1670.0), (pd.NA, 0.17, 1700.0)]
    rows += [("standard", np.nan, 1700.0)]
    frame = pd.DataFrame(rows, columns=["effort", "water_content", "dry_density"])
    frame.insert(0, "specimen", [f"C{i:02d}" for i in range(len(frame))])
    frame["source_row"] = np.arange(len(frame)) + 2
    return frame


def test_compaction_curves_by_effort_with_stated_skips():
    table = _table()
    before = table.copy()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        curves = compaction.compaction_curves(table)
    text = " | ".join(str(w.message) for w in caught)
    assert "effort 'reduced': 2 specimen(s) at 2 distinct" in text
    assert "without an effort" in text and "row 16 (specimen 'C14')" in text
    assert "without a water content" in text and "specimen 'C15'" in text
    assert list(curves) == ["standard", "modified"]
    direct = compaction.fit_compaction_curve(W, RHO)
    np.testing.assert_allclose(curves["standard"].coefficients, direct.coefficients)
    pd.testing.assert_frame_equal(table, before)


@pytest.mark.parametrize(
    "change, message",
    [
        (lambda t: t.drop(columns="effort"), "missing column.*effort"),
        (lambda t: t.assign(dry_density=t.dry_density.where(t.index != 3)), "row 5 .*'C03'"),
        (lambda t: t.assign(water_content=t.water_content * 100), "not 18"),
        (lambda t: t.assign(dry_density="heavy"), "expected a finite number"),
    ],
)
def test_compaction_curves_bad_table(change, message):
    with pytest.raises(ValueError, match=message):
        compaction.compaction_curves(change(_table()))


def test_compaction_curves_needs_a_data_frame():
    with pytest.raises(ValueError, match="expected a pandas DataFrame"):
        compaction.compaction_curves({"effort": ["a"]})


# --- line of optimums ------------------------------------------------------------------------


def _parabola_curve(w_opt, rho_max):
    w = w_opt + np.array([-0.04, -0.02, 0.0, 0.02, 0.04])
    return compaction.fit_compaction_curve(w, rho_max - 9000.0 * (w - w_opt) ** 2)


def test_line_of_optimums_matches_linregress_through_the_peaks():
    peaks = {"low": (0.21, 1640.0), "standard": (0.18, 1730.0), "modified": (0.14, 1850.0)}
    curves = {name: _parabola_curve(*peak) for name, peak in peaks.items()}
    line = compaction.line_of_optimums(curves)
    w, rho = np.array(list(peaks.values())).T
    np.testing.assert_allclose(line.optimum_water_content, w, atol=1e-10)
    np.testing.assert_allclose(line.maximum_dry_density, rho, atol=1e-8)
    reference = stats.linregress(w, rho)  # scipy.stats.linregress as the reference
    assert line.slope == pytest.approx(reference.slope, rel=1e-8)
    assert line.intercept == pytest.approx(reference.intercept, rel=1e-8)
    assert line.fit is not None and line.fit.n == 3
    assert line.efforts == ("low", "standard", "modified") and line.message == ""
    assert line.dry_density(0.18) == pytest.approx(reference.intercept + reference.slope * 0.18)


def test_line_of_optimums_with_two_efforts_and_an_excluded_curve():
    with pytest.warns(UserWarning, match="no peak"):
        flat = compaction.fit_compaction_curve(W, 1700.0 + 4000.0 * (W - 0.17) ** 2)
    curves = {"a": _parabola_curve(0.20, 1700.0), "b": _parabola_curve(0.15, 1800.0), "c": flat}
    line = compaction.line_of_optimums(curves)
    assert line.fit is None
    assert line.slope == pytest.approx((1800.0 - 1700.0) / (0.15 - 0.20), rel=1e-8)
    assert line.intercept == pytest.approx(1700.0 - line.slope * 0.20, rel=1e-8)
    assert [name for name, _ in line.excluded] == ["c"] and "no peak" in line.excluded[0][1]


def test_line_of_optimums_with_one_effort_has_no_line():
    line = compaction.line_of_optimums({"a": _parabola_curve(0.20, 1700.0)})
    assert line.slope is None and line.intercept is None
    assert "at least two efforts" in line.message
    with pytest.raises(ValueError, match="no line of optimums: a line of optimums needs"):
        line.dry_density(0.2)


@pytest.mark.parametrize(
    "curves, message",
    [({}, "non-empty mapping"), ({"a": "curve"}, r"curves\['a'\]: expected a CompactionCurve")],
)
def test_line_of_optimums_bad_input(curves, message):
    with pytest.raises(ValueError, match=message):
        compaction.line_of_optimums(curves)


# --- acceptable zone -------------------------------------------------------------------------

# Constructed series: meeting specimens at the corners of w 0.16–0.20, ρd 1700–1800 and one
# in the middle; failing specimens outside that rectangle.
ZONE_W = np.array([0.16, 0.20, 0.20, 0.16, 0.18, 0.12, 0.24, 0.18])
ZONE_RHO = np.array([1700.0, 1700.0, 1800.0, 1800.0, 1750.0, 1650.0, 1700.0, 1850.0])
ZONE_MEETS = np.array([True, True, True, True, True, False, False, False])


def test_acceptable_zone_is_the_rectangle_of_meeting_specimens():
    zone = compaction.acceptable_zone(ZONE_W, ZONE_RHO, ZONE_MEETS)
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
    zone = compaction.acceptable_zone(w, rho, meets)
    assert zone.not_meeting_inside == ("Z8",)
    assert "1 specimen(s) that do not meet the criterion lie inside the zone" in zone.message


def test_acceptable_zone_degenerate_cases():
    point = compaction.acceptable_zone([0.18, 0.12], [1750.0, 1650.0], [True, False])
    assert point.kind == "point" and "single point" in point.message
    assert list(point.contains([0.18, 0.181], [1750.0, 1750.0])) == [True, False]

    pair = compaction.acceptable_zone([0.16, 0.20, 0.12], [1700, 1800, 1650], [True, True, False])
    assert pair.kind == "segment" and "segment, not an area" in pair.message
    assert list(pair.contains([0.18, 0.18, 0.22], [1750.0, 1760.0, 1850.0])) == [True, False, False]

    line = compaction.acceptable_zone([0.16, 0.18, 0.20], [1700, 1750, 1800], [True, True, True])
    assert line.kind == "segment"
    np.testing.assert_allclose(sorted(map(tuple, line.vertices)), [(0.16, 1700), (0.20, 1800)])

    empty = compaction.acceptable_zone([0.16, 0.20], [1700, 1800], [False, False])
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
        compaction.acceptable_zone(w, rho, np.array(meets, dtype=object) if meets else [])
