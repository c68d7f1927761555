"""Constant-head reduction against textbook worked examples and invariants."""

import numpy as np
import pandas as pd
import pytest
from constant_head_rows import collections_from_k20

from kitchen.reduction import collection_table, constant_head_analysis, reduce_constant_head
from kitchen.uncertainty import Resolutions
from kitchen.water import water_density, water_viscosity


@pytest.mark.parametrize("weighed", [False, True])
def test_round_trip_recovers_k20(weighed):
    # Collections made from a known k20 with the viscosity ratio, at three gradients.
    collections, state = collections_from_k20(weighed=weighed)
    table = collection_table(collections, state)
    result = reduce_constant_head(table, "S")
    assert result.k_reference == pytest.approx(4.0e-4, rel=1e-9)
    assert result.spread == pytest.approx(0.0, abs=1e-9)
    assert result.k_reference_low <= result.k_reference <= result.k_reference_high
    assert result.gradient_max == pytest.approx(1.0)


def test_missing_temperature_is_stated():
    collections, state = collections_from_k20()
    collections["temperature"] = np.nan
    result = reduce_constant_head(collection_table(collections, state), "S")
    assert any("temperature not recorded" in note for note in result.notes)
    assert np.isnan(result.temperature)


def test_one_collection_says_no_interval():
    collections, state = collections_from_k20()
    result = reduce_constant_head(collection_table(collections.iloc[:1], state), "S")
    assert result.k_reference_low == result.k_reference == result.k_reference_high
    assert any("one collection" in note for note in result.notes)


def test_unknown_specimen_is_named():
    collections, state = collections_from_k20()
    with pytest.raises(ValueError, match="specimen Z has no constant-head collections"):
        reduce_constant_head(collection_table(collections, state), "Z")


# --------------------------------------------------------------------------- analysis
def _specimen_row(d10=0.3e-3):
    return pd.Series({"specimen": "S", "diameter": np.sqrt(4 * 0.0081 / np.pi), "d10": d10})


def _repeated(noise=0.005, seed=0):
    collections, state = collections_from_k20()
    rows = pd.concat([collections] * 3, ignore_index=True)
    rng = np.random.default_rng(seed)
    rows["volume"] = rows["volume"] * (1 + rng.normal(0, noise, len(rows)))
    return rows, state


def test_analysis_verdicts_for_a_steady_sand():
    collections, state = _repeated()
    table = collection_table(collections, state)
    analysis = constant_head_analysis(table, _specimen_row())
    verdicts = {v.criterion: v for v in analysis.verdicts}
    assert verdicts["steady_values"].passed
    assert verdicts["gradient_independence"].passed
    assert "3 heads" in verdicts["gradient_independence"].sentence
    assert verdicts["trend"].passed is None
    assert verdicts["gradient"].passed is None  # 4e-4 m/s is above the D5084 table
    assert verdicts["reynolds"].passed
    assert analysis.valid and not analysis.checks
    # The interval combines the fit over the head means (3 heads: 2 dof) with the resolutions.
    budget = {c.name: c for c in analysis.interval.contributions}
    assert budget["slope of v on i (head means)"].degrees_of_freedom == 2
    assert {"specimen diameter", "flow length", "thermometer"} <= set(budget)
    assert analysis.k_reference_low < 4.0e-4 < analysis.k_reference_high
    # Reynolds number on d10 by hand at the largest velocity (Bear 1972, from memory).
    fastest = table["darcy_velocity"].idxmax()
    t = table.loc[fastest, "temperature"]
    expected = water_density(t) * table.loc[fastest, "darcy_velocity"] * 0.3e-3
    assert analysis.reynolds == pytest.approx(expected / water_viscosity(t), rel=1e-9)


def test_analysis_flags_too_few_collections():
    collections, state = collections_from_k20()
    analysis = constant_head_analysis(collection_table(collections, state), _specimen_row(np.nan))
    assert not analysis.valid
    assert any("only 3 k value(s)" in check for check in analysis.checks)
    reynolds = next(v for v in analysis.verdicts if v.criterion == "reynolds")
    assert reynolds.passed is None


def test_one_collection_interval_from_resolutions_by_hand():
    from kitchen.settings import Settings

    collections, state = collections_from_k20()
    table = collection_table(collections.iloc[:1], state)
    resolutions = Resolutions(caliper=0.0, thermometer=0.0)
    analysis = constant_head_analysis(table, _specimen_row(), Settings(resolutions=resolutions))
    row = table.iloc[0]
    u = 1 / np.sqrt(12)
    expected = np.sqrt(
        (1e-6 * u / row["volume"]) ** 2
        + (1.0 * u / row["duration"]) ** 2
        + (1e-3 * u / row["head_difference"]) ** 2
    )
    assert analysis.interval.relative_standard_uncertainty == pytest.approx(expected, rel=1e-4)
    assert any("reading resolutions" in note for note in analysis.notes)


def test_interval_allows_for_a_head_reading_shared_by_its_collections():
    # Three collections at each of three heads; each head is read once, with a 3 % error
    # common to its collections. A 95 % interval must cover the true k about 95 % of the
    # time; treating the nine collections as independent would not (checked alongside).
    covered = naive = 0
    for seed in range(40):
        collections, state = _repeated(noise=0.002, seed=seed)
        rng = np.random.default_rng(100 + seed)
        error = dict(zip((0.05, 0.10, 0.15), rng.normal(0, 0.03, 3), strict=True))
        collections["head_difference"] *= 1 + collections["head_difference"].map(error)
        analysis = constant_head_analysis(collection_table(collections, state), _specimen_row())
        covered += analysis.k_reference_low <= 4.0e-4 <= analysis.k_reference_high
        naive += analysis.result.k_reference_low <= 4.0e-4 <= analysis.result.k_reference_high
    assert covered >= 35
    assert naive < covered
