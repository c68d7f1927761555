"""The series analysis in one call, on constructed results and on the sample clay series.

Fits are compared with numpy and scipy on the same points; the sample series is compared
with the ground truth its generator wrote (sample_data/clay_liner/truth.json).
"""

import json

import numpy as np
import pytest
from analysis_results import results_frame
from scipy import stats
from series_files import SAMPLES

from kitchen.analysis import (
    DOES_NOT_MEET,
    MEETS,
    NO_CRITERION,
    NO_CRITERION_NOTE,
    NOT_CONCLUSIVE,
    NOT_JUDGED,
    VERDICTS,
    VERDICTS_WITHOUT_CRITERION,
    Criterion,
    analyse_series,
)
from kitchen.io import load_series
from kitchen.reduction import series_results


def compaction_rows():
    """Two efforts on exact parabolas: A peaks at w = 0.17, 1800 kg/m3; B at 0.19, 1700."""
    rows = []
    for effort, (w_opt, rho_max, log_k_opt) in {
        "A": (0.17, 1800.0, -9.0),
        "B": (0.19, 1700.0, -8.6),
    }.items():
        for i, w in enumerate(np.linspace(w_opt - 0.03, w_opt + 0.03, 5)):
            rows.append(
                dict(
                    specimen=f"{effort}{i}",
                    effort=effort,
                    water_content=w,
                    dry_density=rho_max - 20000.0 * (w - w_opt) ** 2,
                    k_reference=10.0 ** (log_k_opt - 40.0 * (w - w_opt)),
                )
            )
    return rows


@pytest.fixture(scope="module")
def constructed():
    return analyse_series(results_frame(compaction_rows()), 1e-9)


def test_compaction_curves_match_numpy(constructed):
    frame = results_frame(compaction_rows())
    for effort, (w_opt, rho_max) in {"A": (0.17, 1800.0), "B": (0.19, 1700.0)}.items():
        rows = frame[frame["effort"] == effort]
        a, b, _ = np.polyfit(rows["water_content"], rows["dry_density"], 2)  # numpy reference
        curve = constructed.compaction_curves[effort]
        assert curve.optimum_water_content == pytest.approx(-b / (2 * a), rel=1e-9)
        assert curve.optimum_water_content == pytest.approx(w_opt, rel=1e-9)
        assert curve.maximum_dry_density == pytest.approx(rho_max, rel=1e-9)
    line = constructed.line_of_optimums
    assert line.slope == pytest.approx((1700.0 - 1800.0) / (0.19 - 0.17), rel=1e-9)


def test_water_content_from_optimum(constructed):
    rows = constructed.specimens
    expected = rows["water_content"] - rows["effort"].map({"A": 0.17, "B": 0.19})
    np.testing.assert_allclose(rows["water_content_from_optimum"], expected, atol=1e-12)
    # log10 k = log_k_opt - 40 (w - w_opt) within each effort: pooled, the slope is -40.
    assert constructed.water_content_trend.fit.slope == pytest.approx(-40.0, rel=1e-9)


def test_void_ratio_trend_matches_scipy(constructed):
    rows = constructed.specimens
    reference = stats.linregress(rows["void_ratio"], np.log10(rows["k"]))
    fit = constructed.void_ratio_trend.fit
    assert fit.slope == pytest.approx(reference.slope, rel=1e-9)
    assert fit.intercept == pytest.approx(reference.intercept, rel=1e-9)
    half = stats.t.ppf(0.975, len(rows) - 2) * reference.stderr
    assert fit.slope_low == pytest.approx(reference.slope - half, rel=1e-9)
    assert constructed.void_ratio_trend.change_index == pytest.approx(1 / reference.slope)


def test_dry_density_trend_matches_scipy(constructed):
    rows = constructed.specimens
    reference = stats.linregress(rows["dry_density"], np.log10(rows["k"]))
    assert constructed.dry_density_trend.fit.slope == pytest.approx(reference.slope, rel=1e-9)
    assert constructed.dry_density_trend.fit.r_squared == pytest.approx(reference.rvalue**2)


def test_geometric_mean_matches_scipy(constructed):
    k = constructed.specimens["k"]
    assert constructed.geometric_mean.geometric_mean == pytest.approx(stats.gmean(k), rel=1e-12)


