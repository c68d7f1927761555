"""Tests for kitchen.analysis.compaction: compaction curves, the line of optimums, and the names it offers.

The saturation lines are tested in tests/analysis/test_saturation_lines.py, the acceptable
zone in tests/analysis/test_compaction_zone.py.
"""

import warnings

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

from kitchen.analysis import compaction

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
