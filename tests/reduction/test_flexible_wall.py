"""Flexible-wall tests: consolidated dimensions, B-value, effective stress, their verdicts."""

import math

import numpy as np
import pandas as pd
import pytest

from kitchen.reduction import (
    b_value,
    consolidated_dimensions,
    effective_stresses,
    permeation_state,
    saturation_verdict,
    series_results,
)
from kitchen.specimen import specimen_state
from kitchen.workspace import Workspace


# --- formulas against their definitions ------------------------------------------------------
def test_b_value_is_skemptons_ratio():
    # Skempton (1954), Géotechnique 4(4):143, eq. (4) for an isotropic increment: Δu = B·Δσ3.
    # A saturated soil gives B = 1; hand numbers: Δσ3 = 50 kPa, Δu = 47.5 kPa → B = 0.95.
    assert b_value(50e3, 47.5e3) == pytest.approx(0.95)
    assert b_value(50e3, 50e3) == 1.0
    assert b_value(np.array([50e3, 100e3]), np.array([25e3, 90e3])).tolist() == [0.5, 0.9]


def test_effective_stress_is_total_less_pore_pressure():
    # Terzaghi σ' = σ − u (Holtz & Kovacs, effective stress); u at the inflow end is the back
    # pressure plus ρw·g·h. Hand numbers: σc = 550 kPa, ub = 515 kPa, h = 2.0 m, ρw = 1000:
    # ρw·g·h = 19.6133 kPa, so σ'out = 35 kPa, σ'in = 15.3867 kPa, mean 25.1934 kPa.
    stresses = effective_stresses(550e3, 515e3, 2.0, 1000.0, "upward")
    assert stresses.consolidation == pytest.approx(35e3)
    assert stresses.outflow == pytest.approx(35e3)
    assert stresses.inflow == pytest.approx(15386.7, abs=0.1)
    assert stresses.mean == pytest.approx(25193.35, abs=0.1)
    assert (stresses.bottom, stresses.top) == (stresses.inflow, stresses.outflow)
    down = effective_stresses(550e3, 515e3, 2.0, 1000.0, "downward")
    assert (down.top, down.bottom) == (down.inflow, down.outflow)
    assert effective_stresses(550e3, 515e3, 2.0).top is None


def test_consolidated_dimensions_from_each_kind_of_record():
    height, diameter = 0.1164, 0.1016
    area0 = math.pi * diameter**2 / 4
    measured = consolidated_dimensions(height, diameter, consolidated_height=0.115,
                                       consolidated_diameter=0.101)  # fmt: skip
    assert (measured.height, measured.diameter) == pytest.approx((0.115, 0.101))
    # V = A·L: the area after consolidation is the volume left over the height left
    # (Head, Manual of Soil Laboratory Testing, Vol. 3, from memory)
    changed = consolidated_dimensions(height, diameter, height_change=0.0012, volume_change=20e-6)
    assert changed.height == pytest.approx(0.1152)
    assert changed.area == pytest.approx((area0 * height - 20e-6) / 0.1152)
    # a volume change alone: equal strain in every direction, so both shrink by (1 − εv)^(1/3)
    isotropic = consolidated_dimensions(height, diameter, volume_change=area0 * height * 0.03)
    assert isotropic.height == pytest.approx(height * 0.97 ** (1 / 3))
    assert isotropic.volume == pytest.approx(area0 * height * 0.97)
    untouched = consolidated_dimensions(height, diameter)
    assert untouched.area == pytest.approx(area0) and "as prepared" in untouched.how


def test_permeation_state_changes_only_the_flexible_wall_specimens():
    specimens = pd.DataFrame(
        {"specimen": ["A", "B"], "diameter": [0.1, 0.1], "height": [0.1, 0.1],
         "dry_mass": [1.4, 1.4], "specific_gravity": [2.7, 2.7]}
    )  # fmt: skip
    flexible = pd.DataFrame(
        {"specimen": ["B"], "cell_pressure": [550e3], "back_pressure": [515e3],
         "b_value": [0.97], "consolidated_height": [0.098], "height_change": [np.nan],
         "consolidated_diameter": [np.nan], "volume_change": [np.nan]}
    )  # fmt: skip
    state = specimen_state(specimens)
    permeated = permeation_state(state, flexible)
    assert permeated["cell"].tolist() == ["rigid wall", "flexible wall"]
    assert permeated["height"].tolist() == [0.1, 0.098]
    assert permeated["dry_density"].tolist() == state["dry_density"].tolist()  # as prepared
    assert state["height"].tolist() == [0.1, 0.1]  # the input is left alone


