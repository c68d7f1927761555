"""Field tests judged against a zone: verdicts, distances, the line of optimums, saturation,
predicted k20, retests and the counts per lift."""

import json
from pathlib import Path
from types import SimpleNamespace

import numpy as np
import pandas as pd
import pytest
from series_files import SAMPLES

from kitchen.analysis import Criterion, acceptable_zone
from kitchen.field import (
    INSIDE,
    NO_ZONE,
    OUTSIDE,
    FieldTests,
    check_field_tests,
    read_field_tests,
)
from kitchen.workspace import Workspace

# four specimens that meet at the corners of a square, w 0.18-0.22, ρd 1650-1750
SQUARE_ZONE = acceptable_zone(
    [0.18, 0.22, 0.22, 0.18, 0.14], [1650, 1650, 1750, 1750, 1700], [True, True, True, True, False]
)


def known_analysis(**changes):
    """An analysis with a known square zone, a line of optimums ρd = 2400 − 4000·w and Gs 2.70."""
    fields = {
        "criterion": Criterion(1e-9, "maximum"),
        "acceptable_zone": SQUARE_ZONE,
        "fitted_zone": None,
        "line_of_optimums": SimpleNamespace(slope=-4000.0, intercept=2400.0),
        "specific_gravity": 2.70,
        "specimens": pd.DataFrame({"verdict": ["meets"]}),
    }
    return SimpleNamespace(**(fields | changes))


def field_tests(rows, location=("station", "offset")) -> FieldTests:
    """FieldTests from (test, date, lift, station, offset, w, ρd) rows."""
    frame = pd.DataFrame(
        rows,
        columns=["test", "date", "lift", location[0], location[1], "water_content", "dry_density"],
    )
    frame["date"] = pd.to_datetime(frame["date"])
    frame = frame.assign(
        method="nuclear gauge",
        effort=None,
        wet_density=np.nan,
        dry_density_from="measured",
        source_row=np.arange(2, len(frame) + 2),
    )
    return FieldTests(Path("field_tests.csv"), "field_tests.csv", location, frame, {})


def test_inside_outside_and_on_the_edge_of_a_known_zone():
    tests = field_tests(
        [
            ("in", "2025-06-02", "1", 0, 0, 0.20, 1700),
            ("corner", "2025-06-02", "1", 10, 0, 0.18, 1650),
            ("edge", "2025-06-02", "1", 20, 0, 0.22, 1700),
            ("dry", "2025-06-02", "1", 30, 0, 0.16, 1700),
            ("loose", "2025-06-02", "1", 40, 0, 0.20, 1600),
        ]
    )
    check = check_field_tests(tests, known_analysis())
    row = check.tests.set_index("test")
    assert row["verdict"].to_dict() == {
        "in": INSIDE,
        "corner": INSIDE,
        "edge": INSIDE,
        "dry": OUTSIDE,
        "loose": OUTSIDE,
    }
    assert row["on_edge"].to_dict() == {
        "in": False,
        "corner": True,
        "edge": True,
        "dry": False,
        "loose": False,
    }
    # by hand: "in" is 0.02 from either side in w and 50 from either side in ρd
    assert row.at["in", "water_content_distance"] == pytest.approx(-0.02)
    assert row.at["in", "dry_density_distance"] == pytest.approx(-50.0)
    # "dry" needs 0.18 − 0.16 = 0.02 more water at its ρd; "loose" 1650 − 1600 = 50 kg/m3
    assert row.at["dry", "water_content_change"] == pytest.approx(0.02)
    assert row.at["dry", "side"] == "dry of the zone"
    assert row.at["loose", "dry_density_change"] == pytest.approx(50.0)
    assert row.at["loose", "side"] == "below the zone"
    assert any("count as inside" in note for note in check.notes)


def test_line_of_optimums_and_saturation_worked_by_hand():
    tests = field_tests([("T", "2025-06-02", "1", 0, 0, 0.20, 1688.0)])
    row = check_field_tests(tests, known_analysis()).tests.iloc[0]
    # on ρd = 2400 − 4000·w, ρd = 1688 is at w = (2400 − 1688)/4000 = 0.178: 0.022 wet of it
    assert row["from_optimum_line"] == pytest.approx(0.022)
    # S = 90 % at w = 20 %, Gs = 2.70 gives ρd = 1.688 Mg/m3 (Das, from memory), so here S ≈ 0.90
    assert row["saturation"] == pytest.approx(0.90, abs=0.001)
    assert row["saturation_band"] == "between the 90 % and 100 % saturation lines"


