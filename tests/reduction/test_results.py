"""The results table on the invented sample series, against the generators' ground truth."""

import json

import numpy as np
import pytest
from series_files import FALLING, SAMPLES, write_series

from kitchen.io import load_series
from kitchen.reduction import results_table, series_results
from kitchen.settings import Settings, reference_label
from kitchen.workspace import Workspace


def _truth(name):
    return json.loads((SAMPLES / name / "truth.json").read_text())


@pytest.fixture(scope="module")
def clay():
    return series_results(load_series(SAMPLES / "clay_liner"))


@pytest.fixture(scope="module")
def sand():
    return series_results(load_series(SAMPLES / "drainage_sand"))


def test_clay_recovers_generated_k20(clay):
    # Ground truth: sample_data/clay_liner/truth.json, written by the generator, which
    # does not import this package. Steady records are fitted over all readings.
    truth = _truth("clay_liner")["specimens"]
    for specimen, facts in truth.items():
        row = clay[clay["specimen"] == specimen].iloc[0]
        if facts["behaviour"] == "steady":
            assert row["k_reference"] == pytest.approx(facts["k20_m_per_s"], rel=0.03), specimen


def test_clay_state_matches_generator(clay):
    truth = _truth("clay_liner")["specimens"]
    for specimen, facts in truth.items():
        row = clay[clay["specimen"] == specimen].iloc[0]
        assert row["dry_density"] == pytest.approx(facts["dry_density_kg_per_m3"], rel=2e-3)
        assert row["void_ratio"] == pytest.approx(facts["void_ratio"], abs=5e-3)
        assert row["saturation"] == pytest.approx(facts["saturation"], abs=5e-3)


def test_sand_recovers_generated_k20(sand):
    truth = _truth("drainage_sand")["specimens"]
    for specimen, facts in truth.items():
        row = sand[sand["specimen"] == specimen].iloc[0]
        assert row["method"] == "constant_head"
        assert row["k_reference"] == pytest.approx(facts["k20_m_per_s"], rel=0.03), specimen


def test_workbook_gives_the_same_results(sand):
    from_book = series_results(load_series(SAMPLES / "drainage_sand.xlsx"))
    np.testing.assert_allclose(from_book["k_reference"], sand["k_reference"], rtol=1e-12)


def test_no_unexplained_nan(clay, sand):
    for frame in (clay, sand):
        numeric = frame.select_dtypes("number")
        for index, row in numeric.iterrows():
            gaps = [c for c in numeric.columns if np.isnan(row[c]) and c != "d10"]
            if gaps:
                assert frame.loc[index, "checks"], (frame.loc[index, "specimen"], gaps)


def test_interval_brackets_k(clay):
    assert (clay["k_reference_low"] <= clay["k_reference"]).all()
    assert (clay["k_reference"] <= clay["k_reference_high"]).all()


def test_reference_temperature_is_a_setting():
    series = load_series(SAMPLES / "drainage_sand")
    at_20 = series_results(series)
    at_10 = series_results(series, Settings(reference_temperature=10.0))
    # Water is more viscous at 10 degC: k10 < k20, by about the viscosity ratio 0.77.
    ratio = at_10["k_reference"] / at_20["k_reference"]
    assert ratio.between(0.76, 0.78).all()
    table = results_table(at_10, Settings(reference_temperature=10.0))
    assert "k10 [m/s]" in table.columns and "k10_low [m/s]" in table.columns
    assert reference_label(Settings(reference_temperature=27.0)) == "k27"


def test_results_table_columns(clay):
    table = results_table(clay)
    for column in [
        "specimen",
        "method",
        "dry_density [Mg/m3]",
        "void_ratio",
        "porosity",
        "saturation [%]",
        "gradient",
        "temperature [degC]",
        "k [m/s]",
        "k20 [m/s]",
        "k20_low [m/s]",
        "k20_high [m/s]",
        "valid",
        "checks",
    ]:
        assert column in table.columns
    assert table["dry_density [Mg/m3]"].between(1.4, 2.1).all()


def test_settings_refuse_unknown_viscosity():
    with pytest.raises(ValueError, match="unknown viscosity method 'magic'"):
        Settings(viscosity="magic")


def test_settings_defaults_are_the_standard_and_frozen():
    import dataclasses

    from kitchen.uncertainty import Resolutions
    from kitchen.validity import Criteria

    settings = Settings()
    # ASTM D5084 termination criteria (from memory): 4 values, +-25 %, +-50 % below 1e-10.
    assert (settings.criteria.steady_count, settings.criteria.steady_tolerance) == (4, 0.25)
    assert (settings.criteria.low_k_tolerance, settings.criteria.low_k_threshold) == (0.5, 1e-10)
    assert (settings.criteria.flow_ratio_low, settings.criteria.flow_ratio_high) == (0.75, 1.25)
    assert settings.resolutions == Resolutions()
    assert settings.uncertainty_method == "first_order" and settings.capillary_rise == "off"
    with pytest.raises(dataclasses.FrozenInstanceError):
        settings.viscosity = "iapws"
    project = settings.with_changes(criteria=Criteria(steady_tolerance=0.10))
    assert project.criteria.steady_tolerance == 0.10 and settings.criteria.steady_tolerance == 0.25