# --- the saturation rule on seeded populations ---------------------------------------------
def _b_sequences(rng, kind, count):
    """B-value checks at back pressures 200..500 kPa, made by the test itself (no package
    code): a soft soil that saturates (B rises to about 0.97–1.0), a stiff soil whose B stays
    at a plateau of 0.85–0.94, and a soil not yet saturated (B still rising by 0.03–0.10 an
    increment, below 0.95). Each B is read from pressures to 0.5 kPa on a 50 kPa increment."""
    out = []
    for _ in range(count):
        if kind == "saturated":
            final = rng.uniform(0.955, 1.0)
            values = final - np.array([0.25, 0.1, 0.03, 0.0]) * rng.uniform(0.5, 1.5)
        elif kind == "stiff":
            plateau = rng.uniform(0.85, 0.94)
            values = plateau - np.array([0.2, 0.06, 0.0, 0.0])
        else:
            final = rng.uniform(0.6, 0.9)
            values = final - np.cumsum(rng.uniform(0.03, 0.10, 4))[::-1] + rng.uniform(0.03, 0.1)
            values = np.minimum(values, final)
            values[-1] = final
            values[-2] = final - rng.uniform(0.03, 0.10)
        readings = np.round(values * 50 * 2) / 2  # Δu read to 0.5 kPa
        out.append(readings / 50)
    return out


def test_the_saturation_rule_on_seeded_populations():
    rng = np.random.default_rng(5084)
    pressures = [200e3, 300e3, 400e3, 500e3]
    rates = {}
    for kind in ("saturated", "stiff", "rising"):
        sequences = _b_sequences(rng, kind, 2000)
        rates[kind] = np.mean([saturation_verdict(b, pressures).passed for b in sequences])
    assert rates["saturated"] == 1.0
    assert rates["stiff"] >= 0.99  # within 0.01 after reading to 0.5 kPa on 50 kPa
    assert rates["rising"] == 0.0  # a B still rising is never taken as saturated


def test_saturation_verdict_words():
    assert not saturation_verdict([]).passed
    assert "not recorded" in saturation_verdict([float("nan")]).sentence
    stiff = saturation_verdict([0.80, 0.92, 0.925], [300e3, 400e3, 500e3])
    assert stiff.passed and "as for a stiff soil" in stiff.sentence
    same_pressure = saturation_verdict([0.92, 0.925], [400e3, 400e3])
    assert not same_pressure.passed


# --- round trip: readings made from a known k through consolidated dimensions ----------------
def _write_flexible_series(folder, k20, with_conditions=True):
    """A rising-tailwater test with equal burettes made from k20 on the consolidated specimen,
    by the test's own arithmetic (numpy only): h = h0·exp(−k·A·(2/a)·t/L), at 20 °C."""
    folder.mkdir(parents=True)
    height0, diameter0 = 0.1160, 0.1000  # m
    shortening, expelled = 0.0015, 22.0e-6  # m, m3
    area0 = math.pi * diameter0**2 / 4
    height = height0 - shortening
    area = (area0 * height0 - expelled) / height
    burette = math.pi * 0.008**2 / 4
    times = np.arange(0, 48 * 3600 + 1, 1800.0)
    heads = 1.6 * np.exp(-k20 * area * (2 / burette) * times / height)
    (folder / "specimens.csv").write_text(
        "specimen,diameter [mm],height [mm],dry_mass [g],specific_gravity,water_content [%],"
        "standpipe_diameter [mm],tailwater_standpipe_diameter [mm],flow_direction\n"
        f"F1,{diameter0 * 1e3},{height0 * 1e3},1560,2.71,18.5,8,8,upward\n"
    )
    (folder / "falling_head.csv").write_text(
        "specimen,time [s],head [m],temperature [degC]\n"
        + "".join(f"F1,{t:.0f},{h:.7f},20\n" for t, h in zip(times, heads, strict=True))
    )
    if with_conditions:
        (folder / "flexible_wall.csv").write_text(
            "specimen,cell_pressure [kPa],back_pressure [kPa],b_value,height_change [mm],"
            f"volume_change [mL]\nF1,550,515,0.97,{shortening * 1e3},{expelled * 1e6}\n"
        )
    return height / area, height0 / area0


