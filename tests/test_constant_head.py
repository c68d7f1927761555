"""Constant-head reduction against textbook worked examples and invariants."""

import numpy as np
import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st

from kitchen.constant_head import (
    collection_table,
    constant_head_analysis,
    constant_head_conductivity,
    darcy_velocity,
    hydraulic_gradient,
    reduce_constant_head,
)
from kitchen.uncertainty import Resolutions
from kitchen.water import viscosity_ratio, water_density, water_viscosity


def test_das_constant_head_example():
    # Das, Principles of Geotechnical Engineering, constant-head example (inputs and
    # answer from memory): L = 30 cm, A = 177 cm^2, h = 50 cm, Q = 350 cm^3 in 5 min
    # -> k = 3.95e-3 cm/s (printed to three figures).
    k = constant_head_conductivity(350e-6, 0.30, 177e-4, 0.50, 5 * 60.0)
    assert k * 100 == pytest.approx(3.95e-3, abs=0.005e-3)


def test_das_sobhan_problem_inputs():
    # Das & Sobhan, Principles of Geotechnical Engineering 9th ed., Problem 7.6 inputs
    # (answer computed by hand, not published): D = 70 mm, L = 140 mm, h = 550 mm,
    # Q = 450 cm^3 in 7 min -> k = 7.087e-3 cm/s.
    area = np.pi * 0.070**2 / 4
    k = constant_head_conductivity(450e-6, 0.140, area, 0.550, 7 * 60.0)
    assert k * 100 == pytest.approx(7.087e-3, rel=5e-4)


def test_darcy_velocity_equals_k_times_gradient():
    v = darcy_velocity(350e-6, 177e-4, 300.0)
    i = hydraulic_gradient(0.50, 0.30)
    assert v == pytest.approx(constant_head_conductivity(350e-6, 0.30, 177e-4, 0.50, 300.0) * i)


@given(st.floats(0.01, 10.0))
def test_k_scales_with_flow_length(factor):
    base = constant_head_conductivity(350e-6, 0.30, 177e-4, 0.50, 300.0)
    assert constant_head_conductivity(350e-6, 0.30 * factor, 177e-4, 0.50, 300.0) == (
        pytest.approx(base * factor)
    )


def _collections(k20=4.0e-4, temperatures=(18.0, 20.0, 24.0), weighed=False):
    area, length = 0.0081, 0.15
    rows = []
    for index, (head, temperature) in enumerate(zip((0.05, 0.10, 0.15), temperatures, strict=True)):
        k_t = k20 / viscosity_ratio(temperature)
        volume = k_t * head / length * area * 120.0
        rows.append(
            {
                "specimen": "S",
                "head_difference": head,
                "duration": 120.0,
                "volume": np.nan if weighed else volume,
                "outflow_mass": volume * water_density(temperature) if weighed else np.nan,
                "temperature": temperature,
                "flow_length": np.nan,
                "source_row": index + 2,
            }
        )
    state = pd.DataFrame({"specimen": ["S"], "area": [area], "height": [length]})
    return pd.DataFrame(rows), state


@pytest.mark.parametrize("weighed", [False, True])
def test_round_trip_recovers_k20(weighed):
    # Collections made from a known k20 with the viscosity ratio, at three gradients.
    collections, state = _collections(weighed=weighed)
    table = collection_table(collections, state)
    result = reduce_constant_head(table, "S")
    assert result.k_reference == pytest.approx(4.0e-4, rel=1e-9)
    assert result.spread == pytest.approx(0.0, abs=1e-9)
    assert result.k_reference_low <= result.k_reference <= result.k_reference_high
    assert result.gradient_max == pytest.approx(1.0)


def test_mass_uses_water_density_not_one_gram_per_millilitre():
    collections, state = _collections(temperatures=(30.0, 30.0, 30.0), weighed=True)
    table = collection_table(collections, state)
    expected = collections["outflow_mass"] / water_density(30.0)
    np.testing.assert_allclose(table["flow_volume"], expected)
    assert not np.allclose(table["flow_volume"], collections["outflow_mass"] / 1000.0, rtol=1e-3)


def test_missing_temperature_is_stated():
    collections, state = _collections()
    collections["temperature"] = np.nan
    result = reduce_constant_head(collection_table(collections, state), "S")
    assert any("temperature not recorded" in note for note in result.notes)
    assert np.isnan(result.temperature)


def test_one_collection_says_no_interval():
    collections, state = _collections()
    result = reduce_constant_head(collection_table(collections.iloc[:1], state), "S")
    assert result.k_reference_low == result.k_reference == result.k_reference_high
    assert any("one collection" in note for note in result.notes)


def test_unknown_specimen_is_named():
    collections, state = _collections()
    with pytest.raises(ValueError, match="specimen Z has no constant-head collections"):
        reduce_constant_head(collection_table(collections, state), "Z")


# --------------------------------------------------------------------------- analysis
def _specimen_row(d10=0.3e-3):
    return pd.Series({"specimen": "S", "diameter": np.sqrt(4 * 0.0081 / np.pi), "d10": d10})


def _repeated(noise=0.005, seed=0):
    collections, state = _collections()
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
    collections, state = _collections()
    analysis = constant_head_analysis(collection_table(collections, state), _specimen_row(np.nan))
    assert not analysis.valid
    assert any("only 3 k value(s)" in check for check in analysis.checks)
    reynolds = next(v for v in analysis.verdicts if v.criterion == "reynolds")
    assert reynolds.passed is None


def test_one_collection_interval_from_resolutions_by_hand():
    from kitchen.results import Settings

    collections, state = _collections()
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