@pytest.mark.parametrize(
    ("changes", "message"),
    [
        ({"uncertainty_method": "bootstrap"}, "unknown uncertainty method 'bootstrap'"),
        ({"falling_head_fit": "cubic"}, "unknown falling head fit 'cubic'"),
        ({"capillary_rise": "on"}, "unknown capillary rise 'on'; choose one of off, jurin"),
        ({"monte_carlo_trials": 10}, "monte_carlo_trials must be a whole number of at least 1000"),
        (
            {"criteria": {"steady_count": 4}},
            "criteria must be a kitchen.validity.criteria.Criteria",
        ),
    ],
)
def test_bad_settings_are_named(changes, message):
    with pytest.raises(ValueError, match=message):
        Settings(**changes)


def test_clay_validity_follows_the_generated_behaviour(clay):
    # sample_data/README.md: QF-04 drifts and must fail the trend check; QF-02 and QF-07 have
    # an early transient the proposed window leaves out; every other record is steady.
    valid = dict(zip(clay["specimen"], clay["valid"], strict=True))
    assert [s for s, v in valid.items() if not v] == ["QF-04"]
    qf04 = clay[clay["specimen"] == "QF-04"].iloc[0]
    assert any(
        c.startswith("no significant trend in k over the readings used: no") for c in qf04["checks"]
    )
    for specimen in ("QF-02", "QF-07"):
        notes = clay[clay["specimen"] == specimen].iloc[0]["notes"]
        assert "window proposed by the tool" in notes[0] and "left out" in notes[0]


def test_sand_is_valid(sand):
    assert sand["valid"].all()
    for verdicts in sand["verdicts"]:
        assert {v.criterion for v in verdicts if v.passed} >= {
            "steady_values",
            "gradient_independence",
            "reynolds",
        }


def test_intervals_combine_fit_and_resolutions(clay):
    from kitchen.reduction import FallingHeadRecord
    from kitchen.specimen import specimen_state

    series = load_series(SAMPLES / "clay_liner")
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    readings = series.falling_head[series.falling_head["specimen"] == "QF-01"]
    record = FallingHeadRecord(readings, state.loc["QF-01"])
    whole = record.analyse((0, record.n), "log_linear")
    # the interval of the fitted slope alone, as k: -slope * a·L/A
    fit_low, fit_high = -whole.line.slope_high * record.scale, -whole.line.slope_low * record.scale
    row = clay[clay["specimen"] == "QF-01"].iloc[0]
    assert row["k_reference"] == pytest.approx(whole.k_reference, rel=1e-12)
    assert row["k_reference_low"] < fit_low
    assert row["k_reference_high"] > fit_high


def test_windows_and_options_reach_every_row():
    series = load_series(SAMPLES / "clay_liner")
    chosen = series_results(series, windows={"QF-02": (0, 75)})
    row = chosen[chosen["specimen"] == "QF-02"].iloc[0]
    assert not row["valid"] and row["notes"][0] == "readings 1 to 75 of 75 used (window chosen)"
    jurin = series_results(series, Settings(capillary_rise="jurin"))
    plain = series_results(series)
    assert (
        jurin["k_reference"] > plain["k_reference"]
    ).all()  # heads less hc fall faster, relatively


def test_exported_checks_and_notes(clay):
    table = results_table(clay)
    good = table[table["specimen"] == "QF-01"].iloc[0]
    assert good["checks"].startswith("every criterion met")
    assert "window proposed by the tool" in good["notes"]
    bad = table[table["specimen"] == "QF-04"].iloc[0]
    assert bad["checks"].startswith("no significant trend")


def test_the_d5084_option_says_where_it_leaves_its_range(tmp_path):
    # A1 is tested cold (5 degC), A2 at 19 degC: with the D5084 R_T equation only A1's row
    # carries the caution (the equation departs from IAPWS 2008 by +6 % at 5 degC, measured
    # in tests/test_water.py against the `iapws` package); the default viscosity says nothing
    cold = FALLING.replace(",20\n", ",5\n").replace(",20.5\n", ",5\n").replace(",21\n", ",5\n")
    series = load_series(write_series(tmp_path / "cold", falling_head=cold))
    d5084 = Settings(viscosity="d5084")
    results = series_results(series, d5084).set_index("specimen")
    [caution] = [c for c in results.loc["A1", "checks"] if c.startswith("viscosity:")]
    assert "is used at 5.0 °C (the test temperature), outside 14–34 °C" in caution
    assert "departs from IAPWS 2008 by +6.1 %" in caution
    assert not any(c.startswith("viscosity:") for c in results.loc["A2", "checks"])
    plain = series_results(series).set_index("specimen")
    assert results.loc["A1", "valid"] == plain.loc["A1", "valid"]  # a caution, not a failure
    assert not any(c.startswith("viscosity:") for c in plain.loc["A1", "checks"])
    workspace = Workspace(series.source, d5084).results().set_index("specimen")
    assert caution in workspace.loc["A1", "checks"]  # the one way in says the same
    assert caution in results_table(results.reset_index(), d5084).loc[0, "checks"]