def test_verdicts_from_intervals():
    rows = [
        dict(
            specimen="below",
            water_content=0.2,
            dry_density=1700,
            k_reference=5e-10,
            k_reference_low=4e-10,
            k_reference_high=6e-10,
        ),
        dict(
            specimen="above",
            water_content=0.2,
            dry_density=1700,
            k_reference=3e-9,
            k_reference_low=2e-9,
            k_reference_high=4e-9,
        ),
        dict(
            specimen="straddles",
            water_content=0.2,
            dry_density=1700,
            k_reference=9e-10,
            k_reference_low=8e-10,
            k_reference_high=1.2e-9,
        ),
        dict(
            specimen="no interval",
            water_content=0.2,
            dry_density=1700,
            k_reference=5e-10,
            k_reference_low=np.nan,
            k_reference_high=np.nan,
        ),
        dict(
            specimen="on the line",
            water_content=0.2,
            dry_density=1700,
            k_reference=9e-10,
            k_reference_low=8e-10,
            k_reference_high=1e-9,
        ),
    ]
    analysis = analyse_series(results_frame(rows), 1e-9)
    verdict = dict(zip(analysis.specimens["specimen"], analysis.specimens["verdict"], strict=True))
    assert verdict == {
        "below": MEETS,
        "above": DOES_NOT_MEET,
        "straddles": NOT_CONCLUSIVE,
        "no interval": NOT_CONCLUSIVE,
        "on the line": MEETS,
    }
    # a test not valid is counted apart, so its verdict is counted even when there is none
    assert analysis.counts == {MEETS: 2, DOES_NOT_MEET: 1, NOT_CONCLUSIVE: 2, NOT_JUDGED: 0}
    assert list(analysis.counts) == list(VERDICTS)
    assert any("no interval" in note and "not conclusive" in note for note in analysis.notes)


def test_a_test_not_valid_is_not_judged_nor_fitted_unless_kept_on_record():
    # B2 is moved off every trend (k 1000 times higher, ρd 40 kg/m3 lower) and fails a check
    rows = compaction_rows()
    rows[7] = dict(rows[7], k_reference=rows[7]["k_reference"] * 1e3, dry_density=1650.0)
    frame = results_frame(rows)
    frame["valid"] = [specimen != "B2" for specimen in frame["specimen"]]
    analysis = analyse_series(frame, 1e-9)
    others = analyse_series(frame[frame["specimen"] != "B2"], 1e-9)
    row = analysis.specimens.set_index("specimen").loc["B2"]
    assert row["verdict"] == NOT_JUDGED and not row["judged"] and not row["meets"]
    assert analysis.counts[NOT_JUDGED] == 1 and sum(analysis.counts.values()) == 10
    assert any("B2: its falling head test is not valid" in note for note in analysis.notes)
    # the fits are those of the nine other specimens, to the last digit
    assert analysis.void_ratio_trend.fit.slope == others.void_ratio_trend.fit.slope
    assert analysis.dry_density_trend.fit.slope == others.dry_density_trend.fit.slope
    assert analysis.water_content_trend.fit.slope == others.water_content_trend.fit.slope
    assert analysis.geometric_mean.geometric_mean == others.geometric_mean.geometric_mean
    curve, alone = analysis.compaction_curves["B"], others.compaction_curves["B"]
    assert curve.optimum_water_content == alone.optimum_water_content
    assert analysis.acceptable_zone.n_meeting == others.acceptable_zone.n_meeting
    # kept on record with a reason, it is judged and fitted like any other
    kept = analyse_series(frame, 1e-9, kept={("B2", "falling_head"): "kept by C. D.: why"})
    every = analyse_series(frame.assign(valid=True), 1e-9)
    row = kept.specimens.set_index("specimen").loc["B2"]
    assert row["judged"] and row["verdict"] == DOES_NOT_MEET
    assert row["kept_on_record"] == "kept by C. D.: why"
    assert kept.void_ratio_trend.fit.slope == every.void_ratio_trend.fit.slope
    assert kept.geometric_mean.geometric_mean == every.geometric_mean.geometric_mean
    assert kept.counts[NOT_JUDGED] == 0
    assert any("kept on record (kept by C. D.: why)" in note for note in kept.notes)


