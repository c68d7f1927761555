"""The effective data: revisions applied to the raw tables, and the physics follows."""

import hashlib
import shutil
from pathlib import Path

import pandas as pd
import pytest
from revision_series import SPECIMENS, log_rows, raw_digests, small_series
from series_files import SAMPLES, copy_sample

from kitchen.io import load_series, read_tables
from kitchen.reduction import series_results
from kitchen.revisions import (
    EffectiveSeries,
    RevisionError,
    apply_revisions,
    history_table,
    load_effective_series,
    log_sha256,
    read_revisions,
    revise,
    revisions_path,
)


@pytest.fixture
def small(tmp_path):
    return small_series(tmp_path / "small")


@pytest.fixture
def clay(tmp_path):
    return copy_sample(SAMPLES / "clay_liner", tmp_path / "clay_liner")


def test_effective_series_cites_the_log(clay):
    plain = load_effective_series(clay)
    assert plain.revision_count == 0 and plain.log_sha256 is None and log_sha256(clay) is None
    revise(clay, specimen="QF-02", field="height", value="116.5 mm", reason="re-measured")
    effective = load_effective_series(clay)
    expected = hashlib.sha256(revisions_path(clay).read_bytes()).hexdigest()
    assert effective.log_sha256 == expected == log_sha256(clay)
    assert effective.revision_count == 1 and effective.log_rows == 1
    assert effective.series.specimens.loc[1, "height"] == pytest.approx(0.1165, rel=1e-15)


def test_effective_series_splits_the_log_as_loading_does(small):
    from kitchen.revisions import withdraw

    first = revise(small, specimen="A1", field="height", value="117 mm", reason="re-measured")
    second = revise(small, specimen="A1", field="diameter", value="101.5 mm", reason="calipers")
    withdraw(small, first.id, reason="measured the wrong specimen")
    loaded = load_effective_series(small)
    rows = read_revisions(small)
    cited = EffectiveSeries.from_log(loaded.series, rows, revisions_path(small), log_sha256(small))
    assert cited.applied == loaded.applied == (rows[1],) and rows[1].id == second.id
    assert cited.withdrawn == loaded.withdrawn == (rows[0],) and rows[0].id == first.id
    assert (cited.log_path, cited.log_sha256, cited.log_rows) == (
        loaded.log_path,
        loaded.log_sha256,
        loaded.log_rows,
    )
    assert cited.log_rows == 3 and cited.series is loaded.series


# --- the physics of a height revision --------------------------------------------------------


@pytest.mark.parametrize("value", ["125.73 mm", "4.95 in", "11.2 cm", "0.1301 m"])
def test_height_change_moves_k_and_density_as_the_physics_says(clay, value):
    # Falling head, constant tailwater: k = a·L/(A·t)·ln(h1/h2) (ASTM D5084 Method B; Das,
    # Principles of Geotechnical Engineering): with the readings unchanged k ∝ L, and so is
    # k20 (the viscosity ratio does not involve L). Dry density ρd = Ms/(A·L) (Das; Holtz &
    # Kovacs) ∝ 1/L, hence 1 + e = Gs·ρw/ρd ∝ L.
    before = series_results(load_series(clay))
    revise(clay, specimen="QF-01", field="height", value=value, reason="re-measured")
    effective = load_effective_series(clay).series
    after = series_results(effective)
    ratio = effective.specimens.loc[0, "height"] / 0.11627
    old, new = before.iloc[0], after.iloc[0]
    for column in ("k", "k_reference"):
        assert new[column] / old[column] == pytest.approx(ratio, rel=1e-12), column
    assert new["k_reference_low"] <= new["k_reference"] <= new["k_reference_high"]
    assert new["dry_density"] * ratio == pytest.approx(old["dry_density"], rel=1e-12)
    assert (1 + new["void_ratio"]) == pytest.approx((1 + old["void_ratio"]) * ratio, rel=1e-12)
    pd.testing.assert_frame_equal(before.iloc[1:], after.iloc[1:])  # the others stay put


@pytest.mark.parametrize(
    ("specimen", "height", "new_height", "k_follows_height"),
    [("DL-A", 6.052, 6.3, False), ("DL-B", 6.119, 6.3, True)],
)
def test_constant_head_k_follows_the_flow_length(
    tmp_path, specimen, height, new_height, k_follows_height
):
    # Constant head, k = Q·L/(A·h·t) (ASTM D2434; ASTM D5084 Method A), L the manometer tap
    # spacing where flow_length is given (DL-A) and the specimen height where it is not
    # (DL-B). A new height moves ρd ∝ 1/L for both, and k ∝ L only for DL-B.
    sand = copy_sample(SAMPLES / "drainage_sand", tmp_path / "sand")
    before = series_results(load_series(sand))
    revise(sand, specimen=specimen, field="height", value=f"{new_height} in", reason="re-measured")
    after = series_results(load_effective_series(sand).series)
    ratio = new_height / height
    row = (after["specimen"] == specimen).to_numpy()
    k_ratio = after.loc[row, "k_reference"].item() / before.loc[row, "k_reference"].item()
    assert k_ratio == pytest.approx(ratio if k_follows_height else 1.0, rel=1e-12)
    density_ratio = after.loc[row, "dry_density"].item() / before.loc[row, "dry_density"].item()
    assert density_ratio == pytest.approx(1 / ratio, rel=1e-12)
    pd.testing.assert_frame_equal(before.loc[~row], after.loc[~row])


