"""The results table on the invented sample series, against the generators' ground truth."""

import json
from pathlib import Path

import numpy as np
import pytest

from kitchen.results import Settings, reference_label, results_table, series_results
from kitchen.series import load_series

SAMPLES = Path(__file__).resolve().parents[1] / "sample_data"


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