def test_acceptable_zone_membership():
    # Four specimens that meet at the corners of a rectangle, one that does not among them
    # (inside their hull), one that does not outside it. The zone keeps the one among them
    # out (it used to be the hull of all four, holding it): of the two triangles of three
    # corners that leave it out, equal in area, one is drawn.
    corners = [(0.18, 1600), (0.22, 1600), (0.22, 1700), (0.18, 1700)]
    rows = [
        dict(specimen=f"M{i}", water_content=w, dry_density=r, k_reference=2e-10)
        for i, (w, r) in enumerate(corners)
    ]
    rows.append(dict(specimen="inside", water_content=0.21, dry_density=1660, k_reference=5e-9))
    rows.append(dict(specimen="outside", water_content=0.15, dry_density=1650, k_reference=5e-9))
    analysis = analyse_series(results_frame(rows), 1e-9)
    inside = dict(zip(analysis.specimens["specimen"], analysis.specimens["in_zone"], strict=True))
    zone = analysis.acceptable_zone
    assert zone.kind == "polygon" and zone.n_meeting == 4 and zone.n_not_meeting == 2
    assert zone.blocking == ("inside",) and zone.left_out in (("M1",), ("M2",))
    assert inside == {f"M{i}": f"M{i}" not in zone.left_out for i in range(4)} | {
        "inside": False,
        "outside": False,
    }
    assert any(
        note.startswith("acceptable zone: inside, which does not meet, lies among")
        for note in analysis.notes
    )
    assert "no specimen has a compactive effort: no compaction curves" in analysis.notes


def test_saturation_line_check_value():
    # Das; Holtz & Kovacs (book, from memory): ZAV at w = 20 %, Gs = 2.70 ->
    # 1.753 Mg/m3; S = 90 % -> 1.688 Mg/m3.
    analysis = analyse_series(results_frame(compaction_rows()), 1e-9)
    assert analysis.specific_gravity == 2.70
    assert analysis.saturation_line(0.20, 1.0) == pytest.approx(1753, abs=0.5)
    assert analysis.saturation_line(0.20, 0.9) == pytest.approx(1688, abs=0.5)


def test_bad_input_is_named():
    frame = results_frame(compaction_rows())
    with pytest.raises(ValueError, match="missing column.*k_reference_high"):
        analyse_series(frame.drop(columns=["k_reference_high"]), 1e-9)
    with pytest.raises(ValueError, match="criterion: expected a positive conductivity"):
        analyse_series(frame, 0.0)
    with pytest.raises(ValueError, match="criterion: expected a conductivity in m/s"):
        analyse_series(frame, "tight")
    with pytest.raises(ValueError, match="no rows"):
        analyse_series(frame.iloc[:0], 1e-9)


def test_sample_clay_verdicts_follow_the_generated_truth():
    truth = json.loads((SAMPLES / "clay_liner" / "truth.json").read_text())
    analysis = analyse_series(series_results(load_series(SAMPLES / "clay_liner")), 1e-9)
    # Every generated k20 lies at least 35 % from the criterion, beyond the intervals. The
    # one specimen generated to drift (QF-04, "a check for a trend of k with time should
    # fail this specimen", sample_data/README.md) fails its trend check, so it is not judged.
    for _, row in analysis.specimens.iterrows():
        model = truth["specimens"][row["specimen"]]
        expected = MEETS if model["k20_m_per_s"] <= 1e-9 else DOES_NOT_MEET
        if model["behaviour"] == "drift":
            expected = NOT_JUDGED
        assert row["verdict"] == expected, row["specimen"]
    assert analysis.counts == {MEETS: 7, DOES_NOT_MEET: 6, NOT_CONCLUSIVE: 0, NOT_JUDGED: 1}
    assert analysis.acceptable_zone.kind == "polygon"
    for effort, model in truth["model"]["compaction"].items():
        curve = analysis.compaction_curves[effort]
        # The generator's curve is asymmetric and scattered (sd 6 kg/m3): the quadratic
        # peak is near, not on, the model's optimum.
        assert curve.optimum_water_content == pytest.approx(model["optimum"], abs=0.006)
        assert curve.maximum_dry_density == pytest.approx(model["max_dry_density"], abs=10)