def test_a_retest_links_to_the_test_it_replaces_and_never_overwrites_it():
    tests = field_tests(
        [
            ("A", "2025-06-02 09:00", "1", 100.0, 5.0, 0.16, 1700),  # outside, dry
            ("B", "2025-06-02 10:00", "1", 140.0, 5.0, 0.20, 1700),
            ("A-R", "2025-06-03 08:00", "1", 100.8, 4.5, 0.20, 1700),  # 0.94 m away, later
            ("C", "2025-06-04 09:00", "2", 100.0, 5.0, 0.20, 1700),  # same place, next lift
        ]
    )
    check = check_field_tests(tests, known_analysis())
    row = check.tests.set_index("test")
    assert list(check.tests["test"]) == ["A", "B", "A-R", "C"]
    assert row.at["A-R", "retest_of"] == "A" and row.at["A", "replaced_by"] == "A-R"
    assert row.at["C", "retest_of"] == "" and row.at["B", "replaced_by"] == ""
    assert row.at["A", "verdict"] == OUTSIDE and not row.at["A", "standing"]
    lift = check.lifts.set_index("lift")
    assert lift.at["1", "tests"] == 3 and lift.at["1", "inside"] == 2
    assert lift.at["1", "outside"] == "A" and lift.at["1", "standing_outside"] == ""
    assert lift.at["1", "share_inside"] == pytest.approx(2 / 3)
    assert lift.at["all lifts", "tests"] == 4 and lift.at["all lifts", "standing_inside"] == 3
    # a tighter rule for "the same location" leaves them apart
    apart = check_field_tests(tests, known_analysis(), same_location=0.5).tests
    assert (apart["retest_of"] == "").all()


def test_without_a_criterion_no_test_is_judged():
    tests = field_tests([("T", "2025-06-02", "1", 0, 0, 0.20, 1700)])
    check = check_field_tests(tests, known_analysis(criterion=None, acceptable_zone=None))
    assert check.tests["verdict"].tolist() == [NO_ZONE]
    assert "not judged" in check.summary


def test_bad_options_are_refused():
    tests = field_tests([("T", "2025-06-02", "1", 0, 0, 0.20, 1700)])
    with pytest.raises(ValueError, match="zone: expected one of drawn, fitted"):
        check_field_tests(tests, known_analysis(), zone="hull")
    with pytest.raises(ValueError, match="same_location"):
        check_field_tests(tests, known_analysis(), same_location=-1)


@pytest.fixture(scope="module")
def sample_check():
    folder = SAMPLES / "clay_liner"
    analysis = Workspace(folder).analysis()
    return check_field_tests(read_field_tests(folder), analysis, series="clay_liner"), analysis


def test_the_sample_tests_placed_off_target_are_outside_and_the_retest_is_linked(sample_check):
    check, _ = sample_check
    truth = json.loads((SAMPLES / "clay_liner" / "field_tests_truth.json").read_text())
    row = check.tests.set_index("test")
    for placed in truth["placed_off_target"]:
        assert row.at[placed["test"], "verdict"] == OUTSIDE, placed
    retest = truth["retest"]["test"]
    assert row.at[retest, "retest_of"] == truth["replaces"]
    assert row.at[truth["replaces"], "replaced_by"] == retest
    assert row.at[retest, "verdict"] == INSIDE


def test_the_sample_predictions_come_from_the_fitted_zone(sample_check):
    check, analysis = sample_check
    fitted = analysis.fitted_zone
    for _, row in check.tests.iterrows():
        centre, low, high = fitted.predict(
            row["water_content"], row["dry_density"], row["prediction_effort"]
        )
        assert row["k_predicted"] == pytest.approx(10**centre)
        assert row["k_predicted_low"] <= row["k_predicted"] <= row["k_predicted_high"]
        assert row["k_predicted_high"] == pytest.approx(10**high)


def test_judged_against_the_fitted_zone(sample_check):
    _, analysis = sample_check
    folder = SAMPLES / "clay_liner"
    check = check_field_tests(read_field_tests(folder), analysis, zone="fitted")
    inside = check.tests["inside"].to_numpy(dtype=bool)
    expected = np.asarray(
        analysis.fitted_zone.contains(check.tests["water_content"], check.tests["dry_density"]),
        dtype=bool,
    )
    # the outline is drawn through points of the boundary: it may differ from the exact test
    # only within a hair of the edge
    assert (inside == expected).mean() >= 0.95
    assert check.zone.name == "fitted zone"
