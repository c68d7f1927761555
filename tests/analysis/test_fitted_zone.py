"""Tests for kitchen.analysis.fitted_zone: log10 k20 fitted over the compaction plane.

The fit is checked against numpy's least squares on the uncentred design and the textbook
formulas written out here (Montgomery & Runger, Applied Statistics and Probability for
Engineers, multiple regression chapter, from memory); the zone against the prediction
bound evaluated point by point.
"""

import numpy as np
import pandas as pd
import pytest
from scipy import stats
from scipy.spatial import ConvexHull
from series_files import SAMPLES

from kitchen.analysis import (
    ANALYSIS_METHODS,
    FITTED_ZONE_ASSUMPTIONS,
    Criterion,
    analyse_series,
    fit_zone,
)
from kitchen.io import load_series
from kitchen.reduction import series_results

RNG = np.random.default_rng(7)


def plane_series(efforts=("standard",), per_effort=8, sigma=0.15, seed=7):
    """States spread over w 14–24 %, ρd 1620–1800 kg/m3, log10 k on a known plane."""
    rng = np.random.default_rng(seed)
    w, rho, effort = [], [], []
    for i, name in enumerate(efforts):
        w.append(rng.uniform(0.14, 0.24, per_effort))
        rho.append(rng.uniform(1620.0, 1800.0, per_effort) + 30.0 * i)
        effort += [name] * per_effort
    w, rho = np.concatenate(w), np.concatenate(rho)
    offsets = {name: 0.25 * i for i, name in enumerate(efforts)}
    log_k = (
        -9.0
        - 30.0 * (w - 0.19)
        - 0.004 * (rho - 1700.0)
        + np.array([offsets[e] for e in effort])
        + rng.normal(0.0, sigma, w.size)
    )
    return w, rho, 10.0**log_k, np.array(effort, dtype=object)


def design(w, rho, effort, efforts):
    columns = [np.ones_like(w), w, rho] + [(effort == e).astype(float) for e in efforts[1:]]
    return np.column_stack(columns)


# --- the fit ------------------------------------------------------------------------------


@pytest.mark.parametrize("efforts", [("standard",), ("standard", "modified", "reduced")])
def test_fit_matches_least_squares_on_the_uncentred_design(efforts):
    w, rho, k, effort = plane_series(efforts)
    zone = fit_zone(w, rho, k, 1e-9, effort)
    assert zone.efforts == (efforts if len(efforts) > 1 else ())
    x = design(w, rho, effort, efforts)
    y = np.log10(k)
    beta, *_ = np.linalg.lstsq(x, y, rcond=None)  # numpy reference
    n, p = x.shape
    residuals = y - x @ beta
    s = np.sqrt(residuals @ residuals / (n - p))
    cov = s**2 * np.linalg.inv(x.T @ x)
    t = stats.t.ppf(0.975, n - p)
    assert zone.n == n and zone.degrees_of_freedom == n - p
    assert zone.residual_standard_deviation == pytest.approx(s, rel=1e-10)
    assert zone.r_squared == pytest.approx(
        1 - residuals @ residuals / np.sum((y - y.mean()) ** 2), rel=1e-10
    )
    named = {par.name: par for par in zone.parameters}
    for name, j in (("slope on water content", 1), ("slope on dry density", 2)):
        par = named[name]
        assert par.estimate == pytest.approx(beta[j], rel=1e-9)
        half = t * np.sqrt(cov[j, j])
        assert (par.low, par.high) == pytest.approx((beta[j] - half, beta[j] + half), rel=1e-9)
    for j, other in enumerate(efforts[1:], start=3):
        par = named[f"offset of {other} from {efforts[0]}"]
        assert par.estimate == pytest.approx(beta[j], rel=1e-9)
        assert par.high - par.estimate == pytest.approx(t * np.sqrt(cov[j, j]), rel=1e-9)
    mean_state = next(par for par in zone.parameters if par.name.startswith("log10 k20 at"))
    x_mean = design(np.array([w.mean()]), np.array([rho.mean()]), np.array([efforts[0]]), efforts)
    assert mean_state.estimate == pytest.approx((x_mean @ beta)[0], rel=1e-12)
    # a new specimen's interval: ŷ0 ± t·s·√(1 + x0ᵀ(XᵀX)⁻¹x0)
    probe_w, probe_rho = np.array([0.15, 0.19, 0.23]), np.array([1650.0, 1720.0, 1790.0])
    for name in efforts:
        x0 = design(probe_w, probe_rho, np.array([name] * 3, dtype=object), efforts)
        centre = x0 @ beta
        half = t * s * np.sqrt(1 + np.einsum("ij,jk,ik->i", x0, np.linalg.inv(x.T @ x), x0))
        got = zone.predict(probe_w, probe_rho, name if zone.efforts else None)
        np.testing.assert_allclose(got, (centre, centre - half, centre + half), rtol=1e-10)
    assert zone.assumptions == FITTED_ZONE_ASSUMPTIONS and "tool's own" in zone.method


