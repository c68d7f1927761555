"""The memo's tables: specimens with verdicts, fits and checks, in their stated units."""

import numpy as np
import pytest
from scipy import stats
from series_files import SAMPLES

from kitchen.analysis import analyse_series
from kitchen.io import load_series
from kitchen.memo import FIT_COLUMNS, checks_table, fits_table, specimens_table
from kitchen.reduction import series_results


@pytest.fixture(scope="module")
def clay():
    results = series_results(load_series(SAMPLES / "clay_liner"))
    return results, analyse_series(results, 1e-9)


def test_specimens_table_units(clay):
    _, analysis = clay
    table = specimens_table(analysis)
    rows = analysis.specimens
    np.testing.assert_allclose(table["dry_density [Mg/m3]"], rows["dry_density"] / 1000)
    np.testing.assert_allclose(table["water_content [%]"], rows["water_content"] * 100)
    np.testing.assert_allclose(table["k20 [m/s]"], rows["k"])
    assert list(table["verdict"]) == list(rows["verdict"])
    assert "hazen_prediction [m/s]" not in table  # no d10 in the clay series


def test_specimens_table_carries_predictions_where_d10_is_given():
    analysis = analyse_series(series_results(load_series(SAMPLES / "drainage_sand")), 1e-9)
    table = specimens_table(analysis)
    np.testing.assert_allclose(table["d10 [mm]"], [0.17, 0.22, 0.27, 0.33])
    np.testing.assert_allclose(table["hazen_prediction [m/s]"], analysis.grading["hazen_k"])
    assert table["grading_note"].str.contains("not measurements").all()


def test_fits_table(clay):
    _, analysis = clay
    fits = fits_table(analysis)
    assert list(fits.columns) == FIT_COLUMNS
    optimum = fits[
        (fits["fit"] == "compaction curve (quadratic)")
        & (fits["subject"] == "standard")
        & (fits["quantity"] == "optimum water content")
    ]
    curve = analysis.compaction_curves["standard"]
    assert optimum["value"].item() == pytest.approx(100 * curve.optimum_water_content)
    assert optimum["unit"].item() == "%"
    mean = fits[fits["fit"] == "geometric mean"].iloc[0]
    judged = analysis.specimens[analysis.specimens["judged"]]  # a test not valid is left out
    assert mean["value"] == pytest.approx(stats.gmean(judged["k"]))  # scipy reference
    assert mean["low"] < mean["value"] < mean["high"]
    slope = fits[
        (fits["fit"] == "log k against dry density") & (fits["quantity"] == "slope of log10 k")
    ]
    # Reported per Mg/m3: 1000 times the slope per kg/m3.
    assert slope["value"].item() == pytest.approx(1000 * analysis.dry_density_trend.fit.slope)
    zone = fits[fits["fit"] == "acceptable zone"].iloc[0]
    assert zone["value"] == analysis.acceptable_zone.n_meeting and "convex hull" in zone["note"]
    ck = fits[fits["quantity"] == "change index Ck"].iloc[0]
    assert ck["high"] == np.inf  # the slope interval reaches zero: Ck is not bounded


def test_checks_table(clay):
    results, analysis = clay
    table = checks_table(results, analysis, ["a chart was not drawn"])
    assert list(table.columns) == ["specimen", "method", "check"]
    assert set(results["specimen"]) <= set(table["specimen"])
    passed = [r for r in results.itertuples() if not r.checks]
    assert len(table[table["check"] == "all checks passed"]) == len(passed)
    series_rows = table[table["specimen"] == "(series)"]
    assert list(series_rows["check"]) == list(analysis.notes) + ["a chart was not drawn"]


def test_the_specimens_sheet_follows_the_units_chosen(clay):
    # 1 m/s = 100 cm/s; gamma_d = rho_d * g_n, g_n = 9.80665 m/s2 exactly (3rd CGPM, 1901);
    # the column names keep ASCII units, as the tool writes them and reads them back
    _, analysis = clay
    table = specimens_table(analysis, k_unit="cm/s", density_unit="kN/m3")
    rows = analysis.specimens
    np.testing.assert_allclose(table["k20 [cm/s]"], rows["k"] * 100)
    np.testing.assert_allclose(table["k20_high [cm/s]"], rows["k_high"] * 100)
    np.testing.assert_allclose(table["dry_unit_weight [kN/m3]"], rows["dry_density"] * 9.80665e-3)
    assert "k20 [m/s]" not in table and "dry_density [Mg/m3]" not in table
    pounds = specimens_table(analysis, density_unit="lb/ft3")
    # NIST SP 811 (2008) App. B: 1 lb/ft3 = 16.01846 kg/m3
    np.testing.assert_allclose(
        pounds["dry_density [lb/ft3]"], rows["dry_density"] / 16.01846, rtol=1e-6
    )