def test_withdrawing_restores_the_original_results_exactly(clay):
    original = series_results(load_series(clay))
    raw = raw_digests(clay)
    height = revise(clay, specimen="QF-01", field="height", value="4.95 in", reason="swelled")
    head = revise(clay, specimen="QF-01", field="head", reading=3, value="184.5 cm", reason="typo")
    assert not series_results(load_effective_series(clay).series).equals(original)
    from kitchen.revisions import withdraw

    withdraw(clay, head.id, reason="the first reading was right")
    withdraw(clay, height.id, reason="measured the wrong specimen")
    effective = load_effective_series(clay)
    assert effective.revision_count == 0 and len(effective.withdrawn) == 2
    pd.testing.assert_frame_equal(series_results(effective.series), original)
    plain = load_series(clay)
    pd.testing.assert_frame_equal(effective.series.specimens, plain.specimens)
    pd.testing.assert_frame_equal(effective.series.falling_head, plain.falling_head)
    assert raw_digests(clay) == raw
    assert [row["action"] for row in log_rows(clay)] == ["revise"] * 2 + ["withdraw"] * 2
    statuses = history_table(read_revisions(clay))["status"].tolist()
    assert statuses[0].startswith("withdrawn by") and statuses[2] == f"withdraws {head.id}"


# --- raw files edited after a revision ---------------------------------------------------


def test_raw_file_edited_after_a_revision_is_named(small):
    from kitchen.revisions import withdraw

    made = revise(small, specimen="A1", field="height", value="117 mm", reason="re-measured")
    specimens = small / "specimens.csv"  # a person edits their own file by hand
    specimens.write_text(SPECIMENS.replace("A1,101.6,116.4", "A1,101.6,116.6"), encoding="utf-8")
    with pytest.raises(RevisionError) as caught:
        load_effective_series(small)
    text = str(caught.value)
    assert f"revision {made.id}" in text and "row 2 now holds 116.6 mm, not 116.4 mm" in text
    withdraw(small, made.id, reason="the file was corrected instead")
    assert load_effective_series(small).series.specimens.loc[0, "height"] == pytest.approx(0.1166)


# --- values of every kind, workbooks, and columns the file lacks ----------------------------


def test_reading_values_are_converted_to_the_file_unit(small):
    # 68 degF = 20 degC (T_C = (T_F - 32)·5/9; NIST SP 811, from memory).
    made = revise(small, specimen="A1", field="temperature", reading=3, value="68 degF",
                  reason="thermometer read in F")  # fmt: skip
    assert (made.old_value, made.applied_value) == ("20.5 degC", "20 degC")
    water = revise(small, specimen="A2", field="water_content", value="0.17 -", reason="oven")
    assert (water.old_value, water.applied_value) == ("16 %", "17 %")
    label = revise(small, specimen="A2", field="effort", value="modified", reason="mislabelled")
    assert label.applied_value == "modified"
    effective = load_effective_series(small).series
    assert effective.falling_head.loc[1, "temperature"] == pytest.approx(20.0, abs=1e-12)
    assert effective.specimens.loc[1, "water_content"] == pytest.approx(0.17)
    assert effective.specimens.loc[1, "effort"] == "modified"


def test_workbook_series_keeps_its_log_beside_it(tmp_path):
    book = Path(shutil.copy(SAMPLES / "drainage_sand.xlsx", tmp_path / "drainage_sand.xlsx"))
    before = hashlib.sha256(book.read_bytes()).hexdigest()
    made = revise(book, specimen="DL-B", field="height", value="155 mm", reason="re-measured")
    assert (tmp_path / "drainage_sand.revisions.csv").exists()
    assert made.old_value == "6.119 in" and made.applied_value.endswith(" in")
    timed = revise(book, specimen="DL-A", field="duration", reading=3, value="7 min",
                   reason="stopwatch misread")  # fmt: skip
    assert (timed.table, timed.old_value, timed.applied_value) == (
        "constant_head",
        "425 s",
        "420 s",
    )
    effective = load_effective_series(book).series
    height = effective.specimens.set_index("specimen").loc["DL-B"]
    assert height["height"] == pytest.approx(0.155, rel=1e-14)
    assert effective.constant_head.loc[1, "duration"] == 420.0
    assert hashlib.sha256(book.read_bytes()).hexdigest() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "drainage_sand.revisions.csv",
        "drainage_sand.xlsx",
    ]


def test_a_value_the_file_lacks_takes_the_typed_unit(clay):
    made = revise(clay, specimen="QF-03", field="d10", value="0.002 mm", reason="hydrometer")
    assert (made.old_value, made.applied_value) == ("", "0.002 mm")
    effective = load_effective_series(clay).series
    assert effective.specimens.loc[2, "d10"] == pytest.approx(2e-6)
    assert effective.specimens["d10"].isna().sum() == 13
    assert effective.units["specimens"]["d10"] == "mm"


def test_apply_revisions_leaves_the_raw_tables_alone(small):
    revise(small, specimen="A1", field="height", value="117 mm", reason="r")
    tables, _ = read_tables(small)
    snapshot = tables["specimens"].frame.copy()
    effective, applied = apply_revisions(tables, read_revisions(small))
    pd.testing.assert_frame_equal(tables["specimens"].frame, snapshot)
    assert effective["specimens"].frame.loc[0, "height"] == 117.0 and len(applied) == 1