@pytest.mark.parametrize("k20", [2e-10, 8e-10, 3e-9])
def test_round_trip_through_the_consolidated_dimensions(tmp_path, k20):
    ratio_used, ratio_prepared = _write_flexible_series(tmp_path / "flex", k20)
    workspace = Workspace(tmp_path / "flex")
    row = workspace.results().iloc[0]
    assert row["cell"] == "flexible wall"
    assert row["k_reference"] == pytest.approx(k20, rel=1e-5)
    # the same readings taken as a rigid-wall test give k on the prepared dimensions, off by
    # the ratio of L/A (k is proportional to L/A)
    _write_flexible_series(tmp_path / "rigid", k20, with_conditions=False)
    rigid = Workspace(tmp_path / "rigid").results().iloc[0]
    assert rigid["cell"] == "rigid wall"
    assert rigid["k_reference"] == pytest.approx(k20 * ratio_prepared / ratio_used, rel=1e-5)
    assert "effective_stress" not in rigid.index


def test_results_carry_the_stresses_and_agree_with_series_results(tmp_path):
    _write_flexible_series(tmp_path / "flex", 8e-10)
    workspace = Workspace(tmp_path / "flex")
    row = workspace.results().iloc[0]
    head = 1.6  # the first reading, the largest head used
    expected = effective_stresses(550e3, 515e3, head, 1000.0, "upward")
    assert row["effective_stress_inflow"] == pytest.approx(expected.inflow, rel=1e-3)
    assert row["effective_stress"] == pytest.approx(expected.mean, rel=1e-3)
    assert row["valid"]
    direct = series_results(workspace.series).iloc[0]
    assert direct["k_reference"] == row["k_reference"]
    assert direct["effective_stress"] == row["effective_stress"]


def test_an_unsaturated_specimen_and_a_stress_outside_the_specification_fail(tmp_path):
    _write_flexible_series(tmp_path / "s", 8e-10)
    conditions = tmp_path / "s" / "flexible_wall.csv"
    conditions.write_text(conditions.read_text().replace(",0.97,", ",0.90,"))
    (tmp_path / "s" / "project.csv").write_text(
        "setting,value\nminimum_effective_stress,20 kPa\nmaximum_effective_stress,30 kPa\n"
    )
    row = Workspace(tmp_path / "s").results().iloc[0]
    assert not row["valid"]
    failed = " | ".join(row["checks"])
    assert "B-value at the end of saturation 0.90 ≥ 0.95: no" in failed
    assert "within the specification (≥ 20 kPa and ≤ 30 kPa): no" in failed


def test_a_head_that_lifts_the_membrane_fails(tmp_path):
    _write_flexible_series(tmp_path / "s", 8e-10)
    conditions = tmp_path / "s" / "flexible_wall.csv"
    conditions.write_text(conditions.read_text().replace("550,515", "525,515"))
    row = Workspace(tmp_path / "s").results().iloc[0]
    assert not row["valid"]
    assert any("above zero: no" in check for check in row["checks"])


def test_a_revised_consolidation_moves_the_specimen(tmp_path):
    _write_flexible_series(tmp_path / "s", 8e-10)
    workspace = Workspace(tmp_path / "s")
    before = workspace.results().iloc[0]["k_reference"]
    workspace.revise(
        table="flexible_wall", specimen="F1", reading=2, field="height_change",
        value="3.0 mm", reason="dial gauge re-read",
    )  # fmt: skip
    assert workspace.last_moved == ("F1",)
    after = workspace.results().iloc[0]["k_reference"]
    assert after != before
    assert Workspace(tmp_path / "s").results().iloc[0]["k_reference"] == after


def test_a_specimen_that_swelled_is_noted_in_its_checks(tmp_path):
    _write_flexible_series(tmp_path / "s", 8e-10)
    specimens = tmp_path / "s" / "specimens.csv"
    lines = specimens.read_text().splitlines()
    lines[0] += ",final_height [mm]"
    lines[1] += ",118.4"  # 116.0 mm as prepared: +2.07 % in height and volume
    specimens.write_text("\n".join(lines) + "\n")
    row = Workspace(tmp_path / "s").results().iloc[0]
    assert row["valid"]
    assert row["checks"][-1].startswith("the specimen swelled 2.1 % during the test")