def test_sample_sand_has_no_compaction_plane_but_predictions():
    analysis = analyse_series(series_results(load_series(SAMPLES / "drainage_sand")), 1e-9)
    assert analysis.acceptable_zone is None and not analysis.compaction_curves
    assert "no specimen has a molding water content: no compaction plane" in analysis.notes
    assert len(analysis.grading) == 4
    e_ref, k_ref = analysis.kozeny_carman_reference
    assert analysis.kozeny_carman_conductivity(e_ref) == pytest.approx(k_ref)
    # the curve says over which void ratios it is drawn, and where the ratio holds
    e = analysis.specimens["void_ratio"]
    [note] = [n for n in analysis.notes if n.startswith("Kozeny–Carman curve")]
    assert f"over e = {e.min():.3g} to {e.max():.3g}" in note and "not for clays" in note
    assert k_ref == pytest.approx(stats.gmean(analysis.specimens["k"]), rel=1e-12)


def test_sample_sand_against_the_smallest_k_a_drainage_layer_requires():
    # the invented drainage sand was generated with k20 of 1.5e-4 to 3.5e-3 m/s (truth.json):
    # every specimen meets a smallest k of 1e-4 m/s, none a liner's largest of 1e-9 m/s
    results = series_results(load_series(SAMPLES / "drainage_sand"))
    truth = json.loads((SAMPLES / "drainage_sand" / "truth.json").read_text())
    drainage = analyse_series(results, Criterion(1e-4, "minimum"))
    assert drainage.criterion.kind == "minimum"
    for _, row in drainage.specimens.iterrows():
        k_true = truth["specimens"][row["specimen"]]["k20_m_per_s"]
        assert row["verdict"] == (MEETS if k_true >= 1e-4 else DOES_NOT_MEET), row["specimen"]
    assert drainage.counts[MEETS] == 4
    assert analyse_series(results, 1e-9).counts[DOES_NOT_MEET] == 4


def test_without_a_criterion_no_verdict_is_drawn_and_the_fits_stand():
    # no limit is assumed: each valid specimen is "no criterion given", the one not valid is
    # still not judged, there is no zone, drawn or fitted, and the note says how to give one;
    # the compaction curves, the trends and the geometric mean are those drawn with one
    frame = results_frame(compaction_rows())
    frame["valid"] = [specimen != "B2" for specimen in frame["specimen"]]
    bare, judged = analyse_series(frame), analyse_series(frame, 1e-9)
    assert bare.criterion is None and bare.verdicts == VERDICTS_WITHOUT_CRITERION
    verdicts = bare.specimens.set_index("specimen")["verdict"]
    assert verdicts["B2"] == NOT_JUDGED and set(verdicts.drop("B2")) == {NO_CRITERION}
    assert not bare.specimens["meets"].any() and not bare.specimens["in_zone"].any()
    assert bare.counts == {NO_CRITERION: 9, NOT_JUDGED: 1}
    assert bare.acceptable_zone is None and bare.fitted_zone is None
    assert not bare.zone_drawn and bare.zone_membership().isna().all()
    assert judged.zone_drawn and judged.zone_membership().notna().all()
    assert bare.notes[0] == NO_CRITERION_NOTE and NO_CRITERION_NOTE not in judged.notes
    assert NO_CRITERION_NOTE.startswith("no criterion given: no verdicts and no acceptable zone")
    assert bare.void_ratio_trend.fit.slope == judged.void_ratio_trend.fit.slope
    assert bare.water_content_trend.fit.slope == judged.water_content_trend.fit.slope
    assert bare.geometric_mean.geometric_mean == judged.geometric_mean.geometric_mean
    for effort, curve in judged.compaction_curves.items():
        optimum = bare.compaction_curves[effort].optimum_water_content
        assert optimum == curve.optimum_water_content
    assert list(judged.counts) == list(VERDICTS)  # with a criterion, the four as before


def test_a_missing_interval_is_not_called_not_conclusive_without_a_criterion():
    rows = [
        dict(specimen="A", water_content=0.18, dry_density=1700.0, k_reference=1e-9),
        dict(specimen="B", water_content=0.20, dry_density=1680.0, k_reference=2e-9),
    ]
    frame = results_frame(rows)
    frame.loc[1, ["k_reference_low", "k_reference_high"]] = np.nan
    analysis = analyse_series(frame)
    assert list(analysis.specimens["verdict"]) == [NO_CRITERION, NO_CRITERION]
    assert not any("not conclusive" in note for note in analysis.notes)