def inside_hull(w, rho, probe_w, probe_rho):
    """Whether each probe lies in the convex hull of the states (w, ρd), by scipy's facets."""
    scale = np.array([np.ptp(w), np.ptp(rho)])
    hull = ConvexHull(np.column_stack([w, rho]) / scale)
    probes = np.column_stack([probe_w, probe_rho]) / scale
    return (probes @ hull.equations[:, :2].T + hull.equations[:, 2] <= 0).all(axis=1)


def test_each_effort_zone_is_where_its_upper_bound_meets_the_criterion():
    w, rho, k, effort = plane_series(("standard", "modified"), per_effort=7)
    zone = fit_zone(w, rho, k, 1e-9, effort)
    limit = np.log10(1e-9)
    # states spread over the bounding box: in an effort's zone exactly where inside the hull
    # of that effort's states and the upper end of its interval is at or below the criterion
    probe_w = RNG.uniform(w.min(), w.max(), 4000)
    probe_rho = RNG.uniform(rho.min(), rho.max(), 4000)
    box = np.ptp(w) * np.ptp(rho)
    anywhere = np.zeros(probe_w.size, dtype=bool)
    for name, part in zip(zone.efforts, zone.zones, strict=True):
        assert part.effort == name
        mine = effort == name
        high = zone.predict(probe_w, probe_rho, name)[2]
        expected = inside_hull(w[mine], rho[mine], probe_w, probe_rho) & (high <= limit)
        np.testing.assert_array_equal(zone.contains(probe_w, probe_rho, name), expected)
        anywhere |= expected
        # the polygon drawn follows the zone: its corners are in it or on its edge, and its
        # area is the zone's (Monte Carlo over the box, to its sampling error)
        for cw, crho in part.region:
            assert zone.predict(cw, crho, name)[2] <= limit + 1e-6
        x, y = part.region.T
        area = 0.5 * abs(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))
        assert area / box == pytest.approx(expected.mean(), abs=0.02)
        x, y = part.extent.T
        assert part.share == pytest.approx(
            area / (0.5 * abs(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))), rel=1e-12
        )
    assert 0.1 < anywhere.mean() < 0.6  # the case has a boundary across the data
    np.testing.assert_array_equal(zone.contains(probe_w, probe_rho), anywhere)
    assert "standard: the upper end of the 95 % prediction interval meets" in zone.message
    assert "% of its tested states" in zone.message


def test_criterion_line_and_the_next_specimen():
    w, rho, k, _ = plane_series(per_effort=10, sigma=0.1, seed=3)
    zone = fit_zone(w, rho, k, 1e-9)
    (part,) = zone.zones
    assert part.effort is None
    ends = part.criterion_line
    prediction = zone.predict(ends[:, 0], ends[:, 1])[0]
    np.testing.assert_allclose(prediction, np.log10(1e-9), atol=1e-9)
    spot = zone.next_specimen
    upper = zone.predict(spot.water_content, spot.dry_density)[2]
    assert upper == pytest.approx(np.log10(1e-9), abs=1e-6)  # on the boundary
    # the largest prediction variance of the boundary's points inside the data
    on_curve = [
        (cw, crho)
        for cw, crho in part.region
        if abs(zone.predict(cw, crho)[2] - np.log10(1e-9)) < 1e-6
    ]
    assert len(on_curve) > 20
    halves = []
    for cw, crho in on_curve:
        centre, _, high = zone.predict(cw, crho)
        halves.append(high - centre)
    centre, low, high = zone.predict(spot.water_content, spot.dry_density)
    assert high - centre >= max(halves) - 1e-9
    t = stats.t.ppf(0.975, zone.degrees_of_freedom)
    assert spot.prediction_standard_error == pytest.approx((high - centre) / t, rel=1e-9)
    assert "narrows the prediction interval most" in spot.reason
    assert "one more specimen near w = " in zone.summary


def test_against_a_smallest_k_required():
    w, rho, k, _ = plane_series(per_effort=10, sigma=0.1, seed=4)
    criterion = Criterion(10**-9.0, "minimum")
    zone = fit_zone(w, rho, k, criterion)
    probe_w = RNG.uniform(w.min(), w.max(), 2000)
    probe_rho = RNG.uniform(rho.min(), rho.max(), 2000)
    inside = zone.contains(probe_w, probe_rho)
    low = zone.predict(probe_w, probe_rho)[1]
    assert inside.any() and (low[inside] >= -9.0).all()
    assert "lower end" in zone.message and "a smallest k required" in zone.message


def test_whole_extent_and_no_zone():
    w, rho, k, _ = plane_series(per_effort=10, sigma=0.1, seed=5)
    whole = fit_zone(w, rho, k, 1e-6)  # every prediction far below
    assert whole.next_specimen is None
    assert "over the whole of the hull of the tested states" in whole.message
    assert whole.contains(whole.extent[:, 0], whole.extent[:, 1]).all()
    none = fit_zone(w, rho, k, 1e-12)  # every prediction far above
    assert none.zones[0].region.shape == (0, 2) and none.zones[0].criterion_line is None
    assert none.next_specimen is None and "nowhere in the hull of the tested states" in none.message
    # just out of reach: the line where the prediction equals the criterion crosses the
    # data, the bound nowhere meets it; the next specimen is on that line
    centre = none.predict(w, rho)[0]
    near = fit_zone(w, rho, k, 10 ** (centre.min() + 0.01))
    assert near.zones[0].region.shape == (0, 2) and near.zones[0].criterion_line is not None
    assert "there is no zone there yet" in near.next_specimen.reason


def test_effort_is_a_factor_only_with_enough_specimens_of_each():
    w, rho, k, effort = plane_series(("standard", "modified"), per_effort=6)
    effort = effort.copy()
    effort[:4] = "modified"  # standard keeps 2 specimens
    zone = fit_zone(w, rho, k, 1e-9, effort)
    assert zone.efforts == () and "standard has fewer than 3 specimens" in zone.message
    missing = np.where(np.arange(w.size) == 0, None, plane_series(("a", "b"), 6)[3])
    assert "some specimens have no effort" in fit_zone(w, rho, k, 1e-9, missing).message
    with pytest.raises(ValueError, match="the fit has no effort factor"):
        zone.predict(0.2, 1700.0, "standard")
    w, rho, k, effort = plane_series(("standard", "modified"), per_effort=6)
    both = fit_zone(w, rho, k, 1e-9, effort)
    with pytest.raises(ValueError, match="expected one of standard, modified"):
        both.predict(0.2, 1700.0)


def test_too_few_specimens_are_refused_with_the_reason():
    w, rho, k, _ = plane_series(per_effort=5)
    with pytest.raises(ValueError, match="5 specimen.*needs at least 6.*3 degrees of freedom"):
        fit_zone(w, rho, k, 1e-9)
    line_w = np.linspace(0.15, 0.22, 8)
    with pytest.raises(ValueError, match="lie on one line"):
        fit_zone(line_w, 1500 + 1000 * line_w, np.full(8, 1e-9), 1e-9)


@pytest.mark.parametrize(
    "w, rho, k, message",
    [
        ([0.1, np.nan], [1700, 1750], [1e-9, 1e-9], "water_content: expected a finite.*position 1"),
        ([0.1, 0.2], [1700, 1750], [1e-9, -1e-9], "conductivity: expected a positive"),
        ([0.1, 0.2], [1700, 1750, 1800], [1e-9, 1e-9], "dry_density has 3"),
    ],
)
def test_bad_input_is_named(w, rho, k, message):
    with pytest.raises(ValueError, match=message):
        fit_zone(w, rho, k, 1e-9)


def test_series_input_and_confidence():
    w, rho, k, _ = plane_series(per_effort=9)
    index = [f"S{i}" for i in range(w.size)]
    zone = fit_zone(pd.Series(w, index), pd.Series(rho, index), pd.Series(k, index), 1e-9)
    inside = zone.contains(pd.Series(w, index), pd.Series(rho, index))
    assert isinstance(inside, pd.Series) and list(inside.index) == index
    wider = fit_zone(w, rho, k, 1e-9, confidence=0.99)
    assert wider.t_value > zone.t_value
    with pytest.raises(ValueError, match="confidence"):
        fit_zone(w, rho, k, 1e-9, confidence=95)


# --- in the series analysis -------------------------------------------------------------------


def test_the_series_analysis_fits_the_judged_specimens_and_says_so():
    results = series_results(load_series(SAMPLES / "clay_liner"))
    analysis = analyse_series(results, 1e-9)
    rows = analysis.specimens
    judged = rows[rows["judged"] & rows["on_compaction_plane"]]
    assert len(judged) < len(rows)  # the sample holds a test that is not valid (QF-04)
    fitted = analysis.fitted_zone
    assert fitted.n == len(judged) and fitted.efforts == ("standard", "modified", "reduced")
    reference = fit_zone(
        judged["water_content"], judged["dry_density"], judged["k"], 1e-9, judged["effort"]
    )
    assert fitted.residual_standard_deviation == reference.residual_standard_deviation
    assert fitted.summary in analysis.notes
    assert fitted.summary.startswith("fitted zone (the tool's own construction): n = 13")
    step = next(row for row in ANALYSIS_METHODS if row[0] == "fitted zone")
    assert FITTED_ZONE_ASSUMPTIONS in step[1] and "tool's own construction" in step[2]


def test_the_series_analysis_says_why_there_is_no_fitted_zone():
    results = series_results(load_series(SAMPLES / "clay_liner")).iloc[:5]
    analysis = analyse_series(results, 1e-9)
    assert analysis.fitted_zone is None
    assert any(
        note.startswith("fitted zone: ") and "needs at least" in note for note in analysis.notes
    )
